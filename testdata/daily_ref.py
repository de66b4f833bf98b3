#!/usr/bin/env python3
"""Independent reference of drygrid's daily window totals, in pure Python.

Standard library only (datetime, csv, json, math, re, gzip): it shares no
code with the Go implementation, and walks the calendar with
datetime.date and datetime.timedelta instead of day numbers. Used by
station/daily_ref_test.go.

  daily_ref.py totals FILE DELIM TARGET WINDOWS MINSHARE UNITS FLAGS
      FILE: a daily table (gzip when it starts with 1f 8b), DELIM "," or
      "tab"; TARGET YYYY-MM-DD; WINDOWS "30,90"; MINSHARE "0.9"; UNITS mm,
      tenths-mm or inch; FLAGS the excluded flags, "|"-separated ("" for
      none). Prints a JSON list of [station, year, window, reported days,
      sum in 1e-6 mm, days needed, total in mm or null], stations sorted,
      then years, then windows in the given order.
  daily_ref.py calendar
      reads a JSON list of [TARGET, N, YEAR] and prints [start, end] of each
      window; and a list of date strings under "dates", each with its day
      number from 1970-01-01 or null when it is not a valid YYYY-MM-DD date.

The rules (those stated for drygrid's daily totals): the window of N days
of year Y ends on the target's month and day in Y (a 29 February target
ends on 28 February in common years) and covers the N calendar days ending
there. A day is reported when the station has a row for it with a value
that is not empty, not NA/N/A/null (any case) and whose flag is not
excluded. Values are converted to mm (tenths-mm / 10, inch * 25.4) and
each is rounded to 1e-6 mm as floor(mm * 1e6 + 0.5); a total exists when
at least ceil(share * N - 1e-9) days were reported. Years run from the
station's first row year (rows dated after the target are ignored) to the
target's year.
"""
import csv
import datetime
import gzip
import io
import json
import math
import re
import sys

ALIASES = {
    "id": ["station", "id", "station_id", "site"],
    "date": ["date", "day", "time"],
    "value": ["precipitation", "precip", "prcp", "value", "rain", "rainfall", "total"],
    "flag": ["flag", "qflag", "quality", "qc"],
}

DATE_RE = re.compile(r"^(\d{4})-(\d{2})-(\d{2})$")


def parse_date(s):
    m = DATE_RE.match(s)
    if not m:
        return None
    try:
        return datetime.date(int(m.group(1)), int(m.group(2)), int(m.group(3)))
    except ValueError:
        return None


def window(target, year, n):
    month, day = target.month, target.day
    try:
        end = datetime.date(year, month, day)
    except ValueError:  # 29 February in a common year
        end = datetime.date(year, 2, 28)
    return end - datetime.timedelta(days=n - 1), end


def find(header, what):
    for i, h in enumerate(header):
        if h.strip().lower() in ALIASES[what]:
            return i
    return None


def totals(path, delim, target, windows, share, units, flags):
    with open(path, "rb") as f:
        raw = f.read()
    if raw[:2] == b"\x1f\x8b":
        raw = gzip.decompress(raw)
    rows = list(csv.reader(io.StringIO(raw.decode("utf-8-sig"), newline=""), delimiter=delim))
    header = rows[0]
    ci, cd, cv, cf = (find(header, w) for w in ("id", "date", "value", "flag"))
    days = {}  # station -> {date: mm or None}
    first = {}
    for row in rows[1:]:
        if all(c.strip() == "" for c in row):
            continue
        sid = row[ci].strip()
        date = parse_date(row[cd].strip())
        if date is None:
            raise SystemExit("bad date %r" % row[cd])
        if date > target:
            continue
        mm = None
        text = row[cv].strip()
        flagged = cf is not None and row[cf].strip() in flags
        if not flagged and text != "" and text.lower() not in ("na", "n/a", "null"):
            v = float(text)
            mm = v / 10 if units == "tenths-mm" else v * 25.4 if units == "inch" else v
        st = days.setdefault(sid, {})
        if date in st:
            raise SystemExit("station %s date %s twice" % (sid, date))
        st[date] = mm
        first[sid] = min(first.get(sid, date.year), date.year)
    out = []
    one = datetime.timedelta(days=1)
    for sid in sorted(days):
        st = days[sid]
        for year in range(first[sid], target.year + 1):
            for n in windows:
                start, end = window(target, year, n)
                need = math.ceil(share * n - 1e-9)
                rep, q = 0, 0
                d = start
                while d <= end:
                    mm = st.get(d)
                    if mm is not None:
                        rep += 1
                        q += math.floor(mm * 1e6 + 0.5)
                    d += one
                out.append([sid, year, n, rep, q, need, q / 1e6 if rep >= need else None])
    return out


def calendar(req):
    wins = []
    for t, n, y in req["windows"]:
        start, end = window(datetime.date.fromisoformat(t), y, n)
        wins.append([start.isoformat(), end.isoformat()])
    epoch = datetime.date(1970, 1, 1)
    dates = []
    for s in req["dates"]:
        d = parse_date(s)
        dates.append(None if d is None else (d - epoch).days)
    return {"windows": wins, "dates": dates}


def main():
    if sys.argv[1] == "totals":
        path, delim, target, windows, share, units, flags = sys.argv[2:9]
        delim = "\t" if delim == "tab" else delim
        flags = set(flags.split("|")) if flags else set()
        out = totals(path, delim, datetime.date.fromisoformat(target),
                     [int(w) for w in windows.split(",")], float(share), units, flags)
    elif sys.argv[1] == "calendar":
        out = calendar(json.load(sys.stdin))
    else:
        raise SystemExit("usage: daily_ref.py totals|calendar ...")
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
