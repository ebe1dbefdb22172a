/* diag_dftdirect.h - DFTs of an odd prime length by the direct sum, down the columns of an array (internal).
 *
 * FFTW has fixed-size kernels up to 16; a prime factor above that costs it
 * a generic, Rader or Bluestein step, 2 to 4 times more per point than the
 * direct sum below for the primes 17..113 (measured on the columns of the
 * split transform, n near 5 x 10^5: 2.5 to 13 ns a point against 5 to 25).
 * The direct sum pairs the inputs j and p - j:
 *   X_0 = x_0 + sum_j u_j,
 *   X_k = x_0 + U_k - i V_k,  X_{p-k} = x_0 + U_k + i V_k   (k = 1..h),
 * u_j = x_j + x_{p-j}, v_j = x_j - x_{p-j}, U_k = sum_j u_j cos(2 pi j k / p),
 * V_k = sum_j v_j sin(2 pi j k / p), j = 1..h, h = (p - 1) / 2: h^2 real
 * multiples of complex values for each pair of outputs.  The sums run in j
 * order for every column alike, so the bits do not depend on how the
 * columns are grouped or on the CPU's vector width. */
#ifndef DIAG_DFTDIRECT_H
#define DIAG_DFTDIRECT_H

#include <stddef.h>

#include <fftw3.h>

/* The primes the direct sum takes. */
#define DIAG_DIRECT_MIN 17
#define DIAG_DIRECT_MAX 113

/* cos and sin of 2 pi j k / p for j, k = 1..h, row k - 1 holding j = 1..h. */
typedef struct {
    size_t p, h;
    double *c, *s;
} diag_direct;

/* 1 when P is a prime the direct sum takes. */
int diag_direct_takes(size_t p);
/* The tables for P (diag_direct_takes(P)); HN_OK, HN_EINVAL or HN_ENOMEM.
 * Free with diag_direct_free. */
int diag_direct_make(diag_direct *d, size_t p);
void diag_direct_free(diag_direct *d);
/* For each column k1 in [C0, C1), the forward transform of T[a * PITCH +
 * k1], a < p, in place: entry a becomes X_a. */
void diag_direct_cols(const diag_direct *d, fftw_complex *t, size_t pitch, size_t c0, size_t c1);

#endif
