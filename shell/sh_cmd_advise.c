/* sh_cmd_advise.c - the advice commands: advise, step, refine, scan. */
#include "sh_handlers.h"
#include "sh_fmt.h"
#include "sh_refine.h"
#include "sh_report_text.h"
#include "sh_scan.h"
#include "hn_status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static const char *ic_name(sh_ic ic)
{
    return ic == SH_IC_BIC ? "BIC" : "AICc";
}

/* The current model, fitted to the working series. */
static sh_model *model_for_advice(sh_session *s)
{
    sh_model *m = sh_current_model(s);
    if (!m)
        return NULL;
    if (!s->y) {
        sh_fail(s, -1, "no working series");
        return NULL;
    }
    return m;
}

static int advise_or_fail(sh_session *s, sh_model *m, diag_advice_list *a)
{
    int rc = sh_advise_model(s, m, a);
    if (rc != HN_OK)
        return sh_fail(s, -1, "no advice for model %d: %s", m->id, hn_strerror(rc));
    return 0;
}

static void json_advice_item(sh_json *j, const diag_advice *a)
{
    sh_json_begin_object(j);
    sh_json_kint(j, "rank", a->rank);
    sh_json_key(j, "spec");
    if (a->has_spec)
        sh_json_string(j, a->spec_text);
    else
        sh_json_null(j);
    sh_json_kstring(j, "reason", a->reason);
    sh_json_kstring(j, "kind", diag_advice_kind_id(a->kind));
    sh_json_key(j, "criterion");
    if (a->criterion < DIAG_NCRIT)
        sh_json_string(j, diag_criterion_id(a->criterion));
    else
        sh_json_null(j);
    sh_json_key(j, "check");
    if (a->check)
        sh_json_string(j, a->check);
    else
        sh_json_null(j);
    sh_json_kint(j, "lag", a->lag);
    sh_json_knumber(j, "statistic", a->statistic, "no statistic for this advice");
    sh_json_knumber(j, "p", a->p, "no p-value for this advice");
    sh_json_knumber(j, "strength", a->strength, NULL);
    sh_json_end_object(j);
}

/* ---- advise --------------------------------------------------------------- */

static int cmd_advise(sh_session *s, sh_words *w)
{
    (void)w;
    sh_model *m = model_for_advice(s);
    if (!m)
        return -1;
    diag_advice_list a;
    if (advise_or_fail(s, m, &a))
        return -1;
    char spec[128];
    fit_spec_format(&m->fit.spec, spec, sizeof spec);
    sh_printf(s, "advice for model %d  %s: passes %d of 5 white-noise criteria\n", m->id, spec,
              sh_criteria_passed(&m->battery));
    if (!a.n)
        sh_printf(s, "  no rule proposes a change (the failed criteria have no model term in hone)\n");
    for (int i = 0; i < a.n; i++) {
        const diag_advice *it = &a.item[i];
        sh_printf(s, "  %2d. %s\n      ", it->rank, it->has_spec ? it->spec_text : "(no model to fit)");
        sh_wrap(s, it->reason, 6);
    }
    if (a.dropped)
        sh_printf(s, "  left out: %d proposal%s (first: %s)\n", a.dropped, a.dropped == 1 ? "" : "s",
                  a.dropped_why);
    sh_printf(s, "  bounds: lags below n/4, at least 10 residuals per parameter, at most 6 AR and 6 MA terms\n");
    sh_json *j = &s->j;
    sh_json_kint(j, "id", m->id);
    sh_json_kstring(j, "model", spec);
    sh_json_kbool(j, "adequate", a.adequate);
    sh_json_key(j, "advice");
    sh_json_begin_array(j);
    for (int i = 0; i < a.n; i++)
        json_advice_item(j, &a.item[i]);
    sh_json_end_array(j);
    sh_json_kint(j, "left_out", a.dropped);
    return 0;
}

/* ---- step ----------------------------------------------------------------- */

static int cmd_step(sh_session *s, sh_words *w)
{
    (void)w;
    sh_model *m = model_for_advice(s);
    if (!m)
        return -1;
    diag_advice_list a;
    if (advise_or_fail(s, m, &a))
        return -1;
    const diag_advice *top = NULL;
    for (int i = 0; i < a.n && !top; i++)
        if (a.item[i].has_spec)
            top = &a.item[i];
    int from = m->id;
    if (!top)
        return sh_fail(s, -1, "model %d: no proposal to fit%s%s", from, a.n ? ": " : "",
                       a.n ? a.item[0].reason : "");
    char origin[512];
    snprintf(origin, sizeof origin, "step on model %d: %.200s", from, top->reason);
    int id = 0;
    int rc = sh_fit_and_check(s, &top->spec, from, origin, &id);
    if (rc == HN_EINTR)
        return sh_fail(s, -1, "fit of %s interrupted; no model added", top->spec_text);
    if (rc != HN_OK && !id)
        return sh_fail(s, -1, "cannot fit %s: %s", top->spec_text, hn_strerror(rc));
    sh_model *nm = &s->models[id - 1];
    sh_printf(s, "step from model %d, advice %d: %s\n  ", from, top->rank, top->spec_text);
    sh_wrap(s, top->reason, 2);
    sh_text_fit(s, nm);
    sh_json_kint(&s->j, "from", from);
    sh_json_key(&s->j, "advice");
    json_advice_item(&s->j, top);
    sh_json_fit(s, nm);
    if (rc != HN_OK || !nm->checked)
        return sh_fail(s, -1, "model %d fitted but not checked: %s", id, hn_strerror(rc));
    sh_text_check(s, nm);
    sh_json_key(&s->j, "check");
    sh_json_begin_object(&s->j);
    sh_json_check(s, nm);
    sh_json_end_object(&s->j);
    return 0;
}

/* ---- refine --------------------------------------------------------------- */

static int parse_by(sh_session *s, sh_words *w, sh_ic *ic)
{
    const char *v = sh_words_value(w, "by");
    if (!v)
        return 0;
    if (!strcmp(v, "aicc"))
        *ic = SH_IC_AICC;
    else if (!strcmp(v, "bic"))
        *ic = SH_IC_BIC;
    else
        return sh_fail(s, sh_words_option(w, "by"), "by= takes aicc or bic");
    return 0;
}

static const char *stop_id(sh_stop st)
{
    switch (st) {
    case SH_STOP_WHITE: return "white";
    case SH_STOP_NO_IMPROVEMENT: return "no-improvement";
    case SH_STOP_NO_ADVICE: return "no-advice";
    case SH_STOP_BUDGET: return "budget";
    case SH_STOP_INTERRUPTED: return "interrupted";
    case SH_STOP_ERROR: return "error";
    }
    return "?";
}

static int cmd_refine(sh_session *s, sh_words *w)
{
    sh_model *m = model_for_advice(s);
    if (!m)
        return -1;
    sh_refine_options o = sh_refine_default_options();
    const char *v;
    long k;
    if ((v = sh_words_value(w, "max"))) {
        if (sh_parse_long(v, &k) || k < 1 || k > SH_REFINE_MAX_STEPS)
            return sh_fail(s, sh_words_option(w, "max"), "max= takes a whole number from 1 to %d",
                           SH_REFINE_MAX_STEPS);
        o.max_steps = (int)k;
    }
    if (parse_by(s, w, &o.by))
        return -1;
    char spec[128];
    fit_spec_format(&m->fit.spec, spec, sizeof spec);
    sh_printf(s, "refine from model %d  %s: at most %d round%s; a proposal wins by passing more "
              "criteria, then by a criterion (%s) smaller by more than 2\n", m->id, spec, o.max_steps,
              o.max_steps == 1 ? "" : "s", ic_name(o.by));
    sh_refine_result *r = malloc(sizeof *r);
    if (!r)
        return sh_fail(s, -1, "out of memory");
    int rc = sh_refine(s, &o, r);
    if (rc != HN_OK) {
        free(r);
        return sh_fail(s, -1, "cannot refine: %s", hn_strerror(rc));
    }
    sh_json *j = &s->j;
    sh_json_kint(j, "start", r->start_id);
    sh_json_kstring(j, "by", o.by == SH_IC_BIC ? "bic" : "aicc");
    sh_json_kint(j, "max", o.max_steps);
    sh_json_key(j, "steps");
    sh_json_begin_array(j);
    char num[32];
    for (int i = 0; i < r->nsteps; i++) {
        const sh_refine_step *st = &r->step[i];
        const sh_model *from = &s->models[st->from_id - 1];
        sh_printf(s, "round %d: model %d passes %d of 5; %d proposal%s fitted", i + 1, st->from_id,
                  sh_criteria_passed(&from->battery), st->tried, st->tried == 1 ? "" : "s");
        if (st->first_id)
            sh_printf(s, " (models %d-%d)", st->first_id, st->last_id);
        if (st->failed)
            sh_printf(s, ", %d could not be fitted", st->failed);
        sh_printf(s, "\n");
        sh_json_begin_object(j);
        sh_json_kint(j, "from", st->from_id);
        sh_json_kint(j, "tried", st->tried);
        sh_json_kint(j, "first", st->first_id);
        sh_json_kint(j, "last", st->last_id);
        if (st->chosen_id) {
            sh_printf(s, "  evidence: ");
            sh_wrap(s, st->evidence, 12);
            sh_printf(s, "  -> model %d  %s: passes %d of 5, %s/N %s, %s\n", st->chosen_id, st->spec,
                      st->passed, ic_name(o.by), sh_num(num, sizeof num, st->ic, 7),
                      st->white ? "WHITE NOISE" : "not white");
            sh_json_kint(j, "chosen", st->chosen_id);
            sh_json_kstring(j, "model", st->spec);
            sh_json_kint(j, "passed", st->passed);
            sh_json_kstring(j, "verdict", st->white ? "white" : "not white");
            sh_json_knumber(j, "ic_per_obs", st->ic, "criterion not computable");
            sh_json_kstring(j, "evidence", st->evidence);
        } else {
            sh_printf(s, "  no proposal is better; staying with model %d\n", st->from_id);
            sh_json_key(j, "chosen");
            sh_json_null(j);
        }
        sh_json_end_object(j);
    }
    sh_json_end_array(j);
    const sh_model *f = &s->models[r->final_id - 1];
    char fspec[128];
    fit_spec_format(&f->fit.spec, fspec, sizeof fspec);
    sh_printf(s, "stopped: %s\n", r->why);
    sh_printf(s, "current model: %d  %s (%s; %d model%s added)\n", f->id, fspec,
              f->checked && f->battery.white ? "WHITE NOISE" : "not white", r->fitted,
              r->fitted == 1 ? "" : "s");
    sh_json_kstring(j, "stop", stop_id(r->stop));
    sh_json_kstring(j, "reason", r->why);
    sh_json_kint(j, "final", f->id);
    sh_json_kstring(j, "model", fspec);
    sh_json_kstring(j, "verdict", f->checked && f->battery.white ? "white" : "not white");
    sh_json_kint(j, "fitted", r->fitted);
    int stop = r->stop;
    free(r);
    if (stop == SH_STOP_INTERRUPTED)
        return sh_fail(s, -1, "refine interrupted; finished models are kept");
    if (stop == SH_STOP_ERROR)
        return sh_fail(s, -1, "refine stopped on an error");
    return 0;
}

/* ---- scan ----------------------------------------------------------------- */

static int parse_order_range(sh_session *s, sh_words *w, const char *key, int *lo, int *hi)
{
    const char *v = sh_words_value(w, key);
    long a, b;
    if (!v)
        return sh_fail(s, -1, "scan needs %s=LO..HI, e.g. %s=0..2", key, key);
    if (sh_parse_range(v, &a, &b) || a < 0 || b < a || b > SH_SCAN_MAX_ORDER)
        return sh_fail(s, sh_words_option(w, key), "%s= takes a range LO..HI of orders from 0 to %d",
                       key, SH_SCAN_MAX_ORDER);
    *lo = (int)a;
    *hi = (int)b;
    return 0;
}

static int cmd_scan(sh_session *s, sh_words *w)
{
    if (!s->loaded || !s->y)
        return sh_fail(s, -1, "no series loaded (use 'load FILE column=NAME')");
    sh_scan_options o = sh_scan_default_options();
    if (parse_order_range(s, w, "p", &o.p_min, &o.p_max) || parse_order_range(s, w, "q", &o.q_min, &o.q_max))
        return -1;
    const char *v;
    if ((v = sh_words_value(w, "garch"))) {
        if (strcmp(v, "yes") && strcmp(v, "no"))
            return sh_fail(s, sh_words_option(w, "garch"), "garch= takes yes or no");
        o.garch = !strcmp(v, "yes");
    }
    if ((v = sh_words_value(w, "dist"))) {
        if (strcmp(v, "normal") && strcmp(v, "t"))
            return sh_fail(s, sh_words_option(w, "dist"), "dist= takes normal or t");
        o.dist = strcmp(v, "t") ? FIT_DIST_NORMAL : FIT_DIST_T;
        if (o.dist == FIT_DIST_T && !o.garch)
            return sh_fail(s, sh_words_option(w, "dist"), "dist=t needs garch=yes (Student-t innovations "
                           "come with the GARCH variance)");
    }
    if (parse_by(s, w, &o.by))
        return -1;
    o.alpha = s->alpha;
    o.lags = s->lags;
    o.progress = s->interactive && isatty(fileno(stderr));
    sh_scan_result r;
    int rc = sh_scan_run(s->y, s->n, &o, &r);
    if (rc != HN_OK)
        return sh_fail(s, -1, "cannot scan: %s", hn_strerror(rc));
    char origin[128];
    snprintf(origin, sizeof origin, "scan p=%d..%d q=%d..%d%s%s", o.p_min, o.p_max, o.q_min, o.q_max,
             o.garch ? " garch" : "", o.dist == FIT_DIST_T ? " t" : "");
    int added = sh_scan_commit(s, &r, origin);
    sh_printf(s, "%s: %d model%s (%d fitted) on %zu observations, %s innovations%s\n", origin, r.ncells,
              r.ncells == 1 ? "" : "s", added, s->n, o.dist == FIT_DIST_T ? "Student-t" : "normal", o.garch ? ", GARCH(1,1) variance" : "");
    sh_printf(s, "    id  %-26s %6s %14s %14s %14s  %-6s  %s\n", "model", "N", "loglik", "AICc", "BIC",
              "passed", "verdict");
    sh_json *j = &s->j;
    sh_json_key(j, "models");
    sh_json_begin_array(j);
    char a[32], b[32], c[32], text[128];
    for (int i = 0; i < r.ncells; i++) {
        const sh_scan_cell *cell = &r.cell[i];
        fit_spec_format(&cell->spec, text, sizeof text);
        sh_json_begin_object(j);
        sh_json_kstring(j, "model", text);
        if (!cell->id) {
            sh_printf(s, "     -  %-26s not fitted: %s\n", text, hn_strerror(cell->status));
            sh_json_key(j, "id");
            sh_json_null(j);
            sh_json_kstring(j, "error", hn_strerror(cell->status));
            sh_json_end_object(j);
            continue;
        }
        const sh_model *m = &s->models[cell->id - 1];
        const fit_result *f = &m->fit;
        int white = m->checked && m->battery.white;
        sh_printf(s, "  %s%3d  %-26s %6zu %14s %14s %14s  %d of 5  %s%s\n", i == r.best ? "*" : " ", m->id,
                  text, f->n_eff, sh_num(a, sizeof a, f->loglik, 10), sh_num(b, sizeof b, f->aicc, 10),
                  sh_num(c, sizeof c, f->bic, 10), m->checked ? sh_criteria_passed(&m->battery) : 0,
                  m->checked ? (white ? "white" : "not white") : "not checked",
                  f->converged ? "" : " (not converged)");
        sh_json_kint(j, "id", m->id);
        sh_json_knumber(j, "loglik", f->loglik, "not computable");
        sh_json_knumber(j, "aicc", f->aicc, "not computable");
        sh_json_knumber(j, "bic", f->bic, "not computable");
        sh_json_kint(j, "n_eff", (long long)f->n_eff);
        sh_json_kbool(j, "converged", f->converged);
        sh_json_kstring(j, "verdict", white ? "white" : "not white");
        sh_json_end_object(j);
    }
    sh_json_end_array(j);
    if (r.best >= 0) {
        const sh_model *m = &s->models[r.cell[r.best].id - 1];
        fit_spec_format(&m->fit.spec, text, sizeof text);
        sh_printf(s, "  * best: model %d  %s, smallest %s per residual among the models %s\n", m->id, text,
                  ic_name(o.by), r.best_white ? "whose residuals pass" : "fitted (none passes)");
        sh_printf(s, "  criteria are compared per residual (%s/N): a larger AR order conditions on more "
                  "observations\n", ic_name(o.by));
        sh_json_kint(j, "best", m->id);
        sh_json_kbool(j, "best_white", r.best_white);
    } else {
        sh_printf(s, "  no model could be fitted\n");
        sh_json_key(j, "best");
        sh_json_null(j);
    }
    sh_json_kstring(j, "by", o.by == SH_IC_BIC ? "bic" : "aicc");
    int interrupted = r.interrupted;
    sh_scan_free(&r);
    if (interrupted)
        return sh_fail(s, -1, "scan interrupted; the finished models are kept");
    return 0;
}

const sh_command sh_cmds_advise[] = {
    { "advise", "advise", "propose the next model from the criteria the current model fails",
      { NULL }, 0, 0, cmd_advise,
      "  Serial correlation: a residual PACF spike at lag k proposes an AR term\n"
      "  at k, an ACF spike an MA term; the seasonal lag is named as such.\n"
      "  Mean not zero: the constant, or a difference when the unit-root tests\n"
      "  say so.  Volatility clustering: GARCH(1,1).  Clustering gone but heavy\n"
      "  tails: Student-t.  A variance shift without clustering: a break or a\n"
      "  transform, not GARCH.  Ranked by the evidence p-value; docs/advice.md.\n" },
    { "step", "step", "fit and check the top proposal of 'advise'", { NULL }, 0, 0, cmd_step, NULL },
    { "refine", "refine [max=N] [by=aicc|bic]",
      "follow the advice until the residuals pass or nothing improves",
      { "max", "by", NULL }, 0, 0, cmd_refine,
      "  Each round fits and checks every proposal (all are kept in 'models')\n"
      "  and moves to the one passing the most criteria; on equal counts the\n"
      "  criterion (AICc by default, compared per residual) must be smaller by\n"
      "  more than 2, and near-ties go to fewer parameters, then AR over MA.\n"
      "  Stops when the residuals pass, nothing improves, or after max= rounds\n"
      "  (default 8).  docs/advice.md has the rules.\n" },
    { "scan", "scan p=LO..HI q=LO..HI [garch=yes|no] [by=bic|aicc] [dist=normal|t]",
      "fit and check a grid of ARMA(p,q) models on all cores",
      { "p", "q", "garch", "by", "dist", NULL }, 0, 0, cmd_scan,
      "  Every model is added to 'models' in grid order (p outer, q inner); the\n"
      "  best is the smallest criterion per residual (BIC by default) among the\n"
      "  models whose residuals pass, and becomes the current model.\n" },
    { NULL, NULL, NULL, { NULL }, 0, 0, NULL, NULL }
};
