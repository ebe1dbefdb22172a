/* test_fastpaths.c - the battery's fast routes against their definitions and a general-purpose least-squares solver. */
#include "testutil.h"
#include "diag_checks.h"
#include "hn_status.h"
#include "sh_csv.h"

#include <stdint.h>
#include <unistd.h>

#include <lapacke.h>

#include <gsl/gsl_multifit.h>
#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* The runs test's median (found by selection) against the median of a full
 * sort, through the number of runs about it (Wald-Wolfowitz: values equal to
 * the median dropped, runs of the signs of the rest; the definition, common
 * practice).  Data rounded to one decimal so that ties and values equal to
 * the median occur; odd and even lengths. */
static void test_runs_median_by_selection(void **state)
{
    (void)state;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 5UL);
    const size_t ns[4] = { 101, 100, 2001, 5000 };
    for (int s = 0; s < 4; s++) {
        size_t n = ns[s];
        double *x = malloc(n * sizeof *x), *c = malloc(n * sizeof *c);
        assert_non_null(x);
        assert_non_null(c);
        for (size_t i = 0; i < n; i++)
            x[i] = c[i] = round(10.0 * gsl_ran_gaussian(r, 1.0)) / 10.0;
        qsort(c, n, sizeof *c, cmp_double);
        /* + 0.0: the median of data holding both zeros is printed as 0 */
        double med = (n % 2 ? c[n / 2] : 0.5 * (c[n / 2 - 1] + c[n / 2])) + 0.0;
        size_t runs = 0;
        int prev = 0;
        for (size_t i = 0; i < n; i++) {
            int sign = x[i] > med ? 1 : x[i] < med ? -1 : 0;
            if (sign == 0)
                continue;
            if (sign != prev)
                runs++;
            prev = sign;
        }
        diag_test t;
        assert_int_equal(diag_runs_test(x, n, 0.05, &t), HN_OK);
        char want[64];
        snprintf(want, sizeof want, "%zu runs about the median %.6g ", runs, med);
        if (strncmp(t.detail, want, strlen(want)) != 0)
            fail_msg("n = %zu: detail '%s', want it to start '%s'", n, t.detail, want);
        free(x);
        free(c);
    }
    gsl_rng_free(r);
}

/* ARCH-LM's R^2 (centred normal equations with one refinement step) against
 * GSL 2.7.1's gsl_multifit_linear (an SVD least-squares solver) on the same
 * regression of x_t^2 on a constant and 5 of its lags, for GARCH(1,1) data
 * with strong clustering (omega 0.05, alpha 0.15, beta 0.8; GSL mt19937
 * seed 11), n = 20000 and 2000. */
static void test_arch_lm_against_svd(void **state)
{
    (void)state;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 11UL);
    const size_t ns[2] = { 20000, 2000 };
    const size_t q = 5;
    for (int s = 0; s < 2; s++) {
        size_t n = ns[s], rows = n - q;
        double *x = malloc(n * sizeof *x);
        assert_non_null(x);
        double h = 1.0, e = 0.0;
        for (size_t t = 0; t < n; t++) {
            h = 0.05 + 0.15 * e * e + 0.8 * h;
            e = sqrt(h) * gsl_ran_gaussian(r, 1.0);
            x[t] = e;
        }
        gsl_matrix *X = gsl_matrix_alloc(rows, q + 1);
        gsl_vector *y = gsl_vector_alloc(rows), *b = gsl_vector_alloc(q + 1);
        gsl_matrix *cov = gsl_matrix_alloc(q + 1, q + 1);
        gsl_multifit_linear_workspace *w = gsl_multifit_linear_alloc(rows, q + 1);
        for (size_t i = 0; i < rows; i++) {
            size_t t = i + q;
            gsl_vector_set(y, i, x[t] * x[t]);
            gsl_matrix_set(X, i, 0, 1.0);
            for (size_t j = 1; j <= q; j++)
                gsl_matrix_set(X, i, j, x[t - j] * x[t - j]);
        }
        double chisq, ym = 0.0, sst = 0.0;
        assert_int_equal(gsl_multifit_linear(X, y, b, cov, &chisq, w), 0);
        for (size_t i = 0; i < rows; i++)
            ym += gsl_vector_get(y, i);
        ym /= (double)rows;
        for (size_t i = 0; i < rows; i++)
            sst += (gsl_vector_get(y, i) - ym) * (gsl_vector_get(y, i) - ym);
        double r2 = 1.0 - chisq / sst;
        diag_test t;
        assert_int_equal(diag_arch_lm(x, n, (int)q, 0.05, &t), HN_OK);
        if (!(tu_lre(t.effect, r2) >= 9.0) || !(tu_lre(t.statistic, (double)rows * r2) >= 9.0))
            fail_msg("n = %zu: R^2 %.17g, SVD %.17g; statistic %.17g", n, t.effect, r2, t.statistic);
        gsl_multifit_linear_free(w);
        gsl_matrix_free(X);
        gsl_matrix_free(cov);
        gsl_vector_free(y);
        gsl_vector_free(b);
        free(x);
    }
    gsl_rng_free(r);
}

/* ARCH-LM's R^2 (cross-products from the lagged sums of the whole series'
 * centred squares, or by direct sums when an end value dominates) against
 * a plain least-squares fit of the regression as defined: y_t = x_t^2 on a
 * constant and y_{t-1..t-q} over t = q..n-1, solved by LAPACKE_dgels (QR),
 * R^2 = sum (fit - mean y)^2 / sum (y - mean y)^2.  Gaussian, GARCH(1,1)
 * and Student-t(3)-like data, a level of 30 (large mean of the squares),
 * and single large values first, last and in the middle; q = 1, 5, 8;
 * n = 60, 201 and 5000 (GSL mt19937 seed 21). */
static void test_arch_lm_against_lstsq(void **state)
{
    (void)state;
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 21UL);
    const size_t ns[3] = { 60, 201, 5000 };
    const int qs[3] = { 1, 5, 8 };
    for (int s = 0; s < 3; s++)
        for (int kind = 0; kind < 7; kind++) {
            size_t n = ns[s];
            double *x = malloc(n * sizeof *x), h = 1.0, e = 0.0;
            assert_non_null(x);
            for (size_t t = 0; t < n; t++) {
                double z = gsl_ran_gaussian(r, 1.0);
                if (kind == 1) {
                    h = 0.05 + 0.15 * e * e + 0.8 * h;
                    e = sqrt(h) * z;
                    z = e;
                } else if (kind == 2) {
                    z = gsl_ran_tdist(r, 3.0);
                } else if (kind == 3) {
                    z += 30.0;
                }
                x[t] = z;
            }
            if (kind == 4)
                x[0] = 300.0;
            if (kind == 5)
                x[n - 1] = -300.0;
            if (kind == 6)
                x[n / 2] = 300.0;
            for (int iq = 0; iq < 3; iq++) {
                size_t q = (size_t)qs[iq], rows = n - q, p = q + 1;
                double *X = malloc(rows * p * sizeof *X), *y = malloc(rows * sizeof *y);
                assert_non_null(X);
                assert_non_null(y);
                for (size_t i = 0; i < rows; i++) {
                    size_t t = i + q;
                    y[i] = x[t] * x[t];
                    X[i * p] = 1.0;
                    for (size_t j = 1; j <= q; j++)
                        X[i * p + j] = x[t - j] * x[t - j];
                }
                double *b = malloc(rows * sizeof *b), ym = 0.0, sst = 0.0, ess = 0.0;
                assert_non_null(b);
                memcpy(b, y, rows * sizeof *b);
                double *Xc = malloc(rows * p * sizeof *Xc);
                assert_non_null(Xc);
                memcpy(Xc, X, rows * p * sizeof *Xc);
                assert_int_equal(LAPACKE_dgels(LAPACK_ROW_MAJOR, 'N', (lapack_int)rows, (lapack_int)p, 1,
                                               Xc, (lapack_int)p, b, 1), 0);
                for (size_t i = 0; i < rows; i++)
                    ym += y[i];
                ym /= (double)rows;
                for (size_t i = 0; i < rows; i++) {
                    double fit = 0.0;
                    for (size_t j = 0; j < p; j++)
                        fit += X[i * p + j] * b[j];
                    sst += (y[i] - ym) * (y[i] - ym);
                    ess += (fit - ym) * (fit - ym);
                }
                double r2 = ess / sst;
                diag_test t;
                assert_int_equal(diag_arch_lm(x, n, (int)q, 0.05, &t), HN_OK);
                if (!(tu_lre(t.effect, r2) >= 9.0) || !(tu_lre(t.statistic, (double)rows * r2) >= 9.0))
                    fail_msg("n = %zu, kind %d, q = %zu: R^2 %.17g, least squares %.17g", n, kind, q,
                             t.effect, r2);
                free(X);
                free(Xc);
                free(y);
                free(b);
            }
            free(x);
        }
    gsl_rng_free(r);
}

/* The CSV reader's decimal fast paths against the C library's strtod (glibc,
 * correctly rounded), bit for bit: 300000 random decimals of 1 to 19
 * significant digits with the point anywhere and exponents from -30 to 30
 * (GSL mt19937 seed 3), plus numbers that lie exactly half-way between two
 * doubles, where extended precision alone would round twice. */
static void test_csv_numbers_against_strtod(void **state)
{
    (void)state;
    static const char *const halfway[] = { "9007199254740993", "-9007199254740995",
                                           "90071992547409930e-1", "0.9007199254740993e16",
                                           "18014398509481985", "1152921504606846977" };
    const size_t nh = sizeof halfway / sizeof halfway[0], nr = 300000, n = nh + nr;
    char path[] = "/tmp/hone-test-numbers-XXXXXX";
    int fd = mkstemp(path);
    assert_true(fd >= 0);
    FILE *f = fdopen(fd, "w");
    assert_non_null(f);
    char (*text)[48] = malloc(n * sizeof *text);
    assert_non_null(text);
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 3UL);
    fputs("x\n", f);
    for (size_t i = 0; i < n; i++) {
        if (i < nh) {
            snprintf(text[i], sizeof text[i], "%s", halfway[i]);
        } else {
            int nd = 1 + (int)gsl_rng_uniform_int(r, 19), point = (int)gsl_rng_uniform_int(r, (unsigned long)nd + 1);
            size_t o = 0;
            if (gsl_rng_uniform(r) < 0.5)
                text[i][o++] = '-';
            for (int k = 0; k < nd; k++) {
                if (k == point && k > 0)
                    text[i][o++] = '.';
                text[i][o++] = (char)('0' + (k == 0 ? 1 + gsl_rng_uniform_int(r, 9) : gsl_rng_uniform_int(r, 10)));
            }
            text[i][o] = '\0';
            if (gsl_rng_uniform(r) < 0.5)
                snprintf(text[i] + o, sizeof text[i] - o, "e%d", (int)gsl_rng_uniform_int(r, 61) - 30);
        }
        fprintf(f, "%s\n", text[i]);
    }
    fclose(f);
    sh_data d;
    sh_error e;
    int rc = sh_csv_load(path, NULL, &d, &e);
    unlink(path);
    assert_int_equal(rc, HN_OK);
    assert_int_equal(d.n, n);
    size_t bad = 0;
    for (size_t i = 0; i < n; i++) {
        double want = strtod(text[i], NULL);
        if (memcmp(&want, &d.y[i], sizeof want) != 0 && bad++ < 5)
            print_error("%s: read %.17g, strtod %.17g\n", text[i], d.y[i], want);
    }
    assert_int_equal(bad, 0);
    sh_data_free(&d);
    free(text);
    gsl_rng_free(r);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_runs_median_by_selection),
        cmocka_unit_test(test_arch_lm_against_svd),
        cmocka_unit_test(test_arch_lm_against_lstsq),
        cmocka_unit_test(test_csv_numbers_against_strtod),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
