/* sh_session.h - the state of one hone session and the command runner.
 *
 * Every command, typed or read from a file, goes through sh_exec_line: it
 * splits the line, finds the command in the table (sh_cmd.h), runs it with
 * its text output captured, and then prints either the text or one JSON
 * object.  Errors are reported with where they happened and never end an
 * interactive session. */
#ifndef SH_SESSION_H
#define SH_SESSION_H

#include <stdio.h>
#include <signal.h>

#include "fit.h"
#include "diag_battery.h"
#include "sh_json.h"
#include "sh_parse.h"
#include "sh_notes.h"

struct sh_journal;

typedef struct {
    int id;                     /* 1-based, stable for the session */
    fit_result fit;
    int parent;                 /* id of the model whose advice proposed it; 0 = none */
    char origin[512];           /* how it arose, in words */
    char series[512];           /* the series it was fitted to (file, column, transforms) */
    int checked;                /* battery below is valid */
    diag_battery battery;
    diag_options bopt;
} sh_model;

typedef struct sh_session {
    /* data: the loaded column and the working series after transforms */
    int loaded;
    char path[1024];
    char column[256];
    int season;                 /* seasonal period from the time column, 0 = unknown */
    char freq[32];              /* frequency in words, "" when there is no time column */
    double *raw;                /* loaded values (owned), or NULL while the working
                                   series is still those values: read them with sh_raw */
    size_t n_raw;
    double *y;                  /* working series (owned) */
    size_t n;
    char transforms[512];       /* e.g. "log, diff 1"; "" for none */

    /* models */
    sh_model *models;
    int nmodels, cap;
    int current;                /* index into models, -1 = none */

    /* settings (set KEY VALUE) */
    double alpha;               /* check and verdict level */
    int lags;                   /* 0 = rule */
    double level;               /* forecast interval level, percent */

    /* output */
    int json;                   /* one JSON object per command on stdout */
    int interactive;            /* typed at a terminal */
    int color, utf8;            /* terminal capabilities for charts */
    int width;                  /* terminal columns */
    FILE *out;                  /* text output of the current command */
    sh_json j;                  /* JSON object of the current command */
    char err[1024];             /* error message of the current command */
    int err_word;               /* word the error points at, -1 none */
    int err_offset;             /* extra byte offset within that word for the caret */
    int quit;                   /* set by quit */
    struct sh_journal *journal; /* NULL unless recording */
    void *last_forecast;        /* fit_forecast * of the last 'forecast' command (owned), or NULL */
    int last_forecast_model;    /* id of the model it came from */
    int replaying;              /* nesting guard for replay */
    sh_note *notes;             /* the analyst's notes (sh_notes.h), owned */
    int nnotes, notes_cap;
} sh_session;

/* The Ctrl-C flag: the SIGINT handler only sets it; fits poll it. */
extern volatile int sh_interrupted;

void sh_session_init(sh_session *s);
void sh_session_free(sh_session *s);

/* Run one command line.  WHERE names its origin for messages ("file:12"),
 * or NULL when typed.  Returns 0 on success, 1 when the command failed. */
int sh_exec_line(sh_session *s, const char *line, const char *where);

/* Record an error for the running command; WORD is the index of the word it
 * points at (or -1).  Returns -1 so handlers can 'return sh_fail(...)'. */
int sh_fail(sh_session *s, int word, const char *fmt, ...) __attribute__((format(printf, 3, 4)));

/* Text output of the running command (captured; printed afterwards). */
void sh_printf(sh_session *s, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* The current model, or NULL (with an error set) when none is fitted. */
sh_model *sh_current_model(sh_session *s);

/* Append a fitted model (takes ownership of *FIT); returns it. */
sh_model *sh_add_model(sh_session *s, fit_result *fit, int parent, const char *origin);

/* Text naming the working series (file, column, transforms) into BUF. */
char *sh_series_label(const sh_session *s, char *buf, size_t len);

/* The current model if it was fitted to the present working series;
 * otherwise NULL with an error set (the caller returns -1). */
sh_model *sh_current_model_on_series(sh_session *s);

/* Replace the working series (takes ownership of Y).  While the working
 * series is the loaded values, they are kept as the raw series instead of
 * being freed. */
void sh_set_series(sh_session *s, double *y, size_t n);

/* Make Y (owned) both the loaded values and the working series. */
void sh_load_series(sh_session *s, double *y, size_t n);

/* Back to the loaded values as the working series. */
void sh_reset_series(sh_session *s);

/* The loaded values (s->n_raw of them), NULL when none are. */
const double *sh_raw(const sh_session *s);

#endif
