#!/usr/bin/env python3
"""End-to-end reference for `drygrid grid`: read index.tif with GDAL, rebuild
every cell centre from GDAL's geotransform, convert the stations' values to z
independently (SciPy's norm.ppf for percentiles, clamped to [0.1, 99.9] as
docs/design.md says), interpolate by brute force with the NumPy IDW of
idw_ref.py (Shepard 1968, haversine on R = 6371.0088 km) and compare.

Percent of normal (KIND pct-of-normal, column pct_of_median) is interpolated
as it is, without conversion.

usage: grid_e2e_ref.py INDEX.tif STATIONS.csv KIND POWER K RADIUS_KM MIN
prints one JSON object: cells, masked_mismatch, max_abs_diff, first_bad.
"""
import csv
import json
import os
import sys

import numpy as np
from osgeo import gdal
from scipy.stats import norm

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from idw_ref import haversine_km  # noqa: E402


def main():
    tif, stations, kind = sys.argv[1], sys.argv[2], sys.argv[3]
    power, k, radius, m = float(sys.argv[4]), int(sys.argv[5]), float(sys.argv[6]), int(sys.argv[7])
    pts = []
    with open(stations, newline="") as f:
        for row in csv.DictReader(f):
            # percent of normal is interpolated as it is, from the index
            # step's column pct_of_median; it is not a probability (no z).
            v = float(row["pct_of_median" if kind == "pct-of-normal" else kind])
            if kind == "percentile":
                v = float(norm.ppf(min(max(v, 0.1), 99.9) / 100))
            pts.append((float(row["longitude"]), float(row["latitude"]), v))
    pts = np.asarray(pts)
    ds = gdal.Open(tif)
    band = ds.GetRasterBand(1)
    nodata = band.GetNoDataValue()
    a = band.ReadAsArray().astype(np.float64)
    gt = ds.GetGeoTransform()
    out = {"cells": int(a.size), "masked_mismatch": 0, "max_abs_diff": 0.0, "first_bad": None,
           "covered": 0, "nodata": nodata}
    for row in range(a.shape[0]):
        lat = gt[3] + (row + 0.5) * gt[5]
        for col in range(a.shape[1]):
            lon = gt[0] + (col + 0.5) * gt[1]
            d = haversine_km(lon, lat, pts[:, 0], pts[:, 1])
            inside = np.flatnonzero(d <= radius)
            got = a[row, col]
            if inside.size < m:
                if got != nodata:
                    out["masked_mismatch"] += 1
                    out["first_bad"] = out["first_bad"] or [col, row, "want nodata", got]
                continue
            order = inside[np.argsort(d[inside], kind="stable")][:k]
            dk = d[order]
            if dk[0] < 0.001:
                want = pts[order[0], 2]
            else:
                w = dk ** -power
                want = float(np.sum(w * pts[order, 2]) / np.sum(w))
            if got == nodata:
                out["masked_mismatch"] += 1
                out["first_bad"] = out["first_bad"] or [col, row, want, "nodata"]
                continue
            out["covered"] += 1
            diff = abs(got - want)
            if diff > out["max_abs_diff"]:
                out["max_abs_diff"] = diff
    print(json.dumps(out))


if __name__ == "__main__":
    main()
