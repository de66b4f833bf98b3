#!/usr/bin/env python3
"""Reference for the demo scenario's target-year totals, from SciPy.

Used by scenario/scenario_test.go. Reads lines "total shape scale q" on stdin
and prints, per line, H = q + (1 - q) * G(total; shape, scale) for total > 0
and q / 2 for total == 0 (the zero-mass rule of package spi, Stagge et al. 2015),
then z = Phi^-1(H) and the density of H, (1 - q) * g(total), with
scipy.stats.gamma.cdf, .pdf and scipy.stats.norm.ppf (%.17g). The Go test
compares H with Phi of the anomaly it imposed; the density bounds the effect
of rounding the total to 0.1 mm.
"""
import sys

from scipy.stats import gamma, norm

for line in sys.stdin:
    f = line.split()
    if not f:
        continue
    x, a, scale, q = (float(v) for v in f)
    h = q / 2 if x == 0 else q + (1 - q) * gamma.cdf(x, a, loc=0, scale=scale)
    dens = 0.0 if x == 0 else (1 - q) * gamma.pdf(x, a, loc=0, scale=scale)
    print("%.17g %.17g %.17g" % (h, norm.ppf(h), dens))
