/* test_edge.c - numerical edge cases: values near the top of the double range,
 * exactly predictable series, zero and constant residuals, series too large
 * in magnitude for the likelihood or in length for the memory budget. */
#include "testutil.h"
#include "diag_battery.h"
#include "diag_stats.h"
#include "fit.h"
#include "fit_spec.h"
#include "hn_status.h"

static fit_spec spec_of(const char *text)
{
    fit_spec s;
    char err[128];
    int pos;
    assert_int_equal(fit_spec_parse(text, &s, err, sizeof err, &pos), HN_OK);
    return s;
}

/* Mean and sd of values near +-1e308, where the plain sums overflow. */
static void test_mean_sd_near_overflow(void **state)
{
    (void)state;
    /* By hand from the definitions: sum 1.5e308, mean 3e307; deviations
     * 7, -13, 7, -13, 12 (x 1e307), squares sum 580e614, / 4 = 145e614. */
    const double x[5] = { 1e308, -1e308, 1e308, -1e308, 1.5e308 };
    double m, sd;
    assert_int_equal(diag_mean_sd(x, 5, &m, &sd), HN_OK);
    TU_NEAR(m, 3e307, 1e-14);
    TU_NEAR(sd, sqrt(145.0) * 1e307, 1e-14);

    /* tests/data/bad/huge_1e308.csv: 200 values of size 0.5e308..1e308 with
     * random signs.  Reference: numpy 1.24.2 (Debian python3-numpy),
     * np.mean(x / 1e300) * 1e300 and np.std(x / 1e300, ddof=1) * 1e300. */
    double *y;
    size_t n = tu_read_column("tests/data/bad/huge_1e308.csv", 0, &y);
    assert_int_equal(n, 200);
    assert_int_equal(diag_mean_sd(y, n, &m, &sd), HN_OK);
    TU_NEAR(m, 2.1365398774750574e+306, 1e-12);
    TU_NEAR(sd, 7.789341630960631e+307, 1e-12);

    /* No model is fitted to them: their squares overflow in the likelihood. */
    fit_spec s = spec_of("arma(0,0)");
    fit_result r;
    assert_int_equal(fit_model(y, n, &s, NULL, &r), HN_ELIMIT);
    free(y);
}

/* Large but accepted: white noise scaled by 1e140 fits, and sigma2 is SSR/N
 * (the stated convention) of the scaled data. */
static void test_large_scale_fits(void **state)
{
    (void)state;
    double *y;
    size_t n = tu_read_column("tests/data/wn200.csv", 0, &y);
    assert_true(n >= 100);
    for (size_t i = 0; i < n; i++)
        y[i] *= 1e140;
    double m, sd;
    assert_int_equal(diag_mean_sd(y, n, &m, &sd), HN_OK);
    fit_spec s = spec_of("arma(0,0)");
    fit_result r;
    assert_int_equal(fit_model(y, n, &s, NULL, &r), HN_OK);
    assert_true(isfinite(r.loglik) && isfinite(r.aic) && isfinite(r.bic));
    TU_NEAR(r.par[0] / m, 1.0, 1e-9);
    /* arma(0,0): SSR/N = sd^2 (n-1)/n (definition, common practice) */
    TU_NEAR(r.sigma2 / (sd * sd * (double)(n - 1) / (double)n), 1.0, 1e-9);
    fit_result_free(&r);
    free(y);
}

/* y_t = 0.5 y_{t-1} exactly: the AR(1) fit must find 0.5, keep every
 * reported number finite, and leave residuals that are zero to rounding. */
static void test_exactly_predictable(void **state)
{
    (void)state;
    double y[200];
    y[0] = 1.0;
    for (int i = 1; i < 200; i++)
        y[i] = 0.5 * y[i - 1]; /* exact in binary floating point */
    fit_spec s = spec_of("ar(1)");
    fit_result r;
    int rc = fit_model(y, 200, &s, NULL, &r);
    assert_int_equal(rc, HN_OK);
    TU_NEAR(r.par[1], 0.5, 1e-6);
    assert_true(isfinite(r.loglik) && isfinite(r.aic) && isfinite(r.aicc) && isfinite(r.bic) &&
                isfinite(r.hq));
    assert_true(r.sigma2 >= 0.0 && r.sigma2 < 1e-20);
    for (size_t i = 0; i < r.n_eff; i++)
        assert_true(isfinite(r.resid[i]));
    fit_result_free(&r);

    /* a pure linear trend: finite numbers, and the unit root is reported */
    for (int i = 0; i < 200; i++)
        y[i] = 3.0 + 0.25 * i;
    rc = fit_model(y, 200, &s, NULL, &r);
    assert_int_equal(rc, HN_OK);
    assert_true(isfinite(r.loglik) && isfinite(r.par[1]));
    assert_true((r.warnings & (FIT_WARN_NEAR_UNIT_ROOT | FIT_WARN_NONSTATIONARY)) != 0);
    fit_result_free(&r);
}

/* Zero or constant residuals: the battery refuses rather than reporting
 * statistics of nothing; a constant series is refused by the fit. */
static void test_constant_residuals(void **state)
{
    (void)state;
    double z[200] = { 0 }, c[200];
    for (int i = 0; i < 200; i++)
        c[i] = 4.25;
    diag_options o = diag_default_options();
    diag_battery b;
    assert_int_equal(diag_battery_run(z, 200, &o, &b), HN_ECONST);
    diag_battery_free(&b);
    assert_int_equal(diag_battery_run(c, 200, &o, &b), HN_ECONST);
    diag_battery_free(&b);
    fit_spec s = spec_of("arma(0,0)");
    fit_result r;
    assert_int_equal(fit_model(c, 200, &s, NULL, &r), HN_ECONST);
    double m, sd;
    assert_int_equal(diag_mean_sd(c, 200, &m, &sd), HN_OK);
    assert_true(m == 4.25 && sd == 0.0);
}

/* The working-memory budget: refused before any allocation, with the
 * estimate stated in fit.h (8 (k + 5) bytes per observation for GARCH). */
static void test_memory_budget(void **state)
{
    (void)state;
    fit_spec big = spec_of("arma(32,32)+garch(1,1)");
    fit_spec small = spec_of("ar(1)+garch(1,1)");
    size_t n = 8000000;
    TU_NEAR(fit_work_bytes(&big, n), 8.0 * (65 + 5) * (double)n, 0.0);
    assert_true(fit_work_bytes(&big, n) > FIT_MAX_WORK_BYTES);
    assert_true(fit_work_bytes(&small, n) < FIT_MAX_WORK_BYTES);
    double *y = calloc(n, sizeof *y);
    assert_non_null(y);
    fit_result r;
    assert_int_equal(fit_model(y, n, &big, NULL, &r), HN_ELIMIT); /* before the constant check */
    assert_int_equal(fit_model(y, n, &small, NULL, &r), HN_ECONST);
    free(y);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_mean_sd_near_overflow),
        cmocka_unit_test(test_large_scale_fits),
        cmocka_unit_test(test_exactly_predictable),
        cmocka_unit_test(test_constant_residuals),
        cmocka_unit_test(test_memory_budget),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
