/* sh_batch.c - hone batch: run one command sequence over many series on several threads, one JSON line each. */
/* sched_setaffinity and the CPU_* macros are GNU extensions */
#define _GNU_SOURCE
#include "sh_batch.h"
#include "sh_cmd.h"
#include "sh_csv.h"
#include "sh_session.h"
#include "hn_status.h"

#include <ctype.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <unistd.h>

#include <omp.h>
#include <sched.h>

/* Commands that make no sense per series, or that touch state shared
 * between sessions: refused in a batch sequence. */
static const char *const refused[] = { "load", "record", "replay", "note", "simulate", NULL };

/* Header names that "all" leaves out as row labels (as the CSV reader's
 * automatic column choice does). */
static const char *const index_names[] = { "", "t", "index", "idx", "id", "obs", "row", "rownames", NULL };

typedef struct {
    char *buf;
    size_t len, cap;
    int failed;                  /* allocation failed */
} strbuf;

static void sb_add(strbuf *b, const char *s, size_t n)
{
    if (b->failed)
        return;
    if (b->len + n + 1 > b->cap) {
        size_t c = b->cap ? b->cap : 256;
        while (c < b->len + n + 1)
            c *= 2;
        char *p = realloc(b->buf, c);
        if (!p) {
            b->failed = 1;
            return;
        }
        b->buf = p;
        b->cap = c;
    }
    memcpy(b->buf + b->len, s, n);
    b->len += n;
    b->buf[b->len] = '\0';
}

static void sb_puts(strbuf *b, const char *s)
{
    sb_add(b, s, strlen(s));
}

/* S as a JSON string literal (quotes included). */
static void sb_json_string(strbuf *b, const char *s)
{
    sb_add(b, "\"", 1);
    for (const unsigned char *p = (const unsigned char *)s; *p; p++) {
        char esc[8];
        if (*p == '"' || *p == '\\') {
            esc[0] = '\\';
            esc[1] = (char)*p;
            sb_add(b, esc, 2);
        } else if (*p < 0x20) {
            snprintf(esc, sizeof esc, "\\u%04x", *p);
            sb_puts(b, esc);
        } else {
            sb_add(b, (const char *)p, 1);
        }
    }
    sb_add(b, "\"", 1);
}

/* S as one word of a command line: double quotes, with \" and \\ inside. */
static void sb_word(strbuf *b, const char *s)
{
    sb_add(b, "\"", 1);
    for (; *s; s++) {
        if (*s == '"' || *s == '\\')
            sb_add(b, "\\", 1);
        sb_add(b, s, 1);
    }
    sb_add(b, "\"", 1);
}

typedef struct {
    const char *file;
    char *column;                /* header name, or NULL when the file could not be read */
    char *error;                 /* why the file could not be read (owned), else NULL */
    char *line;                  /* the finished JSON line (owned), NULL until done */
    int failed;
} series;

typedef struct {
    char **cmds;                 /* the command sequence */
    int ncmds;
    const char *load_extra;      /* extra KEY=VALUE words for load, or NULL */
} plan;

/* Run LINE in S and append its JSON object to OUT ("," first unless
 * *FIRST).  ALLOW_LOAD lets the batch's own load through.  Returns 0 on
 * success, 1 when the command failed (its object then says why), and -1
 * for a blank line (nothing appended). */
static int run_one(sh_session *s, const char *line, int allow_load, strbuf *out, int *first)
{
    sh_words w;
    int errpos = 0, rc = 0;
    const char *why = NULL;
    s->err[0] = '\0';
    s->err_word = -1;
    sh_json_reset(&s->j);
    sh_json_begin_object(&s->j);
    if (sh_words_split(line, &w, &errpos, &why) != HN_OK) {
        sh_json_kstring(&s->j, "command", "");
        snprintf(s->err, sizeof s->err, "%s (at byte %d of '%s')", why ? why : "cannot split the line",
                 errpos, line);
        rc = 1;
    } else if (w.n == 0) {
        sh_words_free(&w);
        return -1;
    } else {
        const sh_command *c = sh_command_find(w.word[0]);
        sh_json_kstring(&s->j, "command", c ? c->name : w.word[0]);
        int refuse = 0;
        for (int i = 0; c && refused[i]; i++)
            if (!strcmp(c->name, refused[i]) && !(allow_load && !strcmp(c->name, "load")))
                refuse = 1;
        if (!c) {
            sh_fail(s, 0, "unknown command '%s'", w.word[0]);
            rc = 1;
        } else if (refuse) {
            sh_fail(s, 0, "'%s' is not available in a batch (each series is loaded by the batch itself, "
                    "and journals belong to interactive sessions)", c->name);
            rc = 1;
        } else if (sh_command_check(s, c, &w) != 0) {
            rc = 1;
        } else {
            char *text = NULL;
            size_t text_len = 0;
            s->out = open_memstream(&text, &text_len);
            rc = c->fn(s, &w) != 0;
            if (s->out)
                fclose(s->out);
            s->out = NULL;
            free(text);            /* the text form is not part of a batch line */
        }
        if (rc && !s->err[0])
            snprintf(s->err, sizeof s->err, "%s failed", c ? c->name : w.word[0]);
        sh_words_free(&w);
    }
    sh_json_kbool(&s->j, "ok", !rc);
    if (rc)
        sh_json_kstring(&s->j, "error", s->err);
    sh_json_end_object(&s->j);
    if (!*first)
        sb_add(out, ",", 1);
    *first = 0;
    sb_puts(out, sh_json_text(&s->j));
    return rc;
}

/* Run one series in a session of its own; fills SR->line and SR->failed. */
static void run_series(const plan *pl, series *sr)
{
    strbuf b = { 0 };
    sb_puts(&b, "{\"series\":");
    char *label = malloc(strlen(sr->file) + (sr->column ? strlen(sr->column) : 0) + 2);
    if (label) {
        sprintf(label, "%s%s%s", sr->file, sr->column ? ":" : "", sr->column ? sr->column : "");
        sb_json_string(&b, label);
        free(label);
    }
    sb_puts(&b, ",\"file\":");
    sb_json_string(&b, sr->file);
    if (!sr->column) {
        sb_puts(&b, ",\"ok\":false,\"error\":");
        sb_json_string(&b, sr->error ? sr->error : "cannot read the file");
        sb_puts(&b, ",\"commands\":[]}");
        sr->failed = 1;
    } else {
        sb_puts(&b, ",\"column\":");
        sb_json_string(&b, sr->column);
        strbuf cmds = { 0 };
        strbuf load = { 0 };
        sb_puts(&load, "load ");
        sb_word(&load, sr->file);
        sb_puts(&load, " column=");
        sb_word(&load, sr->column);
        if (pl->load_extra) {
            sb_puts(&load, " ");
            sb_puts(&load, pl->load_extra);
        }
        sh_session s;
        sh_session_init(&s);
        s.json = 1;
        int first = 1, failed = 0;
        char err[1024] = "", failed_cmd[64] = "";
        if (load.failed || run_one(&s, load.buf, 1, &cmds, &first) == 1) {
            failed = 1;
            snprintf(err, sizeof err, "%s", load.failed ? "out of memory" : s.err);
            snprintf(failed_cmd, sizeof failed_cmd, "load");
        }
        for (int i = 0; !failed && !s.quit && i < pl->ncmds; i++) {
            if (run_one(&s, pl->cmds[i], 0, &cmds, &first) == 1) {
                failed = 1;
                snprintf(err, sizeof err, "%s", s.err);
                const char *p = pl->cmds[i];
                while (*p == ' ' || *p == '\t')
                    p++;
                size_t k = strcspn(p, " \t");
                snprintf(failed_cmd, sizeof failed_cmd, "%.*s", (int)(k < 60 ? k : 60), p);
            }
        }
        sh_session_free(&s);
        sb_puts(&b, failed ? ",\"ok\":false" : ",\"ok\":true");
        if (failed) {
            sb_puts(&b, ",\"failed_command\":");
            sb_json_string(&b, failed_cmd);
            sb_puts(&b, ",\"error\":");
            sb_json_string(&b, err);
        }
        sb_puts(&b, ",\"commands\":[");
        if (cmds.buf)
            sb_puts(&b, cmds.buf);
        sb_puts(&b, "]}");
        if (cmds.failed || load.failed)
            b.failed = 1;
        free(cmds.buf);
        free(load.buf);
        sr->failed = failed;
    }
    if (b.failed) {
        free(b.buf);
        sr->line = strdup("{\"series\":null,\"ok\":false,\"error\":\"out of memory\",\"commands\":[]}");
        sr->failed = 1;
    } else {
        sr->line = b.buf;
    }
}

static int is_index_name(const char *h)
{
    for (int i = 0; index_names[i]; i++)
        if (!strcasecmp(h, index_names[i]))
            return 1;
    return 0;
}

/* Append the series of FILE to *V (count *N, capacity *CAP).  COLUMNS: NULL
 * for all value columns, else a comma-separated list of names or numbers.
 * TIME: the time= value given with --load, or NULL.  0, or -1 when memory
 * ran out. */
static int add_file(const char *file, const char *columns, const char *time, series **v, size_t *n,
                    size_t *cap)
{
    char **names = NULL;
    int ncols = 0;
    char *error = NULL;
    if (columns) {
        const char *p = columns;
        while (*p) {
            size_t k = strcspn(p, ",");
            if (*n == *cap) {
                size_t c = *cap ? 2 * *cap : 64;
                series *nv = realloc(*v, c * sizeof *nv);
                if (!nv)
                    return -1;
                *v = nv;
                *cap = c;
            }
            series *sr = &(*v)[(*n)++];
            memset(sr, 0, sizeof *sr);
            sr->file = file;
            sr->column = strndup(p, k);
            if (!sr->column)
                return -1;
            p += k;
            if (*p == ',')
                p++;
        }
        return 0;
    }
    sh_error e;
    int rc = sh_column_names(file, &names, &ncols, &e);
    int time_index = 0;
    if (rc == HN_OK) {
        /* the time column the loader would pick, so that "all" leaves it out */
        sh_error te;
        if (sh_csv_time_index(file, time, &time_index, &te) != HN_OK)
            time_index = 0;
    } else {
        error = strdup(e.message);
    }
    for (int i = 0; rc != HN_OK || i < ncols; i++) {
        if (rc == HN_OK && (i + 1 == time_index || (ncols > 1 && is_index_name(names[i]))))
            continue;
        if (*n == *cap) {
            size_t c = *cap ? 2 * *cap : 64;
            series *nv = realloc(*v, c * sizeof *nv);
            if (!nv)
                break;
            *v = nv;
            *cap = c;
        }
        series *sr = &(*v)[(*n)++];
        memset(sr, 0, sizeof *sr);
        sr->file = file;
        if (rc != HN_OK) {
            sr->error = error;
            error = NULL;
            break;
        }
        sr->column = strdup(names[i]);
        if (!sr->column)
            break;
    }
    free(error);
    sh_names_free(names, ncols);
    return 0;
}

static void usage(FILE *f)
{
    fprintf(f,
            "usage: hone batch --commands 'CMD; CMD' [options] FILE.csv [FILE.csv ...]\n"
            "  --commands TEXT     the commands run on every series, separated by ';'\n"
            "  --command-file F    ... or read them from F, one a line ('#' comments)\n"
            "  --columns LIST      all (default: every value column) or NAME,NAME,... or 1-based numbers\n"
            "  --load 'K=V ...'    extra options for loading each series (time=, missing=)\n"
            "  --threads N         threads (default: the cores the runtime reports)\n"
            "  --shard K/N         run only the K-th of N contiguous parts of the series list\n"
            "Each series is loaded and run in a session of its own; one JSON line per series,\n"
            "in input order; the exit code is 1 when any series failed.\n");
}

/* The commands of a command file, one a line, as a ';'-free list. */
static char **read_command_file(const char *path, int *n)
{
    FILE *f = fopen(path, "r");
    if (!f)
        return NULL;
    char **v = NULL;
    int cnt = 0, cap = 0;
    char line[4096];
    while (fgets(line, sizeof line, f)) {
        line[strcspn(line, "\r\n")] = '\0';
        if (cnt == cap) {
            cap = cap ? 2 * cap : 16;
            char **nv = realloc(v, (size_t)cap * sizeof *nv);
            if (!nv)
                break;
            v = nv;
        }
        v[cnt] = strdup(line);
        if (!v[cnt])
            break;
        cnt++;
    }
    fclose(f);
    *n = cnt;
    if (!v)
        v = calloc(1, sizeof *v);
    return v;
}


/* Each thread of the batch's team onto a CPU of its own for a moment, then
 * free again.  On a 2-core virtual machine the second thread began its
 * first series 0.4 to 5 ms after the first (it waited on the first
 * thread's CPU until the scheduler moved it; with the threads bound, or
 * pinned for a moment as here, both began within 0.05 ms).  The pin is
 * lifted at once: a lasting binding would crowd several batch processes
 * onto the same cores.  Not when the user binds threads through the OpenMP
 * environment. */
static void spread_once(void)
{
    if (getenv("OMP_PROC_BIND") || getenv("OMP_PLACES") || getenv("GOMP_CPU_AFFINITY"))
        return;
    cpu_set_t all, one;
    int k = omp_get_thread_num(), team = omp_get_num_threads();
    if (team < 2 || sched_getaffinity(0, sizeof all, &all) != 0 || CPU_COUNT(&all) < team)
        return;
    int cpu = -1;
    for (int c = 0, seen = 0; c < CPU_SETSIZE && cpu < 0; c++)
        if (CPU_ISSET(c, &all) && seen++ == k)
            cpu = c;
    CPU_ZERO(&one);
    CPU_SET(cpu, &one);
    if (sched_setaffinity(0, sizeof one, &one) == 0)
        (void)sched_setaffinity(0, sizeof all, &all);
}

int sh_batch_main(int argc, char **argv)
{
    const char *commands = NULL, *command_file = NULL, *columns = NULL, *load_extra = NULL;
    int threads = 0, shard_k = 1, shard_n = 1;
    const char **files = calloc((size_t)argc + 1, sizeof *files);
    int nfiles = 0;
    if (!files)
        return 2;
    for (int i = 1; i < argc; i++) {
        const char *a = argv[i];
        int has_val = i + 1 < argc;
        if (!strcmp(a, "--help") || !strcmp(a, "-h")) {
            usage(stdout);
            free(files);
            return 0;
        } else if (!strcmp(a, "--commands") && has_val) {
            commands = argv[++i];
        } else if (!strcmp(a, "--command-file") && has_val) {
            command_file = argv[++i];
        } else if (!strcmp(a, "--columns") && has_val) {
            columns = argv[++i];
        } else if (!strcmp(a, "--load") && has_val) {
            load_extra = argv[++i];
        } else if (!strcmp(a, "--threads") && has_val) {
            char *end;
            long t = strtol(argv[++i], &end, 10);
            if (*end || t < 1 || t > 1024) {
                fprintf(stderr, "hone batch: --threads takes a whole number from 1 to 1024\n");
                free(files);
                return 2;
            }
            threads = (int)t;
        } else if (!strcmp(a, "--shard") && has_val) {
            if (sscanf(argv[++i], "%d/%d", &shard_k, &shard_n) != 2 || shard_n < 1 || shard_k < 1 ||
                shard_k > shard_n) {
                fprintf(stderr, "hone batch: --shard takes K/N with 1 <= K <= N, e.g. 2/4\n");
                free(files);
                return 2;
            }
        } else if (a[0] == '-' && a[1]) {
            fprintf(stderr, "hone batch: unknown option '%s'%s\n", a, has_val ? "" : " (or its value is missing)");
            usage(stderr);
            free(files);
            return 2;
        } else {
            files[nfiles++] = a;
        }
    }
    if ((!commands && !command_file) || (commands && command_file) || nfiles == 0) {
        fprintf(stderr, "hone batch: give the commands (--commands or --command-file, one of them) and at "
                        "least one CSV file\n");
        usage(stderr);
        free(files);
        return 2;
    }
    if (columns && !strcmp(columns, "all"))
        columns = NULL;

    plan pl = { NULL, 0, load_extra };
    pl.cmds = commands ? sh_split_commands(commands, &pl.ncmds) : read_command_file(command_file, &pl.ncmds);
    if (!pl.cmds) {
        fprintf(stderr, "hone batch: %s: %s\n", command_file ? command_file : "--commands",
                command_file ? "cannot read the command file" : "out of memory");
        free(files);
        return 2;
    }

    /* time= among the extra load options decides which column is the time */
    char *time = NULL;
    if (load_extra) {
        const char *t = strstr(load_extra, "time=");
        if (t && (t == load_extra || t[-1] == ' ')) {
            t += 5;
            time = strndup(t, strcspn(t, " \t"));
        }
    }
    series *v = NULL;
    size_t nser = 0, cap = 0;
    int mem = 0;
    for (int f = 0; f < nfiles && !mem; f++)
        mem = add_file(files[f], columns, time, &v, &nser, &cap) != 0;
    free(time);
    if (mem) {
        fprintf(stderr, "hone batch: out of memory listing the series\n");
        for (size_t i = 0; i < nser; i++) {
            free(v[i].column);
            free(v[i].error);
        }
        free(v);
        sh_free_commands(pl.cmds, pl.ncmds);
        free(files);
        return 2;
    }

    /* this shard's contiguous part: [lo, hi) */
    size_t lo = nser * (size_t)(shard_k - 1) / (size_t)shard_n;
    size_t hi = nser * (size_t)shard_k / (size_t)shard_n;
    int progress = isatty(STDERR_FILENO);
    (void)sh_command_table(NULL);       /* build the shared table before the threads start */
    if (threads < 1)
        threads = omp_get_max_threads();
    omp_set_num_threads(threads);       /* --threads 1 means one thread inside the checks too */
    size_t next = lo, done = 0, nfailed = 0;
    long count = (long)(hi - lo);

#pragma omp parallel num_threads(threads)
    {
        spread_once();
#pragma omp for schedule(dynamic, 1)
        for (long i = 0; i < count; i++) {
            series *sr = &v[lo + (size_t)i];
            run_series(&pl, sr);
#pragma omp critical(sh_batch_output)
            {
                done++;
                if (sr->failed)
                    nfailed++;
                /* write every finished line whose predecessors are written */
                while (next < hi && v[next].line) {
                    fputs(v[next].line, stdout);
                    fputc('\n', stdout);
                    free(v[next].line);
                    v[next].line = (char *)"";   /* written: a non-NULL marker, never freed again */
                    next++;
                }
                fflush(stdout);
                if (progress)
                    fprintf(stderr, "\rbatch: %zu of %ld series done, %zu failed", done, count, nfailed);
            }
        }
    }
    if (progress && count > 0)
        fprintf(stderr, "\n");

    for (size_t i = 0; i < nser; i++) {
        free(v[i].column);
        free(v[i].error);
    }
    free(v);
    sh_free_commands(pl.cmds, pl.ncmds);
    free(files);
    return nfailed ? 1 : 0;
}
