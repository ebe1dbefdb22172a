/* test_arma_pass.c - the register-held ARMA passes against the ring-buffer passes, bit for bit. */
#include "testutil.h"
#include "fit.h"
#include "fit_arma.h"
#include "fit_arma_pass.h"
#include "fit_sim.h"
#include "fit_spec.h"
#include "hn_status.h"

#include <omp.h>

static fit_spec spec_of(const char *text)
{
    fit_spec s;
    char err[128];
    int rc = fit_spec_parse(text, &s, err, sizeof err, NULL);
    if (rc != HN_OK)
        print_error("spec '%s': %s\n", text, err);
    assert_int_equal(rc, HN_OK);
    return s;
}

static unsigned next(unsigned *st)
{
    *st = *st * 1103515245u + 12345u;
    return *st >> 8;
}

/* Every spec the register passes cover, each beside the same model with one
 * more MA term, at lag q + 2 with coefficient zero: an MA lag that is not
 * the next one sends that spec down the ring-buffer passes, and a zero
 * coefficient changes no operation's result (x - 0 * y = x), so E, DE, SSR,
 * the gradient, J'J and the Hessian of the covered parameters must agree
 * exactly, in every form of the pass.  Series: simulated ARMA(1,1), with a mean of 10^6 and at a
 * length just above the largest AR lag too. */
static void test_register_pass_matches_ring(void **state)
{
    (void)state;
    const char *specs[] = { "arma(0,0)", "ar(1)", "ar(2)", "ma(1)", "arma(1,1)", "arma(2,1)",
                            "arma(1,2)", "arma(2,2)", "ma(2)", "ar(1) nomean",
                            "arma(2,1) nomean", "arma(1,1) nomean" };
    const size_t nmax = 1001;
    double *y = malloc(nmax * sizeof *y), *ybig = malloc(nmax * sizeof *ybig);
    assert_non_null(y);
    assert_non_null(ybig);
    fit_spec gen = spec_of("arma(1,1)");
    double gp[] = { 0.7, 0.5, 0.3, 1.5 };
    assert_int_equal(fit_simulate(&gen, gp, nmax, 50, 23, y), HN_OK);
    for (size_t t = 0; t < nmax; t++)
        ybig[t] = y[t] + 1e6;
    unsigned st = 99u;
    for (size_t si = 0; si < sizeof specs / sizeof *specs; si++) {
        fit_spec a = spec_of(specs[si]), b = a;
        assert_true(fit_arma_pass_covers(&a));
        b.ma_lag[b.n_ma++] = a.n_ma + 2;
        assert_false(fit_arma_pass_covers(&b));
        const int na = fit_arma_nmean(&a), nb = na + 1, off = a.mean ? 1 : 0;
        const size_t p = (size_t)fit_spec_max_ar(&a);
        fit_arma_ws *wa = fit_arma_ws_alloc(&a), *wb = fit_arma_ws_alloc(&b);
        assert_non_null(wa);
        assert_non_null(wb);
        double *ea = malloc(nmax * sizeof *ea), *eb = malloc(nmax * sizeof *eb);
        double *da = malloc(nmax * (size_t)nb * sizeof *da), *db = malloc(nmax * (size_t)nb * sizeof *db);
        for (int trial = 0; trial < 4; trial++) {
            const size_t n = trial == 3 ? p + 2 : nmax - (size_t)trial * 250;
            const double *yy = trial == 1 ? ybig : y;
            double x[FIT_MAX_PARAMS];
            if (off)
                x[0] = (trial == 1 ? 1e6 : 0.0) + 0.5 + (double)(next(&st) % 1000) / 1000.0;
            for (int k = off; k < na; k++)
                x[k] = 0.8 * ((double)(next(&st) % 1000) / 1000.0 - 0.5);
            x[na] = 0.0;
            double sa, sb, ga[FIT_MAX_PARAMS], gb[FIT_MAX_PARAMS];
            double Ja[FIT_MAX_PARAMS * FIT_MAX_PARAMS], Jb[FIT_MAX_PARAMS * FIT_MAX_PARAMS];
            double Ha[FIT_MAX_PARAMS * FIT_MAX_PARAMS], Hb[FIT_MAX_PARAMS * FIT_MAX_PARAMS];
            assert_int_equal(fit_arma_resid(wa, yy, n, x, ea, da, &sa, ga), HN_OK);
            assert_int_equal(fit_arma_resid(wb, yy, n, x, eb, db, &sb, gb), HN_OK);
            assert_true(sa == sb);
            for (size_t t = 0; t < n - p; t++) {
                assert_true(ea[t] == eb[t]);
                for (int k = 0; k < na; k++)
                    assert_true(da[t * (size_t)na + (size_t)k] == db[t * (size_t)nb + (size_t)k]);
            }
            for (int k = 0; k < na; k++)
                assert_true(ga[k] == gb[k]);
            assert_int_equal(fit_arma_hessian(wa, yy, n, x, &sa, ga, Ha, Ja), HN_OK);
            assert_int_equal(fit_arma_hessian(wb, yy, n, x, &sb, gb, Hb, Jb), HN_OK);
            assert_true(sa == sb);
            for (int k = 0; k < na; k++) {
                assert_true(ga[k] == gb[k]);
                for (int l = 0; l < na; l++) {
                    if (!(Ha[k * na + l] == Hb[k * nb + l]) || !(Ja[k * na + l] == Jb[k * nb + l]))
                        fail_msg("%s n = %zu: H[%d][%d] %.17g vs %.17g, J'J %.17g vs %.17g",
                                 specs[si], n, k, l, Ha[k * na + l], Hb[k * nb + l],
                                 Ja[k * na + l], Jb[k * nb + l]);
                }
            }
            /* the Gauss-Newton form of the pass (J'J without the Hessian) */
            assert_int_equal(fit_arma_pass(&a, yy, n, x, NULL, NULL, &sa, ga, Ja, NULL), HN_OK);
            assert_true(sa == sb);
            for (int k = 0; k < na; k++) {
                assert_true(ga[k] == gb[k]);
                for (int l = 0; l < na; l++)
                    assert_true(Ja[k * na + l] == Jb[k * nb + l]);
            }
        }
        free(ea);
        free(eb);
        free(da);
        free(db);
        fit_arma_ws_free(wa);
        fit_arma_ws_free(wb);
    }
    free(y);
    free(ybig);
}

/* A series of 65536 residuals or more is summed as two stretches, the
 * second on its own thread from a state recovered by warming up.  On one
 * thread or two: the same bits everywhere.  Against the ring-buffer pass,
 * which runs the recursion once from the start: the residuals and their
 * derivatives the same bits (the recovered state is the true one), the
 * sums equal but for their order of addition.  MA parts: none, a fast
 * real root, a complex pair, and one so slow (0.9995) that no warm-up is
 * tried.  Series: simulated ARMA(1,1), seed 31. */
static void test_two_stretches(void **state)
{
    (void)state;
    const size_t n = 150001;
    double *y = malloc(n * sizeof *y);
    assert_non_null(y);
    fit_spec gen = spec_of("arma(1,1)");
    double gp[] = { 0.2, 0.6, 0.3, 1.0 };
    assert_int_equal(fit_simulate(&gen, gp, n, 50, 31, y), HN_OK);
    static const struct { const char *spec; double x[5]; } cases[] = {
        { "arma(2,1)", { 0.2, 0.5, 0.1, 0.4 } },
        { "ar(2)", { 0.1, 0.6, -0.1 } },
        { "arma(1,2)", { 0.2, 0.6, 0.5, 0.7 } },      /* z^2 + 0.5 z + 0.7: |z| = 0.84 */
        { "ma(2)", { 0.0, -0.3, -0.4 } },             /* real roots 0.8 and -0.5 */
        { "arma(1,1) nomean", { 0.6, 0.9995 } },
    };
    for (size_t c = 0; c < sizeof cases / sizeof *cases; c++) {
        fit_spec a = spec_of(cases[c].spec), b = a;
        b.ma_lag[b.n_ma++] = a.n_ma + 2;
        const int na = fit_arma_nmean(&a), nb = na + 1;
        const size_t p = (size_t)fit_spec_max_ar(&a), N = n - p;
        double x[FIT_MAX_PARAMS];
        memcpy(x, cases[c].x, (size_t)na * sizeof *x);
        x[na] = 0.0;
        double *e[3], *de[3];
        double ssr[3], g[3][FIT_MAX_PARAMS], J[3][FIT_MAX_PARAMS * FIT_MAX_PARAMS];
        double H[3][FIT_MAX_PARAMS * FIT_MAX_PARAMS];
        for (int k = 0; k < 3; k++) {
            e[k] = malloc(N * sizeof *e[k]);
            de[k] = malloc(N * (size_t)nb * sizeof *de[k]);
            assert_non_null(e[k]);
            assert_non_null(de[k]);
        }
        for (int t = 0; t < 2; t++) {             /* the register pass, 1 and 2 threads */
            omp_set_num_threads(t + 1);
            assert_int_equal(fit_arma_pass(&a, y, n, x, e[t], de[t], &ssr[t], g[t], J[t], NULL),
                             HN_OK);
            double s2, g2[FIT_MAX_PARAMS], J2[FIT_MAX_PARAMS * FIT_MAX_PARAMS];
            assert_int_equal(fit_arma_pass(&a, y, n, x, NULL, NULL, &s2, g2, J2, H[t]), HN_OK);
            assert_memory_equal(&s2, &ssr[t], sizeof s2);
            assert_memory_equal(g2, g[t], (size_t)na * sizeof *g2);
            assert_memory_equal(J2, J[t], (size_t)(na * na) * sizeof *J2);
        }
        omp_set_num_threads(omp_get_num_procs());
        assert_memory_equal(e[0], e[1], N * sizeof *e[0]);
        assert_memory_equal(de[0], de[1], N * (size_t)na * sizeof *de[0]);
        assert_memory_equal(&ssr[0], &ssr[1], sizeof ssr[0]);
        assert_memory_equal(g[0], g[1], (size_t)na * sizeof g[0][0]);
        assert_memory_equal(J[0], J[1], (size_t)(na * na) * sizeof J[0][0]);
        assert_memory_equal(H[0], H[1], (size_t)(na * na) * sizeof H[0][0]);

        /* the ring-buffer pass over the whole series at once */
        fit_arma_ws *wb = fit_arma_ws_alloc(&b);
        assert_non_null(wb);
        assert_int_equal(fit_arma_resid(wb, y, n, x, e[2], de[2], &ssr[2], g[2]), HN_OK);
        double s2;
        assert_int_equal(fit_arma_hessian(wb, y, n, x, &s2, g[2], H[2], J[2]), HN_OK);
        fit_arma_ws_free(wb);
        assert_memory_equal(e[0], e[2], N * sizeof *e[0]);
        for (size_t t = 0; t < N; t++)
            for (int k = 0; k < na; k++)
                if (!(de[0][t * (size_t)na + (size_t)k] == de[2][t * (size_t)nb + (size_t)k]))
                    fail_msg("%s: de[%zu][%d] %.17g vs %.17g", cases[c].spec, t, k,
                             de[0][t * (size_t)na + (size_t)k], de[2][t * (size_t)nb + (size_t)k]);
        TU_NEAR(ssr[0], ssr[2], 1e-13 * ssr[2]);
        for (int k = 0; k < na; k++) {
            const double gscale = sqrt(ssr[2] * J[2][k * nb + k]);   /* Cauchy-Schwarz bound */
            TU_NEAR(g[0][k], g[2][k], 1e-13 * gscale);
            for (int l = 0; l < na; l++) {
                const double js = sqrt(J[2][k * nb + k] * J[2][l * nb + l]);
                TU_NEAR(J[0][k * na + l], J[2][k * nb + l], 1e-13 * js);
                TU_NEAR(H[0][k * na + l], H[2][k * nb + l], 1e-12 * (js + fabs(H[2][k * nb + l])));
            }
        }
        for (int k = 0; k < 3; k++) {
            free(e[k]);
            free(de[k]);
        }
    }
    free(y);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_register_pass_matches_ring),
        cmocka_unit_test(test_two_stretches),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
