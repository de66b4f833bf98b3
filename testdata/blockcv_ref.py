#!/usr/bin/env python3
"""Independent brute-force reference for drygrid's spatial block
cross-validation (crossval --blocks KM: interp.CrossValidateBlocks).

Reads one JSON object on stdin:
  {"points": [[lon, lat, z], ...], "power": p, "neighbors": k,
   "radius_km": r, "min_stations": m, "block_km": b}
and prints one JSON object:
  {"block": [[row, col], ...], "pred": [...|null], "n": [...],
   "n_counted": .., "rmse": .., "mae": .., "bias": .., "blocks": ..}

Blocks (Roberts et al. 2017, Ecography 40: blocks left out whole), as
docs/design.md defines them: latitude bands of h = b / 111.2 degrees from
90S (band i: -90 + i h <= lat < -90 + (i+1) h, 90N in the last band); band i
cut into cols = max(1, round(360 cos(phi_i) / h)) equal longitude blocks
from 180W, phi_i the band's centre latitude (at most 90).

Prediction, by brute force with NumPy, no spatial index: every station is
predicted from the stations of the OTHER blocks: the haversine formula on a
sphere of R = 6371.0088 km (IUGG mean radius, Moritz 2000); the stations
within r km; fewer than m -> not counted; a stable sort by distance (ties to
the earlier input), the k nearest; one closer than 1 m gives its value;
otherwise Shepard (1968): sum(w z) / sum(w), w = d^-p. residual = predicted
- observed; RMSE, MAE, bias = mean residual.
"""
import json
import math
import sys

import numpy as np

from sphere_ref import haversine_km


def block(lon, lat, km):
    h = km / 111.2
    nb = max(1, math.ceil(180 / h))
    row = min(max(math.floor((lat + 90) / h), 0), nb - 1)
    phi = min(-90 + (row + 0.5) * h, 90.0)
    cols = max(1, round(360 * math.cos(math.radians(phi)) / h))
    w = 360 / cols
    l = (lon + 180) % 360 - 180
    col = min(max(math.floor((l + 180) / w), 0), cols - 1)
    return row, col


def main():
    job = json.load(sys.stdin)
    pts = np.asarray(job["points"], dtype=float).reshape(-1, 3)
    p = float(job["power"])
    k = int(job["neighbors"])
    radius = float(job["radius_km"])
    m = int(job["min_stations"])
    b = float(job["block_km"])
    blocks = [block(lon, lat, b) for lon, lat, _ in pts]
    out = {"block": [list(x) for x in blocks], "pred": [], "n": [], "blocks": len(set(blocks))}
    res = []
    for i in range(pts.shape[0]):
        others = np.asarray([j for j in range(pts.shape[0]) if blocks[j] != blocks[i]], dtype=int)
        d = haversine_km(pts[i, 0], pts[i, 1], pts[others, 0], pts[others, 1]) if others.size else np.zeros(0)
        inside = others[d <= radius]
        din = d[d <= radius]
        if inside.size < m:
            out["pred"].append(None)
            out["n"].append(int(inside.size))
            continue
        order = np.argsort(din, kind="stable")[:k]
        chosen, dk = inside[order], din[order]
        if dk[0] < 0.001:
            v = float(pts[chosen[0], 2])
        else:
            w = dk ** -p
            v = float(np.sum(w * pts[chosen, 2]) / np.sum(w))
        out["pred"].append(v)
        out["n"].append(int(chosen.size))
        res.append(v - pts[i, 2])
    r = np.asarray(res)
    out["n_counted"] = int(r.size)
    if r.size:
        out["rmse"] = float(np.sqrt(np.mean(r ** 2)))
        out["mae"] = float(np.mean(np.abs(r)))
        out["bias"] = float(np.mean(r))
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
