/* test_sim.c - the documented simulation recipe, reproducibility and moments. */
#include "testutil.h"
#include "fit_sim.h"
#include "fit_spec.h"
#include "hn_status.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

static fit_spec spec_of(const char *text)
{
    fit_spec s;
    assert_int_equal(fit_spec_parse(text, &s, NULL, 0, NULL), HN_OK);
    return s;
}

static double sample_var(const double *y, size_t n)
{
    return tu_sum_sq_dev(y, n) / (double)(n - 1);
}

/* The recipe in fit_sim.h, replayed draw by draw with GSL directly. */
static void test_recipe(void **state)
{
    (void)state;
    double out[50];
    fit_spec s = spec_of("arma(1,1)");
    double par[] = { 0.5, 0.6, -0.3, 4.0 };
    assert_int_equal(fit_simulate(&s, par, 20, 30, 42, out), HN_OK);
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 42);
    double y[50], e[50];
    for (int t = 0; t < 50; t++) {
        e[t] = 2.0 * gsl_ran_gaussian(r, 1.0);
        y[t] = 0.5 + e[t] + (t >= 1 ? 0.6 * (y[t - 1] - 0.5) - 0.3 * e[t - 1] : 0.0);
    }
    for (int k = 0; k < 20; k++)
        TU_NEAR(out[k], y[30 + k], 1e-13);   /* same draws, sums in another order */

    /* GARCH(1,1) with Student-t: h_0 unconditional, t draws rescaled */
    fit_spec g = spec_of("garch(1,1) t");
    double gp[] = { 0.1, 0.2, 0.1, 0.7, 5.0 };
    assert_int_equal(fit_simulate(&g, gp, 10, 0, 7, out), HN_OK);
    gsl_rng_set(r, 7);
    double h = 0.2 / (1.0 - 0.1 - 0.7), ep = 0.0;
    for (int t = 0; t < 10; t++) {
        if (t > 0)
            h = 0.2 + 0.1 * ep * ep + 0.7 * h;
        ep = sqrt(h) * (gsl_ran_tdist(r, 5.0) * sqrt(3.0 / 5.0));
        TU_NEAR(out[t], 0.1 + ep, 1e-14);
    }
    gsl_rng_free(r);

    /* same seed, same series; another seed, another series */
    double a[20], b[20];
    assert_int_equal(fit_simulate(&s, par, 20, 30, 43, a), HN_OK);
    assert_int_equal(fit_simulate(&s, par, 20, 30, 43, b), HN_OK);
    assert_memory_equal(a, b, sizeof a);
    assert_true(a[0] != out[0] || a[1] != out[1]);
    /* seed 0 is GSL's default seed 4357 (fit_sim.h) */
    assert_int_equal(fit_simulate(&s, par, 20, 30, 0, a), HN_OK);
    assert_int_equal(fit_simulate(&s, par, 20, 30, 4357, b), HN_OK);
    assert_memory_equal(a, b, sizeof a);
}

static void test_moments(void **state)
{
    (void)state;
    const size_t n = 200000;
    double *y = malloc(n * sizeof *y);
    /* AR(1): Var y = sigma2 / (1 - phi^2) = 1.5625 at phi = 0.6; the sample
     * variance has sd about sqrt(2 (1+phi^2)/(1-phi^2) / n) Var y
     * (Bartlett's formula; common practice), about 0.0072 here. */
    fit_spec s = spec_of("ar(1)");
    double par[] = { 3.0, 0.6, 1.0 };
    assert_int_equal(fit_simulate(&s, par, n, 1000, 2024, y), HN_OK);
    assert_true(fabs(sample_var(y, n) - 1.5625) < 4 * 0.0072);
    /* standardised t(6) shocks have unit variance; Var s^2 ~ (kurtosis - 1)/n
     * with kurtosis 3 + 6/(nu - 4) = 6 (common practice): sd 0.005 */
    fit_spec g = spec_of("garch(1,1) t");
    double gp[] = { 0.0, 1.0, 0.0, 0.0, 6.0 };   /* omega 1, alpha 0, beta 0: h_t = 1 */
    assert_int_equal(fit_simulate(&g, gp, n, 0, 77, y), HN_OK);
    assert_true(fabs(sample_var(y, n) - 1.0) < 4 * 0.005);
    /* GARCH(1,1) unconditional variance omega / (1 - alpha - beta) = 2.5
     * (common practice); loose: the fourth moment is large */
    fit_spec gn = spec_of("garch(1,1)");
    double gq[] = { 0.0, 0.05, 0.08, 0.9 };
    assert_int_equal(fit_simulate(&gn, gq, n, 1000, 5, y), HN_OK);
    assert_true(fabs(sample_var(y, n) / 2.5 - 1.0) < 0.1);
    free(y);
}

static void test_errors(void **state)
{
    (void)state;
    double out[10];
    fit_spec g = spec_of("garch(1,1)");
    double bad1[] = { 0.0, 0.1, 0.3, 0.7 };
    assert_int_equal(fit_simulate(&g, bad1, 10, 0, 1, out), HN_EDOMAIN);
    double bad2[] = { 0.0, -0.1, 0.1, 0.7 };
    assert_int_equal(fit_simulate(&g, bad2, 10, 0, 1, out), HN_EDOMAIN);
    fit_spec t = spec_of("garch(1,1) t");
    double bad3[] = { 0.0, 0.1, 0.1, 0.7, 2.0 };
    assert_int_equal(fit_simulate(&t, bad3, 10, 0, 1, out), HN_EDOMAIN);
    fit_spec a = spec_of("ar(1)");
    double bad4[] = { 0.0, 0.5, 0.0 };
    assert_int_equal(fit_simulate(&a, bad4, 10, 0, 1, out), HN_EDOMAIN);
    double ok[] = { 0.0, 0.5, 1.0 };
    assert_int_equal(fit_simulate(&a, ok, 0, 0, 1, out), HN_EINVAL);
    assert_int_equal(fit_simulate(NULL, ok, 10, 0, 1, out), HN_EINVAL);
    a.dist = FIT_DIST_T;
    assert_int_equal(fit_simulate(&a, ok, 10, 0, 1, out), HN_EINVAL);
    /* an explosive AR overflows: reported, not returned as numbers */
    fit_spec x = spec_of("ar(1)");
    double ex[] = { 0.0, 3.0, 1.0 };
    assert_int_equal(fit_simulate(&x, ex, 10, 2000, 1, out), HN_ENUMERIC);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_recipe),
        cmocka_unit_test(test_moments),
        cmocka_unit_test(test_errors),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
