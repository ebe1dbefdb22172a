/* test_csv_fast.c - the loader's plain-row path (sh_csv_fast.c) against libcsv alone: the same
 * sh_data bit for bit, or the same status and message, on files of many shapes, with the
 * stretches cut into pieces at every place. */
#include "testutil.h"

#include "hn_status.h"
#include "sh_csv.h"
#include "sh_csv_fast.h"

#include <unistd.h>

static char path[512];

static int make_file(void **state)
{
    (void)state;
    const char *base = getenv("TMPDIR");
    snprintf(path, sizeof path, "%s/hone-csv-fast-XXXXXX", base && *base ? base : "/tmp");
    int fd = mkstemp(path);
    if (fd < 0)
        return -1;
    close(fd);
    return 0;
}

static int remove_file(void **state)
{
    (void)state;
    sh_csv_fast_tune(1, 0, 0);
    return unlink(path);
}

/* ---- text ------------------------------------------------------------------ */

typedef struct {
    char *s;
    size_t n, cap;
} text;

static void add(text *t, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

static void add(text *t, const char *fmt, ...)
{
    va_list ap;
    for (;;) {
        va_start(ap, fmt);
        int k = vsnprintf(t->s ? t->s + t->n : NULL, t->s ? t->cap - t->n : 0, fmt, ap);
        va_end(ap);
        assert_true(k >= 0);
        if (t->s && t->n + (size_t)k < t->cap) {
            t->n += (size_t)k;
            return;
        }
        t->cap = 2 * (t->cap + (size_t)k + 64);
        t->s = realloc(t->s, t->cap);
        assert_non_null(t->s);
    }
}

static unsigned long long rng = 0x9E3779B97F4A7C15ull;

static unsigned long long next(void)
{
    rng ^= rng << 13, rng ^= rng >> 7, rng ^= rng << 17; /* xorshift64 */
    return rng;
}

/* A value cell: mostly 17 significant digits as printed doubles carry, sometimes other forms. */
static void add_value(text *t)
{
    unsigned long long r = next();
    double x = ((double)(r >> 11) / 9007199254740992.0 - 0.5) * 20.0;
    switch (r % 8) {
    case 0: add(t, "%.6f", x); break;
    case 1: add(t, "%.3e", x * 1e5); break;
    case 2: add(t, "%d", (int)(r % 1000) - 500); break;
    case 3: add(t, " %.17g ", x + 1e6); break;
    default: add(t, "%.17g", x); break;
    }
}

/* ---- comparison ------------------------------------------------------------ */

static void same_data(const sh_data *a, const sh_data *b)
{
    assert_string_equal(a->path, b->path);
    assert_string_equal(a->column_name, b->column_name);
    assert_int_equal(a->column_index, b->column_index);
    assert_int_equal(a->n, b->n);
    assert_memory_equal(a->y, b->y, a->n * sizeof *a->y);
    assert_memory_equal(a->line, b->line, a->n * sizeof *a->line);
    assert_int_equal(a->is_constant, b->is_constant);
    assert_int_equal(a->has_time, b->has_time);
    if (a->has_time) {
        assert_string_equal(a->time_name, b->time_name);
        assert_memory_equal(a->stamp, b->stamp, a->n * sizeof *a->stamp);
    } else {
        assert_null(b->stamp);
    }
    assert_int_equal(a->time_index, b->time_index);
    assert_int_equal(a->time_kind, b->time_kind);
    assert_int_equal(a->freq, b->freq);
    assert_int_equal(a->season, b->season);
    assert_int_equal(a->n_gaps, b->n_gaps);
    assert_int_equal(a->n_gap_periods, b->n_gap_periods);
    assert_string_equal(a->first_gap, b->first_gap);
    assert_int_equal(a->n_missing, b->n_missing);
    assert_int_equal(a->missing_policy, b->missing_policy);
    assert_int_equal(a->delimiter, b->delimiter);
    assert_int_equal(a->had_bom, b->had_bom);
    assert_int_equal(a->ncols, b->ncols);
    for (int j = 0; j < a->ncols; j++)
        assert_string_equal(a->headers[j], b->headers[j]);
    assert_int_equal(a->n_rows, b->n_rows);
}

static int loads_ok, loads_refused;

/* Load T with libcsv alone and with the plain-row path, its stretches cut into pieces of
 * about SPLIT / 2 bytes (0: the default cut, on OpenMP's threads; otherwise parsed one after
 * the other, which follows the same path but for the threads); both must agree. */
static unsigned long long compare_on(const text *t, const sh_csv_options *o, size_t split,
                                     int threads)
{
    FILE *f = fopen(path, "wb");
    assert_non_null(f);
    assert_int_equal(fwrite(t->s, 1, t->n, f), t->n);
    assert_int_equal(fclose(f), 0);
    sh_data a, b;
    sh_error ea, eb;
    sh_csv_fast_tune(0, 0, 0);
    int ra = sh_csv_load(path, o, &a, &ea);
    sh_csv_fast_tune(1, split, split ? threads : 0);
    unsigned long long taken = sh_csv_fast_rows_taken();
    int rb = sh_csv_load(path, o, &b, &eb);
    taken = sh_csv_fast_rows_taken() - taken;
    sh_csv_fast_tune(1, 0, 0);
    if (ra != rb || (ra != HN_OK && strcmp(ea.message, eb.message) != 0)) {
        print_error("libcsv: %d %s\nplain:  %d %s\n", ra, ra ? ea.message : "",
                    rb, rb ? eb.message : "");
        fail();
    }
    if (ra == HN_OK) {
        same_data(&a, &b);
        loads_ok++;
    } else {
        loads_refused++;
    }
    sh_data_free(&a);
    sh_data_free(&b);
    return taken;
}

static unsigned long long compare(const text *t, const sh_csv_options *o, size_t split)
{
    return compare_on(t, o, split, 1);
}

/* ---- shapes ---------------------------------------------------------------- */

enum { ENDS_LF, ENDS_CRLF };

/* One column "value", N rows, line ends E, the last line end dropped when OPEN, BLANK
 * blank lines after the last row. */
static void one_column(text *t, int n, int e, int open, int blank)
{
    const char *nl = e == ENDS_CRLF ? "\r\n" : "\n";
    t->n = 0;
    add(t, "value%s", nl);
    for (int i = 0; i < n; i++) {
        add_value(t);
        if (i + 1 < n || !open || blank)
            add(t, "%s", nl);
    }
    for (int i = 0; i < blank; i++)
        add(t, "%s", i + 1 < blank || !open ? nl : "");
}

/* A date column and COLS value columns, N daily rows from 1999-12-30. */
static void dated(text *t, int n, int cols, char delim, const char *nl)
{
    t->n = 0;
    add(t, "date");
    for (int c = 0; c < cols; c++)
        add(t, "%cx%d", delim, c + 1);
    add(t, "%s", nl);
    for (int i = 0; i < n; i++) {
        long y;
        int m, d;
        sh_civil_from_days(10955 + i, &y, &m, &d);
        add(t, "%04ld-%02d-%02d", y, m, d);
        for (int c = 0; c < cols; c++) {
            add(t, "%c", delim);
            add_value(t);
        }
        add(t, "%s", nl);
    }
}

/* Offset of the start of line K + 1 of T (after K line feeds). */
static size_t line_at(const text *t, int k)
{
    size_t o = 0;
    for (int i = 0; i < k && o < t->n; o++)
        if (t->s[o] == '\n')
            i++;
    return o;
}

/* T with line K (1-based) replaced by LINE (its line end kept). */
static void replace_line(const text *src, int k, const char *line, text *out)
{
    size_t a = line_at(src, k - 1), z = a;
    while (z < src->n && src->s[z] != '\n' && src->s[z] != '\r')
        z++;
    out->n = 0;
    add(out, "%.*s%s%.*s", (int)a, src->s, line, (int)(src->n - z), src->s + z);
}

/* ---- tests ------------------------------------------------------------------ */

/* Line ends, last lines, blank lines: every combination, cut everywhere. */
static void test_line_ends(void **state)
{
    (void)state;
    text t = {0};
    sh_csv_options o = {0};
    static const size_t splits[] = {0, 1, 17};
    for (int e = ENDS_LF; e <= ENDS_CRLF; e++)
        for (int open = 0; open < 2; open++)
            for (int blank = 0; blank < 3; blank++)
                for (int n = 1; n <= 9; n += 4)
                    for (size_t s = 0; s < sizeof splits / sizeof *splits; s++) {
                        one_column(&t, n, e, open, blank);
                        /* all but the first row (libcsv chooses the column from it) and
                         * a last one without a line end */
                        assert_int_equal(compare(&t, &o, splits[s]), n > 1 ? n - 1 - (open && !blank) : 0);
                    }
    free(t.s);
}

/* Odd lines put at every row of a short file, with pieces of every size: each is read by
 * libcsv from there on, or read plain when it is plain after all. */
static void test_odd_line_everywhere(void **state)
{
    (void)state;
    /* @: the date the row had */
    static const char *const odd[] = {
        "",                   /* blank line */
        "   ",                /* blanks only: a blank line to libcsv */
        "@,,1",              /* empty value */
        "@, ,1",             /* blank value */
        "@,\"1.5\",1",       /* quoted cell */
        "\"@\",1.5,1",       /* quoted time */
        "@,1.5",             /* short row */
        "@,1.5,1,",          /* long row */
        "@,abc,1",           /* text */
        "@,1,5,1",           /* decimal comma read as a field */
        "@,nan,1",
        "@,1e999,1",
        "@,4.9e-325,1",      /* underflow to zero */
        " @ , -1.5e-3 ,\t1 ", /* blanks around cells */
        "1999-01-01,1,1",     /* time goes back */
        "2000-01,2,1",        /* another time form */
        "@-01,2,1",          /* not a time */
        ",2,1",               /* empty time */
        "@,1,\"a\rb\"",      /* quoted CR */
        "@,1,a\rb",          /* lone CR */
        "@,1,\"a\nb\"",      /* quoted line break */
        "@,1,\"open",        /* quote never closed */
        NULL};
    text base = {0}, t = {0};
    sh_csv_options o = {0};
    static const size_t splits[] = {1, 0, 40};
    for (int miss = SH_MISSING_REFUSE; miss <= SH_MISSING_INTERPOLATE; miss++) {
        o.missing = (sh_missing_policy)miss;
        for (int k = 0; odd[k]; k++)
            for (int row = 2; row <= 12; row++)
                for (size_t s = 0; s < (miss == SH_MISSING_REFUSE ? 3u : 1u); s++) {
                    char date[16], line[64];
                    long y;
                    int m, d;
                    sh_civil_from_days(10955 + row - 1, &y, &m, &d);
                    snprintf(date, sizeof date, "%04ld-%02d-%02d", y, m, d);
                    size_t w = 0;
                    for (const char *c = odd[k]; *c && w + 12 < sizeof line; c++)
                        if (*c == '@')
                            w += (size_t)snprintf(line + w, sizeof line - w, "%s", date);
                        else
                            line[w++] = *c;
                    line[w] = '\0';
                    dated(&base, 12, 2, ',', miss & 1 ? "\r\n" : "\n");
                    replace_line(&base, row + 1, line, &t);
                    /* at least the plain rows before it are read plain */
                    assert_true(compare_on(&t, &o, splits[s], s == 2 && row % 5 == 0 ? 2 : 1) >=
                                (unsigned long long)row - 2);
                }
    }
    free(base.s);
    free(t.s);
}

/* Time columns of every kind, named or found, several delimiters, a BOM, the row limit. */
static void test_shapes(void **state)
{
    (void)state;
    text t = {0};
    static const char *const times[] = {"2001-03", "2001-Q2", "2001-03-04T05:06:07",
                                        "2001-03-04 05:06", "2001", NULL};
    static const char delims[] = {',', ';', '\t'};
    for (int d = 0; d < 3; d++)
        for (int k = 0; times[k]; k++)
            for (int n = 2; n < 30; n += 9) {
                t.n = 0;
                add(&t, "%sid%cwhen%cy%cz\n", d == 1 ? "\xEF\xBB\xBF" : "", delims[d], delims[d],
                    delims[d]);
                for (int i = 0; i < n; i++) {
                    /* increasing times of the same form: bump the year */
                    add(&t, "%d%c%04d%s%c", i, delims[d], 2001 + i, times[k] + 4, delims[d]);
                    add_value(&t);
                    add(&t, "%c%d\n", delims[d], i % 3);
                }
                sh_csv_options o = {NULL, "when", SH_MISSING_REFUSE, 0};
                compare(&t, &o, 1);
                o.column = "z";
                compare(&t, &o, 0);
                o.time_column = NULL;
                compare(&t, &o, 3);
                o.time_column = "";
                o.max_rows = (size_t)n / 2;
                compare(&t, &o, 1);
                o.max_rows = (size_t)n;
                compare(&t, &o, 2);
            }
    free(t.s);
}

/* Long files: the default cut into pieces on threads, an odd line near each cut. */
static void test_long_files(void **state)
{
    (void)state;
    text base = {0}, t = {0};
    sh_csv_options o = {0};
    dated(&base, 60000, 4, ',', "\n");
    assert_true(base.n > (1u << 18));
    assert_int_equal(compare(&base, &o, 0), 59999);
    assert_int_equal(compare_on(&base, &o, 1u << 16, 2), 59999);
    static const char *const odd[] = {"", "2009-12-31,1,2,3,4", "2000-01-05,1,\"2\",3,4",
                                      "   ", NULL};
    for (int k = 0; odd[k]; k++)
        for (int at = 1; at <= 5; at++) {
            /* near a sixteenth, a quarter, the middle... of the file */
            int row = 60000 / (at == 5 ? 3 : 1 << at) + k;
            replace_line(&base, row + 1, odd[k], &t);
            assert_true(compare(&t, &o, 0) >= (unsigned long long)row - 2);
            assert_true(compare_on(&t, &o, 4096, 2) >= (unsigned long long)row - 2);
        }
    one_column(&t, 300000, ENDS_CRLF, 1, 0);
    assert_int_equal(compare(&t, &o, 0), 299998);
    free(base.s);
    free(t.s);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_line_ends),
        cmocka_unit_test(test_odd_line_everywhere),
        cmocka_unit_test(test_shapes),
        cmocka_unit_test(test_long_files),
    };
    int rc = cmocka_run_group_tests(tests, make_file, remove_file);
    printf("test_csv_fast: %d loads compared, %d refused alike\n", loads_ok + loads_refused,
           loads_refused);
    return rc;
}
