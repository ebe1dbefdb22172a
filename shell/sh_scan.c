/* sh_scan.c - fit and check a grid of models in parallel, then add them to the session in grid order. */
#include "sh_scan.h"
#include "hn_status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <omp.h>

sh_scan_options sh_scan_default_options(void)
{
    sh_scan_options o;
    memset(&o, 0, sizeof o);
    o.p_max = 2;
    o.q_max = 2;
    o.dist = FIT_DIST_NORMAL;
    o.by = SH_IC_BIC;
    o.alpha = 0.05;
    return o;
}

/* Fit and check one cell; touches nothing but the cell. */
static void run_cell(const double *y, size_t n, const sh_scan_options *o, sh_scan_cell *c)
{
    if (n < fit_min_obs(&c->spec)) {
        c->status = HN_ESHORT;
        return;
    }
    fit_options fo = fit_default_options();
    fo.interrupt = &sh_interrupted;
    c->status = fit_model(y, n, &c->spec, &fo, &c->fit);
    if (c->status != HN_OK)
        return;
    diag_options d = diag_default_options();
    d.alpha = o->alpha;
    d.lags = o->lags;
    d.df_adjust = fit_spec_arma_terms(&c->spec);
    d.standardised = c->spec.garch;
    const double *x = c->spec.garch ? c->fit.std_resid : c->fit.resid;
    if (diag_battery_run(x, c->fit.n_eff, &d, &c->battery) == HN_OK) {
        c->checked = 1;
        c->bopt = d;
    }
}

int sh_scan_run(const double *y, size_t n, const sh_scan_options *o, sh_scan_result *r)
{
    memset(r, 0, sizeof *r);
    r->best = -1;
    if (!y || !o || o->p_min < 0 || o->q_min < 0 || o->p_min > o->p_max || o->q_min > o->q_max ||
        o->p_max > SH_SCAN_MAX_ORDER ||
        o->q_max > SH_SCAN_MAX_ORDER || (o->dist == FIT_DIST_T && !o->garch))
        return HN_EINVAL;
    int nc = (o->p_max - o->p_min + 1) * (o->q_max - o->q_min + 1);
    r->cell = calloc((size_t)nc, sizeof *r->cell);
    if (!r->cell)
        return HN_ENOMEM;
    r->ncells = nc;
    for (int p = o->p_min, i = 0; p <= o->p_max; p++)
        for (int q = o->q_min; q <= o->q_max; q++, i++) {
            fit_spec *s = &r->cell[i].spec;
            *s = fit_spec_default();
            for (int k = 1; k <= p; k++)
                fit_spec_add_ar(s, k);
            for (int k = 1; k <= q; k++)
                fit_spec_add_ma(s, k);
            s->garch = o->garch;
            s->dist = o->dist;
        }
    /* The largest models first: they take longest, and started last they
     * would leave the other threads idle at the end.  Each result stays in
     * its own cell, so the order does not change what is reported. */
    int *order = malloc((size_t)nc * sizeof *order);
    if (!order) {
        free(r->cell);
        r->cell = NULL;
        r->ncells = 0;
        return HN_ENOMEM;
    }
    int k = 0;
    for (int size = o->p_max + o->q_max; size >= o->p_min + o->q_min; size--)
        for (int i = 0; i < nc; i++)
            if (r->cell[i].spec.n_ar + r->cell[i].spec.n_ma == size)
                order[k++] = i;
    int done = 0;
    int threads = o->threads > 0 ? o->threads : omp_get_max_threads();
#pragma omp parallel for schedule(dynamic, 1) num_threads(threads)
    for (int j = 0; j < nc; j++) {
        const int i = order[j];
        run_cell(y, n, o, &r->cell[i]);
        if (o->progress) {
#pragma omp critical(sh_scan_progress)
            {
                done++;
                fprintf(stderr, "\rscan: %d of %d models fitted", done, nc);
                fflush(stderr);
            }
        }
    }
    free(order);
    if (o->progress)
        fprintf(stderr, "\r%40s\r", "");
    /* the best: smallest criterion per residual among the models that pass,
     * else among all fitted ones */
    for (int pass = 1; pass >= 0 && r->best < 0; pass--)
        for (int i = 0; i < nc; i++) {
            const sh_scan_cell *c = &r->cell[i];
            if (c->status != HN_OK || !c->checked || (pass && !c->battery.white))
                continue;
            double v = sh_ic_per_obs(&c->fit, o->by);
            if (!isfinite(v))
                continue;
            if (r->best < 0 || v < sh_ic_per_obs(&r->cell[r->best].fit, o->by)) {
                r->best = i;
                r->best_white = pass;
            }
        }
    for (int i = 0; i < nc; i++)
        if (r->cell[i].status == HN_EINTR)
            r->interrupted = 1;
    return HN_OK;
}

int sh_scan_commit(sh_session *s, sh_scan_result *r, const char *origin)
{
    int added = 0, best_index = -1;
    for (int i = 0; i < r->ncells; i++) {
        sh_scan_cell *c = &r->cell[i];
        if (c->status != HN_OK || c->id)
            continue;
        sh_model *m = sh_add_model(s, &c->fit, 0, origin);
        if (!m)
            break;
        c->id = m->id;
        if (c->checked) {
            m->battery = c->battery;
            m->bopt = c->bopt;
            m->checked = 1;
            memset(&c->battery, 0, sizeof c->battery);
            c->checked = 0;
        }
        if (i == r->best)
            best_index = s->nmodels - 1;
        added++;
    }
    if (best_index >= 0)
        s->current = best_index;
    return added;
}

void sh_scan_free(sh_scan_result *r)
{
    for (int i = 0; i < r->ncells; i++) {
        sh_scan_cell *c = &r->cell[i];
        if (c->status == HN_OK && !c->id)
            fit_result_free(&c->fit);
        if (c->checked)
            diag_battery_free(&c->battery);
    }
    free(r->cell);
    memset(r, 0, sizeof *r);
}
