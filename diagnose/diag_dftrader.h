/* diag_dftrader.h - DFTs of a prime length by Rader's convolution, down the columns of an array (internal).
 *
 * For a prime p and a generator g of the integers mod p, Rader's identity
 *   X_0 = x_0 + sum_q a_q,   X_{g^-m} = x_0 + sum_q a_q b_{m-q}   (m, q < p - 1),
 * with a_q = x_{g^q} and b_k = exp(-2 pi i g^-k / p), turns the transform
 * into a cyclic convolution of length p - 1, taken here by two FFTW
 * transforms of that length (the kernel's transform b is made once).  When
 * p - 1 has no prime factor above 7 those run on FFTW's fixed-size kernels,
 * and a column costs 7 to 11 ns a point from p near 60 on (measured from 61 to
 * 641): FFTW's own choice for such primes (Bluestein's identity on a power
 * of 2) took 13 to 23, the direct sum (diag_dftdirect.h) 15 at p = 113 and
 * grows with p.  Factors 11 and 13 are left out: FFTW took up to 110 ms to
 * plan such lengths (p = 8009), against at most 1.4 ms for the 82 primes
 * taken.
 * Columns go through in blocks of DIAG_RADER_BLOCK, the last padded with
 * zeros, so that every column meets the same FFTW plan in the same place:
 * its bits do not depend on how the columns are grouped. */
#ifndef DIAG_DFTRADER_H
#define DIAG_DFTRADER_H

#include <stddef.h>

#include <fftw3.h>

/* The primes taken: from DIAG_RADER_MIN to DIAG_RADER_MAX, p - 1 with no
 * prime factor above 7. */
#define DIAG_RADER_MIN 17
#define DIAG_RADER_MAX 8192
/* Columns per block. */
#define DIAG_RADER_BLOCK 8

typedef struct {
    size_t p, n;          /* the prime and n = p - 1 */
    size_t *up, *down;    /* g^q and g^-q mod p, q < n */
    fftw_complex *b;      /* the kernel's transform over n, times 1 / n */
    fftw_plan plan;       /* n-point forward transforms of DIAG_RADER_BLOCK columns */
} diag_rader;

/* 1 when P is a prime the convolution takes. */
int diag_rader_takes(size_t p);
/* The tables and plan for P (diag_rader_takes(P)); HN_OK, HN_EINVAL or
 * HN_ENOMEM.  Free with diag_rader_free. */
int diag_rader_make(diag_rader *r, size_t p);
void diag_rader_free(diag_rader *r);
/* For each column k1 in [C0, C1), the forward transform of T[a * PITCH +
 * k1], a < p, in place: entry a becomes X_a.  HN_OK or HN_ENOMEM (T
 * unchanged). */
int diag_rader_cols(const diag_rader *r, fftw_complex *t, size_t pitch, size_t c0, size_t c1);
/* The same in WORK, diag_rader_work(R) entries aligned to 64 bytes (FFTW's
 * plan was made for such an array), for callers that keep one; HN_OK. */
size_t diag_rader_work(const diag_rader *r);
int diag_rader_cols_with(const diag_rader *r, fftw_complex *t, size_t pitch, size_t c0, size_t c1,
                         fftw_complex *work);

#endif
