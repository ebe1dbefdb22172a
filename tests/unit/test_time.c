/* test_time.c - ISO 8601 time cells: stamps against Python's calendar, text round trips,
 * refusals, frequency detection and calendar steps. */
#include "testutil.h"

#include "hn_status.h"
#include "sh_time.h"

static int64_t stamp_of(const char *text, int allow_year, int *kind)
{
    int64_t s = 0;
    char why[160];
    int k;
    int rc = sh_time_parse(text, strlen(text), allow_year, &s, &k, why, sizeof why);
    if (rc != 0)
        print_error("'%s': %s\n", text, why);
    assert_int_equal(rc, 0);
    if (kind)
        *kind = k;
    return s;
}

static void test_stamps(void **state)
{
    (void)state;
    /* want: Python 3.11.2 (Debian) calendar.timegm of the same date or time */
    static const struct {
        const char *text;
        int64_t want;
        int kind;
    } cases[] = {
        {"1970-01-01", 0, SH_TIME_DATE},
        {"1969-12-31", -86400, SH_TIME_DATE},
        {"2000-02-29", 951782400, SH_TIME_DATE},
        {"1900-03-01", -2203891200LL, SH_TIME_DATE},
        {"0001-01-01", -62135596800LL, SH_TIME_DATE},
        {"9999-12-31", 253402214400LL, SH_TIME_DATE},
        {"1984-01-03", 441936000, SH_TIME_DATE},
        {"2024-01", 1704067200, SH_TIME_MONTH},
        {"2024-Q1", 1704067200, SH_TIME_QUARTER},
        {"2024", 1704067200, SH_TIME_YEAR},
        {"2021-03-14T15:09:26", 1615734566, SH_TIME_DATETIME},
        {"2021-03-14 15:09:26Z", 1615734566, SH_TIME_DATETIME},
        {" 2021-03-14t15:09:26z ", 1615734566, SH_TIME_DATETIME},
        /* 2020-01-01T00:00 at +05:30 is 5 h 30 min earlier in UTC */
        {"2020-01-01T00:00+05:30", 1577817000, SH_TIME_DATETIME},
        {"2020-01-01T00:00+0530", 1577817000, SH_TIME_DATETIME},
        {"2019-12-31T18:30-00:00", 1577817000, SH_TIME_DATETIME},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        int k;
        int64_t s = stamp_of(cases[i].text, 1, &k);
        if (s != cases[i].want || k != cases[i].kind)
            print_error("'%s': %lld kind %d, want %lld kind %d\n", cases[i].text, (long long)s, k,
                        (long long)cases[i].want, cases[i].kind);
        assert_true(s == cases[i].want);
        assert_int_equal(k, cases[i].kind);
    }
    /* quarters start at months 1, 4, 7, 10 */
    assert_true(stamp_of("2024-Q3", 0, NULL) == stamp_of("2024-07-01", 0, NULL));
    assert_true(stamp_of("2024q4", 0, NULL) == stamp_of("2024-10-01", 0, NULL));
}

static void test_civil_roundtrip(void **state)
{
    (void)state;
    /* every day from 1600-01-01 to 2400-12-31 maps back to itself, one day apart */
    int64_t d0 = sh_days_from_civil(1600, 1, 1), d1 = sh_days_from_civil(2400, 12, 31);
    int64_t prev = d0 - 1;
    for (int64_t d = d0; d <= d1; d++) {
        long y;
        int m, dd;
        sh_civil_from_days(d, &y, &m, &dd);
        int64_t back = sh_days_from_civil(y, m, dd);
        if (back != d || back != prev + 1)
            fail_msg("day %lld -> %ld-%d-%d -> %lld", (long long)d, y, m, dd, (long long)back);
        prev = back;
    }
    /* 400 Gregorian years are 146097 days (common practice) */
    assert_true(sh_days_from_civil(2400, 1, 1) - sh_days_from_civil(2000, 1, 1) == 146097);
}

static void test_format(void **state)
{
    (void)state;
    char buf[64];
    static const char *const texts[] = {"2024-02-29", "1969-07-20", "0001-01-01", "9999-12-31"};
    for (size_t i = 0; i < 4; i++)
        assert_string_equal(sh_time_format(stamp_of(texts[i], 0, NULL), SH_TIME_DATE, buf, sizeof buf),
                            texts[i]);
    assert_string_equal(sh_time_format(stamp_of("2021-03-14T15:09:26Z", 0, NULL), SH_TIME_DATETIME,
                                       buf, sizeof buf),
                        "2021-03-14T15:09:26");
    assert_string_equal(sh_time_format(stamp_of("1969-12-31T23:59:59", 0, NULL), SH_TIME_DATETIME,
                                       buf, sizeof buf),
                        "1969-12-31T23:59:59");
    assert_string_equal(sh_time_format(stamp_of("2023-Q4", 0, NULL), SH_TIME_QUARTER, buf, sizeof buf),
                        "2023-Q4");
    assert_string_equal(sh_time_format(stamp_of("2023-11", 0, NULL), SH_TIME_MONTH, buf, sizeof buf),
                        "2023-11");
    assert_string_equal(sh_time_format(stamp_of("1990", 1, NULL), SH_TIME_YEAR, buf, sizeof buf),
                        "1990");
}

static void test_refusals(void **state)
{
    (void)state;
    static const struct {
        const char *text;
        const char *why;
    } cases[] = {
        {"2023-02-29", "day 29 is out of range for 2023-02"}, /* 2023 is not a leap year */
        {"1900-02-29", "day 29 is out of range for 1900-02"}, /* century rule */
        {"2024-04-31", "day 31 is out of range"},
        {"2024-00-10", "month 0"},
        {"2024-13", "month 13"},
        {"2024-Q0", "quarter 0"},
        {"2024-01-01T23:60", "out of range"},
        {"2024-01-01T12:00:60", "out of range"},
        {"2024-01-01T12:00:00.5", "fractional seconds"},
        {"2024-01-01T12:00+25:00", "zone"},
        {"2024-1-1", "ISO 8601"},
        {"24-01-01", "ISO 8601"},
        {"01/02/2024", "ISO 8601"},
        {"2024-01-01x", "ISO 8601"},
        {"2024-01-01T12", "ISO 8601"},
        {"", "ISO 8601"},
        {"1990", "bare year"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        int64_t s;
        int k;
        char why[160] = "";
        int rc = sh_time_parse(cases[i].text, strlen(cases[i].text), 0, &s, &k, why, sizeof why);
        if (rc == 0 || !strstr(why, cases[i].why))
            fail_msg("'%s': rc %d, reason '%s', want '%s'", cases[i].text, rc, why, cases[i].why);
    }
}

static size_t parse_list(const char *const *texts, int64_t *st, int *kind)
{
    size_t n = 0;
    for (; texts[n]; n++)
        st[n] = stamp_of(texts[n], 1, kind);
    return n;
}

static void test_frequency(void **state)
{
    (void)state;
    static const struct {
        const char *label;
        const char *texts[9];
        int freq, season;
        size_t gaps, periods, first;
    } cases[] = {
        {"daily", {"2023-12-30", "2023-12-31", "2024-01-01", "2024-01-02", NULL}, SH_FREQ_DAILY, 7,
         0, 0, 0},
        {"daily gaps", {"2024-01-05", "2024-01-06", "2024-01-08", "2024-01-09", "2024-01-13", NULL},
         SH_FREQ_DAILY, 7, 2, 4, 2},
        /* weekdays only, with a Friday-to-Monday step: business days, and then the
         * Tuesday-to-Thursday step is the one gap */
        {"business gap", {"2024-01-01", "2024-01-02", "2024-01-04", "2024-01-05", "2024-01-08", NULL},
         SH_FREQ_BUSINESS, 5, 1, 1, 2},
        {"business", {"2024-01-03", "2024-01-04", "2024-01-05", "2024-01-08", "2024-01-09", NULL},
         SH_FREQ_BUSINESS, 5, 0, 0, 0},
        {"weekly", {"2024-01-07", "2024-01-14", "2024-01-21", "2024-01-28", NULL}, SH_FREQ_WEEKLY,
         52, 0, 0, 0},
        {"monthly", {"2023-12-05", "2024-01-05", "2024-02-05", NULL}, SH_FREQ_MONTHLY, 12, 0, 0, 0},
        {"monthly ends", {"2023-11-30", "2023-12-31", "2024-01-31", "2024-02-29", NULL},
         SH_FREQ_MONTHLY, 12, 0, 0, 0},
        {"quarterly", {"2023-Q1", "2023-Q2", "2023-Q4", "2024-Q1", NULL}, SH_FREQ_QUARTERLY, 4, 1, 1,
         2},
        {"yearly", {"1998", "1999", "2000", NULL}, SH_FREQ_YEARLY, 1, 0, 0, 0},
        {"hourly", {"2024-03-31T00:00", "2024-03-31T01:00", "2024-03-31T02:00", "2024-03-31T05:00",
                    "2024-03-31T06:00", NULL},
         SH_FREQ_HOURLY, 24, 1, 2, 3},
        {"irregular minutes", {"2024-01-01T00:00", "2024-01-01T00:07", "2024-01-01T00:31", NULL},
         SH_FREQ_IRREGULAR, 0, 0, 0, 0},
        {"one stamp", {"2024-01-01", NULL}, SH_FREQ_NONE, 0, 0, 0, 0},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        int64_t st[9];
        int kind = SH_TIME_NONE;
        size_t n = parse_list(cases[i].texts, st, &kind);
        sh_freq_info fi;
        assert_int_equal(sh_freq_detect(st, n, kind, &fi), HN_OK);
        if (fi.freq != cases[i].freq || fi.season != cases[i].season || fi.n_gaps != cases[i].gaps ||
            fi.n_gap_periods != cases[i].periods || fi.first_gap != cases[i].first)
            fail_msg("%s: %s season %d gaps %zu periods %zu first %zu", cases[i].label,
                     sh_freq_name(fi.freq), fi.season, fi.n_gaps, fi.n_gap_periods, fi.first_gap);
    }
    assert_int_equal(sh_freq_detect(NULL, 0, SH_TIME_DATE, NULL), HN_EINVAL);
    assert_string_equal(sh_freq_name(SH_FREQ_BUSINESS), "business daily");
    assert_string_equal(sh_freq_name(SH_FREQ_QUARTERLY), "quarterly");
}

static void test_advance(void **state)
{
    (void)state;
    char buf[64];
    static const struct {
        const char *from;
        int freq;
        long k;
        const char *want;
        int kind;
    } cases[] = {
        {"2024-01-31", SH_FREQ_MONTHLY, 1, "2024-02-29", SH_TIME_DATE},  /* month end stays one */
        {"2024-02-29", SH_FREQ_MONTHLY, 1, "2024-03-31", SH_TIME_DATE},
        {"2024-01-15", SH_FREQ_MONTHLY, -2, "2023-11-15", SH_TIME_DATE},
        {"2024-01-30", SH_FREQ_MONTHLY, 1, "2024-02-29", SH_TIME_DATE},  /* clamped */
        {"2023-Q4", SH_FREQ_QUARTERLY, 1, "2024-Q1", SH_TIME_QUARTER},
        {"2024-02-29", SH_FREQ_YEARLY, 1, "2025-02-28", SH_TIME_DATE},
        {"2024-01-05", SH_FREQ_BUSINESS, 1, "2024-01-08", SH_TIME_DATE}, /* Friday -> Monday */
        {"2024-01-08", SH_FREQ_BUSINESS, -1, "2024-01-05", SH_TIME_DATE},
        {"2024-01-03", SH_FREQ_BUSINESS, 10, "2024-01-17", SH_TIME_DATE},
        {"2024-01-06", SH_FREQ_BUSINESS, 1, "2024-01-08", SH_TIME_DATE}, /* Saturday counts as Friday */
        {"2024-12-30", SH_FREQ_DAILY, 3, "2025-01-02", SH_TIME_DATE},
        {"2024-12-30", SH_FREQ_WEEKLY, 1, "2025-01-06", SH_TIME_DATE},
        {"2024-12-31T23:00", SH_FREQ_HOURLY, 2, "2025-01-01T01:00:00", SH_TIME_DATETIME},
        {"2024-12-31", SH_FREQ_IRREGULAR, 5, "2024-12-31", SH_TIME_DATE},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        int64_t s = sh_time_advance(stamp_of(cases[i].from, 0, NULL), cases[i].freq, cases[i].k);
        sh_time_format(s, cases[i].kind, buf, sizeof buf);
        if (strcmp(buf, cases[i].want) != 0)
            fail_msg("%s %+ld %s: %s, want %s", cases[i].from, cases[i].k,
                     sh_freq_name(cases[i].freq), buf, cases[i].want);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_stamps),    cmocka_unit_test(test_civil_roundtrip),
        cmocka_unit_test(test_format),    cmocka_unit_test(test_refusals),
        cmocka_unit_test(test_frequency), cmocka_unit_test(test_advance),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
