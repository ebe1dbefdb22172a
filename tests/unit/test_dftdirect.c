/* test_dftdirect.c - the direct sum for odd prime lengths against the DFT's definition. */
#include "testutil.h"
#include "tu_dft.h"
#include "diag_dftdirect.h"
#include "hn_status.h"

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

static int run_direct(const void *k, fftw_complex *t, size_t pitch, size_t c0, size_t c1)
{
    diag_direct_cols(k, t, pitch, c0, c1);
    return 0;
}

/* tu_dft.h's check, on columns of Gaussian values (GSL mt19937 seed 91):
 * two groups of four and three alone. */
static void test_against_definition(void **state)
{
    (void)state;
    const size_t ps[] = { 17, 31, 37, 61, 113 };
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 91UL);
    for (size_t k = 0; k < sizeof ps / sizeof ps[0]; k++) {
        diag_direct d;
        assert_int_equal(diag_direct_make(&d, ps[k]), HN_OK);
        tu_check_columns(&d, run_direct, ps[k], r);
        diag_direct_free(&d);
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
