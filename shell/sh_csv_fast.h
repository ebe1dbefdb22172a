/* sh_csv_fast.h - the data rows of a plain numeric CSV (no quotes, one delimiter, LF or CRLF
 * line ends) read without libcsv; anything else is left to the general reader (sh_csv.c). */
#ifndef SH_CSV_FAST_H
#define SH_CSV_FAST_H

#include <locale.h>
#include <stddef.h>
#include <stdint.h>

/* Rows kept: growing arrays.  NaN in Y marks an empty value cell. */
typedef struct {
    double *y;
    long *line;         /* physical line of each row */
    int64_t *st;        /* time stamps; NULL without a time column */
    size_t n, cap;
    int fixed;          /* a window into other rows' arrays: never reallocated */
    size_t n_empty;     /* empty value cells among the rows */
    long first_empty;   /* line of the first of them */
} sh_csv_rows;

/* Room for at least one more row (the stamps too when WITH_TIME).  0, or -1 out of memory
 * (ROWS unchanged). */
int sh_csv_rows_grow(sh_csv_rows *rows, int with_time);

void sh_csv_rows_free(sh_csv_rows *rows);

/* What the header row and the first data row fixed. */
typedef struct {
    char delim;
    int ncols;
    int vcol, tcol;     /* 0-based; tcol -1 without a time column */
    int allow_year;     /* as sh_time_parse takes it */
    int tkind;          /* the sh_time_kind every time cell must have */
    size_t max_rows;    /* rows must not grow beyond this */
    locale_t loc;       /* the C locale, for strtod on a helper thread; 0 = leave it */
} sh_csv_shape;

/* State kept between calls on one buffer. */
typedef struct {
    const char *quote;  /* first '"' in [quote_from, quote_end), NULL if none */
    const char *quote_from, *quote_end;
    int no_split;       /* a cut stretch stopped early in this buffer: no more cuts in it */
} sh_csv_fast;

/* Forget what was learnt about the buffer (call when its contents change). */
void sh_csv_fast_reset(sh_csv_fast *f);

void sh_csv_fast_free(sh_csv_fast *f);

/* How far sh_csv_fast_take got. */
typedef struct {
    size_t used;        /* bytes taken: whole lines, each ending in '\n' */
    long lines;         /* line ends among them */
    long last_row;      /* physical line of the last row taken; 0 if none */
} sh_csv_taken;

/* Append to ROWS the rows of the whole lines in the LEN bytes at B (the first on physical
 * line LINE0, at the start of a row; ROWS holds at least the first data row) up to the
 * first line that is not plain: one holding a quote or a lone CR, blanks only, longer
 * than 64 KiB, a field count other than SHAPE->ncols, a value cell neither a number nor
 * empty (or empty in a one-column file), a time cell that does not parse, is of another
 * kind or is not after the one before, or one row beyond the limit.  Blank lines are
 * skipped as libcsv skips them.  It never reports anything: the caller reads what is
 * left with the general reader, whose messages and policies thereby stay the only ones.
 * Long stretches are cut into pieces at line starts, counted and parsed on the OpenMP
 * threads (none inside a parallel region) straight into ROWS, and joined in file order;
 * after a cut stretch stopped early, F keeps the rest of the buffer uncut. */
void sh_csv_fast_take(const char *b, size_t len, long line0, const sh_csv_shape *shape,
                      sh_csv_rows *rows, sh_csv_fast *f, sh_csv_taken *out);

/* For tests and benchmarks: ENABLE 0 leaves every row to the general reader; SPLIT_MIN is
 * the shortest stretch (bytes) cut into pieces (0: the default); THREADS is the team that
 * parses them (0: OpenMP's, and no pieces when that is 1; 1 or more: pieces even on one
 * thread).  Process-wide, not for use while loads run. */
void sh_csv_fast_tune(int enable, size_t split_min, int threads);

/* Rows taken by sh_csv_fast_take so far in this process (tests show that it ran). */
unsigned long long sh_csv_fast_rows_taken(void);

#endif
