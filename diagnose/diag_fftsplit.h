/* diag_fftsplit.h - a long DFT as one decimation-in-time step whose pieces run as tasks (internal).
 *
 * FFTW runs a transform on one thread, and lengths with prime factors for
 * which it has no fixed-size kernel cost it several times more per point
 * than smooth ones; long transforms of such lengths are the slowest part of
 * the battery.  Here len = r s, r as diag_split_radix chooses it:
 *   1. the samples t = a + r u are gathered into r rows (a < r, u < s);
 *   2. each row is transformed (length s) and its entry k1 turned by
 *      exp(-2 pi i a k1 / len): by FFTW, or, for rows whose length is p m
 *      with p its largest prime factor, above 13 and taking one of the
 *      kernels of step 3, and m a prime taking one too or with no prime
 *      factor above 7 (13 for short m; FFTW's), in two passes (real rows
 *      two at a time, as the parts of one complex row);
 *   3. for each k1 < s, the r turned entries are transformed across a
 *      (length r), giving X_{k1 + s k2} for k2 < r: by FFTW, by the direct
 *      sum (diag_dftdirect.h) when r is a prime it takes, or by Rader's
 *      convolution (diag_dftrader.h) from r = 61 on when r is one it takes.
 * Each step is split into OpenMP tasks that the threads of the enclosing
 * team share; outside a parallel region they run one after another on the
 * calling thread, with the same digits. */
#ifndef DIAG_FFTSPLIT_H
#define DIAG_FFTSPLIT_H

#include <stddef.h>

#include <fftw3.h>

/* X_k for k < r s lies at t[(k / s) * pitch + k % s]. */
typedef struct {
    fftw_complex *t;
    size_t r, s, pitch;
} diag_split;

/* X_k = sum_t x_t exp(-2 pi i k t / len) for every k < len, of LEN complex
 * values (PACKED: X holds their real and imaginary parts in turn) or of LEN
 * real values.  HN_OK; HN_EINVAL when len is below 4, prime or above
 * INT_MAX; HN_ENOMEM.  Free OUT with diag_split_free. */
int diag_split_dft(const double *x, int packed, size_t len, diag_split *out);
void diag_split_free(diag_split *out);

/* The smallest prime factor of n >= 2 (n itself when prime). */
size_t diag_smallest_factor(size_t n);

/* The radix r of the split of LEN (not prime): its largest prime factor
 * up to 13, else its smallest.  The r-point transforms then run on FFTW's
 * fixed-size kernels, and the rows keep the awkward factors among fewer,
 * shorter transforms that the threads share more evenly: for 999999 = 3^3
 * 7 11 13 37, r = 13 took 20 ms alone and 11 on two threads against 22 and
 * 15 for r = 3; over 10 other lengths near 3 x 10^5 and 10^6 the choice
 * was 2 to 30 % faster in 9 on one thread and 9 on two.  The rule depends
 * on LEN alone. */
size_t diag_split_radix(size_t len);

#endif
