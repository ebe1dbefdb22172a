/* diag_advise.c - map the failed criteria of a battery to ranked proposals for the next model. */
#include "diag_advise.h"
#include "hn_status.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>

#define MAX_SPIKES 8

diag_advise_context diag_advise_default_context(void)
{
    diag_advise_context c;
    memset(&c, 0, sizeof c);
    c.max_ar_terms = 6;
    c.max_ma_terms = 6;
    c.obs_per_param = 10;
    c.spikes = 2;
    return c;
}

const char *diag_advice_kind_id(diag_advice_kind k)
{
    switch (k) {
    case DIAG_ADV_AR: return "ar";
    case DIAG_ADV_MA: return "ma";
    case DIAG_ADV_SEASONAL_AR: return "seasonal-ar";
    case DIAG_ADV_SEASONAL_MA: return "seasonal-ma";
    case DIAG_ADV_CONSTANT: return "constant";
    case DIAG_ADV_DIFFERENCE: return "difference";
    case DIAG_ADV_LEVEL_SHIFT: return "level-shift";
    case DIAG_ADV_GARCH: return "garch";
    case DIAG_ADV_STUDENT_T: return "student-t";
    case DIAG_ADV_VARIANCE_SHIFT: return "variance-shift";
    case DIAG_ADV_VOL_REMAINS: return "volatility-remains";
    case DIAG_ADV_ADEQUATE: return "adequate";
    case DIAG_ADV_SIMPLER: return "simpler";
    }
    return "?";
}

int diag_advise_supported(const fit_spec *spec, size_t n, const diag_advise_context *ctx, char *why,
                          size_t len)
{
    diag_advise_context d = diag_advise_default_context();
    if (!ctx)
        ctx = &d;
    char text[128];
    fit_spec_format(spec, text, sizeof text);
    int maxar = fit_spec_max_ar(spec), maxma = fit_spec_max_ma(spec);
    int maxlag = maxar > maxma ? maxar : maxma;
    /* parameters in the likelihood: the estimates plus sigma2 when it is
     * concentrated out (no GARCH part) */
    int k = fit_spec_nparams(spec) + (spec->garch ? 0 : 1);
    size_t per = ctx->obs_per_param > 0 ? (size_t)ctx->obs_per_param : 1;
    const char *r = NULL;
    char buf[256];
    if (spec->n_ar > ctx->max_ar_terms) {
        snprintf(buf, sizeof buf, "%s has more than %d AR terms", text, ctx->max_ar_terms);
        r = buf;
    } else if (spec->n_ma > ctx->max_ma_terms) {
        snprintf(buf, sizeof buf, "%s has more than %d MA terms", text, ctx->max_ma_terms);
        r = buf;
    } else if ((size_t)maxlag * 4 >= n) {
        snprintf(buf, sizeof buf, "%s uses lag %d, not below n/4 = %zu/4", text, maxlag, n);
        r = buf;
    } else if (n - (size_t)maxar < per * (size_t)k) {
        snprintf(buf, sizeof buf, "%s has %d parameters for %zu residuals (fewer than %zu per parameter)",
                 text, k, n - (size_t)maxar, per);
        r = buf;
    } else if (spec->garch && n < 100) {
        snprintf(buf, sizeof buf, "%s: a GARCH part needs at least 100 observations, the series has %zu",
                 text, n);
        r = buf;
    }
    if (r && why && len)
        snprintf(why, len, "%s", r);
    return r == NULL;
}

/* ---- building the list ---------------------------------------------------- */

typedef struct {
    const diag_battery *b;
    const fit_spec *cur;
    const diag_advise_context *ctx;
    size_t n;
    diag_advice_list *out;
} adv_state;

static double strength_of(double p)
{
    if (!(p >= 0))
        return 0.0;
    if (p < 1e-300)
        p = 1e-300;
    return p >= 1 ? 0.0 : -log10(p);
}

static int already_fitted(const adv_state *st, const fit_spec *s)
{
    for (int i = 0; i < st->ctx->nfitted; i++)
        if (fit_spec_equal(&st->ctx->fitted[i], s))
            return 1;
    return 0;
}

static void note_dropped(adv_state *st, const char *why)
{
    if (!st->out->dropped++)
        snprintf(st->out->dropped_why, sizeof st->out->dropped_why, "%s", why);
}

/* Append an item; SPEC NULL for advice without a model.  Proposals outside
 * the bounds, already fitted, or repeating an earlier item's model are left
 * out (the first two counted in dropped). */
static void add_item(adv_state *st, diag_advice_kind kind, const fit_spec *spec, diag_criterion crit,
                     const char *check, int lag, double stat, double p, double strength,
                     const char *fmt, ...) __attribute__((format(printf, 10, 11)));

static void add_item(adv_state *st, diag_advice_kind kind, const fit_spec *spec, diag_criterion crit,
                     const char *check, int lag, double stat, double p, double strength,
                     const char *fmt, ...)
{
    diag_advice_list *o = st->out;
    if (spec) {
        char why[256];
        if (!diag_advise_supported(spec, st->n, st->ctx, why, sizeof why)) {
            note_dropped(st, why);
            return;
        }
        if (already_fitted(st, spec)) {
            char text[128];
            fit_spec_format(spec, text, sizeof text);
            snprintf(why, sizeof why, "%s was fitted already", text);
            note_dropped(st, why);
            return;
        }
        for (int i = 0; i < o->n; i++)
            if (o->item[i].has_spec && fit_spec_equal(&o->item[i].spec, spec))
                return;
    }
    if (o->n >= DIAG_MAX_ADVICE)
        return;
    diag_advice *a = &o->item[o->n++];
    memset(a, 0, sizeof *a);
    a->kind = kind;
    a->has_spec = spec != NULL;
    if (spec) {
        a->spec = *spec;
        fit_spec_format(spec, a->spec_text, sizeof a->spec_text);
    }
    a->criterion = crit;
    a->check = check;
    a->lag = lag;
    a->statistic = stat;
    a->p = p;
    a->strength = strength;
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(a->reason, sizeof a->reason, fmt, ap);
    va_end(ap);
}

/* The valid check of criterion C with the smallest p, or NULL. */
static const diag_test *worst_check(const diag_battery *b, diag_criterion c)
{
    const diag_test *w = NULL;
    for (int i = 0; i < b->ntests; i++) {
        const diag_test *t = &b->tests[i];
        if (t->criterion == c && t->valid && (!w || t->p < w->p))
            w = t;
    }
    return w;
}

static const diag_test *find_check(const diag_battery *b, const char *name)
{
    for (int i = 0; i < b->ntests; i++)
        if (b->tests[i].name && !strcmp(b->tests[i].name, name) && b->tests[i].valid)
            return &b->tests[i];
    return NULL;
}

/* "ljung-box statistic 54.66, p 3.6e-08" for the failing criterion. */
static void criterion_words(const diag_battery *b, diag_criterion c, char *buf, size_t len)
{
    const diag_test *w = worst_check(b, c);
    if (w)
        snprintf(buf, len, "%s fails (%s statistic %.4g, p %.2g)", diag_criterion_name(c), w->name,
                 w->statistic, w->p);
    else
        snprintf(buf, len, "%s fails (criterion p %.2g)", diag_criterion_name(c), b->crit_p[c]);
}

static int has_lag(const int *lags, int n, int k)
{
    for (int i = 0; i < n; i++)
        if (lags[i] == k)
            return 1;
    return 0;
}

/* 1 when the lags are exactly 1..n. */
static int contiguous(const int *lags, int n)
{
    for (int i = 0; i < n; i++)
        if (lags[i] != i + 1)
            return 0;
    return 1;
}

/* Lags 1..L whose |r| leaves the band and that the part does not hold yet,
 * strongest first: the top SPIKES, plus the seasonal lag when it spikes. */
static int pick_spikes(const adv_state *st, const double *r, const int *have, int nhave, int *lag)
{
    const diag_battery *b = st->b;
    int L = b->acf_lags;
    while (L > 0 && (size_t)L * 4 >= st->n)
        L--;
    int cand[FIT_MAX_LAG], nc = 0;
    for (int k = 1; k <= L && nc < FIT_MAX_LAG; k++)
        if (fabs(r[k - 1]) > b->band && !has_lag(have, nhave, k))
            cand[nc++] = k;
    /* insertion sort by |r| descending, lower lag first on ties */
    for (int i = 1; i < nc; i++) {
        int k = cand[i], j = i - 1;
        while (j >= 0 && fabs(r[cand[j] - 1]) < fabs(r[k - 1])) {
            cand[j + 1] = cand[j];
            j--;
        }
        cand[j + 1] = k;
    }
    int want = st->ctx->spikes > 0 ? st->ctx->spikes : 1;
    if (want > MAX_SPIKES - 1)
        want = MAX_SPIKES - 1;
    int n = nc < want ? nc : want;
    for (int i = 0; i < n; i++)
        lag[i] = cand[i];
    int s = st->ctx->season;
    if (s > 1)
        for (int i = n; i < nc; i++)
            if (cand[i] == s) {
                lag[n++] = s;
                break;
            }
    return n;
}

static void serial_rule(adv_state *st)
{
    const diag_battery *b = st->b;
    const fit_spec *cur = st->cur;
    char crit[160];
    criterion_words(b, DIAG_SERIAL, crit, sizeof crit);
    double sqn = sqrt((double)b->n);
    int lag[MAX_SPIKES];
    int found = 0;
    for (int part = 0; part < 2; part++) {
        const double *r = part ? b->acf : b->pacf;
        const int *have = part ? cur->ma_lag : cur->ar_lag;
        int nhave = part ? cur->n_ma : cur->n_ar;
        int n = pick_spikes(st, r, have, nhave, lag);
        found += n;
        for (int i = 0; i < n; i++) {
            int k = lag[i];
            double z = fabs(r[k - 1]) * sqn;
            double p = 2.0 * gsl_cdf_ugaussian_Q(z);
            fit_spec s = *cur;
            if ((part ? fit_spec_add_ma(&s, k) : fit_spec_add_ar(&s, k)) != HN_OK)
                continue;
            int seasonal = st->ctx->season > 1 && k == st->ctx->season;
            int next = k == nhave + 1 && contiguous(have, nhave);
            const char *what = part ? "MA" : "AR";
            char how[96];
            if (seasonal)
                snprintf(how, sizeof how, "a seasonal %s term at lag %d (period %d)", what, k, k);
            else if (next)
                snprintf(how, sizeof how, "raise the %s order from %d to %d", what, nhave, k);
            else
                snprintf(how, sizeof how, "add an %s term at lag %d", what, k);
            diag_advice_kind kind = part ? (seasonal ? DIAG_ADV_SEASONAL_MA : DIAG_ADV_MA)
                                         : (seasonal ? DIAG_ADV_SEASONAL_AR : DIAG_ADV_AR);
            add_item(st, kind, &s, DIAG_SERIAL, part ? "acf" : "pacf", k, r[k - 1], p, strength_of(p),
                     "%s; residual %s at lag %d is %.3f, outside the band +/-%.3f (z %.1f, p %.2g): %s",
                     crit, part ? "ACF" : "PACF", k, r[k - 1], b->band, z, p, how);
        }
    }
    /* The next order of each part is always a neighbour: the smallest
     * change.  Its evidence is its own lag's value when spikes were found,
     * else (no single lag leaves the band) the criterion's p. */
    for (int part = 0; part < 2; part++) {
        const double *r = part ? b->acf : b->pacf;
        const int *have = part ? cur->ma_lag : cur->ar_lag;
        int nhave = part ? cur->n_ma : cur->n_ar;
        int k = 1;
        while (has_lag(have, nhave, k))
            k++;
        fit_spec s = *cur;
        if ((part ? fit_spec_add_ma(&s, k) : fit_spec_add_ar(&s, k)) != HN_OK)
            continue;
        const char *what = part ? "MA" : "AR";
        const char *fn = part ? "ACF" : "PACF";
        if (found && k <= b->acf_lags) {
            double z = fabs(r[k - 1]) * sqn;
            double p = 2.0 * gsl_cdf_ugaussian_Q(z);
            add_item(st, part ? DIAG_ADV_MA : DIAG_ADV_AR, &s, DIAG_SERIAL, part ? "acf" : "pacf", k,
                     r[k - 1], p, strength_of(p),
                     "%s; residual %s at lag %d is %.3f, %s the band +/-%.3f (z %.1f, p %.2g): the "
                     "next %s lag is the smallest change", crit, fn, k, r[k - 1],
                     fabs(r[k - 1]) > b->band ? "outside" : "inside", b->band, z, p, what);
        } else {
            double p = b->crit_p[DIAG_SERIAL];
            const diag_test *w = worst_check(b, DIAG_SERIAL);
            add_item(st, part ? DIAG_ADV_MA : DIAG_ADV_AR, &s, DIAG_SERIAL, w ? w->name : NULL, k, NAN,
                     p, strength_of(p),
                     "%s; no single lag leaves the band +/-%.3f, so the next %s lag (%d) is the smallest "
                     "change", crit, b->band, what, k);
        }
    }
}

static void mean_rule(adv_state *st)
{
    const diag_battery *b = st->b;
    char crit[160];
    criterion_words(b, DIAG_MEAN, crit, sizeof crit);
    double p = b->crit_p[DIAG_MEAN];
    const diag_unitroot *u = st->ctx->unitroot;
    if (u && u->difference == 1) {
        add_item(st, DIAG_ADV_DIFFERENCE, NULL, DIAG_MEAN, "adf", 0, u->adf.statistic, p, strength_of(p),
                 "%s; the unit-root tests point to an integrated series (ADF tau %.3f, p %s%.2g; KPSS "
                 "eta %.3f, p %s%.2g): difference the series ('transform diff') and fit again",
                 crit, u->adf.statistic, u->adf.p_bound > 0 ? ">=" : u->adf.p_bound < 0 ? "<=" : "",
                 u->adf.p, u->kpss.statistic, u->kpss.p_bound > 0 ? ">=" : u->kpss.p_bound < 0 ? "<=" : "",
                 u->kpss.p);
        return;
    }
    if (!st->cur->mean) {
        fit_spec s = *st->cur;
        s.mean = 1;
        add_item(st, DIAG_ADV_CONSTANT, &s, DIAG_MEAN, "mean-t", 0, NAN, p, strength_of(p),
                 "%s; the model fixes the mean at zero: estimate the constant", crit);
        return;
    }
    add_item(st, DIAG_ADV_LEVEL_SHIFT, NULL, DIAG_MEAN, "mean-t", 0, NAN, p, strength_of(p),
             "%s although a constant is estimated: look for a level shift (a break) in the series",
             crit);
}

static void volatility_rule(adv_state *st, int heavy, double kurt, double pnorm)
{
    const diag_battery *b = st->b;
    char crit[160];
    criterion_words(b, DIAG_VOLATILITY, crit, sizeof crit);
    double p = b->crit_p[DIAG_VOLATILITY];
    const diag_test *w = worst_check(b, DIAG_VOLATILITY);
    const char *check = w ? w->name : NULL;
    double stat = w ? w->statistic : NAN;
    if (st->cur->garch) {
        add_item(st, DIAG_ADV_VOL_REMAINS, NULL, DIAG_VOLATILITY, check, 0, stat, p, strength_of(p),
                 "%s with a GARCH(1,1) variance already in the model: the clustering has a form "
                 "GARCH(1,1) does not capture (asymmetry, longer memory or a break)", crit);
        return;
    }
    fit_spec s = *st->cur;
    s.garch = 1;
    s.dist = FIT_DIST_NORMAL;
    add_item(st, DIAG_ADV_GARCH, &s, DIAG_VOLATILITY, check, 0, stat, p, strength_of(p),
             "%s: the squared residuals are correlated; add a GARCH(1,1) variance", crit);
    if (heavy) {
        s.dist = FIT_DIST_T;
        /* ranked just below the normal GARCH: the tails are judged again
         * once the variance is modelled */
        double sg = fmin(strength_of(p), strength_of(pnorm));
        add_item(st, DIAG_ADV_GARCH, &s, DIAG_VOLATILITY, check, 0, stat, p, sg * 0.999,
                 "%s and the residuals are heavy-tailed (excess kurtosis %.2f, jarque-bera p %.2g): "
                 "add a GARCH(1,1) variance with Student-t innovations", crit, kurt, pnorm);
    }
}

/* Simpler neighbours of a model that passes: drop its last AR lag, its last
 * MA lag, or its variance part. */
static void simpler_rule(adv_state *st)
{
    const fit_spec *cur = st->cur;
    char text[128];
    fit_spec_format(cur, text, sizeof text);
    if (cur->n_ar) {
        fit_spec s = *cur;
        int k = s.ar_lag[--s.n_ar];
        add_item(st, DIAG_ADV_SIMPLER, &s, DIAG_NCRIT, NULL, k, NAN, NAN, 0.0,
                 "%s passes every criterion; for parsimony try it without the AR term at lag %d", text, k);
    }
    if (cur->n_ma) {
        fit_spec s = *cur;
        int k = s.ma_lag[--s.n_ma];
        add_item(st, DIAG_ADV_SIMPLER, &s, DIAG_NCRIT, NULL, k, NAN, NAN, 0.0,
                 "%s passes every criterion; for parsimony try it without the MA term at lag %d", text, k);
    }
    if (cur->garch) {
        fit_spec s = *cur;
        s.garch = 0;
        s.dist = FIT_DIST_NORMAL;
        add_item(st, DIAG_ADV_SIMPLER, &s, DIAG_NCRIT, NULL, 0, NAN, NAN, 0.0,
                 "%s passes every criterion; for parsimony try it with a constant variance", text);
    }
}

/* Order: strength descending; on ties the rule order (kind) and then the
 * order of insertion (stable). */
static void rank_items(diag_advice_list *o, int from)
{
    for (int i = from + 1; i < o->n; i++) {
        diag_advice a = o->item[i];
        int j = i - 1;
        while (j >= from && (o->item[j].strength < a.strength ||
                             (o->item[j].strength == a.strength && o->item[j].kind > a.kind))) {
            o->item[j + 1] = o->item[j];
            j--;
        }
        o->item[j + 1] = a;
    }
    for (int i = 0; i < o->n; i++)
        o->item[i].rank = i + 1;
}

int diag_advise(const diag_battery *b, const fit_spec *cur, const diag_advise_context *ctx,
                diag_advice_list *out)
{
    if (!b || !cur || !out)
        return HN_EINVAL;
    memset(out, 0, sizeof *out);
    if (!b->acf || !b->pacf || b->acf_lags < 1)
        return HN_EINVAL;
    diag_advise_context d = diag_advise_default_context();
    if (!ctx)
        ctx = &d;
    adv_state st = { b, cur, ctx, ctx->n ? ctx->n : b->n, out };

    const diag_test *jb = find_check(b, "jarque-bera");
    double kurt = jb ? jb->effect : NAN;
    double pnorm = jb ? jb->p : NAN;
    int heavy = !b->crit_pass[DIAG_NORMAL] && kurt > 0;

    int first = 0;
    if (b->white) {
        out->adequate = 1;
        char text[128];
        fit_spec_format(cur, text, sizeof text);
        add_item(&st, DIAG_ADV_ADEQUATE, NULL, DIAG_NCRIT, NULL, 0, NAN, NAN, 0.0,
                 "%s: every white-noise criterion passes at alpha %.3g (Holm); the model is "
                 "statistically adequate", text, b->alpha);
        first = 1;
    }
    if (!b->crit_pass[DIAG_SERIAL])
        serial_rule(&st);
    if (!b->crit_pass[DIAG_MEAN])
        mean_rule(&st);
    if (!b->crit_pass[DIAG_VOLATILITY])
        volatility_rule(&st, heavy, kurt, pnorm);
    if (cur->garch && cur->dist == FIT_DIST_NORMAL && b->crit_pass[DIAG_VOLATILITY] && heavy) {
        fit_spec s = *cur;
        s.dist = FIT_DIST_T;
        add_item(&st, DIAG_ADV_STUDENT_T, &s, DIAG_NORMAL, "jarque-bera", 0, jb->statistic, pnorm,
                 strength_of(pnorm),
                 "volatility clustering is gone but the standardised residuals are heavy-tailed "
                 "(jarque-bera statistic %.4g, p %.2g; excess kurtosis %.2f): use Student-t innovations",
                 jb->statistic, pnorm, kurt);
    }
    if (!b->crit_pass[DIAG_VARIANCE] && b->crit_pass[DIAG_VOLATILITY]) {
        char crit[160];
        criterion_words(b, DIAG_VARIANCE, crit, sizeof crit);
        double p = b->crit_p[DIAG_VARIANCE];
        const diag_test *w = worst_check(b, DIAG_VARIANCE);
        add_item(&st, DIAG_ADV_VARIANCE_SHIFT, NULL, DIAG_VARIANCE, w ? w->name : NULL, 0,
                 w ? w->statistic : NAN, p, strength_of(p),
                 "%s while no volatility clustering is found: the variance shifts between blocks; "
                 "model a break or use a variance-stabilising transform ('transform log' or "
                 "'transform boxcox L' on positive data), not GARCH", crit);
    }
    if (b->white)
        simpler_rule(&st);
    rank_items(out, first);
    return HN_OK;
}
