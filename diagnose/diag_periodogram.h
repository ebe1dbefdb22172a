/* diag_periodogram.h - periodogram ordinates |X_j|^2 of a real series by FFT (FFTW).
 *
 * X_j = sum_t d_t exp(-2 pi i j t / n).  Internal to diagnose/ (the
 * cumulative periodogram test); declared here so that the routes can be
 * tested one by one. */
#ifndef DIAG_PERIODOGRAM_H
#define DIAG_PERIODOGRAM_H

#include <stddef.h>

/* |X_j|^2 for j = 1..q (q < n/2, n >= 2) into I[0..q-1]; D[0..n-1] is only
 * read.  TOTAL (NULL: not wanted): the sum of I[0..q-1] (diag_sum.h).
 * Routes: even n, one complex transform of length n/2; odd n whose prime
 * factors are all at most 16384, a real transform of length n; other odd n,
 * Bluestein's chirp-z identity on a 2-3-5-7-smooth length.  The first two
 * are split into tasks (diag_fftsplit.h) when their transform has a prime
 * factor above 16 without being prime; below n = 32768 a transform with a
 * prime factor above 7 is replaced by the chirp on a length 2^k or 3 x 2^k
 * (FFTW's plans for those lengths cost many times their transform).  From
 * 65536 ordinates they are formed in tasks too.  Returns HN_OK or
 * HN_ENOMEM; ordinates that overflow are left infinite for the caller to
 * judge. */
int diag_periodogram(const double *d, size_t n, size_t q, double *I, double *total);

/* Which route diag_periodogram takes for N: 0 half-length complex, 1 real,
 * 2 chirp-z, 3 half-length complex split, 4 real split, 5 chirp-z on a
 * length 2^k or 3 x 2^k. */
int diag_periodogram_route(size_t n);

/* As diag_periodogram on ROUTE, for the tests of each route: 1, 2 and 5
 * take any n, 4 any n that is not prime, 0 even n only, 3 even n whose half
 * is not prime (HN_EINVAL otherwise, and for an unknown route). */
int diag_periodogram_by(int route, const double *d, size_t n, size_t q, double *I, double *total);

#endif
