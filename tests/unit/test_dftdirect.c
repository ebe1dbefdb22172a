/* test_dftdirect.c - the direct sum for odd prime lengths against the DFT's definition. */
#include "testutil.h"
#include "diag_dftdirect.h"
#include "hn_status.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <string.h>

static void test_takes(void **state)
{
    (void)state;
    const size_t yes[] = { 17, 19, 23, 31, 37, 97, 113 };
    const size_t no[] = { 0, 2, 3, 13, 15, 21, 25, 51, 91, 111, 127, 4096 };
    for (size_t i = 0; i < sizeof yes / sizeof yes[0]; i++)
        assert_int_equal(diag_direct_takes(yes[i]), 1);
    for (size_t i = 0; i < sizeof no / sizeof no[0]; i++)
        assert_int_equal(diag_direct_takes(no[i]), 0);
    diag_direct d;
    assert_int_equal(diag_direct_make(&d, 21), HN_EINVAL);
    assert_null(d.c);
    diag_direct_free(&d);
    diag_direct_free(NULL);
}

/* X_a = sum_b x_b exp(-2 pi i a b / p), the definition (common practice),
 * in long double with the angle reduced exactly (a b mod p), on 11 columns
 * of Gaussian values (GSL mt19937 seed 91) at a row pitch of 12: the
 * columns of two groups of four and three alone.  Every entry to 1e-14 of
 * the column's largest output; columns transformed one call at a time give
 * the bits of one call over all of them. */
static void test_against_definition(void **state)
{
    (void)state;
    const size_t ps[] = { 17, 31, 37, 61, 113 };
    const size_t cols = 11, pitch = 12;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 91UL);
    for (size_t k = 0; k < sizeof ps / sizeof ps[0]; k++) {
        size_t p = ps[k];
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
        diag_direct d;
        assert_int_equal(diag_direct_make(&d, p), HN_OK);
        diag_direct_cols(&d, t, pitch, 0, cols);
        for (size_t c = 0; c < cols; c++)
            diag_direct_cols(&d, u, pitch, c, c + 1);
        for (size_t a = 0; a < p; a++)
            for (size_t c = 0; c < cols; c++) {
                assert_memory_equal(t[a * pitch + c], u[a * pitch + c], sizeof t[0]);
            }
        /* the column past the last is left alone */
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
        diag_direct_free(&d);
        fftw_free(t);
        fftw_free(u);
        fftw_free(x);
    }
    gsl_rng_free(r);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_takes),
        cmocka_unit_test(test_against_definition),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
