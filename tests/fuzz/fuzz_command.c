/* fuzz_command.c - libFuzzer target: command lines through the splitter and sh_exec_line.
 *
 * Built and run by 'make fuzz'.  Each input is up to eight command lines (one
 * per text line; the first byte picks text or JSON output) run on a fresh
 * session holding a simulated AR(1) series.  Only commands that touch no
 * file are run (load, save, report, record, replay and 'file=' are skipped),
 * and lines asking for sizes above a few hundred are skipped so that every
 * run stays short.  Whatever the lines, the session must survive, and the
 * standard output of any command other than help must never show NaN or
 * an infinity as a number. */
#include "hn_status.h"
#include "sh_cmd.h"
#include "sh_parse.h"
#include "sh_session.h"

#include <ctype.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static const char *const allowed[] = {
    "series", "transform", "fit", "check", "models", "use", "forecast", "holdout", "simulate",
    "plot", "advise", "step", "set", "help", "note", NULL
};

static int is_allowed(const char *line)
{
    sh_words w;
    int pos;
    const char *why;
    if (sh_words_split(line, &w, &pos, &why) != HN_OK)
        return 1; /* the runner reports the split error itself */
    int ok = 1;
    if (w.n > 0) {
        const sh_command *c = sh_command_find(w.word[0]);
        if (c) {
            ok = 0;
            for (int i = 0; allowed[i]; i++)
                if (!strcmp(c->name, allowed[i]))
                    ok = 1;
        }
        for (int i = 1; ok && i < w.n; i++)
            if (!strncmp(w.word[i], "file=", 5))
                ok = 0;
    }
    sh_words_free(&w);
    if (!ok)
        return 0;
    /* sizes: every number written in the line must stay small */
    for (const char *p = line; *p; p++) {
        if (isdigit((unsigned char)*p) && (p == line || !isdigit((unsigned char)p[-1]))) {
            char *end;
            double v = strtod(p, &end);
            if (!(v <= 400.0))
                return 0;
        }
    }
    return 1;
}

/* 1 when TEXT shows "nan" or "inf" as a word of its own (any case).  In
 * JSON (JSON set) the contents of strings are skipped: they may echo what
 * was typed. */
static int shows_nonfinite(const char *text, int json)
{
    int in_string = 0;
    for (const char *p = text; *p; p++) {
        if (json && *p == '"') {
            in_string = !in_string;
            continue;
        }
        if (json && in_string) {
            if (*p == '\\' && p[1])
                p++;
            continue;
        }
        if (p != text && isalpha((unsigned char)p[-1]))
            continue;
        if ((!strncasecmp(p, "nan", 3) || !strncasecmp(p, "inf", 3)) && !isalpha((unsigned char)p[3]))
            return 1;
    }
    return 0;
}

/* 1 when the typed line itself holds "nan" or "inf" (text output may echo it). */
static int line_mentions(const char *line)
{
    for (const char *p = line; *p; p++)
        if (!strncasecmp(p, "nan", 3) || !strncasecmp(p, "inf", 3))
            return 1;
    return 0;
}

static FILE *quiet;

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    if (!quiet) {
        quiet = fopen("/dev/null", "w");
        if (!quiet)
            return 0;
        stderr = quiet; /* the runner's error reports; libFuzzer keeps its own stream */
    }
    if (size > 4096)
        return 0;
    int json = size && (data[0] & 1);
    if (size) {
        data++;
        size--;
    }

    char *out_text = NULL;
    size_t out_len = 0;
    FILE *saved_out = stdout;
    FILE *cap = open_memstream(&out_text, &out_len);
    if (!cap)
        return 0;
    stdout = cap;

    sh_session s;
    sh_session_init(&s);
    s.json = json;
    sh_interrupted = 0;
    if (sh_exec_line(&s, "simulate ar(1) n=120 seed=7 set=mu:1,ar1:0.6,sigma2:2", "fuzz") != 0)
        abort(); /* the fixed start must work */

    char line[4097];
    size_t at = 0;
    int ran = 0;
    for (size_t i = 0; i <= size && ran < 8; i++) {
        if (i == size || data[i] == '\n') {
            line[at] = '\0';
            at = 0;
            if (strlen(line) == 0 || !is_allowed(line))
                continue;
            fflush(cap);
            size_t before = out_len;
            sh_exec_line(&s, line, "fuzz");
            ran++;
            fflush(cap);
            const char *w = line;
            while (*w == ' ' || *w == '\t')
                w++;
            const sh_command *c = sh_command_find(w);
            int is_help = strncmp(w, "he", 2) == 0 || (c && !strcmp(c->name, "help"));
            if (!is_help && out_len > before && (json || !line_mentions(line)) &&
                shows_nonfinite(out_text + before, json)) {
                fprintf(saved_out, "non-finite number printed after: %s\n%s\n", line, out_text + before);
                abort();
            }
        } else if (data[i] == '\0') {
            line[at++] = ' '; /* a NUL cannot reach a command line */
        } else {
            line[at++] = (char)data[i];
        }
    }
    sh_session_free(&s);
    fclose(cap);
    stdout = saved_out;
    free(out_text);
    return 0;
}
