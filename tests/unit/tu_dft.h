/* tu_dft.h - a kernel of DFTs down the columns of an array against the DFT's definition
 * (shared by the kernels' tests). */
#ifndef TU_DFT_H
#define TU_DFT_H

#include "testutil.h"

#include <fftw3.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

/* Transforms of length p down columns [C0, C1) of T at PITCH, in place; 0 on success. */
typedef int (*tu_cols_fn)(const void *kernel, fftw_complex *t, size_t pitch, size_t c0, size_t c1);

/* X_a = sum_b x_b exp(-2 pi i a b / p), the definition (common practice),
 * in long double with the angle reduced exactly (a b mod p), on 11 columns
 * of Gaussian values from R at a row pitch of 12.  Every entry to 1e-14 of
 * the column's largest output; columns transformed one call at a time give
 * the bits of one call over all of them (and an empty range changes
 * nothing); the column past the last is left alone. */
static inline void tu_check_columns(const void *kernel, tu_cols_fn run, size_t p, gsl_rng *r)
{
    const size_t cols = 11, pitch = 12;
    fftw_complex *t = fftw_alloc_complex(p * pitch), *u = fftw_alloc_complex(p * pitch);
    fftw_complex *x = fftw_alloc_complex(p * pitch);
    assert_non_null(t);
    assert_non_null(u);
    assert_non_null(x);
    for (size_t i = 0; i < p * pitch; i++) {
        x[i][0] = gsl_ran_gaussian(r, 1.0);
        x[i][1] = gsl_ran_gaussian(r, 1.0);
    }
    memcpy(t, x, p * pitch * sizeof *t);
    memcpy(u, x, p * pitch * sizeof *u);
    assert_int_equal(run(kernel, t, pitch, 0, cols), 0);
    for (size_t c = 0; c < cols; c++)
        assert_int_equal(run(kernel, u, pitch, c, c + 1), 0);
    assert_int_equal(run(kernel, u, pitch, 3, 3), 0);
    for (size_t a = 0; a < p; a++)
        for (size_t c = 0; c < cols; c++)
            assert_memory_equal(t[a * pitch + c], u[a * pitch + c], sizeof t[0]);
    for (size_t a = 0; a < p; a++)
        assert_memory_equal(t[a * pitch + cols], x[a * pitch + cols], sizeof t[0]);
    for (size_t c = 0; c < cols; c++) {
        long double big = 0.0L, worst = 0.0L;
        for (size_t a = 0; a < p; a++) {
            long double re = 0.0L, im = 0.0L;
            for (size_t b = 0; b < p; b++) {
                long double th = 2.0L * 3.14159265358979323846264338327950288L *
                                 (long double)(a * b % p) / (long double)p;
                re += x[b * pitch + c][0] * cosl(th) + x[b * pitch + c][1] * sinl(th);
                im += x[b * pitch + c][1] * cosl(th) - x[b * pitch + c][0] * sinl(th);
            }
            long double er = re - t[a * pitch + c][0], ei = im - t[a * pitch + c][1];
            big = fmaxl(big, sqrtl(re * re + im * im));
            worst = fmaxl(worst, sqrtl(er * er + ei * ei));
        }
        assert_true(worst < 1e-14L * big);
    }
    fftw_free(t);
    fftw_free(u);
    fftw_free(x);
}

#endif
