/* diag_stats.h - accurate summary statistics, autocorrelations and partial autocorrelations.
 *
 * Conventions (common practice; the NIST StRD univariate pages use the same
 * estimator): mean and standard deviation with divisor n-1; the
 * autocorrelation at lag k is
 *     r_k = sum_{t=k+1..n} (x_t - xbar)(x_{t-k} - xbar) / sum_t (x_t - xbar)^2,
 * i.e. divisor n in both autocovariances and the mean removed.
 * Every array index 0 holds lag 1. */
#ifndef DIAG_STATS_H
#define DIAG_STATS_H

#include <stddef.h>

/* Mean and standard deviation (divisor n-1) of X[0..n-1].  The mean is found
 * to about double-double accuracy (blocked sum, then a compensated pass over
 * the deviations that corrects it, diag_sum.h), and the same pass gives the
 * compensated sum of squares of the corrected deviations.  SD may be
 * NULL.  Series whose largest |x| is above 2^500 are first scaled by an
 * exact power of two, so values up to the largest double give finite
 * results.  Returns HN_OK; HN_ESHORT when n < 1 (n < 2 when SD is wanted);
 * HN_ENUMERIC when a value is not finite; HN_ENOMEM (scaled copy). */
int diag_mean_sd(const double *x, size_t n, double *mean, double *sd);

/* Deviations from the mean, D[i] = x_i - xbar, written to D[0..n-1] (caller
 * allocates; D may equal X).  The mean is removed in two parts (a rounded
 * mean, then the small correction) so that the deviations are as accurate
 * as the data allow even when |xbar| >> sd.  Returns HN_OK, HN_ESHORT when
 * n < 1, HN_ENUMERIC for a non-finite value. */
int diag_center(const double *x, size_t n, double *d);
/* The same deviations and, in the same pass, SS = sum_i D[i]^2 (compensated),
 * exactly as diag_acf forms them.  HN_OK, HN_ESHORT, HN_ENUMERIC. */
int diag_center_ss(const double *x, size_t n, double *d, double *ss);
/* Both at once: D and SS as diag_center_ss gives them and MEAN and SD as
 * diag_mean_sd does, the mean found once.  HN_OK, HN_ESHORT (n < 2),
 * HN_ENUMERIC, HN_ENOMEM. */
int diag_center_ss_sd(const double *x, size_t n, double *d, double *ss, double *mean, double *sd);
/* S[0..2] = sum_i d_i^2, d_i^3, d_i^4 of the same deviations, not stored:
 * the digits of diag_center followed by diag_sum_moments.  HN_OK,
 * HN_ESHORT, HN_ENUMERIC. */
int diag_center_moments(const double *x, size_t n, double s[3]);

/* Autocorrelations r_1..r_maxlag of X into ACF[0..maxlag-1] (caller
 * allocates maxlag doubles).  diag_acf chooses the method by cost:
 * the direct sum when (maxlag + 1) <= 3 log2(N), N the FFT length below,
 * otherwise the FFT.  Both work on the accurately centred series; the two
 * agree to about 1e-14 in practice.
 * Returns HN_OK; HN_EINVAL when maxlag < 1 or maxlag > n - 1; HN_ESHORT when
 * n < 2; HN_ECONST when the values are all equal; HN_ENOMEM; HN_ENUMERIC. */
int diag_acf(const double *x, size_t n, int maxlag, double *acf);
/* 1 when diag_acf takes the direct sum for N values and MAXLAG lags, else 0.
 * The direct sum's lag k does not depend on maxlag, so on that route the
 * first k values of a longer ACF equal a shorter one's bit for bit. */
int diag_acf_is_direct(size_t n, int maxlag);
/* Direct lagged products with blocked compensated sums, all lags in one
 * cache-blocked sweep: O(n maxlag). */
int diag_acf_direct(const double *x, size_t n, int maxlag, double *acf);
/* The direct route from D and SS0 as diag_center_ss gives them (only read):
 * the digits of diag_acf_direct on the original series.  HN_OK, HN_EINVAL,
 * HN_ESHORT, HN_ECONST (ss0 not positive). */
int diag_acf_centred(const double *d, size_t n, double ss0, int maxlag, double *acf);
/* GSL radix-2 real FFT of the centred series zero-padded to the power of two
 * N >= 2n (so no circular wrap-around), inverse of the power spectrum:
 * O(N log N).  The lag-0 sum of squares is the compensated direct sum. */
int diag_acf_fft(const double *x, size_t n, int maxlag, double *acf);

/* The sums behind the direct route, of the series (SQUARE = 0) or of its
 * squares (1, formed on the way, never stored): with v_i the values, M0 +
 * C their mean as diag_center forms it, S1 = sum_i (v_i - M0) (compensated)
 * and d_i = (v_i - M0) - C, SS0 = sum_i d_i^2 and LAG[k-1] = sum_{t>=k}
 * d_t d_{t-k} for k = 1..MAXLAG (1 <= MAXLAG < n; caller's array).  The
 * digits are those diag_acf_direct divides, on the values given; lag k's
 * sum does not depend on MAXLAG.  One pass over X for the mean, one for
 * S1, one for the rest (MAXLAG <= 64; beyond, a centred copy is made).
 * SS0 is not checked.  HN_OK, HN_ENUMERIC (a value or a sum not finite),
 * HN_ENOMEM. */
typedef struct {
    double m0, c, s1, ss0;
} diag_lag_sums;
int diag_lag_sums_of(const double *x, size_t n, int square, int maxlag, diag_lag_sums *s,
                     double *lag);
/* The ACF of the squares x_i^2, with the digits of diag_acf on a stored
 * copy of them (no copy is made on the direct route).  Returns as diag_acf. */
int diag_acf_sq(const double *x, size_t n, int maxlag, double *acf);

/* Partial autocorrelations phi_11..phi_mm (m = MAXLAG) from ACF[0..m-1] by
 * the Durbin-Levinson recursion, into PACF[0..m-1] (caller allocates).
 * Returns HN_OK; HN_EINVAL for maxlag < 1; HN_ENUMERIC when the recursion
 * meets a prediction-error ratio <= 0 (the ACF is not positive definite);
 * HN_ENOMEM. */
int diag_pacf(const double *acf, int maxlag, double *pacf);

/* Practical size of serial dependence: the share of variance that the best
 * linear predictor from ORDER past values removes, 1 - prod_{k<=ORDER}
 * (1 - pacf_k^2), computed from PACF[0..order-1].  With N_OBS > order + 1
 * the share is adjusted for the order like an adjusted R^2 (so that its
 * expectation under white noise is about zero):
 *     1 - (1 - share) (N_OBS - 1) / (N_OBS - ORDER - 1),  clipped at 0;
 * pass N_OBS = 0 for the raw share.  Returns NAN for order < 1. */
double diag_predictable_share(const double *pacf, int order, size_t n_obs);

/* The long-autoregression order the battery uses for that share:
 * min(20, n/10), at least 1 and at most n - 2 (0 when n < 3). */
int diag_share_order(size_t n);
#define DIAG_SHARE_MAX 20   /* the largest order diag_share_order returns */

/* Upper tail of Kolmogorov's limiting distribution of sqrt(n) D_n:
 * Q(l) = 2 sum_{k>=1} (-1)^(k-1) exp(-2 k^2 l^2), 1 for l <= 0.  Used for
 * the cumulative periodogram bound (defined in diag_portmanteau.c). */
double diag_kolmogorov_q(double l);

/* Median of A[0..n-1] (n > 0) by selection in O(n) on average; A is
 * reordered. */
double diag_median_inplace(double *a, size_t n);
/* The same median of A[0..n-1], A only read (finite values; for long A a
 * sampled pre-filter leaves a selection on a small copy).  HN_OK, HN_ESHORT
 * (n < 1) or HN_ENOMEM. */
int diag_median(const double *a, size_t n, double *med);

#endif
