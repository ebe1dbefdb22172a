/* sh_csv_fast.c - plain data rows split in place and parsed without copies, two halves on two
 * threads when the stretch is long. */
#include "sh_csv_fast.h"

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
    size_t cap = r->cap ? 2 * r->cap : 4096;
    while (cap < need)
        cap *= 2;
    double *y = realloc(r->y, cap * sizeof *y);
    if (!y)
        return -1;
    r->y = y;
    long *l = realloc(r->line, cap * sizeof *l);
    if (!l)
        return -1;
    r->line = l;
    if (with_time) {
        int64_t *t = realloc(r->st, cap * sizeof *t);
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
    f->npieces = f->next = 0;
    f->quote = f->quote_from = f->quote_end = NULL;
}

void sh_csv_fast_free(sh_csv_fast *f)
{
    for (int k = 0; k < SH_CSV_PIECES; k++)
        sh_csv_rows_free(&f->piece[k].rows);
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

/* Append a piece's rows (lines from OFF) to ROWS; 0, or -1 when they cannot follow (time
 * order, row limit, memory): then the general reader meets the same rows and says why. */
static int join(sh_csv_rows *rows, const sh_csv_rows *side, long off, const sh_csv_shape *sh)
{
    int with_time = sh->tcol >= 0;
    if (side->n == 0)
        return 0;
    if (rows->n + side->n > sh->max_rows ||
        (with_time && rows->n > 0 && side->st[0] <= rows->st[rows->n - 1]) ||
        reserve(rows, rows->n + side->n, with_time) != 0)
        return -1;
    memcpy(rows->y + rows->n, side->y, side->n * sizeof *side->y);
    for (size_t i = 0; i < side->n; i++)
        rows->line[rows->n + i] = side->line[i] + off;
    if (with_time)
        memcpy(rows->st + rows->n, side->st, side->n * sizeof *side->st);
    if (side->n_empty) {
        if (rows->n_empty == 0)
            rows->first_empty = side->first_empty + off;
        rows->n_empty += side->n_empty;
    }
    rows->n += side->n;
    return 0;
}

/* Cut [P, Z) into pieces at line starts and parse them all, on the team's threads. */
static void parse_pieces(sh_csv_fast *f, const char *p, const char *z, int threads,
                         const sh_csv_shape *sh)
{
    size_t span = (size_t)(z - p), piece_min = split_min / 2 ? split_min / 2 : 1;
    int np = span / piece_min < SH_CSV_PIECES ? (int)(span / piece_min) : SH_CSV_PIECES;
    if (np < 2)
        np = 2;
    int k = 0;
    for (const char *a = p; a < z && k < np; k++) {
        const char *c = k == np - 1 ? z : p + span / (size_t)np * (size_t)(k + 1);
        if (c <= a)
            c = a;
        if (c < z) {
            c = memchr(c, '\n', (size_t)(z - c)); /* Z[-1] is '\n' */
            c++;
        }
        f->piece[k].a = a;
        f->piece[k].z = c;
        a = c;
    }
    f->npieces = k;
    f->next = 0;
    if (k < 2)
        threads = 1; /* one long line: no team for it */
#pragma omp parallel for num_threads(threads) schedule(dynamic, 1)
    for (int j = 0; j < k; j++) {
        sh_csv_piece *pc = &f->piece[j];
        part o;
        /* the locale is per thread; the caller's is the C locale */
        int helper = omp_get_thread_num() != 0 && sh->loc;
        locale_t old = helper ? uselocale(sh->loc) : (locale_t)0;
        pc->rows.n = pc->rows.n_empty = 0;
        pc->rows.first_empty = 0;
        scan(pc->a, pc->z, 0, sh, &pc->rows, &o);
        if (helper)
            uselocale(old);
        pc->used = o.used;
        pc->lines = o.lines;
        pc->last_row = o.last_row;
        pc->stopped = o.stopped;
    }
}

void sh_csv_fast_take(const char *b, size_t len, long line0, const sh_csv_shape *shape,
                      sh_csv_rows *rows, sh_csv_fast *f, sh_csv_taken *out)
{
    memset(out, 0, sizeof *out);
    if (!fast_enabled || len == 0)
        return;
    size_t n0 = rows->n;
    const char *end = b + len, *z = end, *p = b;
    while (z > b && z[-1] != '\n')
        z--;
    const char *q = next_quote(f, b, end);
    if (q && q < z)
        z = line_start(b, q);
    int threads = omp_in_parallel() ? 1 : team_size ? team_size : omp_get_max_threads();
    int pieces = threads > 1 || team_size > 0;
    long line = line0;
    part o;
    while (p < z) {
        /* pieces the general reader has read into are of no use */
        while (f->next < f->npieces && f->piece[f->next].a < p)
            f->next++;
        if (f->next == f->npieces) {
            if (pieces && (size_t)(z - p) >= split_min) {
                parse_pieces(f, p, z, threads, shape);
                continue;
            }
            scan(p, z, line, shape, rows, &o);
            p += o.used, line += o.lines;
            if (o.last_row)
                out->last_row = o.last_row;
            break;
        }
        sh_csv_piece *pc = &f->piece[f->next];
        if (pc->a > p) {
            /* up to the next piece: the general reader left a line before it */
            const char *stop = pc->a < z ? pc->a : z;
            scan(p, stop, line, shape, rows, &o);
            p += o.used, line += o.lines;
            if (o.last_row)
                out->last_row = o.last_row;
            if (o.stopped || p == z)
                break;
        }
        if (pc->z > z || join(rows, &pc->rows, line, shape) != 0)
            break;
        f->next++;
        p += pc->used;
        if (pc->rows.n)
            out->last_row = pc->last_row + line;
        line += pc->lines;
        if (pc->stopped)
            break;
    }
    out->used = (size_t)(p - b);
    out->lines = line - line0;
    unsigned long long k = rows->n - n0;
#pragma omp atomic
    rows_taken += k;
}
