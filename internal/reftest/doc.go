// Package reftest finds the outside reference tools that drygrid's tests
// check against: GDAL (gdal-bin, python3-gdal), SciPy, pyproj and shapely.
// Where one is missing the test is skipped with a visible message, or fails
// when DRYGRID_REQUIRE_REFS=1 (as in CI). Debian's Python modules live under
// /usr/bin/python3, which may not be the first python3 on PATH, so that one
// is tried first. It is test support only and has no place in the data flow:
// no library package imports it.
package reftest
