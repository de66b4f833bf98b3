#!/usr/bin/env python3
"""Reference standard-normal quantiles and CDF from SciPy (scipy.stats.norm).

Used by spi/normal_test.go. Reads lines "ppf P" or "cdf Z" on stdin and
prints norm.ppf(P) or norm.cdf(Z), one per line, as %.17g.
"""
import sys

from scipy.stats import norm


def main():
    for line in sys.stdin:
        parts = line.split()
        if not parts:
            continue
        kind, x = parts[0], float(parts[1])
        if kind == "ppf":
            print("%.17g" % norm.ppf(x))
        elif kind == "cdf":
            print("%.17g" % norm.cdf(x))
        else:
            sys.exit("unknown request %r" % kind)


if __name__ == "__main__":
    main()
