/* fit_transform.h - pure transforms of a series held in a double array. */
#ifndef FIT_TRANSFORM_H
#define FIT_TRANSFORM_H

#include <stddef.h>

/* Conventions for every function here:
 *  - Y holds N input values; OUT is a caller-owned buffer of at least N
 *    doubles and may be the same array as Y (in-place use is safe).
 *  - Nothing is allocated; nothing is printed.
 *  - Returns HN_OK or an hn_status code; on error OUT is unspecified.
 *  - Inputs must be finite: a NaN or infinite value gives HN_EINVAL and,
 *    when BAD is not NULL, its 0-based index in *BAD. */

/* Mean of Y[0..N-1] from a compensated (Neumaier) sum, accurate to about
 * one rounding even under heavy cancellation; when the sum would overflow,
 * the values are divided by N first.  Returns HN_OK
 * and *MEAN, HN_ESHORT when N is 0, HN_EINVAL for non-finite values. */
int fit_tr_mean(const double *y, size_t n, double *mean, size_t *bad);

/* OUT[i] = log(Y[i]), same length.  A value <= 0 gives HN_EDOMAIN with the
 * index of the first such value in *BAD (may be NULL). */
int fit_tr_log(const double *y, size_t n, double *out, size_t *bad);

/* Difference at lag K >= 1: OUT[i] = Y[i+K] - Y[i] for i = 0..N-K-1, so the
 * first K values are lost (OUT[i] belongs to the time of Y[i+K]).  Stores
 * the new length N-K in *N_OUT.  HN_EINVAL when K is 0, HN_ESHORT when
 * N <= K. */
int fit_tr_diff(const double *y, size_t n, size_t k, double *out, size_t *n_out, size_t *bad);

/* Seasonal difference at period S >= 1: the same arithmetic as fit_tr_diff
 * at lag S (kept apart so that a transform history can say which one was
 * meant).  Same returns. */
int fit_tr_sdiff(const double *y, size_t n, size_t s, double *out, size_t *n_out, size_t *bad);

/* OUT[i] = Y[i] - mean(Y) with the mean of fit_tr_mean, stored in *MEAN
 * (may be NULL).  HN_ESHORT when N is 0. */
int fit_tr_demean(const double *y, size_t n, double *out, double *mean, size_t *bad);

/* Box-Cox transform: OUT[i] = (Y[i]^LAMBDA - 1) / LAMBDA, and log(Y[i]) at
 * LAMBDA = 0 (evaluated as expm1(LAMBDA log y) / LAMBDA, accurate for
 * small LAMBDA).  A value <= 0 gives HN_EDOMAIN with its index in *BAD; a
 * non-finite LAMBDA gives HN_EINVAL; a result that overflows gives
 * HN_ENUMERIC with its index. */
int fit_tr_boxcox(const double *y, size_t n, double lambda, double *out, size_t *bad);

/* Inverse of fit_tr_diff / fit_tr_sdiff for values that follow the series,
 * e.g. forecasts of the differenced series: OUT[i] = D[i] + OUT[i-K], where
 * the K values before OUT[0] are LAST[0..K-1] (the final K values of the
 * undifferenced series, in time order).  H values in D and OUT; OUT must not
 * overlap LAST.  HN_EINVAL when K is 0 or a value is not finite. */
int fit_tr_undiff(const double *d, size_t h, const double *last, size_t k, double *out);

/* Inverse Box-Cox: OUT[i] = (1 + LAMBDA Z[i])^(1/LAMBDA), exp(Z[i]) at
 * LAMBDA = 0 (evaluated as exp(log1p(LAMBDA z) / LAMBDA)).  A value with
 * 1 + LAMBDA Z <= 0 (outside the transform's range) gives HN_EDOMAIN, an
 * overflow HN_ENUMERIC, each with the index in *BAD. */
int fit_tr_inv_boxcox(const double *z, size_t n, double lambda, double *out, size_t *bad);

#endif
