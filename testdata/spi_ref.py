#!/usr/bin/env python3
"""SciPy reference for drygrid's `index` (station/index_ref_test.go).

Independent of drygrid's Go code: it reimplements the rules of the index
step (docs/design.md, package spi) with SciPy 1.10 and NumPy primitives:
  gamma MLE          scipy.stats.gamma.fit(x, floc=0)
  gamma CDF          scipy.stats.gamma.cdf / .sf
  normal quantile    scipy.stats.norm.ppf / .isf
  mid-rank pct       scipy.stats.percentileofscore(sample, x, kind="mean")
  median             numpy.median
  Anderson-Darling   A^2 from the formula of Stephens (1974), eq. 4.2 in
                     D'Agostino & Stephens (1986), with NumPy
  AD null            scipy.stats.goodness_of_fit(gamma, ..., statistic="ad")
                     (parametric bootstrap, SciPy >= 1.10)

Modes (output is JSON on stdout):
  index STATIONS TOTALS YEAR REFSTART REFEND MINYEARS DIST   (0 = default/open)
  fit          stdin: JSON list of samples -> shape, scale, a2 of each
  spi          stdin: JSON list of {x, shape, scale, q} -> SPI of each
  pct          stdin: JSON list of {sample, x} -> percentileofscore(kind="mean")
  adnull       stdin: JSON {shape, scale, n, nmc, seed} -> bootstrap 95 % point
  adtable      stdin: JSON {shapes, n, nmc, seed} -> for each shape the 95 % point
               of A^2 over nmc gamma samples of n, each refitted (vectorised
               MLE, checked against scipy.stats.gamma.fit), and its Monte
               Carlo standard error
  bench N      time SciPy on N invented stations x 100 years (fit + SPI, then
               also the A^2 and percentile), scaled to 100,000 stations
"""
import csv
import json
import sys

import numpy as np
from scipy import stats


def fit(pos):
    shape, loc, scale = stats.gamma.fit(pos, floc=0)
    assert loc == 0
    return float(shape), float(scale)


def ad_gamma(pos, shape, scale):
    """A^2 = -n - (1/n) sum (2i-1) [ln z_i + ln(1 - z_{n+1-i})] (Stephens 1974)."""
    x = np.sort(np.asarray(pos, dtype=float))
    n = len(x)
    i = np.arange(1, n + 1)
    lz = stats.gamma.logcdf(x, shape, scale=scale)
    lsf = stats.gamma.logsf(x[::-1], shape, scale=scale)
    return float(-n - np.sum((2 * i - 1) * (lz + lsf)) / n)


def fit_many(x):
    """Gamma MLE with loc 0 for each row of x: Newton on ln a - digamma(a) =
    ln(mean) - mean(ln x) from Thom's (1958) start, as scipy.stats.gamma.fit
    solves it, for many samples at once."""
    from scipy import special
    m = x.mean(axis=1)
    s = np.log(m) - np.log(x).mean(axis=1)
    a = (3 - s + np.sqrt((s - 3) ** 2 + 24 * s)) / (12 * s)
    for _ in range(50):
        a = a - (np.log(a) - special.digamma(a) - s) / (1 / a - special.polygamma(1, a))
    return a, m / a


def ad_gamma_many(x, a, b):
    """ad_gamma for each row of x with its own shape a and scale b."""
    x = np.sort(x, axis=1)
    n = x.shape[1]
    i = np.arange(1, n + 1)
    lz = stats.gamma.logcdf(x, a[:, None], scale=b[:, None])
    lsf = stats.gamma.logsf(x[:, ::-1], a[:, None], scale=b[:, None])
    return -n - np.sum((2 * i - 1) * (lz + lsf), axis=1) / n


def spi(x, shape, scale, q):
    if x == 0:
        h = q / 2
    else:
        h = q + (1 - q) * stats.gamma.cdf(x, shape, scale=scale)
    return float(stats.norm.ppf(h))


def read_table(path):
    with open(path, newline="") as f:
        rows = list(csv.reader(f))
    head = [h.strip().lower() for h in rows[0]]
    return head, [[c.strip() for c in r] for r in rows[1:] if any(c.strip() for c in r)]


def col(head, *names):
    for n in names:
        if n in head:
            return head.index(n)
    raise SystemExit("no column %s in %s" % (names, head))


def index(stations, totals, year, ref_start, ref_end, min_years, dist):
    sh, srows = read_table(stations)
    ids = [r[col(sh, "station", "id", "station_id", "site")] for r in srows]
    th, trows = read_table(totals)
    ic, yc = col(th, "station", "id", "station_id", "site"), col(th, "year")
    tc = col(th, "total", "total_mm", "precip", "value")
    series = {i: {} for i in ids}
    latest = 0
    for r in trows:
        if r[ic] not in series:
            continue  # unknown station: skipped
        y = int(r[yc])
        v = None if r[tc] in ("", "NA", "na", "N/A", "null") else float(r[tc])
        series[r[ic]][y] = v
        if v is not None:
            latest = max(latest, y)
    if year == 0:
        year = latest
    min_years = min_years or 30
    out = []
    for sid in ids:
        s = series[sid]
        ref = [v for y, v in sorted(s.items()) if v is not None
               and (ref_start == 0 or y >= ref_start) and (ref_end == 0 or y <= ref_end)]
        x = s.get(year)
        row = {"station": sid, "year": year, "years": len(ref),
               "zeros": sum(1 for v in ref if v == 0), "has_index": False}
        if x is None or len(ref) < min_years:
            out.append(row)
            continue
        row["total"] = x
        row["percentile"] = float(stats.percentileofscore(ref, x, kind="mean"))
        med = float(np.median(ref))
        row["pct_of_median"] = 100 * x / med if med > 0 else None
        pos = [v for v in ref if v > 0]
        if len(pos) >= 2 and min(pos) != max(pos):
            a, b = fit(pos)
            row["shape"], row["scale"] = a, b
            row["a2"] = ad_gamma(pos, a, b)
            q = row["zeros"] / len(ref)
            if dist != "empirical":
                row["spi"] = spi(x, a, b, q)
        if dist == "empirical":
            sample = list(ref)
            in_ref = (ref_start == 0 or year >= ref_start) and (ref_end == 0 or year <= ref_end)
            if not in_ref:
                sample.append(x)
            arr = np.asarray(sample)
            below, equal = int(np.sum(arr < x)), int(np.sum(arr == x))
            i = below + (equal + 1) / 2  # mid-rank, 1-based
            row["spi"] = float(stats.norm.ppf((i - 0.44) / (len(sample) + 0.12)))  # Gringorten
        row["has_index"] = "spi" in row
        out.append(row)
    return out


def bench(n):
    """SciPy's time for the work of BenchmarkSPI100k / BenchmarkIndex100k."""
    import time
    rng = np.random.default_rng(7)
    data = []
    for _ in range(n):
        x = np.round(rng.gamma(0.5 + 8 * rng.random(), 10 + 50 * rng.random(), 100), 1)
        x[rng.random(100) < 0.05] = 0
        data.append(x)
    t0 = time.process_time()
    for x in data:
        pos = x[x > 0]
        a, _, b = stats.gamma.fit(pos, floc=0)
        q = 1 - len(pos) / len(x)
        spi(x[-1], a, b, q)
    t1 = time.process_time()
    for x in data:
        pos = x[x > 0]
        a, _, b = stats.gamma.fit(pos, floc=0)
        spi(x[-1], a, b, 1 - len(pos) / len(x))
        ad_gamma(pos, a, b)
        stats.percentileofscore(x, x[-1], kind="mean")
        np.median(x)
    t2 = time.process_time()
    k = 100000 / n
    return {"stations": n, "spi_cpu_s": t1 - t0, "spi_cpu_s_100k": (t1 - t0) * k,
            "index_cpu_s": t2 - t1, "index_cpu_s_100k": (t2 - t1) * k}


def main():
    mode = sys.argv[1]
    if mode == "index":
        a = sys.argv[2:]
        res = index(a[0], a[1], int(a[2]), int(a[3]), int(a[4]), int(a[5]), a[6])
    elif mode == "fit":
        res = []
        for x in json.load(sys.stdin):
            pos = [v for v in x if v > 0]
            a, b = fit(pos)
            res.append({"shape": a, "scale": b, "a2": ad_gamma(pos, a, b)})
    elif mode == "spi":
        res = [spi(c["x"], c["shape"], c["scale"], c["q"]) for c in json.load(sys.stdin)]
    elif mode == "pct":
        res = [float(stats.percentileofscore(c["sample"], c["x"], kind="mean"))
               for c in json.load(sys.stdin)]
    elif mode == "adnull":
        c = json.load(sys.stdin)
        rng = np.random.default_rng(c["seed"])
        x = stats.gamma.rvs(c["shape"], scale=c["scale"], size=c["n"], random_state=rng)
        g = stats.goodness_of_fit(stats.gamma, x, known_params={"loc": 0}, statistic="ad",
                                  n_mc_samples=c["nmc"], random_state=rng)
        res = {"crit5": float(np.quantile(g.null_distribution, 0.95)),
               "fitted_shape": float(g.fit_result.params.a), "n": c["n"]}
    elif mode == "adtable":
        c = json.load(sys.stdin)
        rng = np.random.default_rng(c["seed"])
        res = {"points": []}
        for shape in c["shapes"]:
            x = rng.gamma(shape, 10.0, size=(c["nmc"], c["n"]))
            a, b = fit_many(x)
            for k in range(20):  # the vectorised MLE is SciPy's
                sa, sb = fit(x[k])
                assert abs(a[k] - sa) <= 1e-6 * sa and abs(b[k] - sb) <= 1e-6 * sb, (a[k], sa, b[k], sb)
            a2 = ad_gamma_many(x, a, b)
            q = float(np.quantile(a2, 0.95))
            dens = np.mean(np.abs(a2 - q) < 0.01) / 0.02
            res["points"].append({"shape": shape, "crit5": q,
                                  "se": float(np.sqrt(0.95 * 0.05 / len(a2)) / dens)})
    elif mode == "bench":
        res = bench(int(sys.argv[2]))
    else:
        raise SystemExit("unknown mode " + mode)
    json.dump(res, sys.stdout)


if __name__ == "__main__":
    main()
