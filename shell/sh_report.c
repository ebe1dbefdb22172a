/* sh_report.c - the session report: provenance, model history, final estimates,
 * checks, charts, notes, method notes and limitations, in HTML or PDF. */
#include "sh_report.h"
#include "sh_figure.h"
#include "sh_cairo.h"
#include "sh_draw.h"
#include "sh_file.h"
#include "sh_fmt.h"
#include "sh_journal.h"
#include "sh_notes.h"
#include "sh_report_text.h"
#include "diag_stats.h"
#include "sh_stamps.h"
#include "sh_time.h"
#include "fit_forecast.h"
#include "hn_status.h"

#include <cairo.h>
#include <cairo-pdf.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#ifndef HONE_VERSION
#define HONE_VERSION "0.0.0"
#endif

static const char CAUTION[] =
    "Residuals that pass the white-noise checks make a model statistically adequate; they do not "
    "guarantee that its forecasts will be accurate. Where decisions in finance, safety or regulation "
    "depend on the model, validate it under your own model-risk policy and the rules that apply to you.";

static const char *const METHOD_NOTES[] = {
    "Mean model: y_t - mu = sum_i ar_i (y_{t-i} - mu) + e_t + sum_j ma_j e_{t-j}. The first p observations "
    "condition the likelihood and pre-sample shocks are zero; sigma^2 = SSR/N over the N = n - p residuals.",
    "GARCH(1,1): sigma^2_t = omega + alpha1 e^2_{t-1} + beta1 sigma^2_{t-1}, started at sigma^2_0 = e^2_0 = the mean "
    "squared residual; mean and variance parameters are estimated jointly. Standard errors are the robust "
    "(Bollerslev-Wooldridge) sandwich, with the inverse-Hessian ones beside them.",
    "Log-likelihoods include the 2 pi constant; AIC, AICc, BIC and HQ use the effective sample size N. Criteria "
    "compare only models fitted to the same working series.",
    "The residual checks run on the residuals (standardised residuals for GARCH models). Each criterion's p-value "
    "is the Bonferroni-adjusted smallest p of its checks; the verdict uses Holm's step-down procedure across the "
    "white-noise criteria at the alpha shown. Normality is reported for the intervals only.",
    "Correlogram bands are +-z/sqrt(n), z the two-sided normal quantile at alpha. Portmanteau degrees of freedom "
    "are m - (p + q).",
    "Forecast intervals: mean -/+ quantile x forecast-error sd from the psi weights and the innovation (or GARCH) "
    "variance forecast; parameter uncertainty is not included.",
};

static const char *const LIMITATIONS[] = {
    "Conditional (not exact) likelihood: in short series the estimates differ from exact-likelihood ones.",
    "A passing battery means no evidence against white noise at the chosen alpha and lags; it is not proof, and "
    "checks have little power in short series.",
    "Structural breaks, outliers and calendar effects are not modelled unless the user transforms the data.",
    "Forecast intervals assume the model and its parameters hold over the horizon.",
};

typedef struct {
    sh_figure fig[SH_FIG_NKINDS];
    int have[SH_FIG_NKINDS];
    int nfig;
} figures;

static const sh_fig_kind ORDER[] = { SH_FIG_FIT, SH_FIG_RESID, SH_FIG_ACF, SH_FIG_PACF, SH_FIG_ACF2,
                                     SH_FIG_ROLLING, SH_FIG_QQ, SH_FIG_PROFILE, SH_FIG_FAN };
#define NORDER (sizeof ORDER / sizeof ORDER[0])

/* Run a text renderer with its output captured into a malloc'd string. */
static char *capture_model(sh_session *s, void (*fn)(sh_session *, const sh_model *), const sh_model *m)
{
    FILE *keep = s->out;
    char *buf = NULL;
    size_t len = 0;
    s->out = open_memstream(&buf, &len);
    if (!s->out) {
        s->out = keep;
        return NULL;
    }
    fn(s, m);
    fclose(s->out);
    s->out = keep;
    return buf;
}

static const char *verdict_words(const sh_model *m, char *buf, size_t len)
{
    if (!m->checked) {
        snprintf(buf, len, "not checked");
        return buf;
    }
    if (m->battery.white) {
        snprintf(buf, len, "white noise");
        return buf;
    }
    snprintf(buf, len, "not white, fails:");
    int k = 0;
    for (int c = 0; c < DIAG_NCRIT; c++)
        if (c != DIAG_NORMAL && !m->battery.crit_pass[c]) {
            size_t l = strlen(buf);
            snprintf(buf + l, len - l, "%s %s", k++ ? "," : "", diag_criterion_id((diag_criterion)c));
        }
    return buf;
}

static void origin_words(const sh_model *m, char *buf, size_t len)
{
    char tag[32];
    snprintf(tag, sizeof tag, "model %d", m->parent);
    if (m->parent && !strstr(m->origin, tag))
        snprintf(buf, len, "from model %d: %s", m->parent, m->origin);
    else
        snprintf(buf, len, "%s", *m->origin ? m->origin : "-");
}

/* ---- HTML ------------------------------------------------------------------ */

static void esc(FILE *f, const char *t)
{
    for (; t && *t; t++) {
        switch (*t) {
        case '<': fputs("&lt;", f); break;
        case '>': fputs("&gt;", f); break;
        case '&': fputs("&amp;", f); break;
        case '"': fputs("&quot;", f); break;
        default: fputc(*t, f);
        }
    }
}

static void escf(FILE *f, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void escf(FILE *f, const char *fmt, ...)
{
    char buf[2048];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(buf, sizeof buf, fmt, ap);
    va_end(ap);
    esc(f, buf);
}

static const char CSS[] =
    "body{margin:0;background:#f4f3ef;color:#1f2328;font:15px/1.5 system-ui,-apple-system,'Segoe UI',"
    "Helvetica,Arial,sans-serif}"
    "main{max-width:1040px;margin:0 auto;padding:0 24px 40px}"
    "header.top{background:#22313f;color:#f4f3ef;padding:22px 0 18px;margin-bottom:18px}"
    "header.top div{max-width:1040px;margin:0 auto;padding:0 24px}"
    "header.top h1{margin:0;font-size:24px;font-weight:600;letter-spacing:.02em}"
    "header.top p{margin:4px 0 0;color:#b9c4cc;font-size:13px}"
    "section{background:#fff;border:1px solid #dedcd5;border-radius:6px;padding:14px 20px;margin:14px 0}"
    "h2{font-size:17px;margin:2px 0 10px;color:#22313f;border-bottom:2px solid #c9a227;display:inline-block;"
    "padding-bottom:2px}"
    "table{border-collapse:collapse;font-size:13.5px;margin:6px 0}"
    "th,td{padding:4px 10px;text-align:left;border-bottom:1px solid #ecebe6;vertical-align:top}"
    "th{background:#f0eee8;font-weight:600}"
    "td.n{text-align:right;white-space:nowrap;font-variant-numeric:tabular-nums;font-family:ui-monospace,Menlo,Consolas,monospace}"
    "tr.cur td{background:#fbf6e4}td.m{white-space:nowrap}"
    ".white{color:#1d6b3a;font-weight:600}.notwhite{color:#a2312b;font-weight:600}"
    "pre{background:#f7f6f2;border:1px solid #ecebe6;padding:8px 10px;font-size:12px;line-height:1.35;"
    "overflow-x:auto}"
    ".charts{display:grid;grid-template-columns:1fr 1fr;gap:14px}"
    "figure{margin:0;background:#fff;border:1px solid #ecebe6;border-radius:4px;padding:6px}"
    "figure.wide{grid-column:1 / span 2}"
    "figure svg{display:block;width:100%;height:auto}"
    "figcaption{font-size:12.5px;color:#4a5560;padding:4px 4px 2px}"
    "dl{display:grid;grid-template-columns:max-content 1fr;gap:2px 16px;margin:4px 0}dt{color:#4a5560}dd{margin:0}"
    "ul{margin:4px 0;padding-left:20px}"
    "footer{max-width:1040px;margin:0 auto;padding:10px 24px 30px;font-size:12.5px;color:#4a5560;"
    "border-top:1px solid #dedcd5}"
    "footer strong{color:#22313f}";

static void html_pre(FILE *f, const char *text)
{
    fputs("<pre>", f);
    esc(f, text);
    fputs("</pre>\n", f);
}

static int html_chart(FILE *f, const sh_figure *fig, int idx, int wide, char *err, size_t errlen)
{
    char *svg = NULL;
    char prefix[16];
    snprintf(prefix, sizeof prefix, "c%d_", idx);
    double w = wide ? 980 : 480, h = wide ? 320 : 300;
    int rc = sh_draw_svg_string(&fig->chart, w, h, prefix, &svg, NULL);
    if (rc != HN_OK) {
        snprintf(err, errlen, "cannot draw the chart '%s': %s", fig->title, hn_strerror(rc));
        free(svg);
        return -1;
    }
    const char *start = strstr(svg, "<svg");
    fprintf(f, "<figure%s>", wide ? " class=\"wide\"" : "");
    fputs(start ? start : svg, f);
    fputs("<figcaption>", f);
    esc(f, fig->caption);
    fputs("</figcaption></figure>\n", f);
    free(svg);
    return 0;
}

typedef struct {
    char when[64];
    char sha[65];
    long long bytes;
    int have_sha;
    int have_summary;                   /* the working series' moments below */
    char mean[32], sd[32], min[32], max[32];
    char first[40], last[40];           /* time span of the loaded column, "" when unknown */
} provenance;

static void summarise(const sh_session *s, provenance *pv)
{
    double mean, sd, lo = INFINITY, hi = -INFINITY;
    if (s->n < 2 || diag_mean_sd(s->y, s->n, &mean, &sd) != HN_OK)
        return;
    for (size_t i = 0; i < s->n; i++) {
        if (s->y[i] < lo) lo = s->y[i];
        if (s->y[i] > hi) hi = s->y[i];
    }
    sh_num(pv->mean, sizeof pv->mean, mean, 6);
    sh_num(pv->sd, sizeof pv->sd, sd, 6);
    sh_num(pv->min, sizeof pv->min, lo, 6);
    sh_num(pv->max, sizeof pv->max, hi, 6);
    pv->have_summary = 1;
}

static int write_html(FILE *f, sh_session *s, figures *F, const provenance *pv, char *err, size_t errlen)
{
    char a[40], b[40], c[40], d[40], spec[200], buf[600];
    const sh_model *cur = s->current >= 0 && s->current < s->nmodels ? &s->models[s->current] : NULL;

    fputs("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">\n", f);
    fputs("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n<title>", f);
    escf(f, "hone report: %s", *s->column ? s->column : s->path);
    fprintf(f, "</title>\n<style>%s</style></head><body>\n", CSS);
    fputs("<header class=\"top\"><div><h1>", f);
    escf(f, "Model report: %s", *s->column ? s->column : "series");
    fputs("</h1><p>", f);
    escf(f, "hone %s", HONE_VERSION);
    fputs(" &middot; ", f);
    escf(f, "written %s", pv->when);
    fputs("</p></div></header>\n<main>\n", f);

    /* data and provenance */
    fputs("<section><h2>Data and provenance</h2><dl>\n", f);
    fputs("<dt>file</dt><dd>", f);
    esc(f, s->path);
    fputs("</dd>\n<dt>column</dt><dd>", f);
    esc(f, *s->column ? s->column : "-");
    fprintf(f, "</dd>\n<dt>values loaded</dt><dd>%zu</dd>\n", s->n_raw);
    if (*s->freq)
        fprintf(f, "<dt>frequency</dt><dd>%s%s</dd>\n", s->freq,
                s->season ? (snprintf(buf, sizeof buf, ", seasonal period %d", s->season), buf) : "");
    if (*pv->first)
        fprintf(f, "<dt>period</dt><dd>%s to %s</dd>\n", pv->first, pv->last);
    fputs("<dt>transforms</dt><dd>", f);
    esc(f, *s->transforms ? s->transforms : "none");
    fprintf(f, "</dd>\n<dt>working series</dt><dd>%zu values", s->n);
    if (pv->have_summary)
        fprintf(f, "; mean %s, sd %s (divisor n-1), min %s, max %s", pv->mean, pv->sd, pv->min, pv->max);
    fputs("</dd>\n", f);
    if (pv->have_sha)
        fprintf(f, "<dt>file SHA-256</dt><dd><code>%s</code> (%lld bytes, at the time of this report)</dd>\n", pv->sha,
                pv->bytes);
    if (s->journal) {
        fputs("<dt>journal</dt><dd>", f);
        esc(f, sh_journal_path(s->journal));
        fputs(" (recording: every command with its output and the SHA-256 of every input file; "
              "<code>replay JOURNAL verify</code> reproduces it)</dd>\n", f);
        int ni;
        const sh_journal_file *in = sh_journal_inputs(s->journal, &ni);
        for (int i = 0; i < ni; i++) {
            fputs("<dt>journal input</dt><dd>", f);
            esc(f, in[i].path);
            fprintf(f, ": SHA-256 <code>%s</code>, %lld bytes</dd>\n", in[i].sha256, in[i].bytes);
        }
    } else {
        fputs("<dt>journal</dt><dd>not recording (<code>record FILE</code> or <code>hone --record FILE</code> keeps an "
              "audit journal)</dd>\n", f);
    }
    fprintf(f, "<dt>settings</dt><dd>alpha %g, portmanteau lags %s, interval level %g %%</dd>\n", s->alpha,
            s->lags ? (snprintf(buf, sizeof buf, "%d", s->lags), buf) : "by rule", s->level);
    fputs("</dl></section>\n", f);

    /* models */
    fputs("<section><h2>Models tried</h2>\n", f);
    if (!s->nmodels) {
        fputs("<p>No model has been fitted in this session.</p>\n", f);
    } else {
        fputs("<table><tr><th>id</th><th>model</th><th>origin</th><th>loglik</th><th>AICc</th><th>BIC</th>"
              "<th>N</th><th>residuals</th></tr>\n", f);
        for (int i = 0; i < s->nmodels; i++) {
            const sh_model *m = &s->models[i];
            fit_spec_format(&m->fit.spec, spec, sizeof spec);
            fprintf(f, "<tr%s><td class=\"n\">%d%s</td><td class=\"m\">", i == s->current ? " class=\"cur\"" : "", m->id,
                    i == s->current ? " *" : "");
            esc(f, spec);
            fputs("</td><td>", f);
            origin_words(m, buf, sizeof buf);
            esc(f, buf);
            fprintf(f, "</td><td class=\"n\">%s</td><td class=\"n\">%s</td><td class=\"n\">%s</td><td class=\"n\">%zu</td>",
                    sh_num(a, sizeof a, m->fit.loglik, 9), sh_num(b, sizeof b, m->fit.aicc, 8),
                    sh_num(c, sizeof c, m->fit.bic, 8), m->fit.n_eff);
            verdict_words(m, buf, sizeof buf);
            fprintf(f, "<td class=\"%s\">", m->checked ? (m->battery.white ? "white" : "notwhite") : "");
            esc(f, buf);
            fputs("</td></tr>\n", f);
        }
        fputs("</table>\n<p>* the current (final) model. Each model's origin says what led to it: fitted by hand, "
              "or the advice of the model it came from. Criteria compare only models fitted to the same working "
              "series.</p>\n", f);
    }
    fputs("</section>\n", f);

    /* final model */
    if (cur) {
        const fit_result *r = &cur->fit;
        int robust = r->spec.garch;
        fit_spec_format(&r->spec, spec, sizeof spec);
        fputs("<section><h2>Final model</h2>\n<p>", f);
        escf(f, "Model %d, %s, %s innovations, fitted to %s; n = %zu, N = %zu in the likelihood.", cur->id, spec,
             r->spec.dist == FIT_DIST_T ? "Student-t" : "normal", cur->series, r->n, r->n_eff);
        fputs("</p>\n<table><tr><th>parameter</th><th>estimate</th>", f);
        fprintf(f, "<th>%s</th><th>t-ratio</th>%s</tr>\n", robust ? "robust se" : "std error",
                robust ? "<th>Hessian se</th>" : "");
        for (int i = 0; i < r->np; i++) {
            char name[16];
            double se = robust ? r->se_robust[i] : r->se[i];
            double tr = isfinite(se) && se > 0 ? r->par[i] / se : NAN;
            fprintf(f, "<tr><td>%s</td><td class=\"n\">%s</td><td class=\"n\">%s</td><td class=\"n\">%s</td>",
                    fit_spec_param_name(&r->spec, i, name, sizeof name), sh_num(a, sizeof a, r->par[i], 7),
                    sh_num(b, sizeof b, se, 4), sh_num(c, sizeof c, tr, 3));
            if (robust)
                fprintf(f, "<td class=\"n\">%s</td>", sh_num(d, sizeof d, r->se[i], 4));
            fputs("</tr>\n", f);
        }
        if (!robust)
            fprintf(f, "<tr><td>sigma2</td><td class=\"n\">%s</td><td colspan=\"2\">SSR/N, concentrated out</td></tr>\n",
                    sh_num(a, sizeof a, r->sigma2, 7));
        fputs("</table>\n", f);
        char *fit_text = capture_model(s, sh_text_fit, cur);
        if (fit_text) {
            fputs("<details><summary>fit output as shown at the prompt</summary>", f);
            html_pre(f, fit_text);
            fputs("</details>\n", f);
            free(fit_text);
        }
        if (cur->checked) {
            fputs("<h2>Residual checks</h2>\n<p class=\"", f);
            fputs(cur->battery.white ? "white\">" : "notwhite\">", f);
            esc(f, cur->battery.white ? "White noise: nothing predictable found in the residuals."
                                      : "Not white noise: the residuals still hold structure.");
            fputs("</p><p>", f);
            esc(f, cur->battery.summary);
            fputs("</p>\n", f);
            char *chk = capture_model(s, sh_text_check, cur);
            if (chk) {
                html_pre(f, chk);
                free(chk);
            }
        }
        fputs("</section>\n", f);
    }

    /* charts */
    fputs("<section><h2>Charts</h2><div class=\"charts\">\n", f);
    int idx = 0;
    if (F->have[SH_FIG_SERIES] && !F->have[SH_FIG_FIT])
        if (html_chart(f, &F->fig[SH_FIG_SERIES], ++idx, 1, err, errlen))
            return -1;
    for (size_t k = 0; k < NORDER; k++) {
        sh_fig_kind kind = ORDER[k];
        if (!F->have[kind])
            continue;
        int wide = kind == SH_FIG_FIT || kind == SH_FIG_SERIES || kind == SH_FIG_RESID || kind == SH_FIG_FAN;
        if (html_chart(f, &F->fig[kind], ++idx, wide, err, errlen))
            return -1;
    }
    fputs("</div></section>\n", f);

    /* notes */
    int nn;
    const sh_note *notes = sh_notes_get(s, &nn);
    fputs("<section><h2>Analyst's notes</h2>\n", f);
    if (!nn)
        fputs("<p>No notes were written (<code>note TEXT</code> adds one).</p>\n", f);
    else {
        fputs("<ul>\n", f);
        for (int i = 0; i < nn; i++) {
            fputs("<li>", f);
            if (notes[i].model)
                fprintf(f, "<em>model %d:</em> ", notes[i].model);
            esc(f, notes[i].text);
            fputs("</li>\n", f);
        }
        fputs("</ul>\n", f);
    }
    fputs("</section>\n", f);

    fputs("<section><h2>Method notes</h2><ul>\n", f);
    for (size_t i = 0; i < sizeof METHOD_NOTES / sizeof METHOD_NOTES[0]; i++) {
        fputs("<li>", f);
        esc(f, METHOD_NOTES[i]);
        fputs("</li>\n", f);
    }
    fputs("</ul></section>\n<section><h2>Limitations</h2><ul>\n", f);
    for (size_t i = 0; i < sizeof LIMITATIONS / sizeof LIMITATIONS[0]; i++) {
        fputs("<li>", f);
        esc(f, LIMITATIONS[i]);
        fputs("</li>\n", f);
    }
    fputs("</ul></section>\n</main>\n<footer><strong>Caution.</strong> ", f);
    esc(f, CAUTION);
    fputs("</footer>\n</body></html>\n", f);
    return ferror(f) ? (snprintf(err, errlen, "write error"), -1) : 0;
}

/* ---- PDF ------------------------------------------------------------------- */

#define PAGE_W 595.0     /* A4 in points */
#define PAGE_H 842.0
#define MARGIN 40.0

typedef struct {
    cairo_t *cr;
    double y;
    int page;
    double x, maxw;              /* text column: left edge and width (0 = the page's) */
    double row_y, row_bottom;    /* two-column chart rows */
} pdfpen;

static void pdf_footer(pdfpen *p)
{
    cairo_t *cr = p->cr;
    cairo_save(cr);
    cairo_select_font_face(cr, "sans-serif", CAIRO_FONT_SLANT_NORMAL, CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(cr, 7.5);
    cairo_set_source_rgb(cr, 0.35, 0.38, 0.42);
    char buf[64];
    snprintf(buf, sizeof buf, "page %d", p->page);
    cairo_move_to(cr, PAGE_W - MARGIN - 40, PAGE_H - 22);
    cairo_show_text(cr, buf);
    cairo_move_to(cr, MARGIN, PAGE_H - 22);
    cairo_show_text(cr, "hone model report - statistical adequacy is not a guarantee of forecast accuracy");
    cairo_restore(cr);
}

static void pdf_new_page(pdfpen *p)
{
    pdf_footer(p);
    cairo_show_page(p->cr);
    p->page++;
    p->y = MARGIN;
}

static void pdf_need(pdfpen *p, double h)
{
    if (p->y + h > PAGE_H - MARGIN - 10)
        pdf_new_page(p);
}

/* Draw TEXT wrapped to the text width at SIZE points; MONO for tables. */
static void pdf_text(pdfpen *p, const char *text, double size, int bold, int mono, double r, double g, double b)
{
    cairo_t *cr = p->cr;
    cairo_select_font_face(cr, mono ? "monospace" : "sans-serif", CAIRO_FONT_SLANT_NORMAL,
                           bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(cr, size);
    cairo_set_source_rgb(cr, r, g, b);
    double lh = size * 1.32, maxw = p->maxw > 0 ? p->maxw : PAGE_W - 2 * MARGIN;
    double x0 = p->x > 0 ? p->x : MARGIN;
    const char *q = text;
    while (*q) {
        const char *nl = strchr(q, '\n');
        size_t linelen = nl ? (size_t)(nl - q) : strlen(q);
        char line[1200];
        snprintf(line, sizeof line, "%.*s", (int)(linelen < sizeof line - 1 ? linelen : sizeof line - 1), q);
        /* wrap at blanks */
        char *start = line;
        while (*start || start == line) {
            char *cut = start + strlen(start);
            {
                cairo_text_extents_t ex;
                cairo_text_extents(cr, start, &ex);
                while (ex.x_advance > maxw) {
                    char *sp = NULL;
                    for (char *t = start; t < cut; t++)
                        if (*t == ' ') {
                            char keep = *t;
                            *t = '\0';
                            cairo_text_extents(cr, start, &ex);
                            *t = keep;
                            if (ex.x_advance <= maxw)
                                sp = t;
                            else
                                break;
                        }
                    if (!sp)
                        break;
                    cut = sp;
                    char keep = *cut;
                    *cut = '\0';
                    cairo_text_extents(cr, start, &ex);
                    *cut = keep;
                }
            }
            char keep = *cut;
            *cut = '\0';
            pdf_need(p, lh);
            cairo_select_font_face(cr, mono ? "monospace" : "sans-serif", CAIRO_FONT_SLANT_NORMAL,
                                   bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
            cairo_set_font_size(cr, size);
            cairo_set_source_rgb(cr, r, g, b);
            cairo_move_to(cr, x0, p->y + size);
            cairo_show_text(cr, start);
            p->y += lh;
            *cut = keep;
            if (!*cut)
                break;
            start = cut + (*cut == ' ');
        }
        q += linelen + (nl ? 1 : 0);
    }
}

static void pdf_heading(pdfpen *p, const char *text)
{
    pdf_need(p, 40);
    p->y += 8;
    pdf_text(p, text, 13, 1, 0, 0.13, 0.19, 0.25);
    cairo_set_source_rgb(p->cr, 0.79, 0.64, 0.15);
    cairo_rectangle(p->cr, MARGIN, p->y, 60, 1.6);
    cairo_fill(p->cr);
    p->y += 6;
}

static void pdf_body(pdfpen *p, const char *text)
{
    pdf_text(p, text, 9.5, 0, 0, 0.12, 0.14, 0.16);
}

/* Draw FIG at column COL (0 left, 1 right) of a two-column row, or across
 * the page when WIDE.  A left or wide chart starts a new row. */
static int pdf_chart(pdfpen *p, const sh_figure *fig, int wide, int col, char *err, size_t errlen)
{
    double full = PAGE_W - 2 * MARGIN, gap = 14;
    double w = wide ? full : (full - gap) / 2, h = wide ? 230 : 190;
    double x = MARGIN + (wide || col == 0 ? 0 : w + gap);
    if (wide || col == 0)
        pdf_need(p, h + 40);
    else
        p->y = p->row_y;
    /* Charts are laid out for screen sizes: draw them larger and scale down
     * so that their lettering suits the page. */
    double k = wide ? 0.72 : 0.6;
    cairo_save(p->cr);
    cairo_translate(p->cr, x, p->y);
    cairo_scale(p->cr, k, k);
    int rc = sh_draw_chart(p->cr, &fig->chart, 0, 0, w / k, h / k);
    cairo_restore(p->cr);
    if (rc != HN_OK) {
        snprintf(err, errlen, "cannot draw the chart '%s': %s", fig->title, hn_strerror(rc));
        return -1;
    }
    double top = p->y;
    p->y += h + 3;
    double keep_margin = p->x;
    p->x = x;
    p->maxw = w;
    pdf_text(p, fig->caption, 7, 0, 0, 0.29, 0.33, 0.38);
    p->x = keep_margin;
    p->maxw = 0;
    p->y += 8;
    if (!wide && col == 0) {
        p->row_y = top;
        p->row_bottom = p->y;
    } else if (!wide && p->row_bottom > p->y) {
        p->y = p->row_bottom;
    }
    return 0;
}

static int write_pdf(const char *tmp, sh_session *s, figures *F, const provenance *pv, char *err, size_t errlen)
{
    cairo_surface_t *surf = cairo_pdf_surface_create(tmp, PAGE_W, PAGE_H);
    if (cairo_surface_status(surf) != CAIRO_STATUS_SUCCESS) {
        snprintf(err, errlen, "cannot create the PDF");
        cairo_surface_destroy(surf);
        return -1;
    }
    cairo_t *cr = cairo_create(surf);
    pdfpen p;
    memset(&p, 0, sizeof p);
    p.cr = cr;
    p.y = MARGIN;
    p.page = 1;
    char buf[2048], a[40], b[40], c[40], spec[200];
    const sh_model *cur = s->current >= 0 && s->current < s->nmodels ? &s->models[s->current] : NULL;
    int rc = 0;

    /* title band */
    cairo_set_source_rgb(cr, 0.13, 0.19, 0.25);
    cairo_rectangle(cr, 0, 0, PAGE_W, 70);
    cairo_fill(cr);
    p.y = 20;
    snprintf(buf, sizeof buf, "Model report: %s", *s->column ? s->column : "series");
    pdf_text(&p, buf, 18, 1, 0, 0.96, 0.95, 0.94);
    snprintf(buf, sizeof buf, "hone %s - written %s", HONE_VERSION, pv->when);
    pdf_text(&p, buf, 8.5, 0, 0, 0.73, 0.77, 0.80);
    p.y = 84;

    pdf_heading(&p, "Data and provenance");
    snprintf(buf, sizeof buf, "file %s, column %s: %zu values loaded%s%s; transforms: %s; working series %zu values.",
             s->path, *s->column ? s->column : "-", s->n_raw, *s->freq ? ", " : "", s->freq,
             *s->transforms ? s->transforms : "none", s->n);
    pdf_body(&p, buf);
    if (*pv->first) {
        snprintf(buf, sizeof buf, "period: %s to %s", pv->first, pv->last);
        pdf_body(&p, buf);
    }
    if (pv->have_summary) {
        snprintf(buf, sizeof buf, "working series: mean %s, sd %s (divisor n-1), min %s, max %s", pv->mean, pv->sd,
                 pv->min, pv->max);
        pdf_body(&p, buf);
    }
    if (pv->have_sha) {
        snprintf(buf, sizeof buf, "file SHA-256 %s (%lld bytes, at the time of this report)", pv->sha, pv->bytes);
        pdf_text(&p, buf, 7.5, 0, 1, 0.12, 0.14, 0.16);
    }
    snprintf(buf, sizeof buf, "%s%s%s", s->journal ? "journal: " : "journal: not recording",
             s->journal ? sh_journal_path(s->journal) : "",
             s->journal ? " (every command and output, with the SHA-256 of every input; replay JOURNAL verify reproduces it)" : "");
    pdf_body(&p, buf);
    if (s->journal) {
        int ni;
        const sh_journal_file *in = sh_journal_inputs(s->journal, &ni);
        for (int i = 0; i < ni; i++) {
            snprintf(buf, sizeof buf, "journal input %.900s: SHA-256 %s, %lld bytes", in[i].path, in[i].sha256,
                     in[i].bytes);
            pdf_text(&p, buf, 7.5, 0, 1, 0.12, 0.14, 0.16);
        }
    }
    snprintf(buf, sizeof buf, "settings: alpha %g, portmanteau lags %s, interval level %g %%", s->alpha,
             s->lags ? "as set" : "by rule", s->level);
    pdf_body(&p, buf);

    pdf_heading(&p, "Models tried");
    if (!s->nmodels)
        pdf_body(&p, "No model has been fitted in this session.");
    for (int i = 0; i < s->nmodels; i++) {
        const sh_model *m = &s->models[i];
        char org[400], ver[300];
        fit_spec_format(&m->fit.spec, spec, sizeof spec);
        origin_words(m, org, sizeof org);
        verdict_words(m, ver, sizeof ver);
        snprintf(buf, sizeof buf, "%s%d  %s:  %s", i == s->current ? "* " : "", m->id, spec, ver);
        pdf_text(&p, buf, 9, i == s->current, 0, 0.12, 0.14, 0.16);
        snprintf(buf, sizeof buf, "loglik %s, AICc %s, BIC %s, N %zu;  origin: %s", sh_num(a, sizeof a, m->fit.loglik, 9),
                 sh_num(b, sizeof b, m->fit.aicc, 8), sh_num(c, sizeof c, m->fit.bic, 8), m->fit.n_eff, org);
        p.x = MARGIN + 14;
        p.maxw = PAGE_W - 2 * MARGIN - 14;
        pdf_text(&p, buf, 7.5, 0, 0, 0.29, 0.33, 0.38);
        p.x = 0;
        p.maxw = 0;
        p.y += 2;
    }
    if (s->nmodels)
        pdf_text(&p, "* the current (final) model; criteria compare only models fitted to the same working series.", 7.5,
                 0, 0, 0.29, 0.33, 0.38);

    if (cur) {
        pdf_heading(&p, "Final model");
        char *fit_text = capture_model(s, sh_text_fit, cur);
        if (fit_text) {
            pdf_text(&p, fit_text, 7, 0, 1, 0.12, 0.14, 0.16);
            free(fit_text);
        }
        if (cur->checked) {
            pdf_heading(&p, "Residual checks");
            pdf_text(&p, cur->battery.white ? "White noise: nothing predictable found in the residuals."
                                            : "Not white noise: the residuals still hold structure.",
                     10, 1, 0, cur->battery.white ? 0.11 : 0.64, cur->battery.white ? 0.42 : 0.19,
                     cur->battery.white ? 0.23 : 0.17);
            pdf_body(&p, cur->battery.summary);
            char *chk = capture_model(s, sh_text_check, cur);
            if (chk) {
                /* the table part only: the notes below it are long lines */
                char *cut = strstr(chk, "\n  notes\n");
                char *tail = cut ? strstr(cut, "\n  criterion ") : NULL;
                if (cut)
                    *cut = '\0';
                pdf_text(&p, chk, 6.2, 0, 1, 0.12, 0.14, 0.16);
                if (tail)
                    pdf_text(&p, tail + 1, 6.2, 0, 1, 0.12, 0.14, 0.16);
                free(chk);
            }
        }
    }

    pdf_need(&p, 300);
    pdf_heading(&p, "Charts");
    if (F->have[SH_FIG_SERIES] && !F->have[SH_FIG_FIT])
        rc = pdf_chart(&p, &F->fig[SH_FIG_SERIES], 1, 0, err, errlen);
    int col = 0;
    for (size_t k = 0; k < NORDER && !rc; k++) {
        sh_fig_kind kind = ORDER[k];
        if (!F->have[kind])
            continue;
        int wide = kind == SH_FIG_FIT || kind == SH_FIG_RESID || kind == SH_FIG_FAN;
        if (wide && col == 1) {
            p.y = p.row_bottom;
            col = 0;
        }
        rc = pdf_chart(&p, &F->fig[kind], wide, wide ? 0 : col, err, errlen);
        col = wide ? 0 : 1 - col;
    }
    if (col == 1 && p.row_bottom > p.y)
        p.y = p.row_bottom;

    if (!rc) {
        int nn;
        const sh_note *notes = sh_notes_get(s, &nn);
        pdf_heading(&p, "Analyst's notes");
        if (!nn)
            pdf_body(&p, "No notes were written.");
        for (int i = 0; i < nn; i++) {
            if (notes[i].model)
                snprintf(buf, sizeof buf, "- model %d: %s", notes[i].model, notes[i].text);
            else
                snprintf(buf, sizeof buf, "- %s", notes[i].text);
            pdf_body(&p, buf);
        }
        pdf_heading(&p, "Method notes");
        for (size_t i = 0; i < sizeof METHOD_NOTES / sizeof METHOD_NOTES[0]; i++) {
            snprintf(buf, sizeof buf, "- %s", METHOD_NOTES[i]);
            pdf_body(&p, buf);
        }
        pdf_heading(&p, "Limitations");
        for (size_t i = 0; i < sizeof LIMITATIONS / sizeof LIMITATIONS[0]; i++) {
            snprintf(buf, sizeof buf, "- %s", LIMITATIONS[i]);
            pdf_body(&p, buf);
        }
        p.y += 8;
        pdf_text(&p, "Caution", 9.5, 1, 0, 0.13, 0.19, 0.25);
        pdf_text(&p, CAUTION, 8.5, 0, 0, 0.29, 0.33, 0.38);
        pdf_footer(&p);
        cairo_show_page(cr);
    }
    cairo_status_t st = cairo_status(cr);
    cairo_destroy(cr);
    cairo_surface_finish(surf);
    if (!rc && (st != CAIRO_STATUS_SUCCESS || cairo_surface_status(surf) != CAIRO_STATUS_SUCCESS)) {
        snprintf(err, errlen, "cannot write the PDF: %s", cairo_status_to_string(st));
        rc = -1;
    }
    cairo_surface_destroy(surf);
    return rc;
}

/* ---- driver ------------------------------------------------------------------ */

int sh_report_write(sh_session *s, const char *path, int pdf, int h, sh_report_info *info,
                    char *err, size_t errlen)
{
    memset(info, 0, sizeof *info);
    if (!s->loaded) {
        snprintf(err, errlen, "no series loaded: nothing to report (use 'load FILE column=NAME')");
        return -1;
    }
    if (sh_cairo_open(err, errlen) != HN_OK)     /* the charts need it, in either form */
        return -1;
    sh_model *cur = s->current >= 0 && s->current < s->nmodels ? &s->models[s->current] : NULL;
    int model_ok = cur && sh_figure_model_on_series(s, cur);
    if (model_ok && !cur->checked) {
        diag_options o = sh_check_options(s, cur);
        sh_check_model(s, cur, &o);        /* a failed check leaves it unchecked; the report says so */
    }

    /* the forecast for the fan */
    fit_forecast *own = NULL;
    const fit_forecast *fc = NULL;
    if (model_ok) {
        if (h > 0) {
            own = fit_forecast_alloc(h);
            if (own && fit_forecast_run(&cur->fit, s->y, s->n, s->level / 100.0, own) == HN_OK)
                fc = own;
        } else if (s->last_forecast && s->last_forecast_model == cur->id) {
            fc = (const fit_forecast *)s->last_forecast;
        }
    }

    figures F;
    memset(&F, 0, sizeof F);
    char why[400];
    for (int k = 0; k < SH_FIG_NKINDS; k++) {
        if (sh_figure_build(s, (sh_fig_kind)k, 0, fc, &F.fig[k], why, sizeof why) == 0) {
            F.have[k] = 1;
            continue;
        }
        if (k == SH_FIG_SERIES || !model_ok)
            continue;                       /* said once below */
        size_t l = strlen(info->skipped);
        snprintf(info->skipped + l, sizeof info->skipped - l, "%s%s (%.150s)", l ? "; " : "",
                 sh_fig_name((sh_fig_kind)k), k == SH_FIG_FAN ? "no forecast: run 'forecast H' or give h=H" : why);
    }
    if (!model_ok)
        snprintf(info->skipped, sizeof info->skipped, "%s",
                 cur ? "the charts of residuals and forecasts: the current model was fitted to another working series"
                     : "the charts of residuals and forecasts: no model fitted");
    for (size_t k = 0; k < NORDER; k++)
        info->charts += F.have[ORDER[k]];
    if (F.have[SH_FIG_SERIES] && !F.have[SH_FIG_FIT])
        info->charts++;

    provenance pv;
    memset(&pv, 0, sizeof pv);
    time_t now = time(NULL);
    struct tm tmv;
    gmtime_r(&now, &tmv);
    strftime(pv.when, sizeof pv.when, "%Y-%m-%d %H:%M UTC", &tmv);
    if (s->path[0] != '(' && sh_sha256_file(s->path, pv.sha, &pv.bytes) == HN_OK)
        pv.have_sha = 1;
    summarise(s, &pv);
    sh_stamps st;
    if (sh_stamps_load(s, &st) == 0 && s->n_raw) {
        sh_time_format(st.stamp[0], st.kind, pv.first, sizeof pv.first);
        sh_time_format(st.stamp[s->n_raw - 1], st.kind, pv.last, sizeof pv.last);
    }
    free(st.stamp);

    sh_outfile o;
    int rc = sh_outfile_open(&o, path, err, errlen);
    if (rc == 0) {
        if (pdf) {
            fclose(o.f);                       /* cairo writes the temporary file itself */
            o.f = NULL;
            rc = write_pdf(o.tmp, s, &F, &pv, err, errlen);
            if (rc == 0) {
                o.f = fopen(o.tmp, "a");       /* commit syncs and renames it */
                if (!o.f) {
                    snprintf(err, errlen, "cannot finish %s", path);
                    rc = -1;
                }
            }
        } else {
            rc = write_html(o.f, s, &F, &pv, err, errlen);
        }
        if (rc == 0)
            rc = sh_outfile_commit(&o, err, errlen);
        else
            sh_outfile_abort(&o);
    }
    int nn;
    sh_notes_get(s, &nn);
    info->models = s->nmodels;
    info->notes = nn;
    for (int k = 0; k < SH_FIG_NKINDS; k++)
        sh_figure_free(&F.fig[k]);
    fit_forecast_free(own);
    return rc;
}
