/* diag_battery.c - run every residual check, combine them per criterion and reach a Holm verdict.
 *
 * Rules used (each is also named in the result):
 *   portmanteau lags m: min(10, n/5), raised to p+q+1 when that is smaller so
 *     that the Ljung-Box / Box-Pierce df m - (p+q) is at least 1;
 *   ACF/PACF shown to max(m, 20) lags, at most n-1;
 *   blocks for local mean and variance: width max(10, n/10), i.e. ten blocks
 *     once n >= 100 and never fewer than 10 observations per block;
 *   ARCH-LM lags q: 5, or n/10 (at least 1) when that is smaller;
 *   McLeod-Li: m lags of the squares, df m (no ARMA adjustment);
 *   criterion p: Bonferroni within the criterion, min(1, k * smallest p) over
 *     its k valid checks;
 *   verdict: Holm's step-down over the five white-noise criteria at alpha;
 *     normality is reported at alpha on its own, outside the verdict;
 *   practical size: share of variance a long autoregression of order
 *     min(20, n/10) predicts (order-adjusted, diag_stats.h), on the series
 *     for serial correlation and on its squares for volatility clustering. */
#include "diag_battery.h"
#include "diag_checks.h"
#include "diag_stats.h"
#include "hn_mem.h"
#include "hn_status.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>
#include <omp.h>

/* Below this share of variance a significant effect is called negligible;
 * from this share up an effect is called sizeable. */
#define NEGLIGIBLE_SHARE 0.01
#define SIZEABLE_SHARE 0.10

static const char VOL_EFFECT[] =
    "share of the variance of x^2 a long autoregression predicts (order-adjusted)";

diag_options diag_default_options(void)
{
    diag_options o;
    o.lags = 0;
    o.df_adjust = 0;
    o.arch_lags = 0;
    o.window = 0;
    o.alpha = 0.05;
    o.standardised = 0;
    return o;
}

/* Everything a check needs, decided once per run. */
typedef struct {
    const double *x;
    size_t n;
    int m, df_adjust, arch_q;
    size_t nblocks;
    double alpha;
    /* autocorrelations of x and of x^2 computed once for the checks that
     * read them (NULL: each such check computes its own) */
    const double *acf, *acf2;
    int nacf, nacf2;
    /* the sums of the squares that ACF2 comes from (ACF2 non-NULL) */
    const diag_lag_sums *sums2;
    const double *lag2;
    /* x less its mean (diag_center_ss; NULL: none) and the mean and sd */
    const double *d;
    double mean, sd;
} run_ctx;

/* The argument shapes of the checks in diag_checks.h. */
typedef int (*fn_plain)(const double *x, size_t n, double alpha, diag_test *out);
typedef int (*fn_blocks)(const double *x, size_t n, size_t nblocks, double alpha, diag_test *out);
typedef int (*fn_lags)(const double *x, size_t n, int lags, double alpha, diag_test *out);
typedef int (*fn_lags_adj)(const double *x, size_t n, int m, int df_adjust, double alpha,
                           diag_test *out);
typedef int (*fn_moments)(const double *x, size_t n, double alpha, diag_test *out, double *skewness,
                          double *excess_kurtosis);
/* The forms that take autocorrelations already computed. */
typedef int (*fn_acf_adj)(const double *acf, int nlags, size_t n, int m, int df_adjust,
                          double alpha, diag_test *out);
typedef int (*fn_acf2_m)(const double *acf2, int nlags, size_t n, int m, double alpha,
                         diag_test *out);
typedef int (*fn_acf_plain)(const double *x, size_t n, const double *acf, int nlags,
                            double alpha, diag_test *out);
typedef int (*fn_sums_q)(const double *x, size_t n, int q, const diag_lag_sums *s,
                         const double *lag, int nlags, double alpha, diag_test *out);
/* The forms that take the battery's centred copy or its mean and sd. */
typedef int (*fn_centred_acf)(const double *x, const double *d, size_t n, const double *acf,
                              int nlags, double alpha, diag_test *out);
typedef int (*fn_from_ms)(double mean, double sd, size_t n, double alpha, diag_test *out);
typedef int (*fn_bare)(const double *d, size_t n, double alpha, diag_test *out);
typedef int (*fn_pair)(const double *x, size_t n, size_t nblocks, double alpha, diag_test *out,
                       diag_test *next, int *rc_next);

typedef enum {
    ARG_PLAIN,      /* (x, n, alpha, out) */
    ARG_BLOCKS,     /* (x, n, nblocks, alpha, out) */
    ARG_M,          /* (x, n, m, alpha, out): portmanteau lags, no adjustment */
    ARG_M_ADJ,      /* (x, n, m, df_adjust, alpha, out) */
    ARG_ARCH_Q,     /* (x, n, q, alpha, out): ARCH-LM lags */
    ARG_MOMENTS     /* (x, n, alpha, out, &skewness, &excess_kurtosis) */
} arg_kind;

/* The battery: one line per check, in the order they are reported.  A new
 * check with one of the shapes above is one more line here. */
static const struct {
    diag_criterion criterion;
    arg_kind kind;
    union {
        fn_plain plain;
        fn_blocks blocks;
        fn_lags lags;
        fn_lags_adj lags_adj;
        fn_moments moments;
    } f;
    struct {            /* the same check from the shared ACF or its sums (NULL: none) */
        fn_acf_adj adj;
        fn_acf2_m sq;
        fn_acf_plain plain;
        fn_sums_q sums;
    } a;
    struct {            /* ... from the centred copy and ACF, the centred copy, the mean and sd,
                         * the centred copy without the practical size (set below); this
                         * check and the next from one pass */
        fn_centred_acf dacf;
        fn_moments d;
        fn_from_ms ms;
        fn_bare bare;
        fn_pair pair;
    } c;
} CHECKS[] = {
    { DIAG_MEAN,       ARG_PLAIN,   { .plain = diag_mean_ttest }, { NULL, NULL, NULL, NULL },
                                    { .ms = diag_mean_ttest_from } },
    { DIAG_VARIANCE,   ARG_BLOCKS,  { .blocks = diag_brown_forsythe_blocks }, { NULL, NULL, NULL, NULL },
                                    { .pair = diag_block_tests } },
    { DIAG_VARIANCE,   ARG_BLOCKS,  { .blocks = diag_anova_blocks }, { NULL, NULL, NULL, NULL },
                                    { NULL, NULL, NULL, NULL, NULL } },
    { DIAG_SERIAL,     ARG_M_ADJ,   { .lags_adj = diag_ljung_box }, { .adj = diag_ljung_box_acf },
                                    { NULL, NULL, NULL, NULL, NULL } },
    { DIAG_SERIAL,     ARG_M_ADJ,   { .lags_adj = diag_box_pierce }, { .adj = diag_box_pierce_acf },
                                    { NULL, NULL, NULL, NULL, NULL } },
    { DIAG_SERIAL,     ARG_PLAIN,   { .plain = diag_cum_periodogram },
                                    { .plain = diag_cum_periodogram_acf },
                                    { .dacf = diag_cum_periodogram_centred, .bare = diag_cum_periodogram_bare } },
    { DIAG_VOLATILITY, ARG_M,       { .lags = diag_mcleod_li }, { .sq = diag_mcleod_li_acf },
                                    { NULL, NULL, NULL, NULL, NULL } },
    { DIAG_VOLATILITY, ARG_ARCH_Q,  { .lags = diag_arch_lm }, { .sums = diag_arch_lm_sums },
                                    { NULL, NULL, NULL, NULL, NULL } },
    { DIAG_RANDOM,     ARG_PLAIN,   { .plain = diag_runs_test }, { NULL, NULL, NULL, NULL },
                                    { NULL, NULL, NULL, NULL, NULL } },
    { DIAG_RANDOM,     ARG_PLAIN,   { .plain = diag_turning_points }, { NULL, NULL, NULL, NULL },
                                    { NULL, NULL, NULL, NULL, NULL } },
    { DIAG_NORMAL,     ARG_MOMENTS, { .moments = diag_jarque_bera }, { NULL, NULL, NULL, NULL },
                                    { .d = diag_jarque_bera_centred } },
};
#define NCHECKS (sizeof CHECKS / sizeof CHECKS[0])

/* The table's entries by falling cost at large n, the order in which the
 * tasks are started (results are still stored and reported in table
 * order). */
static const size_t COST_ORDER[] = { 5, 1, 8, 7, 2, 10, 0, 9, 3, 4, 6 };
_Static_assert(sizeof COST_ORDER / sizeof COST_ORDER[0] == NCHECKS, "one entry per check");
_Static_assert(NCHECKS <= DIAG_MAX_TESTS, "the battery's result holds every check");

/* Whether check I waits for the mean and sd, the centred copy or the ACF
 * of x (those that read x alone, or the ACF of x^2, do not). */
static int needs_centre(size_t i)
{
    return CHECKS[i].c.bare || CHECKS[i].c.dacf || CHECKS[i].c.d || CHECKS[i].c.ms ||
           CHECKS[i].a.adj || CHECKS[i].a.plain;
}

/* Below this length one thread does the battery: starting a team costs
 * more than the checks gain. */
#define PARALLEL_MIN_N 20000

/* Run entry I of the table with the arguments its shape takes. */
static int run_check(size_t i, const run_ctx *c, diag_test *t)
{
    double skew, kurt;
    if (CHECKS[i].c.bare && c->d && c->acf)
        return CHECKS[i].c.bare(c->d, c->n, c->alpha, t);
    if (CHECKS[i].c.dacf && c->d && c->acf)
        return CHECKS[i].c.dacf(c->x, c->d, c->n, c->acf, c->nacf, c->alpha, t);
    if (CHECKS[i].c.d && c->d)
        return CHECKS[i].c.d(c->d, c->n, c->alpha, t, &skew, &kurt);
    if (CHECKS[i].c.ms)
        return CHECKS[i].c.ms(c->mean, c->sd, c->n, c->alpha, t);
    if (CHECKS[i].a.adj && c->acf)
        return CHECKS[i].a.adj(c->acf, c->nacf, c->n, c->m, c->df_adjust, c->alpha, t);
    if (CHECKS[i].a.sq && c->acf2)
        return CHECKS[i].a.sq(c->acf2, c->nacf2, c->n, c->m, c->alpha, t);
    if (CHECKS[i].a.plain && c->acf)
        return CHECKS[i].a.plain(c->x, c->n, c->acf, c->nacf, c->alpha, t);
    if (CHECKS[i].a.sums && c->acf2 && c->arch_q <= c->nacf2)
        return CHECKS[i].a.sums(c->x, c->n, c->arch_q, c->sums2, c->lag2, c->nacf2, c->alpha, t);
    switch (CHECKS[i].kind) {
    case ARG_PLAIN:   return CHECKS[i].f.plain(c->x, c->n, c->alpha, t);
    case ARG_BLOCKS:  return CHECKS[i].f.blocks(c->x, c->n, c->nblocks, c->alpha, t);
    case ARG_M:       return CHECKS[i].f.lags(c->x, c->n, c->m, c->alpha, t);
    case ARG_M_ADJ:   return CHECKS[i].f.lags_adj(c->x, c->n, c->m, c->df_adjust, c->alpha, t);
    case ARG_ARCH_Q:  return CHECKS[i].f.lags(c->x, c->n, c->arch_q, c->alpha, t);
    case ARG_MOMENTS: return CHECKS[i].f.moments(c->x, c->n, c->alpha, t, &skew, &kurt);
    }
    return HN_EINVAL;
}

/* Append formatted text to the summary, silently stopping at its end. */
static void say(diag_battery *b, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void say(diag_battery *b, const char *fmt, ...)
{
    size_t used = strlen(b->summary);
    if (used + 1 >= sizeof b->summary)
        return;
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(b->summary + used, sizeof b->summary - used, fmt, ap);
    va_end(ap);
}

/* Order-adjusted share of variance predictable by a long autoregression of
 * X (squares = 0) or of X^2 (squares = 1); NAN when it cannot be computed.
 * GIVEN (NULL: none) holds the autocorrelations of that series to at least
 * the share's order, computed by the battery already. */
static double ar_share(const double *x, size_t n, int squares, const double *given, int *ok_mem)
{
    int order = diag_share_order(n);
    if (order < 1)
        return NAN;
    if (given) {
        double pacf[DIAG_SHARE_MAX];
        if (order <= DIAG_SHARE_MAX && diag_pacf(given, order, pacf) == HN_OK)
            return diag_predictable_share(pacf, order, n);
        return NAN;
    }
    double *acf = malloc((size_t)order * sizeof *acf), *pacf = malloc((size_t)order * sizeof *pacf);
    double *sq = squares ? hn_alloc_long(n * sizeof *sq) : NULL;
    double share = NAN;
    if (!acf || !pacf || (squares && !sq)) {
        *ok_mem = 0;
    } else {
        const double *src = x;
        if (squares) {
            for (size_t i = 0; i < n; i++)
                sq[i] = x[i] * x[i];
            src = sq;
        }
        if (diag_acf(src, n, order, acf) == HN_OK && diag_pacf(acf, order, pacf) == HN_OK)
            share = diag_predictable_share(pacf, order, n);
    }
    free(acf);
    free(pacf);
    free(sq);
    return share;
}

/* Criterion p-values (Bonferroni within) and the Holm step-down decision. */
static void decide(diag_battery *b)
{
    int order[DIAG_NCRIT], k = 0;
    for (int c = 0; c < DIAG_NCRIT; c++) {
        double pmin = INFINITY;
        int valid = 0;
        for (int i = 0; i < b->ntests; i++) {
            const diag_test *t = &b->tests[i];
            if ((int)t->criterion != c || !t->valid || !isfinite(t->p))
                continue;
            valid++;
            if (t->p < pmin)
                pmin = t->p;
        }
        b->crit_p[c] = valid ? fmin(1.0, valid * pmin) : NAN;
        b->crit_pass[c] = 1;
        b->holm_rank[c] = 0;
        if (c != DIAG_NORMAL && valid)
            order[k++] = c;
    }
    /* Sort the judged white-noise criteria by p (ties keep criterion order). */
    for (int i = 1; i < k; i++) {
        int v = order[i], j = i;
        while (j > 0 && b->crit_p[order[j - 1]] > b->crit_p[v]) {
            order[j] = order[j - 1];
            j--;
        }
        order[j] = v;
    }
    int stopped = 0;
    for (int i = 0; i < k; i++) {
        int c = order[i];
        b->holm_rank[c] = i + 1;
        if (!stopped && b->crit_p[c] < b->alpha / (double)(k - i))
            b->crit_pass[c] = 0;
        else
            stopped = 1;
    }
    if (isfinite(b->crit_p[DIAG_NORMAL]))
        b->crit_pass[DIAG_NORMAL] = !(b->crit_p[DIAG_NORMAL] < b->alpha);
    b->white = 1;
    for (int c = 0; c < DIAG_NCRIT; c++)
        if (c != DIAG_NORMAL && !b->crit_pass[c])
            b->white = 0;
}

/* Effect of the first valid test of criterion C (they share one per criterion). */
static double crit_effect(const diag_battery *b, diag_criterion c)
{
    for (int i = 0; i < b->ntests; i++)
        if (b->tests[i].criterion == c && b->tests[i].valid && isfinite(b->tests[i].effect))
            return b->tests[i].effect;
    return NAN;
}

static void write_summary(diag_battery *b, const diag_options *opt)
{
    int judged = 0;
    for (int c = 0; c < DIAG_NCRIT; c++)
        if (c != DIAG_NORMAL && b->holm_rank[c] > 0)
            judged++;
    b->summary[0] = 0;
    if (b->white) {
        say(b, "White noise at alpha %g: all %d judged criteria met (Holm).", b->alpha, judged);
    } else {
        say(b, "Not white noise at alpha %g (Holm over %d criteria). Not met:", b->alpha, judged);
        int first = 1;
        for (int c = 0; c < DIAG_NCRIT; c++) {
            if (c == DIAG_NORMAL || b->crit_pass[c])
                continue;
            say(b, "%s %s (Holm step %d, p %.2g)", first ? "" : ";",
                diag_criterion_name((diag_criterion)c), b->holm_rank[c], b->crit_p[c]);
            first = 0;
        }
        say(b, ".");
    }
    const diag_criterion sized[2] = { DIAG_SERIAL, DIAG_VOLATILITY };
    for (int k = 0; k < 2; k++) {
        diag_criterion c = sized[k];
        double e = crit_effect(b, c);
        const char *what = k ? "Volatility clustering" : "Serial correlation";
        const char *on = k ? " of x^2" : "";
        if (!isfinite(e) || b->holm_rank[c] == 0)
            continue;
        if (!b->crit_pass[c] && e < NEGLIGIBLE_SHARE)
            say(b, " %s: significant but negligible (a long AR%s predicts %.1f%% of its variance).",
                what, on, 100.0 * e);
        else if (b->crit_pass[c] && e >= SIZEABLE_SHARE)
            say(b, " %s: not significant, yet a long AR%s would predict %.0f%% of its variance;"
                   " n = %zu is short for a firm verdict.", what, on, 100.0 * e, b->n);
    }
    int none = 0;
    for (int c = 0; c < DIAG_NCRIT; c++)
        if (c != DIAG_NORMAL && b->holm_rank[c] == 0) {
            say(b, "%s %s", none ? "," : " Not judged (no valid check):",
                diag_criterion_name((diag_criterion)c));
            none = 1;
        }
    if (none)
        say(b, ".");
    if (isfinite(b->crit_p[DIAG_NORMAL]))
        say(b, " Normality (not in the verdict): %s, p %.2g.",
            b->crit_pass[DIAG_NORMAL] ? "not rejected" : "rejected", b->crit_p[DIAG_NORMAL]);
    if (opt->standardised)
        say(b, " McLeod-Li and ARCH-LM df are not reduced for the 2 GARCH parameters.");
    /* Mark a cut-off summary rather than end it mid-word unannounced. */
    size_t len = strlen(b->summary);
    if (len + 1 >= sizeof b->summary)
        memcpy(b->summary + len - 3, "...", 3);
}

/* The battery's ACF of X to TOP lags (from D and SS0 when given, the
 * direct route's digits), its PACF and the Ljung-Box profile (df = k -
 * DF_ADJUST) into OUT.  HN_OK or diag_acf's status. */
static int battery_acf(const double *x, const double *d, double ss0, size_t n, size_t top,
                       int df_adjust, diag_battery *out)
{
    int rc = d ? diag_acf_centred(d, n, ss0, (int)top, out->acf) : diag_acf(x, n, (int)top, out->acf);
    if (rc != HN_OK)
        return rc;
    if (diag_pacf(out->acf, (int)top, out->pacf) != HN_OK) {
        /* Left as NAN from the failing lag on (diag_pacf marks them). */
    }
    double dn = (double)n, q = 0.0;
    for (size_t k = 1; k <= top; k++) {
        q += out->acf[k - 1] * out->acf[k - 1] / (dn - (double)k);
        out->profile_q[k - 1] = dn * (dn + 2.0) * q;
        int df = (int)k - df_adjust;
        out->profile_p[k - 1] = df >= 1 ? gsl_cdf_chisq_Q(out->profile_q[k - 1], (double)df) : NAN;
    }
    return HN_OK;
}

/* The ACF of x^2 to TOP2 lags into a new array *ACF2, with the sums it
 * comes from in S and a new array *LAG2; NULLs (and HN_OK) when a value is
 * not finite or the squares are constant, so that each check then says why
 * itself; HN_ENOMEM. */
static int squares_acf(const double *x, size_t n, int top2, double **acf2, diag_lag_sums *s,
                       double **lag2)
{
    double *a = malloc((size_t)top2 * sizeof *a), *l = malloc((size_t)top2 * sizeof *l);
    *acf2 = *lag2 = NULL;
    if (!a || !l) {
        free(a);
        free(l);
        return HN_ENOMEM;
    }
    /* the squares formed on the way: the digits of diag_acf on a copy of them */
    int rc = diag_lag_sums_of(x, n, 1, top2, s, l);
    if (rc == HN_OK && !(s->ss0 > 0.0))
        rc = HN_ECONST;
    if (rc != HN_OK) {
        free(a);
        free(l);
        return rc == HN_ENOMEM ? HN_ENOMEM : HN_OK;
    }
    for (int k = 0; k < top2; k++)
        a[k] = l[k] / s->ss0;
    *acf2 = a;
    *lag2 = l;
    return HN_OK;
}

int diag_battery_run(const double *x, size_t n, const diag_options *opt, diag_battery *out)
{
    diag_options def = diag_default_options();
    if (!opt)
        opt = &def;
    memset(out, 0, sizeof *out);
    if (!x || !(opt->alpha > 0.0 && opt->alpha < 1.0) || opt->lags < 0 || opt->df_adjust < 0 ||
        opt->arch_lags < 0)
        return HN_EINVAL;
    if (n < 8)
        return HN_ESHORT;
    out->n = n;
    out->alpha = opt->alpha;
    out->band = gsl_cdf_ugaussian_Qinv(opt->alpha / 2.0) / sqrt((double)n);

    /* Portmanteau lags. */
    if (opt->lags > 0) {
        out->m = opt->lags;
        out->lag_rule = "set by the user";
    } else {
        size_t m = n / 5 < 10 ? n / 5 : 10;
        out->m = (int)m;
        out->lag_rule = "min(10, n/5)";
        if (out->m < opt->df_adjust + 1) {
            out->m = opt->df_adjust + 1;
            out->lag_rule = "min(10, n/5), raised to p+q+1 so that df >= 1";
        }
    }
    /* Blocks for local mean and variance. */
    size_t w;
    if (opt->window > 0) {
        w = opt->window;
        out->window_rule = "set by the user";
    } else {
        w = n / 10 > 10 ? n / 10 : 10;
        out->window_rule = "max(10, n/10): ten blocks from n = 100, at least 10 per block";
    }
    out->window = w;
    int arch_q = opt->arch_lags > 0 ? opt->arch_lags : (n / 10 < 5 ? (int)(n / 10) : 5);
    if (arch_q < 1)
        arch_q = 1;

    /* ACF, PACF and the Ljung-Box profile. */
    size_t top = (size_t)(out->m > 20 ? out->m : 20);
    if (top > n - 1)
        top = n - 1;
    out->acf_lags = (int)top;
    out->acf = malloc(top * sizeof *out->acf);
    out->pacf = malloc(top * sizeof *out->pacf);
    out->profile_q = malloc(top * sizeof *out->profile_q);
    out->profile_p = malloc(top * sizeof *out->profile_p);
    if (!out->acf || !out->pacf || !out->profile_q || !out->profile_p) {
        diag_battery_free(out);
        return HN_ENOMEM;
    }

    /* The autocorrelations of x (above) and of x^2, once for every check that
     * reads them, where diag_acf takes its direct route for all of them (so
     * that each check sees the same digits as when it computes its own). */
    int order = diag_share_order(n);
    int top2 = out->m > order ? out->m : order;
    int share_x = diag_acf_is_direct(n, (int)top);
    int want2 = share_x && (size_t)top2 <= n - 1 && diag_acf_is_direct(n, top2);

    /* The checks are independent of one another: tasks on the threads of
     * one team, unless the battery already runs inside a parallel region
     * (scan, batch) or the series is too short to gain; each result lands
     * in its own slot, so the order and digits are those of one thread. */
    /* On the direct route the series is centred once for the ACF, the
     * cumulative periodogram and Jarque-Bera (each would form the same copy). */
    double *dev = share_x ? hn_alloc_long(n * sizeof *dev) : NULL, ss0 = 0.0;
    if (share_x && !dev) {
        diag_battery_free(out);
        return HN_ENOMEM;
    }
    diag_lag_sums sums2;
    run_ctx ctx = { x, n, out->m, opt->df_adjust, arch_q, n / w, opt->alpha,
                    share_x ? out->acf : NULL, NULL, (int)top, top2, &sums2, NULL,
                    dev, 0.0, 0.0 };
    int rc = HN_OK, rc_acf = HN_OK, rc_acf2 = HN_OK, rcs[NCHECKS];
    double *acf2 = NULL, *lag2 = NULL;
    int par = !omp_in_parallel() && n >= PARALLEL_MIN_N;
#pragma omp parallel if (par)
#pragma omp single
    {
        /* The checks that read x alone start first, for the other threads
         * to take while this one forms the mean and sd (and on the direct
         * route the centred copy from the same mean); their results are
         * dropped should that fail. */
#pragma omp task shared(rc_acf2, acf2, lag2, sums2, ctx) depend(out: rc_acf2)
        {
            rc_acf2 = want2 ? squares_acf(x, n, top2, &acf2, &sums2, &lag2) : HN_OK;
            ctx.acf2 = acf2;
            ctx.lag2 = lag2;
        }
        for (size_t k = 0; k < NCHECKS; k++) {
            size_t i = COST_ORDER[k];
            if (needs_centre(i) || (i > 0 && CHECKS[i - 1].c.pair))
                continue;
            if (CHECKS[i].c.pair) {
#pragma omp task shared(ctx, out, rcs)
                rcs[i] = CHECKS[i].c.pair(x, n, ctx.nblocks, ctx.alpha, &out->tests[i],
                                          &out->tests[i + 1], &rcs[i + 1]);
            } else if (CHECKS[i].a.sums || CHECKS[i].a.sq) {
#pragma omp task shared(ctx, out, rcs, rc_acf2) depend(in: rc_acf2)
                rcs[i] = run_check(i, &ctx, &out->tests[i]);
            } else {
#pragma omp task shared(ctx, out, rcs)
                rcs[i] = run_check(i, &ctx, &out->tests[i]);
            }
        }
        rc = dev ? diag_center_ss_sd(x, n, dev, &ss0, &out->mean, &out->sd)
                 : diag_mean_sd(x, n, &out->mean, &out->sd);
        if (rc == HN_OK && !(out->sd > 0.0))
            rc = HN_ECONST;
        ctx.mean = out->mean;
        ctx.sd = out->sd;
        if (rc == HN_OK) {
#pragma omp task shared(rc_acf, out, ctx, ss0) depend(out: rc_acf)
            rc_acf = battery_acf(x, ctx.d, ss0, n, top, opt->df_adjust, out);
            for (size_t k = 0; k < NCHECKS; k++) {
                size_t i = COST_ORDER[k];
                if (!needs_centre(i) || CHECKS[i].c.bare) {
                    continue;
                } else if (CHECKS[i].a.adj || CHECKS[i].a.plain) {
#pragma omp task shared(ctx, out, rcs, rc_acf) depend(in: rc_acf)
                    rcs[i] = rc_acf == HN_OK ? run_check(i, &ctx, &out->tests[i]) : rc_acf;
                } else {
#pragma omp task shared(ctx, out, rcs)
                    rcs[i] = run_check(i, &ctx, &out->tests[i]);
                }
            }
            /* the longest check (it needs only the centred copy) on this
             * thread at once: the tasks it makes share the others' team,
             * and it waits only for its own */
            for (size_t i = 0; i < NCHECKS; i++)
                if (CHECKS[i].c.bare)
                    rcs[i] = run_check(i, &ctx, &out->tests[i]);
        }
    }
    if (rc != HN_OK) {
        free(dev);
        free(acf2);
        free(lag2);
        diag_battery_free(out);
        return rc;
    }
    free(dev);
    ctx.d = NULL;
    if (rc_acf != HN_OK || rc_acf2 == HN_ENOMEM) {
        free(acf2);
        free(lag2);
        diag_battery_free(out);
        return rc_acf != HN_OK ? rc_acf : HN_ENOMEM;
    }
    out->ntests = (int)NCHECKS;
    for (size_t i = 0; i < NCHECKS; i++) {
        diag_test *t = &out->tests[i];
        if (rcs[i] == HN_ENOMEM) {
            free(acf2);
            free(lag2);
            diag_battery_free(out);
            return HN_ENOMEM;
        }
        t->criterion = CHECKS[i].criterion;
        if (CHECKS[i].kind == ARG_BLOCKS && ctx.nblocks < 2 && !t->valid)
            snprintf(t->detail, sizeof t->detail,
                     "needs at least 2 blocks: n = %zu holds %zu of width %zu", n, ctx.nblocks, w);
    }

    /* Practical size beside significance. */
    int mem_ok = 1;
    double serial = ar_share(x, n, 0, ctx.acf, &mem_ok);
    double vol = ar_share(x, n, 1, acf2, &mem_ok);
    free(acf2);
    free(lag2);
    if (!mem_ok) {
        diag_battery_free(out);
        return HN_ENOMEM;
    }
    for (int i = 0; i < out->ntests; i++) {
        diag_test *t = &out->tests[i];
        if (!t->valid)
            continue;
        if (t->criterion == DIAG_SERIAL) {
            t->effect = serial;
            t->effect_label = "share of variance a long autoregression predicts (order-adjusted)";
        } else if (t->criterion == DIAG_VOLATILITY) {
            t->effect = vol;
            t->effect_label = VOL_EFFECT;
        }
    }

    decide(out);
    write_summary(out, opt);
    return HN_OK;
}

void diag_battery_free(diag_battery *b)
{
    if (!b)
        return;
    free(b->acf);
    free(b->pacf);
    free(b->profile_q);
    free(b->profile_p);
    b->acf = b->pacf = b->profile_q = b->profile_p = NULL;
}
