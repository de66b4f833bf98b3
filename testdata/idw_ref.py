#!/usr/bin/env python3
"""Independent brute-force reference for drygrid's IDW on the sphere.

Reads one JSON object on stdin:
  {"points": [[lon, lat, z], ...], "cells": [[lon, lat], ...],
   "power": p, "neighbors": k, "radius_km": r, "min_stations": m}
and prints one line per cell: the estimate (repr of a float) or "nan" when
the cell is masked.

Method, as docs/design.md states it, computed by brute force over every station
with NumPy (no spatial index):
  * great-circle distance by the haversine formula on a sphere of radius
    R = 6371.0088 km (IUGG mean radius, Moritz 2000, GRS 1980);
  * the stations within r km; fewer than m of them -> masked;
  * the k nearest of those (a stable sort: distance ties go to the station
    that comes first in the input);
  * a station closer than 1 m gives its value (the nearest one);
  * otherwise Shepard (1968): z = sum(w_i z_i) / sum(w_i), w_i = d_i^-p.
"""
import json
import sys

import numpy as np

from sphere_ref import haversine_km


def main():
    job = json.load(sys.stdin)
    pts = np.asarray(job["points"], dtype=float).reshape(-1, 3)
    cells = np.asarray(job["cells"], dtype=float).reshape(-1, 2)
    p = float(job["power"])
    k = int(job["neighbors"])
    radius = float(job["radius_km"])
    m = int(job["min_stations"])
    out = []
    for lon, lat in cells:
        d = haversine_km(lon, lat, pts[:, 0], pts[:, 1])
        inside = np.flatnonzero(d <= radius)
        if inside.size < m:
            out.append("nan")
            continue
        order = inside[np.argsort(d[inside], kind="stable")][:k]
        dk = d[order]
        if dk[0] < 0.001:
            out.append(repr(float(pts[order[0], 2])))
            continue
        w = dk ** -p
        out.append(repr(float(np.sum(w * pts[order, 2]) / np.sum(w))))
    sys.stdout.write("\n".join(out) + "\n")


if __name__ == "__main__":
    main()
