#!/usr/bin/env python3
"""Writes the invented fixtures of station/index_*_test.go (run once; the CSVs
are committed). Nothing here is real: ids, places and totals are invented."""
import numpy as np

rng = np.random.default_rng(20261201)
stations = [
    # id, name, lat, lon, elevation
    ("ST01", "Invented site one", 45.125, 7.25, 310),
    ("ST02", "Invented site two", -23.5, 133.75, 540),
    ("ST03", "Invented site three", 10.0, -75.5, ""),
    ("ST04", "Invented site four", 60.0, 25.0, 12),
    ("ST05", "Invented site five", 0.0, 0.0, 0),
    ("ST06", "Invented site six", 30.0, 45.0, 800),
    ("ST07", "Invented site seven", -40.0, 175.0, 90),
    ("ST08", "Invented site eight", 20.0, 200.5, 5),
    ("ST09", "Invented site nine", 50.0, 10.0, 200),
]
with open("stations.csv", "w") as f:
    f.write("station,name,latitude,longitude,elevation\n")
    for s in stations:
        f.write("%s,%s,%s,%s,%s\n" % s)

rows = []
def add(sid, years, vals):
    for y, v in zip(years, vals):
        rows.append((sid, y, v))

yrs = lambda a, b: list(range(a, b + 1))
# ST01: 60 years, gamma(2, 25), 0.1 mm
add("ST01", yrs(1961, 2020), ["%.1f" % v for v in rng.gamma(2.0, 25.0, 60)])
# ST02: arid, 45 years, about a quarter zeros, 2020 is zero
v = rng.gamma(0.8, 10.0, 45)
v[rng.random(45) < 0.25] = 0
v[-1] = 0
add("ST02", yrs(1976, 2020), ["%.1f" % x for x in v])
# ST03: short record, 12 years
add("ST03", yrs(2009, 2020), ["%.1f" % v for v in rng.gamma(3.0, 15.0, 12)])
# ST04: 40 years, target year NA
v = ["%.1f" % x for x in rng.gamma(4.0, 20.0, 40)]
v[-1] = "NA"
add("ST04", yrs(1981, 2020), v)
# ST05: 50 years of whole millimetres in a narrow range: many ties
add("ST05", yrs(1971, 2020), ["%d" % x for x in np.round(rng.gamma(6.0, 3.0, 50))])
# ST06: 35 years, all zero but one
v = ["0"] * 35
v[10] = "12.5"
add("ST06", yrs(1986, 2020), v)
# ST07: bimodal, 40 years
v = np.where(rng.random(40) < 0.5, rng.normal(20, 2, 40), rng.normal(200, 10, 40))
add("ST07", yrs(1981, 2020), ["%.1f" % x for x in v])
# ST08: 34 rows, 4 of them empty (missing): exactly 30 totals
v = ["%.1f" % x for x in rng.gamma(3.0, 10.0, 34)]
for i in (3, 9, 17, 25):
    v[i] = ""
add("ST08", yrs(1987, 2020), v)
# stations missing from the station table
add("ZZ98", [2019, 2020], ["5.0", "6.0"])
add("ZZ99", [2020], ["7.0"])
# rows in station-then-year order, except ST05 shuffled (order must not matter)
st05 = [r for r in rows if r[0] == "ST05"]
rng.shuffle(st05)
rows = [r for r in rows if r[0] != "ST05"] + st05
with open("totals.csv", "w") as f:
    f.write("station,year,total_mm\n")
    for r in rows:
        f.write("%s,%d,%s\n" % r)
