#!/usr/bin/env python3
"""Reference records of delimited tables, from Python's csv module.

Used by station/table_test.go (TestTableAgainstPythonCSV). Reads the file
named on the command line (gzip-compressed when it starts with the gzip magic
bytes 1f 8b, RFC 1952), decodes it as UTF-8 with an optional BOM
("utf-8-sig"), parses it with csv.reader using the delimiter given as the
second argument (RFC 4180 quoting: double quotes, doubled to escape), turns
CRLF inside quoted fields into LF (as Go's encoding/csv does), trims every
field, drops records whose fields are all empty (drygrid's blank-line
rule), and prints the records as one JSON list of lists (header first).
"""
import csv
import gzip
import io
import json
import sys

path, delim = sys.argv[1], sys.argv[2]
if delim == "tab":
    delim = "\t"
with open(path, "rb") as f:
    raw = f.read()
if raw[:2] == b"\x1f\x8b":
    raw = gzip.decompress(raw)
text = raw.decode("utf-8-sig")
out = []
for rec in csv.reader(io.StringIO(text, newline=""), delimiter=delim, strict=True):
    rec = [f.replace("\r\n", "\n").strip() for f in rec]
    if all(f == "" for f in rec):
        continue
    out.append(rec)
json.dump(out, sys.stdout)
