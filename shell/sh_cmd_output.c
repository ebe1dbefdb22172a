/* sh_cmd_output.c - the output commands: plot at the prompt, save CSV files, report. */
#include "sh_handlers.h"
#include "sh_figure.h"
#include "sh_tchart.h"
#include "sh_file.h"
#include "sh_time.h"
#include "sh_report.h"
#include "sh_stamps.h"
#include "fit_forecast.h"
#include "hn_status.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

/* ---- plot --------------------------------------------------------------- */

static const struct { const char *word; sh_fig_kind kind; } plot_kinds[] = {
    { "series", SH_FIG_SERIES }, { "fit", SH_FIG_FIT }, { "resid", SH_FIG_RESID },
    { "acf", SH_FIG_ACF }, { "pacf", SH_FIG_PACF }, { "acf2", SH_FIG_ACF2 },
    { "rolling", SH_FIG_ROLLING }, { "qq", SH_FIG_QQ }, { "profile", SH_FIG_PROFILE },
    { "forecast", SH_FIG_FAN },
};

/* The last forecast, when it belongs to the current model; else NULL. */
static const fit_forecast *current_forecast(sh_session *s)
{
    if (!s->last_forecast || s->current < 0 || s->current >= s->nmodels)
        return NULL;
    if (s->models[s->current].id != s->last_forecast_model || !sh_figure_model_on_series(s, &s->models[s->current]))
        return NULL;
    return (const fit_forecast *)s->last_forecast;
}

static int option_long(sh_session *s, sh_words *w, const char *key, long lo, long hi, long *v)
{
    const char *t = sh_words_value(w, key);
    if (!t)
        return 0;
    if (sh_parse_long(t, v) || *v < lo || *v > hi)
        return sh_fail(s, sh_words_option(w, key), "%s= takes a whole number from %ld to %ld", key, lo, hi);
    return 0;
}

static int cmd_plot(sh_session *s, sh_words *w)
{
    int ki = sh_arg(w, 0);
    const char *word = w->word[ki];
    int kind = -1;
    for (size_t i = 0; i < sizeof plot_kinds / sizeof plot_kinds[0]; i++)
        if (!strcmp(plot_kinds[i].word, word))
            kind = (int)plot_kinds[i].kind;
    if (kind < 0)
        return sh_fail(s, ki, "unknown chart '%s' (series, fit, resid, acf, pacf, acf2, rolling, qq, profile, forecast)",
                       word);
    long width = s->width, height = 18;
    if (option_long(s, w, "width", SH_TC_MIN_WIDTH, 400, &width) ||
        option_long(s, w, "height", 8, 200, &height))
        return -1;
    int of_series = 0;
    const char *of = sh_words_value(w, "of");
    if (of) {
        if (!strcmp(of, "series"))
            of_series = 1;
        else if (strcmp(of, "resid"))
            return sh_fail(s, sh_words_option(w, "of"), "of= takes series or resid");
    }
    sh_figure f;
    char err[512];
    if (sh_figure_build(s, (sh_fig_kind)kind, of_series, current_forecast(s), &f, err, sizeof err)) {
        sh_figure_free(&f);
        return sh_fail(s, kind == SH_FIG_FAN ? -1 : ki, "%s", err);
    }
    /* A journal is read as plain text, so recorded charts carry no colour. */
    unsigned flags = (s->utf8 ? 0u : SH_TC_ASCII) | (s->color && !s->journal ? SH_TC_COLOR : 0u);
    char *text = NULL;
    size_t len = 0;
    int rc = sh_tchart_string(&f.chart, (int)width, (int)height, flags, &text, &len);
    if (rc != HN_OK) {
        sh_figure_free(&f);
        return sh_fail(s, -1, "cannot draw the chart at %ld x %ld: %s", width, height, hn_strerror(rc));
    }
    sh_printf(s, "%s", text);
    sh_json_kstring(&s->j, "chart", word);
    sh_json_kstring(&s->j, "title", f.title);
    sh_json_kstring(&s->j, "caption", f.caption);
    sh_json_kint(&s->j, "width", width);
    sh_json_kint(&s->j, "height", height);
    free(text);
    sh_figure_free(&f);
    return 0;
}

/* ---- save --------------------------------------------------------------- */

static void put_num(FILE *f, double x)
{
    if (isfinite(x))
        fprintf(f, "%.17g", x);
}

static int save_resid(sh_session *s, const char *path, int pi)
{
    sh_model *m = sh_current_model_on_series(s);
    if (!m)
        return -1;
    const fit_result *r = &m->fit;
    sh_stamps st;
    int have_time = sh_stamps_load(s, &st) == 0;
    size_t lost = s->n_raw - s->n;     /* values the transforms dropped at the front */
    sh_outfile o;
    char err[1200];
    if (sh_outfile_open(&o, path, err, sizeof err))
        return sh_fail(s, pi, "%s", err);
    int garch = r->spec.garch && r->sigma_t;
    fprintf(o.f, "%sobs,resid,std_resid%s\n", have_time ? "time," : "", garch ? ",sigma_t" : "");
    for (size_t i = 0; i < r->n_eff; i++) {
        size_t t = r->start + i;
        if (have_time) {
            char tb[64];
            fprintf(o.f, "%s,", sh_time_format(st.stamp[lost + t], st.kind, tb, sizeof tb));
        }
        fprintf(o.f, "%zu,", t + 1);
        put_num(o.f, r->resid[i]);
        fputc(',', o.f);
        put_num(o.f, r->std_resid[i]);
        if (garch) {
            fputc(',', o.f);
            put_num(o.f, r->sigma_t[i]);
        }
        fputc('\n', o.f);
    }
    free(st.stamp);
    if (sh_outfile_commit(&o, err, sizeof err))
        return sh_fail(s, pi, "%s", err);
    char spec[160];
    fit_spec_format(&r->spec, spec, sizeof spec);
    sh_printf(s, "wrote %zu residuals of model %d %s to %s\n", r->n_eff, m->id, spec, path);
    sh_printf(s, "  columns: %sobs (position in the working series), resid e_t, std_resid %s%s\n",
              have_time ? "time, " : "", garch ? "e_t/sigma_t" : "e_t/sqrt(sigma2)",
              garch ? ", sigma_t (conditional sd)" : "");
    if (!have_time && *s->freq)
        sh_printf(s, "  (time stamps left out: the file no longer gives the loaded values)\n");
    sh_json_kstring(&s->j, "file", path);
    sh_json_kint(&s->j, "rows", (long long)r->n_eff);
    sh_json_kbool(&s->j, "time", have_time);
    return 0;
}

static int save_forecast(sh_session *s, sh_words *w, const char *path, int pi)
{
    sh_model *m = sh_current_model_on_series(s);
    if (!m)
        return -1;
    int hi = sh_arg(w, 2);
    fit_forecast *own = NULL;
    const fit_forecast *fc = NULL;
    if (hi >= 0) {
        long h;
        if (sh_parse_long(w->word[hi], &h) || h < 1 || h > 10000)
            return sh_fail(s, hi, "the horizon must be a whole number of steps from 1 to 10000");
        own = fit_forecast_alloc((int)h);
        if (!own)
            return sh_fail(s, -1, "out of memory");
        int rc = fit_forecast_run(&m->fit, s->y, s->n, s->level / 100.0, own);
        if (rc != HN_OK) {
            fit_forecast_free(own);
            return sh_fail(s, -1, "cannot forecast from model %d: %s", m->id, hn_strerror(rc));
        }
        fc = own;
    } else {
        fc = current_forecast(s);
        if (!fc)
            return sh_fail(s, -1, "give the horizon (save forecast FILE.csv H) or run 'forecast H' on the current model first");
    }
    sh_stamps st;
    int have_time = sh_stamps_load(s, &st) == 0 && st.freq != SH_FREQ_NONE && st.freq != SH_FREQ_IRREGULAR;
    sh_outfile o;
    char err[1200];
    if (sh_outfile_open(&o, path, err, sizeof err)) {
        fit_forecast_free(own);
        free(st.stamp);
        return sh_fail(s, pi, "%s", err);
    }
    double lev = fc->level * 100.0;
    fprintf(o.f, "%sstep,mean,se,lo%g,hi%g,variance\n", have_time ? "time," : "", lev, lev);
    for (int k = 0; k < fc->h; k++) {
        if (have_time) {
            char tb[64];
            int64_t t = sh_time_advance(st.stamp[s->n_raw - 1], st.freq, k + 1);
            fprintf(o.f, "%s,", sh_time_format(t, st.kind, tb, sizeof tb));
        }
        fprintf(o.f, "%d,", k + 1);
        put_num(o.f, fc->mean[k]);
        fputc(',', o.f);
        put_num(o.f, fc->se[k]);
        fputc(',', o.f);
        put_num(o.f, fc->lo[k]);
        fputc(',', o.f);
        put_num(o.f, fc->hi[k]);
        fputc(',', o.f);
        put_num(o.f, fc->cond_var[k]);
        fputc('\n', o.f);
    }
    free(st.stamp);
    int h = fc->h;
    fit_forecast_free(own);
    if (sh_outfile_commit(&o, err, sizeof err))
        return sh_fail(s, pi, "%s", err);
    char spec[160];
    fit_spec_format(&m->fit.spec, spec, sizeof spec);
    sh_printf(s, "wrote %d forecast step%s of model %d %s to %s (%g %% intervals)\n", h, h == 1 ? "" : "s", m->id,
              spec, path, lev);
    sh_printf(s, "  columns: %sstep, mean, se (forecast-error sd), lo%g, hi%g, variance (innovation variance)\n",
              have_time ? "time, " : "", lev, lev);
    sh_json_kstring(&s->j, "file", path);
    sh_json_kint(&s->j, "rows", h);
    sh_json_kbool(&s->j, "time", have_time);
    return 0;
}

static int cmd_save(sh_session *s, sh_words *w)
{
    int wi = sh_arg(w, 0), pi = sh_arg(w, 1);
    const char *what = w->word[wi];
    if (pi < 0)
        return sh_fail(s, wi, "save %s needs a file name, e.g. save %s out.csv", what, what);
    if (!strcmp(what, "resid")) {
        if (sh_arg(w, 2) >= 0)
            return sh_fail(s, sh_arg(w, 2), "save resid takes only the file name");
        return save_resid(s, w->word[pi], pi);
    }
    if (!strcmp(what, "forecast"))
        return save_forecast(s, w, w->word[pi], pi);
    return sh_fail(s, wi, "save takes resid or forecast, e.g. save resid out.csv");
}

/* ---- report ------------------------------------------------------------- */

static int cmd_report(sh_session *s, sh_words *w)
{
    int pi = sh_arg(w, 0);
    const char *path = w->word[pi];
    size_t l = strlen(path);
    int pdf;
    if (l > 5 && !strcmp(path + l - 5, ".html"))
        pdf = 0;
    else if (l > 4 && !strcmp(path + l - 4, ".pdf"))
        pdf = 1;
    else
        return sh_fail(s, pi, "the report name must end in .html or .pdf");
    long h = 0;
    if (option_long(s, w, "h", 1, 1000, &h))
        return -1;
    char err[1200];
    sh_report_info info;
    if (sh_report_write(s, path, pdf, (int)h, &info, err, sizeof err))
        return sh_fail(s, pi, "%s", err);
    sh_printf(s, "wrote %s report %s: %d model%s, %d chart%s, %d note%s\n", pdf ? "PDF" : "HTML", path,
              info.models, info.models == 1 ? "" : "s", info.charts, info.charts == 1 ? "" : "s", info.notes,
              info.notes == 1 ? "" : "s");
    if (*info.skipped)
        sh_printf(s, "  left out: %s\n", info.skipped);
    sh_json_kstring(&s->j, "file", path);
    sh_json_kint(&s->j, "models", info.models);
    sh_json_kint(&s->j, "charts", info.charts);
    sh_json_kint(&s->j, "notes", info.notes);
    return 0;
}

const sh_command sh_cmds_output[] = {
    { "plot", "plot series|fit|resid|acf|pacf|acf2|rolling|qq|profile|forecast [width=W] [height=H] [of=series|resid]",
      "draw a chart in the terminal", { "width", "height", "of", NULL }, 1, 1, cmd_plot,
      "  series    the working series;  fit  the series with the model's fitted values\n"
      "  resid     residuals of the current model (GARCH: with +-2 sigma_t)\n"
      "  acf pacf  autocorrelations with the band +-z/sqrt(n) at the alpha setting\n"
      "  acf2      autocorrelation of the squared residuals (volatility clustering)\n"
      "  rolling   rolling mean and sd against the global mean and sd\n"
      "  qq        normal QQ plot of the standardised residuals\n"
      "  profile   Ljung-Box p-value for every number of lags, against alpha\n"
      "  forecast  the fan of the last 'forecast' of the current model\n"
      "  Correlograms and rolling use the current model's residuals (standardised\n"
      "  for GARCH) or, with of=series or without a model, the working series.\n"
      "  width= defaults to the terminal's (set width), height= to 18 lines.\n"
      "  Unicode blocks on a UTF-8 terminal, ASCII otherwise; colour only on a\n"
      "  terminal, when NO_COLOR is not set and the session is not recording.\n" },
    { "save", "save resid|forecast FILE.csv [H]", "write residuals or forecasts as CSV",
      { NULL }, 2, 3, cmd_save,
      "  save resid FILE.csv      time (when the data had a time column), obs,\n"
      "                           resid, std_resid and, for GARCH, sigma_t\n"
      "  save forecast FILE.csv H H steps from the current model at the level\n"
      "                           setting; without H, the last 'forecast'\n"
      "  Files are written to a temporary name and renamed when complete.\n" },
    { "report", "report FILE.html|FILE.pdf [h=H]", "write the session report: data, models, checks, charts, notes",
      { "h", NULL }, 1, 1, cmd_report,
      "  HTML is one self-contained file (charts as inline SVG); PDF is drawn\n"
      "  with the same charts.  The report holds the data and its provenance,\n"
      "  every model tried with its verdict and origin, the current model's\n"
      "  estimates, the charts, the notes, method notes and limitations.  The\n"
      "  forecast fan uses the last 'forecast' of the current model, or h=H.\n" },
    { NULL, NULL, NULL, { NULL }, 0, 0, NULL, NULL }
};
