#!/usr/bin/env python3
"""End-to-end reference for `drygrid grid --sectors`: read index.tif with GDAL,
rebuild every cell centre from GDAL's geotransform, and estimate each cell by
brute force with the NumPy sector rule of crossval_ref.py (haversine on
R = 6371.0088 km, spherical forward azimuth, neighbors // sectors per sector,
Shepard 1968 weights); then compare.

usage: sectors_grid_ref.py INDEX.tif STATIONS.csv POWER K RADIUS_KM MIN SECTORS
(the stations' value column is spi) prints one JSON object: cells, covered,
masked_mismatch, max_abs_diff, first_bad, short (cells using fewer than K).
"""
import csv
import json
import os
import sys

import numpy as np
from osgeo import gdal

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from crossval_ref import estimate  # noqa: E402


def main():
    tif, stations = sys.argv[1], sys.argv[2]
    power, k, radius, m, s = float(sys.argv[3]), int(sys.argv[4]), float(sys.argv[5]), int(sys.argv[6]), int(sys.argv[7])
    with open(stations, newline="") as f:
        pts = np.asarray([(float(r["longitude"]), float(r["latitude"]), float(r["spi"])) for r in csv.DictReader(f)])
    ds = gdal.Open(tif)
    band = ds.GetRasterBand(1)
    nodata = band.GetNoDataValue()
    a = band.ReadAsArray().astype(np.float64)
    gt = ds.GetGeoTransform()
    allidx = np.arange(pts.shape[0])
    out = {"cells": int(a.size), "covered": 0, "masked_mismatch": 0, "max_abs_diff": 0.0,
           "first_bad": None, "short": 0}
    for row in range(a.shape[0]):
        lat = gt[3] + (row + 0.5) * gt[5]
        for col in range(a.shape[1]):
            lon = gt[0] + (col + 0.5) * gt[1]
            v, n, _ = estimate(pts, lon, lat, allidx, power, k, radius, m, s)
            got = a[row, col]
            if v is None:
                if got != nodata:
                    out["masked_mismatch"] += 1
                    out["first_bad"] = out["first_bad"] or [row, col, got, None]
                continue
            if got == nodata:
                out["masked_mismatch"] += 1
                out["first_bad"] = out["first_bad"] or [row, col, None, v]
                continue
            out["covered"] += 1
            out["short"] += n < k
            out["max_abs_diff"] = max(out["max_abs_diff"], abs(got - v))
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
