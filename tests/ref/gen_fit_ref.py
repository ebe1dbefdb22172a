#!/usr/bin/python3
"""Independent values for tests/unit/test_arma.c and tests/unit/test_garch.c,
computed with Debian's numpy and scipy (no time-series package), following
the conventions written in fit/fit.h:

  y_t - mu = sum ar_i (y_{t-i} - mu) + e_t + sum ma_j e_{t-j};
  the first p values condition, pre-sample shocks are zero;
  GARCH(1,1): h_t = omega + alpha e_{t-1}^2 + beta h_{t-1}, h_0 = e_0^2 = mean(e^2);
  log-likelihood over all N residuals with the 2 pi constant; Student-t with
  unit variance.

Usage: tests/ref/gen_fit_ref.py REFERENCE_DIR  (prints the values; the C tests
quote them).  The recursions are written here from the formulas, apart from
the C code.
"""
import sys
import numpy as np
import scipy
from scipy import optimize, stats


def resid(y, mu, ar, ma):
    """ar, ma: dicts lag -> coefficient."""
    p = max(ar) if ar else 0
    x = y - mu
    e = np.zeros(len(y))
    for t in range(p, len(y)):
        v = x[t] - sum(c * x[t - k] for k, c in ar.items())
        v -= sum(c * e[t - k] for k, c in ma.items() if t - k >= p)
        e[t] = v
    return e[p:]


def garch_loglik(e, omega, alpha, beta, nu=None):
    h0 = np.mean(e ** 2)
    h = np.empty(len(e))
    prev_e2, prev_h = h0, h0
    for t in range(len(e)):
        h[t] = omega + alpha * prev_e2 + beta * prev_h
        prev_e2, prev_h = e[t] ** 2, h[t]
    if nu is None:
        return float(np.sum(stats.norm.logpdf(e, scale=np.sqrt(h))))
    s = np.sqrt(h * (nu - 2) / nu)          # scale of the t with unit variance
    return float(np.sum(stats.t.logpdf(e / s, nu) - np.log(s)))


def main(ref):
    print(f"# numpy {np.__version__}, scipy {scipy.__version__}")
    f = np.loadtxt(f"{ref}/box-jenkins-series-f/series_f.csv", delimiter=",", skiprows=1)[:, 1]

    def css(theta, nar, nma):
        e = resid(f, theta[0], {k + 1: theta[1 + k] for k in range(nar)},
                  {k + 1: theta[1 + nar + k] for k in range(nma)})
        return float(np.sum(e ** 2))

    for name, nar, nma, x0 in (("arma(1,1)", 1, 1, [51.0, -0.5, 0.2]), ("ma(2)", 0, 2, [51.0, -0.3, 0.3])):
        r = optimize.minimize(css, x0, args=(nar, nma), method="BFGS", options={"gtol": 1e-10})
        r = optimize.minimize(css, r.x, args=(nar, nma), method="Nelder-Mead",
                              options={"xatol": 1e-13, "fatol": 1e-14, "maxiter": 200000})
        print(f"series F {name}: params {' '.join('%.10f' % v for v in r.x)}  SSR {r.fun!r}")

    d = np.loadtxt(f"{ref}/bollerslev-ghysels-dmbp/dmbp_returns.csv", delimiter=",", skiprows=1)[:, 1]
    e = resid(d, 0.002, {}, {})
    print("dmbp garch(1,1) t at (0.002, 0.0027, 0.117, 0.88, 4.33):",
          repr(garch_loglik(e, 0.0027, 0.117, 0.88, 4.33)))
    e = resid(d, -0.006, {1: -0.3, 3: 0.05}, {1: 0.4})
    print("dmbp ar[1,3]+ma(1)+garch(1,1) at (-0.006, -0.3, 0.05, 0.4, 0.011, 0.16, 0.79):",
          repr(garch_loglik(e, 0.011, 0.16, 0.79)), "N", len(e))


if __name__ == "__main__":
    main(sys.argv[1] if len(sys.argv) > 1 else "../shared/reference")
