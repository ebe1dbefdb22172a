/* sh_figure.c - build the session's standard charts from its series, model and battery. */
#include "sh_figure.h"
#include "sh_report_text.h"
#include "diag_stats.h"
#include "diag_checks.h"
#include "hn_status.h"

#include <gsl/gsl_cdf.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const char *const names[SH_FIG_NKINDS] = {
    "series", "fit", "resid", "acf", "pacf", "acf2", "rolling", "qq", "profile", "forecast"
};

const char *sh_fig_name(sh_fig_kind kind)
{
    return kind >= 0 && kind < SH_FIG_NKINDS ? names[kind] : "?";
}

int sh_figure_model_on_series(const sh_session *s, const sh_model *m)
{
    char now[512];
    return m->fit.n == s->n && !strcmp(m->series, sh_series_label(s, now, sizeof now));
}

void sh_figure_free(sh_figure *f)
{
    for (int i = 0; i < SH_FIG_BUFS; i++)
        free(f->buf[i]);
    memset(f, 0, sizeof *f);
}

static double *alloc_buf(sh_figure *f, int slot, size_t n)
{
    f->buf[slot] = malloc((n ? n : 1) * sizeof(double));
    return f->buf[slot];
}

static int oom(char *err, size_t errlen)
{
    snprintf(err, errlen, "out of memory");
    return -1;
}

/* The residual series a chart reads: standardised for GARCH (as the
 * battery checks them), raw otherwise. */
static const double *checked_resid(const sh_model *m)
{
    return m->fit.spec.garch ? m->fit.std_resid : m->fit.resid;
}

static int correlogram(sh_session *s, sh_figure *f, const double *x, size_t n, int squared,
                       int partial, const char *what, char *err, size_t errlen)
{
    if (n < 4) {
        snprintf(err, errlen, "%zu values are too few for a correlogram", n);
        return -1;
    }
    int m = s->lags > 20 ? s->lags : 20;
    if ((size_t)m > n - 1)
        m = (int)n - 1;
    if (!partial && (size_t)m > n / 2 && n > 8)
        m = (int)(n / 2);
    const double *src = x;
    if (squared) {
        double *sq = alloc_buf(f, 0, n);
        if (!sq)
            return oom(err, errlen);
        for (size_t i = 0; i < n; i++)
            sq[i] = x[i] * x[i];
        src = sq;
    }
    double *acf = alloc_buf(f, 1, (size_t)m);
    if (!acf)
        return oom(err, errlen);
    int rc = diag_acf(src, n, m, acf);
    if (rc != HN_OK) {
        snprintf(err, errlen, "the autocorrelation cannot be computed: %s", hn_strerror(rc));
        return -1;
    }
    double *r = acf;
    if (partial) {
        r = alloc_buf(f, 2, (size_t)m);
        if (!r)
            return oom(err, errlen);
        rc = diag_pacf(acf, m, r);
        if (rc != HN_OK) {
            snprintf(err, errlen, "the partial autocorrelation cannot be computed: %s", hn_strerror(rc));
            return -1;
        }
    }
    double z = gsl_cdf_ugaussian_Qinv(s->alpha / 2.0);
    double band = z / sqrt((double)n);
    snprintf(f->title, sizeof f->title, "%s of %s%.170s", partial ? "PACF" : "ACF", squared ? "squared " : "", what);
    snprintf(f->xlabel, sizeof f->xlabel, "lag");
    snprintf(f->caption, sizeof f->caption,
             "%s at lags 1 to %d of %s%.160s (n = %zu; divisor n, mean removed); band +-%.3f = +-z/sqrt(n), z = %.3f at alpha %g.",
             partial ? "Partial autocorrelation" : "Autocorrelation", m, squared ? "the squares of " : "", what, n,
             band, z, s->alpha);
    sh_chart_corr(&f->chart, f->title, r, (size_t)m, band);
    f->chart.xlabel = f->xlabel;
    return 0;
}

int sh_figure_build(sh_session *s, sh_fig_kind kind, int of_series, const fit_forecast *fc,
                    sh_figure *f, char *err, size_t errlen)
{
    memset(f, 0, sizeof *f);
    if (!s->loaded || s->n < 2) {
        snprintf(err, errlen, "no series loaded (use 'load FILE column=NAME')");
        return -1;
    }
    sh_model *m = NULL;
    if (s->current >= 0 && s->current < s->nmodels)
        m = &s->models[s->current];
    /* A model fitted to another working series (before a transform) does not
     * belong on these charts. */
    if (m && !sh_figure_model_on_series(s, m))
        m = NULL;
    int needs_model = kind == SH_FIG_FIT || kind == SH_FIG_RESID || kind == SH_FIG_QQ ||
                      kind == SH_FIG_PROFILE || kind == SH_FIG_FAN ||
                      (kind == SH_FIG_ACF2 && !of_series);
    if (needs_model && !m) {
        snprintf(err, errlen, "the %s chart needs a model fitted to the working series (use 'fit SPEC')",
                 sh_fig_name(kind));
        return -1;
    }
    char spec[160] = "";
    if (m)
        fit_spec_format(&m->fit.spec, spec, sizeof spec);
    const char *col = *s->column ? s->column : "the series";

    switch (kind) {
    case SH_FIG_SERIES:
    case SH_FIG_FIT: {
        snprintf(f->label[0], sizeof f->label[0], "%.70s", col);
        if (*s->transforms)
            snprintf(f->title, sizeof f->title, "%.80s (%.100s)", col, s->transforms);
        else
            snprintf(f->title, sizeof f->title, "%.180s", col);
        sh_chart_line(&f->chart, f->title, s->y, s->n, f->label[0]);
        snprintf(f->xlabel, sizeof f->xlabel, "observation");
        f->chart.xlabel = f->xlabel;
        snprintf(f->caption, sizeof f->caption, "The working series, %zu values%s%.300s.", s->n,
                 *s->transforms ? " after " : "", s->transforms);
        if (kind == SH_FIG_FIT) {
            double *fit = alloc_buf(f, 0, s->n);
            if (!fit)
                return oom(err, errlen);
            for (size_t i = 0; i < s->n; i++)
                fit[i] = i >= m->fit.start ? s->y[i] - m->fit.resid[i - m->fit.start] : NAN;
            snprintf(f->label[1], sizeof f->label[1], "fitted, model %d", m->id);
            sh_chart_add_series(&f->chart, fit, s->n, f->label[1]);
            snprintf(f->title, sizeof f->title, "%.60s and the fit of model %d %.100s", col, m->id, spec);
            snprintf(f->caption, sizeof f->caption,
                     "The working series and the one-step fitted values y_t - e_t of model %d (%s) from observation %zu on.",
                     m->id, spec, m->fit.start + 1);
        }
        return 0;
    }
    case SH_FIG_RESID: {
        const fit_result *r = &m->fit;
        snprintf(f->title, sizeof f->title, "residuals of model %d %.150s", m->id, spec);
        snprintf(f->label[0], sizeof f->label[0], "e_t");
        sh_chart_line(&f->chart, f->title, r->resid, r->n_eff, f->label[0]);
        f->chart.x0 = (double)r->start + 1.0;
        snprintf(f->xlabel, sizeof f->xlabel, "observation");
        f->chart.xlabel = f->xlabel;
        sh_chart_add_ref(&f->chart, 0.0, NULL);
        if (r->spec.garch && r->sigma_t) {
            double *hi = alloc_buf(f, 0, r->n_eff), *lo = alloc_buf(f, 1, r->n_eff);
            if (!hi || !lo)
                return oom(err, errlen);
            for (size_t i = 0; i < r->n_eff; i++) {
                hi[i] = 2.0 * r->sigma_t[i];
                lo[i] = -2.0 * r->sigma_t[i];
            }
            snprintf(f->label[1], sizeof f->label[1], "+-2 sigma_t");
            sh_chart_add_series(&f->chart, hi, r->n_eff, f->label[1]);
            sh_chart_add_series(&f->chart, lo, r->n_eff, NULL);
            snprintf(f->caption, sizeof f->caption,
                     "Residuals e_t of model %d (%s), N = %zu, with the conditional band +-2 sigma_t of the GARCH variance.",
                     m->id, spec, r->n_eff);
        } else {
            snprintf(f->caption, sizeof f->caption, "Residuals e_t of model %d (%s), N = %zu; sigma = %.4g.", m->id, spec,
                     r->n_eff, sqrt(r->sigma2));
        }
        return 0;
    }
    case SH_FIG_ACF:
    case SH_FIG_PACF:
    case SH_FIG_ACF2: {
        char what[240];
        if (m && !of_series) {
            snprintf(what, sizeof what, "%sresiduals, model %d", m->fit.spec.garch ? "std. " : "", m->id);
            return correlogram(s, f, checked_resid(m), m->fit.n_eff, kind == SH_FIG_ACF2, kind == SH_FIG_PACF,
                               what, err, errlen);
        }
        snprintf(what, sizeof what, "%.200s", col);
        return correlogram(s, f, s->y, s->n, kind == SH_FIG_ACF2, kind == SH_FIG_PACF, what, err, errlen);
    }
    case SH_FIG_ROLLING: {
        const double *x = s->y;
        size_t n = s->n;
        char what[240];
        snprintf(what, sizeof what, "%.200s", col);
        size_t x0 = 0;
        if (m && !of_series) {
            x = checked_resid(m);
            n = m->fit.n_eff;
            x0 = m->fit.start;
            snprintf(what, sizeof what, "%sresiduals, model %d", m->fit.spec.garch ? "std. " : "", m->id);
        }
        size_t w = 0;
        const char *rule = "max(10, n/10)";
        if (m && !of_series && m->checked && m->battery.window >= 2) {
            w = m->battery.window;
            rule = "the block width of the check";
        } else {
            w = n / 10 > 10 ? n / 10 : 10;
        }
        if (n < 2 * w || w < 2) {
            snprintf(err, errlen, "%zu values are too few for rolling windows of %zu", n, w);
            return -1;
        }
        size_t k = n - w + 1;
        double *rm = alloc_buf(f, 0, k), *rs = alloc_buf(f, 1, k);
        if (!rm || !rs)
            return oom(err, errlen);
        int rc = diag_rolling(x, n, w, rm, rs);
        if (rc != HN_OK) {
            snprintf(err, errlen, "rolling moments cannot be computed: %s", hn_strerror(rc));
            return -1;
        }
        double gm, gs;
        diag_mean_sd(x, n, &gm, &gs);
        snprintf(f->title, sizeof f->title, "rolling mean and sd (w = %zu), %.140s", w, what);
        snprintf(f->label[0], sizeof f->label[0], "rolling mean");
        snprintf(f->label[1], sizeof f->label[1], "rolling sd");
        snprintf(f->label[2], sizeof f->label[2], "global mean");
        snprintf(f->label[3], sizeof f->label[3], "global sd");
        sh_chart_line(&f->chart, f->title, rm, k, f->label[0]);
        sh_chart_add_series(&f->chart, rs, k, f->label[1]);
        sh_chart_add_ref(&f->chart, gm, f->label[2]);
        sh_chart_add_ref(&f->chart, gs, f->label[3]);
        f->chart.x0 = (double)(x0 + w);
        snprintf(f->xlabel, sizeof f->xlabel, "observation (window end)");
        f->chart.xlabel = f->xlabel;
        snprintf(f->caption, sizeof f->caption,
                 "Mean and sd (divisor w-1) over sliding windows of w = %zu (%s), plotted at the window's last "
                 "observation, against the global mean %.4g and sd %.4g.", w, rule, gm, gs);
        return 0;
    }
    case SH_FIG_QQ: {
        const fit_result *r = &m->fit;
        snprintf(f->title, sizeof f->title, "normal QQ plot, std. residuals, model %d", m->id);
        sh_chart_qq(&f->chart, f->title, r->std_resid, r->n_eff);
        snprintf(f->xlabel, sizeof f->xlabel, "normal quantile");
        snprintf(f->ylabel, sizeof f->ylabel, "standardised residual");
        f->chart.xlabel = f->xlabel;
        f->chart.ylabel = f->ylabel;
        snprintf(f->caption, sizeof f->caption,
                 "Sorted standardised residuals (restandardised: mean, sd with divisor n-1) against normal quantiles at "
                 "Blom's positions (i - 3/8)/(n + 1/4); points off the line y = x show skew or heavy tails.");
        return 0;
    }
    case SH_FIG_PROFILE: {
        if (!m->checked) {
            diag_options o = sh_check_options(s, m);
            int rc = sh_check_model(s, m, &o);
            if (rc != HN_OK) {
                snprintf(err, errlen, "cannot check model %d: %s", m->id, hn_strerror(rc));
                return -1;
            }
        }
        const diag_battery *b = &m->battery;
        if (!b->profile_p || b->acf_lags < 1) {
            snprintf(err, errlen, "no portmanteau profile for model %d", m->id);
            return -1;
        }
        snprintf(f->title, sizeof f->title, "Ljung-Box p-value by lag, model %d", m->id);
        sh_chart_profile(&f->chart, f->title, b->profile_p, (size_t)b->acf_lags, b->alpha, 1);
        snprintf(f->xlabel, sizeof f->xlabel, "lags m");
        f->chart.xlabel = f->xlabel;
        snprintf(f->caption, sizeof f->caption,
                 "p-value of the Ljung-Box statistic Q(m) for every m from 1 to %d (log scale), against alpha %g; "
                 "the check itself uses m = %d (%s).", b->acf_lags, b->alpha, b->m, b->lag_rule ? b->lag_rule : "");
        return 0;
    }
    case SH_FIG_FAN: {
        if (!fc) {
            snprintf(err, errlen, "no forecast to draw (use 'forecast H' first)");
            return -1;
        }
        size_t hist = (size_t)fc->h * 4;
        if (hist < 60)
            hist = 60;
        if (hist > s->n)
            hist = s->n;
        snprintf(f->title, sizeof f->title, "forecast from model %d %s, %d steps", m->id, spec, fc->h);
        snprintf(f->label[0], sizeof f->label[0], "%.70s", col);
        sh_chart_fan(&f->chart, f->title, s->y + (s->n - hist), hist, fc->mean, (size_t)fc->h);
        sh_chart_fan_level(&f->chart, fc->lo, fc->hi, fc->level * 100.0);
        f->chart.series[0].label = f->label[0];
        f->chart.x0 = (double)(s->n - hist) + 1.0;
        snprintf(f->xlabel, sizeof f->xlabel, "observation");
        f->chart.xlabel = f->xlabel;
        snprintf(f->caption, sizeof f->caption,
                 "The last %zu observations and forecasts 1 to %d steps ahead with %g %% intervals "
                 "(mean -/+ %.3f forecast-error sd).", hist, fc->h, fc->level * 100.0, fc->quantile);
        return 0;
    }
    default:
        break;
    }
    snprintf(err, errlen, "unknown chart");
    return -1;
}
