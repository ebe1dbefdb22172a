/* sh_csv.h - loading one numeric series (and an optional time column) from a CSV file. */
#ifndef SH_CSV_H
#define SH_CSV_H

#include <stddef.h>
#include <stdint.h>

#include "sh_error.h"
#include "sh_time.h"

/* Limits (each refused with a message that names it). */
#define SH_CSV_DEFAULT_MAX_ROWS 10000000u /* data rows, when sh_csv_options.max_rows is 0 */
#define SH_CSV_MAX_LINE 1048576L          /* bytes in one physical line (line end excluded),
                                             and in one quoted field */
#define SH_CSV_MAX_COLUMNS 100000         /* fields in the header row */

/* What to do with empty cells in the value column. */
typedef enum {
    SH_MISSING_REFUSE = 0,  /* error: how many, and where the first one is */
    SH_MISSING_DROP,        /* leave those rows out (their time stamps too) */
    SH_MISSING_PREVIOUS,    /* repeat the last value before; refused if the first value is missing */
    SH_MISSING_INTERPOLATE  /* straight line between the neighbours, in time when there is a
                               time column, else by position; refused at either end */
} sh_missing_policy;

/* How to read the file.  Zero-initialise and set what you need. */
typedef struct {
    const char *column;       /* value column: header name (exact, else the one name equal
                                 ignoring case), or 1-based index as text (a header name
                                 equal to the text wins); NULL = the first column, other than
                                 the time column, index-like columns (named "", t, index,
                                 idx, id, obs, row, rownames) and columns with a time name
                                 (below), whose first data cell is a number */
    const char *time_column;  /* time column: name or index; NULL = automatic: the first
                                 column named date, time, datetime, timestamp, period, day,
                                 week, month, quarter or year (any case) whose first cell is a
                                 time (a bare year counts) or is neither a time nor a number
                                 (so that its bad cell is reported), else the first column
                                 whose first cell is an ISO 8601 date, month, quarter or
                                 date-time; "" = no time column */
    sh_missing_policy missing;
    size_t max_rows;          /* refuse more data rows than this; 0 = SH_CSV_DEFAULT_MAX_ROWS */
} sh_csv_options;

/* A loaded series.  Every pointer is owned by the struct: release with sh_data_free. */
typedef struct {
    char *path;            /* file as given */
    char *column_name;     /* header of the value column */
    int column_index;      /* its 1-based field number */
    size_t n;              /* values kept (after the missing-value policy) */
    double *y;             /* n values, file order; all finite */
    long *line;            /* n physical line numbers (1-based) the values came from */
    int is_constant;       /* 1 when all n values are equal (models will refuse it) */

    int has_time;          /* 1 when a time column was used */
    char *time_name;       /* its header, NULL without one */
    int time_index;        /* its 1-based field number, 0 without one */
    int time_kind;         /* sh_time_kind of its cells */
    int64_t *stamp;        /* n stamps, seconds since 1970-01-01T00:00:00 UTC (see sh_time.h);
                              NULL without a time column; strictly increasing */

    int freq;              /* sh_freq: SH_FREQ_NONE without a time column */
    int season;            /* seasonal period of freq (7, 5, 52, 12, 4, 1, 24; 0 for none) */
    size_t n_gaps;         /* intervals longer than one period */
    size_t n_gap_periods;  /* periods missing in those gaps together */
    char first_gap[160];   /* e.g. "after 2020-01-03 (line 4) next is 2020-01-06 (line 5)",
                              "" when there is no gap */

    size_t n_missing;      /* empty value cells met (filled or dropped by the policy) */
    int missing_policy;    /* the sh_missing_policy used */

    char delimiter;        /* ',', ';' or '\t' */
    int had_bom;           /* 1 when the file started with a UTF-8 byte-order mark */
    int ncols;             /* fields in the header row */
    char **headers;        /* ncols header names (trimmed, quotes removed) */
    size_t n_rows;         /* data rows read (before the missing-value policy) */
} sh_data;

/* Load the value column (and the time column, if any) of the CSV file PATH.
 * OPT may be NULL (all defaults).  The file must start with a header row;
 * the delimiter (comma, semicolon or tab) is the one that occurs most often
 * in the header line outside quotes (ties: comma, then semicolon, then tab);
 * quoted fields, CRLF or LF line ends and a UTF-8 byte-order mark are
 * accepted; blank lines are skipped (so in a one-column file an empty cell
 * must be written "" to count as missing).  Numbers are read in the C locale
 * ('.' as decimal point, optional exponent); NaN/Inf text, values beyond the
 * range of a double, other text and ragged rows are errors.  Time cells must
 * be strictly increasing.
 * Returns HN_OK and fills *OUT (caller frees with sh_data_free), or one of
 * HN_EIO (cannot open or read), HN_EPARSE (bad content), HN_ELIMIT (a limit
 * above), HN_EINVAL (bad options, unknown column), HN_ESHORT (no data rows),
 * HN_ENOMEM; then *OUT is left empty (safe to free) and *ERR, which may be
 * NULL, says where and why. */
int sh_csv_load(const char *path, const sh_csv_options *opt, sh_data *out, sh_error *err);

/* Release everything D owns and zero it.  D may be NULL or already freed. */
void sh_data_free(sh_data *d);

/* Header names of the CSV file PATH (same delimiter, quote and BOM rules as
 * sh_csv_load), e.g. for completing column names.  On success returns HN_OK,
 * stores a malloc'd array of *NCOLS malloc'd strings in *NAMES (free with
 * sh_names_free); otherwise an HN_ code, *NAMES = NULL, *NCOLS = 0 and *ERR
 * (may be NULL) filled. */
int sh_column_names(const char *path, char ***names, int *ncols, sh_error *err);

/* The 1-based field number of the time column that sh_csv_load would take
 * for PATH with options.time_column = TIME_COLUMN (NULL: automatic), 0 for
 * none, judged as the loader judges it: from the header and the first data
 * row only, so without reading the rest of the file.  HN_OK, or an HN_ code
 * with *TIME_INDEX = 0 and *ERR (may be NULL) filled. */
int sh_csv_time_index(const char *path, const char *time_column, int *time_index, sh_error *err);

/* Free an array of N strings from sh_column_names.  NAMES may be NULL. */
void sh_names_free(char **names, int n);

#endif
