/* fit_arma.h - conditional-sum-of-squares ARMA: residuals, derivatives, starts (internal to fit/). */
#ifndef FIT_ARMA_H
#define FIT_ARMA_H

#include <stddef.h>
#include "fit.h"

/* Mean parameters of SPEC: mu (if spec->mean), ar at each lag, ma at each
 * lag -- the first fit_arma_nmean(spec) entries of every parameter vector. */
int fit_arma_nmean(const fit_spec *spec);

/* Workspace for fit_arma_resid: a ring of the last (max MA lag + 1) residuals
 * and their derivatives, sized once per spec so the residual pass allocates
 * nothing (the passes of fit_arma_pass.h, for MA lags 1..q, keep them in
 * locals instead).  Returns NULL when out of memory; release with fit_arma_ws_free. */
typedef struct fit_arma_ws fit_arma_ws;
fit_arma_ws *fit_arma_ws_alloc(const fit_spec *spec);
void fit_arma_ws_free(fit_arma_ws *w);

/* Residuals of the mean model at the mean parameters MPAR (fit_arma_nmean
 * values) on Y[0..n-1], under the conventions of fit.h: with p = max AR lag,
 *   e_t = (y_t - mu) - sum_i ar_i (y_{t-l_i} - mu) - sum_j ma_j e_{t-m_j},
 * t = p .. n-1, and e_s = 0 for s < p (pre-sample shocks zero).
 *   E    (may be NULL)  receives the N = n - p residuals, E[t - p] = e_t.
 *   DE   (may be NULL)  receives de_t/dtheta, row-major N x nmean,
 *                       DE[(t - p) * nmean + k], by the derivative recursions
 *                       de_t/dth = (direct term) - sum_j ma_j de_{t-m_j}/dth.
 *   SSR  (may be NULL)  receives sum e_t^2 (compensated summation).
 *   GSUM (may be NULL)  receives sum_t e_t de_t/dtheta (nmean values), i.e.
 *                       half the gradient of SSR.
 * All arrays are caller-owned.  Returns HN_OK, HN_EINVAL (n <= p, NULL
 * arguments) or HN_EDOMAIN (a non-finite residual: the MA recursion
 * exploded or the data hold non-finite values). */
int fit_arma_resid(fit_arma_ws *w, const double *y, size_t n, const double *mpar,
                   double *e, double *de, double *ssr, double *gsum);

/* One pass for second-order information at MPAR: as fit_arma_resid's SSR
 * and GSUM, plus
 *   HSUM (nmean x nmean, row-major): sum_t (de_t de_t' + e_t d2e_t), half
 *        the Hessian of SSR, by the second-derivative recursions
 *        d2e_t/dth_k dth_l = (direct term) - sum_j ma_j d2e_{t-m_j}/dth_k dth_l
 *                            - [l = ma_j] de_{t-m_j}/dth_k - [k = ma_j] de_{t-m_j}/dth_l,
 *        the direct term being 1 for the pairs (mu, ar_i) and 0 otherwise;
 *   JTJ  (may be NULL): sum_t de_t de_t' (the Gauss-Newton part).
 * The first call allocates a second ring in W (nmean^2 values a row), kept
 * for later calls.  Returns as fit_arma_resid, or HN_ENOMEM. */
int fit_arma_hessian(fit_arma_ws *w, const double *y, size_t n, const double *mpar,
                     double *ssr, double *gsum, double *hsum, double *jtj);

/* Hannan-Rissanen start for the mean parameters of SPEC on Y[0..n-1],
 * written to MPAR (fit_arma_nmean values):
 *   pure AR (or arma(0,0)): least squares of y_t on (1, y_{t-l_i}) over
 *     t = p .. n-1, which is the conditional LS optimum itself, with
 *     mu = intercept / (1 - sum ar) (the sample mean when sum ar is 1);
 *     by QR (LAPACKE_dgels) up to 20000 rows, beyond that by the normal
 *     equations (LAPACKE_dposv), cheaper on a long series;
 *   with MA terms: a long autoregression of order m (m = max(2 max(p, q),
 *     min(ceil(10 log10 n), 30)), at most 400) by least squares
 *     (LAPACKE_dgels) gives residuals ehat; then y_t is regressed on
 *     (1, y_{t-l_i}, ehat_{t-m_j}).  For n > 20000 both regressions use the
 *     last 20000 observations only (the optimiser then finishes on the
 *     whole series).
 * MA coefficients are shrunk towards zero when the start is non-invertible,
 * so the residual recursion stays bounded.  A degenerate design falls back
 * to zero coefficients at the sample mean.
 * Returns HN_OK, HN_EINVAL, HN_ESHORT, HN_ENOMEM. */
int fit_arma_start(const fit_spec *spec, const double *y, size_t n, double *mpar);

/* The whole conditional-LS ARMA fit of a spec without GARCH part: fills
 * *RES (fit.h) including standard errors from the analytic Hessian of the
 * profile likelihood in the mean parameters (sigma2 concentrated out),
 * criteria with k = np + 1, roots, residuals and warnings.
 * Method: the series is standardised (z = (y - mean)/sd, or y/rms without a
 * mean) so that tolerances do not depend on its units; Hannan-Rissanen
 * start; up to 8 Gauss-Newton steps on the per-observation objective
 * f = -loglik/N, each kept only when f does not rise; then BFGS2
 * (fit_optim_minimise) in coordinates preconditioned by the Cholesky factor
 * of the Gauss-Newton matrix J'J/SSR, in up to four rounds each
 * preconditioned afresh.  opt->grad_tol applies to the gradient in those
 * coordinates (the decrement sqrt(g' M^-1 g)); iterations and evaluations
 * count the Gauss-Newton steps and passes too.  res->grad_norm is the
 * 2-norm of the gradient of f in the standardised parameters at the
 * optimum.  Input checks (length, constant series) are the caller's
 * (fit_model).  Returns as fit_model. */
int fit_arma_estimate(const double *y, size_t n, const fit_spec *spec,
                      const fit_options *opt, fit_result *res);

#endif
