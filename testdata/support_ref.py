#!/usr/bin/env python3
"""Independent brute-force reference for drygrid's support layer
(support.tif, support_count.tif: interp.Support).

Reads one JSON object on stdin:
  {"points": [[lon, lat], ...], "cells": [[lon, lat], ...],
   "radius_km": r, "neighbors": k,
   "rasters": [support.tif, support_count.tif]   (optional)}
and prints one line per cell: "DIST COUNT", DIST the great-circle distance
in km to the nearest station within r km ("nan" when none) and COUNT the
number of stations within r km capped at k, with the distance to the radius
after it ("DIST COUNT EDGE", EDGE the smallest |d - r| over the stations,
so that a caller can skip cells with a station on the radius itself).
With "rasters", GDAL (python3-gdal) reads the two files and each line gets
the cell's two values as read ("DIST COUNT EDGE GDAL_DIST GDAL_COUNT", no
data as "nan"), the cells in the rasters' row-major order.

Method, by brute force with NumPy, no spatial index: the haversine formula
on a sphere of radius R = 6371.0088 km (IUGG mean radius R1, Moritz 2000),
every station against every cell.
"""
import json
import sys

import numpy as np

from sphere_ref import haversine_km


def main():
    job = json.load(sys.stdin)
    pts = np.asarray(job["points"], dtype=float).reshape(-1, 2)
    r = float(job["radius_km"])
    k = int(job["neighbors"])
    read = None
    if "rasters" in job:
        from osgeo import gdal
        gdal.UseExceptions()
        read = []
        for path in job["rasters"]:
            ds = gdal.Open(path)  # kept while its band is read
            band = ds.GetRasterBand(1)
            a = band.ReadAsArray().astype(float).ravel()
            nd = band.GetNoDataValue()
            read.append(np.where(a == nd, np.nan, a))
    out = []
    for i, (lon, lat) in enumerate(job["cells"]):
        d = haversine_km(lon, lat, pts[:, 0], pts[:, 1])
        inside = d <= r
        n = int(np.count_nonzero(inside))
        dist = float(np.min(d[inside])) if n else float("nan")
        edge = float(np.min(np.abs(d - r)))
        line = "%r %d %r" % (dist, min(n, k), edge)
        if read is not None:
            line += " %r %r" % (float(read[0][i]), float(read[1][i]))
        out.append(line)
    sys.stdout.write("\n".join(out) + "\n")


if __name__ == "__main__":
    main()
