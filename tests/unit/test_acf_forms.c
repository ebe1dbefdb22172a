/* test_acf_forms.c - the ACF-taking forms of Ljung-Box, Box-Pierce, McLeod-Li and the cumulative periodogram. */
#include "testutil.h"
#include "diag_battery.h"
#include "diag_checks.h"
#include "diag_stats.h"
#include "hn_status.h"

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

#include <string.h>

/* Read column COL of REL under the reference directory into *X. */
static size_t ref_column(const char *ref, const char *rel, int col, double **x)
{
    char path[4096];
    int w = snprintf(path, sizeof path, "%s/%s", ref, rel);
    assert_true(w > 0 && (size_t)w < sizeof path);
    size_t n = tu_read_column(path, col, x);
    assert_true(n > 0);
    return n;
}

/* Two results of one check must agree in every field the battery reports. */
static void same_test(const diag_test *a, const diag_test *b)
{
    assert_string_equal(a->name, b->name);
    assert_int_equal(a->valid, b->valid);
    assert_int_equal(a->pass, b->pass);
    assert_memory_equal(&a->statistic, &b->statistic, sizeof a->statistic);
    assert_memory_equal(&a->df, &b->df, sizeof a->df);
    assert_memory_equal(&a->p, &b->p, sizeof a->p);
    assert_memory_equal(&a->effect, &b->effect, sizeof a->effect);
    assert_string_equal(a->detail, b->detail);
}

/* Series F (n = 70): the ACF the forms are given is diag_acf's, which must
 * first reproduce the e-Handbook's published ACF (lags 1-35, 9 decimals;
 * reference/box-jenkins-series-f/ehandbook_acf_lags1to35.csv); then each
 * form given that ACF must report exactly what the X-taking form reports. */
static void test_series_f(void **state)
{
    (void)state;
    TU_NEED_REF(ref);
    double *y = NULL, *want = NULL;
    size_t n = ref_column(ref, "box-jenkins-series-f/series_f.csv", 1, &y);
    assert_int_equal(n, 70);
    size_t nw = ref_column(ref, "box-jenkins-series-f/ehandbook_acf_lags1to35.csv", 1, &want);
    assert_int_equal(nw, 35);
    int top = 20;
    assert_true(diag_acf_is_direct(n, top));
    double acf[20];
    assert_int_equal(diag_acf(y, n, top, acf), HN_OK);
    for (int k = 0; k < top; k++)
        TU_NEAR(acf[k], want[k], 6e-10);   /* half a unit in the 9th decimal */

    diag_test a, b;
    for (int m = 1; m <= top; m++) {
        for (int adj = 0; adj < 3 && adj < m; adj++) {
            assert_int_equal(diag_ljung_box(y, n, m, adj, 0.05, &a), HN_OK);
            assert_int_equal(diag_ljung_box_acf(acf, top, n, m, adj, 0.05, &b), HN_OK);
            same_test(&a, &b);
            assert_int_equal(diag_box_pierce(y, n, m, adj, 0.05, &a), HN_OK);
            assert_int_equal(diag_box_pierce_acf(acf, top, n, m, adj, 0.05, &b), HN_OK);
            same_test(&a, &b);
        }
    }
    assert_int_equal(diag_cum_periodogram(y, n, 0.05, &a), HN_OK);
    assert_int_equal(diag_cum_periodogram_acf(y, n, acf, top, 0.05, &b), HN_OK);
    same_test(&a, &b);

    /* Refusals: too few lags given, and the usual argument checks first. */
    assert_int_equal(diag_ljung_box_acf(acf, 5, n, 10, 0, 0.05, &b), HN_EINVAL);
    assert_int_equal(b.valid, 0);
    assert_int_equal(diag_box_pierce_acf(acf, top, n, 3, 3, 0.05, &b), HN_EINVAL);
    assert_int_equal(diag_ljung_box_acf(acf, top, 2, 1, 0, 0.05, &b), HN_ESHORT);
    free(y);
    free(want);
}

/* DM/BP returns (n = 1974, reference/bollerslev-ghysels-dmbp): McLeod-Li
 * from the ACF of the squares equals the X-taking form; the returns show
 * strong volatility clustering (common practice for daily exchange rates),
 * so the test must reject at 5%. */
static void test_dmbp_squares(void **state)
{
    (void)state;
    TU_NEED_REF(ref);
    double *r = NULL;
    size_t n = ref_column(ref, "bollerslev-ghysels-dmbp/dmbp_returns.csv", 1, &r);
    assert_int_equal(n, 1974);
    double *sq = malloc(n * sizeof *sq), acf2[30];
    assert_non_null(sq);
    for (size_t i = 0; i < n; i++)
        sq[i] = r[i] * r[i];
    assert_true(diag_acf_is_direct(n, 30));
    assert_int_equal(diag_acf(sq, n, 30, acf2), HN_OK);
    diag_test a, b;
    for (int m = 1; m <= 30; m++) {
        assert_int_equal(diag_mcleod_li(r, n, m, 0.05, &a), HN_OK);
        assert_int_equal(diag_mcleod_li_acf(acf2, 30, n, m, 0.05, &b), HN_OK);
        same_test(&a, &b);
    }
    assert_int_equal(a.pass, 0);
    assert_int_equal(diag_mcleod_li_acf(acf2, 9, n, 10, 0.05, &b), HN_EINVAL);
    assert_int_equal(diag_mcleod_li_acf(acf2, 30, 11, 10, 0.05, &b), HN_ESHORT);
    free(sq);
    free(r);
}

/* The forms from the battery's shared pieces (centred copy, its sum of
 * squares, mean and sd) report exactly what the X-taking forms report, on
 * Gaussian data with a level and odd and even lengths (GSL mt19937 seed 9). */
static void test_shared_pieces(void **state)
{
    (void)state;
    const size_t ns[3] = { 1001, 4096, 50001 };
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 9UL);
    for (int s = 0; s < 3; s++) {
        size_t n = ns[s];
        double *x = malloc(n * sizeof *x), *d = malloc(n * sizeof *d), ss0, mean, sd;
        double acf[20], acf2[20];
        assert_non_null(x);
        assert_non_null(d);
        for (size_t i = 0; i < n; i++)
            x[i] = 100.0 + gsl_ran_gaussian(r, 1.0);
        assert_int_equal(diag_center_ss(x, n, d, &ss0), HN_OK);
        assert_int_equal(diag_acf_direct(x, n, 20, acf), HN_OK);
        assert_int_equal(diag_acf_centred(d, n, ss0, 20, acf2), HN_OK);
        assert_memory_equal(acf, acf2, sizeof acf);
        diag_test a, b;
        double sa, ka, sb, kb;
        assert_int_equal(diag_cum_periodogram(x, n, 0.05, &a), HN_OK);
        assert_int_equal(diag_cum_periodogram_centred(x, d, n, acf, 20, 0.05, &b), HN_OK);
        same_test(&a, &b);
        assert_int_equal(diag_jarque_bera(x, n, 0.05, &a, &sa, &ka), HN_OK);
        assert_int_equal(diag_jarque_bera_centred(d, n, 0.05, &b, &sb, &kb), HN_OK);
        same_test(&a, &b);
        assert_memory_equal(&sa, &sb, sizeof sa);
        assert_memory_equal(&ka, &kb, sizeof ka);
        assert_int_equal(diag_mean_sd(x, n, &mean, &sd), HN_OK);
        assert_int_equal(diag_mean_ttest(x, n, 0.05, &a), HN_OK);
        assert_int_equal(diag_mean_ttest_from(mean, sd, n, 0.05, &b), HN_OK);
        same_test(&a, &b);
        free(x);
        free(d);
    }
    gsl_rng_free(r);
}

/* The sums formed on the way (squares and deviations never stored) give
 * the digits of the same sums over stored copies: the ACF of the squares,
 * the lag sums of either route (up to 64 lags in one pass, beyond that a
 * centred copy), and the battery's McLeod-Li and ARCH-LM (from the
 * squares' shared sums) against the checks run alone.  Gaussian data with
 * a level, GARCH-like data, odd and even lengths including ones shorter
 * than a block of 64 (GSL mt19937 seed 13). */
static void test_streamed_sums(void **state)
{
    (void)state;
    const size_t ns[6] = { 9, 63, 65, 1001, 4096, 50001 };
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 13UL);
    for (int s = 0; s < 6; s++)
        for (int kind = 0; kind < 2; kind++) {
            size_t n = ns[s];
            double *x = malloc(n * sizeof *x), *sq = malloc(n * sizeof *sq), h = 1.0, e = 0.0;
            assert_non_null(x);
            assert_non_null(sq);
            for (size_t i = 0; i < n; i++) {
                h = 0.1 + 0.2 * e * e + 0.7 * h;
                e = sqrt(h) * gsl_ran_gaussian(r, 1.0);
                x[i] = kind ? e : 5.0 + gsl_ran_gaussian(r, 1.0);
                sq[i] = x[i] * x[i];
            }
            int top = n > 21 ? 20 : (int)n - 1;
            double a1[20], a2[20];
            assert_int_equal(diag_acf_sq(x, n, top, a1), HN_OK);
            assert_int_equal(diag_acf(sq, n, top, a2), HN_OK);
            assert_memory_equal(a1, a2, (size_t)top * sizeof *a1);
            if (n > 80) {
                /* lag k's sum is the same on both routes */
                diag_lag_sums s1, s2;
                double l1[70], l2[10];
                assert_int_equal(diag_lag_sums_of(x, n, 1, 70, &s1, l1), HN_OK);
                assert_int_equal(diag_lag_sums_of(x, n, 1, 10, &s2, l2), HN_OK);
                assert_memory_equal(l1, l2, sizeof l2);
                assert_memory_equal(&s1, &s2, sizeof s1);
            }
            if (n >= 1001) {
                diag_battery b;
                diag_options o = diag_default_options();
                diag_test t;
                assert_int_equal(diag_battery_run(x, n, &o, &b), HN_OK);
                for (int i = 0; i < b.ntests; i++) {
                    if (strcmp(b.tests[i].name, "mcleod-li") == 0) {
                        assert_int_equal(diag_mcleod_li(x, n, b.m, 0.05, &t), HN_OK);
                    } else if (strcmp(b.tests[i].name, "arch-lm") == 0) {
                        assert_int_equal(diag_arch_lm(x, n, 5, 0.05, &t), HN_OK);
                    } else {
                        continue;
                    }
                    /* the battery replaces the effect by its practical size */
                    t.effect = b.tests[i].effect;
                    same_test(&t, &b.tests[i]);
                }
                diag_battery_free(&b);
            }
            free(x);
            free(sq);
        }
    gsl_rng_free(r);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_series_f),
        cmocka_unit_test(test_shared_pieces),
        cmocka_unit_test(test_dmbp_squares),
        cmocka_unit_test(test_streamed_sums),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
