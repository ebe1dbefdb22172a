/* sh_cmd_sim.c - the simulate command: seeded series from a model spec,
 * into the session or to a CSV file (used for demo data and checks). */
#include "sh_handlers.h"
#include "sh_file.h"
#include "sh_time.h"
#include "sh_csv.h"
#include "fit_sim.h"
#include "hn_status.h"

#include <stdlib.h>
#include <string.h>

/* Parse "name:value,name:value" into PAR in spec order (+ sigma2 without GARCH). */
static int parse_params(sh_session *s, sh_words *w, const fit_spec *spec, double *par)
{
    int wi = sh_words_option(w, "set");
    int np = fit_spec_nparams(spec), need = np + (spec->garch ? 0 : 1);
    int have[FIT_MAX_PARAMS + 1] = { 0 };
    char names[FIT_MAX_PARAMS + 1][16], list[512] = "";
    for (int i = 0; i < np; i++)
        fit_spec_param_name(spec, i, names[i], sizeof names[i]);
    if (!spec->garch)
        snprintf(names[np], sizeof names[np], "sigma2");
    for (int i = 0; i < need; i++) {
        size_t l = strlen(list);
        snprintf(list + l, sizeof list - l, "%s%s", i ? "," : "", names[i]);
    }
    if (wi < 0)
        return sh_fail(s, -1, "simulate needs set=NAME:VALUE,... for %s", list);
    char buf[1024];
    snprintf(buf, sizeof buf, "%s", w->word[wi] + 4);
    for (char *tok = strtok(buf, ","); tok; tok = strtok(NULL, ",")) {
        char *colon = strchr(tok, ':');
        if (!colon)
            return sh_fail(s, wi, "set= expects NAME:VALUE pairs separated by commas, e.g. set=mu:0,ar1:0.5,sigma2:1");
        *colon = '\0';
        int k = -1;
        for (int i = 0; i < need; i++)
            if (!strcmp(names[i], tok))
                k = i;
        if (k < 0)
            return sh_fail(s, wi, "'%s' is not a parameter of this model (it has %s)", tok, list);
        if (sh_parse_double(colon + 1, &par[k]))
            return sh_fail(s, wi, "the value of %s must be a finite number, not '%s'", tok, colon + 1);
        have[k] = 1;
    }
    for (int i = 0; i < need; i++)
        if (!have[i])
            return sh_fail(s, wi, "set= lacks %s (this model needs %s)", names[i], list);
    return 0;
}

static int freq_from_name(const char *f)
{
    static const struct { const char *name; int freq; } t[] = {
        { "daily", SH_FREQ_DAILY }, { "business", SH_FREQ_BUSINESS }, { "weekly", SH_FREQ_WEEKLY },
        { "monthly", SH_FREQ_MONTHLY }, { "quarterly", SH_FREQ_QUARTERLY }, { "yearly", SH_FREQ_YEARLY },
        { "hourly", SH_FREQ_HOURLY },
    };
    for (size_t i = 0; i < sizeof t / sizeof t[0]; i++)
        if (!strcmp(f, t[i].name))
            return t[i].freq;
    return -1;
}

static int cmd_simulate(sh_session *s, sh_words *w)
{
    char err[256], text[512] = "";
    int pos;
    for (int k = 0, i; (i = sh_arg(w, k)) >= 0; k++) {
        size_t l = strlen(text);
        snprintf(text + l, sizeof text - l, "%s%s", k ? " " : "", w->word[i]);
    }
    fit_spec spec;
    if (fit_spec_parse(text, &spec, err, sizeof err, &pos) != HN_OK)
        return sh_fail(s, sh_arg(w, 0), "model '%s': %s (at character %d)", text, err, pos + 1);
    long n = 0, seed = 0, burn = 500;
    const char *v;
    /* no longer than the longest series load accepts (the memory limit in docs/reliability.md) */
    if (!(v = sh_words_value(w, "n")) || sh_parse_long(v, &n) || n < 2 || n > (long)SH_CSV_DEFAULT_MAX_ROWS)
        return sh_fail(s, sh_words_option(w, "n"), "simulate needs n=N, a whole number from 2 to %lu",
                       (unsigned long)SH_CSV_DEFAULT_MAX_ROWS);
    if (!(v = sh_words_value(w, "seed")) || sh_parse_long(v, &seed) || seed < 0)
        return sh_fail(s, sh_words_option(w, "seed"), "simulate needs seed=S, a non-negative whole number (it is recorded)");
    if ((v = sh_words_value(w, "burn")) && (sh_parse_long(v, &burn) || burn < 0 || burn > 10000000L))
        return sh_fail(s, sh_words_option(w, "burn"), "burn= takes a whole number from 0 to 10000000");
    double par[FIT_MAX_PARAMS + 1];
    if (parse_params(s, w, &spec, par))
        return -1;
    int freq = SH_FREQ_DAILY;
    if ((v = sh_words_value(w, "freq")) && (freq = freq_from_name(v)) < 0)
        return sh_fail(s, sh_words_option(w, "freq"), "freq= takes hourly, daily, business, weekly, monthly, quarterly or yearly");
    int64_t stamp = 0;
    int kind = SH_TIME_DATE;
    const char *start = sh_words_value(w, "start");
    if (start && sh_time_parse(start, strlen(start), 1, &stamp, &kind, err, sizeof err))
        return sh_fail(s, sh_words_option(w, "start"), "start= must be an ISO 8601 date: %s", err);
    if (!start)
        stamp = sh_days_from_civil(2024, 1, 1) * 86400;
    if (freq == SH_FREQ_MONTHLY) kind = SH_TIME_MONTH;
    else if (freq == SH_FREQ_QUARTERLY) kind = SH_TIME_QUARTER;
    else if (freq == SH_FREQ_YEARLY) kind = SH_TIME_YEAR;
    else if (freq == SH_FREQ_HOURLY) kind = SH_TIME_DATETIME;
    else kind = SH_TIME_DATE;

    double *y = malloc((size_t)n * sizeof *y);
    if (!y)
        return sh_fail(s, -1, "out of memory for %ld values", n);
    int rc = fit_simulate(&spec, par, (size_t)n, (size_t)burn, (unsigned long)seed, y);
    if (rc != HN_OK) {
        free(y);
        return sh_fail(s, sh_words_option(w, "set"), "cannot simulate %s: %s%s", text, hn_strerror(rc),
                       rc == HN_EDOMAIN ? " (need sigma2, omega > 0, alpha1, beta1 >= 0, alpha1 + beta1 < 1, nu > 2)" :
                       rc == HN_ENUMERIC ? " (the path exploded: is the AR part stationary?)" : "");
    }
    char spec_text[256];
    fit_spec_format(&spec, spec_text, sizeof spec_text);
    const char *file = sh_words_value(w, "file");
    const char *column = sh_words_value(w, "column");
    if (!column)
        column = "value";
    if (file) {
        /* the file must load back: its last time stamp has to be one load reads */
        char last[40];
        int64_t back;
        int back_kind;
        sh_time_format(sh_time_advance(stamp, freq, n - 1), kind, last, sizeof last);
        if (sh_time_parse(last, strlen(last), 1, &back, &back_kind, err, sizeof err)) {
            free(y);
            return sh_fail(s, sh_words_option(w, "n"), "the last time stamp would be %s, beyond what load "
                           "reads (years up to 9999); choose an earlier start= or fewer values", last);
        }
        sh_outfile o;
        if (sh_outfile_open(&o, file, err, sizeof err)) {
            free(y);
            return sh_fail(s, sh_words_option(w, "file"), "%s", err);
        }
        fprintf(o.f, "date,%s\n", column);
        char when[40];
        for (long i = 0; i < n; i++)
            fprintf(o.f, "%s,%.10g\n", sh_time_format(sh_time_advance(stamp, freq, i), kind, when, sizeof when), y[i]);
        free(y);
        if (sh_outfile_commit(&o, err, sizeof err))
            return sh_fail(s, sh_words_option(w, "file"), "%s", err);
        sh_printf(s, "wrote %ld simulated values of %s (seed %ld, burn-in %ld) to %s\n", n, spec_text, seed, burn, file);
        sh_json_kstring(&s->j, "file", file);
    } else {
        sh_load_series(s, y, (size_t)n);
        s->loaded = 1;
        snprintf(s->path, sizeof s->path, "(simulated %s, seed %ld)", spec_text, seed);
        snprintf(s->column, sizeof s->column, "%s", column);
        s->transforms[0] = '\0';
        s->season = sh_freq_season(freq);
        snprintf(s->freq, sizeof s->freq, "%s", sh_freq_name(freq));
        sh_printf(s, "working series: %ld simulated values of %s (seed %ld, burn-in %ld)\n", n, spec_text, seed, burn);
    }
    sh_json_kstring(&s->j, "model", spec_text);
    sh_json_kint(&s->j, "n", n);
    sh_json_kint(&s->j, "seed", seed);
    sh_json_kint(&s->j, "burn", burn);
    return 0;
}

const sh_command sh_cmds_sim[] = {
    { "simulate", "simulate SPEC n=N seed=S set=NAME:VALUE,... [file=OUT.csv]",
      "simulate a seeded series from a model (into the session, or to a CSV file)",
      { "n", "seed", "set", "burn", "file", "column", "start", "freq", NULL }, 1, 4, cmd_simulate,
      "  set=    every parameter of SPEC by name (mu, ar1, ma1, omega, alpha1, beta1, nu),\n"
      "          and sigma2, the innovation variance, when there is no garch part.\n"
      "  burn=   values discarded first (default 500); file= writes date,COLUMN rows\n"
      "          starting at start= (default 2024-01-01) with freq= (default daily).\n"
      "  The generator is GSL's MT19937 seeded with seed=; the same seed gives the same series.\n" },
    { NULL, NULL, NULL, { NULL }, 0, 0, NULL, NULL }
};
