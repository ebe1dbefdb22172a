/* sh_cmd_model.c - the model commands: fit, check, models, use. */
#include "sh_handlers.h"
#include "sh_fmt.h"
#include "sh_report_text.h"
#include "hn_status.h"
#include "diag_stats.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static int need_series(sh_session *s)
{
    if (!s->loaded)
        return sh_fail(s, -1, "no series loaded (use 'load FILE column=NAME')");
    return 0;
}

/* Parse SPEC text from word WI plus the dist= and mean= options. */
static int spec_from_words(sh_session *s, sh_words *w, int wi, fit_spec *spec)
{
    char err[256];
    int pos = 0;
    /* A spec may be split over several words ("arma(1,1)+garch(1,1) t"):
     * join the positional words. */
    char text[512] = "";
    for (int k = 0, i; (i = sh_arg(w, k)) >= 0; k++) {
        size_t l = strlen(text);
        snprintf(text + l, sizeof text - l, "%s%s", k ? " " : "", w->word[i]);
    }
    const char *dist = sh_words_value(w, "dist");
    const char *mean = sh_words_value(w, "mean");
    if (dist) {
        if (strcmp(dist, "normal") && strcmp(dist, "t"))
            return sh_fail(s, sh_words_option(w, "dist"), "dist= takes normal or t");
        size_t l = strlen(text);
        snprintf(text + l, sizeof text - l, " %s", dist);
    }
    if (mean) {
        if (strcmp(mean, "yes") && strcmp(mean, "no"))
            return sh_fail(s, sh_words_option(w, "mean"), "mean= takes yes or no");
        if (!strcmp(mean, "no")) {
            size_t l = strlen(text);
            snprintf(text + l, sizeof text - l, " nomean");
        }
    }
    if (fit_spec_parse(text, spec, err, sizeof err, &pos) != HN_OK) {
        /* Point at the offending character: find the word that holds it. */
        int word = wi, acc = 0, within = 0;
        for (int k = 0, i; (i = sh_arg(w, k)) >= 0; k++) {
            int l = (int)strlen(w->word[i]);
            word = i;
            within = pos - acc;
            if (pos <= acc + l)
                break;
            acc += l + 1;
        }
        if (within < 0 || within > (int)strlen(w->word[word]))
            within = 0;
        sh_fail(s, word, "model '%s': %s (at character %d)", text, err, pos + 1);
        s->err_offset = within;
        return -1;
    }
    return 0;
}

static int cmd_fit(sh_session *s, sh_words *w)
{
    fit_spec spec;
    if (spec_from_words(s, w, sh_arg(w, 0), &spec) || need_series(s))
        return -1;
    size_t need = fit_min_obs(&spec);
    char spec_text[256];
    fit_spec_format(&spec, spec_text, sizeof spec_text);
    if (s->n < need)
        return sh_fail(s, sh_arg(w, 0), "%s needs at least %zu observations; the working series has %zu",
                       spec_text, need, s->n);
    fit_options opt = fit_default_options();
    opt.interrupt = &sh_interrupted;
    fit_result r;
    int rc = fit_model(s->y, s->n, &spec, &opt, &r);
    if (rc == HN_EINTR)
        return sh_fail(s, -1, "fit of %s interrupted; no model added", spec_text);
    if (rc == HN_ELIMIT && fit_work_bytes(&spec, s->n) > FIT_MAX_WORK_BYTES)
        return sh_fail(s, sh_arg(w, 0), "cannot fit %s: it would need about %.1f GB of working memory for %zu "
                       "observations, above the limit of %.1f GB; fit fewer terms or a shorter stretch of the series",
                       spec_text, fit_work_bytes(&spec, s->n) / 1e9, s->n, FIT_MAX_WORK_BYTES / 1e9);
    if (rc == HN_ELIMIT)
        return sh_fail(s, sh_arg(w, 0), "cannot fit %s: the series has values beyond +-%g, whose squares "
                       "could overflow in the likelihood; rescale it (e.g. divide by a power of ten)",
                       spec_text, FIT_MAX_ABS_VALUE);
    if (rc != HN_OK)
        return sh_fail(s, sh_arg(w, 0), "cannot fit %s: %s", spec_text, hn_strerror(rc));
    sh_model *m = sh_add_model(s, &r, 0, "fitted by hand");
    if (!m)
        return sh_fail(s, -1, "out of memory");
    sh_text_fit(s, m);
    sh_json_fit(s, m);
    return 0;
}



/* An ARMA model whose residuals are zero to rounding error (e.g. a series
 * that follows y_t = 0.5 y_{t-1} exactly): say that the checks can only be
 * testing rounding noise. */
static void exact_fit_note(sh_session *s, const sh_model *m)
{
    double mean, sd;
    if (m->fit.spec.garch || m->fit.n != s->n || !s->y || s->n < 2 ||
        diag_mean_sd(s->y, s->n, &mean, &sd) != HN_OK || !(sd > 0.0))
        return;
    double rms = sqrt(m->fit.sigma2);
    if (!(rms <= 1e-10 * sd))
        return;
    char a[32], b[32];
    sh_printf(s, "  note: the residuals are zero to rounding error (their rms %s against the series' sd %s): the "
              "model reproduces the series exactly, so these checks only test rounding noise\n",
              sh_num(a, sizeof a, rms, 3), sh_num(b, sizeof b, sd, 3));
    sh_json_kstring(&s->j, "note", "the residuals are zero to rounding error: the model reproduces the series exactly");
}

static int cmd_check(sh_session *s, sh_words *w)
{
    sh_model *m = sh_current_model(s);
    if (!m)
        return -1;
    diag_options o = sh_check_options(s, m);
    const char *v;
    long k;
    double x;
    if ((v = sh_words_value(w, "lags"))) {
        if (sh_parse_long(v, &k) || k < 1 || k > 400)
            return sh_fail(s, sh_words_option(w, "lags"), "lags= takes a whole number from 1 to 400");
        o.lags = (int)k;
    }
    if ((v = sh_words_value(w, "window"))) {
        if (sh_parse_long(v, &k) || k < 5)
            return sh_fail(s, sh_words_option(w, "window"), "window= takes a whole number of at least 5");
        o.window = (size_t)k;
    }
    if ((v = sh_words_value(w, "alpha"))) {
        if (sh_parse_double(v, &x) || !(x > 0 && x < 0.5))
            return sh_fail(s, sh_words_option(w, "alpha"), "alpha= takes a number between 0 and 0.5");
        o.alpha = x;
    }
    if ((v = sh_words_value(w, "arch"))) {
        if (sh_parse_long(v, &k) || k < 1 || k > 100)
            return sh_fail(s, sh_words_option(w, "arch"), "arch= takes a whole number from 1 to 100");
        o.arch_lags = (int)k;
    }
    int rc = sh_check_model(s, m, &o);
    if (rc != HN_OK)
        return sh_fail(s, -1, "cannot check model %d: %s", m->id, hn_strerror(rc));
    sh_text_check(s, m);
    sh_json_check(s, m);
    exact_fit_note(s, m);
    return 0;
}

static int cmd_models(sh_session *s, sh_words *w)
{
    (void)w;
    sh_text_models(s);
    sh_json_models(s);
    return 0;
}

static int cmd_use(sh_session *s, sh_words *w)
{
    int ai = sh_arg(w, 0);
    long id;
    if (sh_parse_long(w->word[ai], &id) || id < 1 || id > s->nmodels)
        return sh_fail(s, ai, s->nmodels ? "no model %s (models are numbered 1 to %d; see 'models')"
                                         : "no model %s (no models fitted yet)", w->word[ai], s->nmodels);
    s->current = (int)id - 1;
    sh_model *m = &s->models[s->current];
    char spec[256];
    fit_spec_format(&m->fit.spec, spec, sizeof spec);
    sh_printf(s, "current model: %d  %s\n", m->id, spec);
    sh_json_kint(&s->j, "id", m->id);
    sh_json_kstring(&s->j, "model", spec);
    return 0;
}

const sh_command sh_cmds_model[] = {
    { "fit", "fit SPEC [dist=normal|t] [mean=yes|no]",
      "fit a model by conditional maximum likelihood, e.g. fit arma(2,1)",
      { "dist", "mean", NULL }, 1, 4, cmd_fit,
      "  SPEC   arma(p,q), ar(p), ma(q), ar[1,7] (chosen lags), garch(1,1), joined by +;\n"
      "         'garch(1,1)' alone is a constant mean with a GARCH(1,1) variance,\n"
      "         a trailing 't' asks for Student-t innovations (with garch only).\n"
      "  dist=  normal (default) or t;  mean=  yes (estimate a constant, default) or no.\n"
      "  Sign convention: y_t - mu = sum ar_i (y_{t-i} - mu) + e_t + sum ma_j e_{t-j}.\n"
      "  The first p values condition the likelihood; pre-sample shocks are zero.\n" },
    { "check", "check [lags=M] [window=W] [alpha=A] [arch=Q]",
      "run the white-noise battery on the current model's residuals",
      { "lags", "window", "alpha", "arch", NULL }, 0, 0, cmd_check,
      "  Criteria: mean zero, constant variance, no serial correlation, no\n"
      "  volatility clustering, randomness; normality is shown apart.  The\n"
      "  verdict controls the family-wise error across criteria (Holm).\n" },
    { "models", "models", "list every model fitted in this session", { NULL }, 0, 0, cmd_models, NULL },
    { "use", "use N", "make model N the current one", { NULL }, 1, 1, cmd_use, NULL },
    { NULL, NULL, NULL, { NULL }, 0, 0, NULL, NULL }
};
