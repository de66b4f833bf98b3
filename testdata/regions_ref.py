#!/usr/bin/python3
"""Outside references for drygrid's region statistics (grid/coverage_test.go).

Reads one JSON object on stdin and writes JSON on stdout.

mode "area": {"mode": "area", "polygons": [[ring, ...], ...], "step": deg}
  -> [km2, ...]
  Each polygon's area on the WGS84 ellipsoid from pyproj 3.4
  (Geod(ellps="WGS84").geometry_area_perimeter, Karney 2013 geodesics).
  Edges are densified every "step" deg (default 0.01) in longitude-latitude first, so the
  geodesic polygon follows the straight lon-lat edges drygrid assumes
  (parallels stay parallels instead of bulging poleward).

mode "validity": {"mode": "validity", "polygons": [[ring, ...], ...]}
  -> [[valid, reason], ...]: shapely 1.8's is_valid and explain_validity
  (GEOS, whose orientation tests are exact), for each polygon as given.

mode "shares": {"mode": "shares", "spec": {west, north, res, cols, rows},
  "polygon": [ring, ...], "step": deg} -> [[cell, frac], ...]
  For every grid cell, the share of the cell's area on the WGS84 ellipsoid
  inside the polygon: shapely 1.8 clips the polygon to the cell box (an
  exact planar intersection in longitude-latitude), and pyproj 3.4 gives
  the ellipsoidal areas of the clipped part and of the cell, their edges
  densified every "step" degrees (default 0.005) so that geodesics follow
  the lon-lat lines (relative error about 1e-10 at that step).
"""
import json
import math
import sys

from shapely.geometry import Polygon, box


def densify(ring, step=0.01):
    out = []
    for (x0, y0), (x1, y1) in zip(ring[:-1], ring[1:]):
        n = max(1, int(math.ceil(max(abs(x1 - x0), abs(y1 - y0)) / step)))
        for k in range(n):
            t = k / n
            out.append((x0 + t * (x1 - x0), y0 + t * (y1 - y0)))
    out.append(tuple(ring[-1]))
    return out


def area(req):
    from pyproj import Geod
    geod = Geod(ellps="WGS84")
    res = []
    step = req.get("step", 0.01)
    for rings in req["polygons"]:
        poly = Polygon(densify(rings[0], step), [densify(r, step) for r in rings[1:]])
        a, _ = geod.geometry_area_perimeter(poly)
        res.append(abs(a) / 1e6)
    return res


def validity(req):
    from shapely.validation import explain_validity
    res = []
    for rings in req["polygons"]:
        poly = Polygon(rings[0], rings[1:])
        res.append([bool(poly.is_valid), explain_validity(poly)])
    return res


def geod_area(geom, step):
    """Ellipsoidal area (m2) of a shapely Polygon or collection, its edges
    densified along lon-lat lines."""
    from pyproj import Geod
    from shapely.geometry.polygon import orient
    geod = Geod(ellps="WGS84")
    parts = getattr(geom, "geoms", [geom])
    total = 0.0
    for p in parts:
        if p.geom_type != "Polygon" or p.is_empty:
            continue
        p = orient(p, 1.0)
        d = Polygon(densify(list(p.exterior.coords), step),
                    [densify(list(r.coords), step) for r in p.interiors])
        a, _ = geod.geometry_area_perimeter(d)
        total += a
    return total


def shares(req):
    s = req["spec"]
    rings = req["polygon"]
    step = req.get("step", 0.005)
    poly = Polygon(rings[0], rings[1:])
    assert poly.is_valid, "reference polygon is not valid"
    res = []
    minx, miny, maxx, maxy = poly.bounds
    for row in range(s["rows"]):
        n = s["north"] - row * s["res"]
        so = n - s["res"]
        if so >= maxy or n <= miny:
            continue
        cell_area = None
        for col in range(s["cols"]):
            w = s["west"] + col * s["res"]
            e = w + s["res"]
            if w >= maxx or e <= minx:
                continue
            cell = box(w, so, e, n)
            part = poly.intersection(cell)
            if part.area / cell.area <= 1e-12:
                continue
            if cell_area is None:
                cell_area = geod_area(cell, step)
            res.append([row * s["cols"] + col, geod_area(part, step) / cell_area])
    return res


def main():
    req = json.load(sys.stdin)
    out = {"area": area, "shares": shares, "validity": validity}[req["mode"]](req)
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
