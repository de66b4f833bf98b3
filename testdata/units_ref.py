#!/usr/bin/env python3
"""SciPy reference of scheme units (bands.Unit): percentile cuts and legends.

Reads JSON on stdin: {"zcuts": [...], "pcuts": [...], "rule": "outer"|"lower"|"upper",
"ps": [...]}. Answers JSON:
  legend: "%.1f" of 100 * scipy.stats.norm.cdf(z) for each z cut (the
          percentile a legend prints for a z cut, one decimal);
  zcut:   scipy.stats.norm.ppf(p / 100) for each percentile cut;
  band:   for each percentile in ps, the 0-based band that holds it, found by
          comparing the percentile itself with the percentile cuts (no z),
          a value on a cut going to the band the rule says ("outer": the one
          farther from the 50th percentile);
  z:      scipy.stats.norm.ppf of each p clamped to [0.1, 99.9], / 100.
"""
import json
import sys

from scipy.stats import norm


def band_of(p, cuts, rule):
    i = 0
    for c in cuts:
        if p > c:
            i += 1
        elif p == c:
            lower = rule == "lower" or (rule == "outer" and c < 50)
            if not lower:
                i += 1
            break
        else:
            break
    return i


def main():
    q = json.load(sys.stdin)
    out = {
        "legend": ["%.1f" % (100 * norm.cdf(z)) for z in q.get("zcuts", [])],
        "zcut": [float(norm.ppf(c / 100)) for c in q.get("pcuts", [])],
        "band": [band_of(p, q.get("pcuts", []), q.get("rule", "outer")) for p in q.get("ps", [])],
        "z": [float(norm.ppf(min(max(p, 0.1), 99.9) / 100)) for p in q.get("ps", [])],
    }
    print(json.dumps(out))


if __name__ == "__main__":
    main()
