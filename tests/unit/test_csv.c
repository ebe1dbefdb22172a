/* test_csv.c - CSV loading: every refusal with its file:line:column, time columns and
 * frequencies, missing-value policies, and the reference files with published values. */
#include "testutil.h"

#include "hn_status.h"
#include "sh_csv.h"
#include "sh_time.h"

#include <locale.h>
#include <sys/stat.h>
#include <unistd.h>

static char tmpdir[256];

static int make_dir(void **state)
{
    (void)state;
    const char *base = getenv("TMPDIR");
    snprintf(tmpdir, sizeof tmpdir, "%s/hone-csv-XXXXXX", base && *base ? base : "/tmp");
    return mkdtemp(tmpdir) ? 0 : -1;
}

static int remove_dir(void **state)
{
    static const char *const names[] = {"bad.csv", "good.csv", "long.csv", "longq.csv",
                                        "locked.csv", "stamps.csv", "names.csv", NULL};
    char path[512];
    (void)state;
    for (int i = 0; names[i]; i++) {
        snprintf(path, sizeof path, "%s/%s", tmpdir, names[i]);
        unlink(path);
    }
    return rmdir(tmpdir);
}

/* Write LEN bytes (strlen when LEN is 0) to TMPDIR/NAME; returns the path (static). */
static const char *write_file(const char *name, const char *text, size_t len)
{
    static char path[512];
    snprintf(path, sizeof path, "%s/%s", tmpdir, name);
    FILE *f = fopen(path, "wb");
    assert_non_null(f);
    if (!len)
        len = strlen(text);
    assert_int_equal(fwrite(text, 1, len, f), len);
    assert_int_equal(fclose(f), 0);
    return path;
}

/* ---- refusals ------------------------------------------------------------
 * Each case: file content, options, the status, the place (line, column;
 * 0 = none) that must follow "PATH:" in the message, and two pieces of text
 * the message must contain.  The rules are the loader's own (sh_csv.h). */
typedef struct {
    const char *label;
    const char *text;
    const char *column, *time_column;
    int missing;
    size_t max_rows;
    int rc;
    long line, col;
    const char *part1, *part2;
} bad_case;

static const bad_case bad_cases[] = {
    {"decimal comma", "date;value\n2020-01-01;1.5\n2020-01-02;1,5\n", NULL, NULL, 0, 0,
     HN_EPARSE, 3, 2, "'1,5'", "decimal comma"},
    {"decimal comma quoted", "t,y\n1,\"2,25\"\n", "y", NULL, 0, 0, HN_EPARSE, 2, 2, "'2,25'",
     "decimal comma"},
    {"nan text", "t,y\n1,2\n2,NaN\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 2, "'NaN'", "finite"},
    {"inf text", "t,y\n1,-inf\n", NULL, NULL, 0, 0, HN_EPARSE, 2, 2, "'-inf'", "finite"},
    {"infinity text", "t,y\n1,3\n2,4\n3,Infinity\n", NULL, NULL, 0, 0, HN_EPARSE, 4, 2,
     "'Infinity'", "finite"},
    {"overflow", "t,y\n1,1e999\n", NULL, NULL, 0, 0, HN_EPARSE, 2, 2, "'1e999'", "range"},
    {"negative overflow", "t,y\n1,2\n2,-2e308\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 2, "'-2e308'",
     "range"},
    {"not a number", "t,y\n1,2\n2,abc\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 2,
     "column 2 'y': 'abc' is not a number", "abc"},
    {"hex is not decimal", "t,y\n1,1\n2,0x10\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 2, "'0x10'",
     "not a number"},
    {"trailing junk", "t,y\n1,2.5kg\n", "y", NULL, 0, 0, HN_EPARSE, 2, 2, "'2.5kg'",
     "not a number"},
    {"empty cells counted", "t,y\n1,1\n2,\n3,3\n4,\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 2,
     "2 empty cells", "first on line 3"},
    {"empty quoted cell", "y,t\n\"\",1\n2,2\n", NULL, NULL, 0, 0, HN_EPARSE, 2, 1,
     "1 empty cell ", "missing-value policy"},
    {"header only", "t,y\n", NULL, NULL, 0, 0, HN_ESHORT, 0, 0, "header row", "no data rows"},
    {"empty file", "", NULL, NULL, 0, 0, HN_EPARSE, 0, 0, "empty", "empty"},
    {"blank lines only", "\n  \n\r\n", NULL, NULL, 0, 0, HN_EPARSE, 0, 0, "empty", "empty"},
    {"unknown column", "t,yield\n1,2\n", "price", NULL, 0, 0, HN_EINVAL, 0, 0,
     "no value column 'price'", "the columns are: t, yield"},
    {"index out of range", "t,y\n1,2\n", "3", NULL, 0, 0, HN_EINVAL, 0, 0, "no value column '3'",
     "t, y"},
    {"ambiguous name", "a,a\n1,2\n", "a", NULL, 0, 0, HN_EINVAL, 0, 0, "ambiguous", "index"},
    {"unknown time column", "t,y\n1,2\n", NULL, "when", 0, 0, HN_EINVAL, 0, 0,
     "no time column 'when'", "t, y"},
    {"same value and time column", "d,y\n2020-01-01,2\n", "d", "d", 0, 0, HN_EINVAL, 0, 0,
     "both column 1", "'d'"},
    {"ragged short", "t,y\n1,2\n3\n4,5\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 0, "1 field ",
     "header row has 2"},
    {"ragged long", "t,y\n1,2\n3,4,5\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 0, "3 fields",
     "header row has 2"},
    {"ragged semicolon", "t;y\n1;2;\n", NULL, NULL, 0, 0, HN_EPARSE, 2, 0, "3 fields",
     "semicolon"},
    {"crlf line numbers", "t,y\r\n1,1\r\n2,2\r\n3,x\r\n", NULL, NULL, 0, 0, HN_EPARSE, 4, 2,
     "'x'", "not a number"},
    {"lone cr line numbers", "t,y\r1,1\r2,x\r", NULL, NULL, 0, 0, HN_EPARSE, 3, 2, "'x'",
     "not a number"},
    {"quoted newline keeps physical lines", "name,y\n\"two\nlines\",1\nc,zz\n", NULL, NULL, 0, 0,
     HN_EPARSE, 4, 2, "'zz'", "column 2 'y'"},
    {"bad cell after blank lines", "t,y\n\n1,1\n\n\n2,?\n", NULL, NULL, 0, 0, HN_EPARSE, 6, 2,
     "'?'", "not a number"},
    {"bom then bad cell", "\xEF\xBB\xBFt,y\n1,q\n", "y", NULL, 0, 0, HN_EPARSE, 2, 2, "'q'",
     "column 2 'y'"},
    {"tab delimited bad cell", "t\ty\n1\t2\n2\tfoo\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 2,
     "'foo'", "not a number"},
    {"control bytes shown", "t,y\n1,a\x01" "b\n", "2", NULL, 0, 0, HN_EPARSE, 2, 2,
     "'a\\x01b'", "not a number"},
    {"no header row", "1,2\n3,4\n", NULL, NULL, 0, 0, HN_EPARSE, 1, 0, "numbers",
     "header row"},
    {"text after closing quote", "t,y\n1,\"2\"x\n", NULL, NULL, 0, 0, HN_EPARSE, 2, 0,
     "malformed quoting", "closing quote"},
    {"quote never closed", "t,y\n1,2\n3,\"4\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 0,
     "never closed", "after line 2"},
    {"quote never closed in the first field", "t,y\n1,2\n\"3,4\n", NULL, NULL, 0, 0, HN_EPARSE, 0,
     0, "never closed", "after line 2"},
    {"no numeric column", "date,name\n2020-01-01,x\n", NULL, NULL, 0, 0, HN_EINVAL, 2, 0,
     "no numeric value column", "date, name"},
    {"bad day", "date,y\n2020-02-28,1\n2020-02-30,2\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 1,
     "'2020-02-30'", "day 30 is out of range for 2020-02"},
    {"bad month", "date,y\n2020-13,1\n", NULL, NULL, 0, 0, HN_EPARSE, 2, 1, "'2020-13'",
     "month 13"},
    {"bad quarter", "quarter,y\n2020-Q5,1\n", NULL, NULL, 0, 0, HN_EPARSE, 2, 1, "'2020-Q5'",
     "quarter 5"},
    {"bad hour", "time,y\n2020-01-01T24:00,1\n", NULL, NULL, 0, 0, HN_EPARSE, 2, 1,
     "'2020-01-01T24:00'", "out of range"},
    {"not iso", "date,y\n01/02/2020,1\n", NULL, NULL, 0, 0, HN_EPARSE, 2, 1, "'01/02/2020'",
     "ISO 8601"},
    {"empty time cell", "date,y\n2020-01-01,1\n,2\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 1,
     "time cell is empty", "'date'"},
    {"mixed time formats", "date,y\n2020-01,1\n2020-02-01,2\n", NULL, NULL, 0, 0, HN_EPARSE, 3,
     1, "'2020-02-01'", "mixed"},
    {"duplicate time", "date,y\n2020-01-01,1\n2020-01-02,2\n2020-01-02,3\n", NULL, NULL, 0, 0,
     HN_EPARSE, 4, 1, "2020-01-02 repeats the time on line 3", "unique"},
    {"unsorted time", "date,y\n2020-01-02,1\n2020-01-01,2\n", NULL, NULL, 0, 0, HN_EPARSE, 3, 1,
     "2020-01-01 comes before the time on line 2", "increasing"},
    {"unsorted with zones", "time,y\n2020-01-01T10:00Z,1\n2020-01-01T11:00+02:00,2\n", NULL,
     NULL, 0, 0, HN_EPARSE, 3, 1, "2020-01-01T09:00:00 comes before", "line 2"},
    {"previous needs a first value", "t,y\n1,\n2,2\n", NULL, NULL, SH_MISSING_PREVIOUS, 0,
     HN_EPARSE, 2, 2, "first value is empty", "previous"},
    {"interpolate needs both ends", "t,y\n1,1\n2,2\n3,\n", NULL, NULL, SH_MISSING_INTERPOLATE, 0,
     HN_EPARSE, 4, 2, "last value is empty", "both sides"},
    {"drop everything", "t,y\n1,\n2,\n", NULL, NULL, SH_MISSING_DROP, 0, HN_ESHORT, 0, 2,
     "every value is empty", "'y'"},
    {"row limit", "t,y\n1,1\n2,2\n3,3\n", NULL, NULL, 0, 2, HN_ELIMIT, 4, 0,
     "more than 2 data rows", "limit"},
    {"bad policy", "t,y\n1,1\n", NULL, NULL, 7, 0, HN_EINVAL, 0, 0, "missing-value policy",
     "7"},
};

static void test_refusals(void **state)
{
    int failures = 0;
    (void)state;
    for (size_t i = 0; i < sizeof bad_cases / sizeof bad_cases[0]; i++) {
        const bad_case *c = &bad_cases[i];
        const char *path = write_file("bad.csv", c->text, 0);
        sh_csv_options o = {c->column, c->time_column, (sh_missing_policy)c->missing, c->max_rows};
        sh_data d;
        sh_error e;
        char where[600];
        int rc = sh_csv_load(path, &o, &d, &e);
        if (c->line > 0 && c->col > 0)
            snprintf(where, sizeof where, "%s:%ld:%ld: ", path, c->line, c->col);
        else if (c->line > 0)
            snprintf(where, sizeof where, "%s:%ld: ", path, c->line);
        else
            snprintf(where, sizeof where, "%s: ", path);
        int ok = rc == c->rc && strncmp(e.message, where, strlen(where)) == 0 &&
                 strstr(e.message, c->part1) && strstr(e.message, c->part2) &&
                 e.line == c->line && e.column == c->col && strcmp(e.file, path) == 0 &&
                 d.y == NULL && d.n == 0;
        if (!ok) {
            print_error("case '%s': rc %d (want %d), line %ld col %ld (want %ld %ld)\n"
                        "  message: %s\n  want prefix '%s' and '%s', '%s'\n",
                        c->label, rc, c->rc, e.line, e.column, c->line, c->col, e.message, where,
                        c->part1, c->part2);
            failures++;
        }
        sh_data_free(&d);
        unlink(path);
    }
    assert_int_equal(failures, 0);
}

static void test_long_line(void **state)
{
    (void)state;
    size_t big = (size_t)SH_CSV_MAX_LINE + 10;
    char *text = malloc(big + 32);
    assert_non_null(text);
    strcpy(text, "t,y\n1,2\n3,");
    size_t k = strlen(text);
    memset(text + k, '7', big);
    memcpy(text + k + big, "\n", 2);
    const char *path = write_file("long.csv", text, 0);
    sh_data d;
    sh_error e;
    int rc = sh_csv_load(path, NULL, &d, &e);
    assert_int_equal(rc, HN_ELIMIT);
    assert_int_equal(e.line, 3);
    assert_non_null(strstr(e.message, ":3: "));
    assert_non_null(strstr(e.message, "longer than 1048576 bytes"));
    unlink(path);

    /* the same length inside one quoted field that spans lines */
    memset(text, 0, big + 32);
    strcpy(text, "t,y\n1,\"");
    k = strlen(text);
    for (size_t i = 0; i < big; i++)
        text[k + i] = i % 1000 == 999 ? '\n' : '8';
    path = write_file("longq.csv", text, 0);
    rc = sh_csv_load(path, NULL, &d, &e);
    assert_int_equal(rc, HN_ELIMIT);
    assert_non_null(strstr(e.message, "quote left open after line 1"));
    unlink(path);
    free(text);
}

static void test_file_errors(void **state)
{
    (void)state;
    sh_data d;
    sh_error e;
    char path[600];

    /* a directory */
    assert_int_equal(sh_csv_load(tmpdir, NULL, &d, &e), HN_EIO);
    assert_non_null(strstr(e.message, "is a directory"));
    assert_int_equal(strncmp(e.message, tmpdir, strlen(tmpdir)), 0);

    /* a file that does not exist */
    snprintf(path, sizeof path, "%s/none.csv", tmpdir);
    assert_int_equal(sh_csv_load(path, NULL, &d, &e), HN_EIO);
    assert_non_null(strstr(e.message, "cannot open"));
    assert_non_null(strstr(e.message, "No such file"));

    /* an unreadable file (root reads everything, so that part is skipped) */
    const char *p = write_file("locked.csv", "t,y\n1,2\n", 0);
    if (geteuid() != 0) {
        assert_int_equal(chmod(p, 0), 0);
        assert_int_equal(sh_csv_load(p, NULL, &d, &e), HN_EIO);
        assert_non_null(strstr(e.message, "cannot open"));
        assert_non_null(strstr(e.message, "Permission denied"));
    } else {
        printf("skip: unreadable-file check (running as root)\n");
    }
    unlink(p);
    assert_int_equal(sh_csv_load(NULL, NULL, &d, &e), HN_EINVAL);
}

/* ---- files that load ------------------------------------------------------ */
typedef struct {
    const char *label;
    const char *text;
    const char *column, *time_column;
    int missing;
    size_t n;
    const char *name;
    double y[6];       /* first min(n, 6) values */
    long line[6];      /* and their physical lines */
    char delim;
    int bom, is_constant;
    size_t n_missing;
    int freq, season;
    size_t n_gaps, n_gap_periods;
    const char *gap;   /* part of first_gap, NULL = must be empty */
} good_case;

static const good_case good_cases[] = {
    {"plain numbers", "t,y\n1,1.5\n2,-2e3\n3,+.5\n4,7.\n", NULL, NULL, 0, 4, "y",
     {1.5, -2000, 0.5, 7}, {2, 3, 4, 5}, ',', 0, 0, 0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"underflow reads as a tiny number", "t,y\n1,1e-400\n2,2\n", NULL, NULL, 0, 2, "y", {0, 2},
     {2, 3}, ',', 0, 0, 0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"semicolon and quotes", "\"name\";\"v\"\n\"a;b\";\"1.25\"\n\"c\";\" 2 \"\n", NULL, NULL, 0, 2,
     "v", {1.25, 2}, {2, 3}, ';', 0, 0, 0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"tab", "id\tx\tz\n1\t3\t4\n2\t5\t6\n", NULL, NULL, 0, 2, "x", {3, 5}, {2, 3}, '\t', 0, 0, 0,
     SH_FREQ_NONE, 0, 0, 0, NULL},
    {"tab with empty first field", "a\tb\n\t1\n\t2\n", "b", NULL, 0, 2, "b", {1, 2}, {2, 3}, '\t',
     0, 0, 0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"bom crlf blank lines no final newline", "\xEF\xBB\xBFy\r\n1\r\n\r\n2\r\n3", NULL, NULL, 0, 3,
     "y", {1, 2, 3}, {2, 4, 5}, ',', 1, 0, 0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"quoted newline", "name,y\n\"a\r\nb\",1\nc,2\n", NULL, NULL, 0, 2, "y", {1, 2}, {2, 4}, ',',
     0, 0, 0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"column by index", "a,b,c\n1,2,3\n4,5,6\n", "3", NULL, 0, 2, "c", {3, 6}, {2, 3}, ',', 0, 0,
     0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"column by name, any case", "a,Yield\n1,2\n4,5\n", "yield", NULL, 0, 2, "Yield", {2, 5},
     {2, 3}, ',', 0, 0, 0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"a name wins over an index", "2,x\n7,8\n", "2", NULL, 0, 1, "2", {7}, {2}, ',', 0, 1, 0,
     SH_FREQ_NONE, 0, 0, 0, NULL},
    {"constant column", "t,y\n1,5\n2,5\n3,5\n", NULL, NULL, 0, 3, "y", {5, 5, 5}, {2, 3, 4}, ',',
     0, 1, 0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"drop", "t,y\n1,1\n2,\n3,3\n", NULL, NULL, SH_MISSING_DROP, 2, "y", {1, 3}, {2, 4}, ',', 0,
     0, 1, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"previous", "t,y\n1,1\n2,\n3,3\n", NULL, NULL, SH_MISSING_PREVIOUS, 3, "y", {1, 1, 3},
     {2, 3, 4}, ',', 0, 0, 1, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"interpolate by position", "t,y\n1,1\n2,\n3,\n4,7\n", NULL, NULL, SH_MISSING_INTERPOLATE, 4,
     "y", {1, 3, 5, 7}, {2, 3, 4, 5}, ',', 0, 0, 2, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"interpolate in time", "date,y\n2024-01-01,0\n2024-01-02,\n2024-01-05,8\n", NULL, NULL,
     SH_MISSING_INTERPOLATE, 3, "y", {0, 2, 8}, {2, 3, 4}, ',', 0, 0, 1, SH_FREQ_DAILY, 7, 1, 2,
     "after 2024-01-02 (line 3) next is 2024-01-05 (line 4)"},
    {"drop leaves a gap", "date,y\n2024-01-01,0\n2024-01-02,\n2024-01-03,8\n2024-01-04,9\n",
     NULL, NULL, SH_MISSING_DROP, 3, "y", {0, 8, 9}, {2, 4, 5}, ',', 0, 0, 1, SH_FREQ_DAILY, 7, 1,
     1,
     "after 2024-01-01 (line 2) next is 2024-01-03 (line 4)"},
    {"daily across a leap day", "date,y\n2024-02-27,1\n2024-02-28,2\n2024-02-29,3\n2024-03-01,4\n",
     NULL, NULL, 0, 4, "y", {1, 2, 3, 4}, {2, 3, 4, 5}, ',', 0, 0, 0, SH_FREQ_DAILY, 7, 0, 0,
     NULL},
    {"daily with a gap", "date,y\n2024-01-01,1\n2024-01-02,2\n2024-01-05,3\n2024-01-06,4\n",
     NULL, NULL, 0, 4, "y", {1, 2, 3, 4}, {2, 3, 4, 5}, ',', 0, 0, 0, SH_FREQ_DAILY, 7, 1, 2,
     "after 2024-01-02 (line 3) next is 2024-01-05 (line 4)"},
    {"business daily", "date,y\n2024-01-04,1\n2024-01-05,2\n2024-01-08,3\n2024-01-09,4\n", NULL,
     NULL, 0, 4, "y", {1, 2, 3, 4}, {2, 3, 4, 5}, ',', 0, 0, 0, SH_FREQ_BUSINESS, 5, 0, 0, NULL},
    {"business daily with a holiday",
     "date,y\n2024-01-04,1\n2024-01-05,2\n2024-01-08,3\n2024-01-10,4\n2024-01-11,5\n", NULL, NULL,
     0, 5, "y", {1, 2, 3, 4, 5}, {2, 3, 4, 5, 6}, ',', 0, 0, 0, SH_FREQ_BUSINESS, 5, 1, 1,
     "after 2024-01-08 (line 4) next is 2024-01-10 (line 5)"},
    {"weekly", "date,y\n2024-01-01,1\n2024-01-08,2\n2024-01-15,3\n2024-01-29,4\n", NULL, NULL, 0,
     4, "y", {1, 2, 3, 4}, {2, 3, 4, 5}, ',', 0, 0, 0, SH_FREQ_WEEKLY, 52, 1, 1,
     "after 2024-01-15"},
    {"monthly YYYY-MM", "month,sales\n2023-11,1\n2023-12,2\n2024-01,3\n2024-02,4\n", NULL, NULL,
     0, 4, "sales", {1, 2, 3, 4}, {2, 3, 4, 5}, ',', 0, 0, 0, SH_FREQ_MONTHLY, 12, 0, 0, NULL},
    {"monthly month ends", "date,y\n2024-01-31,1\n2024-02-29,2\n2024-03-31,3\n2024-04-30,4\n",
     NULL, NULL, 0, 4, "y", {1, 2, 3, 4}, {2, 3, 4, 5}, ',', 0, 0, 0, SH_FREQ_MONTHLY, 12, 0, 0,
     NULL},
    {"monthly with a gap", "d,y\n2023-01-15,1\n2023-02-15,2\n2023-05-15,3\n", NULL, NULL, 0, 3,
     "y", {1, 2, 3}, {2, 3, 4}, ',', 0, 0, 0, SH_FREQ_MONTHLY, 12, 1, 2,
     "after 2023-02-15 (line 3) next is 2023-05-15 (line 4)"},
    {"quarterly YYYY-Qn", "period;value\n2023-Q3;1\n2023-Q4;2\n2024Q1;3\n2024-q2;4\n", NULL, NULL,
     0, 4, "value", {1, 2, 3, 4}, {2, 3, 4, 5}, ';', 0, 0, 0, SH_FREQ_QUARTERLY, 4, 0, 0, NULL},
    {"quarterly dates", "date,y\n2023-01-01,1\n2023-04-01,2\n2023-07-01,3\n", NULL, NULL, 0, 3,
     "y", {1, 2, 3}, {2, 3, 4}, ',', 0, 0, 0, SH_FREQ_QUARTERLY, 4, 0, 0, NULL},
    {"quarterly months", "month,y\n2023-01,1\n2023-04,2\n2023-10,3\n2024-01,4\n", NULL, NULL, 0,
     4, "y", {1, 2, 3, 4}, {2, 3, 4, 5}, ',', 0, 0, 0, SH_FREQ_QUARTERLY, 4, 1, 1,
     "after 2023-04 (line 3) next is 2023-10 (line 4)"},
    {"yearly named column", "year,y\n1990,1\n1991,2\n1992,3\n", NULL, NULL, 0, 3, "y", {1, 2, 3},
     {2, 3, 4}, ',', 0, 0, 0, SH_FREQ_YEARLY, 1, 0, 0, NULL},
    {"yearly as dates", "date,y\n1990-01-01,1\n1991-01-01,2\n1993-01-01,3\n", NULL, NULL, 0, 3,
     "y", {1, 2, 3}, {2, 3, 4}, ',', 0, 0, 0, SH_FREQ_YEARLY, 1, 1, 1, "after 1991-01-01"},
    {"hourly date-times", "ts,y\n2024-01-01T00:00Z,1\n2024-01-01T01:00:00Z,2\n2024-01-01 02:00,3\n",
     NULL, NULL, 0, 3, "y", {1, 2, 3}, {2, 3, 4}, ',', 0, 0, 0, SH_FREQ_HOURLY, 24, 0, 0, NULL},
    {"daily date-times at one hour", "ts,y\n2024-01-01T09:30,1\n2024-01-02T09:30,2\n", NULL, NULL,
     0, 2, "y", {1, 2}, {2, 3}, ',', 0, 0, 0, SH_FREQ_DAILY, 7, 0, 0, NULL},
    {"irregular", "date,y\n2024-01-01,1\n2024-01-03,2\n2024-01-10,3\n2024-01-11,4\n2024-02-20,5\n",
     NULL, NULL, 0, 5, "y", {1, 2, 3, 4, 5}, {2, 3, 4, 5, 6}, ',', 0, 0, 0, SH_FREQ_IRREGULAR, 0,
     0, 0, NULL},
    {"time column switched off", "date,y\n2024-01-01,1\n2024-01-01,2\n", NULL, "", 0, 2, "y",
     {1, 2}, {2, 3}, ',', 0, 0, 0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"numeric time-named column is no time", "rownames,time,value\n1,1,0.5\n2,2,0.25\n", NULL,
     NULL, 0, 2, "value", {0.5, 0.25}, {2, 3}, ',', 0, 0, 0, SH_FREQ_NONE, 0, 0, 0, NULL},
    {"time found by content", "when,y\n2024-01-01,1\n2024-01-02,2\n", NULL, NULL, 0, 2, "y",
     {1, 2}, {2, 3}, ',', 0, 0, 0, SH_FREQ_DAILY, 7, 0, 0, NULL},
    {"explicit year column", "yr,y\n2001,1\n2002,2\n", "y", "yr", 0, 2, "y", {1, 2}, {2, 3}, ',',
     0, 0, 0, SH_FREQ_YEARLY, 1, 0, 0, NULL},
};

static void test_loads(void **state)
{
    int failures = 0;
    (void)state;
    for (size_t i = 0; i < sizeof good_cases / sizeof good_cases[0]; i++) {
        const good_case *c = &good_cases[i];
        const char *path = write_file("good.csv", c->text, 0);
        sh_csv_options o = {c->column, c->time_column, (sh_missing_policy)c->missing, 0};
        sh_data d;
        sh_error e;
        int rc = sh_csv_load(path, &o, &d, &e);
        if (rc != HN_OK) {
            print_error("case '%s': rc %d: %s\n", c->label, rc, e.message);
            failures++;
            unlink(path);
            continue;
        }
        int ok = d.n == c->n && strcmp(d.column_name, c->name) == 0 && d.delimiter == c->delim &&
                 d.had_bom == c->bom && d.is_constant == c->is_constant &&
                 d.n_missing == c->n_missing && d.freq == c->freq && d.season == c->season &&
                 d.n_gaps == c->n_gaps && d.n_gap_periods == c->n_gap_periods &&
                 (c->gap ? strstr(d.first_gap, c->gap) != NULL : d.first_gap[0] == '\0') &&
                 (d.has_time == (d.stamp != NULL)) && strcmp(d.path, path) == 0;
        for (size_t j = 0; j < c->n && j < 6; j++)
            if (d.y[j] != c->y[j] && !(fabs(d.y[j] - c->y[j]) <= 1e-300))
                ok = 0;
            else if (d.line[j] != c->line[j])
                ok = 0;
        if (!ok) {
            print_error("case '%s': n %zu col '%s' delim '%c' bom %d const %d missing %zu "
                        "freq %s season %d gaps %zu/%zu '%s'\n",
                        c->label, d.n, d.column_name, d.delimiter, d.had_bom, d.is_constant,
                        d.n_missing, sh_freq_name(d.freq), d.season, d.n_gaps, d.n_gap_periods,
                        d.first_gap);
            for (size_t j = 0; j < d.n && j < 6; j++)
                print_error("  y[%zu] = %.17g line %ld\n", j, d.y[j], d.line[j]);
            failures++;
        }
        sh_data_free(&d);
        sh_data_free(&d); /* a second free is harmless */
        unlink(path);
    }
    assert_int_equal(failures, 0);
}

static void test_time_stamps(void **state)
{
    (void)state;
    const char *path = write_file("stamps.csv",
                                  "date,y\n1969-12-31,1\n1970-01-01,2\n2000-02-29,3\n2024-01-01,4\n",
                                  0);
    sh_data d;
    sh_error e;
    assert_int_equal(sh_csv_load(path, NULL, &d, &e), HN_OK);
    assert_int_equal(d.has_time, 1);
    assert_string_equal(d.time_name, "date");
    assert_int_equal(d.time_index, 1);
    assert_int_equal(d.time_kind, SH_TIME_DATE);
    /* seconds since the epoch from Python 3.11.2 (Debian) calendar.timegm */
    assert_true(d.stamp[0] == -86400);
    assert_true(d.stamp[1] == 0);
    assert_true(d.stamp[2] == 951782400);
    assert_true(d.stamp[3] == 1704067200);
    assert_int_equal(d.freq, SH_FREQ_IRREGULAR);
    assert_int_equal(d.ncols, 2);
    assert_string_equal(d.headers[0], "date");
    assert_string_equal(d.headers[1], "y");
    sh_data_free(&d);
    unlink(path);
}

static void test_column_names(void **state)
{
    (void)state;
    const char *path = write_file("names.csv", "\xEF\xBB\xBF\"a;b\";c ; \"d\"\"q\"\n1;2;3\n", 0);
    char **names;
    int n;
    sh_error e;
    assert_int_equal(sh_column_names(path, &names, &n, &e), HN_OK);
    assert_int_equal(n, 3);
    assert_string_equal(names[0], "a;b");
    assert_string_equal(names[1], "c");
    assert_string_equal(names[2], "d\"q");
    sh_names_free(names, n);
    unlink(path);
    assert_int_equal(sh_column_names(tmpdir, &names, &n, &e), HN_EIO);
    assert_null(names);
    assert_int_equal(n, 0);
}

/* sh_csv_time_index names the time column sh_csv_load takes, from the first
 * data row alone: the same field on files the loader reads, and the field
 * still when a later row would stop the loader. */
static void test_time_index(void **state)
{
    (void)state;
    static const struct {
        const char *text, *time;
        int want;
    } cases[] = {
        { "y,date\n1,2024-01-01\n2,2024-01-02\n", NULL, 2 },
        { "id,when,y\n1,2024-01,3\n2,2024-02,4\n", NULL, 2 },
        { "a,b\n1,2\n3,4\n", NULL, 0 },
        { "year,y\n2001,1\n2002,2\n", NULL, 1 },
        { "year,y\n2001,1\n2002,2\n", "", 0 },
        { "y,stamp\n1,x\n2,y\n", "stamp", 2 },
        { "q;v\n2020-Q1;1,5\n", NULL, 1 },
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        const char *path = write_file("tix.csv", cases[i].text, 0);
        int ti = -1;
        sh_error e;
        assert_int_equal(sh_csv_time_index(path, cases[i].time, &ti, &e), HN_OK);
        assert_int_equal(ti, cases[i].want);
        sh_csv_options o;
        memset(&o, 0, sizeof o);
        o.time_column = cases[i].time;
        sh_data d;
        if (sh_csv_load(path, &o, &d, &e) == HN_OK)
            assert_int_equal(d.time_index, ti);
        sh_data_free(&d);
        unlink(path);
    }
    /* a bad cell far down stops the loader, not the time column's choice */
    const char *path = write_file("tix.csv", "date,y\n2024-01-01,1\n2024-01-02,zz\n", 0);
    int ti = -1;
    sh_error e;
    assert_int_equal(sh_csv_time_index(path, NULL, &ti, &e), HN_OK);
    assert_int_equal(ti, 1);
    unlink(path);
    path = write_file("tix.csv", "date,y\n", 0);
    assert_int_equal(sh_csv_time_index(path, NULL, &ti, &e), HN_EPARSE);
    assert_int_equal(ti, 0);
    unlink(path);
    assert_int_equal(sh_csv_time_index("/nonexistent/x.csv", NULL, &ti, &e), HN_EIO);
}

/* Numbers read by the loader equal glibc's strtod (Debian glibc 2.36, C locale) bit for
 * bit, over many written forms: the loader's fast path and its fallback both. */
static void test_numbers_match_strtod(void **state)
{
    (void)state;
    enum { N = 20000 };
    static const char *const fixed[] = {
        "0", "-0", "+0.0", "007.50", "+.5", "5.", "1e22", "1e23", "-1e-22", "9007199254740992",
        "9007199254740993", "9007199254740995", "123456789012345678901234567890", "0.1e-5",
        "4.9e-324", "2.2250738585072011e-308", "1.7976931348623157e308", "0.000000000000000000001",
        "1234567890123456789", "12345678901234567890", "0.30000000000000004", "1E+2", "2e0",
        "100000000000000000000000", "1.00000000000000000000000001", "3.14159265358979323846",
        NULL};
    char **text = calloc(N, sizeof *text);
    char *buf = malloc((size_t)N * 48 + 16);
    assert_non_null(text);
    assert_non_null(buf);
    size_t o = (size_t)sprintf(buf, "t,y\n");
    unsigned long long r = 88172645463325252ull;
    int k = 0;
    for (; fixed[k]; k++) {
        text[k] = strdup(fixed[k]);
        assert_non_null(text[k]);
    }
    for (int i = k; i < N; i++) {
        char t[48];
        r ^= r << 13, r ^= r >> 7, r ^= r << 17; /* xorshift64 */
        double mag = (double)(r >> 11) / 9007199254740992.0;
        int ex = (int)(r % 61) - 30, form = (int)((r >> 8) % 5), prec = 1 + (int)((r >> 16) % 17);
        double x = (mag - 0.5) * pow(10.0, ex);
        switch (form) {
        case 0: snprintf(t, sizeof t, "%.*g", prec, x); break;
        case 1: snprintf(t, sizeof t, "%.*e", prec - 1, x); break;
        case 2: snprintf(t, sizeof t, "%.*f", prec % 11, x * 1e-25 > 1 ? 1.0 : x); break;
        case 3: snprintf(t, sizeof t, "%lld", (long long)(r >> (r % 40))); break;
        default: snprintf(t, sizeof t, "%.17g", x); break;
        }
        text[i] = strdup(t);
        assert_non_null(text[i]);
    }
    for (int i = 0; i < N; i++)
        o += (size_t)sprintf(buf + o, "%d,%s\n", i, text[i]);
    const char *path = write_file("good.csv", buf, o);
    sh_csv_options opt = {"y", NULL, SH_MISSING_REFUSE, 0};
    sh_data d;
    sh_error e;
    int rc = sh_csv_load(path, &opt, &d, &e);
    if (rc != HN_OK)
        print_error("%s\n", e.message);
    assert_int_equal(rc, HN_OK);
    assert_int_equal(d.n, N);
    int bad = 0;
    for (int i = 0; i < N; i++) {
        double want = strtod(text[i], NULL);
        if (memcmp(&want, &d.y[i], sizeof want) != 0 && bad++ < 10)
            print_error("'%s': %.17g, strtod %.17g\n", text[i], d.y[i], want);
    }
    assert_int_equal(bad, 0);
    assert_true(signbit(d.y[1])); /* "-0" keeps its sign */
    for (int i = 0; i < N; i++)
        free(text[i]);
    free(text);
    free(buf);
    sh_data_free(&d);
    unlink(path);
}

/* Under a locale whose decimal point is a comma the loader still reads '.' numbers
 * (the C-locale rule of sh_csv.h); skipped when no such locale is installed. */
static void test_locale_independent(void **state)
{
    (void)state;
    static const char *const names[] = {"de_DE.UTF-8", "de_DE.utf8", "fr_FR.UTF-8", "nl_NL.UTF-8",
                                        "de_DE", NULL};
    const char *got = NULL;
    for (int i = 0; names[i] && !got; i++)
        if (setlocale(LC_NUMERIC, names[i]) && localeconv()->decimal_point[0] == ',')
            got = names[i];
    if (!got) {
        setlocale(LC_NUMERIC, "C");
        printf("skip: no locale with a decimal comma is installed\n");
        skip();
    }
    const char *path = write_file("good.csv", "t,y\n1,1.5\n2,-0.25e1\n", 0);
    sh_data d;
    sh_error e;
    int rc = sh_csv_load(path, NULL, &d, &e);
    setlocale(LC_NUMERIC, "C");
    assert_int_equal(rc, HN_OK);
    assert_true(d.y[0] == 1.5 && d.y[1] == -2.5);
    sh_data_free(&d);
    unlink(path);
}

/* ---- reference files ------------------------------------------------------ */

static void test_series_f(void **state)
{
    (void)state;
    TU_NEED_REF(ref);
    char path[4096];
    snprintf(path, sizeof path, "%s/box-jenkins-series-f/series_f.csv", ref);
    sh_csv_options o = {"yield", NULL, SH_MISSING_REFUSE, 0};
    sh_data d;
    sh_error e;
    int rc = sh_csv_load(path, &o, &d, &e);
    if (rc != HN_OK)
        print_error("%s\n", e.message);
    assert_int_equal(rc, HN_OK);
    /* Box & Jenkins Series F: 70 yields (NIST F_SERIES.DAT header; SOURCE.md), first 47 64 23 */
    assert_int_equal(d.n, 70);
    assert_true(d.y[0] == 47 && d.y[1] == 64 && d.y[2] == 23);
    assert_int_equal(d.column_index, 2);
    assert_int_equal(d.has_time, 0);
    /* mean 51.128571... (SOURCE.md recomputation, = 3579/70) and variance (n-1)
     * 141.8238 printed on the older e-Handbook page pmc449.htm */
    double s = 0, ss = 0;
    for (size_t i = 0; i < d.n; i++)
        s += d.y[i];
    double m = s / 70.0;
    for (size_t i = 0; i < d.n; i++)
        ss += (d.y[i] - m) * (d.y[i] - m);
    TU_NEAR(m, 3579.0 / 70.0, 1e-15);
    TU_NEAR(ss / 69.0, 141.8238, 1e-6);
    /* the same values as an independent line reader (testutil.h) gives */
    double *v;
    size_t nv = tu_read_column(path, 1, &v);
    assert_int_equal(nv, 70);
    for (size_t i = 0; i < nv; i++)
        assert_true(d.y[i] == v[i]);
    free(v);
    sh_data_free(&d);
}

static void test_dmbp(void **state)
{
    (void)state;
    TU_NEED_REF(ref);
    char path[4096];
    /* DM/BP daily returns, Bollerslev & Ghysels (1996): n 1974, first 0.12533286
     * 0.028874268 0.063461772, last -0.11754582 -0.23127105 0.52804687 (SOURCE.md) */
    static const char *const files[2] = {"dmbp_returns.csv", "MarkPound.csv"};
    static const char *const cols[2] = {"return_pct", NULL};
    for (int f = 0; f < 2; f++) {
        snprintf(path, sizeof path, "%s/bollerslev-ghysels-dmbp/%s", ref, files[f]);
        sh_csv_options o = {cols[f], NULL, SH_MISSING_REFUSE, 0};
        sh_data d;
        sh_error e;
        int rc = sh_csv_load(path, &o, &d, &e);
        if (rc != HN_OK)
            print_error("%s\n", e.message);
        assert_int_equal(rc, HN_OK);
        assert_int_equal(d.n, 1974);
        assert_string_equal(d.column_name, f == 0 ? "return_pct" : "value");
        assert_true(d.y[0] == 0.12533286);
        assert_true(d.y[1] == 0.028874268);
        assert_true(d.y[2] == 0.063461772);
        assert_true(d.y[1971] == -0.11754582);
        assert_true(d.y[1972] == -0.23127105);
        assert_true(d.y[1973] == 0.52804687);
        assert_int_equal(d.line[1973], 1975);
        assert_int_equal(d.is_constant, 0);
        sh_data_free(&d);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_refusals),   cmocka_unit_test(test_long_line),
        cmocka_unit_test(test_file_errors), cmocka_unit_test(test_loads),
        cmocka_unit_test(test_time_stamps), cmocka_unit_test(test_column_names),
        cmocka_unit_test(test_time_index),
        cmocka_unit_test(test_numbers_match_strtod), cmocka_unit_test(test_locale_independent),
        cmocka_unit_test(test_series_f),   cmocka_unit_test(test_dmbp),
    };
    return cmocka_run_group_tests(tests, make_dir, remove_dir);
}
