/* sh_exec.c - the one execution path for typed and scripted commands. */
#include "sh_session.h"
#include "sh_cmd.h"
#include "sh_journal.h"
#include "sh_notes.h"
#include "hn_status.h"
#include "fit_forecast.h"

#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

volatile int sh_interrupted = 0;

void sh_session_init(sh_session *s)
{
    memset(s, 0, sizeof *s);
    s->current = -1;
    s->alpha = 0.05;
    s->level = 95.0;
    s->width = 80;
    s->err_word = -1;
    sh_json_init(&s->j);
}

static void free_model(sh_model *m)
{
    fit_result_free(&m->fit);
    if (m->checked)
        diag_battery_free(&m->battery);
}

void sh_session_free(sh_session *s)
{
    for (int i = 0; i < s->nmodels; i++)
        free_model(&s->models[i]);
    free(s->models);
    sh_notes_clear(s);
    fit_forecast_free(s->last_forecast);
    free(s->raw);
    free(s->y);
    sh_json_free(&s->j);
    if (s->journal)
        sh_journal_close(s->journal);
    memset(s, 0, sizeof *s);
}

int sh_fail(sh_session *s, int word, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(s->err, sizeof s->err, fmt, ap);
    va_end(ap);
    s->err_word = word;
    s->err_offset = 0;
    return -1;
}

void sh_printf(sh_session *s, const char *fmt, ...)
{
    va_list ap;
    if (!s->out)
        return;
    va_start(ap, fmt);
    vfprintf(s->out, fmt, ap);
    va_end(ap);
}

sh_model *sh_current_model(sh_session *s)
{
    if (s->current < 0 || s->current >= s->nmodels) {
        sh_fail(s, -1, "no model fitted yet (use 'fit SPEC', e.g. fit arma(1,0))");
        return NULL;
    }
    return &s->models[s->current];
}

sh_model *sh_add_model(sh_session *s, fit_result *fit, int parent, const char *origin)
{
    if (s->nmodels == s->cap) {
        int c = s->cap ? 2 * s->cap : 16;
        sh_model *m = realloc(s->models, (size_t)c * sizeof *m);
        if (!m) {
            fit_result_free(fit);
            return NULL;
        }
        s->models = m;
        s->cap = c;
    }
    sh_model *m = &s->models[s->nmodels];
    memset(m, 0, sizeof *m);
    m->id = s->nmodels + 1;
    m->fit = *fit;
    memset(fit, 0, sizeof *fit);
    m->parent = parent;
    snprintf(m->origin, sizeof m->origin, "%s", origin ? origin : "");
    sh_series_label(s, m->series, sizeof m->series);
    s->current = s->nmodels++;
    return m;
}

char *sh_series_label(const sh_session *s, char *buf, size_t len)
{
    snprintf(buf, len, "%.200s%s%.100s%s%.180s", s->path, *s->column ? " column " : "", s->column,
             *s->transforms ? ", " : "", s->transforms);
    return buf;
}

sh_model *sh_current_model_on_series(sh_session *s)
{
    sh_model *m = sh_current_model(s);
    char now[512];
    if (!m)
        return NULL;
    if (m->fit.n != s->n || strcmp(m->series, sh_series_label(s, now, sizeof now))) {
        sh_fail(s, -1, "model %d was fitted to %s, not to the working series now (%s): "
                "refit, or undo the transforms", m->id, m->series, now);
        return NULL;
    }
    return m;
}

/* The loaded values are copied only when a transform first replaces them:
 * a load of a long column then touches its values once. */
void sh_set_series(sh_session *s, double *y, size_t n)
{
    if (!s->raw)
        s->raw = s->y;
    else
        free(s->y);
    s->y = y;
    s->n = n;
}

void sh_load_series(sh_session *s, double *y, size_t n)
{
    free(s->raw);
    free(s->y);
    s->raw = NULL;
    s->y = y;
    s->n = s->n_raw = n;
}

void sh_reset_series(sh_session *s)
{
    if (!s->raw)
        return;
    free(s->y);
    s->y = s->raw;
    s->raw = NULL;
    s->n = s->n_raw;
}

const double *sh_raw(const sh_session *s)
{
    return s->raw ? s->raw : s->y;
}

int sh_arg(const sh_words *w, int k)
{
    for (int i = 1; i < w->n; i++)
        if (!strchr(w->word[i], '=') && k-- == 0)
            return i;
    return -1;
}

int sh_nargs(const sh_words *w)
{
    int c = 0;
    for (int i = 1; i < w->n; i++)
        if (!strchr(w->word[i], '='))
            c++;
    return c;
}

int sh_command_free_text(const sh_command *c)
{
    return c->options[0] && !strcmp(c->options[0], SH_FREE_TEXT);
}

int sh_command_check(sh_session *s, const sh_command *c, sh_words *w)
{
    int free_text = sh_command_free_text(c);
    for (int i = 1; i < w->n && !free_text; i++) {
        const char *eq = strchr(w->word[i], '=');
        if (!eq)
            continue;
        size_t k = (size_t)(eq - w->word[i]);
        int ok = 0;
        for (int o = 0; o < SH_MAX_OPTIONS && c->options[o]; o++)
            if (strlen(c->options[o]) == k && !strncmp(c->options[o], w->word[i], k))
                ok = 1;
        if (!ok) {
            char list[256] = "";
            for (int o = 0; o < SH_MAX_OPTIONS && c->options[o]; o++) {
                size_t l = strlen(list);
                snprintf(list + l, sizeof list - l, "%s%s=", o ? ", " : "", c->options[o]);
            }
            return sh_fail(s, i, "unknown option '%.*s' for %s (%s%s)", (int)k, w->word[i], c->name,
                           *list ? "accepted: " : "it takes no options", list);
        }
        for (int j = 1; j < i; j++)
            if (!strncmp(w->word[j], w->word[i], k + 1))
                return sh_fail(s, i, "option '%.*s' given twice", (int)k, w->word[i]);
    }
    int na = free_text ? w->n - 1 : sh_nargs(w);
    if (na < c->min_args || na > c->max_args)
        return sh_fail(s, na > c->max_args ? sh_arg(w, c->max_args) : -1,
                       "%s takes %s; usage: %s", c->name,
                       c->max_args == 0 ? "no arguments" :
                       na < c->min_args ? "more arguments" : "fewer arguments", c->usage);
    return 0;
}

/* Print the error with its origin and a caret under the offending word. */
static void report_error(sh_session *s, const char *line, const sh_words *w, const char *where)
{
    if (where)
        fprintf(stderr, "%s: error: %s\n", where, s->err);
    else
        fprintf(stderr, "error: %s\n", s->err);
    if (s->err_word >= 0 && s->err_word < w->n) {
        int off = w->offset[s->err_word] + s->err_offset;
        fprintf(stderr, "  %s\n  %*s^\n", line, off, "");
    }
}

int sh_exec_line(sh_session *s, const char *line, const char *where)
{
    sh_words w;
    int errpos = 0, rc = 0;
    const char *why = NULL;
    char *text = NULL;
    size_t text_len = 0;

    s->err[0] = '\0';
    s->err_word = -1;
    int prc = sh_words_split(line, &w, &errpos, &why);
    if (prc != HN_OK) {
        snprintf(s->err, sizeof s->err, "%s", prc == HN_ENOMEM ? "out of memory" : why);
        if (where)
            fprintf(stderr, "%s: error: %s\n", where, s->err);
        else
            fprintf(stderr, "error: %s\n", s->err);
        fprintf(stderr, "  %s\n  %*s^\n", line, errpos, "");
        return 1;
    }
    if (w.n == 0) {
        sh_words_free(&w);
        return 0;
    }

    const sh_command *c = sh_command_find(w.word[0]);
    s->out = open_memstream(&text, &text_len);
    sh_json_reset(&s->j);
    sh_json_begin_object(&s->j);
    sh_json_kstring(&s->j, "command", c ? c->name : w.word[0]);

    if (!c) {
        const char *near = sh_command_suggest(w.word[0]);
        if (near)
            sh_fail(s, 0, "unknown command '%s' (did you mean '%s'? 'help' lists the commands)", w.word[0], near);
        else
            sh_fail(s, 0, "unknown command '%s' ('help' lists the commands)", w.word[0]);
        rc = 1;
    } else if (sh_command_check(s, c, &w) != 0) {
        rc = 1;
    } else {
        sh_interrupted = 0;
        rc = c->fn(s, &w) != 0;
    }
    if (rc && !s->err[0])
        snprintf(s->err, sizeof s->err, "%s failed", c ? c->name : w.word[0]);

    sh_json_kbool(&s->j, "ok", !rc);
    if (rc)
        sh_json_kstring(&s->j, "error", s->err);
    sh_json_end_object(&s->j);
    if (s->out) {
        fclose(s->out);
        s->out = NULL;
    }

    if (s->json) {
        fputs(sh_json_text(&s->j), stdout);
        fputc('\n', stdout);
    } else if (text && text_len) {
        fwrite(text, 1, text_len, stdout);
    }
    fflush(stdout);
    if (rc)
        report_error(s, line, &w, where);
    if (s->journal && (!c || strcmp(c->name, "record")))
        sh_journal_entry(s->journal, line, text ? text : "", rc ? s->err : NULL);
    free(text);
    sh_words_free(&w);
    return rc;
}
