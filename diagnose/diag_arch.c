/* diag_arch.c - volatility clustering: McLeod-Li on squares and Engle's ARCH-LM. */
#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include <gsl/gsl_cdf.h>
#include <lapacke.h>

#include "diag_checks.h"
#include "diag_stats.h"
#include "diag_sum.h"
#include "hn_status.h"

/* McLeod-Li test: the Ljung-Box statistic of the squared series,
 * Q = n (n+2) sum_{k=1..m} r_k^2 / (n-k), r_k the autocorrelations of x^2
 * (diag_acf convention), referred to chi-square with m degrees of
 * freedom (no adjustment for ARMA terms; McLeod and Li 1983, cited from memory).  OUT->effect is
 * the largest |r_k|, detail lists the lags whose |r_k| exceeds
 * z_{1-alpha/2}/sqrt(n).  Returns HN_OK; HN_EINVAL (m < 1, no data, bad
 * alpha); HN_ESHORT (n < m + 2); HN_ECONST (squares all equal); HN_ENOMEM;
 * HN_ENUMERIC.  OUT is marked invalid on failure. */
/* McLeod-Li from R[0..m-1], the autocorrelations of the squares. */
static void mcleod_fill(const double *r, size_t n, int m, double alpha, diag_test *out)
{
    const char *name = "mcleod-li";
    double dn = (double)n, q = 0.0, c = 0.0, big = 0.0;
    for (int k = 1; k <= m; k++) {
        /* compensated sum of the terms */
        double term = r[k - 1] * r[k - 1] / (dn - k);
        double y = term - c, t = q + y;
        c = (t - q) - y;
        q = t;
        if (fabs(r[k - 1]) > big)
            big = fabs(r[k - 1]);
    }
    q *= dn * (dn + 2.0);
    diag_test_fill(out, name, DIAG_VOLATILITY, q, (double)m, gsl_cdf_chisq_Q(q, (double)m), alpha, big,
         "largest |autocorrelation| of the squares");

    double band = gsl_cdf_ugaussian_Qinv(alpha / 2.0) / sqrt(dn);
    int len = snprintf(out->detail, sizeof out->detail, "lags of x^2 beyond +/-%.3g:", band);
    int any = 0;
    for (int k = 1; k <= m && len > 0 && (size_t)len < sizeof out->detail - 16; k++) {
        if (fabs(r[k - 1]) > band) {
            len += snprintf(out->detail + len, sizeof out->detail - (size_t)len, " %d (%.3f)", k, r[k - 1]);
            any = 1;
        }
    }
    if (!any)
        snprintf(out->detail, sizeof out->detail, "no lag of x^2 beyond +/-%.3g", band);
}

int diag_mcleod_li(const double *x, size_t n, int m, double alpha, diag_test *out)
{
    const char *name = "mcleod-li";
    if (!x || m < 1 || !(alpha > 0.0 && alpha < 1.0)) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "needs data, m >= 1 and 0 < alpha < 1");
        return HN_EINVAL;
    }
    if (n < (size_t)m + 2) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "too few observations for the lags asked");
        return HN_ESHORT;
    }
    double *r = malloc((size_t)m * sizeof *r);
    if (!r) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "out of memory");
        return HN_ENOMEM;
    }
    /* the squares formed on the way (a non-finite value makes their sum so) */
    int rc = diag_acf_sq(x, n, m, r);
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_VOLATILITY,
                          rc == HN_ECONST ? "the squared values are all equal"
                                          : "autocorrelations of the squares not computable");
        free(r);
        return rc;
    }
    mcleod_fill(r, n, m, alpha, out);
    free(r);
    return HN_OK;
}

int diag_mcleod_li_acf(const double *acf2, int nlags, size_t n, int m, double alpha,
                       diag_test *out)
{
    const char *name = "mcleod-li";
    if (!acf2 || m < 1 || !(alpha > 0.0 && alpha < 1.0)) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "needs data, m >= 1 and 0 < alpha < 1");
        return HN_EINVAL;
    }
    if (n < (size_t)m + 2) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "too few observations for the lags asked");
        return HN_ESHORT;
    }
    if (nlags < m) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "the autocorrelations given are too few");
        return HN_EINVAL;
    }
    mcleod_fill(acf2, n, m, alpha, out);
    return HN_OK;
}

/* ARCH-LM's regression from sums over the whole series.  The regressors
 * are lags of one series, so the cross-products over the rows t = q..n-1
 * follow from q + 1 lagged sums of the centred squares d_u (diag_lag_sums_of,
 * the sums McLeod-Li's autocorrelations are made of) less O(q^2) products
 * of the first and last q values: for columns j <= k (column 0 the
 * regressand y_t, column j the lag y_{t-j}), lag difference l = k - j,
 *     S_jk = sum_t d_{t-j} d_{t-k} = L_l - sum_{u=l}^{q-j-1} d_u d_{u-l}
 *                                        - sum_{u=n-j}^{n-1} d_u d_{u-l},
 * and with W_j the sum of column j's values (the total of d less its q
 * values outside the column's rows), the centred cross-product is
 * C_jk = S_jk - W_j W_k / (n - q).
 * Accuracy: the d_u are deviations from the mean of all n squares formed to
 * about twice double precision, so the S_jk carry no large common part;
 * L_l are blocked compensated sums, with errors of a few units in the last
 * place of sum_u d_u^2 (Cauchy-Schwarz bounds every |L_l| by it); W_j is a
 * sum of q edge values, so W_j W_k / (n - q) is a small term, not a
 * cancelling one.  The subtraction of the edge products loses digits only
 * when the q first or last squares hold much of sum_u d_u^2; when any
 * column's S_jj falls below a sixteenth of it (an outlier at either end)
 * the cross-products are instead summed over the rows directly. */

/* Lag columns whose Cholesky pivot^2 is at most this share of the column's
 * own sum of squares are taken as collinear with the earlier ones: such a
 * pivot is rounding, not signal (lags of residual squares are correlated
 * far below 1 - 1e-10). */
#define COLLINEAR_SHARE 1e-10

/* A column whose centred sum of squares is within this many units in the
 * last place of what rounding leaves of a constant is taken as constant:
 * on the fast route, of its uncentred sum S_jj; on the direct one, of
 * deviations from its mean each that many units in the mean's last place. */
#define CONST_ULPS 64.0

/* A column's sum of squares below this share of sum_u d_u^2 sends the
 * regression to the direct sums (at most 4 bits lost to the edge terms on
 * the fast route). */
#define EDGE_SHARE (1.0 / 16.0)

/* d_u, the centred square, with the bits the lag sums gave it. */
static inline double dsq(const double *x, size_t u, const diag_lag_sums *s)
{
    return (x[u] * x[u] - s->m0) - s->c;
}

/* C ((q+1) x (q+1), row-major) from the lag sums (LAG[l-1], l = 1..q),
 * DIAG[j] = S_jj and TINY[j], the rounding floor of C_jj; W (q+1) scratch. */
static void cross_from_sums(const double *x, size_t n, size_t q, const diag_lag_sums *s,
                            const double *lag, double *c, double *diag, double *tiny, double *w)
{
    size_t p = q + 1;
    double rows = (double)(n - q), tot = s->s1 - (double)n * s->c;
    for (size_t j = 0; j <= q; j++) {
        double e = 0.0;
        for (size_t u = 0; u < q - j; u++)
            e += dsq(x, u, s);
        for (size_t u = n - j; u < n; u++)
            e += dsq(x, u, s);
        w[j] = tot - e;
    }
    for (size_t j = 0; j <= q; j++)
        for (size_t k = j; k <= q; k++) {
            size_t l = k - j;
            double e = 0.0;
            for (size_t u = l; u < q - j; u++)
                e += dsq(x, u, s) * dsq(x, u - l, s);
            for (size_t u = n - j; u < n; u++)
                e += dsq(x, u, s) * dsq(x, u - l, s);
            double sjk = (l == 0 ? s->ss0 : lag[l - 1]) - e;
            if (l == 0) {
                diag[j] = sjk;
                tiny[j] = CONST_ULPS * DBL_EPSILON * sjk;
            }
            c[j * p + k] = c[k * p + j] = sjk - w[j] * w[k] / rows;
        }
}

/* The same by sums over the rows, each column centred on its own mean (a
 * two-pass mean with its correction, as diag_center forms one) and every
 * cross-product of the deviations a compensated sum: the edge values then
 * cost no digits.  TINY (q+1): the rounding floors of the C_jj; YBAR (q+1)
 * scratch.  HN_OK or HN_ENOMEM. */
static int cross_direct(const double *x, size_t n, size_t q, double *c, double *tiny, double *ybar)
{
    size_t p = q + 1, rows = n - q;
    double *y = malloc(n * sizeof *y);
    if (!y)
        return HN_ENOMEM;
    for (size_t u = 0; u < n; u++)
        y[u] = x[u] * x[u];
    for (size_t j = 0; j <= q; j++) {
        double m = diag_sum(y + q - j, rows) / (double)rows, s1, s2;
        diag_sum_dev2(y + q - j, rows, m, &s1, &s2);
        ybar[j] = m + s1 / (double)rows;
        tiny[j] = (double)rows * (CONST_ULPS * DBL_EPSILON * ybar[j]) * (CONST_ULPS * DBL_EPSILON * ybar[j]);
    }
    for (size_t j = 0; j <= q; j++)
        for (size_t k = j; k <= q; k++) {
            diag_ksum a = { 0.0, 0.0 };
            const double *yj = y + q - j, *yk = y + q - k;
            for (size_t t = 0; t < rows; t++)
                diag_ksum_add(&a, (yj[t] - ybar[j]) * (yk[t] - ybar[k]));
            c[j * p + k] = c[k * p + j] = diag_ksum_value(&a);
        }
    free(y);
    return HN_OK;
}

/* R^2 of the regression of y_t on a constant and its Q lags from the
 * centred cross-products C and the floors TINY below which a column's
 * C_jj is rounding (a constant column): the
 * normal equations of the lags (Cholesky), R^2 = g'b / SST with g the lags'
 * cross-products with the regressand and SST its sum of squares about its
 * mean -- no cancellation, unlike 1 - SSR/SST, which loses about
 * log10(1/R^2) digits.  B1: the lag-1 coefficient.  WORK: q (q + 2)
 * doubles.  HN_OK, HN_ECONST (SST not positive) or HN_ESINGULAR. */
static int lag_regression(const double *c, const double *tiny, size_t q, double *r2, double *b1,
                          double *work)
{
    size_t p = q + 1;
    double *a = work, *g = a + q * q, *b = g + q, sst = c[0];
    if (!(sst > 0.0))
        return HN_ECONST;
    for (size_t j = 0; j < q; j++) {
        g[j] = b[j] = c[j + 1];
        for (size_t k = 0; k < q; k++)
            a[j * q + k] = c[(j + 1) * p + k + 1];
    }
    lapack_int lq = (lapack_int)q;
    if (LAPACKE_dpotrf(LAPACK_ROW_MAJOR, 'L', lq, a, lq) != 0)
        return HN_ESINGULAR;
    for (size_t j = 0; j < q; j++) {
        /* a column constant but for rounding, or a combination of the others */
        double cjj = c[(j + 1) * p + j + 1];
        if (!(cjj > tiny[j + 1]) ||
            !(a[j * q + j] * a[j * q + j] > COLLINEAR_SHARE * cjj))
            return HN_ESINGULAR;
    }
    if (LAPACKE_dpotrs(LAPACK_ROW_MAJOR, 'L', lq, 1, a, lq, b, 1) != 0)
        return HN_ESINGULAR;
    double e = 0.0;
    for (size_t j = 0; j < q; j++) {
        if (!isfinite(b[j]))
            return HN_ESINGULAR;
        e += g[j] * b[j];
    }
    /* within [0, 1] as in exact arithmetic */
    e /= sst;
    *r2 = e < 0.0 ? 0.0 : (e > 1.0 ? 1.0 : e);
    *b1 = b[0];
    return HN_OK;
}

/* Engle's ARCH-LM test.  With y_t = x_t^2, the
 * regression y_t = a_0 + a_1 y_{t-1} + ... + a_q y_{t-q} + u_t over
 * t = q..n-1 (n - q rows) is solved by least squares (lag_regression above);
 * R^2 = 1 - SSR/SST with SST about the mean of the regressand and SSR from
 * the residuals recomputed from the coefficients.  Statistic (n-q) R^2,
 * chi-square with q degrees of freedom; OUT->effect is R^2.  Returns HN_OK;
 * HN_EINVAL; HN_ESHORT (n < 2q + 3);
 * HN_ECONST (regressand constant); HN_ESINGULAR (rank-deficient lags);
 * HN_ENOMEM; HN_ENUMERIC.  OUT is marked invalid on failure. */
/* Engle's ARCH-LM test.  With y_t = x_t^2, the regression y_t = a_0 +
 * a_1 y_{t-1} + ... + a_q y_{t-q} + u_t over t = q..n-1 (n - q rows) by
 * least squares (above); R^2 with SST about the mean of the regressand.
 * Statistic (n-q) R^2, chi-square with q degrees of freedom; OUT->effect
 * is R^2. */
static int arch_fill(const double *x, size_t n, size_t q, const diag_lag_sums *s,
                     const double *lag, double alpha, diag_test *out)
{
    const char *name = "arch-lm";
    size_t p = q + 1, rows = n - q;
    double *c = malloc((p * p + 3 * p + q * (q + 2)) * sizeof *c);
    if (!c) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "out of memory");
        return HN_ENOMEM;
    }
    double *diag = c + p * p, *tiny = diag + p, *w = tiny + p, *work = w + p, r2 = 0.0, b1 = 0.0;
    cross_from_sums(x, n, q, s, lag, c, diag, tiny, w);
    int rc = HN_OK, direct = 0;
    for (size_t j = 0; j <= q; j++)
        direct |= !(diag[j] >= EDGE_SHARE * s->ss0);
    if (direct)
        rc = cross_direct(x, n, q, c, tiny, w);
    if (rc == HN_OK)
        rc = lag_regression(c, tiny, q, &r2, &b1, work);
    free(c);
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_VOLATILITY,
                          rc == HN_ENOMEM ? "out of memory"
                          : rc == HN_ECONST ? "the squared values are constant"
                                            : "the lagged squares are collinear");
        return rc;
    }
    double stat = (double)rows * r2;
    diag_test_fill(out, name, DIAG_VOLATILITY, stat, (double)q, gsl_cdf_chisq_Q(stat, (double)q),
                   alpha, r2, "share of the variance of x^2 predicted by its lags (R^2)");
    snprintf(out->detail, sizeof out->detail,
             "x^2 on %zu lags of itself and a constant, %zu rows; lag-1 coefficient %.3g", q, rows,
             b1);
    return HN_OK;
}

/* Argument checks and the refusals that need no sums: HN_OK or OUT marked
 * invalid. */
static int arch_args(const double *x, size_t n, int q, double alpha, diag_test *out)
{
    const char *name = "arch-lm";
    if (!x || q < 1 || !(alpha > 0.0 && alpha < 1.0)) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "needs data, q >= 1 and 0 < alpha < 1");
        return HN_EINVAL;
    }
    size_t uq = (size_t)q;
    if (n < 2 * uq + 3) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "too few observations for the lags asked");
        return HN_ESHORT;
    }
    if (!diag_all_finite(x, n)) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "the squares are not computable");
        return HN_ENUMERIC;
    }
    /* a constant regressand, told exactly (most series differ at once) */
    double y0 = x[uq] * x[uq];
    size_t t = uq + 1;
    while (t < n && x[t] * x[t] == y0)
        t++;
    if (t == n) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "the squared values are constant");
        return HN_ECONST;
    }
    return HN_OK;
}

int diag_arch_lm(const double *x, size_t n, int q, double alpha, diag_test *out)
{
    int rc = arch_args(x, n, q, alpha, out);
    if (rc != HN_OK)
        return rc;
    double *lag = malloc((size_t)q * sizeof *lag);
    if (!lag) {
        diag_test_invalid(out, "arch-lm", DIAG_VOLATILITY, "out of memory");
        return HN_ENOMEM;
    }
    diag_lag_sums s;
    rc = diag_lag_sums_of(x, n, 1, q, &s, lag);
    if (rc == HN_OK)
        rc = arch_fill(x, n, (size_t)q, &s, lag, alpha, out);
    else if (rc == HN_ENUMERIC)
        diag_test_invalid(out, "arch-lm", DIAG_VOLATILITY, "the squares or their products overflow");
    else
        diag_test_invalid(out, "arch-lm", DIAG_VOLATILITY, "out of memory");
    free(lag);
    return rc;
}

int diag_arch_lm_sums(const double *x, size_t n, int q, const diag_lag_sums *s,
                      const double *lag, int nlags, double alpha, diag_test *out)
{
    int rc = arch_args(x, n, q, alpha, out);
    if (rc != HN_OK)
        return rc;
    if (!s || !lag || nlags < q) {
        diag_test_invalid(out, "arch-lm", DIAG_VOLATILITY, "the sums given are too few");
        return HN_EINVAL;
    }
    return arch_fill(x, n, (size_t)q, s, lag, alpha, out);
}
