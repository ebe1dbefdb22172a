/* test_dftrader.c - Rader's convolution for prime lengths against the DFT's definition. */
#include "testutil.h"
#include "tu_dft.h"
#include "diag_dftrader.h"
#include "hn_status.h"

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

static int run_rader(const void *k, fftw_complex *t, size_t pitch, size_t c0, size_t c1)
{
    return diag_rader_cols(k, t, pitch, c0, c1) == HN_OK ? 0 : -1;
}

/* tu_dft.h's check, on columns of Gaussian values (GSL mt19937 seed 93): a
 * block of eight columns and one of three padded. */
static void test_against_definition(void **state)
{
    (void)state;
    const size_t ps[] = { 17, 61, 127, 257, 641 };
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 93UL);
    for (size_t k = 0; k < sizeof ps / sizeof ps[0]; k++) {
        diag_rader q;
        assert_int_equal(diag_rader_make(&q, ps[k]), HN_OK);
        tu_check_columns(&q, run_rader, ps[k], r);
        diag_rader_free(&q);
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
