/* sh_csv_fast.c - plain data rows split in place and parsed without copies, long stretches in
 * pieces on the OpenMP threads. */
#include "sh_csv_fast.h"

#include "hn_mem.h"
#include "sh_csv_num.h"
#include "sh_time.h"

#include <math.h>
#include <omp.h>
#include <stdlib.h>
#include <string.h>

#define PLAIN_LINE_MAX 65536L      /* longer lines go to libcsv, which enforces the limits */
#define SPLIT_MIN_DEFAULT (1u << 17)

static int fast_enabled = 1;
static size_t split_min = SPLIT_MIN_DEFAULT;
static int team_size; /* 0: OpenMP's */
static unsigned long long rows_taken;

void sh_csv_fast_tune(int enable, size_t min_bytes, int threads)
{
    fast_enabled = enable != 0;
    split_min = min_bytes ? min_bytes : SPLIT_MIN_DEFAULT;
    team_size = threads > 0 ? threads : 0;
}

unsigned long long sh_csv_fast_rows_taken(void)
{
    unsigned long long n;
#pragma omp atomic read
    n = rows_taken;
    return n;
}

/* ---- rows ----------------------------------------------------------------- */

static int reserve(sh_csv_rows *r, size_t need, int with_time)
{
    if (need <= r->cap)
        return 0;
    if (r->fixed)
        return -1;
    size_t cap = r->cap ? 2 * r->cap : 4096;
    while (cap < need)
        cap *= 2;
    double *y = hn_realloc_long(r->y, cap * sizeof *y);
    if (!y)
        return -1;
    r->y = y;
    long *l = hn_realloc_long(r->line, cap * sizeof *l);
    if (!l)
        return -1;
    r->line = l;
    if (with_time) {
        int64_t *t = hn_realloc_long(r->st, cap * sizeof *t);
        if (!t)
            return -1;
        r->st = t;
    }
    r->cap = cap;
    return 0;
}

int sh_csv_rows_grow(sh_csv_rows *rows, int with_time)
{
    return reserve(rows, rows->n + 1, with_time);
}

void sh_csv_rows_free(sh_csv_rows *rows)
{
    free(rows->y);
    free(rows->line);
    free(rows->st);
    memset(rows, 0, sizeof *rows);
}

void sh_csv_fast_reset(sh_csv_fast *f)
{
    f->quote = f->quote_from = f->quote_end = NULL;
    f->no_split = 0;
}

void sh_csv_fast_free(sh_csv_fast *f)
{
    sh_csv_fast_reset(f);
}

/* ---- one stretch ------------------------------------------------------------ */

typedef struct {
    size_t used;
    long lines;
    long last_row;
    int stopped;    /* a line before the end was left */
} part;

/* The first D in [P, E), or E.  Eight bytes at a time: a byte of x ^ D*0x01..01 is zero
 * where D is; (v - 0x01..01) & ~v & 0x80..80 marks the lowest such byte exactly (a borrow
 * can only mark bytes above it). */
static const char *field_end(const char *p, const char *e, char d)
{
#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_LITTLE_ENDIAN__
    const uint64_t ones = 0x0101010101010101ull, pat = ones * (unsigned char)d;
    for (; e - p >= 8; p += 8) {
        uint64_t x;
        memcpy(&x, p, sizeof x);
        x ^= pat;
        uint64_t m = (x - ones) & ~x & (ones << 7);
        if (m)
            return p + (__builtin_ctzll(m) >> 3);
    }
#endif
    while (p < e && *p != d)
        p++;
    return p;
}

/* The rows of the lines in [A, Z) (Z[-1] is '\n'), the first on line LINE0, appended to R. */
static void scan(const char *a, const char *z, long line0, const sh_csv_shape *sh,
                 sh_csv_rows *r, part *o)
{
    const char *p = a, *cr = NULL;
    long line = line0;
    int with_time = sh->tcol >= 0;
    o->last_row = 0;
    while (p < z) {
        const char *nl = memchr(p, '\n', (size_t)(z - p));
        const char *e = nl > p && nl[-1] == '\r' ? nl - 1 : nl;
        if (!cr || cr < p) {
            cr = memchr(p, '\r', (size_t)(z - p));
            if (!cr)
                cr = z;
        }
        if (cr < e || e - p > PLAIN_LINE_MAX)
            break;
        if (e > p) {
            double v = 0.0;
            int64_t t = 0;
            int col = 0, missing = 0, bad = 0;
            /* one column: the whole line is the cell (a comma or semicolon in it is no part
             * of a number, so such a line is refused below; a tab could be a blank) */
            int whole = sh->ncols == 1 && sh->delim != '\t';
            for (const char *f = p;; f++) {
                const char *fe = whole ? e : field_end(f, e, sh->delim);
                if (col == sh->vcol) {
                    sh_num_result k = sh_csv_number(f, (size_t)(fe - f), &v);
                    /* an empty cell alone on its line is a blank line to libcsv */
                    if (k == SH_NUM_EMPTY && sh->ncols > 1)
                        missing = 1;
                    else if (k != SH_NUM_OK)
                        bad = 1;
                } else if (col == sh->tcol) {
                    int kind;
                    bad = sh_time_parse(f, (size_t)(fe - f), sh->allow_year, &t, &kind, NULL, 0) !=
                              0 ||
                          kind != sh->tkind;
                }
                col++;
                if (bad || fe == e || col == sh->ncols) {
                    bad = bad || fe != e;
                    break;
                }
                f = fe;
            }
            if (bad || col != sh->ncols || r->n >= sh->max_rows ||
                (with_time && r->n > 0 && t <= r->st[r->n - 1]) ||
                (r->n == r->cap && sh_csv_rows_grow(r, with_time) != 0))
                break;
            r->y[r->n] = missing ? NAN : v;
            r->line[r->n] = line;
            if (with_time)
                r->st[r->n] = t;
            if (missing && r->n_empty++ == 0)
                r->first_empty = line;
            r->n++;
            o->last_row = line;
        }
        line++;
        p = nl + 1;
    }
    o->used = (size_t)(p - a);
    o->lines = line - line0;
    o->stopped = p < z;
}

/* ---- the call --------------------------------------------------------------- */

/* The first quote at or after P before END; searched once per buffer, not once per call. */
static const char *next_quote(sh_csv_fast *f, const char *p, const char *end)
{
    if (!f->quote_from || f->quote_end != end || p < f->quote_from || (f->quote && f->quote < p)) {
        f->quote = memchr(p, '"', (size_t)(end - p));
        f->quote_from = p;
        f->quote_end = end;
    }
    return f->quote;
}

/* Start of the line holding Q (lines start at B or after a '\n'). */
static const char *line_start(const char *b, const char *q)
{
    while (q > b && q[-1] != '\n')
        q--;
    return q;
}

#define PIECES 16 /* most pieces one long stretch is cut into */

typedef struct {
    const char *a, *z;  /* its whole lines */
    long lines;         /* line ends in it */
    size_t base;        /* where its rows are written: rows before it plus its lines */
    sh_csv_rows rows;   /* a window into the rows at BASE */
    part o;
} piece;

static long count_lines(const char *a, const char *z)
{
    long k = 0;
    for (const char *p = a; (p = memchr(p, '\n', (size_t)(z - p))) != NULL; p++)
        k++;
    return k;
}

/* Cut [P, Z) (Z[-1] is '\n', P on line LINE) into pieces at line starts, count their lines,
 * parse each into its own window of ROWS (a row per line at most), then join them in file
 * order: a piece follows the one before if that one reached its end, its first time is
 * after the last one kept and the row limit holds.  Adds what was taken to OUT; returns 1
 * when all of [P, Z) was taken, 0 when it stopped (or could not start: OUT unchanged). */
static int take_cut(const char *p, const char *z, long line, const sh_csv_shape *sh,
                    sh_csv_rows *rows, int threads, sh_csv_taken *out)
{
    piece pc[PIECES];
    size_t span = (size_t)(z - p), piece_min = split_min / 2 ? split_min / 2 : 1;
    int np = span / piece_min < PIECES ? (int)(span / piece_min) : PIECES;
    if (np < 2)
        np = 2;
    int k = 0;
    for (const char *a = p; a < z && k < np; k++) {
        const char *c = k == np - 1 ? z : p + span / (size_t)np * (size_t)(k + 1);
        if (c <= a)
            c = a;
        if (c < z)
            c = (const char *)memchr(c, '\n', (size_t)(z - c)) + 1; /* Z[-1] is '\n' */
        pc[k].a = a;
        pc[k].z = c;
        a = c;
    }
    if (k < 2)
        threads = 1; /* one long line: no team for it */
#pragma omp parallel for num_threads(threads) schedule(dynamic, 1)
    for (int j = 0; j < k; j++)
        pc[j].lines = count_lines(pc[j].a, pc[j].z);
    size_t total = 0;
    for (int j = 0; j < k; j++) {
        pc[j].base = rows->n + total;
        total += (size_t)pc[j].lines;
    }
    int with_time = sh->tcol >= 0;
    if (reserve(rows, rows->n + total, with_time) != 0)
        return 0;
    long before = 0;
    for (int j = 0; j < k; j++) {
        sh_csv_rows *w = &pc[j].rows;
        memset(w, 0, sizeof *w);
        w->y = rows->y + pc[j].base;
        w->line = rows->line + pc[j].base;
        w->st = with_time ? rows->st + pc[j].base : NULL;
        w->cap = (size_t)pc[j].lines;
        w->fixed = 1;
        pc[j].o.lines = before; /* the line of its first byte, until it is parsed */
        before += pc[j].lines;
    }
#pragma omp parallel for num_threads(threads) schedule(dynamic, 1)
    for (int j = 0; j < k; j++) {
        /* the locale is per thread; the caller's is the C locale */
        int helper = omp_get_thread_num() != 0 && sh->loc;
        locale_t old = helper ? uselocale(sh->loc) : (locale_t)0;
        scan(pc[j].a, pc[j].z, line + pc[j].o.lines, sh, &pc[j].rows, &pc[j].o);
        if (helper)
            uselocale(old);
    }
    for (int j = 0; j < k; j++) {
        const sh_csv_rows *w = &pc[j].rows;
        if (w->n > 0) {
            if (rows->n + w->n > sh->max_rows ||
                (with_time && rows->n > 0 && w->st[0] <= rows->st[rows->n - 1]))
                return 0; /* the general reader meets the same row and says why */
            if (pc[j].base != rows->n) {
                /* blank lines before: close the gap */
                memmove(rows->y + rows->n, w->y, w->n * sizeof *w->y);
                memmove(rows->line + rows->n, w->line, w->n * sizeof *w->line);
                if (with_time)
                    memmove(rows->st + rows->n, w->st, w->n * sizeof *w->st);
            }
            if (w->n_empty) {
                if (rows->n_empty == 0)
                    rows->first_empty = w->first_empty;
                rows->n_empty += w->n_empty;
            }
            rows->n += w->n;
            out->last_row = pc[j].o.last_row;
        }
        out->used += pc[j].o.used;
        out->lines += pc[j].o.lines;
        if (pc[j].o.stopped)
            return 0;
    }
    return 1;
}

void sh_csv_fast_take(const char *b, size_t len, long line0, const sh_csv_shape *shape,
                      sh_csv_rows *rows, sh_csv_fast *f, sh_csv_taken *out)
{
    memset(out, 0, sizeof *out);
    if (!fast_enabled || len == 0)
        return;
    size_t n0 = rows->n;
    const char *end = b + len, *z = end;
    while (z > b && z[-1] != '\n')
        z--;
    const char *q = next_quote(f, b, end);
    if (q && q < z)
        z = line_start(b, q);
    int threads = omp_in_parallel() ? 1 : team_size ? team_size : omp_get_max_threads();
    if (z > b && (threads > 1 || team_size > 0) && !f->no_split &&
        (size_t)(z - b) >= split_min) {
        if (!take_cut(b, z, line0, shape, rows, threads, out))
            f->no_split = 1; /* what it parsed past the stop is lost: not again here */
    } else if (z > b) {
        part o;
        /* room for a row a line at once: growing by doubling copies the
         * rows each time (a failure here leaves that to scan) */
        (void)reserve(rows, rows->n + (size_t)count_lines(b, z), shape->tcol >= 0);
        scan(b, z, line0, shape, rows, &o);
        out->used = o.used;
        out->lines = o.lines;
        out->last_row = o.last_row;
    }
    unsigned long long k = rows->n - n0;
#pragma omp atomic
    rows_taken += k;
}
