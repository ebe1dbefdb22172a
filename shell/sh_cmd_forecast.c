/* sh_cmd_forecast.c - using a model: forecast and holdout. */
#include "sh_handlers.h"
#include "sh_fmt.h"
#include "sh_report_text.h"
#include "fit_forecast.h"
#include "fit_holdout.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

/* H from word AI (1..10000) and LEVEL (percent) from level= or the setting. */
static int horizon_and_level(sh_session *s, sh_words *w, int ai, long *h, double *level)
{
    if (sh_parse_long(w->word[ai], h) || *h < 1 || *h > 10000)
        return sh_fail(s, ai, "the horizon must be a whole number of steps from 1 to 10000");
    *level = s->level;
    const char *v = sh_words_value(w, "level");
    if (v && (sh_parse_double(v, level) || !(*level > 50 && *level < 100)))
        return sh_fail(s, sh_words_option(w, "level"), "level= takes a percentage between 50 and 100, e.g. 95");
    return 0;
}

static void json_forecast(sh_session *s, const fit_forecast *fc)
{
    sh_json_knumber(&s->j, "level", fc->level * 100.0, NULL);
    sh_json_knumbers(&s->j, "mean", fc->mean, (size_t)fc->h, "not computable");
    sh_json_knumbers(&s->j, "se", fc->se, (size_t)fc->h, "not computable");
    sh_json_knumbers(&s->j, "lo", fc->lo, (size_t)fc->h, "not computable");
    sh_json_knumbers(&s->j, "hi", fc->hi, (size_t)fc->h, "not computable");
    sh_json_knumbers(&s->j, "variance", fc->cond_var, (size_t)fc->h, "not computable");
}

static int cmd_forecast(sh_session *s, sh_words *w)
{
    long h;
    double level;
    if (horizon_and_level(s, w, sh_arg(w, 0), &h, &level))
        return -1;
    sh_model *m = sh_current_model_on_series(s);
    if (!m)
        return -1;
    fit_forecast *fc = fit_forecast_alloc((int)h);
    if (!fc)
        return sh_fail(s, -1, "out of memory");
    int rc = fit_forecast_run(&m->fit, s->y, s->n, level / 100.0, fc);
    if (rc != HN_OK) {
        fit_forecast_free(fc);
        return sh_fail(s, -1, "cannot forecast from model %d: %s", m->id, hn_strerror(rc));
    }
    char spec[256], a[32], b[32], c[32], d[32], e[32];
    fit_spec_format(&m->fit.spec, spec, sizeof spec);
    sh_printf(s, "forecast from model %d  %s: %ld step%s after the last of %zu values, %g %% intervals\n", m->id,
              spec, h, h == 1 ? "" : "s", s->n, level);
    sh_printf(s, "  %6s %14s %12s %14s %14s", "step", "mean", "se", "lower", "upper");
    if (m->fit.spec.garch)
        sh_printf(s, " %14s", "cond variance");
    sh_printf(s, "\n");
    for (long k = 0; k < h; k++) {
        sh_printf(s, "  %6ld %14s %12s %14s %14s", k + 1, sh_num(a, sizeof a, fc->mean[k], 7),
                  sh_num(b, sizeof b, fc->se[k], 5), sh_num(c, sizeof c, fc->lo[k], 7), sh_num(d, sizeof d, fc->hi[k], 7));
        if (m->fit.spec.garch)
            sh_printf(s, " %14s", sh_num(e, sizeof e, fc->cond_var[k], 5));
        sh_printf(s, "\n");
    }
    sh_printf(s, "  intervals: mean +- %.4g x se (%s quantile)%s\n", fc->quantile,
              m->fit.spec.dist == FIT_DIST_T ? "unit-variance Student-t" : "normal",
              m->fit.spec.dist == FIT_DIST_T && h > 1 ? "; beyond one step the t quantile is an approximation" : "");
    sh_printf(s, "  parameter uncertainty is not included in the intervals\n");
    sh_json_kint(&s->j, "id", m->id);
    sh_json_kstring(&s->j, "model", spec);
    sh_json_kint(&s->j, "h", h);
    json_forecast(s, fc);
    fit_forecast_free(s->last_forecast);
    s->last_forecast = fc;
    s->last_forecast_model = m->id;
    return 0;
}

static int cmd_holdout(sh_session *s, sh_words *w)
{
    long h;
    double level;
    if (horizon_and_level(s, w, sh_arg(w, 0), &h, &level))
        return -1;
    sh_model *m = sh_current_model_on_series(s);
    if (!m)
        return -1;
    char spec[256], a[32], b[32], c[32], d[32];
    fit_spec_format(&m->fit.spec, spec, sizeof spec);
    if ((size_t)h >= s->n || s->n - (size_t)h < fit_min_obs(&m->fit.spec))
        return sh_fail(s, sh_arg(w, 0), "holding out %ld of %zu values leaves too few to fit %s (it needs %zu)", h, s->n,
                       spec, fit_min_obs(&m->fit.spec));
    fit_options opt = fit_default_options();
    opt.interrupt = &sh_interrupted;
    fit_holdout ho;
    int rc = fit_holdout_run(s->y, s->n, &m->fit.spec, &opt, (int)h, level / 100.0, &ho);
    if (rc != HN_OK)
        return sh_fail(s, -1, "hold-out check of %s failed: %s", spec, hn_strerror(rc));
    sh_printf(s, "hold-out check of %s: refitted on the first %zu values, forecasting the last %ld\n", spec,
              ho.n_train, h);
    sh_printf(s, "  %6s %14s %14s %14s %14s  %s\n", "step", "actual", "forecast", "lower", "upper", "inside");
    for (long k = 0; k < h; k++) {
        int in = ho.actual[k] >= ho.fc->lo[k] && ho.actual[k] <= ho.fc->hi[k];
        sh_printf(s, "  %6ld %14s %14s %14s %14s  %s\n", k + 1, sh_num(a, sizeof a, ho.actual[k], 7),
                  sh_num(b, sizeof b, ho.fc->mean[k], 7), sh_num(c, sizeof c, ho.fc->lo[k], 7),
                  sh_num(d, sizeof d, ho.fc->hi[k], 7), in ? "yes" : "NO");
    }
    sh_printf(s, "\n  MAE %s   RMSE %s   MASE %s (scale: mean |y_t - y_{t-1}| of the training values = %s)\n",
              sh_num(a, sizeof a, ho.sc.mae, 5), sh_num(b, sizeof b, ho.sc.rmse, 5), sh_num(c, sizeof c, ho.sc.mase, 4),
              sh_num(d, sizeof d, ho.sc.mase_scale, 5));
    sh_printf(s, "  coverage of the %g %% intervals: %d of %ld (%.1f %%)\n", level, ho.sc.inside, h, 100.0 * ho.sc.coverage);
    sh_text_warnings(s, &ho.fit, "  training fit ");
    sh_json_kint(&s->j, "id", m->id);
    sh_json_kstring(&s->j, "model", spec);
    sh_json_kint(&s->j, "h", h);
    sh_json_kint(&s->j, "n_train", (long long)ho.n_train);
    sh_json_knumbers(&s->j, "actual", ho.actual, (size_t)h, NULL);
    json_forecast(s, ho.fc);
    sh_json_knumber(&s->j, "mae", ho.sc.mae, NULL);
    sh_json_knumber(&s->j, "rmse", ho.sc.rmse, NULL);
    sh_json_knumber(&s->j, "mase", ho.sc.mase, "the training values have no variation");
    sh_json_knumber(&s->j, "coverage", ho.sc.coverage, NULL);
    fit_holdout_free(&ho);
    return 0;
}

const sh_command sh_cmds_forecast[] = {
    { "forecast", "forecast H [level=95]", "forecast H steps ahead from the current model, with intervals",
      { "level", NULL }, 1, 1, cmd_forecast,
      "  Point forecasts follow the ARMA recursion with future shocks zero; the\n"
      "  forecast-error variance sums psi-weights squared times the innovation\n"
      "  variance (the GARCH variance path when the model has one).\n" },
    { "holdout", "holdout H [level=95]", "refit without the last H values, forecast them and score the forecasts",
      { "level", NULL }, 1, 1, cmd_holdout,
      "  Prints MAE, RMSE, MASE (scaled by the in-sample mean absolute one-step\n"
      "  change) and the share of held-out values inside the intervals.\n" },
    { NULL, NULL, NULL, { NULL }, 0, 0, NULL, NULL }
};
