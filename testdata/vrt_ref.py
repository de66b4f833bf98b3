"""Reads a raw float32 raster through its GDAL VRT and a GeoTIFF with GDAL
(python3-gdal, NumPy) and prints whether every pixel agrees, as JSON.

    vrt_ref.py RASTER.vrt RASTER.tif
"""
import json
import sys

import numpy as np
from osgeo import gdal

gdal.UseExceptions()
a = gdal.Open(sys.argv[1])
b = gdal.Open(sys.argv[2])
x = a.GetRasterBand(1).ReadAsArray()
y = b.GetRasterBand(1).ReadAsArray()
print(json.dumps({
    "size": [a.RasterXSize, a.RasterYSize],
    "geotransform_equal": list(a.GetGeoTransform()) == list(b.GetGeoTransform()),
    "nodata": [a.GetRasterBand(1).GetNoDataValue(), b.GetRasterBand(1).GetNoDataValue()],
    "differing": int(np.count_nonzero(x.view(np.uint32) != y.view(np.uint32))) if x.shape == y.shape else -1,
}))
