"""Read pixels of a PNG with GDAL (python3-gdal 3.6, the PNG driver), as an
independent reader of drygrid's map.png.

Usage: png_pixels.py FILE.png < "x y" lines
Prints "size W H BANDS" and then "x y r g b" for every requested pixel.
"""
import sys

from osgeo import gdal

gdal.UseExceptions()
ds = gdal.Open(sys.argv[1])
if ds.GetDriver().ShortName != "PNG":
    sys.exit("not read by the PNG driver: " + ds.GetDriver().ShortName)
arr = ds.ReadAsArray()  # shape (bands, rows, cols)
print("size", ds.RasterXSize, ds.RasterYSize, ds.RasterCount)
for line in sys.stdin:
    parts = line.split()
    if len(parts) != 2:
        continue
    x, y = int(parts[0]), int(parts[1])
    print(x, y, int(arr[0, y, x]), int(arr[1, y, x]), int(arr[2, y, x]))
