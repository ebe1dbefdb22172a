/* sh_report_text.c - how fits, checks and the model list read on screen and in JSON. */
#include "sh_report_text.h"
#include "sh_fmt.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

static const char *dist_name(const fit_spec *s)
{
    return s->dist == FIT_DIST_T ? "Student-t" : "normal";
}

void sh_text_warnings(sh_session *s, const fit_result *f, const char *p)
{
    unsigned wv = f->warnings;
    if (wv & FIT_WARN_NOCONV)
        sh_printf(s, "%swarning: the optimiser stopped before meeting its tolerance (gradient norm %.2g); treat the estimates with care\n", p, f->grad_norm);
    if (wv & FIT_WARN_NONSTATIONARY)
        sh_printf(s, "%swarning: the AR part is not stationary (an inverse root lies on or outside the unit circle); consider differencing\n", p);
    else if (wv & FIT_WARN_NEAR_UNIT_ROOT)
        sh_printf(s, "%swarning: an AR inverse root is within 0.01 of the unit circle (near a unit root)\n", p);
    if (wv & FIT_WARN_NONINVERTIBLE)
        sh_printf(s, "%swarning: the MA part is not invertible (an inverse root lies on or outside the unit circle)\n", p);
    if (wv & FIT_WARN_SINGULAR)
        sh_printf(s, "%swarning: the Hessian is singular at the estimate; standard errors are not available (parameters may not be identified)\n", p);
    if (wv & FIT_WARN_SE_MEAN_ONLY)
        sh_printf(s, "%snote: standard errors for the mean terms only (their own block of the Hessian); the variance parameters are at a bound and get none\n", p);
    if (wv & FIT_WARN_NEAR_UNIT)
        sh_printf(s, "%swarning: alpha1 + beta1 = %.4f is close to 1: shocks to the variance barely die out\n", p, f->persistence);
    if (wv & FIT_WARN_ALPHA_ZERO)
        sh_printf(s, "%swarning: alpha1 is at its lower bound, so beta1 is not identified; the variance model may be unnecessary\n", p);
    if (wv & FIT_WARN_SHORT_GARCH)
        sh_printf(s, "%swarning: %zu observations is short for a variance model (common practice asks for 500 or more)\n", p, f->n);
    if (wv & FIT_WARN_NU_BOUND)
        sh_printf(s, "%swarning: the Student-t degrees of freedom nu are at their bound\n", p);
}

void sh_text_fit(sh_session *s, const sh_model *m)
{
    const fit_result *f = &m->fit;
    char spec[256], a[32], b[32], c[32], d[32], name[16];
    fit_spec_format(&f->spec, spec, sizeof spec);
    int robust = f->spec.garch;

    sh_printf(s, "model %d  %s   (%s innovations, conditional maximum likelihood)\n", m->id, spec,
              dist_name(&f->spec));
    sh_printf(s, "  data   %s\n", m->series);
    sh_printf(s, "  sample n = %zu, N = %zu in the likelihood after %zu conditioning value%s\n", f->n,
              f->n_eff, f->start, f->start == 1 ? "" : "s");
    {
        int has_arma = f->spec.n_ar || f->spec.n_ma;
        const char *lhs = f->spec.mean ? (has_arma ? "y_t - mu" : "y_t") : "y_t";
        sh_printf(s, "  form   %s = %s%s%s%s%s\n", lhs,
                  f->spec.mean && !has_arma ? "mu + " : "",
                  f->spec.n_ar ? (f->spec.mean ? "sum ar_i (y_{t-i} - mu) + " : "sum ar_i y_{t-i} + ") : "",
                  "e_t", f->spec.n_ma ? " + sum ma_j e_{t-j}" : "", f->spec.mean ? "" : "   (mean fixed at 0)");
    }
    if (f->spec.garch)
        sh_printf(s, "         sigma2_t = omega + alpha1 e2_{t-1} + beta1 sigma2_{t-1}, sigma2_0 = e2_0 = mean e2\n");
    sh_printf(s, "\n  %-10s %14s %12s %9s%s\n", "parameter", "estimate", robust ? "robust se" : "std error",
              "t-ratio", robust ? "    hessian se" : "");
    for (int i = 0; i < f->np; i++) {
        double se = robust ? f->se_robust[i] : f->se[i];
        double tr = isfinite(se) && se > 0 ? f->par[i] / se : NAN;
        sh_printf(s, "  %-10s %14s %12s %9s", fit_spec_param_name(&f->spec, i, name, sizeof name),
                  sh_num(a, sizeof a, f->par[i], 7), sh_num(b, sizeof b, se, 4), sh_num(c, sizeof c, tr, 3));
        if (robust)
            sh_printf(s, " %13s", sh_num(d, sizeof d, f->se[i], 4));
        sh_printf(s, "\n");
    }
    if (!f->spec.garch)
        sh_printf(s, "  %-10s %14s %12s   (SSR/N, concentrated out)\n", "sigma2", sh_num(a, sizeof a, f->sigma2, 7), "");
    sh_printf(s, "\n  loglik %s   AIC %s   AICc %s   BIC %s   HQ %s\n", sh_num(a, sizeof a, f->loglik, 10),
              sh_num(b, sizeof b, f->aic, 8), sh_num(c, sizeof c, f->aicc, 8), sh_num(d, sizeof d, f->bic, 8),
              sh_num(name, sizeof name, f->hq, 8));
    sh_printf(s, "  criteria use k = %d parameters and N = %zu; the log-likelihood includes the 2 pi constant\n",
              f->k_ic, f->n_eff);
    if (f->spec.garch) {
        if (f->warnings & FIT_WARN_ALPHA_ZERO) {
            /* beta1 is not identified, so neither are the persistence and what
             * follows from it; the variance level the data support is */
            double v = NAN;
            if (f->sigma_t && f->n_eff > 0) {
                v = 0.0;
                for (size_t i = 0; i < f->n_eff; i++)
                    v += f->sigma_t[i] * f->sigma_t[i];
                v /= (double)f->n_eff;
            }
            sh_printf(s, "  persistence not identified: alpha1 is at its bound, so sigma2_t stays near its mean, %s\n",
                      sh_num(a, sizeof a, v, 5));
        } else if (f->persistence < 0.999)
            sh_printf(s, "  persistence alpha1 + beta1 = %s, unconditional variance %s, half-life of a shock %.3g steps\n",
                      sh_num(a, sizeof a, f->persistence, 5), sh_num(b, sizeof b, f->sigma2, 5), f->half_life);
        else
            sh_printf(s, "  persistence alpha1 + beta1 = %s: at the integrated boundary, so the unconditional variance\n"
                      "  and the half-life of a shock are not defined\n", sh_num(a, sizeof a, f->persistence, 6));
        sh_printf(s, "  robust se: Bollerslev-Wooldridge sandwich; hessian se: inverse Hessian\n");
    }
    if (f->n_ar_roots) {
        sh_printf(s, "  AR inverse roots |z|:");
        for (int i = 0; i < f->n_ar_roots && i < 12; i++)
            sh_printf(s, " %.3f", hypot(f->ar_roots[i].re, f->ar_roots[i].im));
        sh_printf(s, "%s  -> %s\n", f->n_ar_roots > 12 ? " ..." : "", f->stationary ? "stationary" : "NOT stationary");
    }
    if (f->n_ma_roots) {
        sh_printf(s, "  MA inverse roots |z|:");
        for (int i = 0; i < f->n_ma_roots && i < 12; i++)
            sh_printf(s, " %.3f", hypot(f->ma_roots[i].re, f->ma_roots[i].im));
        sh_printf(s, "%s  -> %s\n", f->n_ma_roots > 12 ? " ..." : "", f->invertible ? "invertible" : "NOT invertible");
    }
    char gn[32];
    if (f->grad_norm < 1e-10)
        snprintf(gn, sizeof gn, "below 1e-10");   /* rounding noise: not worth digits */
    else
        snprintf(gn, sizeof gn, "%.2g", f->grad_norm);
    sh_printf(s, "  optimiser: %s after %d iteration%s (%d evaluations), gradient norm %s\n",
              f->converged ? "converged" : "did NOT converge", f->iterations, f->iterations == 1 ? "" : "s",
              f->evaluations, gn);
    sh_text_warnings(s, f, "  ");
}

static void json_warnings(sh_session *s, const fit_result *f)
{
    static const struct { unsigned bit; const char *id; } names[] = {
        { FIT_WARN_NOCONV, "not converged" }, { FIT_WARN_NONSTATIONARY, "not stationary" },
        { FIT_WARN_NONINVERTIBLE, "not invertible" }, { FIT_WARN_SINGULAR, "singular hessian" },
        { FIT_WARN_SE_MEAN_ONLY, "mean standard errors only" },
        { FIT_WARN_NEAR_UNIT, "variance persistence near 1" }, { FIT_WARN_ALPHA_ZERO, "alpha1 at bound" },
        { FIT_WARN_SHORT_GARCH, "short series for garch" }, { FIT_WARN_NU_BOUND, "nu at bound" },
        { FIT_WARN_NEAR_UNIT_ROOT, "near unit root" },
    };
    sh_json_key(&s->j, "warnings");
    sh_json_begin_array(&s->j);
    for (size_t i = 0; i < sizeof names / sizeof names[0]; i++)
        if (f->warnings & names[i].bit)
            sh_json_string(&s->j, names[i].id);
    sh_json_end_array(&s->j);
}

static void json_roots(sh_session *s, const char *key, const fit_complex *r, int n)
{
    sh_json_key(&s->j, key);
    sh_json_begin_array(&s->j);
    for (int i = 0; i < n; i++) {
        sh_json_begin_object(&s->j);
        sh_json_knumber(&s->j, "re", r[i].re, NULL);
        sh_json_knumber(&s->j, "im", r[i].im, NULL);
        sh_json_knumber(&s->j, "modulus", hypot(r[i].re, r[i].im), NULL);
        sh_json_end_object(&s->j);
    }
    sh_json_end_array(&s->j);
}

void sh_json_fit(sh_session *s, const sh_model *m)
{
    const fit_result *f = &m->fit;
    char spec[256], name[16];
    sh_json *j = &s->j;
    fit_spec_format(&f->spec, spec, sizeof spec);
    sh_json_kint(j, "id", m->id);
    sh_json_kstring(j, "model", spec);
    sh_json_kstring(j, "dist", f->spec.dist == FIT_DIST_T ? "t" : "normal");
    sh_json_key(j, "params");
    sh_json_begin_object(j);
    for (int i = 0; i < f->np; i++)
        sh_json_knumber(j, fit_spec_param_name(&f->spec, i, name, sizeof name), f->par[i], "not estimated");
    sh_json_end_object(j);
    sh_json_key(j, "se");
    sh_json_begin_object(j);
    const char *no_se = f->warnings & FIT_WARN_SE_MEAN_ONLY
                            ? "alpha1 at its bound: standard errors for the mean terms only"
                            : "Hessian singular or not positive definite";
    for (int i = 0; i < f->np; i++)
        sh_json_knumber(j, fit_spec_param_name(&f->spec, i, name, sizeof name), f->se[i], no_se);
    sh_json_end_object(j);
    if (f->spec.garch) {
        sh_json_key(j, "se_robust");
        sh_json_begin_object(j);
        for (int i = 0; i < f->np; i++)
            sh_json_knumber(j, fit_spec_param_name(&f->spec, i, name, sizeof name), f->se_robust[i],
                            "sandwich not computable");
        sh_json_end_object(j);
        const int at_bound = (f->warnings & FIT_WARN_ALPHA_ZERO) != 0;
        sh_json_knumber(j, "persistence", at_bound ? NAN : f->persistence,
                        "alpha1 at its bound: beta1 not identified");
        sh_json_knumber(j, "half_life", !at_bound && f->persistence < 0.999 ? f->half_life : NAN,
                        at_bound ? "alpha1 at its bound: beta1 not identified"
                                 : "persistence at the integrated boundary");
    }
    sh_json_knumber(j, "sigma2", f->spec.garch && !(f->persistence < 0.999) ? NAN : f->sigma2,
                    "unconditional variance not defined at the integrated boundary");
    sh_json_knumber(j, "loglik", f->loglik, NULL);
    sh_json_knumber(j, "aic", f->aic, NULL);
    sh_json_knumber(j, "aicc", f->aicc, "N - k - 1 <= 0");
    sh_json_knumber(j, "bic", f->bic, NULL);
    sh_json_knumber(j, "hq", f->hq, NULL);
    sh_json_kint(j, "k", f->k_ic);
    sh_json_kint(j, "n", (long long)f->n);
    sh_json_kint(j, "n_eff", (long long)f->n_eff);
    sh_json_kbool(j, "converged", f->converged);
    sh_json_kint(j, "iterations", f->iterations);
    sh_json_kint(j, "evaluations", f->evaluations);
    sh_json_knumber(j, "grad_norm", f->grad_norm, NULL);
    sh_json_kbool(j, "stationary", f->stationary);
    sh_json_kbool(j, "invertible", f->invertible);
    json_roots(s, "ar_roots", f->ar_roots, f->n_ar_roots);
    json_roots(s, "ma_roots", f->ma_roots, f->n_ma_roots);
    json_warnings(s, f);
}

void sh_wrap(sh_session *s, const char *text, int indent)
{
    int width = s->width > 40 ? s->width : 80, col = indent;
    const char *p = text;
    while (*p) {
        while (*p == ' ')
            p++;
        const char *e = p;
        while (*e && *e != ' ')
            e++;
        int len = (int)(e - p);
        if (col > indent && col + 1 + len > width) {
            sh_printf(s, "\n%*s", indent, "");
            col = indent;
        } else if (col > indent) {
            sh_printf(s, " ");
            col++;
        }
        sh_printf(s, "%.*s", len, p);
        col += len;
        p = e;
    }
    sh_printf(s, "\n");
}

void sh_text_check(sh_session *s, const sh_model *m)
{
    const diag_battery *b = &m->battery;
    char spec[256], st[32], df[16], p[24], ef[32];
    fit_spec_format(&m->fit.spec, spec, sizeof spec);
    sh_printf(s, "checks on model %d  %s: %zu %sresiduals, alpha %g\n", m->id, spec, b->n,
              m->bopt.standardised ? "standardised " : "", b->alpha);
    sh_printf(s, "  portmanteau lags m = %d (%s); blocks of %zu (%s)\n", b->m, b->lag_rule ? b->lag_rule : "",
              b->window, b->window_rule ? b->window_rule : "");
    sh_printf(s, "\n  %-25s %-16s %12s %6s %9s  %-6s %s\n", "criterion", "check", "statistic", "df", "p", "result",
              "size");
    for (int c = 0; c < DIAG_NCRIT; c++) {
        int first = 1;
        for (int i = 0; i < b->ntests; i++) {
            const diag_test *t = &b->tests[i];
            if ((int)t->criterion != c)
                continue;
            const char *crit = first ? diag_criterion_name(t->criterion) : "";
            first = 0;
            if (!t->valid) {
                sh_printf(s, "  %-25s %-16s %12s %6s %9s  %-6s\n", crit, t->name, "-", "-", "-", "n/a");
                continue;
            }
            if (isfinite(t->df))
                snprintf(df, sizeof df, "%g", t->df);
            else
                snprintf(df, sizeof df, "-");
            ef[0] = '\0';
            if (isfinite(t->effect))
                snprintf(ef, sizeof ef, "%.3g", t->effect);
            sh_printf(s, "  %-25s %-16s %12s %6s %9s  %-6s %s\n", crit, t->name,
                      sh_num(st, sizeof st, t->statistic, 5), df, sh_pval(p, sizeof p, t->p),
                      t->pass ? "pass" : "FAIL", ef);
        }
    }
    sh_printf(s, "\n  notes\n");
    for (int i = 0; i < b->ntests; i++) {
        const diag_test *t = &b->tests[i];
        char line[768];
        if (!t->detail[0] && !(t->valid && isfinite(t->effect) && t->effect_label))
            continue;
        if (!t->valid)
            snprintf(line, sizeof line, "not computed: %s", t->detail);
        else if (isfinite(t->effect) && t->effect_label)
            snprintf(line, sizeof line, "%s%ssize %.3g = %s", t->detail, t->detail[0] ? "; " : "", t->effect,
                     t->effect_label);
        else
            snprintf(line, sizeof line, "%s", t->detail);
        sh_printf(s, "    %-16s ", t->name);
        sh_wrap(s, line, 21);
    }

    sh_printf(s, "\n  %-25s %22s  %9s  %s\n", "criterion", "p (Bonferroni within)", "Holm step", "decision");
    for (int c = 0; c < DIAG_NCRIT; c++) {
        if (!isfinite(b->crit_p[c]))
            continue;
        char step[16];
        if (b->holm_rank[c])
            snprintf(step, sizeof step, "%d", b->holm_rank[c]);
        else
            snprintf(step, sizeof step, "-");
        sh_printf(s, "  %-25s %22s  %9s  %s\n", diag_criterion_name((diag_criterion)c),
                  sh_pval(p, sizeof p, b->crit_p[c]), step,
                  c == DIAG_NORMAL ? (b->crit_pass[c] ? "consistent with normal (information only)"
                                                      : "not normal (information only)")
                                   : (b->crit_pass[c] ? "pass" : "FAIL"));
    }
    /* The portmanteau profile: one m must not decide alone. */
    if (b->profile_p && b->acf_lags > 0) {
        char line[4096];
        size_t at = 0;
        int first_sig = 0, shown = 0;
        line[0] = '\0';
        for (int k = 0; k < b->acf_lags; k++) {
            double pk = b->profile_p[k];
            if (!isfinite(pk))
                continue;
            if (!first_sig && pk < b->alpha)
                first_sig = k + 1;
            if (at < sizeof line)
                at += (size_t)snprintf(line + at, sizeof line - at, "%s%d:%s", shown++ ? "  " : "", k + 1,
                                       sh_pval(p, sizeof p, pk));
        }
        if (shown) {
            sh_printf(s, "\n  Ljung-Box p-value at each m (profile; df = m - %d):\n    ", m->bopt.df_adjust);
            sh_wrap(s, line, 4);
            if (first_sig)
                sh_printf(s, "    first significant at m = %d (alpha %g, each m on its own)\n", first_sig, b->alpha);
            else
                sh_printf(s, "    no m up to %d is significant at alpha %g\n", b->acf_lags, b->alpha);
        }
    }

    sh_printf(s, "\n  verdict: %s\n", b->white ? "WHITE NOISE - nothing predictable found in the residuals"
                                               : "NOT WHITE NOISE");
    if (b->summary[0]) {
        sh_printf(s, "  ");
        sh_wrap(s, b->summary, 2);
    }
    sh_printf(s, "  ");
    sh_wrap(s, b->white ? "Reading: no criterion found evidence against white noise at the family-wise level. "
                       "That is absence of evidence, not proof: short series have little power, and the checks "
                       "say nothing about how well the model will forecast."
                     : "Reading: a small p-value is evidence that the residuals still hold structure of that kind; "
                       "a criterion that passes only means no such evidence was found. At large n even tiny "
                       "effects become significant: compare the size column before acting.", 2);
}

void sh_json_check(sh_session *s, const sh_model *m)
{
    const diag_battery *b = &m->battery;
    sh_json *j = &s->j;
    char spec[256];
    fit_spec_format(&m->fit.spec, spec, sizeof spec);
    sh_json_kint(j, "id", m->id);
    sh_json_kstring(j, "model", spec);
    sh_json_kint(j, "n", (long long)b->n);
    sh_json_kint(j, "lags", b->m);
    sh_json_kstring(j, "lag_rule", b->lag_rule ? b->lag_rule : "");
    sh_json_knumber(j, "alpha", b->alpha, NULL);
    sh_json_kbool(j, "standardised", m->bopt.standardised);
    sh_json_key(j, "tests");
    sh_json_begin_array(j);
    for (int i = 0; i < b->ntests; i++) {
        const diag_test *t = &b->tests[i];
        sh_json_begin_object(j);
        sh_json_kstring(j, "name", t->name);
        sh_json_kstring(j, "criterion", diag_criterion_id(t->criterion));
        sh_json_knumber(j, "statistic", t->valid ? t->statistic : NAN, t->detail);
        sh_json_knumber(j, "df", t->df, "no degrees of freedom");
        sh_json_knumber(j, "p", t->valid ? t->p : NAN, t->detail);
        sh_json_kbool(j, "pass", t->pass);
        if (isfinite(t->effect)) {
            sh_json_knumber(j, "effect", t->effect, NULL);
            sh_json_kstring(j, "effect_label", t->effect_label ? t->effect_label : "");
        }
        if (t->detail[0])
            sh_json_kstring(j, "detail", t->detail);
        sh_json_end_object(j);
    }
    sh_json_end_array(j);
    sh_json_kstring(j, "verdict", b->white ? "white" : "not white");
    sh_json_key(j, "failed");
    sh_json_begin_array(j);
    for (int c = 0; c < DIAG_NCRIT; c++)
        if (c != DIAG_NORMAL && isfinite(b->crit_p[c]) && !b->crit_pass[c])
            sh_json_string(j, diag_criterion_id((diag_criterion)c));
    sh_json_end_array(j);
    sh_json_key(j, "criteria");
    sh_json_begin_object(j);
    for (int c = 0; c < DIAG_NCRIT; c++) {
        sh_json_key(j, diag_criterion_id((diag_criterion)c));
        sh_json_begin_object(j);
        sh_json_knumber(j, "p", b->crit_p[c], "no valid check");
        sh_json_kbool(j, "pass", b->crit_pass[c]);
        sh_json_kint(j, "holm_step", b->holm_rank[c]);
        sh_json_end_object(j);
    }
    sh_json_end_object(j);
    sh_json_knumber(j, "band", b->band, NULL);
    sh_json_knumbers(j, "acf", b->acf, (size_t)b->acf_lags, "not computable");
    sh_json_knumbers(j, "pacf", b->pacf, (size_t)b->acf_lags, "not computable");
    sh_json_knumbers(j, "profile_q", b->profile_q, (size_t)b->acf_lags, "df < 1 at this lag");
    sh_json_knumbers(j, "profile_p", b->profile_p, (size_t)b->acf_lags, "df < 1 at this lag");
    sh_json_kstring(j, "summary", b->summary);
}

static void criteria_words(const sh_model *m, char *buf, size_t len)
{
    if (!m->checked) {
        snprintf(buf, len, "not checked");
        return;
    }
    const diag_battery *b = &m->battery;
    if (b->white) {
        snprintf(buf, len, "white");
        return;
    }
    size_t at = (size_t)snprintf(buf, len, "fails:");
    for (int c = 0; c < DIAG_NCRIT && at < len; c++)
        if (c != DIAG_NORMAL && isfinite(b->crit_p[c]) && !b->crit_pass[c])
            at += (size_t)snprintf(buf + at, len - at, " %s", diag_criterion_id((diag_criterion)c));
}

void sh_text_models(sh_session *s)
{
    char spec[256], a[32], b[32], c[32], crit[96];
    if (!s->nmodels) {
        sh_printf(s, "no models yet\n");
        return;
    }
    sh_printf(s, "   %3s  %-28s %12s %11s %11s %7s  %-30s %s\n", "id", "model", "loglik", "AICc", "BIC", "N",
              "residuals", "origin");
    for (int i = 0; i < s->nmodels; i++) {
        const sh_model *m = &s->models[i];
        fit_spec_format(&m->fit.spec, spec, sizeof spec);
        criteria_words(m, crit, sizeof crit);
        char origin[600];
        if (m->parent)
            snprintf(origin, sizeof origin, "from %d: %s", m->parent, m->origin);
        else
            snprintf(origin, sizeof origin, "%s", m->origin);
        sh_printf(s, " %c %3d  %-28s %12s %11s %11s %7zu  %-30s %s\n", i == s->current ? '*' : ' ', m->id, spec,
                  sh_num(a, sizeof a, m->fit.loglik, 9), sh_num(b, sizeof b, m->fit.aicc, 8),
                  sh_num(c, sizeof c, m->fit.bic, 8), m->fit.n_eff, crit, origin);
    }
    sh_printf(s, "  * current model; criteria compare only models fitted to the same working series\n");
}

void sh_json_models(sh_session *s)
{
    sh_json *j = &s->j;
    char spec[256];
    sh_json_kint(j, "current", s->current >= 0 ? s->models[s->current].id : 0);
    sh_json_key(j, "models");
    sh_json_begin_array(j);
    for (int i = 0; i < s->nmodels; i++) {
        const sh_model *m = &s->models[i];
        fit_spec_format(&m->fit.spec, spec, sizeof spec);
        sh_json_begin_object(j);
        sh_json_kint(j, "id", m->id);
        sh_json_kstring(j, "model", spec);
        sh_json_knumber(j, "loglik", m->fit.loglik, NULL);
        sh_json_knumber(j, "aicc", m->fit.aicc, NULL);
        sh_json_knumber(j, "bic", m->fit.bic, NULL);
        sh_json_kint(j, "n_eff", (long long)m->fit.n_eff);
        sh_json_kint(j, "parent", m->parent);
        sh_json_kstring(j, "origin", m->origin);
        sh_json_kstring(j, "series", m->series);
        if (m->checked)
            sh_json_kstring(j, "verdict", m->battery.white ? "white" : "not white");
        else {
            sh_json_key(j, "verdict");
            sh_json_null(j);
        }
        sh_json_end_object(j);
    }
    sh_json_end_array(j);
}
