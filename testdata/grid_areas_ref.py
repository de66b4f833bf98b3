#!/usr/bin/env python3
"""Reference areas of lat-lon cells on the WGS84 ellipsoid, from pyproj.

Used by grid/area_test.go. Reads lines "west south east north" (degrees) on
stdin and prints one area per line in km^2 (%.17g), computed with
pyproj.Geod(ellps="WGS84").polygon_area_perimeter, i.e. GeographicLib's
geodesic polygon area (Karney 2013, J. Geodesy 87:43-55).

Why the parallels are densified: GeographicLib joins consecutive vertices by
geodesics. A cell's meridian edges ARE geodesics, but its parallel edges (the
north and south sides, except on the equator) are not: the geodesic between
two corners on the same parallel bows towards the pole, so the four-corner
polygon has the wrong area. Putting N points along each parallel edge makes
every segment short, and the error between segment and parallel falls as
1/N^2; with N = 2000 it is below 1e-9 relative for cells up to 5 degrees at
60 N (lens area ~ W^3 tan(phi) / (12 R N^2) per edge). The meridian edges get
no extra points: they are exact already.
"""
import sys

from pyproj import Geod

N = 2000  # points per parallel edge

geod = Geod(ellps="WGS84")


def cell_area_km2(west, south, east, north):
    lons, lats = [], []
    # South edge, west to east (counter-clockwise seen from above).
    for i in range(N + 1):
        lons.append(west + (east - west) * i / N)
        lats.append(south)
    # North edge, east to west. The meridian edges are the jumps between
    # the two runs of points (geodesics, so exact).
    for i in range(N + 1):
        lons.append(east - (east - west) * i / N)
        lats.append(north)
    area, _ = geod.polygon_area_perimeter(lons, lats)
    return abs(area) / 1e6


def main():
    for line in sys.stdin:
        parts = line.split()
        if not parts:
            continue
        w, s, e, n = (float(p) for p in parts)
        print("%.17g" % cell_area_km2(w, s, e, n))


if __name__ == "__main__":
    main()
