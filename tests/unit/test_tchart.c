/* test_tchart.c - terminal charts: exact small outputs, sizes, gaps, empty input, colour.
 * The text layouts are the project's own; the QQ quantiles are checked
 * against scipy 1.10.1 (Debian python3-scipy) and numpy 1.24.2. */
#include "testutil.h"
#include "sh_tchart.h"
#include "hn_status.h"

/* Expected outputs, reviewed by eye and frozen here: a change in layout must
 * be deliberate. */
static const char LINE_U[] =
    "line\n"
    "3┤      │─│\n"
    " │    │─│ │─│         │─\n"
    "1┤┄│──│┄┄┄┄┄│──│┄┄┄┄┄─│┄\n"
    "0┤─│           │─\n"
    " └┬────────────────────┬\n"
    "  1                   10\n"
    "─ y  ┄ mean\n";

static const char LINE_A[] =
    "line\n"
    "3+      ***\n"
    " |    *** ***         **\n"
    "1+.****.....****.....**.\n"
    "0+**           **\n"
    " ++--------------------+\n"
    "  1                   10\n"
    "* y  . mean\n";

static const char CORR_U[] =
    "acf\n"
    " 0.55┤ ▆▆\n"
    "     │ ██          ▃▃\n"
    "     │┄██┄┄┄┄┄┄▄▄┄┄██┄┄┄\n"
    "    0┤──────────────────\n"
    "     │┄┄┄┄┄██┄┄┄┄┄┄┄┄┄┄┄\n"
    "     │     ▀▀\n"
    "-0.55┤\n"
    "     └─▲───▲───┬───▲────\n"
    "       1   2   3   4\n"
    "┄ ±0.2  ▲ beyond band: l\n";

static const char CORR_A[] =
    "acf\n"
    " 0.55+ ##\n"
    "     | ##\n"
    "     |.##......##..##...\n"
    "    0+------------------\n"
    "     |.....##...........\n"
    "     |     ##\n"
    "-0.55+\n"
    "     +-^---^---+---^----\n"
    "       1   2   3   4\n"
    ". +-0.2  ^ beyond band:\n";

static const char QQ_U[] =
    "qq\n"
    " 2┤                • ╱╱╱\n"
    "  │             ╱╱╱╱╱\n"
    " 0┤        ╱╱•╱•\n"
    "  │   ╱•╱╱╱•\n"
    "-2┤╱╱╱\n"
    "  └┬─────────┬─────────┬\n"
    "   -2        0         2\n"
    "• standardised value (n=\n";

static const char QQ_A[] =
    "qq\n"
    " 2+                o ///\n"
    "  |             /////\n"
    " 0+        //o/o\n"
    "  |   /o///o\n"
    "-2+///\n"
    "  ++---------+---------+\n"
    "   -2        0         2\n"
    "o standardised value (n=\n";

static const char PROF_U[] =
    "p\n"
    "   1┤\n"
    "    │\n"
    "    │     ○\n"
    "    │         ○\n"
    "0.05┤┄┄┄┄┄┄┄┄┄┄┄┄┄┄●┄┄┄●\n"
    "    └┬────┬───┬────┬───┬\n"
    "     1    2   3    4   5\n"
    "○ p-value  ● below 0.05:\n";

static const char PROF_A[] =
    "p\n"
    "   1+\n"
    "    |\n"
    "    |     o\n"
    "    |         o\n"
    "0.05+..............x...x\n"
    "    ++----+---+----+---+\n"
    "     1    2   3    4   5\n"
    "o p-value  x below 0.05:\n";

static const char PROFLOG_A[] =
    "p\n"
    "   1+\n"
    "    |     o   o\n"
    "    |\n"
    "0.05+..............x....\n"
    "0.01+                  x\n"
    "    ++----+---+----+---+\n"
    "     1    2   3    4   5\n"
    "o p-value  x below 0.05:\n";

static const char ONE_A[] =
    "3.75+\n"
    "    |       *\n"
    "1.25+\n"
    "    +-------+-------\n"
    "            1\n";

static const char EMPTY_A[] =
    "empty\n"
    "(no finite values)\n"
    "\n"
    "\n"
    "\n";

static const char FAN_A[] =
    "fan\n"
    "3+                    ::\n"
    " |  **    *    * :::::::\n"
    " |************** :oooooo\n"
    " |*    **   **   :::::::\n"
    "0+                    ::\n"
    " ++--------------------+\n"
    "  1                    9\n"
    "* observed  o forecast\n";

static char *render(const sh_chart *c, int w, int h, unsigned flags)
{
    char *s = NULL;
    int rc = sh_tchart_string(c, w, h, flags, &s, NULL);
    if (rc != HN_OK)
        print_error("render: %s\n", hn_strerror(rc));
    assert_int_equal(rc, HN_OK);
    assert_non_null(s);
    return s;
}

static void expect(const sh_chart *c, int w, int h, unsigned flags, const char *want)
{
    char *s = render(c, w, h, flags);
    if (strcmp(s, want) != 0)
        print_error("got:\n%s\nwant:\n%s\n", s, want);
    assert_string_equal(s, want);
    free(s);
}

/* Display columns of one line: UTF-8 characters, ANSI escapes not counted. */
static int line_cols(const char *s, const char *end)
{
    int k = 0;
    while (s < end) {
        if (*s == '\033') {
            while (s < end && *s != 'm') s++;
            s++;
            continue;
        }
        if (((unsigned char)*s & 0xc0) != 0x80)
            k++;
        s++;
    }
    return k;
}

/* Check HEIGHT lines of at most WIDTH columns, each ending in '\n'. */
static void check_box(const char *s, int w, int h)
{
    int lines = 0;
    for (const char *p = s; *p;) {
        const char *e = strchr(p, '\n');
        assert_non_null(e);
        int k = line_cols(p, e);
        if (k > w)
            print_error("line %d has %d columns > %d: %.*s\n", lines, k, w, (int)(e - p), p);
        assert_true(k <= w);
        lines++;
        p = e + 1;
    }
    assert_int_equal(lines, h);
}

static const double Y10[] = { 0, 1, 2, 3, 2, 1, 0, NAN, 1, 2 };
static const double R4[] = { 0.5, -0.3, 0.1, 0.25 };
static const double V5[] = { 3, 1, 10, 2, 4 };
static const double P5[] = { NAN, 0.5, 0.2, 0.04, 0.01 };

static void test_line_exact(void **state)
{
    (void)state;
    sh_chart c;
    sh_chart_line(&c, "line", Y10, 10, "y");
    assert_int_equal(sh_chart_add_ref(&c, 1.0, "mean"), 0);
    expect(&c, 24, 8, 0, LINE_U);
    expect(&c, 24, 8, SH_TC_ASCII, LINE_A);
}

static void test_corr_exact(void **state)
{
    (void)state;
    sh_chart c;
    sh_chart_corr(&c, "acf", R4, 4, 0.2);
    expect(&c, 24, 11, 0, CORR_U);
    expect(&c, 24, 11, SH_TC_ASCII, CORR_A);
    /* the legend names the lags beyond the band when there is room */
    char *s = render(&c, 60, 11, 0);
    assert_non_null(strstr(s, "beyond band: lags 1 2 4"));
    free(s);
}

static void test_qq_exact(void **state)
{
    (void)state;
    sh_chart c;
    sh_chart_qq(&c, "qq", V5, 5);
    expect(&c, 24, 9, 0, QQ_U);
    expect(&c, 24, 9, SH_TC_ASCII, QQ_A);
}

static void test_qq_points(void **state)
{
    (void)state;
    sh_chart c;
    double *x, *y;
    size_t k;
    sh_chart_qq(&c, NULL, V5, 5);
    assert_int_equal(sh_chart_qq_points(&c, &x, &y, &k), 0);
    assert_int_equal(k, 5);
    /* scipy 1.10.1: norm.ppf((i - 0.375) / (5 + 0.25)), i = 1..5 (Blom positions) */
    static const double xq[] = { -1.1797611176118612, -0.49720057068155404, 0.0,
                                 0.49720057068155404, 1.1797611176118612 };
    /* numpy 1.24.2: (sort(v) - v.mean()) / v.std(ddof=1) */
    static const double yq[] = { -0.84852814, -0.56568542, -0.28284271, 0.0, 1.69705627 };
    for (size_t i = 0; i < k; i++) {
        TU_NEAR(x[i], xq[i], 1e-14);
        TU_NEAR(y[i], yq[i], 1e-8);
    }
    free(x);
    free(y);
    /* unstandardised: the sorted values themselves */
    c.standardise = 0;
    assert_int_equal(sh_chart_qq_points(&c, &x, &y, &k), 0);
    assert_true(y[0] == 1.0 && y[4] == 10.0);
    free(x);
    free(y);
}

static void test_profile_exact(void **state)
{
    (void)state;
    sh_chart c;
    sh_chart_profile(&c, "p", P5, 5, 0.05, 0);
    expect(&c, 24, 9, 0, PROF_U);
    expect(&c, 24, 9, SH_TC_ASCII, PROF_A);
    sh_chart_profile(&c, "p", P5, 5, 0.05, 1);
    expect(&c, 24, 9, SH_TC_ASCII, PROFLOG_A);
}

static void test_fan_exact(void **state)
{
    (void)state;
    static const double hist[] = { 1, 2, 1, 2, 1, 2 }, fm[] = { 1.5, 1.5, 1.5 };
    static const double lo[] = { 1, 0.5, 0 }, hi[] = { 2, 2.5, 3 };
    sh_chart c;
    sh_chart_fan(&c, "fan", hist, 6, fm, 3);
    assert_int_equal(sh_chart_fan_level(&c, lo, hi, 90), 0);
    expect(&c, 24, 9, SH_TC_ASCII, FAN_A);
}

static void test_one_and_empty(void **state)
{
    (void)state;
    static const double one[] = { 2.5 }, nans[] = { NAN, NAN, INFINITY };
    sh_chart c;
    sh_chart_line(&c, NULL, one, 1, NULL);
    expect(&c, 20, 5, SH_TC_ASCII, ONE_A);
    sh_chart_line(&c, "empty", NULL, 0, NULL);
    expect(&c, 20, 5, SH_TC_ASCII, EMPTY_A);
    /* every kind: nothing finite gives the message, one value draws */
    for (int kind = 0; kind < 5; kind++) {
        for (int which = 0; which < 3; which++) {
            const double *v = which == 0 ? NULL : which == 1 ? nans : one;
            size_t n = which == 0 ? 0 : which == 1 ? 3 : 1;
            switch (kind) {
            case 0: sh_chart_line(&c, "t", v, n, "x"); break;
            case 1: sh_chart_corr(&c, "t", v, n, 0.1); break;
            case 2: sh_chart_qq(&c, "t", v, n); break;
            case 3: sh_chart_profile(&c, "t", v, n, 0.05, kind & 1); break;
            default: sh_chart_fan(&c, "t", v, n, v, n); break;
            }
            char *s = render(&c, 30, 10, 0);
            check_box(s, 30, 10);
            assert_null(strstr(s, "nan"));
            assert_null(strstr(s, "inf"));
            if (which < 2)
                assert_non_null(strstr(s, "(no finite values)"));
            else
                assert_null(strstr(s, "(no finite values)"));
            free(s);
        }
    }
}

static void test_nan_gap(void **state)
{
    (void)state;
    double y[17];
    for (int i = 0; i < 17; i++)
        y[i] = 1.0;
    y[8] = NAN;
    sh_chart c;
    sh_chart_line(&c, NULL, y, 17, NULL);
    /* labels "1.5" and "0.5" take 3 columns, the axis one: 17 plot columns,
     * one per value */
    char *s = render(&c, 21, 5, 0);
    const char *row = strstr(s, "\u2502\u2500");  /* axis, then the trace */
    assert_non_null(row);
    assert_non_null(strstr(row, "\u2500\u2500\u2500\u2500\u2500\u2500\u2500\u2500 "
                                "\u2500\u2500\u2500\u2500\u2500\u2500\u2500\u2500\n"));
    assert_null(strstr(s, "nan"));
    free(s);
}

static void test_sizes(void **state)
{
    (void)state;
    static const int ws[] = { 20, 33, 57, 80, 131 }, hs[] = { 7, 12, 25 };
    static const unsigned fl[] = { 0, SH_TC_ASCII, SH_TC_COLOR, SH_TC_ASCII | SH_TC_COLOR };
    double y[200], r[40], p[40], lo[10], hi[10], fm[10];
    for (int i = 0; i < 200; i++)
        y[i] = sin(0.37 * i) + 0.2 * cos(2.1 * i) + (i == 50 ? NAN : 0.0);
    for (int i = 0; i < 40; i++) {
        r[i] = 0.8 * pow(-0.6, i);
        p[i] = i < 3 ? NAN : pow(0.5, i);
    }
    for (int j = 0; j < 10; j++) {
        fm[j] = 0.1 * j;
        lo[j] = fm[j] - 1.0 - 0.1 * j;
        hi[j] = fm[j] + 1.0 + 0.1 * j;
    }
    for (int kind = 0; kind < 6; kind++)
        for (size_t a = 0; a < sizeof ws / sizeof *ws; a++)
            for (size_t b = 0; b < sizeof hs / sizeof *hs; b++)
                for (size_t f = 0; f < sizeof fl / sizeof *fl; f++) {
                    sh_chart c;
                    switch (kind) {
                    case 0:
                        sh_chart_line(&c, "a rather long title that does not fit in twenty columns", y, 200, "series");
                        sh_chart_add_series(&c, r, 40, "second");
                        sh_chart_add_ref(&c, 0.0, "zero");
                        sh_chart_add_ref(&c, 1.0, NULL);
                        break;
                    case 1: sh_chart_corr(&c, "acf", r, 40, 0.15); break;
                    case 2: sh_chart_qq(&c, "qq", y, 200); break;
                    case 3: sh_chart_profile(&c, "lb", p, 40, 0.05, 0); break;
                    case 4: sh_chart_profile(&c, "lb", p, 40, 0.05, 1); break;
                    default:
                        sh_chart_fan(&c, "fan", y, 200, fm, 10);
                        sh_chart_fan_level(&c, lo, hi, 95);
                        sh_chart_fan_level(&c, fm, hi, 50);
                        break;
                    }
                    char *s = render(&c, ws[a], hs[b], fl[f]);
                    check_box(s, ws[a], hs[b]);
                    assert_null(strstr(s, "nan"));
                    if (!(fl[f] & SH_TC_COLOR))
                        assert_null(strchr(s, '\033'));
                    if (fl[f] & SH_TC_ASCII)
                        for (const char *q = s; *q; q++)
                            assert_true((unsigned char)*q < 0x80);
                    free(s);
                }
}

static void test_colour(void **state)
{
    (void)state;
    sh_chart c;
    sh_chart_corr(&c, "acf", R4, 4, 0.2);
    char *plain = render(&c, 30, 11, 0), *col = render(&c, 30, 11, SH_TC_COLOR);
    assert_non_null(strstr(col, "\033[31m"));     /* bars beyond the band */
    /* without the escapes the text is the same */
    char *q = col, *w = col;
    while (*q) {
        if (*q == '\033') {
            while (*q && *q != 'm') q++;
            if (*q) q++;
            continue;
        }
        *w++ = *q++;
    }
    *w = '\0';
    assert_string_equal(col, plain);
    free(plain);
    free(col);
}

static void test_bad_sizes(void **state)
{
    (void)state;
    sh_chart c;
    char *s = (char *)1;
    sh_chart_line(&c, "t", Y10, 10, "y");
    assert_int_equal(sh_tchart_string(&c, 19, 10, 0, &s, NULL), HN_EINVAL);
    assert_null(s);
    /* title + 3 plot rows + axis + labels + legend need 7 lines */
    assert_int_equal(sh_tchart_string(&c, 40, 6, 0, &s, NULL), HN_EINVAL);
    assert_int_equal(sh_tchart_string(&c, 40, 7, 0, &s, NULL), HN_OK);
    free(s);
    assert_int_equal(sh_tchart_string(NULL, 40, 7, 0, &s, NULL), HN_EINVAL);
    c.kind = (sh_chart_kind)99;
    assert_int_equal(sh_tchart_string(&c, 40, 7, 0, &s, NULL), HN_EINVAL);
}

static void test_write_file(void **state)
{
    (void)state;
    sh_chart c;
    sh_chart_profile(&c, "p", P5, 5, 0.05, 0);
    FILE *f = tmpfile();
    assert_non_null(f);
    assert_int_equal(sh_tchart_write(f, &c, 24, 9, 0), HN_OK);
    long n = ftell(f);
    assert_int_equal(n, (long)strlen(PROF_U));
    rewind(f);
    char buf[1024];
    assert_int_equal(fread(buf, 1, (size_t)n, f), (size_t)n);
    buf[n] = '\0';
    assert_string_equal(buf, PROF_U);
    fclose(f);
}

static void test_band_per_lag(void **state)
{
    (void)state;
    static const double r[] = { 0.15, 0.15, -0.15 }, b[] = { 0.1, 0.3, 0.12 };
    sh_chart c;
    sh_chart_corr(&c, "pacf", r, 3, 0.0);
    c.band_lag = b;
    char *s = render(&c, 50, 12, 0);
    check_box(s, 50, 12);
    /* lag 2 is inside its wider band; lags 1 and 3 are not */
    assert_non_null(strstr(s, "beyond band: lags 1 3\n"));
    free(s);
}

static void test_many_lags(void **state)
{
    (void)state;
    double r[100];
    for (int i = 0; i < 100; i++)
        r[i] = 0.05 * cos(i);
    sh_chart c;
    sh_chart_corr(&c, "acf", r, 100, 0.2);
    char *s = render(&c, 40, 10, 0);
    check_box(s, 40, 10);
    assert_non_null(strstr(s, "all inside"));
    assert_non_null(strstr(s, "of 100"));   /* says that not every lag is shown */
    free(s);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_line_exact),
        cmocka_unit_test(test_corr_exact),
        cmocka_unit_test(test_qq_exact),
        cmocka_unit_test(test_qq_points),
        cmocka_unit_test(test_profile_exact),
        cmocka_unit_test(test_fan_exact),
        cmocka_unit_test(test_one_and_empty),
        cmocka_unit_test(test_nan_gap),
        cmocka_unit_test(test_sizes),
        cmocka_unit_test(test_colour),
        cmocka_unit_test(test_bad_sizes),
        cmocka_unit_test(test_write_file),
        cmocka_unit_test(test_band_per_lag),
        cmocka_unit_test(test_many_lags),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
