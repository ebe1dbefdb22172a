/* test_unitroot.c - ADF and KPSS: published critical values, statistics against numpy, size and power.
 *
 * Sources: MacKinnon (2010) response surfaces and Fuller (1976) Table 8.5.2
 * (../shared/reference/tables/adf_*.csv), KPSS (1992) Table 1
 * (tables/kpss1992_table1.csv), and numpy 1.24.2 least squares
 * (tests/ref/checks_ref.csv, written by tests/ref/gen_checks_ref.py). */
#include "testutil.h"

#include <gsl/gsl_rng.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_statistics_double.h>
#include <gsl/gsl_sort.h>

#include "diag_unitroot.h"
#include "hn_status.h"

static double ref_value(const char *quantity)
{
    FILE *f = fopen("tests/ref/checks_ref.csv", "r");
    char line[512];
    size_t len = strlen(quantity);
    double v = NAN;
    assert_non_null(f);
    while (fgets(line, sizeof line, f)) {
        if (line[0] != '#' && strncmp(line, quantity, len) == 0 && line[len] == ',') {
            v = strtod(line + len + 1, NULL);
            break;
        }
    }
    fclose(f);
    if (isnan(v))
        print_error("no reference value '%s'\n", quantity);
    assert_false(isnan(v));
    return v;
}

static int adf_case_of(const char *s, diag_adf_case *c)
{
    if (strcmp(s, "nc") == 0) *c = DIAG_ADF_NONE;
    else if (strcmp(s, "c") == 0) *c = DIAG_ADF_CONST;
    else if (strcmp(s, "ct") == 0) *c = DIAG_ADF_TREND;
    else return 0;
    return 1;
}

/* The C constants equal the published coefficients in the CSV (the same
 * decimal text, so exact equality of the doubles). */
static void test_adf_constants_match_table(void **state)
{
    (void)state;
    TU_NEED_REF(dir);
    char path[4096], line[512];
    snprintf(path, sizeof path, "%s/tables/adf_mackinnon2010_tau_N1.csv", dir);
    FILE *f = fopen(path, "r");
    int rows = 0;
    assert_non_null(f);
    assert_non_null(fgets(line, sizeof line, f));
    while (fgets(line, sizeof line, f)) {
        char cs[8];
        double lv, b[4], got[4];
        diag_adf_case c;
        if (sscanf(line, "%7[^,],%lf,%lf,%lf,%lf,%lf", cs, &lv, &b[0], &b[1], &b[2], &b[3]) != 6)
            continue;
        if (!adf_case_of(cs, &c))
            continue;                  /* ctt (quadratic trend) is not offered */
        assert_int_equal(diag_adf_surface(c, lv, got), HN_OK);
        for (int i = 0; i < 4; i++) {
            if (got[i] != b[i])
                print_error("%s %g beta[%d]: %.17g, table %.17g\n", cs, lv, i, got[i], b[i]);
            assert_true(got[i] == b[i]);
        }
        rows++;
    }
    fclose(f);
    assert_int_equal(rows, 9);
}

static void test_kpss_constants_match_table(void **state)
{
    (void)state;
    TU_NEED_REF(dir);
    char path[4096], line[512];
    snprintf(path, sizeof path, "%s/tables/kpss1992_table1.csv", dir);
    FILE *f = fopen(path, "r");
    int rows = 0;
    assert_non_null(f);
    assert_non_null(fgets(line, sizeof line, f));
    while (fgets(line, sizeof line, f)) {
        char h[16], stat[16];
        double lv, cv, got;
        if (sscanf(line, "%15[^,],%15[^,],%lf,%lf", h, stat, &lv, &cv) != 4)
            continue;
        diag_kpss_case c = strcmp(h, "trend") == 0 ? DIAG_KPSS_TREND : DIAG_KPSS_LEVEL;
        if (fabs(lv - 0.025) < 1e-12) {
            /* the 2.5 % point (memory-only in the table) is not used */
            assert_int_equal(diag_kpss_critical(c, lv, &got), HN_EINVAL);
            continue;
        }
        assert_int_equal(diag_kpss_critical(c, lv, &got), HN_OK);
        assert_true(got == cv);
        rows++;
    }
    fclose(f);
    assert_int_equal(rows, 6);
}

/* MacKinnon's response surfaces at T = n against Fuller's Monte Carlo table
 * (two decimals).  Rows marked secondary-transcription within 0.03, rows
 * marked memory-only (not confirmed) loosely, within 0.04; n = inf against
 * b_inf. */
static void test_adf_critical_vs_fuller(void **state)
{
    (void)state;
    TU_NEED_REF(dir);
    char path[4096], line[512];
    snprintf(path, sizeof path, "%s/tables/adf_fuller1976_tau.csv", dir);
    FILE *f = fopen(path, "r");
    int rows = 0;
    double worst = 0.0;
    assert_non_null(f);
    assert_non_null(fgets(line, sizeof line, f));
    while (fgets(line, sizeof line, f)) {
        char cs[8], ns[8], status[64];
        double lv, cv, got;
        diag_adf_case c;
        if (sscanf(line, "%7[^,],%7[^,],%lf,%lf,%63s", cs, ns, &lv, &cv, status) != 5)
            continue;
        if (!adf_case_of(cs, &c) || fabs(lv - 0.025) < 1e-12)
            continue;                  /* no 2.5 % response surface */
        if (strcmp(ns, "inf") == 0) {
            double b[4];
            assert_int_equal(diag_adf_surface(c, lv, b), HN_OK);
            got = b[0];
        } else {
            assert_int_equal(diag_adf_critical(c, lv, (size_t)atoi(ns), &got), HN_OK);
        }
        double tol = strncmp(status, "memory-only", 11) == 0 ? 0.04 : 0.03;
        if (!(fabs(got - cv) <= tol))
            print_error("%s n=%s %g: %.4f vs Fuller %.2f (%s)\n", cs, ns, lv, got, cv, status);
        assert_true(fabs(got - cv) <= tol);
        if (fabs(got - cv) > worst)
            worst = fabs(got - cv);
        rows++;
    }
    fclose(f);
    printf("  %d Fuller cells, largest difference %.4f\n", rows, worst);
    assert_int_equal(rows, 54);
}

/* tau and eta at fixed lag / bandwidth against numpy (checks_ref.csv). */
static void test_statistics_vs_numpy(void **state)
{
    (void)state;
    double *y, *x;
    diag_ur_test t;
    size_t n = tu_read_column("tests/data/checks_series.csv", 1, &y);
    assert_int_equal(n, 200);
    assert_int_equal(tu_read_column("tests/data/checks_series.csv", 0, &x), n);
    const char *names[3] = {"none", "const", "trend"};
    for (int c = 0; c < 3; c++) {
        char q[64];
        assert_int_equal(diag_adf(y, n, (diag_adf_case)c, 2, 0.05, &t), HN_OK);
        snprintf(q, sizeof q, "adf_%s_k2_tau", names[c]);
        double want = ref_value(q);
        if (!(fabs(t.statistic - want) <= 1e-10 * fabs(want)))
            print_error("%s: %.17g vs %.17g\n", q, t.statistic, want);
        assert_true(fabs(t.statistic - want) <= 1e-10 * fabs(want));
        snprintf(q, sizeof q, "adf_%s_k2_T", names[c]);
        assert_true((double)t.nobs == ref_value(q));
        assert_int_equal(t.lags, 2);
    }
    assert_int_equal(diag_kpss(y, n, DIAG_KPSS_LEVEL, 4, 0.05, &t), HN_OK);
    assert_true(fabs(t.statistic - ref_value("kpss_level_l4_eta")) <= 1e-10 * t.statistic);
    assert_int_equal(diag_kpss(y, n, DIAG_KPSS_TREND, 4, 0.05, &t), HN_OK);
    assert_true(fabs(t.statistic - ref_value("kpss_trend_l4_eta")) <= 1e-10 * t.statistic);
    assert_int_equal(diag_kpss(x, n, DIAG_KPSS_LEVEL, 4, 0.05, &t), HN_OK);
    assert_true(fabs(t.statistic - ref_value("kpss_level_l4_eta_arch")) <= 1e-10 * t.statistic);
    free(y);
    free(x);
}

/* The lag rule (Schwert maximum, general-to-specific on the common sample,
 * refit) against the same rule written with numpy least squares. */
static void test_lag_rule_vs_numpy(void **state)
{
    (void)state;
    const char *cols[2] = {"arch", "walk"};
    const char *cases[2] = {"const", "trend"};
    diag_ur_test t;
    for (int col = 0; col < 2; col++) {
        double *y;
        size_t n = tu_read_column("tests/data/checks_series.csv", col, &y);
        assert_int_equal(n, 200);
        for (int c = 0; c < 2; c++) {
            char q[64];
            assert_int_equal(diag_adf(y, n, c ? DIAG_ADF_TREND : DIAG_ADF_CONST, -1, 0.05, &t), HN_OK);
            assert_int_equal(t.max_lags, 14);   /* floor(12 * 2^(1/4)) */
            snprintf(q, sizeof q, "adf_%s_auto_%s_k", cases[c], cols[col]);
            assert_int_equal(t.lags, (int)ref_value(q));
            snprintf(q, sizeof q, "adf_%s_auto_%s_tau", cases[c], cols[col]);
            double want = ref_value(q);
            if (!(fabs(t.statistic - want) <= 1e-10 * fabs(want)))
                print_error("%s: %.17g vs %.17g\n", q, t.statistic, want);
            assert_true(fabs(t.statistic - want) <= 1e-10 * fabs(want));
            assert_int_equal(t.nobs, n - 1 - (size_t)t.lags);
        }
        free(y);
    }
}

/* Empirical quantiles of the statistics under their nulls against the
 * published critical values: Dickey-Fuller tau (constant, no lags, n = 100,
 * random walks) at 5 % vs MacKinnon C(T); KPSS eta (level and trend, l = 0,
 * n = 200, iid normal) at 95 % vs Table 1.  4000 replications: the sampling
 * sd of such a quantile is about 0.02 for tau and about 0.015 / 0.004 for
 * eta_mu / eta_tau; Table 1 is asymptotic and the n = 200 quantiles lie a
 * little below it, so the tolerances (0.08, 0.06, 0.02) allow for both. */
static void test_null_quantiles(void **state)
{
    (void)state;
    enum { R = 4000 };
    static double tau[R], eta_l[R], eta_t[R];
    double y[200];
    diag_ur_test t;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    assert_non_null(r);
    gsl_rng_set(r, 1992);
    size_t T = 0;
    for (int i = 0; i < R; i++) {
        double s = 0.0;
        for (int j = 0; j < 100; j++)
            y[j] = (s += gsl_ran_gaussian_ziggurat(r, 1.0));
        assert_int_equal(diag_adf(y, 100, DIAG_ADF_CONST, 0, 0.05, &t), HN_OK);
        tau[i] = t.statistic;
        T = t.nobs;
        for (int j = 0; j < 200; j++)
            y[j] = gsl_ran_gaussian_ziggurat(r, 1.0);
        assert_int_equal(diag_kpss(y, 200, DIAG_KPSS_LEVEL, 0, 0.05, &t), HN_OK);
        eta_l[i] = t.statistic;
        assert_int_equal(diag_kpss(y, 200, DIAG_KPSS_TREND, 0, 0.05, &t), HN_OK);
        eta_t[i] = t.statistic;
    }
    gsl_rng_free(r);
    gsl_sort(tau, 1, R);
    gsl_sort(eta_l, 1, R);
    gsl_sort(eta_t, 1, R);
    double q_tau = gsl_stats_quantile_from_sorted_data(tau, 1, R, 0.05);
    double q_l = gsl_stats_quantile_from_sorted_data(eta_l, 1, R, 0.95);
    double q_t = gsl_stats_quantile_from_sorted_data(eta_t, 1, R, 0.95);
    double cv;
    assert_int_equal(diag_adf_critical(DIAG_ADF_CONST, 0.05, T, &cv), HN_OK);
    printf("  tau 5%%: %.4f (MacKinnon C(%zu) %.4f); eta_mu 95%%: %.4f (0.463); eta_tau 95%%: %.4f (0.146)\n",
           q_tau, T, cv, q_l, q_t);
    assert_true(fabs(q_tau - cv) <= 0.08);
    assert_true(fabs(q_l - 0.463) <= 0.06);
    assert_true(fabs(q_t - 0.146) <= 0.02);
}

/* Simulated random walks and stationary AR(1) series (phi 0.5), n = 500,
 * 40 of each.  Both tests are at 5 %, so the pair errs now and then: for a
 * walk ADF wrongly rejects about 5 % of the time and KPSS with the l12
 * bandwidth has power of about 0.88 at n = 500 (measured here on 400
 * walks), so "difference" is expected for about 83 % of walks; for AR(1)
 * "no difference" for about 95 %.  Required: at least 28/40 and 34/40
 * (about 2.5 binomial sd below those rates). */
static void test_walk_and_ar1_classified(void **state)
{
    (void)state;
    enum { N = 500, R = 40 };
    double y[N];
    diag_unitroot u;
    int walk_ok = 0, ar_ok = 0;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    assert_non_null(r);
    gsl_rng_set(r, 20261201);
    for (int rep = 0; rep < R; rep++) {
        double s = 50.0;
        for (int j = 0; j < N; j++)
            y[j] = (s += gsl_ran_gaussian_ziggurat(r, 1.0));
        assert_int_equal(diag_unitroot_check(y, N, 0, 0.05, &u), HN_OK);
        walk_ok += u.difference == 1;
        if (rep == 0)
            printf("  walk: %s\n", u.conclusion);
        double a = 0.0;
        for (int j = -50; j < N; j++) {
            a = 0.5 * a + gsl_ran_gaussian_ziggurat(r, 1.0);
            if (j >= 0)
                y[j] = 10.0 + a;
        }
        assert_int_equal(diag_unitroot_check(y, N, 0, 0.05, &u), HN_OK);
        ar_ok += u.difference == 0;
        if (rep == 0)
            printf("  AR(1): %s\n", u.conclusion);
    }
    gsl_rng_free(r);
    printf("  random walks advised to difference: %d/%d; AR(1) advised not to: %d/%d\n",
           walk_ok, R, ar_ok, R);
    assert_true(walk_ok >= 28);
    assert_true(ar_ok >= 34);
}

/* p-values: inside the table they agree with the decision; at a critical
 * value they equal its level; outside they are clamped and flagged. */
static void test_p_values(void **state)
{
    (void)state;
    double y[300];
    diag_ur_test t;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    assert_non_null(r);
    gsl_rng_set(r, 7);
    int inside = 0;
    for (int rep = 0; rep < 200; rep++) {
        double a = 0.0;
        double phi = 0.80 + 0.001 * rep;
        for (int j = -50; j < 300; j++) {
            a = phi * a + gsl_ran_gaussian_ziggurat(r, 1.0);
            if (j >= 0)
                y[j] = a;
        }
        for (int k = 0; k < 2; k++) {
            if (k == 0)
                assert_int_equal(diag_adf(y, 300, DIAG_ADF_CONST, -1, 0.05, &t), HN_OK);
            else
                assert_int_equal(diag_kpss(y, 300, DIAG_KPSS_LEVEL, -1, 0.05, &t), HN_OK);
            assert_true(t.p >= 0.01 && t.p <= 0.10);
            if (t.p_bound == 0) {
                inside++;
                assert_true(t.reject == (t.p < 0.05));
            } else if (t.p_bound < 0) {
                assert_true(t.p == 0.01 && t.reject);
            } else {
                assert_true(t.p == 0.10 && !t.reject);
            }
        }
    }
    gsl_rng_free(r);
    assert_true(inside > 20);
}

static void test_bad_input(void **state)
{
    (void)state;
    double y[40], cv;
    diag_ur_test t;
    diag_unitroot u;
    for (int i = 0; i < 40; i++)
        y[i] = i;
    assert_int_equal(diag_adf(y, 10, DIAG_ADF_CONST, -1, 0.05, &t), HN_ESHORT);
    assert_false(t.valid);
    assert_int_equal(diag_adf(y, 40, DIAG_ADF_CONST, -1, 0.02, &t), HN_EINVAL);
    assert_int_equal(diag_adf(y, 40, DIAG_ADF_CONST, 30, 0.05, &t), HN_ESHORT);
    assert_int_equal(diag_adf(y, 40, DIAG_ADF_CONST, 0, 0.05, &t), HN_ECONST);     /* exact line */
    assert_int_equal(diag_adf(y, 40, DIAG_ADF_CONST, 1, 0.05, &t), HN_ESINGULAR);  /* dy constant */
    assert_int_equal(diag_kpss(y, 5, DIAG_KPSS_LEVEL, -1, 0.05, &t), HN_ESHORT);
    assert_int_equal(diag_kpss(y, 40, DIAG_KPSS_TREND, -1, 0.05, &t), HN_ECONST);
    assert_int_equal(diag_adf_critical(DIAG_ADF_NCASE, 0.05, 100, &cv), HN_EINVAL);
    assert_int_equal(diag_unitroot_check(y, 10, 0, 0.05, &u), HN_ESHORT);
    assert_int_equal(u.difference, -1);
    assert_int_equal(diag_kpss_bandwidth(100), 12);
    assert_int_equal(diag_adf_maxlag(100, DIAG_ADF_CONST), 12);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_adf_constants_match_table),
        cmocka_unit_test(test_kpss_constants_match_table),
        cmocka_unit_test(test_adf_critical_vs_fuller),
        cmocka_unit_test(test_statistics_vs_numpy),
        cmocka_unit_test(test_lag_rule_vs_numpy),
        cmocka_unit_test(test_null_quantiles),
        cmocka_unit_test(test_walk_and_ar1_classified),
        cmocka_unit_test(test_p_values),
        cmocka_unit_test(test_bad_input),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
