#!/usr/bin/env python3
"""Independent brute-force reference for drygrid's leave-one-out
cross-validation and direction sectors.

Reads one JSON object on stdin:
  {"points": [[lon, lat, z], ...], "power": p, "neighbors": k,
   "radius_km": r, "min_stations": m, "sectors": s (0, 4 or 8),
   "cells": [[lon, lat], ...]   (optional: estimate these cells instead),
   "cuts": [c1, c2, ...]        (optional: band = 1 + number of cuts c with
                                 z > c for "gt" cuts, or z >= c for "ge" cuts,
                                 given as [[c, "gt"|"ge"], ...])}
and prints one JSON object:
  leave-one-out: {"pred": [...|null], "n": [...], "counted": [...],
                  "n_counted": .., "rmse": .., "mae": .., "bias": .., "band_agreement": ..}
  cells:         {"pred": [...|null], "n": [...], "chosen": [[input indices], ...]}

Method (docs/design.md, IDW), by brute force with NumPy, no spatial index:
  * great-circle distance by the haversine formula on a sphere of radius
    R = 6371.0088 km (IUGG mean radius, Moritz 2000);
  * the stations within r km (for leave-one-out: the OTHER stations); fewer
    than m -> masked / not counted;
  * the candidates in a stable sort by distance (ties to the earlier input);
  * without sectors the k nearest; with s sectors, the bearing from the cell
    to each station is the forward azimuth on the sphere
    atan2(sin dlon cos lat2, cos lat1 sin lat2 - sin lat1 cos lat2 cos dlon)
    (Williams, Aviation Formulary; Vincenty's spherical case), dlon taken in
    [-180, 180) with sin 180 = 0 exactly (across the pole), the bearing in
    [0, 2 pi) from north clockwise; sector = floor(bearing / (2 pi / s));
    each sector keeps its k // s nearest, no redistribution;
  * a chosen station closer than 1 m gives its value (the nearest one);
  * otherwise Shepard (1968): z = sum(w_i z_i) / sum(w_i), w_i = d_i^-p;
  * residual = predicted - observed; RMSE, MAE, bias = mean residual;
    band agreement = share of counted stations with equal bands.
"""
import json
import math
import sys

import numpy as np

from sphere_ref import haversine_km


def bearing(lon1, lat1, lon2, lat2):
    p1, p2 = math.radians(lat1), np.radians(lat2)
    # The longitude difference in [-180, 180); at exactly 180 degrees the
    # station lies across the pole on the cell's meridian: sine 0, cosine -1.
    dd = np.mod(np.asarray(lon2, dtype=float) - lon1 + 180.0, 360.0) - 180.0
    dl = np.radians(dd)
    sdl = np.where(np.abs(dd) == 180.0, 0.0, np.sin(dl))
    cdl = np.where(np.abs(dd) == 180.0, -1.0, np.cos(dl))
    b = np.arctan2(sdl * np.cos(p2),
                   math.cos(p1) * np.sin(p2) - math.sin(p1) * np.cos(p2) * cdl)
    return np.where(b < 0, b + 2 * math.pi, b)


def estimate(pts, lon, lat, others, p, k, radius, m, s):
    """Returns (value or None, n, chosen indices)."""
    d = haversine_km(lon, lat, pts[others, 0], pts[others, 1])
    inside = others[d <= radius]
    din = d[d <= radius]
    if inside.size < m:
        return None, int(inside.size), []
    order = np.argsort(din, kind="stable")
    cand, dc = inside[order], din[order]
    if s == 0:
        chosen, dk = cand[:k], dc[:k]
    else:
        quota = k // s
        sec = np.floor(bearing(lon, lat, pts[cand, 0], pts[cand, 1]) / (2 * math.pi / s)).astype(int)
        sec = np.minimum(sec, s - 1)
        count = [0] * s
        keep = []
        for j in range(cand.size):
            if count[sec[j]] < quota:
                count[sec[j]] += 1
                keep.append(j)
        chosen, dk = cand[keep], dc[keep]
    if dk[0] < 0.001:
        return float(pts[chosen[0], 2]), int(chosen.size), chosen.tolist()
    w = dk ** -p
    return float(np.sum(w * pts[chosen, 2]) / np.sum(w)), int(chosen.size), chosen.tolist()


def band(z, cuts):
    b = 1
    for c, kind in cuts:
        if (kind == "gt" and z > c) or (kind == "ge" and z >= c):
            b += 1
    return b


def main():
    job = json.load(sys.stdin)
    pts = np.asarray(job["points"], dtype=float).reshape(-1, 3)
    p = float(job["power"])
    k = int(job["neighbors"])
    radius = float(job["radius_km"])
    m = int(job["min_stations"])
    s = int(job.get("sectors", 0))
    cuts = job.get("cuts", [])
    n_pts = pts.shape[0]
    if "cells" in job:
        out = {"pred": [], "n": [], "chosen": []}
        allidx = np.arange(n_pts)
        for lon, lat in job["cells"]:
            v, n, ch = estimate(pts, lon, lat, allidx, p, k, radius, m, s)
            out["pred"].append(v)
            out["n"].append(n)
            out["chosen"].append(ch)
        json.dump(out, sys.stdout)
        return
    out = {"pred": [], "n": [], "counted": []}
    res = []
    agree = 0
    for i in range(n_pts):
        others = np.delete(np.arange(n_pts), i)
        v, n, _ = estimate(pts, pts[i, 0], pts[i, 1], others, p, k, radius, m, s)
        out["pred"].append(v)
        out["n"].append(n)
        out["counted"].append(v is not None)
        if v is not None:
            res.append(v - pts[i, 2])
            agree += band(v, cuts) == band(pts[i, 2], cuts)
    r = np.asarray(res)
    out["n_counted"] = int(r.size)
    if r.size:
        out["rmse"] = float(np.sqrt(np.mean(r ** 2)))
        out["mae"] = float(np.mean(np.abs(r)))
        out["bias"] = float(np.mean(r))
        out["band_agreement"] = agree / r.size
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
