/* sh_refine.c - advice for a session model, fitting a proposal, and the refine loop; prints nothing. */
#include "sh_refine.h"
#include "sh_report_text.h"
#include "diag_unitroot.h"
#include "hn_status.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

double sh_ic_per_obs(const fit_result *f, sh_ic ic)
{
    double v = ic == SH_IC_BIC ? f->bic : f->aicc;
    return f->n_eff ? v / (double)f->n_eff : NAN;
}

int sh_criteria_passed(const diag_battery *b)
{
    int k = 0;
    for (int c = 0; c < DIAG_NCRIT; c++)
        if (c != DIAG_NORMAL && b->crit_pass[c])
            k++;
    return k;
}

/* The working series described as sh_add_model records it. */
static void series_words(const sh_session *s, char *buf, size_t len)
{
    snprintf(buf, len, "%.200s%s%.100s%s%.180s", s->path, *s->column ? " column " : "", s->column,
             *s->transforms ? ", " : "", s->transforms);
}

static int ensure_checked(sh_session *s, sh_model *m)
{
    if (m->checked)
        return HN_OK;
    diag_options o = sh_check_options(s, m);
    return sh_check_model(s, m, &o);
}

int sh_advise_model(sh_session *s, sh_model *m, diag_advice_list *out)
{
    memset(out, 0, sizeof *out);
    int rc = ensure_checked(s, m);
    if (rc != HN_OK)
        return rc;
    diag_advise_context ctx = diag_advise_default_context();
    ctx.n = m->fit.n;
    ctx.season = s->season;
    fit_spec *fitted = malloc((size_t)(s->nmodels ? s->nmodels : 1) * sizeof *fitted);
    if (!fitted)
        return HN_ENOMEM;
    for (int i = 0; i < s->nmodels; i++)
        if (!strcmp(s->models[i].series, m->series))
            fitted[ctx.nfitted++] = s->models[i].fit.spec;
    ctx.fitted = fitted;
    diag_unitroot ur;
    if (!m->battery.crit_pass[DIAG_MEAN] && s->y && s->n) {
        /* level case at 5 %; a failure leaves it undecided (no advice to difference) */
        if (diag_unitroot_check(s->y, s->n, 0, 0.05, &ur) == HN_OK)
            ctx.unitroot = &ur;
    }
    rc = diag_advise(&m->battery, &m->fit.spec, &ctx, out);
    free(fitted);
    return rc;
}

int sh_fit_and_check(sh_session *s, const fit_spec *spec, int parent, const char *origin, int *id)
{
    *id = 0;
    if (!s->y || s->n < fit_min_obs(spec))
        return HN_ESHORT;
    fit_options opt = fit_default_options();
    opt.interrupt = &sh_interrupted;
    fit_result r;
    int rc = fit_model(s->y, s->n, spec, &opt, &r);
    if (rc != HN_OK)
        return rc;
    sh_model *m = sh_add_model(s, &r, parent, origin);
    if (!m)
        return HN_ENOMEM;
    *id = m->id;
    diag_options o = sh_check_options(s, m);
    rc = sh_check_model(s, m, &o);
    return rc;
}

sh_refine_options sh_refine_default_options(void)
{
    sh_refine_options o = { SH_REFINE_DEFAULT_STEPS, SH_IC_AICC };
    return o;
}

/* Criterion difference A - B in criterion units, from the per-residual
 * values scaled back by the smaller residual count. */
static double ic_delta(const sh_model *a, const sh_model *b, sh_ic ic)
{
    size_t n = a->fit.n_eff < b->fit.n_eff ? a->fit.n_eff : b->fit.n_eff;
    return (sh_ic_per_obs(&a->fit, ic) - sh_ic_per_obs(&b->fit, ic)) * (double)n;
}

/* 1 when model A is clearly better than model B (both checked): more
 * criteria passed, or as many and a criterion smaller by more than
 * SH_IC_MARGIN. */
static int clearly_better(const sh_model *a, const sh_model *b, sh_ic ic)
{
    int pa = sh_criteria_passed(&a->battery), pb = sh_criteria_passed(&b->battery);
    if (pa != pb)
        return pa > pb;
    return ic_delta(a, b, ic) < -SH_IC_MARGIN;
}

/* Within one round: 1 when proposal A is preferred to the best so far B.
 * More criteria passed wins.  Otherwise the criterion decides when it
 * differs by more than the near-tie band: the margin plus one
 * observation's share of the criterion for each observation by which the
 * two residual counts differ (the per-residual scaling is no more exact
 * than that).  Within the band: fewer parameters, then fewer MA terms,
 * then the higher-ranked advice (B). */
static int preferred(const sh_model *a, const sh_model *b, sh_ic ic)
{
    int pa = sh_criteria_passed(&a->battery), pb = sh_criteria_passed(&b->battery);
    if (pa != pb)
        return pa > pb;
    double d = ic_delta(a, b, ic);
    size_t na = a->fit.n_eff, nb = b->fit.n_eff;
    double band = SH_IC_MARGIN + fabs(sh_ic_per_obs(&b->fit, ic)) * (double)(na > nb ? na - nb : nb - na);
    if (fabs(d) > band)
        return d < 0;
    if (a->fit.k_ic != b->fit.k_ic)
        return a->fit.k_ic < b->fit.k_ic;
    return a->fit.spec.n_ma < b->fit.spec.n_ma;
}

static void finish(sh_session *s, sh_refine_result *r, int cur, sh_stop stop, const char *fmt, ...)
    __attribute__((format(printf, 5, 6)));

static void finish(sh_session *s, sh_refine_result *r, int cur, sh_stop stop, const char *fmt, ...)
{
    r->stop = stop;
    r->final_id = s->models[cur].id;
    s->current = cur;
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(r->why, sizeof r->why, fmt, ap);
    va_end(ap);
}

int sh_refine(sh_session *s, const sh_refine_options *opt, sh_refine_result *r)
{
    memset(r, 0, sizeof *r);
    sh_refine_options d = sh_refine_default_options();
    if (!opt)
        opt = &d;
    int budget = opt->max_steps;
    if (budget < 1 || budget > SH_REFINE_MAX_STEPS)
        return HN_EINVAL;
    if (s->current < 0 || s->current >= s->nmodels)
        return HN_EINVAL;
    int cur = s->current;
    r->start_id = s->models[cur].id;
    char here[512];
    series_words(s, here, sizeof here);
    if (strcmp(here, s->models[cur].series)) {
        finish(s, r, cur, SH_STOP_ERROR, "model %d was fitted to %s, not to the working series %s",
               s->models[cur].id, s->models[cur].series, here);
        return HN_OK;
    }
    diag_advice_list adv;
    for (int round = 0; round < budget; round++) {
        if (sh_interrupted) {
            finish(s, r, cur, SH_STOP_INTERRUPTED, "interrupted; the %d models fitted so far are kept",
                   r->fitted);
            return HN_OK;
        }
        int rc = sh_advise_model(s, &s->models[cur], &adv);
        if (rc != HN_OK) {
            finish(s, r, cur, SH_STOP_ERROR, "no advice for model %d: %s", s->models[cur].id,
                   hn_strerror(rc));
            return HN_OK;
        }
        int cur_white = s->models[cur].battery.white;
        int cur_id = s->models[cur].id;
        int nprop = 0;
        for (int i = 0; i < adv.n; i++)
            nprop += adv.item[i].has_spec;
        if (!nprop) {
            if (cur_white)
                finish(s, r, cur, SH_STOP_WHITE, "the residuals of model %d pass every white-noise "
                       "criterion and no simpler neighbour is left to try", cur_id);
            else
                finish(s, r, cur, SH_STOP_NO_ADVICE, "no rule proposes a model for model %d%s%s",
                       cur_id, adv.dropped ? "; left out: " : "", adv.dropped ? adv.dropped_why : "");
            return HN_OK;
        }
        sh_refine_step *st = &r->step[r->nsteps++];
        st->from_id = cur_id;
        int best = -1, best_item = -1, stopped = 0;
        for (int i = 0; i < adv.n && !stopped; i++) {
            const diag_advice *a = &adv.item[i];
            if (!a->has_spec)
                continue;
            char origin[512];
            snprintf(origin, sizeof origin, "refine on model %d: %.200s", cur_id, a->reason);
            int id = 0;
            rc = sh_fit_and_check(s, &a->spec, cur_id, origin, &id);
            if (id) {
                r->fitted++;
                if (!st->first_id)
                    st->first_id = id;
                st->last_id = id;
            }
            if (rc == HN_EINTR || sh_interrupted) {
                stopped = 1;
                break;
            }
            if (rc != HN_OK || !id) {
                st->failed++;
                continue;
            }
            st->tried++;
            int k = id - 1;
            if (best < 0 || preferred(&s->models[k], &s->models[best], opt->by)) {
                best = k;
                best_item = i;
            }
        }
        if (stopped) {
            finish(s, r, cur, SH_STOP_INTERRUPTED, "interrupted; the %d models fitted so far are kept",
                   r->fitted);
            return HN_OK;
        }
        int accept = 0;
        if (best >= 0) {
            const sh_model *b = &s->models[best], *c = &s->models[cur];
            if (!cur_white)
                accept = clearly_better(b, c, opt->by);
            else if (b->battery.white) {
                double dl = ic_delta(b, c, opt->by);
                accept = dl < -SH_IC_MARGIN || (b->fit.k_ic < c->fit.k_ic && dl < 0);
            }
        }
        if (!accept) {
            if (cur_white)
                finish(s, r, cur, SH_STOP_WHITE, "the residuals of model %d pass every white-noise "
                       "criterion; none of the %d neighbours tried still passes with a smaller %s (by more "
                       "than 2 unless it is simpler)",
                       cur_id, st->tried, opt->by == SH_IC_BIC ? "BIC" : "AICc");
            else
                finish(s, r, cur, SH_STOP_NO_IMPROVEMENT, "none of the %d proposals fitted on model %d "
                       "passes more criteria or, passing as many, has its %s smaller by more than 2; "
                       "model %d passes %d of 5 criteria", st->tried, cur_id,
                       opt->by == SH_IC_BIC ? "BIC" : "AICc", cur_id,
                       sh_criteria_passed(&s->models[cur].battery));
            return HN_OK;
        }
        cur = best;
        const sh_model *m = &s->models[cur];
        st->chosen_id = m->id;
        st->passed = sh_criteria_passed(&m->battery);
        st->white = m->battery.white;
        st->ic = sh_ic_per_obs(&m->fit, opt->by);
        fit_spec_format(&m->fit.spec, st->spec, sizeof st->spec);
        snprintf(st->evidence, sizeof st->evidence, "%s", adv.item[best_item].reason);
    }
    if (s->models[cur].battery.white)
        finish(s, r, cur, SH_STOP_BUDGET, "the budget of %d round%s is used; the residuals of model %d "
               "pass every white-noise criterion", budget, budget == 1 ? "" : "s", s->models[cur].id);
    else
        finish(s, r, cur, SH_STOP_BUDGET, "the budget of %d round%s is used; model %d passes %d of 5 "
               "criteria (raise max=)", budget, budget == 1 ? "" : "s", s->models[cur].id,
               sh_criteria_passed(&s->models[cur].battery));
    return HN_OK;
}
