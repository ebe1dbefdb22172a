/* test_advise.c - the advice rules on hand-built batteries: each rule, the ranking and the bounds.
 *
 * The rules themselves are common practice of Box-Jenkins identification
 * (a PACF cut-off points to AR order, an ACF cut-off to MA order) and of
 * volatility modelling (squared-residual correlation -> GARCH; heavy tails
 * after it -> Student-t).  Spike p-values are checked against scipy 1.10.1
 * (Debian), 2 * scipy.stats.norm.sf(z). */
#include "testutil.h"

#include "diag_advise.h"
#include "hn_status.h"

#define LAGS 20

typedef struct {
    diag_battery b;
    double acf[LAGS], pacf[LAGS];
} fake;

/* A battery of N residuals that passes everything, with flat ACF/PACF. */
static void fake_init(fake *f, size_t n)
{
    memset(f, 0, sizeof *f);
    diag_battery *b = &f->b;
    b->n = n;
    b->alpha = 0.05;
    b->band = 1.959963984540054 / sqrt((double)n);
    b->acf = f->acf;
    b->pacf = f->pacf;
    b->acf_lags = LAGS;
    for (int c = 0; c < DIAG_NCRIT; c++) {
        b->crit_pass[c] = 1;
        b->crit_p[c] = 0.5;
    }
    b->white = 1;
    const struct { const char *name; diag_criterion c; } t[] = {
        { "mean-t", DIAG_MEAN }, { "brown-forsythe", DIAG_VARIANCE }, { "ljung-box", DIAG_SERIAL },
        { "mcleod-li", DIAG_VOLATILITY }, { "runs", DIAG_RANDOM }, { "jarque-bera", DIAG_NORMAL },
    };
    b->ntests = 6;
    for (int i = 0; i < 6; i++) {
        diag_test *d = &b->tests[i];
        d->name = t[i].name;
        d->criterion = t[i].c;
        d->valid = 1;
        d->statistic = 1.0;
        d->p = 0.5;
        d->pass = 1;
        d->effect = 0.0;
    }
}

static void fail_crit(fake *f, diag_criterion c, double p)
{
    f->b.crit_pass[c] = 0;
    f->b.crit_p[c] = p;
    if (c != DIAG_NORMAL)
        f->b.white = 0;
    for (int i = 0; i < f->b.ntests; i++)
        if (f->b.tests[i].criterion == c) {
            f->b.tests[i].p = p;
            f->b.tests[i].pass = 0;
            f->b.tests[i].statistic = 42.0;
        }
}

static fit_spec spec_of(const char *text)
{
    fit_spec s;
    char err[128];
    assert_int_equal(fit_spec_parse(text, &s, err, sizeof err, NULL), HN_OK);
    return s;
}

static const diag_advice *find_spec(const diag_advice_list *a, const char *text)
{
    fit_spec s = spec_of(text);
    for (int i = 0; i < a->n; i++)
        if (a->item[i].has_spec && fit_spec_equal(&a->item[i].spec, &s))
            return &a->item[i];
    return NULL;
}

static const diag_advice *find_kind(const diag_advice_list *a, diag_advice_kind k)
{
    for (int i = 0; i < a->n; i++)
        if (a->item[i].kind == k)
            return &a->item[i];
    return NULL;
}

/* PACF spike at the next lag: raise the AR order (ar(1) -> ar(2)). */
static void test_pacf_next_order(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 100);
    fail_crit(&f, DIAG_SERIAL, 1e-4);
    f.pacf[1] = 0.30;                     /* lag 2 */
    f.acf[1] = 0.25;
    fit_spec cur = spec_of("ar(1)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_true(a.n >= 1);
    const diag_advice *it = &a.item[0];
    assert_int_equal(it->kind, DIAG_ADV_AR);
    assert_int_equal(it->lag, 2);
    assert_true(it->has_spec);
    fit_spec want = spec_of("ar(2)");
    assert_true(fit_spec_equal(&it->spec, &want));
    assert_string_equal(it->spec_text, "ar(2)");
    assert_string_equal(it->check, "pacf");
    /* z = 0.30 * sqrt(100) = 3: scipy 1.10.1 2*norm.sf(3) = 0.0026997960632601866 */
    TU_NEAR(it->p, 0.0026997960632601866, 1e-12);
    assert_non_null(strstr(it->reason, "lag 2"));
    assert_non_null(strstr(it->reason, "raise the AR order from 1 to 2"));
    assert_non_null(strstr(it->reason, "ljung-box"));
    /* the ACF spike at lag 2 gives an MA term, ranked below (0.25 < 0.30) */
    const diag_advice *ma = find_spec(&a, "ar(1)+ma[2]");
    assert_non_null(ma);
    assert_int_equal(ma->kind, DIAG_ADV_MA);
    /* z = 2.5: scipy 1.10.1 2*norm.sf(2.5) = 0.012419330651552265 */
    TU_NEAR(ma->p, 0.012419330651552265, 1e-12);
    assert_true(ma->rank > it->rank);
    assert_int_equal(it->rank, 1);
}

/* A spike past the next lag gives a chosen-lag term. */
static void test_pacf_chosen_lag(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 400);
    fail_crit(&f, DIAG_SERIAL, 1e-6);
    f.pacf[4] = 0.25;                     /* lag 5, z = 5 */
    fit_spec cur = spec_of("ar(1)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    const diag_advice *it = find_spec(&a, "ar[1,5]");
    assert_non_null(it);
    assert_int_equal(it->kind, DIAG_ADV_AR);
    assert_non_null(strstr(it->reason, "add an AR term at lag 5"));
}

/* ACF spike alone (PACF inside the band): an MA term. */
static void test_acf_ma(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 400);
    fail_crit(&f, DIAG_SERIAL, 1e-6);
    f.acf[0] = -0.4;
    fit_spec cur = spec_of("arma(0,0)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_int_equal(a.item[0].kind, DIAG_ADV_MA);
    fit_spec want = spec_of("ma(1)");
    assert_true(fit_spec_equal(&a.item[0].spec, &want));
    assert_true(a.item[0].statistic == -0.4);
}

/* A spike at the seasonal period: a term at that lag, named seasonal,
 * even when two stronger spikes fill the quota. */
static void test_seasonal(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 700);
    fail_crit(&f, DIAG_SERIAL, 1e-9);
    f.pacf[1] = 0.30;
    f.pacf[2] = 0.28;
    f.pacf[6] = 0.20;                     /* lag 7 */
    diag_advise_context c = diag_advise_default_context();
    c.season = 7;
    fit_spec cur = spec_of("ar(1)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, &c, &a), HN_OK);
    const diag_advice *it = find_spec(&a, "ar[1,7]");
    assert_non_null(it);
    assert_int_equal(it->kind, DIAG_ADV_SEASONAL_AR);
    assert_non_null(strstr(it->reason, "seasonal"));
    /* without the period it is not among the two strongest */
    c.season = 0;
    assert_int_equal(diag_advise(&f.b, &cur, &c, &a), HN_OK);
    assert_null(find_spec(&a, "ar[1,7]"));
}

/* Portmanteau fails with no single spike: the next orders. */
static void test_no_spike_next_orders(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 400);
    fail_crit(&f, DIAG_SERIAL, 0.001);
    fit_spec cur = spec_of("arma(1,0)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_non_null(find_spec(&a, "arma(2,0)"));
    assert_non_null(find_spec(&a, "arma(1,1)"));
}

/* Mean not zero: the constant when absent; a difference when the unit-root
 * result says so; a level shift otherwise. */
static void test_mean(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 200);
    fail_crit(&f, DIAG_MEAN, 1e-5);
    fit_spec cur = spec_of("ar(1) nomean");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_int_equal(a.item[0].kind, DIAG_ADV_CONSTANT);
    fit_spec want = spec_of("ar(1)");
    assert_true(fit_spec_equal(&a.item[0].spec, &want));

    diag_unitroot ur;
    memset(&ur, 0, sizeof ur);
    ur.difference = 1;
    ur.adf.statistic = -1.2;
    ur.adf.p = 0.1;
    ur.adf.p_bound = 1;
    ur.kpss.statistic = 1.5;
    ur.kpss.p = 0.01;
    ur.kpss.p_bound = -1;
    diag_advise_context c = diag_advise_default_context();
    c.unitroot = &ur;
    assert_int_equal(diag_advise(&f.b, &cur, &c, &a), HN_OK);
    assert_int_equal(a.item[0].kind, DIAG_ADV_DIFFERENCE);
    assert_false(a.item[0].has_spec);
    assert_non_null(strstr(a.item[0].reason, "difference"));

    cur = spec_of("ar(1)");
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_int_equal(a.item[0].kind, DIAG_ADV_LEVEL_SHIFT);
    assert_false(a.item[0].has_spec);
}

/* Volatility clustering: GARCH(1,1); with heavy tails also GARCH t. */
static void test_volatility(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 2000);
    fail_crit(&f, DIAG_VOLATILITY, 1e-20);
    fit_spec cur = spec_of("ar(1)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_int_equal(a.item[0].kind, DIAG_ADV_GARCH);
    fit_spec want = spec_of("ar(1)+garch(1,1)");
    assert_true(fit_spec_equal(&a.item[0].spec, &want));
    assert_string_equal(a.item[0].check, "mcleod-li");
    assert_null(find_spec(&a, "ar(1)+garch(1,1) t"));
    /* heavy tails as well */
    fail_crit(&f, DIAG_NORMAL, 1e-30);
    f.b.tests[5].effect = 3.0;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_true(fit_spec_equal(&a.item[0].spec, &want));
    const diag_advice *t = find_spec(&a, "ar(1)+garch(1,1) t");
    assert_non_null(t);
    assert_true(t->rank > a.item[0].rank);
    /* clustering left with GARCH: said in words, no model */
    cur = spec_of("ar(1)+garch(1,1)");
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_non_null(find_kind(&a, DIAG_ADV_VOL_REMAINS));
    assert_false(find_kind(&a, DIAG_ADV_VOL_REMAINS)->has_spec);
}

/* Clustering gone with GARCH and heavy tails: Student-t; light tails: not. */
static void test_student_t(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 2000);
    fail_crit(&f, DIAG_NORMAL, 1e-12);
    f.b.tests[5].effect = 1.8;
    fit_spec cur = spec_of("ar(1)+garch(1,1)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_true(a.adequate);                /* normality is not part of the verdict */
    const diag_advice *t = find_kind(&a, DIAG_ADV_STUDENT_T);
    assert_non_null(t);
    fit_spec want = spec_of("ar(1)+garch(1,1) t");
    assert_true(fit_spec_equal(&t->spec, &want));
    f.b.tests[5].effect = -0.8;             /* light tails */
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_null(find_kind(&a, DIAG_ADV_STUDENT_T));
    /* no Student-t proposal while clustering remains */
    f.b.tests[5].effect = 1.8;
    fail_crit(&f, DIAG_VOLATILITY, 1e-6);
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_null(find_kind(&a, DIAG_ADV_STUDENT_T));
}

/* A variance shift without ARCH effects: a break or transform, not GARCH. */
static void test_variance_shift(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 500);
    fail_crit(&f, DIAG_VARIANCE, 1e-8);
    fit_spec cur = spec_of("ar(1)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_int_equal(a.n, 1);
    assert_int_equal(a.item[0].kind, DIAG_ADV_VARIANCE_SHIFT);
    assert_false(a.item[0].has_spec);
    assert_non_null(strstr(a.item[0].reason, "not GARCH"));
    assert_non_null(strstr(a.item[0].reason, "log"));
    /* with clustering as well the GARCH rule speaks instead */
    fail_crit(&f, DIAG_VOLATILITY, 1e-9);
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_null(find_kind(&a, DIAG_ADV_VARIANCE_SHIFT));
    assert_non_null(find_kind(&a, DIAG_ADV_GARCH));
}

/* Nothing failed: adequate first, then simpler neighbours. */
static void test_adequate(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 500);
    fit_spec cur = spec_of("ar[1,7]+ma(1)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_true(a.adequate);
    assert_int_equal(a.item[0].kind, DIAG_ADV_ADEQUATE);
    assert_int_equal(a.item[0].rank, 1);
    assert_non_null(find_spec(&a, "ar(1)+ma(1)"));
    assert_non_null(find_spec(&a, "ar[1,7]"));
    for (int i = 1; i < a.n; i++)
        assert_int_equal(a.item[i].kind, DIAG_ADV_SIMPLER);
}

/* Bounds: lags below n/4, 10 residuals per parameter, term limits, and
 * nothing already fitted. */
static void test_bounds(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 60);
    fail_crit(&f, DIAG_SERIAL, 1e-6);
    f.pacf[14] = 0.6;                     /* lag 15: 15 * 4 >= 60 */
    f.pacf[1] = 0.5;                      /* lag 2 */
    fit_spec cur = spec_of("ar(1)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    for (int i = 0; i < a.n; i++)
        assert_true(a.item[i].lag < 15);
    assert_non_null(find_spec(&a, "ar(2)"));

    /* 40 observations: ar(3) has 5 parameters with sigma2, 37 residuals < 50 */
    fake_init(&f, 40);
    fail_crit(&f, DIAG_SERIAL, 1e-6);
    f.pacf[2] = 0.6;
    cur = spec_of("ar(2)");
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_null(find_spec(&a, "ar(3)"));
    assert_true(a.dropped >= 1);
    assert_non_null(strstr(a.dropped_why, "per parameter"));
    char why[256];
    fit_spec s3 = spec_of("ar(3)");
    assert_false(diag_advise_supported(&s3, 40, NULL, why, sizeof why));
    assert_false(diag_advise_supported(&s3, 52, NULL, why, sizeof why));  /* 49 residuals < 50 */
    assert_true(diag_advise_supported(&s3, 53, NULL, why, sizeof why));   /* 50 residuals */

    /* already fitted */
    fake_init(&f, 400);
    fail_crit(&f, DIAG_SERIAL, 1e-6);
    f.pacf[1] = 0.3;
    f.acf[0] = 0.25;
    cur = spec_of("ar(1)");
    fit_spec done[2] = { spec_of("ar(2)"), spec_of("ar(1)") };
    diag_advise_context c = diag_advise_default_context();
    c.fitted = done;
    c.nfitted = 2;
    assert_int_equal(diag_advise(&f.b, &cur, &c, &a), HN_OK);
    assert_null(find_spec(&a, "ar(2)"));
    assert_non_null(strstr(a.dropped_why, "fitted already"));
    for (int i = 0; i < a.n; i++)
        for (int k = 0; k < 2; k++)
            assert_false(a.item[i].has_spec && fit_spec_equal(&a.item[i].spec, &done[k]));

    /* term limit */
    fake_init(&f, 4000);
    fail_crit(&f, DIAG_SERIAL, 1e-6);
    f.pacf[6] = 0.3;
    cur = spec_of("ar(6)");
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_null(find_spec(&a, "ar(7)"));

    /* GARCH needs 100 observations */
    fake_init(&f, 80);
    fail_crit(&f, DIAG_VOLATILITY, 1e-6);
    cur = spec_of("arma(0,0)");
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_null(find_kind(&a, DIAG_ADV_GARCH));
}

/* Ranking: strongest evidence first, ranks 1..n. */
static void test_ranking(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 900);
    fail_crit(&f, DIAG_SERIAL, 1e-30);
    fail_crit(&f, DIAG_VOLATILITY, 1e-5);
    f.pacf[0] = 0.2;     /* z 6 */
    f.acf[0] = 0.2;
    f.pacf[3] = 0.1;     /* z 3 */
    f.acf[5] = 0.35;     /* z 10.5 */
    fit_spec cur = spec_of("arma(0,0)");
    diag_advice_list a;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_OK);
    assert_true(a.n >= 4);
    assert_non_null(find_spec(&a, "ma[6]"));
    assert_int_equal(find_spec(&a, "ma[6]")->rank, 1);
    for (int i = 0; i < a.n; i++) {
        assert_int_equal(a.item[i].rank, i + 1);
        if (i)
            assert_true(a.item[i - 1].strength >= a.item[i].strength);
    }
    /* the GARCH proposal (p 1e-5) ranks below the lag-1 AR (z 6, p 2e-9) */
    assert_true(find_kind(&a, DIAG_ADV_GARCH)->rank > find_spec(&a, "ar(1)")->rank);
}

static void test_bad_args(void **state)
{
    (void)state;
    fake f;
    fake_init(&f, 100);
    fit_spec cur = spec_of("ar(1)");
    diag_advice_list a;
    assert_int_equal(diag_advise(NULL, &cur, NULL, &a), HN_EINVAL);
    f.b.acf = NULL;
    assert_int_equal(diag_advise(&f.b, &cur, NULL, &a), HN_EINVAL);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_pacf_next_order), cmocka_unit_test(test_pacf_chosen_lag),
        cmocka_unit_test(test_acf_ma),          cmocka_unit_test(test_seasonal),
        cmocka_unit_test(test_no_spike_next_orders), cmocka_unit_test(test_mean),
        cmocka_unit_test(test_volatility),      cmocka_unit_test(test_student_t),
        cmocka_unit_test(test_variance_shift),  cmocka_unit_test(test_adequate),
        cmocka_unit_test(test_bounds),          cmocka_unit_test(test_ranking),
        cmocka_unit_test(test_bad_args),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
