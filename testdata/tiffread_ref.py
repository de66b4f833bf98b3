#!/usr/bin/python3
"""GDAL 3.6 (python3-gdal) writes the GeoTIFFs that geotiff/tiffread_test.go
reads, and reads them back itself as the reference.

stdin: JSON list of cases
  {"path": ".../x.tif", "type": "Byte"|"Float32"|"Int16", "cols": n, "rows": n,
   "bands": 1, "gt": [w, res, 0, n, 0, -res], "epsg": 4326, "nodata": v|null,
   "options": ["TILED=YES", "COMPRESS=DEFLATE", ...], "point": false, "seed": 1}
For each case the raster is filled from numpy's PCG64 generator (band codes
0..9, or normal z with some no data), written with GDAL's GTiff driver, then
re-opened with GDAL: its values go to path + ".bin" (little-endian, row-major)
and stdout gets {path: {"gt": GetGeoTransform(), "nodata": GetNoDataValue()}}.
"""
import json
import sys

import numpy as np
from osgeo import gdal, osr

gdal.UseExceptions()

TYPES = {"Byte": gdal.GDT_Byte, "Float32": gdal.GDT_Float32, "Int16": gdal.GDT_Int16}


def make(c):
    rng = np.random.Generator(np.random.PCG64(c.get("seed", 1)))
    rows, cols = c["rows"], c["cols"]
    if c["type"] == "Float32":
        a = rng.normal(0, 1.2, (rows, cols)).astype(np.float32)
        a[rng.random((rows, cols)) < 0.1] = -9999
    else:
        a = rng.integers(0, 10, (rows, cols)).astype(np.uint8 if c["type"] == "Byte" else np.int16)
    drv = gdal.GetDriverByName("GTiff")
    ds = drv.Create(c["path"], cols, rows, c.get("bands") or 1, TYPES[c["type"]], c.get("options") or [])
    ds.SetGeoTransform(c["gt"])
    srs = osr.SpatialReference()
    srs.ImportFromEPSG(c.get("epsg") or 4326)
    ds.SetProjection(srs.ExportToWkt())
    if c.get("point"):
        ds.SetMetadataItem("AREA_OR_POINT", "Point")
    for b in range(c.get("bands") or 1):
        band = ds.GetRasterBand(b + 1)
        if c.get("nodata") is not None:
            band.SetNoDataValue(c["nodata"])
        band.WriteArray(a)
    ds = None
    ds = gdal.Open(c["path"])
    back = ds.GetRasterBand(1).ReadAsArray()
    with open(c["path"] + ".bin", "wb") as f:
        f.write(back.astype(back.dtype.newbyteorder("<")).tobytes())
    return {"gt": list(ds.GetGeoTransform()), "nodata": ds.GetRasterBand(1).GetNoDataValue()}


def main():
    cases = json.load(sys.stdin)
    json.dump({c["path"]: make(c) for c in cases}, sys.stdout)


if __name__ == "__main__":
    main()
