/* test_refine.c - refine on simulated series of known structure, its budget, and scan's threaded = serial results.
 *
 * Series come from fit_simulate (GSL mt19937, recipe in fit/fit_sim.h) with
 * the seeds recorded below.  A draw succeeds when refine, started from a
 * constant mean, ends on a model that holds every true term (AR and MA lags,
 * the GARCH part, Student-t) and whose residuals pass the battery.  The
 * required rate is 90 % (the project's requirement).  HONE_LONG_TESTS=1
 * runs 200 seeds per structure and asserts the 90 % itself.  The default
 * run uses 30 seeds (the suite stays fast) and asserts 80 %, i.e. at least
 * 24 of 30: were the true rate exactly 90 %, 23 or fewer successes would
 * have binomial probability 0.026 (scipy 1.10.1, binom.cdf(23, 30, 0.9) =
 * 0.025826788661909846), so the short run flags a rate well below 90 %
 * without being a coin toss on a good one.  The seeds are fixed, so either
 * run gives the same answer every time. */
#include "testutil.h"

#include <omp.h>

#include "fit.h"
#include "fit_sim.h"
#include "hn_status.h"
#include "sh_refine.h"
#include "sh_scan.h"
#include "sh_session.h"

static int long_run(void)
{
    const char *v = getenv("HONE_LONG_TESTS");
    return v && !strcmp(v, "1");
}

static fit_spec spec_of(const char *text)
{
    fit_spec s;
    char err[128];
    assert_int_equal(fit_spec_parse(text, &s, err, sizeof err, NULL), HN_OK);
    return s;
}

/* A session holding Y (copied) with model 1 = arma(0,0). */
static void session_with(sh_session *s, const double *y, size_t n, int season)
{
    sh_session_init(s);
    s->loaded = 1;
    snprintf(s->path, sizeof s->path, "simulated");
    s->season = season;
    double *c = malloc(n * sizeof *c);
    assert_non_null(c);
    memcpy(c, y, n * sizeof *c);
    sh_set_series(s, c, n);
    fit_spec start = fit_spec_default();
    int id;
    assert_int_equal(sh_fit_and_check(s, &start, 0, "start", &id), HN_OK);
    assert_int_equal(id, 1);
}

/* 1 when every lag of A's part is also in B's. */
static int holds(const int *want, int nw, const int *have, int nh)
{
    for (int i = 0; i < nw; i++) {
        int found = 0;
        for (int j = 0; j < nh; j++)
            found |= have[j] == want[i];
        if (!found)
            return 0;
    }
    return 1;
}

typedef struct {
    const char *name;
    const char *spec;         /* the true model */
    double par[12];           /* fit_sim.h order; + sigma2 without GARCH */
    size_t n;
    int season;
    unsigned long seed0;      /* seeds seed0 .. seed0 + draws - 1 */
} structure;

static const structure STRUCTS[] = {
    { "AR(2)", "ar(2)", { 10.0, 0.5, 0.3, 1.0 }, 500, 0, 1000 },
    { "MA(1)", "ma(1)", { 0.0, 0.6, 1.0 }, 500, 0, 2000 },
    { "AR(1) with a lag-7 term", "ar[1,7]", { 50.0, 0.4, 0.3, 4.0 }, 700, 7, 3000 },
    { "AR(1)-GARCH(1,1) t", "ar(1)+garch(1,1) t", { 0.05, 0.15, 0.05, 0.10, 0.85, 6.0 }, 2000, 5, 4000 },
    { "white noise", "arma(0,0)", { 0.0, 1.0 }, 500, 0, 5000 },
};

static void run_structure(const structure *st)
{
    int draws = long_run() ? 200 : 30;
    fit_spec truth = spec_of(st->spec);
    double *y = malloc(st->n * sizeof *y);
    assert_non_null(y);
    int ok = 0, white = 0, terms = 0, max_rounds = 0, max_fitted = 0;
    sh_refine_options o = sh_refine_default_options();
    for (int d = 0; d < draws; d++) {
        unsigned long seed = st->seed0 + (unsigned long)d;
        assert_int_equal(fit_simulate(&truth, st->par, st->n, 500, seed, y), HN_OK);
        sh_session s;
        session_with(&s, y, st->n, st->season);
        sh_refine_result *r = malloc(sizeof *r);
        assert_non_null(r);
        assert_int_equal(sh_refine(&s, &o, r), HN_OK);
        /* the budget: rounds and models fitted */
        assert_true(r->nsteps <= o.max_steps);
        assert_true(r->fitted <= o.max_steps * DIAG_MAX_ADVICE);
        assert_int_equal(s.nmodels, 1 + r->fitted);
        if (r->nsteps > max_rounds)
            max_rounds = r->nsteps;
        if (r->fitted > max_fitted)
            max_fitted = r->fitted;
        const sh_model *m = &s.models[r->final_id - 1];
        assert_int_equal(s.current, r->final_id - 1);
        /* every model but the start has a parent that came before it */
        for (int i = 1; i < s.nmodels; i++) {
            assert_true(s.models[i].parent >= 1 && s.models[i].parent < s.models[i].id);
            assert_true(s.models[i].origin[0] != '\0');
        }
        const fit_spec *f = &m->fit.spec;
        int has = holds(truth.ar_lag, truth.n_ar, f->ar_lag, f->n_ar) &&
                  holds(truth.ma_lag, truth.n_ma, f->ma_lag, f->n_ma) &&
                  (!truth.garch || f->garch) && (truth.dist != FIT_DIST_T || f->dist == FIT_DIST_T);
        int w = m->checked && m->battery.white;
        terms += has;
        white += w;
        ok += has && w;
        if (!(has && w) && long_run()) {
            char t[128];
            printf("  %s seed %lu: ended on %s (%s): %s\n", st->name, seed,
                   fit_spec_format(f, t, sizeof t), w ? "white" : "not white", r->why);
        }
        free(r);
        sh_session_free(&s);
    }
    free(y);
    double rate = (double)ok / draws;
    printf("refine %-26s n %4zu: %3d of %3d draws (%.1f%%) hold the true terms and pass "
           "(terms %d, pass %d); at most %d rounds, %d models\n",
           st->name, st->n, ok, draws, 100.0 * rate, terms, white, max_rounds, max_fitted);
    assert_true(rate >= (long_run() ? 0.90 : 0.80));
}

static void test_refine_ar2(void **state) { (void)state; run_structure(&STRUCTS[0]); }
static void test_refine_ma1(void **state) { (void)state; run_structure(&STRUCTS[1]); }
static void test_refine_ar1_lag7(void **state) { (void)state; run_structure(&STRUCTS[2]); }
static void test_refine_garch_t(void **state) { (void)state; run_structure(&STRUCTS[3]); }
static void test_refine_white(void **state) { (void)state; run_structure(&STRUCTS[4]); }

/* A budget of one round is never exceeded, and the closing reason says so. */
static void test_refine_budget(void **state)
{
    (void)state;
    fit_spec truth = spec_of("ar[1,7]");
    const double par[] = { 50.0, 0.4, 0.3, 4.0 };
    double y[700];
    assert_int_equal(fit_simulate(&truth, par, 700, 500, 3000, y), HN_OK);
    sh_session s;
    session_with(&s, y, 700, 7);
    sh_refine_options o = sh_refine_default_options();
    o.max_steps = 1;
    sh_refine_result r;
    assert_int_equal(sh_refine(&s, &o, &r), HN_OK);
    assert_int_equal(r.nsteps, 1);
    assert_int_equal(r.stop, SH_STOP_BUDGET);
    assert_non_null(strstr(r.why, "budget of 1"));
    o.max_steps = 0;
    assert_int_equal(sh_refine(&s, &o, &r), HN_EINVAL);
    sh_session_free(&s);
}

/* Ctrl-C before the first round: refine stops at once, keeps the start
 * model, and says so. */
static void test_refine_interrupted(void **state)
{
    (void)state;
    fit_spec truth = spec_of("ar(2)");
    const double par[] = { 10.0, 0.5, 0.3, 1.0 };
    double y[500];
    assert_int_equal(fit_simulate(&truth, par, 500, 500, 1000, y), HN_OK);
    sh_session s;
    session_with(&s, y, 500, 0);
    sh_refine_result r;
    sh_interrupted = 1;
    assert_int_equal(sh_refine(&s, NULL, &r), HN_OK);
    sh_interrupted = 0;
    assert_int_equal(r.stop, SH_STOP_INTERRUPTED);
    assert_int_equal(r.nsteps, 0);
    assert_int_equal(s.nmodels, 1);
    assert_int_equal(r.final_id, 1);
    sh_session_free(&s);
}

/* Compare two fits bit for bit (what is printed follows from these). */
static void same_fit(const fit_result *a, const fit_result *b)
{
    assert_int_equal(a->np, b->np);
    for (int i = 0; i < a->np; i++)
        assert_memory_equal(&a->par[i], &b->par[i], sizeof(double));
    assert_memory_equal(&a->loglik, &b->loglik, sizeof(double));
    assert_memory_equal(&a->aicc, &b->aicc, sizeof(double));
    assert_memory_equal(&a->bic, &b->bic, sizeof(double));
    assert_int_equal(a->iterations, b->iterations);
    assert_int_equal(a->n_eff, b->n_eff);
}

static void same_battery(const diag_battery *a, const diag_battery *b)
{
    assert_int_equal(a->ntests, b->ntests);
    for (int i = 0; i < a->ntests; i++)
        if (a->tests[i].valid)
            assert_memory_equal(&a->tests[i].p, &b->tests[i].p, sizeof(double));
    assert_memory_equal(a->crit_pass, b->crit_pass, sizeof a->crit_pass);
    assert_int_equal(a->white, b->white);
}

/* Scan on 2 threads = scan on 1 thread = one fit at a time, exactly; the
 * printed %.10g text of loglik, AICc and BIC agrees to the last digit. */
static void scan_agrees(const char *truth_text, const double *par, size_t n, int garch)
{
    fit_spec truth = spec_of(truth_text);
    double *y = malloc(n * sizeof *y);
    assert_non_null(y);
    assert_int_equal(fit_simulate(&truth, par, n, 500, 77, y), HN_OK);
    sh_scan_options o = sh_scan_default_options();
    o.p_max = 2;
    o.q_max = 2;
    o.garch = garch;
    sh_scan_result one, two;
    o.threads = 1;
    assert_int_equal(sh_scan_run(y, n, &o, &one), HN_OK);
    o.threads = 2;
    assert_int_equal(sh_scan_run(y, n, &o, &two), HN_OK);
    omp_set_num_threads(2);
    o.threads = 0;
    sh_scan_result dflt;
    assert_int_equal(sh_scan_run(y, n, &o, &dflt), HN_OK);
    assert_int_equal(one.ncells, 9);
    assert_int_equal(one.best, two.best);
    assert_int_equal(one.best, dflt.best);
    for (int i = 0; i < one.ncells; i++) {
        assert_int_equal(one.cell[i].status, HN_OK);
        same_fit(&one.cell[i].fit, &two.cell[i].fit);
        same_fit(&one.cell[i].fit, &dflt.cell[i].fit);
        same_battery(&one.cell[i].battery, &two.cell[i].battery);
        fit_result r;
        assert_int_equal(fit_model(y, n, &one.cell[i].spec, NULL, &r), HN_OK);
        same_fit(&one.cell[i].fit, &r);
        char a[64], b[64];
        snprintf(a, sizeof a, "%.10g %.10g %.10g", r.loglik, r.aicc, r.bic);
        snprintf(b, sizeof b, "%.10g %.10g %.10g", two.cell[i].fit.loglik, two.cell[i].fit.aicc,
                 two.cell[i].fit.bic);
        assert_string_equal(a, b);
        fit_result_free(&r);
    }
    /* committing adds the models in grid order with their batteries */
    sh_session s;
    sh_session_init(&s);
    int added = sh_scan_commit(&s, &two, "scan");
    assert_int_equal(added, 9);
    for (int i = 0; i < 9; i++) {
        assert_true(fit_spec_equal(&s.models[i].fit.spec, &two.cell[i].spec));
        assert_true(s.models[i].checked);
    }
    assert_int_equal(s.current, two.best);
    sh_session_free(&s);
    sh_scan_free(&one);
    sh_scan_free(&two);
    sh_scan_free(&dflt);
    free(y);
}

static void test_scan_threads_arma(void **state)
{
    (void)state;
    const double par[] = { 1.0, 0.5, 0.4, 1.0 };
    scan_agrees("arma(1,1)", par, 400, 0);
}

static void test_scan_threads_garch(void **state)
{
    (void)state;
    const double par[] = { 0.0, 0.2, 0.05, 0.1, 0.85 };
    scan_agrees("ar(1)+garch(1,1)", par, 800, 1);
}

static void test_scan_options(void **state)
{
    (void)state;
    double y[50] = { 0 };
    sh_scan_options o = sh_scan_default_options();
    sh_scan_result r;
    o.dist = FIT_DIST_T;            /* Student-t without GARCH */
    assert_int_equal(sh_scan_run(y, 50, &o, &r), HN_EINVAL);
    o = sh_scan_default_options();
    o.p_max = SH_SCAN_MAX_ORDER + 1;
    assert_int_equal(sh_scan_run(y, 50, &o, &r), HN_EINVAL);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_refine_ar2),        cmocka_unit_test(test_refine_ma1),
        cmocka_unit_test(test_refine_ar1_lag7),   cmocka_unit_test(test_refine_garch_t),
        cmocka_unit_test(test_refine_white),      cmocka_unit_test(test_refine_budget),
        cmocka_unit_test(test_refine_interrupted),
        cmocka_unit_test(test_scan_threads_arma), cmocka_unit_test(test_scan_threads_garch),
        cmocka_unit_test(test_scan_options),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
