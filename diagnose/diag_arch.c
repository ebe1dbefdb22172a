/* diag_arch.c - volatility clustering: McLeod-Li on squares and Engle's ARCH-LM. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include <gsl/gsl_cdf.h>
#include <lapacke.h>

#include "diag_checks.h"
#include "diag_stats.h"
#include "hn_status.h"

#define COLUMN_BLOCK 8   /* column sums computed side by side in one sweep */

/* Squares of the series as given (SQ: n values, caller allocates); the
 * checks run on residuals, and a mean away from zero is the mean check's
 * business.  HN_ENUMERIC when a value is not finite. */
static int squares(const double *x, size_t n, double *sq)
{
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(x[i]))
            return HN_ENUMERIC;
        sq[i] = x[i] * x[i];
    }
    return HN_OK;
}

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
    double *sq = malloc(n * sizeof *sq);
    double *r = malloc((size_t)m * sizeof *r);
    if (!sq || !r) {
        free(sq);
        free(r);
        diag_test_invalid(out, name, DIAG_VOLATILITY, "out of memory");
        return HN_ENOMEM;
    }
    int rc = squares(x, n, sq);
    if (rc == HN_OK)
        rc = diag_acf(sq, n, m, r);
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_VOLATILITY,
                          rc == HN_ECONST ? "the squared values are all equal"
                                          : "autocorrelations of the squares not computable");
        free(sq);
        free(r);
        return rc;
    }
    mcleod_fill(r, n, m, alpha, out);
    free(sq);
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

/* Sums over t = q..n-1 of sq[t - j0 - i] (M NULL) or of sq[t - j0 - i] -
 * M[i] into OUT[i], i < CNT: each a plain sum in the order of t, the CNT of
 * them side by side in one sweep. */
static inline __attribute__((always_inline)) void
column_sweep(const double *sq, size_t n, size_t q, size_t j0, const double *m, double *out,
             const size_t cnt)
{
    double acc[COLUMN_BLOCK] = { 0.0 }, mm[COLUMN_BLOCK] = { 0.0 };
    #pragma GCC unroll 8
    for (size_t i = 0; i < cnt; i++) {
        acc[i] = 0.0;
        mm[i] = m ? m[i] : 0.0;
    }
    const double *base = sq - j0;
    if (m) {
        for (size_t t = q; t < n; t++)
            #pragma GCC unroll 8
            for (size_t i = 0; i < cnt; i++)
                acc[i] += base[t - i] - mm[i];
    } else {
        for (size_t t = q; t < n; t++)
            #pragma GCC unroll 8
            for (size_t i = 0; i < cnt; i++)
                acc[i] += base[t - i];
    }
    #pragma GCC unroll 8
    for (size_t i = 0; i < cnt; i++)
        out[i] = acc[i];
}

/* MEAN[j], j = 0..q: the mean of sq[t - j] over t = q..n-1, by a plain sum,
 * then the plain sum of the deviations from it as a correction (the same
 * operations as one column at a time, COLUMN_BLOCK columns a sweep). */
static void column_means(const double *sq, size_t n, size_t q, double *mean)
{
    const double rows = (double)(n - q);
    for (size_t j0 = 0; j0 <= q; j0 += COLUMN_BLOCK) {
        size_t cnt = q + 1 - j0 < COLUMN_BLOCK ? q + 1 - j0 : COLUMN_BLOCK;
        double m[COLUMN_BLOCK], r[COLUMN_BLOCK];
        if (cnt == 6)           /* the default 5 lags and the regressand */
            column_sweep(sq, n, q, j0, NULL, m, 6);
        else
            column_sweep(sq, n, q, j0, NULL, m, cnt);
        for (size_t i = 0; i < cnt; i++)
            m[i] /= rows;
        if (cnt == 6)
            column_sweep(sq, n, q, j0, m, r, 6);
        else
            column_sweep(sq, n, q, j0, m, r, cnt);
        for (size_t i = 0; i < cnt; i++)
            mean[j0 + i] = m[i] + r[i] / rows;
    }
}

/* Lags handled by the fused passes below with their sums in registers;
 * more lags take the same sums through memory. */
#define FUSED_MAX_Q 8

/* One pass over t = q..n-1 forming, from the centred regressand dy_t =
 * sq[t] - mean[0] and centred lags dv_j = sq[t-j-1] - mean[j+1]: the lower
 * triangle of C = sum dv dv' (C[j q + k], k <= j), G = sum dv dy and
 * SST = sum dy^2.  Each is a plain sum in the order of t, the operations
 * those of one sum at a time; Q a constant after inlining. */
static inline __attribute__((always_inline)) void
cross_sums(const double *sq, size_t n, const size_t q, const double *mean, double *c, double *g,
           double *sst)
{
    double cc[FUSED_MAX_Q * FUSED_MAX_Q] = { 0.0 }, gg[FUSED_MAX_Q] = { 0.0 }, s = 0.0;
    double mm[FUSED_MAX_Q + 1];
    #pragma GCC unroll 8
    for (size_t j = 0; j <= q; j++)
        mm[j] = mean[j];
    for (size_t t = q; t < n; t++) {
        double dy = sq[t] - mm[0], dv[FUSED_MAX_Q];
        #pragma GCC unroll 8
        for (size_t j = 0; j < q; j++)
            dv[j] = sq[t - j - 1] - mm[j + 1];
        s += dy * dy;
        #pragma GCC unroll 8
        for (size_t j = 0; j < q; j++) {
            gg[j] += dv[j] * dy;
            #pragma GCC unroll 8
            for (size_t k = 0; k <= j; k++)
                cc[j * q + k] += dv[j] * dv[k];
        }
    }
    #pragma GCC unroll 8
    for (size_t j = 0; j < q; j++) {
        g[j] = gg[j];
        #pragma GCC unroll 8
        for (size_t k = 0; k <= j; k++)
            c[j * q + k] = cc[j * q + k];
    }
    *sst = s;
}

#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
#include <string.h>
#pragma GCC diagnostic ignored "-Wpsabi"   /* the vectors below stay inside one function */
typedef double v4d __attribute__((vector_size(32)));

/* cross_sums for q = 5 with AVX: each lane of a register is one of the
 * sums, fed the same product in the same order of t (row j of C, g_j and
 * SST; the upper triangle is formed too and dropped), so the digits are
 * those of cross_sums. */
__attribute__((target("avx2"))) static void
cross_sums5_avx2(const double *sq, size_t n, const double *mean, double *c, double *g,
                 double *sst)
{
    const v4d m0 = { mean[4], mean[3], mean[2], mean[1] }, z = { 0.0, 0.0, 0.0, 0.0 };
    v4d a0 = z, a1 = z, a2 = z, a3 = z, a4 = z, b0 = z, b1 = z, b2 = z, b3 = z, b4 = z, y = z;
    for (size_t t = 5; t < n; t++) {
        v4d v;
        memcpy(&v, sq + t - 4, sizeof v);
        v -= m0;                                    /* (dv3, dv2, dv1, dv0) */
        double d4 = sq[t - 5] - mean[5], dy = sq[t] - mean[0];
        v4d w = { d4, dy, 0.0, 0.0 };
        v4d s0 = { v[3], v[3], v[3], v[3] }, s1 = { v[2], v[2], v[2], v[2] };
        v4d s2 = { v[1], v[1], v[1], v[1] }, s3 = { v[0], v[0], v[0], v[0] };
        v4d s4 = { d4, d4, d4, d4 }, sy = { dy, dy, dy, dy };
        a0 += s0 * v;
        b0 += s0 * w;
        a1 += s1 * v;
        b1 += s1 * w;
        a2 += s2 * v;
        b2 += s2 * w;
        a3 += s3 * v;
        b3 += s3 * w;
        a4 += s4 * v;
        b4 += s4 * w;
        y += sy * w;
    }
    const v4d A[5] = { a0, a1, a2, a3, a4 }, Bv[5] = { b0, b1, b2, b3, b4 };
    for (size_t j = 0; j < 5; j++) {
        for (size_t k = 0; k <= j && k < 4; k++)
            c[j * 5 + k] = A[j][3 - k];
        if (j == 4)
            c[4 * 5 + 4] = Bv[4][0];
        g[j] = Bv[j][1];
    }
    *sst = y[1];
}

/* refine_sums for q = 5 in the same way: the residual formed term by term
 * in the order of j, then one lane per sum of G. */
__attribute__((target("avx2"))) static void
refine_sums5_avx2(const double *sq, size_t n, const double *mean, const double *b, double *g)
{
    const v4d m0 = { mean[4], mean[3], mean[2], mean[1] };
    v4d acc = { 0.0, 0.0, 0.0, 0.0 };
    double g4 = 0.0;
    for (size_t t = 5; t < n; t++) {
        v4d v;
        memcpy(&v, sq + t - 4, sizeof v);
        v -= m0;                                    /* (dv3, dv2, dv1, dv0) */
        double d4 = sq[t - 5] - mean[5], r = sq[t] - mean[0];
        r -= b[1] * v[3];
        r -= b[2] * v[2];
        r -= b[3] * v[1];
        r -= b[4] * v[0];
        r -= b[5] * d4;
        v4d sr = { r, r, r, r };
        acc += v * sr;
        g4 += d4 * r;
    }
    g[0] = acc[3];
    g[1] = acc[2];
    g[2] = acc[1];
    g[3] = acc[0];
    g[4] = g4;
}
#endif

/* The same sums for any q, through memory. */
static void cross_sums_any(const double *sq, size_t n, size_t q, const double *mean, double *c,
                           double *g, double *sst)
{
    double s = 0.0;
    for (size_t k = 0; k < q * q; k++)
        c[k] = 0.0;
    for (size_t j = 0; j < q; j++)
        g[j] = 0.0;
    for (size_t t = q; t < n; t++) {
        double dy = sq[t] - mean[0];
        s += dy * dy;
        for (size_t j = 0; j < q; j++) {
            double dj = sq[t - j - 1] - mean[j + 1];
            g[j] += dj * dy;
            for (size_t k = 0; k <= j; k++)
                c[j * q + k] += dj * (sq[t - k - 1] - mean[k + 1]);
        }
    }
    *sst = s;
}

/* Refinement right-hand side: G = sum dv r over t, r = dy - sum_j B[j+1]
 * dv_j the centred residual (j in order); plain sums in the order of t. */
static inline __attribute__((always_inline)) void
refine_sums(const double *sq, size_t n, const size_t q, const double *mean, const double *b,
            double *g)
{
    double gg[FUSED_MAX_Q] = { 0.0 }, mm[FUSED_MAX_Q + 1], bb[FUSED_MAX_Q];
    #pragma GCC unroll 8
    for (size_t j = 0; j <= q; j++)
        mm[j] = mean[j];
    #pragma GCC unroll 8
    for (size_t j = 0; j < q; j++)
        bb[j] = b[j + 1];
    for (size_t t = q; t < n; t++) {
        double r = sq[t] - mm[0], dv[FUSED_MAX_Q];
        #pragma GCC unroll 8
        for (size_t j = 0; j < q; j++) {
            dv[j] = sq[t - j - 1] - mm[j + 1];
            r -= bb[j] * dv[j];
        }
        #pragma GCC unroll 8
        for (size_t j = 0; j < q; j++)
            gg[j] += dv[j] * r;
    }
    #pragma GCC unroll 8
    for (size_t j = 0; j < q; j++)
        g[j] = gg[j];
}

static void refine_sums_any(const double *sq, size_t n, size_t q, const double *mean,
                            const double *b, double *g)
{
    for (size_t j = 0; j < q; j++)
        g[j] = 0.0;
    for (size_t t = q; t < n; t++) {
        double r = sq[t] - mean[0];
        for (size_t j = 0; j < q; j++)
            r -= b[j + 1] * (sq[t - j - 1] - mean[j + 1]);
        for (size_t j = 0; j < q; j++)
            g[j] += (sq[t - j - 1] - mean[j + 1]) * r;
    }
}

/* Sum of squared residuals e_t = sq[t] - (B[0] + sum_j B[j] sq[t-j]) over
 * t = q..n-1, a plain sum in the order of t. */
static inline __attribute__((always_inline)) double
residual_ss(const double *sq, size_t n, const size_t q, const double *b)
{
    double ssr = 0.0;
    for (size_t t = q; t < n; t++) {
        double fit = b[0];
        #pragma GCC unroll 8
        for (size_t j = 1; j <= q; j++)
            fit += b[j] * sq[t - j];
        double e = sq[t] - fit;
        ssr += e * e;
    }
    return ssr;
}

/* Centred least squares of Y = SQ[q..n-1] on its Q lags and a constant:
 * the normal equations of the mean-removed lags (Cholesky, LAPACKE_dposv)
 * followed by one step of iterative refinement on the residuals, which
 * brings the coefficients to the accuracy of a QR solution for the mildly
 * conditioned designs that lags of squares give, at the cost of a few
 * passes over the data instead of a transposed copy and an unblocked QR of
 * it.  The passes for the default 5 lags keep their sums in registers (the
 * same operations in the same order as for any other q).  B (q+1):
 * intercept, then the lag coefficients.  SST: the regressand's sum of
 * squares about its mean.  WORK: (q+1)(q+3) doubles.  Returns HN_OK,
 * HN_ECONST (regressand constant: SST not positive) or HN_ESINGULAR (lags
 * collinear). */
static int lag_regression(const double *sq, size_t n, size_t q, double *b, double *sst,
                          double *work)
{
    double *mean = work, *c = mean + q + 1, *g = c + q * q;
    /* column means, two passes with the correction term; mean[0]: regressand,
     * mean[j]: lag j */
    column_means(sq, n, q, mean);
#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
    if (q == 5 && __builtin_cpu_supports("avx2"))
        cross_sums5_avx2(sq, n, mean, c, g, sst);
    else
#endif
    if (q == 5)
        cross_sums(sq, n, 5, mean, c, g, sst);
    else
        cross_sums_any(sq, n, q, mean, c, g, sst);
    if (!(*sst > 0.0))
        return HN_ECONST;
    for (size_t j = 0; j < q; j++)
        for (size_t k = 0; k < j; k++)
            c[k * q + j] = c[j * q + k];
    lapack_int lq = (lapack_int)q;
    if (LAPACKE_dpotrf(LAPACK_ROW_MAJOR, 'L', lq, c, lq) != 0)
        return HN_ESINGULAR;
    for (size_t j = 0; j < q; j++)
        b[j + 1] = g[j];
    if (LAPACKE_dpotrs(LAPACK_ROW_MAJOR, 'L', lq, 1, c, lq, b + 1, 1) != 0)
        return HN_ESINGULAR;
    /* refinement: g = X'r of the centred residuals, solve, add */
#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
    if (q == 5 && __builtin_cpu_supports("avx2"))
        refine_sums5_avx2(sq, n, mean, b, g);
    else
#endif
    if (q == 5)
        refine_sums(sq, n, 5, mean, b, g);
    else
        refine_sums_any(sq, n, q, mean, b, g);
    if (LAPACKE_dpotrs(LAPACK_ROW_MAJOR, 'L', lq, 1, c, lq, g, 1) != 0)
        return HN_ESINGULAR;
    double icpt = mean[0];
    for (size_t j = 0; j < q; j++) {
        b[j + 1] += g[j];
        icpt -= b[j + 1] * mean[j + 1];
    }
    for (size_t j = 0; j < q; j++)
        if (!isfinite(b[j + 1]))
            return HN_ESINGULAR;
    b[0] = icpt;
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
int diag_arch_lm(const double *x, size_t n, int q, double alpha, diag_test *out)
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
    size_t rows = n - uq, cols = uq + 1;
    double *sq = malloc(n * sizeof *sq);
    double *b = malloc(cols * sizeof *b);
    double *work = malloc(cols * (uq + 3) * sizeof *work);
    if (!sq || !b || !work) {
        free(sq);
        free(b);
        free(work);
        diag_test_invalid(out, name, DIAG_VOLATILITY, "out of memory");
        return HN_ENOMEM;
    }
    int rc = squares(x, n, sq);
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "the squares are not computable");
        goto done;
    }
    /* The regressand's mean is column 0 of the regression's column means,
     * and its sum of squares about that mean comes from the regression's
     * cross-product pass. */
    double sst = 0.0;
    rc = lag_regression(sq, n, uq, b, &sst, work);
    if (rc == HN_ECONST) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "the squared values are constant");
        goto done;
    }
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_VOLATILITY, "the lagged squares are collinear");
        goto done;
    }
    double ssr = uq == 5 ? residual_ss(sq, n, 5, b) : residual_ss(sq, n, uq, b);
    double r2 = 1.0 - ssr / sst;
    if (r2 < 0.0)
        r2 = 0.0;
    if (!isfinite(r2)) {
        rc = HN_ENUMERIC;
        diag_test_invalid(out, name, DIAG_VOLATILITY, "a non-finite value arose");
        goto done;
    }
    double stat = (double)rows * r2;
    diag_test_fill(out, name, DIAG_VOLATILITY, stat, (double)q, gsl_cdf_chisq_Q(stat, (double)q), alpha, r2,
         "share of the variance of x^2 predicted by its lags (R^2)");
    snprintf(out->detail, sizeof out->detail,
             "x^2 on %d lags of itself and a constant, %zu rows; lag-1 coefficient %.3g", q, rows, b[1]);
done:
    free(sq);
    free(b);
    free(work);
    return rc;
}
