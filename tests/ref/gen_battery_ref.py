#!/usr/bin/python3
"""Reference values for the portmanteau, t-test and distribution checks.

Computed with Debian's scipy 1.10 and numpy 1.24 (general-purpose reference
libraries), independently of the C code: autocorrelations with math.fsum,
tail probabilities with scipy.stats / scipy.special.  Run from the top of
the checkout:

    /usr/bin/python3 tests/ref/gen_battery_ref.py

It writes the inputs tests/data/wn200.csv, ar1_120.csv and t5_211.csv
(numpy default_rng, seeds below; simulated inputs, the reference values are
scipy's) and tests/ref/battery_ref.csv with columns
    what,input,a,b,value
  lb / bp      input file, a = lags m, b = df adjustment: statistic (_q) and p (_p)
  t            input file: statistic (t_stat) and two-sided p (t_p)
  cp           input file: KS distance (cp_d) and p (cp_p) of the cumulative
               periodogram, Fourier frequencies j/n, j = 1..floor((n-1)/2),
               Stephens' factor sqrt(M) + 0.12 + 0.11/sqrt(M), M = q - 1,
               p from scipy.special.kolmogorov
  chisq_sf     a = x, b = df: upper tail of chi-square
  norm_sf      a = z: upper tail of the standard normal
  t_sf         a = x, b = df: upper tail of Student t
  kolmogorov   a = lambda: upper tail of Kolmogorov's limiting distribution
"""
import math
import os
import sys

import numpy as np
import scipy
from scipy import special, stats

TOP = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..")
DATA = os.path.join(TOP, "tests", "data")
OUT = os.path.join(TOP, "tests", "ref", "battery_ref.csv")


def make_inputs():
    rng = np.random.default_rng(20261201)
    wn = 0.15 + rng.standard_normal(200)
    rng = np.random.default_rng(20261202)
    e = rng.standard_normal(120 + 50)
    ar = np.zeros_like(e)
    for t in range(1, len(e)):
        ar[t] = 0.4 * ar[t - 1] + e[t]
    ar = 10.0 + ar[50:]
    rng = np.random.default_rng(20261203)
    wn211 = rng.standard_t(5, 211)   # prime length, heavy tails
    series = {"wn200.csv": wn, "ar1_120.csv": ar, "t5_211.csv": wn211}
    os.makedirs(DATA, exist_ok=True)
    for name, x in series.items():
        with open(os.path.join(DATA, name), "w") as f:
            f.write("x\n")
            for v in x:
                f.write(repr(float(v)) + "\n")
    # Read back so the reference is computed on exactly the stored doubles.
    back = {}
    for name in series:
        with open(os.path.join(DATA, name)) as f:
            next(f)
            back[name] = [float(line) for line in f]
    return back


def acf(x, m):
    n = len(x)
    xbar = math.fsum(x) / n
    xbar += math.fsum(v - xbar for v in x) / n
    d = [v - xbar for v in x]
    c0 = math.fsum(v * v for v in d)
    return [math.fsum(d[t] * d[t - k] for t in range(k, n)) / c0 for k in range(1, m + 1)]


def cum_periodogram(x):
    n = len(x)
    d = np.asarray(x) - math.fsum(x) / n
    f = np.fft.rfft(d)
    q = (n - 1) // 2
    I = np.abs(f[1:q + 1]) ** 2
    total = math.fsum(I)
    M = q - 1
    c = np.cumsum(I[:M]) / total
    j = np.arange(1, M + 1)
    D = max(np.max(j / M - c), np.max(c - (j - 1) / M))
    lam = (math.sqrt(M) + 0.12 + 0.11 / math.sqrt(M)) * D
    return float(D), float(special.kolmogorov(lam))


def main():
    inputs = make_inputs()
    rows = []
    for name, x in inputs.items():
        n = len(x)
        r = acf(x, 20)
        for m in (5, 10, 20):
            for adj in (0, 2):
                df = m - adj
                lb = n * (n + 2) * math.fsum(r[k - 1] ** 2 / (n - k) for k in range(1, m + 1))
                bp = n * math.fsum(r[k - 1] ** 2 for k in range(1, m + 1))
                rows.append(("lb_q", name, m, adj, lb))
                rows.append(("lb_p", name, m, adj, stats.chi2.sf(lb, df)))
                rows.append(("bp_q", name, m, adj, bp))
                rows.append(("bp_p", name, m, adj, stats.chi2.sf(bp, df)))
        xbar = math.fsum(x) / n
        sd = math.sqrt(math.fsum((v - xbar) ** 2 for v in x) / (n - 1))
        t = xbar / (sd / math.sqrt(n))
        tt = stats.ttest_1samp(x, 0.0)
        rows.append(("t_stat", name, 0, 0, float(tt.statistic)))
        rows.append(("t_p", name, 0, 0, float(tt.pvalue)))
        assert abs(t - tt.statistic) < 1e-12 * abs(t)
        D, p = cum_periodogram(x)
        rows.append(("cp_d", name, 0, 0, D))
        rows.append(("cp_p", name, 0, 0, p))
    for x, df in ((0.5, 1), (3.841458820694124, 1), (11.7034, 23), (35.16596, 23), (36.41503, 24),
                  (60.0, 30), (150.0, 100), (1.0, 10), (200.0, 20)):
        rows.append(("chisq_sf", "-", x, df, stats.chi2.sf(x, df)))
    for z in (0.0, 0.5, 1.6448536269514722, 1.96, 3.0, 6.0, 9.0):
        rows.append(("norm_sf", "-", z, 0, stats.norm.sf(z)))
    for x, df in ((0.3, 5), (2.0, 9), (2.5, 99), (4.0, 30), (10.0, 199)):
        rows.append(("t_sf", "-", x, df, stats.t.sf(x, df)))
    for lam in (0.3, 0.6, 0.9, 1.0, 1.2, 1.36, 1.63, 2.0, 3.0):
        rows.append(("kolmogorov", "-", lam, 0, float(special.kolmogorov(lam))))
    with open(OUT, "w") as f:
        f.write("# scipy %s, numpy %s, Python %s; generated by tests/ref/gen_battery_ref.py\n"
                % (scipy.__version__, np.__version__, sys.version.split()[0]))
        f.write("what,input,a,b,value\n")
        for w, name, a, b, v in rows:
            f.write("%s,%s,%r,%r,%r\n" % (w, name, a, b, float(v)))


if __name__ == "__main__":
    main()
