/* test_dftrader.c - Rader's convolution for prime lengths against the DFT's definition. */
#include "testutil.h"
#include "diag_dftrader.h"
#include "hn_status.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>
#include <string.h>

static void test_takes(void **state)
{
    (void)state;
    /* p - 1 = 2^4, 2 3^2, 2^2 3 5, 2 3^2 7, 2^8, 2^7 5, 2^9 3 5 */
    const size_t yes[] = { 17, 19, 61, 127, 257, 641, 7681 };
    /* 22 = 2 11, 46 = 2 23, 52 = 2^2 13, 676 = 2^2 13^2, 8190 = 2 3^2 5 7 13;
     * not prime; below 17; above the largest */
    const size_t no[] = { 23, 47, 53, 677, 8191, 0, 2, 3, 13, 121, 125, 129, 12289 };
    for (size_t i = 0; i < sizeof yes / sizeof yes[0]; i++)
        assert_int_equal(diag_rader_takes(yes[i]), 1);
    for (size_t i = 0; i < sizeof no / sizeof no[0]; i++)
        assert_int_equal(diag_rader_takes(no[i]), 0);
    diag_rader q;
    assert_int_equal(diag_rader_make(&q, 23), HN_EINVAL);
    assert_null(q.up);
    diag_rader_free(&q);
    diag_rader_free(NULL);
}

/* X_a = sum_b x_b exp(-2 pi i a b / p), the definition (common practice),
 * in long double with the angle reduced exactly (a b mod p), on 11 columns
 * of Gaussian values (GSL mt19937 seed 93) at a row pitch of 12: a block of
 * eight columns and one of three padded.  Every entry to 1e-14 of the
 * column's largest output; columns transformed one call at a time give the
 * bits of one call over all of them; the column past the last is left
 * alone. */
static void test_against_definition(void **state)
{
    (void)state;
    const size_t ps[] = { 17, 61, 127, 257, 641 };
    const size_t cols = 11, pitch = 12;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 93UL);
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
        diag_rader q;
        assert_int_equal(diag_rader_make(&q, p), HN_OK);
        assert_int_equal(diag_rader_cols(&q, t, pitch, 0, cols), HN_OK);
        for (size_t c = 0; c < cols; c++)
            assert_int_equal(diag_rader_cols(&q, u, pitch, c, c + 1), HN_OK);
        assert_int_equal(diag_rader_cols(&q, u, pitch, 3, 3), HN_OK);
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
        diag_rader_free(&q);
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
