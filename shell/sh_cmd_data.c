/* sh_cmd_data.c - the data commands: load, series, transform. */
#include "sh_handlers.h"
#include "sh_csv.h"
#include "sh_fmt.h"
#include "fit_transform.h"
#include "diag_stats.h"
#include "hn_status.h"
#include "sh_journal.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

static int cmd_load(sh_session *s, sh_words *w)
{
    int fi = sh_arg(w, 0);
    sh_csv_options opt;
    memset(&opt, 0, sizeof opt);
    opt.column = sh_words_value(w, "column");
    opt.time_column = sh_words_value(w, "time");
    const char *miss = sh_words_value(w, "missing");
    if (miss) {
        if (!strcmp(miss, "refuse")) opt.missing = SH_MISSING_REFUSE;
        else if (!strcmp(miss, "drop")) opt.missing = SH_MISSING_DROP;
        else if (!strcmp(miss, "previous")) opt.missing = SH_MISSING_PREVIOUS;
        else if (!strcmp(miss, "interpolate")) opt.missing = SH_MISSING_INTERPOLATE;
        else
            return sh_fail(s, sh_words_option(w, "missing"),
                           "missing= takes refuse, drop, previous or interpolate");
    }
    sh_data d;
    sh_error e;
    int rc = sh_csv_load(w->word[fi], &opt, &d, &e);
    if (rc != HN_OK)
        return sh_fail(s, -1, "%s", e.message);

    /* the reader's array becomes the working series (and the loaded
     * values), trimmed to its length (the reader grows it by doubling;
     * shrinking in place moves nothing) */
    double *trim = realloc(d.y, (d.n ? d.n : 1) * sizeof *trim);
    if (trim)
        d.y = trim;
    sh_load_series(s, d.y, d.n);
    d.y = NULL;
    s->loaded = 1;
    snprintf(s->path, sizeof s->path, "%s", w->word[fi]);
    snprintf(s->column, sizeof s->column, "%s", d.column_name ? d.column_name : "");
    s->transforms[0] = '\0';
    s->season = d.season;
    snprintf(s->freq, sizeof s->freq, "%s", d.has_time ? sh_freq_name(d.freq) : "");

    if (s->journal)
        sh_journal_input(s->journal, s->path);
    sh_printf(s, "loaded %zu values of '%s' from %s", d.n, s->column, s->path);
    if (d.n_missing)
        sh_printf(s, " (%zu missing values filled by policy '%s')", d.n_missing, miss);
    sh_printf(s, "\n");
    if (d.has_time) {
        sh_printf(s, "  time column '%s': %s", d.time_name ? d.time_name : "", s->freq);
        if (d.season)
            sh_printf(s, ", seasonal period %d", d.season);
        if (d.n_gaps)
            sh_printf(s, ", %zu gap%s (first %s)", d.n_gaps, d.n_gaps == 1 ? "" : "s", d.first_gap);
        else
            sh_printf(s, ", no gaps");
        sh_printf(s, "\n");
    }
    if (d.is_constant)
        sh_printf(s, "  note: the column is constant; models cannot be fitted to it\n");
    sh_json_kstring(&s->j, "file", s->path);
    sh_json_kstring(&s->j, "column", s->column);
    sh_json_kint(&s->j, "n", (long long)d.n);
    if (d.has_time) {
        sh_json_kstring(&s->j, "frequency", s->freq);
        sh_json_kint(&s->j, "season", d.season);
        sh_json_kint(&s->j, "gaps", (long long)d.n_gaps);
    }
    sh_json_kint(&s->j, "filled", (long long)d.n_missing);
    sh_data_free(&d);
    return 0;
}

static int need_data(sh_session *s)
{
    if (!s->loaded)
        return sh_fail(s, -1, "no series loaded (use 'load FILE column=NAME')");
    return 0;
}

static int acf_lags_for(const sh_session *s, size_t n)
{
    int m = s->lags > 0 ? s->lags : 20;
    if ((size_t)m > n - 1)
        m = (int)n - 1;
    return m;
}

static int cmd_series(sh_session *s, sh_words *w)
{
    (void)w;
    if (need_data(s))
        return -1;
    size_t n = s->n;
    double mean, sd, lo = INFINITY, hi = -INFINITY;
    if (n < 2)
        return sh_fail(s, -1, "the working series has %zu value%s; nothing to summarise", n, n == 1 ? "" : "s");
    int mrc = diag_mean_sd(s->y, n, &mean, &sd);
    if (mrc != HN_OK)
        return sh_fail(s, -1, "cannot summarise the working series: %s", hn_strerror(mrc));
    for (size_t i = 0; i < n; i++) {
        if (s->y[i] < lo) lo = s->y[i];
        if (s->y[i] > hi) hi = s->y[i];
    }
    int m = acf_lags_for(s, n);
    double *acf = malloc((size_t)m * sizeof *acf), *pacf = malloc((size_t)m * sizeof *pacf);
    if (!acf || !pacf) {
        free(acf);
        free(pacf);
        return sh_fail(s, -1, "out of memory");
    }
    int arc = diag_acf(s->y, n, m, acf);
    if (arc == HN_OK)
        diag_pacf(acf, m, pacf);

    char a[32], b[32], c[32], d[32];
    sh_printf(s, "series  %s%s%s\n", s->path, *s->column ? " : " : "", s->column);
    sh_printf(s, "  transforms  %s\n", *s->transforms ? s->transforms : "none");
    sh_printf(s, "  n %zu   mean %s   sd %s (divisor n-1)   min %s   max %s\n", n,
              sh_num(a, sizeof a, mean, 6), sh_num(b, sizeof b, sd, 6), sh_num(c, sizeof c, lo, 6),
              sh_num(d, sizeof d, hi, 6));
    if (*s->freq)
        sh_printf(s, "  frequency   %s%s\n", s->freq, s->season ? "" : "");
    sh_json_kint(&s->j, "n", (long long)n);
    sh_json_knumber(&s->j, "mean", mean, NULL);
    sh_json_knumber(&s->j, "sd", sd, "fewer than two values");
    sh_json_knumber(&s->j, "min", lo, NULL);
    sh_json_knumber(&s->j, "max", hi, NULL);
    if (arc == HN_OK) {
        double band = 1.959963984540054 / sqrt((double)n);
        sh_printf(s, "  autocorrelation (divisor n, mean removed); '*' beyond +-%.3f, the 95 %% band +-1.96/sqrt(n)\n", band);
        sh_printf(s, "    lag      acf     pacf\n");
        for (int k = 0; k < m; k++)
            sh_printf(s, "    %3d  %7.3f%c %7.3f%c\n", k + 1, acf[k], fabs(acf[k]) > band ? '*' : ' ',
                      pacf[k], fabs(pacf[k]) > band ? '*' : ' ');
        sh_json_knumbers(&s->j, "acf", acf, (size_t)m, "not computable");
        sh_json_knumbers(&s->j, "pacf", pacf, (size_t)m, "not computable");
    } else {
        sh_printf(s, "  autocorrelation: not computable (%s)\n", hn_strerror(arc));
        sh_json_key(&s->j, "acf");
        sh_json_null(&s->j);
    }
    free(acf);
    free(pacf);
    return 0;
}

static void add_transform_text(sh_session *s, const char *t)
{
    size_t l = strlen(s->transforms);
    snprintf(s->transforms + l, sizeof s->transforms - l, "%s%s", l ? ", " : "", t);
}

static int cmd_transform(sh_session *s, sh_words *w)
{
    if (need_data(s))
        return -1;
    int ki = sh_arg(w, 0), ai = sh_arg(w, 1);
    const char *kind = w->word[ki];
    size_t n = s->n, nout = n, bad = 0;
    long k = 1;
    double lambda = 0;
    char text[64];
    int rc;

    if (!strcmp(kind, "reset")) {
        sh_reset_series(s);
        s->transforms[0] = '\0';
        sh_printf(s, "working series reset to the loaded column (%zu values)\n", s->n);
        sh_json_kint(&s->j, "n", (long long)s->n);
        return 0;
    }
    double *out = malloc((n ? n : 1) * sizeof *out);
    if (!out)
        return sh_fail(s, -1, "out of memory");
    if (!strcmp(kind, "log")) {
        if (ai >= 0) { free(out); return sh_fail(s, ai, "log takes no argument"); }
        rc = fit_tr_log(s->y, n, out, &bad);
        if (rc != HN_OK) {
            free(out);
            return sh_fail(s, ki, "log needs positive values: value %zu of the working series is %.17g", bad + 1, s->y[bad]);
        }
        snprintf(text, sizeof text, "log");
    } else if (!strcmp(kind, "diff") || !strcmp(kind, "sdiff")) {
        int seasonal = kind[0] == 's';
        if (ai >= 0) {
            if (sh_parse_long(w->word[ai], &k) || k < 1 || k > 1000) {
                free(out);
                return sh_fail(s, ai, "the lag must be a whole number from 1 to 1000");
            }
        } else if (seasonal) {
            if (!s->season) {
                free(out);
                return sh_fail(s, ki, "no seasonal period known (no time column): give it, e.g. transform sdiff 12");
            }
            k = s->season;
        }
        if ((size_t)k >= n) {
            free(out);
            return sh_fail(s, ai >= 0 ? ai : ki, "lag %ld leaves no values from %zu", k, n);
        }
        rc = seasonal ? fit_tr_sdiff(s->y, n, (size_t)k, out, &nout, &bad)
                      : fit_tr_diff(s->y, n, (size_t)k, out, &nout, &bad);
        snprintf(text, sizeof text, "%s %ld", kind, k);
    } else if (!strcmp(kind, "demean")) {
        rc = fit_tr_demean(s->y, n, out, NULL, &bad);
        snprintf(text, sizeof text, "demean");
    } else if (!strcmp(kind, "boxcox")) {
        if (ai < 0 || sh_parse_double(w->word[ai], &lambda) || fabs(lambda) > 5) {
            free(out);
            return sh_fail(s, ai >= 0 ? ai : ki, "boxcox needs lambda, a number from -5 to 5 (0 is log)");
        }
        rc = fit_tr_boxcox(s->y, n, lambda, out, &bad);
        if (rc != HN_OK) {
            free(out);
            return sh_fail(s, ki, "boxcox needs positive values: value %zu of the working series is %.17g", bad + 1, s->y[bad]);
        }
        snprintf(text, sizeof text, "boxcox %g", lambda);
    } else {
        free(out);
        return sh_fail(s, ki, "unknown transform '%s' (log, diff [K], sdiff [S], demean, boxcox L, reset)", kind);
    }
    if (rc != HN_OK) {
        free(out);
        return sh_fail(s, ki, "%s failed: %s", kind, hn_strerror(rc));
    }
    sh_set_series(s, out, nout);
    add_transform_text(s, text);
    sh_printf(s, "working series: %s  (%zu values; transforms: %s)\n", text, nout, s->transforms);
    sh_json_kstring(&s->j, "transform", text);
    sh_json_kstring(&s->j, "transforms", s->transforms);
    sh_json_kint(&s->j, "n", (long long)nout);
    return 0;
}

const sh_command sh_cmds_data[] = {
    { "load", "load FILE [column=NAME|N] [time=NAME|N] [missing=POLICY]",
      "read one numeric column of a CSV file as the working series",
      { "column", "time", "missing", NULL }, 1, 1, cmd_load,
      "  The file needs a header row; the delimiter (comma, semicolon or tab) is\n"
      "  detected.  column= names the value column or gives its 1-based index\n"
      "  (default: the first numeric column).  time= names an ISO 8601 date\n"
      "  column (default: detected); its frequency and gaps are reported.\n"
      "  Empty cells are refused unless missing=drop|previous|interpolate.\n" },
    { "series", "series", "summary, autocorrelation and partial autocorrelation of the working series",
      { NULL }, 0, 0, cmd_series, NULL },
    { "transform", "transform log|diff [K]|sdiff [S]|demean|boxcox L|reset",
      "transform the working series (transforms accumulate; reset undoes them)",
      { NULL }, 1, 2, cmd_transform,
      "  log        natural log (every value must be positive)\n"
      "  diff K     y_t - y_{t-K} (K = 1 by default); loses K values\n"
      "  sdiff S    seasonal difference at the period S (default: from the time column)\n"
      "  demean     subtract the mean\n"
      "  boxcox L   (y^L - 1)/L, log at L = 0\n"
      "  reset      back to the loaded column\n" },
    { NULL, NULL, NULL, { NULL }, 0, 0, NULL, NULL }
};
