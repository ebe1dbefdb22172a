/* test_battery.c - the battery: rules, Holm verdict, size under white noise and power against departures. */
#include "testutil.h"
#include "diag_battery.h"
#include "diag_checks.h"
#include "diag_stats.h"
#include "hn_status.h"

#include <gsl/gsl_cdf.h>
#include <omp.h>
#include <gsl/gsl_rng.h>
#include <gsl/gsl_randist.h>

/* Exact binomial 99 % acceptance interval [lo, hi] for a count out of N at
 * rate P: the 0.5 % and 99.5 % quantiles (common practice). */
static void binom_interval(double p, unsigned N, unsigned *lo, unsigned *hi)
{
    unsigned k = 0;
    while (k < N && gsl_cdf_binomial_P(k, p, N) < 0.005)
        k++;
    *lo = k;
    while (k < N && gsl_cdf_binomial_P(k, p, N) < 0.995)
        k++;
    *hi = k;
}

static gsl_rng *rng_seeded(unsigned long seed)
{
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    assert_non_null(r);
    gsl_rng_set(r, seed);
    return r;
}

static int find_test(const diag_battery *b, const char *name)
{
    for (int i = 0; i < b->ntests; i++)
        if (b->tests[i].name && strcmp(b->tests[i].name, name) == 0)
            return i;
    return -1;
}

/* Size under the null.  2100 Gaussian white-noise series (700 at each n in
 * {100, 500, 1000}; GSL mt19937 seed 4242).  Each white-noise check's
 * rejection count at 5 % must fall inside the exact binomial 99 % interval
 * for rate 0.05 (common practice for checking a test's size).  The Holm
 * verdict controls the family-wise rate at 5 %: its count must not exceed
 * the interval's upper end (Holm and Bonferroni are conservative, so it may
 * fall below; printed). */
#define NAMES_MAX 16
static void test_size_white_noise(void **state)
{
    (void)state;
    const size_t ns[3] = { 100, 500, 1000 };
    const unsigned per_n = 700;
    gsl_rng *r = rng_seeded(4242UL);
    const char *names[NAMES_MAX] = { 0 };
    int crit[NAMES_MAX];
    unsigned rej[NAMES_MAX] = { 0 }, valid[NAMES_MAX] = { 0 }, nnames = 0, fwe = 0, runs = 0;
    unsigned crit_rej[DIAG_NCRIT] = { 0 };
    double *x = malloc(1000 * sizeof *x);
    assert_non_null(x);
    diag_options opt = diag_default_options();
    for (int s = 0; s < 3; s++) {
        for (unsigned d = 0; d < per_n; d++) {
            for (size_t i = 0; i < ns[s]; i++)
                x[i] = gsl_ran_gaussian(r, 1.0);
            diag_battery b;
            assert_int_equal(diag_battery_run(x, ns[s], &opt, &b), HN_OK);
            runs++;
            fwe += !b.white;
            for (int c = 0; c < DIAG_NCRIT; c++)
                crit_rej[c] += !b.crit_pass[c];
            for (int i = 0; i < b.ntests; i++) {
                const diag_test *t = &b.tests[i];
                unsigned j = 0;
                while (j < nnames && strcmp(names[j], t->name) != 0)
                    j++;
                if (j == nnames) {
                    assert_true(nnames < NAMES_MAX);
                    names[nnames] = t->name;
                    crit[nnames] = (int)t->criterion;
                    nnames++;
                }
                if (t->valid) {
                    valid[j]++;
                    rej[j] += !t->pass;
                }
            }
            diag_battery_free(&b);
        }
    }
    int bad = 0;
    for (unsigned j = 0; j < nnames; j++) {
        unsigned lo, hi;
        binom_interval(0.05, valid[j], &lo, &hi);
        int white_test = crit[j] != DIAG_NORMAL;
        int inside = rej[j] >= lo && rej[j] <= hi;
        printf("%-16s %-24s rejected %4u of %4u (%.2f%%), 99%% interval %u..%u%s\n", names[j],
               diag_criterion_name((diag_criterion)crit[j]), rej[j], valid[j],
               100.0 * rej[j] / (valid[j] ? valid[j] : 1), lo, hi,
               white_test ? (inside ? "" : "  OUTSIDE") : "  (normality: information only)");
        assert_true(valid[j] == runs);
        if (white_test && !inside)
            bad = 1;
    }
    for (int c = 0; c < DIAG_NCRIT; c++)
        printf("criterion %-24s rejected %4u of %u\n", diag_criterion_name((diag_criterion)c),
               crit_rej[c], runs);
    unsigned lo, hi;
    binom_interval(0.05, runs, &lo, &hi);
    printf("Holm verdict 'not white': %u of %u (%.2f%%), 99%% interval %u..%u\n", fwe, runs,
           100.0 * fwe / runs, lo, hi);
    assert_false(bad);
    assert_true(fwe <= hi);
    free(x);
    gsl_rng_free(r);
}

/* Power (the project's own requirements, simulated here with GSL mt19937):
 * AR(1) phi 0.3 at n 500 fails serial correlation in > 90 % of 200 draws
 * (seed 7); GARCH(1,1) omega 0.05 alpha 0.1 beta 0.85 at n 2000 fails
 * volatility clustering in > 90 % of 200 draws (seed 8); a variance that
 * doubles half-way (sd 1 then sqrt 2) at n 1000 fails constant variance in
 * > 90 % of 200 draws (seed 9). */
static void test_power(void **state)
{
    (void)state;
    double *x = malloc(2000 * sizeof *x);
    assert_non_null(x);
    diag_options opt = diag_default_options();
    const unsigned draws = 200;
    unsigned hit[3] = { 0, 0, 0 };
    for (int kind = 0; kind < 3; kind++) {
        gsl_rng *r = rng_seeded(7UL + (unsigned long)kind);
        size_t n = kind == 1 ? 2000 : kind == 2 ? 1000 : 500;
        for (unsigned d = 0; d < draws; d++) {
            if (kind == 0) {
                double prev = gsl_ran_gaussian(r, 1.0) / sqrt(1 - 0.09);
                for (size_t i = 0; i < n; i++)
                    x[i] = prev = 0.3 * prev + gsl_ran_gaussian(r, 1.0);
            } else if (kind == 1) {
                double h = 1.0, e = 0.0;
                for (size_t burn = 0; burn < 500 + n; burn++) {
                    h = 0.05 + 0.1 * e * e + 0.85 * h;
                    e = sqrt(h) * gsl_ran_gaussian(r, 1.0);
                    if (burn >= 500)
                        x[burn - 500] = e;
                }
            } else {
                for (size_t i = 0; i < n; i++)
                    x[i] = gsl_ran_gaussian(r, i < n / 2 ? 1.0 : sqrt(2.0));
            }
            diag_battery b;
            assert_int_equal(diag_battery_run(x, n, &opt, &b), HN_OK);
            diag_criterion c = kind == 0 ? DIAG_SERIAL : kind == 1 ? DIAG_VOLATILITY : DIAG_VARIANCE;
            hit[kind] += !b.crit_pass[c];
            diag_battery_free(&b);
        }
        gsl_rng_free(r);
    }
    printf("power: AR(1) 0.3 n 500 serial %u/%u; GARCH(0.1, 0.85) n 2000 volatility %u/%u; "
           "variance x2 n 1000 constant variance %u/%u\n",
           hit[0], draws, hit[1], draws, hit[2], draws);
    for (int k = 0; k < 3; k++)
        assert_true(hit[k] > 0.9 * draws);
    free(x);
}

/* Rules and bookkeeping (the project's own contract, diag_battery.h):
 * lag rule and its raise to p+q+1, ACF length, Ljung-Box profile equal to
 * the single test at m, df NAN below 1, Bonferroni criterion p, Holm ranks
 * a permutation of 1..k with step-down consistency. */
static void test_rules(void **state)
{
    (void)state;
    gsl_rng *r = rng_seeded(11UL);
    double x[300];
    double prev = 0.0;
    for (int i = 0; i < 300; i++)
        x[i] = prev = 0.5 * prev + gsl_ran_gaussian(r, 1.0);
    gsl_rng_free(r);

    diag_options opt = diag_default_options();
    diag_battery b;
    assert_int_equal(diag_battery_run(x, 300, &opt, &b), HN_OK);
    assert_int_equal(b.m, 10);
    assert_string_equal(b.lag_rule, "min(10, n/5)");
    assert_int_equal(b.acf_lags, 20);
    assert_int_equal(b.window, 30);
    /* z_{0.975} = 1.959963984540054 (scipy 1.10.1, norm.ppf(0.975)) */
    TU_NEAR(b.band, 1.959963984540054 / sqrt(300.0), 1e-12);
    int lb = find_test(&b, "ljung-box");
    assert_true(lb >= 0);
    TU_NEAR(b.profile_q[b.m - 1], b.tests[lb].statistic, 1e-12);
    TU_NEAR(b.profile_p[b.m - 1], b.tests[lb].p, 1e-12);
    assert_false(b.crit_pass[DIAG_SERIAL]);
    assert_false(b.white);
    assert_non_null(strstr(b.summary, "Not met: no serial correlation (Holm step 1"));
    /* Bonferroni within each criterion. */
    for (int c = 0; c < DIAG_NCRIT; c++) {
        double pmin = INFINITY;
        int k = 0;
        for (int i = 0; i < b.ntests; i++)
            if ((int)b.tests[i].criterion == c && b.tests[i].valid) {
                k++;
                pmin = fmin(pmin, b.tests[i].p);
            }
        if (k)
            TU_NEAR(b.crit_p[c], fmin(1.0, k * pmin), 1e-15);
    }
    /* Holm: ranks follow the p order; a rejected step implies every earlier step rejected. */
    int seen[DIAG_NCRIT + 1] = { 0 }, k = 0;
    for (int c = 0; c < DIAG_NORMAL; c++)
        if (b.holm_rank[c] > 0) {
            seen[b.holm_rank[c]]++;
            k++;
        }
    for (int i = 1; i <= k; i++)
        assert_int_equal(seen[i], 1);
    for (int c = 0; c < DIAG_NORMAL; c++)
        for (int d = 0; d < DIAG_NORMAL; d++)
            if (b.holm_rank[c] && b.holm_rank[d] && b.holm_rank[d] < b.holm_rank[c]) {
                assert_true(b.crit_p[d] <= b.crit_p[c]);
                if (!b.crit_pass[c])
                    assert_false(b.crit_pass[d]);
            }
    for (int c = 0; c < DIAG_NORMAL; c++)
        if (b.holm_rank[c]) {
            int step = b.holm_rank[c];
            if (!b.crit_pass[c])
                assert_true(b.crit_p[c] < b.alpha / (k - step + 1));
        }
    assert_int_equal(b.holm_rank[DIAG_NORMAL], 0);
    /* The serial effect: a long AR on an AR(1) 0.5 predicts about 0.25 of the variance
     * (phi^2, the share an AR(1) predictor removes: common practice). */
    TU_NEAR(b.tests[lb].effect, 0.25, 0.1);
    diag_battery_free(&b);

    /* m raised to p+q+1 = 8 when n/5 = 6. */
    opt.df_adjust = 7;
    assert_int_equal(diag_battery_run(x, 30, &opt, &b), HN_OK);
    assert_int_equal(b.m, 8);
    assert_non_null(strstr(b.lag_rule, "raised"));
    assert_int_equal(b.acf_lags, 20);
    for (int k2 = 1; k2 <= 7; k2++)
        assert_true(isnan(b.profile_p[k2 - 1]));
    assert_false(isnan(b.profile_p[7]));
    lb = find_test(&b, "ljung-box");
    assert_true(b.tests[lb].valid && b.tests[lb].df == 1.0);
    diag_battery_free(&b);

    /* The user's m is kept even when it leaves no df: that test is invalid, with a reason. */
    opt.lags = 5;
    assert_int_equal(diag_battery_run(x, 60, &opt, &b), HN_OK);
    lb = find_test(&b, "ljung-box");
    assert_false(b.tests[lb].valid);
    assert_non_null(strstr(b.tests[lb].detail, "df"));
    assert_string_equal(b.lag_rule, "set by the user");
    diag_battery_free(&b);

    opt = diag_default_options();
    opt.standardised = 1;
    assert_int_equal(diag_battery_run(x, 300, &opt, &b), HN_OK);
    assert_non_null(strstr(b.summary, "GARCH"));
    diag_battery_free(&b);

    /* Everything wrong at once (mean 0.5, AR 0.6, ARCH, variance break;
     * seed 13): every white-noise criterion is named in the summary, which
     * still fits its buffer. */
    {
        size_t n = 2000;
        double *y = malloc(n * sizeof *y), h = 1.0, e = 0.0, ar = 0.0;
        assert_non_null(y);
        gsl_rng *r2 = rng_seeded(13UL);
        for (size_t i = 0; i < n; i++) {
            h = 0.1 + 0.5 * e * e + 0.4 * h;
            e = sqrt(h) * gsl_ran_gaussian(r2, 1.0);
            ar = 0.6 * ar + e * (i < n / 2 ? 1.0 : 3.0);
            y[i] = 0.5 + ar;
        }
        gsl_rng_free(r2);
        opt.standardised = 1;
        assert_int_equal(diag_battery_run(y, n, &opt, &b), HN_OK);
        printf("%s\n", b.summary);
        for (int c2 = 0; c2 < DIAG_NORMAL; c2++) {
            assert_false(b.crit_pass[c2]);
            assert_non_null(strstr(b.summary, diag_criterion_name((diag_criterion)c2)));
        }
        assert_true(strlen(b.summary) < sizeof b.summary - 1);
        diag_battery_free(&b);
        free(y);
    }

    /* n = 12 holds one block of 10: the block checks are invalid, with the
     * reason, and the summary says that criterion was not judged. */
    assert_int_equal(diag_battery_run(x, 12, NULL, &b), HN_OK);
    int bf = find_test(&b, "brown-forsythe");
    assert_true(bf >= 0);
    assert_false(b.tests[bf].valid);
    assert_non_null(strstr(b.tests[bf].detail, "at least 2 blocks"));
    assert_int_equal(b.holm_rank[DIAG_VARIANCE], 0);
    assert_true(isnan(b.crit_p[DIAG_VARIANCE]));
    assert_non_null(strstr(b.summary, "Not judged (no valid check): constant variance"));
    diag_battery_free(&b);

    double c[10] = { 1, 1, 1, 1, 1, 1, 1, 1, 1, 1 };
    assert_int_equal(diag_battery_run(c, 7, NULL, &b), HN_ESHORT);
    assert_int_equal(diag_battery_run(c, 10, NULL, &b), HN_ECONST);
    diag_battery_free(&b);
}

/* "Significant but negligible" at large n: AR(1) phi 0.08 at n 20000 (seed
 * 12): the serial tests reject, while a long AR predicts under 1 % of the
 * variance (phi^2 = 0.64 %), and the summary says so in words. */
static void test_negligible(void **state)
{
    (void)state;
    size_t n = 20000;
    double *x = malloc(n * sizeof *x), prev = 0.0;
    assert_non_null(x);
    gsl_rng *r = rng_seeded(12UL);
    for (size_t i = 0; i < n; i++)
        x[i] = prev = 0.08 * prev + gsl_ran_gaussian(r, 1.0);
    gsl_rng_free(r);
    diag_battery b;
    assert_int_equal(diag_battery_run(x, n, NULL, &b), HN_OK);
    printf("%s\n", b.summary);
    assert_false(b.crit_pass[DIAG_SERIAL]);
    int lb = find_test(&b, "ljung-box");
    assert_true(b.tests[lb].effect < 0.01);
    assert_non_null(strstr(b.summary, "negligible"));
    diag_battery_free(&b);
    free(x);
}

/* "Sizeable but not significant" in short series: AR(1) phi 0.35, n 40,
 * seeds 1..300 (GSL mt19937).  Whenever the serial criterion passes while
 * the long-AR share is >= 10 %, the summary must say so; whenever not, it
 * must not; at least one such series must occur among the seeds. */
static void test_sizeable_short(void **state)
{
    (void)state;
    double x[40];
    int found = 0;
    for (unsigned long seed = 1; seed <= 300; seed++) {
        gsl_rng *r = rng_seeded(seed);
        double prev = 0.0;
        for (int i = 0; i < 40; i++)
            x[i] = prev = 0.35 * prev + gsl_ran_gaussian(r, 1.0);
        gsl_rng_free(r);
        diag_battery b;
        assert_int_equal(diag_battery_run(x, 40, NULL, &b), HN_OK);
        int lb = find_test(&b, "ljung-box");
        int flagged = strstr(b.summary, "Serial correlation: not significant") != NULL;
        int expect = b.crit_pass[DIAG_SERIAL] && b.tests[lb].effect >= 0.10;
        assert_int_equal(flagged, expect);
        if (expect && !found)
            printf("seed %lu: %s\n", seed, b.summary);
        found += expect;
        diag_battery_free(&b);
    }
    printf("%d of 300 short series flagged as sizeable but not significant\n", found);
    assert_true(found > 0);
}

/* Every number of a battery result (tests, ACF, PACF, profile, verdict). */
static void same_battery(const diag_battery *a, const diag_battery *b)
{
    assert_int_equal(a->ntests, b->ntests);
    for (int i = 0; i < a->ntests; i++) {
        const diag_test *s = &a->tests[i], *t = &b->tests[i];
        assert_string_equal(s->name, t->name);
        assert_int_equal(s->valid, t->valid);
        assert_memory_equal(&s->statistic, &t->statistic, sizeof s->statistic);
        assert_memory_equal(&s->p, &t->p, sizeof s->p);
        assert_memory_equal(&s->effect, &t->effect, sizeof s->effect);
        assert_string_equal(s->detail, t->detail);
    }
    assert_memory_equal(a->acf, b->acf, (size_t)a->acf_lags * sizeof *a->acf);
    assert_memory_equal(a->pacf, b->pacf, (size_t)a->acf_lags * sizeof *a->pacf);
    assert_memory_equal(a->profile_q, b->profile_q, (size_t)a->acf_lags * sizeof *a->profile_q);
    assert_memory_equal(a->crit_p, b->crit_p, sizeof a->crit_p);
    assert_string_equal(a->summary, b->summary);
}

/* The checks run as tasks: one thread, two threads, and two batteries at
 * once inside a parallel region (as scan and batch run them: no team of
 * their own, FFTW's planner shared) give the same digits, on GARCH-like
 * series of even and odd length above the threshold for a team. */
static void test_threads_same_digits(void **state)
{
    (void)state;
    const size_t ns[2] = { 60000, 60001 };
    gsl_rng *r = rng_seeded(77UL);
    double *x = malloc(60001 * sizeof *x), h = 1.0, e = 0.0;
    assert_non_null(x);
    for (size_t i = 0; i < 60001; i++) {
        h = 0.05 + 0.1 * e * e + 0.85 * h;
        e = sqrt(h) * gsl_ran_gaussian(r, 1.0);
        x[i] = e;
    }
    diag_options opt = diag_default_options();
    opt.lags = 20;
    for (int s = 0; s < 2; s++) {
        diag_battery one, two, in[2];
        int saved = omp_get_max_threads();
        omp_set_num_threads(1);
        assert_int_equal(diag_battery_run(x, ns[s], &opt, &one), HN_OK);
        omp_set_num_threads(2);
        assert_int_equal(diag_battery_run(x, ns[s], &opt, &two), HN_OK);
        int rc[2] = { -1, -1 };
#pragma omp parallel for num_threads(2)
        for (int k = 0; k < 2; k++)
            rc[k] = diag_battery_run(x, ns[s], &opt, &in[k]);
        omp_set_num_threads(saved);
        assert_int_equal(rc[0], HN_OK);
        assert_int_equal(rc[1], HN_OK);
        same_battery(&one, &two);
        same_battery(&one, &in[0]);
        same_battery(&one, &in[1]);
        diag_battery_free(&one);
        diag_battery_free(&two);
        diag_battery_free(&in[0]);
        diag_battery_free(&in[1]);
    }
    free(x);
    gsl_rng_free(r);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_rules),
        cmocka_unit_test(test_threads_same_digits),
        cmocka_unit_test(test_negligible),
        cmocka_unit_test(test_sizeable_short),
        cmocka_unit_test(test_power),
        cmocka_unit_test(test_size_white_noise),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
