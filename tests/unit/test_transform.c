/* test_transform.c - log, differences, demeaning and Box-Cox on small hand-checkable
 * inputs (common practice), and the accurate mean against NIST StRD certified values. */
#include "testutil.h"

#include "fit_transform.h"
#include "hn_status.h"
#include "sh_csv.h"

static void test_log(void **state)
{
    (void)state;
    double y[3] = {1.0, exp(1.0), exp(2.0)}, out[3];
    size_t bad = 99;
    assert_int_equal(fit_tr_log(y, 3, out, &bad), HN_OK);
    TU_NEAR(out[0], 0.0, 0);
    TU_NEAR(out[1], 1.0, 1e-15);
    TU_NEAR(out[2], 2.0, 1e-15);

    double z[4] = {2.0, 3.0, 0.0, -1.0};
    assert_int_equal(fit_tr_log(z, 4, out, &bad), HN_EDOMAIN);
    assert_int_equal(bad, 2); /* the first value <= 0 */
    double w[2] = {-5.0, 1.0};
    assert_int_equal(fit_tr_log(w, 2, out, &bad), HN_EDOMAIN);
    assert_int_equal(bad, 0);
    double u[2] = {1.0, NAN};
    assert_int_equal(fit_tr_log(u, 2, out, &bad), HN_EINVAL);
    assert_int_equal(bad, 1);

    /* in place */
    double v[2] = {1.0, exp(3.0)};
    assert_int_equal(fit_tr_log(v, 2, v, NULL), HN_OK);
    TU_NEAR(v[1], 3.0, 1e-15);
}

static void test_diff(void **state)
{
    (void)state;
    double y[5] = {1, 4, 9, 16, 25}, out[5];
    size_t n = 0, bad;
    /* squares: first differences are the odd numbers, second-lag differences 8, 12, 16 */
    assert_int_equal(fit_tr_diff(y, 5, 1, out, &n, NULL), HN_OK);
    assert_int_equal(n, 4);
    assert_true(out[0] == 3 && out[1] == 5 && out[2] == 7 && out[3] == 9);
    assert_int_equal(fit_tr_diff(y, 5, 2, out, &n, NULL), HN_OK);
    assert_int_equal(n, 3);
    assert_true(out[0] == 8 && out[1] == 12 && out[2] == 16);
    assert_int_equal(fit_tr_diff(y, 5, 4, out, &n, NULL), HN_OK);
    assert_int_equal(n, 1);
    assert_true(out[0] == 24);
    assert_int_equal(fit_tr_diff(y, 5, 5, out, &n, NULL), HN_ESHORT);
    assert_int_equal(fit_tr_diff(y, 5, 0, out, &n, NULL), HN_EINVAL);

    /* twice in place: second differences of squares are 2 */
    assert_int_equal(fit_tr_diff(y, 5, 1, y, &n, NULL), HN_OK);
    assert_int_equal(fit_tr_diff(y, n, 1, y, &n, NULL), HN_OK);
    assert_int_equal(n, 3);
    assert_true(y[0] == 2 && y[1] == 2 && y[2] == 2);

    double z[3] = {1, INFINITY, 2};
    assert_int_equal(fit_tr_diff(z, 3, 1, out, &n, &bad), HN_EINVAL);
    assert_int_equal(bad, 1);
}

static void test_sdiff(void **state)
{
    (void)state;
    /* two "years" of four quarters with a fixed seasonal pattern plus 10 per year */
    double y[8] = {1, 5, 2, 7, 11, 15, 12, 17}, out[8];
    size_t n;
    assert_int_equal(fit_tr_sdiff(y, 8, 4, out, &n, NULL), HN_OK);
    assert_int_equal(n, 4);
    for (size_t i = 0; i < n; i++)
        assert_true(out[i] == 10);
    assert_int_equal(fit_tr_sdiff(y, 4, 4, out, &n, NULL), HN_ESHORT);
    assert_int_equal(fit_tr_sdiff(y, 8, 0, out, &n, NULL), HN_EINVAL);
}

static void test_demean(void **state)
{
    (void)state;
    double y[4] = {1, 2, 3, 4}, out[4], m;
    assert_int_equal(fit_tr_demean(y, 4, out, &m, NULL), HN_OK);
    assert_true(m == 2.5);
    assert_true(out[0] == -1.5 && out[1] == -0.5 && out[2] == 0.5 && out[3] == 1.5);
    assert_int_equal(fit_tr_demean(y, 0, out, &m, NULL), HN_ESHORT);

    /* cancellation: a plain left-to-right sum of 1e16, 1, -1e16, 1 gives 1 (the first 1
     * is lost), the exact sum is 2, so the mean is 0.5 */
    double c[4] = {1e16, 1.0, -1e16, 1.0};
    assert_int_equal(fit_tr_mean(c, 4, &m, NULL), HN_OK);
    assert_true(m == 0.5);

    /* values near the top of the double range: the sum overflows, the mean does not */
    double big[3] = {1.5e308, 1.5e308, 1.2e308};
    assert_int_equal(fit_tr_mean(big, 3, &m, NULL), HN_OK);
    TU_NEAR(m / 1e308, 1.4, 1e-15);

    size_t bad;
    double u[3] = {1.0, 2.0, NAN};
    assert_int_equal(fit_tr_mean(u, 3, &m, &bad), HN_EINVAL);
    assert_int_equal(bad, 2);
}

static void test_boxcox(void **state)
{
    (void)state;
    double y[3] = {4.0, 3.0, 2.0}, out[3];
    size_t bad;
    /* lambda 0.5 on 4: (2 - 1) / 0.5 = 2; on 3: 2(sqrt 3 - 1) */
    assert_int_equal(fit_tr_boxcox(y, 3, 0.5, out, NULL), HN_OK);
    TU_NEAR(out[0], 2.0, 1e-15);
    TU_NEAR(out[1], 2.0 * (sqrt(3.0) - 1.0), 1e-15);
    /* lambda 2 on 3: (9 - 1) / 2 = 4; lambda -1 on 2: (1/2 - 1) / -1 = 0.5; lambda 1: y - 1 */
    assert_int_equal(fit_tr_boxcox(y, 3, 2.0, out, NULL), HN_OK);
    TU_NEAR(out[1], 4.0, 1e-15);
    assert_int_equal(fit_tr_boxcox(y, 3, -1.0, out, NULL), HN_OK);
    TU_NEAR(out[2], 0.5, 1e-15);
    assert_int_equal(fit_tr_boxcox(y, 3, 1.0, out, NULL), HN_OK);
    TU_NEAR(out[0], 3.0, 1e-15);
    TU_NEAR(out[2], 1.0, 1e-15);
    /* lambda 0 is the log, and a tiny lambda is close to it (the limit) */
    assert_int_equal(fit_tr_boxcox(y, 3, 0.0, out, NULL), HN_OK);
    TU_NEAR(out[0], log(4.0), 1e-15);
    assert_int_equal(fit_tr_boxcox(y, 3, 1e-12, out, NULL), HN_OK);
    /* (y^l - 1)/l = log y + l (log y)^2 / 2 + ...: the second term is about 1e-12 */
    TU_NEAR(out[0], log(4.0) + 1e-12 * log(4.0) * log(4.0) / 2.0, 1e-15);

    double z[3] = {1.0, 0.0, 2.0};
    assert_int_equal(fit_tr_boxcox(z, 3, 0.5, out, &bad), HN_EDOMAIN);
    assert_int_equal(bad, 1);
    assert_int_equal(fit_tr_boxcox(y, 3, NAN, out, &bad), HN_EINVAL);
    double h[2] = {2.0, 1e10};
    assert_int_equal(fit_tr_boxcox(h, 2, 1000.0, out, &bad), HN_ENUMERIC);
    assert_int_equal(bad, 1);
}

static void test_inverses(void **state)
{
    (void)state;
    double y[6] = {3, 1, 4, 1, 5, 9}, d[6], back[6];
    size_t n;
    /* undoing a lag-2 difference from the first two values rebuilds the rest */
    assert_int_equal(fit_tr_diff(y, 6, 2, d, &n, NULL), HN_OK);
    assert_int_equal(fit_tr_undiff(d, n, y, 2, back), HN_OK);
    for (size_t i = 0; i < n; i++)
        assert_true(back[i] == y[i + 2]);
    /* forecasts of first differences 1, 2, 3 after a last value 10: 11, 13, 16 */
    double f[3] = {1, 2, 3}, last = 10, lv[3];
    assert_int_equal(fit_tr_undiff(f, 3, &last, 1, lv), HN_OK);
    assert_true(lv[0] == 11 && lv[1] == 13 && lv[2] == 16);
    assert_int_equal(fit_tr_undiff(f, 3, &last, 0, lv), HN_EINVAL);

    /* Box-Cox and back: lambda 0.5 maps 2 to 4 (hand check), and round trips */
    double z = 2.0, w;
    assert_int_equal(fit_tr_inv_boxcox(&z, 1, 0.5, &w, NULL), HN_OK);
    TU_NEAR(w, 4.0, 1e-15);
    static const double lambdas[5] = {-1.0, -0.3, 0.0, 0.5, 2.0};
    for (int k = 0; k < 5; k++) {
        assert_int_equal(fit_tr_boxcox(y, 6, lambdas[k], d, NULL), HN_OK);
        assert_int_equal(fit_tr_inv_boxcox(d, 6, lambdas[k], back, NULL), HN_OK);
        for (size_t i = 0; i < 6; i++)
            TU_NEAR(back[i], y[i], 1e-14);
    }
    /* lambda -1 maps onto z < 1 only: z = 1 has no inverse */
    double zz[2] = {0.5, 1.0};
    size_t bad;
    assert_int_equal(fit_tr_inv_boxcox(zz, 2, -1.0, back, &bad), HN_EDOMAIN);
    assert_int_equal(bad, 1);
    double big = 1000.0;
    assert_int_equal(fit_tr_inv_boxcox(&big, 1, 0.0, back, &bad), HN_ENUMERIC);
}

/* NIST StRD NumAcc3 / NumAcc4 / Michelso certified means (certified_values.csv),
 * read through the CSV loader. */
static void test_mean_strd(void **state)
{
    (void)state;
    TU_NEED_REF(ref);
    static const struct {
        const char *dir;
        size_t n;
        double mean;
        double min_lre;
    } sets[] = {
        {"NumAcc3", 1001, 1000000.2, 14.0},  /* certified exact */
        {"NumAcc4", 1001, 10000000.2, 14.0}, /* certified exact */
        {"Michelso", 100, 299.852400000000, 14.0},
        {"Lew", 200, -177.435000000000, 14.0},
    };
    for (size_t k = 0; k < sizeof sets / sizeof sets[0]; k++) {
        char path[4096];
        snprintf(path, sizeof path, "%s/nist-strd-univariate/%s/%s_data.csv", ref, sets[k].dir,
                 sets[k].dir);
        sh_data d;
        sh_error e;
        int rc = sh_csv_load(path, NULL, &d, &e);
        if (rc != HN_OK)
            print_error("%s\n", e.message);
        assert_int_equal(rc, HN_OK);
        assert_int_equal(d.n, sets[k].n);
        double m, *dm = malloc(d.n * sizeof *dm), m2;
        assert_non_null(dm);
        assert_int_equal(fit_tr_mean(d.y, d.n, &m, NULL), HN_OK);
        double lre = tu_lre(m, sets[k].mean);
        if (lre < sets[k].min_lre)
            print_error("%s mean %.17g, LRE %.1f\n", sets[k].dir, m, lre);
        assert_true(lre >= sets[k].min_lre);
        /* demeaned data have mean 0 to rounding of the data's size */
        assert_int_equal(fit_tr_demean(d.y, d.n, dm, &m2, NULL), HN_OK);
        assert_true(m2 == m);
        assert_int_equal(fit_tr_mean(dm, d.n, &m2, NULL), HN_OK);
        assert_true(fabs(m2) <= 1e-15 * fabs(sets[k].mean));
        free(dm);
        sh_data_free(&d);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_log),    cmocka_unit_test(test_diff),
        cmocka_unit_test(test_sdiff),  cmocka_unit_test(test_demean),
        cmocka_unit_test(test_boxcox), cmocka_unit_test(test_inverses),
        cmocka_unit_test(test_mean_strd),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
