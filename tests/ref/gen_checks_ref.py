#!/usr/bin/python3
"""Reference values for tests/unit/test_checks.c and test_unitroot.c, computed
with general-purpose libraries (Debian's scipy and numpy) on the fixed inputs
in tests/data/.

    /usr/bin/python3 tests/ref/gen_checks_ref.py               # writes tests/ref/checks_ref.csv
    /usr/bin/python3 tests/ref/gen_checks_ref.py --make-data   # (re)creates the inputs first

The inputs are simulated once (numpy default_rng, seed 20261201) and kept in
the repository, rounded to 6 decimals so that C and Python read the same
doubles.  Formulas that scipy does not provide (McLeod-Li, ARCH-LM, the ADF
and KPSS statistics) are written out here with numpy least squares, from
their textbook definitions, independently of the C code.
"""
import os
import sys

import numpy as np
import scipy
import scipy.stats as st

HERE = os.path.dirname(os.path.abspath(__file__))
DATA = os.path.join(HERE, "..", "data")
SERIES = os.path.join(DATA, "checks_series.csv")
GROUPS = os.path.join(DATA, "checks_groups.csv")
OUT = os.path.join(HERE, "checks_ref.csv")


def make_data():
    rng = np.random.default_rng(20261201)
    n = 200
    # ARCH(1) noise: e_t = sqrt(0.2 + 0.5 e_{t-1}^2) z_t, and a random walk
    z = rng.standard_normal(n + 50)
    e = np.zeros(n + 50)
    for t in range(1, n + 50):
        e[t] = np.sqrt(0.2 + 0.5 * e[t - 1] ** 2) * z[t]
    e = e[50:]
    walk = 10.0 + np.cumsum(rng.standard_normal(n))
    with open(SERIES, "w") as f:
        f.write("arch,walk\n")
        for a, b in zip(e, walk):
            f.write("%.6f,%.6f\n" % (a, b))
    # four groups of unequal size and spread
    sizes = [12, 15, 9, 14]
    sds = [1.0, 1.6, 0.7, 1.2]
    means = [5.0, 5.4, 4.8, 5.1]
    with open(GROUPS, "w") as f:
        f.write("group,value\n")
        for g, (m, s, k) in enumerate(zip(means, sds, sizes)):
            for v in m + s * rng.standard_normal(k):
                f.write("%d,%.6f\n" % (g + 1, v))


def read_csv(path):
    return np.genfromtxt(path, delimiter=",", names=True)


def mcleod_li(x, m):
    y = x * x
    d = y - y.mean()
    n = len(y)
    c0 = np.dot(d, d)
    r = np.array([np.dot(d[k:], d[:-k]) / c0 for k in range(1, m + 1)])
    return n * (n + 2) * np.sum(r * r / (n - np.arange(1, m + 1)))


def arch_lm(x, q):
    y = x * x
    n = len(y)
    rows = n - q
    X = np.column_stack([np.ones(rows)] + [y[q - j:n - j] for j in range(1, q + 1)])
    v = y[q:]
    b, *_ = np.linalg.lstsq(X, v, rcond=None)
    u = v - X @ b
    r2 = 1.0 - np.dot(u, u) / np.sum((v - v.mean()) ** 2)
    return rows * r2, r2


def adf_tau(y, k, case, first=None, which=0):
    """t of y_{t-1} (WHICH = 0) or of the last lag (WHICH = k) in
    dy_t on y_{t-1}, dy_{t-1..t-k}, [1], [t] (t the 0-based index), rows t = FIRST..n-1."""
    n = len(y)
    dy = np.diff(y, prepend=np.nan)
    rows = range(k + 1 if first is None else first, n)
    cols = [[y[t - 1] for t in rows]]
    for j in range(1, k + 1):
        cols.append([dy[t - j] for t in rows])
    if case >= 1:
        cols.append([1.0 for t in rows])
    if case >= 2:
        cols.append([float(t) for t in rows])
    X = np.column_stack(cols)
    v = np.array([dy[t] for t in rows])
    b, *_ = np.linalg.lstsq(X, v, rcond=None)
    u = v - X @ b
    s2 = np.dot(u, u) / (X.shape[0] - X.shape[1])
    cov = s2 * np.linalg.inv(X.T @ X)
    return b[which] / np.sqrt(cov[which, which]), X.shape[0]


def adf_auto(y, case):
    """Lag by the rule of diag_adf: kmax = floor(12 (n/100)^(1/4)) (capped so
    that 10 residual df remain), drop the last lag while |t| < 1.645 on the
    common sample t = kmax+1..n-1, refit the chosen k on all its rows."""
    n = len(y)
    det = case
    kmax = min(int(np.floor(12.0 * (n / 100.0) ** 0.25)), (n - 12 - det) // 2)
    k = kmax
    while k > 0 and abs(adf_tau(y, k, case, first=kmax + 1, which=k)[0]) <= 1.645:
        k -= 1
    tau, T = adf_tau(y, k, case)
    return k, tau, T


def kpss_eta(y, l, trend):
    n = len(y)
    t = np.arange(n, dtype=float)
    X = np.column_stack([np.ones(n), t]) if trend else np.ones((n, 1))
    b, *_ = np.linalg.lstsq(X, y, rcond=None)
    e = y - X @ b
    S = np.cumsum(e)
    lrv = np.dot(e, e) / n
    for s in range(1, l + 1):
        lrv += 2.0 * (1.0 - s / (l + 1.0)) * np.dot(e[s:], e[:-s]) / n
    return np.sum(S * S) / (n * n * lrv)


def main():
    if "--make-data" in sys.argv:
        make_data()
    s = read_csv(SERIES)
    x, walk = s["arch"], s["walk"]
    g = read_csv(GROUPS)
    groups = [g["value"][g["group"] == k] for k in np.unique(g["group"])]
    blocks = np.array_split(x, 4)   # 4 consecutive blocks of 50

    rows = []
    jb = st.jarque_bera(x)
    rows += [("jb_statistic", jb.statistic), ("jb_p", jb.pvalue),
             ("skewness", st.skew(x, bias=True)), ("excess_kurtosis", st.kurtosis(x, bias=True))]
    lev = st.levene(*groups, center="median")
    rows += [("levene_median_W", lev.statistic), ("levene_median_p", lev.pvalue)]
    lev = st.levene(*groups, center="mean")
    rows += [("levene_mean_W", lev.statistic), ("levene_mean_p", lev.pvalue)]
    fo = st.f_oneway(*groups)
    rows += [("anova_F", fo.statistic), ("anova_p", fo.pvalue)]
    bf = st.levene(*blocks, center="median")
    rows += [("bf_blocks4_W", bf.statistic), ("bf_blocks4_p", bf.pvalue)]
    fb = st.f_oneway(*blocks)
    rows += [("anova_blocks4_F", fb.statistic), ("anova_blocks4_p", fb.pvalue)]
    q = mcleod_li(x, 10)
    rows += [("mcleod_li_10_Q", q), ("mcleod_li_10_p", st.chi2.sf(q, 10))]
    lm, r2 = arch_lm(x, 5)
    rows += [("arch_lm_5_stat", lm), ("arch_lm_5_r2", r2), ("arch_lm_5_p", st.chi2.sf(lm, 5))]
    for case, name in ((0, "none"), (1, "const"), (2, "trend")):
        tau, T = adf_tau(walk, 2, case)
        rows += [("adf_%s_k2_tau" % name, tau), ("adf_%s_k2_T" % name, T)]
    for case, name in ((1, "const"), (2, "trend")):
        for col, series in (("walk", walk), ("arch", x)):
            k, tau, T = adf_auto(series, case)
            rows += [("adf_%s_auto_%s_k" % (name, col), k), ("adf_%s_auto_%s_tau" % (name, col), tau)]
    rows += [("kpss_level_l4_eta", kpss_eta(walk, 4, False)),
             ("kpss_trend_l4_eta", kpss_eta(walk, 4, True)),
             ("kpss_level_l4_eta_arch", kpss_eta(x, 4, False))]

    with open(OUT, "w") as f:
        f.write("# computed by tests/ref/gen_checks_ref.py with scipy %s, numpy %s (Debian /usr/bin/python3)\n"
                % (scipy.__version__, np.__version__))
        f.write("# inputs: tests/data/checks_series.csv (columns arch, walk), tests/data/checks_groups.csv\n")
        f.write("quantity,value\n")
        for k, v in rows:
            f.write("%s,%.17g\n" % (k, v))


if __name__ == "__main__":
    main()
