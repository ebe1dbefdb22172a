/* sh_csv.c - streaming CSV reader (libcsv) for one numeric series and an optional time column. */
#include "sh_csv.h"

#include "hn_mem.h"
#include "hn_status.h"
#include "sh_csv_fast.h"
#include "sh_csv_num.h"

#include <csv.h>
#include <errno.h>
#include <locale.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

#define CHUNK (1u << 18)      /* bytes read per fread, and where the delimiter is looked for */
#define CHUNK_MAX (1u << 26)  /* ... up to this much of a regular file at once, so that its
                                 plain rows are parsed on threads in few long stretches */
#define SHOW_MAX 40       /* bytes of an offending cell quoted in a message */

/* Reader state shared by the libcsv callbacks. */
typedef struct {
    const char *path;
    sh_error *err;
    const sh_csv_options *opt;
    size_t max_rows;
    int names_only;         /* 1: stop after the header row; 2: after choosing the
                               columns from the first data row */
    int rc;                 /* HN_OK until the first error */
    int done;               /* names_only: read as far as asked */

    long line;              /* physical line being fed to the parser */
    long row_line;          /* line where the current row began */
    long last_row_end;      /* line of the last complete row */
    long cb_line;           /* a field ending while line == cb_line holds no line break */
    int field;              /* fields seen so far in the current row */
    int state;              /* 0 header, 1 first data row, 2 later rows */

    char **hdr;             /* header names */
    int ncols, hcap;
    char **first;           /* cells of the first data row (for column detection) */
    long *first_line;
    int nfirst, fcap;

    int vcol, tcol;         /* 0-based; tcol -1 without a time column */
    int tkind, allow_year;
    char delim;             /* detected delimiter */

    double cur_y;           /* the current row's value, time and flags */
    int cur_missing;
    int64_t cur_t;

    sh_csv_rows rows;       /* rows stored; NaN marks an empty cell until the policy runs */
    int row_ended;          /* the last bytes fed ended a row: libcsv is between rows */
    locale_t loc;           /* the C locale the numbers are read in */
    sh_csv_fast fast;       /* plain rows read without libcsv */
} reader;

/* ---- small helpers ------------------------------------------------------ */

static char *copy_text(const char *s, size_t len)
{
    char *c = malloc(len + 1);
    if (c) {
        memcpy(c, s, len);
        c[len] = '\0';
    }
    return c;
}

/* Line breaks (LF, CRLF or a lone CR) inside a cell. */
static long breaks(const char *s, size_t len)
{
    long k = 0;
    if (!memchr(s, '\n', len) && !memchr(s, '\r', len))
        return 0;
    for (size_t i = 0; i < len; i++)
        if (s[i] == '\n' || (s[i] == '\r' && (i + 1 == len || s[i + 1] != '\n')))
            k++;
    return k;
}

/* Quote LEN bytes at S for a message: at most SHOW_MAX bytes, control and
 * non-ASCII bytes as \xNN, "..." when cut. */
static const char *show(const char *s, size_t len, char *buf, size_t cap)
{
    size_t o = 0;
    for (size_t i = 0; i < len && i < SHOW_MAX && o + 5 < cap; i++) {
        unsigned char c = (unsigned char)s[i];
        if (c >= 0x20 && c < 0x7f)
            buf[o++] = (char)c;
        else
            o += (size_t)snprintf(buf + o, cap - o, "\\x%02X", c);
    }
    if (len > SHOW_MAX && o + 4 < cap) {
        memcpy(buf + o, "...", 3);
        o += 3;
    }
    buf[o] = '\0';
    return buf;
}

static int fail(reader *R, int rc, long line, long col, const char *fmt, ...)
    __attribute__((format(printf, 5, 6)));

static int fail(reader *R, int rc, long line, long col, const char *fmt, ...)
{
    char text[512];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(text, sizeof text, fmt, ap);
    va_end(ap);
    if (R->rc == HN_OK) {
        R->rc = rc;
        sh_error_set(R->err, R->path, line, col, "%s", text);
    }
    return rc;
}

/* ---- column choice ------------------------------------------------------ */

static const char *const time_names[] = {"date", "time", "datetime", "timestamp", "period", "day",
                                         "week", "month", "quarter", "year", NULL};
static const char *const index_names[] = {"", "t", "index", "idx", "id", "obs", "row", "rownames",
                                          NULL};

static int name_in(const char *name, const char *const *list)
{
    for (int i = 0; list[i]; i++)
        if (strcasecmp(name, list[i]) == 0)
            return 1;
    return 0;
}

/* "a, b, c" of the header names, cut to fit CAP. */
static const char *column_list(const reader *R, char *buf, size_t cap)
{
    size_t o = 0;
    buf[0] = '\0';
    for (int j = 0; j < R->ncols; j++) {
        const char *nm = R->hdr[j][0] ? R->hdr[j] : "(empty)";
        size_t need = strlen(nm) + (j ? 2 : 0);
        if (o + need + 8 >= cap) {
            snprintf(buf + o, cap - o, "%s... (%d in all)", j ? ", " : "", R->ncols);
            break;
        }
        o += (size_t)snprintf(buf + o, cap - o, "%s%s", j ? ", " : "", nm);
    }
    return buf;
}

/* Resolve TEXT (name or 1-based index) to a 0-based column; -1 if unknown,
 * -2 if the name is ambiguous. */
static int find_column(const reader *R, const char *text)
{
    int hit = -1;
    for (int j = 0; j < R->ncols; j++)
        if (strcmp(R->hdr[j], text) == 0) {
            if (hit >= 0)
                return -2;
            hit = j;
        }
    if (hit >= 0)
        return hit;
    for (int j = 0; j < R->ncols; j++)
        if (strcasecmp(R->hdr[j], text) == 0) {
            if (hit >= 0)
                return -2;
            hit = j;
        }
    if (hit >= 0)
        return hit;
    size_t len = strlen(text);
    if (len == 0 || len > 9 || strspn(text, "0123456789") != len)
        return -1;
    long k = strtol(text, NULL, 10);
    return k >= 1 && k <= R->ncols ? (int)k - 1 : -1;
}

static int column_option(reader *R, const char *what, const char *text, int *col)
{
    char list[320], sb[64];
    *col = find_column(R, text);
    if (*col == -2)
        return fail(R, HN_EINVAL, 0, 0,
                    "%s column '%s' is ambiguous: several header names match; give its index",
                    what, show(text, strlen(text), sb, sizeof sb));
    if (*col < 0)
        return fail(R, HN_EINVAL, 0, 0, "no %s column '%s'; the columns are: %s", what,
                    show(text, strlen(text), sb, sizeof sb), column_list(R, list, sizeof list));
    return HN_OK;
}

/* ---- cells -------------------------------------------------------------- */

static void value_cell(reader *R, const char *s, size_t len, long line)
{
    char sb[4 * SHOW_MAX + 8];
    long col = R->vcol + 1;
    const char *nm = R->hdr[R->vcol];
    switch (sh_csv_number(s, len, &R->cur_y)) {
    case SH_NUM_OK:
        R->cur_missing = 0;
        return;
    case SH_NUM_EMPTY:
        R->cur_missing = 1;
        if (R->rows.n_empty++ == 0)
            R->rows.first_empty = line;
        return;
    case SH_NUM_COMMA:
        fail(R, HN_EPARSE, line, col,
             "column %ld '%s': '%s' is not a number: a decimal comma is not accepted; numbers "
             "use '.' as the decimal point (e.g. 1.5)",
             col, nm, show(s, len, sb, sizeof sb));
        return;
    case SH_NUM_NANINF:
        fail(R, HN_EPARSE, line, col,
             "column %ld '%s': '%s' is not accepted: values must be finite numbers; leave the "
             "cell empty to mark a missing value",
             col, nm, show(s, len, sb, sizeof sb));
        return;
    case SH_NUM_RANGE:
        fail(R, HN_EPARSE, line, col,
             "column %ld '%s': '%s' is beyond the range of a double (about 1.8e308)", col, nm,
             show(s, len, sb, sizeof sb));
        return;
    default:
        fail(R, HN_EPARSE, line, col, "column %ld '%s': '%s' is not a number", col, nm,
             show(s, len, sb, sizeof sb));
        return;
    }
}

static void time_cell(reader *R, const char *s, size_t len, long line)
{
    char sb[4 * SHOW_MAX + 8], why[160];
    long col = R->tcol + 1;
    const char *nm = R->hdr[R->tcol];
    int kind;
    const char *t = s;
    size_t tl = len;
    sh_csv_trim(&t, &tl);
    if (tl == 0) {
        fail(R, HN_EPARSE, line, col, "column %ld '%s': the time cell is empty", col, nm);
        return;
    }
    if (sh_time_parse(s, len, R->allow_year, &R->cur_t, &kind, why, sizeof why) != 0) {
        fail(R, HN_EPARSE, line, col, "column %ld '%s': '%s' is %s", col, nm,
             show(s, len, sb, sizeof sb), why);
        return;
    }
    if (R->tkind == SH_TIME_NONE)
        R->tkind = kind;
    else if (kind != R->tkind)
        fail(R, HN_EPARSE, line, col,
             "column %ld '%s': '%s' is not written like the first time cell (mixed formats)",
             col, nm, show(s, len, sb, sizeof sb));
}

static int grow(reader *R)
{
    if (sh_csv_rows_grow(&R->rows, R->tcol >= 0) != 0)
        return fail(R, HN_ENOMEM, 0, 0, "out of memory after %zu rows", R->rows.n);
    return HN_OK;
}

static void add_row(reader *R)
{
    char a[64], b[64];
    if (R->rows.n >= R->max_rows) {
        fail(R, HN_ELIMIT, R->row_line, 0,
             "more than %zu data rows (the row limit); raise the limit to load this file",
             R->max_rows);
        return;
    }
    if (R->rows.n == R->rows.cap && grow(R) != HN_OK)
        return;
    R->rows.y[R->rows.n] = R->cur_missing ? NAN : R->cur_y;
    R->rows.line[R->rows.n] = R->row_line;
    if (R->tcol >= 0) {
        if (R->rows.n > 0 && R->cur_t <= R->rows.st[R->rows.n - 1]) {
            int dup = R->cur_t == R->rows.st[R->rows.n - 1];
            sh_time_format(R->cur_t, R->tkind, a, sizeof a);
            sh_time_format(R->rows.st[R->rows.n - 1], R->tkind, b, sizeof b);
            fail(R, HN_EPARSE, R->row_line, R->tcol + 1,
                 dup ? "column %d '%s': time %s repeats the time on line %ld (%s); times must "
                       "be unique"
                     : "column %d '%s': time %s comes before the time on line %ld (%s); rows "
                       "must be in increasing time order",
                 R->tcol + 1, R->hdr[R->tcol], a, R->rows.line[R->rows.n - 1], b);
            return;
        }
        R->rows.st[R->rows.n] = R->cur_t;
    }
    R->rows.n++;
}

/* ---- header and the first data row --------------------------------------- */

static void end_header(reader *R)
{
    int numeric = 0;
    for (int j = 0; j < R->ncols; j++) {
        double v;
        sh_num_result r = sh_csv_number(R->hdr[j], strlen(R->hdr[j]), &v);
        if (r == SH_NUM_OK)
            numeric++;
        else if (r != SH_NUM_EMPTY) {
            numeric = 0;
            break;
        }
    }
    if (numeric > 0)
        fail(R, HN_EPARSE, R->row_line, 0,
             "the first line holds numbers, not column names: the file must start with a "
             "header row");
}

/* Choose the columns from the header and the first data row. */
static void choose_columns(reader *R)
{
    char list[320];
    const sh_csv_options *o = R->opt;
    int vexp = -1;
    double v;
    int64_t t;
    int kind;

    if (o && o->column && column_option(R, "value", o->column, &vexp) != HN_OK)
        return;
    R->tcol = -1;
    if (o && o->time_column && o->time_column[0]) {
        if (column_option(R, "time", o->time_column, &R->tcol) != HN_OK)
            return;
        if (R->tcol == vexp) {
            fail(R, HN_EINVAL, 0, 0, "the value column and the time column are both column %d '%s'",
                 vexp + 1, R->hdr[vexp]);
            return;
        }
        R->allow_year = 1;
    } else if (!o || !o->time_column) {
        for (int pass = 0; pass < 2 && R->tcol < 0; pass++)
            for (int j = 0; j < R->ncols; j++) {
                if (j == vexp || (pass == 0 && !name_in(R->hdr[j], time_names)))
                    continue;
                const char *c = R->first[j];
                /* a time-named column whose first cell is neither a time nor a number is
                 * still taken, so that its bad cell is reported rather than ignored */
                if (sh_time_parse(c, strlen(c), pass == 0, &t, &kind, NULL, 0) == 0 ||
                    (pass == 0 && sh_csv_number(c, strlen(c), &v) > SH_NUM_EMPTY)) {
                    R->tcol = j;
                    R->allow_year = pass == 0;
                    break;
                }
            }
    }
    if (vexp >= 0) {
        R->vcol = vexp;
        return;
    }
    for (int j = 0; j < R->ncols; j++)
        if (j != R->tcol && !name_in(R->hdr[j], index_names) && !name_in(R->hdr[j], time_names) &&
            sh_csv_number(R->first[j], strlen(R->first[j]), &v) == SH_NUM_OK) {
            R->vcol = j;
            return;
        }
    /* none: take the first column whose first cell is a refused number (decimal
     * comma, NaN/Inf, out of range, empty), so that the cell itself is reported */
    for (int j = 0; j < R->ncols; j++)
        if (j != R->tcol && !name_in(R->hdr[j], index_names) && !name_in(R->hdr[j], time_names) &&
            sh_csv_number(R->first[j], strlen(R->first[j]), &v) != SH_NUM_TEXT) {
            R->vcol = j;
            return;
        }
    fail(R, HN_EINVAL, R->row_line, 0,
         "no numeric value column found in the first data row; name one (columns: %s)",
         column_list(R, list, sizeof list));
}

static void first_row(reader *R)
{
    choose_columns(R);
    if (R->rc)
        return;
    value_cell(R, R->first[R->vcol], strlen(R->first[R->vcol]), R->first_line[R->vcol]);
    if (!R->rc && R->tcol >= 0)
        time_cell(R, R->first[R->tcol], strlen(R->first[R->tcol]), R->first_line[R->tcol]);
    if (!R->rc)
        add_row(R);
    for (int j = 0; j < R->nfirst; j++)
        free(R->first[j]);
    R->nfirst = 0;
}

static const char *delim_name(char d)
{
    return d == ';' ? "semicolon" : d == '\t' ? "tab" : "comma";
}

/* ---- libcsv callbacks ---------------------------------------------------- */

static int push(reader *R, char ***arr, long **lines, int *cnt, int *cap, const char *s,
                size_t len, long line)
{
    if (*cnt == *cap) {
        int nc = *cap ? 2 * *cap : 16;
        char **a = realloc(*arr, (size_t)nc * sizeof *a);
        if (!a)
            return fail(R, HN_ENOMEM, 0, 0, "out of memory reading the header");
        *arr = a;
        if (lines) {
            long *l = realloc(*lines, (size_t)nc * sizeof *l);
            if (!l)
                return fail(R, HN_ENOMEM, 0, 0, "out of memory reading the header");
            *lines = l;
        }
        *cap = nc;
    }
    sh_csv_trim(&s, &len);
    char *c = copy_text(s, len);
    if (!c)
        return fail(R, HN_ENOMEM, 0, 0, "out of memory reading the header");
    (*arr)[*cnt] = c;
    if (lines)
        (*lines)[*cnt] = line;
    (*cnt)++;
    return HN_OK;
}

static void on_field(void *data, size_t len, void *arg)
{
    reader *R = arg;
    const char *s = data;
    if (R->rc || R->done)
        return;
    /* the line the field began on: no scan needed unless a line end was fed since the
     * last callback */
    long line = R->line == R->cb_line ? R->line : R->line - breaks(s, len);
    R->cb_line = R->line;
    int col = R->field++;
    if (col == 0)
        R->row_line = line;
    if (R->state == 0) {
        if (col >= SH_CSV_MAX_COLUMNS) {
            fail(R, HN_ELIMIT, R->row_line, 0, "the header row has more than %d fields (the limit)",
                 SH_CSV_MAX_COLUMNS);
            return;
        }
        push(R, &R->hdr, NULL, &R->ncols, &R->hcap, s, len, 0);
    } else if (R->state == 1) {
        if (col < R->ncols)
            push(R, &R->first, &R->first_line, &R->nfirst, &R->fcap, s, len, line);
    } else if (col == R->vcol) {
        value_cell(R, s, len, line);
    } else if (col == R->tcol) {
        time_cell(R, s, len, line);
    }
}

static void on_row(int c, void *arg)
{
    reader *R = arg;
    (void)c;
    R->row_ended = 1;
    if (R->rc || R->done || R->field == 0)
        return;
    int nf = R->field;
    R->field = 0;
    R->last_row_end = R->line;
    R->cb_line = R->line + 1; /* where the next row starts unless blank lines follow */
    if (R->state == 0) {
        if (R->names_only == 1) {
            R->done = 1;
            return;
        }
        end_header(R);
        R->state = 1;
        return;
    }
    if (nf != R->ncols) {
        fail(R, HN_EPARSE, R->row_line, 0,
             "this row has %d field%s but the header row has %d (fields split at each %s)",
             nf, nf == 1 ? "" : "s", R->ncols, delim_name(R->delim));
        return;
    }
    if (R->state == 1 && R->names_only == 2) {
        choose_columns(R);
        for (int j = 0; j < R->nfirst; j++)
            free(R->first[j]);
        R->nfirst = 0;
        R->done = 1;
        return;
    }
    if (R->state == 1) {
        R->state = 2;
        first_row(R);
        return;
    }
    add_row(R);
}

/* ---- reading the file ---------------------------------------------------- */

static int space_only(unsigned char c)
{
    return c == ' ';
}

/* Most frequent of ',', ';', '\t' outside quotes in the first line of BUF. */
static char detect_delimiter(const char *buf, size_t len)
{
    size_t k[3] = {0, 0, 0};
    int q = 0;
    for (size_t i = 0; i < len; i++) {
        char c = buf[i];
        if (c == '"')
            q = !q;
        else if (!q && (c == '\n' || c == '\r'))
            break;
        else if (!q)
            k[0] += c == ',', k[1] += c == ';', k[2] += c == '\t';
    }
    if (k[1] > k[0] && k[1] >= k[2])
        return ';';
    if (k[2] > k[0] && k[2] > k[1])
        return '\t';
    return ',';
}

/* Feed LEN bytes to the parser; on a parser error record it.  */
static void feed(reader *R, struct csv_parser *p, const char *s, size_t len)
{
    if (csv_parse(p, s, len, on_field, on_row, R) != len && !R->rc) {
        int e = csv_error(p);
        if (e == CSV_EPARSE)
            fail(R, HN_EPARSE, R->line, 0,
                 "malformed quoting: a quote inside an unquoted field, or text after a closing "
                 "quote");
        else
            fail(R, HN_ENOMEM, R->line, 0, "the CSV parser failed: %s", csv_strerror(e));
    }
    if (!R->rc && csv_get_buffer_size(p) > (size_t)SH_CSV_MAX_LINE)
        fail(R, HN_ELIMIT, R->line, 0,
             "a field is longer than %ld bytes (the limit); is a quote left open after line %ld?",
             SH_CSV_MAX_LINE, R->last_row_end);
}

/* Take the plain rows at the start of the LEN bytes at B (whole lines only) without the
 * parser, as if it had read them; returns the bytes taken.  Called between rows once the
 * columns are known; what it leaves (from the first line that is not plain) the parser reads. */
static size_t take_plain(reader *R, const char *b, size_t len)
{
    sh_csv_shape sh = {R->delim, R->ncols, R->vcol, R->tcol, R->allow_year, R->tkind,
                       R->max_rows, R->loc};
    sh_csv_taken tk;
    sh_csv_fast_take(b, len, R->line, &sh, &R->rows, &R->fast, &tk);
    R->line += tk.lines;
    if (tk.last_row > 0) {
        /* what on_field and on_row would have left */
        R->row_line = R->last_row_end = tk.last_row;
        R->cb_line = tk.last_row + 1;
    }
    return tk.used;
}

/* Read the whole file through the parser.  Fills R; returns R->rc. */
static int read_file(reader *R, char *delim_out, int *bom_out)
{
    struct stat sb;
    FILE *f = fopen(R->path, "rb");
    if (!f)
        return fail(R, HN_EIO, 0, 0, "cannot open: %s", strerror(errno));
    int have_st = fstat(fileno(f), &sb) == 0;
    if (have_st && S_ISDIR(sb.st_mode)) {
        fclose(f);
        return fail(R, HN_EIO, 0, 0, "is a directory, not a CSV file");
    }
    size_t cap = CHUNK;
    if (have_st && !R->names_only && S_ISREG(sb.st_mode) && sb.st_size > (off_t)CHUNK)
        cap = sb.st_size < (off_t)CHUNK_MAX ? (size_t)sb.st_size : CHUNK_MAX;
    char *buf = hn_alloc_long(cap);
    if (!buf) {
        fclose(f);
        return fail(R, HN_ENOMEM, 0, 0, "out of memory");
    }
    struct csv_parser p;
    if (csv_init(&p, CSV_STRICT | CSV_STRICT_FINI | CSV_APPEND_NULL) != 0) {
        free(buf);
        fclose(f);
        return fail(R, HN_ENOMEM, 0, 0, "cannot start the CSV parser");
    }
    R->line = 1;
    long cur_len = 0;          /* bytes of the current physical line so far */
    int cr_pending = 0;        /* last byte fed was a CR: CRLF or a lone CR? */
    int first = 1, any = 0;
    size_t got;
    while (!R->rc && !R->done && (got = fread(buf, 1, cap, f)) > 0) {
        const char *b = buf;
        size_t len = got;
        sh_csv_fast_reset(&R->fast);
        if (first) {
            first = 0;
            if (len >= 3 && memcmp(b, "\xEF\xBB\xBF", 3) == 0) {
                b += 3, len -= 3;
                *bom_out = 1;
            }
            *delim_out = R->delim = detect_delimiter(b, (got < CHUNK ? got : CHUNK) - (size_t)(b - buf));
            csv_set_delim(&p, (unsigned char)*delim_out);
            if (*delim_out == '\t')
                csv_set_space_func(&p, space_only);
        }
        for (size_t i = 0; i < len; i++)
            if (b[i] != ' ' && b[i] != '\t' && b[i] != '\n' && b[i] != '\r') {
                any = 1;
                break;
            }
        size_t s = 0;
        for (size_t i = 0; i < len && !R->rc && !R->done; i++) {
            char c = b[i];
            if (c != '\n' && c != '\r')
                continue;
            size_t body = i - s;
            if (cr_pending) {
                cr_pending = 0;
                if (body > 0 || c != '\n')
                    R->line++; /* the CR before stood alone */
            }
            cur_len += (long)body;
            if (cur_len > SH_CSV_MAX_LINE) {
                fail(R, HN_ELIMIT, R->line, 0, "the line is longer than %ld bytes (the limit)",
                     SH_CSV_MAX_LINE);
                break;
            }
            if (body > 0)
                R->row_ended = 0;
            feed(R, &p, b + s, i - s + 1);
            cur_len = 0;
            if (c == '\n')
                R->line++;
            else
                cr_pending = 1;
            s = i + 1;
            if (c == '\n' && R->row_ended && R->state == 2 && !R->rc) {
                s += take_plain(R, b + s, len - s);
                i = s - 1;
            }
        }
        if (!R->rc && !R->done && s < len) {
            if (cr_pending) {
                cr_pending = 0;
                R->line++;
            }
            cur_len += (long)(len - s);
            R->row_ended = 0;
            if (cur_len > SH_CSV_MAX_LINE)
                fail(R, HN_ELIMIT, R->line, 0, "the line is longer than %ld bytes (the limit)",
                     SH_CSV_MAX_LINE);
            else
                feed(R, &p, b + s, len - s);
        }
    }
    if (!R->rc && !R->done && ferror(f))
        fail(R, HN_EIO, 0, 0, "read error: %s", strerror(errno));
    if (!R->rc && !R->done && csv_fini(&p, on_field, on_row, R) != 0 && !R->rc)
    {
        if (R->last_row_end > 0)
            fail(R, HN_EPARSE, R->field > 0 ? R->row_line : 0, 0,
                 "a quote opened after line %ld is never closed", R->last_row_end);
        else
            fail(R, HN_EPARSE, 0, 0, "a quote opened in the first line is never closed");
    }
    csv_free(&p);
    free(buf);
    fclose(f);
    if (!R->rc && !any)
        return fail(R, HN_EPARSE, 0, 0, "the file is empty");
    if (!R->rc && R->ncols == 0)
        return fail(R, HN_EPARSE, 0, 0, "no header row");
    return R->rc;
}

static void reader_free(reader *R)
{
    for (int j = 0; j < R->ncols; j++)
        free(R->hdr[j]);
    free(R->hdr);
    for (int j = 0; j < R->nfirst; j++)
        free(R->first[j]);
    free(R->first);
    free(R->first_line);
    sh_csv_rows_free(&R->rows);
    sh_csv_fast_free(&R->fast);
}

/* ---- missing values ------------------------------------------------------ */

static int apply_policy(reader *R, int policy)
{
    size_t n = R->rows.n;
    double *y = R->rows.y;
    if (R->rows.n_empty == 0)
        return HN_OK;
    long col = R->vcol + 1;
    const char *nm = R->hdr[R->vcol];
    switch (policy) {
    case SH_MISSING_DROP: {
        size_t k = 0;
        for (size_t i = 0; i < n; i++)
            if (!isnan(y[i])) {
                y[k] = y[i];
                R->rows.line[k] = R->rows.line[i];
                if (R->rows.st)
                    R->rows.st[k] = R->rows.st[i];
                k++;
            }
        R->rows.n = k;
        if (k == 0)
            return fail(R, HN_ESHORT, 0, col, "column %ld '%s': every value is empty", col, nm);
        return HN_OK;
    }
    case SH_MISSING_PREVIOUS:
        if (isnan(y[0]))
            return fail(R, HN_EPARSE, R->rows.line[0], col,
                        "column %ld '%s': the first value is empty, so there is no previous "
                        "value to repeat",
                        col, nm);
        for (size_t i = 1; i < n; i++)
            if (isnan(y[i]))
                y[i] = y[i - 1];
        return HN_OK;
    case SH_MISSING_INTERPOLATE: {
        if (isnan(y[0]) || isnan(y[n - 1])) {
            size_t i = isnan(y[0]) ? 0 : n - 1;
            return fail(R, HN_EPARSE, R->rows.line[i], col,
                        "column %ld '%s': the %s value is empty; interpolation needs a value on "
                        "both sides",
                        col, nm, i == 0 ? "first" : "last");
        }
        size_t a = 0;
        for (size_t i = 1; i < n; i++) {
            if (isnan(y[i]))
                continue;
            if (i > a + 1) {
                double xa = R->rows.st ? (double)R->rows.st[a] : (double)a;
                double xb = R->rows.st ? (double)R->rows.st[i] : (double)i;
                for (size_t j = a + 1; j < i; j++) {
                    double x = R->rows.st ? (double)R->rows.st[j] : (double)j;
                    y[j] = y[a] + (y[i] - y[a]) * (x - xa) / (xb - xa);
                }
            }
            a = i;
        }
        return HN_OK;
    }
    default:
        return fail(R, HN_EPARSE, R->rows.first_empty, col,
                    "column %ld '%s': %zu empty cell%s (the first on line %ld); choose a "
                    "missing-value policy (drop, previous or interpolate) to load them",
                    col, nm, R->rows.n_empty, R->rows.n_empty == 1 ? "" : "s", R->rows.first_empty);
    }
}

/* ---- public -------------------------------------------------------------- */

void sh_data_free(sh_data *d)
{
    if (!d)
        return;
    free(d->path);
    free(d->column_name);
    free(d->y);
    free(d->line);
    free(d->time_name);
    free(d->stamp);
    if (d->headers)
        for (int j = 0; j < d->ncols; j++)
            free(d->headers[j]);
    free(d->headers);
    memset(d, 0, sizeof *d);
}

void sh_names_free(char **names, int n)
{
    if (!names)
        return;
    for (int j = 0; j < n; j++)
        free(names[j]);
    free(names);
}

int sh_column_names(const char *path, char ***names, int *ncols, sh_error *err)
{
    reader R;
    char d = ',';
    int bom = 0;
    memset(&R, 0, sizeof R);
    sh_error_clear(err);
    *names = NULL;
    *ncols = 0;
    R.path = path;
    R.err = err;
    R.names_only = 1;
    R.tcol = -1;
    if (!path) {
        sh_error_set(err, NULL, 0, 0, "no file name given");
        return HN_EINVAL;
    }
    if (read_file(&R, &d, &bom) != HN_OK) {
        reader_free(&R);
        return R.rc;
    }
    *names = R.hdr;
    *ncols = R.ncols;
    R.hdr = NULL;
    R.ncols = 0;
    reader_free(&R);
    return HN_OK;
}

int sh_csv_time_index(const char *path, const char *time_column, int *time_index, sh_error *err)
{
    reader R;
    char d = ',';
    int bom = 0;
    sh_csv_options o;
    memset(&R, 0, sizeof R);
    memset(&o, 0, sizeof o);
    sh_error_clear(err);
    *time_index = 0;
    if (!path) {
        sh_error_set(err, NULL, 0, 0, "no file name given");
        return HN_EINVAL;
    }
    o.time_column = time_column;
    R.path = path;
    R.err = err;
    R.opt = &o;
    R.names_only = 2;
    R.tcol = -1;
    int rc = read_file(&R, &d, &bom);
    if (rc == HN_OK && !R.done)
        rc = fail(&R, HN_EPARSE, 0, 0, "no data rows after the header");
    if (rc == HN_OK)
        *time_index = R.tcol + 1;
    reader_free(&R);
    return rc;
}

int sh_csv_load(const char *path, const sh_csv_options *opt, sh_data *out, sh_error *err)
{
    reader R;
    char d = ',';
    int bom = 0;
    memset(&R, 0, sizeof R);
    memset(out, 0, sizeof *out);
    sh_error_clear(err);
    if (!path) {
        sh_error_set(err, NULL, 0, 0, "no file name given");
        return HN_EINVAL;
    }
    R.path = path;
    R.err = err;
    R.opt = opt;
    R.max_rows = opt && opt->max_rows ? opt->max_rows : SH_CSV_DEFAULT_MAX_ROWS;
    R.tcol = -1;
    int policy = opt ? (int)opt->missing : SH_MISSING_REFUSE;
    if (policy < SH_MISSING_REFUSE || policy > SH_MISSING_INTERPOLATE) {
        sh_error_set(err, path, 0, 0, "unknown missing-value policy %d", policy);
        return HN_EINVAL;
    }

    /* numbers are read in the C locale whatever the program's locale is */
    locale_t c_loc = newlocale(LC_ALL_MASK, "C", (locale_t)0);
    locale_t old = c_loc ? uselocale(c_loc) : (locale_t)0;
    R.loc = c_loc;
    read_file(&R, &d, &bom);
    if (c_loc) {
        uselocale(old);
        freelocale(c_loc);
    }
    if (!R.rc && R.state < 2)
        fail(&R, HN_ESHORT, 0, 0, "the file has a header row but no data rows");
    size_t n_rows = R.rows.n;
    if (!R.rc)
        apply_policy(&R, policy);
    if (R.rc) {
        reader_free(&R);
        return R.rc;
    }

    out->path = copy_text(path, strlen(path));
    out->column_name = copy_text(R.hdr[R.vcol], strlen(R.hdr[R.vcol]));
    if (R.tcol >= 0)
        out->time_name = copy_text(R.hdr[R.tcol], strlen(R.hdr[R.tcol]));
    if (!out->path || !out->column_name || (R.tcol >= 0 && !out->time_name)) {
        sh_data_free(out);
        reader_free(&R);
        sh_error_set(err, path, 0, 0, "out of memory");
        return HN_ENOMEM;
    }
    out->column_index = R.vcol + 1;
    out->n = R.rows.n;
    out->y = R.rows.y;
    out->line = R.rows.line;
    out->n_rows = n_rows;
    out->is_constant = 1;
    for (size_t i = 1; i < R.rows.n; i++)
        if (R.rows.y[i] != R.rows.y[0]) {
            out->is_constant = 0;
            break;
        }
    out->has_time = R.tcol >= 0;
    out->time_index = R.tcol + 1;
    out->time_kind = R.tcol >= 0 ? R.tkind : SH_TIME_NONE;
    out->stamp = R.rows.st;
    out->n_missing = R.rows.n_empty;
    out->missing_policy = policy;
    out->delimiter = d;
    out->had_bom = bom;
    out->ncols = R.ncols;
    out->headers = R.hdr;
    memset(&R.rows, 0, sizeof R.rows);
    R.hdr = NULL, R.ncols = 0;
    reader_free(&R);

    sh_freq_info fi;
    sh_freq_detect(out->stamp, out->has_time ? out->n : 0, out->time_kind, &fi);
    out->freq = fi.freq;
    out->season = fi.season;
    out->n_gaps = fi.n_gaps;
    out->n_gap_periods = fi.n_gap_periods;
    if (fi.n_gaps) {
        char a[48], b[48];
        size_t i = fi.first_gap;
        snprintf(out->first_gap, sizeof out->first_gap, "after %s (line %ld) next is %s (line %ld)",
                 sh_time_format(out->stamp[i - 1], out->time_kind, a, sizeof a), out->line[i - 1],
                 sh_time_format(out->stamp[i], out->time_kind, b, sizeof b), out->line[i]);
    }
    return HN_OK;
}
