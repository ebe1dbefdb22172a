/* diag_portmanteau.c - mean t-test, Ljung-Box, Box-Pierce and Bartlett's cumulative periodogram test. */
#include "diag_checks.h"
#include "diag_periodogram.h"
#include "diag_stats.h"
#include "diag_sum.h"
#include "hn_mem.h"
#include "hn_status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>

static const char SERIAL_EFFECT[] =
    "share of variance a long autoregression predicts (order-adjusted)";

static int bad_alpha(double alpha)
{
    return !(alpha > 0.0 && alpha < 1.0);
}

/* The t-test from the mean and sd (sd > 0) of N values. */
static void ttest_fill(double mean, double sd, size_t n, double alpha, diag_test *out)
{
    static const char name[] = "mean-t";
    double df = (double)(n - 1);
    double t = mean / (sd / sqrt((double)n));
    double p = 2.0 * gsl_cdf_tdist_Q(fabs(t), df);
    if (p > 1.0)
        p = 1.0;
    memset(out, 0, sizeof *out);
    diag_test_fill(out, name, DIAG_MEAN, t, df, p, alpha, NAN, NULL);
    out->effect = mean / sd;
    out->effect_label = "mean in standard deviations";
    snprintf(out->detail, sizeof out->detail, "mean %.6g, sd %.6g, n %zu; two-sided Student-t",
             mean, sd, n);
}

int diag_mean_ttest(const double *x, size_t n, double alpha, diag_test *out)
{
    static const char name[] = "mean-t";
    double mean, sd;
    if (bad_alpha(alpha)) {
        diag_test_invalid(out, name, DIAG_MEAN, "alpha must lie strictly between 0 and 1");
        return HN_EINVAL;
    }
    if (n < 2) {
        diag_test_invalid(out, name, DIAG_MEAN, "needs at least 2 observations");
        return HN_ESHORT;
    }
    int rc = diag_mean_sd(x, n, &mean, &sd);
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_MEAN, "a value is not finite");
        return HN_EINVAL;
    }
    if (!(sd > 0.0)) {
        diag_test_invalid(out, name, DIAG_MEAN, "the values are constant: no spread to test against");
        return HN_EINVAL;
    }
    ttest_fill(mean, sd, n, alpha, out);
    return HN_OK;
}

int diag_mean_ttest_from(double mean, double sd, size_t n, double alpha, diag_test *out)
{
    static const char name[] = "mean-t";
    if (bad_alpha(alpha)) {
        diag_test_invalid(out, name, DIAG_MEAN, "alpha must lie strictly between 0 and 1");
        return HN_EINVAL;
    }
    if (n < 2) {
        diag_test_invalid(out, name, DIAG_MEAN, "needs at least 2 observations");
        return HN_ESHORT;
    }
    if (!isfinite(mean) || !isfinite(sd)) {
        diag_test_invalid(out, name, DIAG_MEAN, "a value is not finite");
        return HN_EINVAL;
    }
    if (!(sd > 0.0)) {
        diag_test_invalid(out, name, DIAG_MEAN, "the values are constant: no spread to test against");
        return HN_EINVAL;
    }
    ttest_fill(mean, sd, n, alpha, out);
    return HN_OK;
}

/* The serial effect (the long-autoregression share from ACF[0..order-1],
 * order = diag_share_order(n)) and the list of lags 1..M outside
 * +/- z/sqrt(n). */
static void serial_from_acf(const double *acf, size_t n, int m, double alpha, double *effect,
                            char *lags, size_t lagslen)
{
    int order = diag_share_order(n);
    double pacf[DIAG_SHARE_MAX];
    *effect = NAN;
    if (order >= 1 && order <= DIAG_SHARE_MAX && diag_pacf(acf, order, pacf) == HN_OK)
        *effect = diag_predictable_share(pacf, order, n);

    double band = gsl_cdf_ugaussian_Qinv(alpha / 2.0) / sqrt((double)n);
    size_t used = 0;
    int count = 0, cut = 0;
    lags[0] = 0;
    for (int k = 1; k <= m; k++) {
        if (fabs(acf[k - 1]) <= band)
            continue;
        count++;
        if (cut)
            continue;
        char item[48];
        int w = snprintf(item, sizeof item, "%s%d (%.3f)", count > 1 ? ", " : "", k, acf[k - 1]);
        if (w > 0 && used + (size_t)w + 5 < lagslen) {
            memcpy(lags + used, item, (size_t)w + 1);
            used += (size_t)w;
        } else {
            memcpy(lags + used, " ...", 5);   /* room for it was kept above */
            cut = 1;
        }
    }
    if (count == 0)
        snprintf(lags, lagslen, "none");
}

/* Arguments of Ljung-Box / Box-Pierce: HN_OK, or OUT marked invalid and
 * HN_EINVAL / HN_ESHORT. */
static int portmanteau_args(const char *name, size_t n, int m, int df_adjust, double alpha,
                            diag_test *out)
{
    char why[160];
    if (bad_alpha(alpha)) {
        diag_test_invalid(out, name, DIAG_SERIAL, "alpha must lie strictly between 0 and 1");
        return HN_EINVAL;
    }
    if (n < 3) {
        diag_test_invalid(out, name, DIAG_SERIAL, "needs at least 3 observations");
        return HN_ESHORT;
    }
    if (m < 1 || (size_t)m > n - 1 || df_adjust < 0) {
        snprintf(why, sizeof why, "lags m = %d must lie in 1..n-1 = %zu (and p+q >= 0)", m, n - 1);
        diag_test_invalid(out, name, DIAG_SERIAL, why);
        return HN_EINVAL;
    }
    int df = m - df_adjust;
    if (df < 1) {
        snprintf(why, sizeof why,
                 "df = m - (p+q) = %d - %d = %d < 1: use more lags than fitted ARMA terms",
                 m, df_adjust, df);
        diag_test_invalid(out, name, DIAG_SERIAL, why);
        return HN_EINVAL;
    }
    return HN_OK;
}

/* Ljung-Box (ljung = 1) or Box-Pierce (0) from ACF lags 1..max(m, share order). */
static void portmanteau_fill(const double *acf, size_t n, int m, int df_adjust, double alpha,
                             diag_test *out, int ljung)
{
    const char *name = ljung ? "ljung-box" : "box-pierce";
    double effect;
    char lags[160];
    serial_from_acf(acf, n, m, alpha, &effect, lags, sizeof lags);
    int df = m - df_adjust;
    double dn = (double)n, q = 0.0;
    /* Sum from the highest lag down: the small terms first. */
    for (int k = m; k >= 1; k--) {
        double r2 = acf[k - 1] * acf[k - 1];
        q += ljung ? r2 / (dn - (double)k) : r2;
    }
    q *= ljung ? dn * (dn + 2.0) : dn;
    double p = gsl_cdf_chisq_Q(q, (double)df);
    memset(out, 0, sizeof *out);
    diag_test_fill(out, name, DIAG_SERIAL, q, (double)df, p, alpha, NAN, NULL);
    out->effect = effect;
    out->effect_label = SERIAL_EFFECT;
    snprintf(out->detail, sizeof out->detail, "%d lags, df %d - %d; lags outside +/-%.3f: %s",
             m, m, df_adjust, gsl_cdf_ugaussian_Qinv(alpha / 2.0) / sqrt(dn), lags);
}

/* Ljung-Box (ljung = 1) or Box-Pierce (0). */
static int portmanteau(const double *x, size_t n, int m, int df_adjust, double alpha,
                       diag_test *out, int ljung)
{
    const char *name = ljung ? "ljung-box" : "box-pierce";
    int rc = portmanteau_args(name, n, m, df_adjust, alpha, out);
    if (rc != HN_OK)
        return rc;
    int order = diag_share_order(n);
    int top = m > order ? m : order;
    double *acf = malloc((size_t)top * sizeof *acf);
    rc = acf ? diag_acf(x, n, top, acf) : HN_ENOMEM;
    if (rc != HN_OK) {
        free(acf);
        diag_test_invalid(out, name, DIAG_SERIAL,
                          rc == HN_ECONST ? "the values are constant" :
                          rc == HN_ENOMEM ? "out of memory" : "a value is not finite");
        return rc == HN_ENOMEM ? HN_ENOMEM : HN_EINVAL;
    }
    portmanteau_fill(acf, n, m, df_adjust, alpha, out, ljung);
    free(acf);
    return HN_OK;
}

int diag_ljung_box(const double *x, size_t n, int m, int df_adjust, double alpha, diag_test *out)
{
    return portmanteau(x, n, m, df_adjust, alpha, out, 1);
}

int diag_box_pierce(const double *x, size_t n, int m, int df_adjust, double alpha, diag_test *out)
{
    return portmanteau(x, n, m, df_adjust, alpha, out, 0);
}

/* The same from a given ACF (NLAGS lags, at least max(m, share order)). */
static int portmanteau_acf(const double *acf, int nlags, size_t n, int m, int df_adjust,
                           double alpha, diag_test *out, int ljung)
{
    const char *name = ljung ? "ljung-box" : "box-pierce";
    int rc = portmanteau_args(name, n, m, df_adjust, alpha, out);
    if (rc != HN_OK)
        return rc;
    int order = diag_share_order(n);
    if (!acf || nlags < m || nlags < order) {
        diag_test_invalid(out, name, DIAG_SERIAL, "the autocorrelations given are too few");
        return HN_EINVAL;
    }
    portmanteau_fill(acf, n, m, df_adjust, alpha, out, ljung);
    return HN_OK;
}

int diag_ljung_box_acf(const double *acf, int nlags, size_t n, int m, int df_adjust,
                       double alpha, diag_test *out)
{
    return portmanteau_acf(acf, nlags, n, m, df_adjust, alpha, out, 1);
}

int diag_box_pierce_acf(const double *acf, int nlags, size_t n, int m, int df_adjust,
                        double alpha, diag_test *out)
{
    return portmanteau_acf(acf, nlags, n, m, df_adjust, alpha, out, 0);
}

/* Upper tail of Kolmogorov's limiting distribution,
 * Q(l) = P(sup|B| > l) = 2 sum_{k>=1} (-1)^(k-1) exp(-2 k^2 l^2);
 * for small l the equivalent theta-function form
 * P(K <= l) = sqrt(2 pi)/l sum_{k>=1} exp(-(2k-1)^2 pi^2 / (8 l^2))
 * converges faster (common practice: both series are standard). */
double diag_kolmogorov_q(double l)
{
    if (!(l > 0.0))
        return 1.0;
    if (l < 1.0) {
        double s = 0.0, c = M_PI * M_PI / (8.0 * l * l);
        for (int k = 1; k <= 20; k++) {
            double t = exp(-(double)((2 * k - 1) * (2 * k - 1)) * c);
            s += t;
            if (t < 1e-18 * s)
                break;
        }
        double cdf = sqrt(2.0 * M_PI) / l * s;
        return cdf >= 1.0 ? 0.0 : 1.0 - cdf;
    }
    double s = 0.0;
    for (int k = 1; k <= 100; k++) {
        double t = exp(-2.0 * (double)k * (double)k * l * l);
        s += (k % 2) ? t : -t;
        if (t < 1e-18)
            break;
    }
    s *= 2.0;
    return s < 0.0 ? 0.0 : (s > 1.0 ? 1.0 : s);
}

/* The largest distance D between C_j = cum_j / TOTAL and the uniform
 * distribution function's steps (j-1)/M and j/M, j = 1..M, at the first j
 * where it is reached (J), with C_j (C) and the step it is taken to (U). */
typedef struct {
    double D, c, u;
    size_t j;
} ks_far;

/* Ordinates per block of the cumulative sum: block b's partial sums start
 * from the sum of the earlier blocks' totals and run through the block in
 * order, so that the blocks can be taken as tasks; the digits depend on M
 * alone.  (One block up to KS_BLOCK: the plain running sum.) */
#define KS_BLOCK 32768

/* Block [J0, J1) of ordinates I[j-1], partial sums starting from BASE. */
static void ks_block(const double *I, size_t j0, size_t j1, size_t M, double base, double total,
                     ks_far *r)
{
    /* products with the reciprocals instead of two divisions a step (the
     * divisions bound the loop; the steps and shares move by an ulp) */
    double cum = base, inv_m = 1.0 / (double)M, inv_t = 1.0 / total;
    double below = (double)(j0 - 1) * inv_m;
    *r = (ks_far){ 0.0, 0.0, 0.0, j0 };
    for (size_t j = j0; j < j1; j++) {
        /* BELOW: the step before's ABOVE, the same bits */
        double above = (double)j * inv_m;
        cum += I[j - 1];
        double c = cum * inv_t;
        double dplus = above - c, dminus = c - below;
        double dj = dplus > dminus ? dplus : dminus;
        if (dj > r->D) {
            r->D = dj;
            r->j = j;
            r->c = c;
            r->u = dplus > dminus ? above : below;
        }
        below = above;
    }
}

/* D over j = 1..M (see ks_far); HN_OK or HN_ENOMEM. */
static int ks_uniform(const double *I, size_t M, double total, ks_far *out)
{
    size_t nb = (M + KS_BLOCK - 1) / KS_BLOCK;
    if (nb <= 1) {
        ks_block(I, 1, M + 1, M, 0.0, total, out);
        return HN_OK;
    }
    double *base = malloc(nb * sizeof *base);
    ks_far *far = malloc(nb * sizeof *far);
    if (!base || !far) {
        free(base);
        free(far);
        return HN_ENOMEM;
    }
    /* each block's total (a blocked compensated sum), then the bases in order */
#pragma omp taskgroup
    for (size_t b = 0; b < nb; b++) {
        size_t j0 = b * KS_BLOCK, len = b + 1 < nb ? KS_BLOCK : M - j0;
#pragma omp task firstprivate(b, j0, len) shared(I, base)
        base[b] = diag_sum(I + j0, len);
    }
    double run = 0.0;
    for (size_t b = 0; b < nb; b++) {
        double t = base[b];
        base[b] = run;
        run += t;
    }
#pragma omp taskgroup
    for (size_t b = 0; b < nb; b++) {
        size_t j0 = b * KS_BLOCK + 1, j1 = b + 1 < nb ? j0 + KS_BLOCK : M + 1;
#pragma omp task firstprivate(b, j0, j1) shared(I, base, far)
        ks_block(I, j0, j1, M, base[b], total, &far[b]);
    }
    *out = far[0];
    for (size_t b = 1; b < nb; b++)
        if (far[b].D > out->D)
            *out = far[b];
    free(base);
    free(far);
    return HN_OK;
}

/* Bartlett's cumulative periodogram test.
 * Periodogram I_j = |sum_t d_t exp(-2 pi i j t / n)|^2 at the Fourier
 * frequencies f_j = j/n, j = 1..q, q = floor((n-1)/2): frequency 0 (the mean,
 * removed) and, for even n, the Nyquist frequency 1/2 are left out, so every
 * ordinate is a chi-square(2) under Gaussian white noise.  Then
 * C_j = sum_{i<=j} I_i / sum_{i<=q} I_i for j = 1..q-1 behave as the order
 * statistics of q-1 uniforms (common practice), and the Kolmogorov-Smirnov
 * distance D between them and the uniform distribution function is referred
 * to Kolmogorov's limiting distribution with Stephens' finite-sample factor
 * sqrt(M) + 0.12 + 0.11/sqrt(M), M = q-1 (Stephens, M. A. (1970), J. R.
 * Statist. Soc. B 32, 115-122; factor recalled from memory). */
static int cum_periodogram(const double *x, const double *centred, size_t n, double alpha,
                           diag_test *out, const double *acf_given, int acf_given_lags, int effect)
{
    static const char name[] = "cum-periodogram";
    if (bad_alpha(alpha)) {
        diag_test_invalid(out, name, DIAG_SERIAL, "alpha must lie strictly between 0 and 1");
        return HN_EINVAL;
    }
    if (n < 7) {
        diag_test_invalid(out, name, DIAG_SERIAL, "needs at least 7 observations (3 frequencies)");
        return HN_ESHORT;
    }
    size_t q = (n - 1) / 2, M = q - 1;
    double *dev = centred ? NULL : hn_alloc_long(n * sizeof *dev), *I = hn_alloc_long(q * sizeof *I);
    const double *d = centred ? centred : dev;
    int rc = HN_OK;
    if (!d || !I) {
        rc = HN_ENOMEM;
        diag_test_invalid(out, name, DIAG_SERIAL, "out of memory");
        goto done;
    }
    if (!centred && diag_center(x, n, dev) != HN_OK) {
        rc = HN_EINVAL;
        diag_test_invalid(out, name, DIAG_SERIAL, "a value is not finite");
        goto done;
    }
    double total = 0.0;
    rc = diag_periodogram(d, n, q, I, &total);
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_SERIAL,
                          rc == HN_ENOMEM ? "out of memory" : "the Fourier transform failed");
        rc = rc == HN_ENOMEM ? HN_ENOMEM : HN_EINVAL;
        goto done;
    }
    /* TOTAL: the compensated sum of the ordinates, formed with them */
    if (!(total > 0.0) || !isfinite(total)) {
        rc = HN_EINVAL;
        diag_test_invalid(out, name, DIAG_SERIAL, "the values are constant");
        goto done;
    }
    ks_far ks;
    rc = ks_uniform(I, M, total, &ks);
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_SERIAL, "out of memory");
        goto done;
    }
    double D = ks.D, worst_c = ks.c, worst_u = ks.u;
    size_t worst_j = ks.j;
    double sm = sqrt((double)M);
    double lambda = (sm + 0.12 + 0.11 / sm) * D;
    double p = diag_kolmogorov_q(lambda);
    memset(out, 0, sizeof *out);
    diag_test_fill(out, name, DIAG_SERIAL, D, NAN, p, alpha, NAN, NULL);
    snprintf(out->detail, sizeof out->detail,
             "KS distance %.4f over %zu frequencies j/n, j = 1..%zu; largest near frequency %zu/%zu "
             "(period %.1f), cumulative share %.3f against uniform %.3f",
             D, q, q, worst_j, n, (double)n / (double)worst_j, worst_c, worst_u);
    /* Practical size as for the portmanteau tests. */
    if (effect) {
        int order = diag_share_order(n);
        double pacf[DIAG_SHARE_MAX], own[DIAG_SHARE_MAX];
        if (order >= 1 && order <= DIAG_SHARE_MAX && acf_given && acf_given_lags < order)
            acf_given = NULL;
        if (order >= 1 && order <= DIAG_SHARE_MAX &&
            (acf_given || diag_acf(x, n, order, own) == HN_OK) &&
            diag_pacf(acf_given ? acf_given : own, order, pacf) == HN_OK) {
            out->effect = diag_predictable_share(pacf, order, n);
            out->effect_label = SERIAL_EFFECT;
        }
    }
done:
    free(dev);
    free(I);
    return rc;
}

int diag_cum_periodogram(const double *x, size_t n, double alpha, diag_test *out)
{
    return cum_periodogram(x, NULL, n, alpha, out, NULL, 0, 1);
}

int diag_cum_periodogram_acf(const double *x, size_t n, const double *acf, int nlags,
                             double alpha, diag_test *out)
{
    return cum_periodogram(x, NULL, n, alpha, out, acf, nlags, 1);
}

int diag_cum_periodogram_centred(const double *x, const double *d, size_t n, const double *acf,
                                 int nlags, double alpha, diag_test *out)
{
    return cum_periodogram(x, d, n, alpha, out, acf, nlags, 1);
}

int diag_cum_periodogram_bare(const double *d, size_t n, double alpha, diag_test *out)
{
    return cum_periodogram(NULL, d, n, alpha, out, NULL, 0, 0);
}
