"""Length of one degree of longitude along a parallel on the WGS84
ellipsoid, by pyproj (python3-pyproj, PROJ's geodesic, Karney 2013): the
parallel from lon 0 to lon 1 at each latitude, cut into 1000 geodesic
segments whose lengths are summed (the chords of a 0.001 degree step differ
from the parallel's arc by far less than 1e-9 relative).

Usage: parallel_ref.py LAT... ; prints "lat km" lines.
"""
import sys

from pyproj import Geod

g = Geod(ellps="WGS84")
for a in sys.argv[1:]:
    lat = float(a)
    n = 1000
    lons = [i / n for i in range(n + 1)]
    lats = [lat] * (n + 1)
    print(a, repr(g.line_length(lons, lats) / 1000.0))
