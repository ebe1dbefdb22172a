/* sh_time.c - ISO 8601 time cells: parsing, formatting, calendar arithmetic, frequency detection. */
#include "sh_time.h"

#include "hn_status.h"

#include <stdio.h>
#include <string.h>

#define DAY_SECONDS 86400

/* Floor division and modulo for possibly negative numerators (B > 0). */
static int64_t floor_div(int64_t a, int64_t b)
{
    int64_t q = a / b;
    if ((a % b != 0) && (a < 0))
        q--;
    return q;
}

static int64_t floor_mod(int64_t a, int64_t b)
{
    return a - floor_div(a, b) * b;
}

static int is_leap(long y)
{
    return (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
}

static int days_in_month(long y, int m)
{
    static const int dm[12] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    return m == 2 && is_leap(y) ? 29 : dm[m - 1];
}

/* Days-from-civil by 400-year eras (146097 days each); March-based year so
 * that the leap day falls at the end.  Day 0 is 1970-01-01 (719468 days
 * after 0000-03-01). */
int64_t sh_days_from_civil(long year, int month, int day)
{
    int64_t y = (int64_t)year - (month <= 2);
    int64_t era = floor_div(y, 400);
    int64_t yoe = y - era * 400;
    int64_t mp = month > 2 ? month - 3 : month + 9;
    int64_t doy = (153 * mp + 2) / 5 + day - 1;
    int64_t doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    return era * 146097 + doe - 719468;
}

void sh_civil_from_days(int64_t days, long *year, int *month, int *day)
{
    int64_t z = days + 719468;
    int64_t era = floor_div(z, 146097);
    int64_t doe = z - era * 146097;
    int64_t yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
    int64_t doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    int64_t mp = (5 * doy + 2) / 153;
    int d = (int)(doy - (153 * mp + 2) / 5 + 1);
    int m = (int)(mp < 10 ? mp + 3 : mp - 9);
    *year = (long)(yoe + era * 400 + (m <= 2));
    *month = m;
    *day = d;
}

/* 0 = Monday ... 6 = Sunday; 1970-01-01 was a Thursday. */
static int weekday(int64_t days)
{
    return (int)floor_mod(days + 3, 7);
}

/* Number of weekdays (Mon-Fri) in [MONDAY0, D), negative before it;
 * MONDAY0 = 1970-01-05. */
static int64_t weekdays_before(int64_t d)
{
    int64_t rel = d - 4;
    int64_t w = floor_div(rel, 7), r = floor_mod(rel, 7);
    return w * 5 + (r < 5 ? r : 5);
}

static int64_t month_index(int64_t stamp)
{
    long y;
    int m, d;
    sh_civil_from_days(floor_div(stamp, DAY_SECONDS), &y, &m, &d);
    return (int64_t)y * 12 + (m - 1);
}

static void set_why(char *why, size_t whylen, const char *text)
{
    if (why && whylen)
        snprintf(why, whylen, "%s", text);
}

static int digits(const char *p, const char *end, int k, int *val)
{
    int v = 0;
    if (end - p < k)
        return 0;
    for (int i = 0; i < k; i++) {
        if (p[i] < '0' || p[i] > '9')
            return 0;
        v = v * 10 + (p[i] - '0');
    }
    *val = v;
    return 1;
}

static const char iso_forms[] =
    "not an ISO 8601 time (YYYY-MM-DD, YYYY-MM, YYYY-Qn or YYYY-MM-DDThh:mm[:ss][Z])";

int sh_time_parse(const char *s, size_t len, int allow_year, int64_t *stamp, int *kind,
                  char *why, size_t whylen)
{
    char buf[96];
    const char *p = s, *end = s + len;
    int y, mo = 1, d = 1, h = 0, mi = 0, sec = 0, k = SH_TIME_NONE;
    long zone = 0;

    while (p < end && (*p == ' ' || *p == '\t'))
        p++;
    while (end > p && (end[-1] == ' ' || end[-1] == '\t'))
        end--;
    if (!digits(p, end, 4, &y)) {
        set_why(why, whylen, iso_forms);
        return -1;
    }
    p += 4;
    if (p == end) {
        if (!allow_year) {
            set_why(why, whylen, "a bare year is taken as a time only in a column chosen as the time column");
            return -1;
        }
        k = SH_TIME_YEAR;
        goto done;
    }
    if (*p == '-')
        p++;
    if (p < end && (*p == 'Q' || *p == 'q')) {
        int q;
        if (!digits(p + 1, end, 1, &q) || p + 2 != end) {
            set_why(why, whylen, iso_forms);
            return -1;
        }
        if (q < 1 || q > 4) {
            snprintf(buf, sizeof buf, "quarter %d is out of range (1-4)", q);
            set_why(why, whylen, buf);
            return -1;
        }
        mo = 3 * (q - 1) + 1;
        k = SH_TIME_QUARTER;
        goto done;
    }
    if (p[-1] != '-' || !digits(p, end, 2, &mo)) {
        set_why(why, whylen, iso_forms);
        return -1;
    }
    p += 2;
    if (mo < 1 || mo > 12) {
        snprintf(buf, sizeof buf, "month %d is out of range (1-12)", mo);
        set_why(why, whylen, buf);
        return -1;
    }
    if (p == end) {
        k = SH_TIME_MONTH;
        goto done;
    }
    if (*p != '-' || !digits(p + 1, end, 2, &d)) {
        set_why(why, whylen, iso_forms);
        return -1;
    }
    p += 3;
    if (d < 1 || d > days_in_month(y, mo)) {
        snprintf(buf, sizeof buf, "day %d is out of range for %04d-%02d", d, y, mo);
        set_why(why, whylen, buf);
        return -1;
    }
    if (p == end) {
        k = SH_TIME_DATE;
        goto done;
    }
    if ((*p != 'T' && *p != 't' && *p != ' ') || !digits(p + 1, end, 2, &h) || end - p < 6 ||
        p[3] != ':' || !digits(p + 4, end, 2, &mi)) {
        set_why(why, whylen, iso_forms);
        return -1;
    }
    p += 6;
    if (p < end && *p == ':') {
        if (!digits(p + 1, end, 2, &sec)) {
            set_why(why, whylen, iso_forms);
            return -1;
        }
        p += 3;
    }
    if (p < end && (*p == '.' || *p == ',')) {
        set_why(why, whylen, "fractional seconds are not supported");
        return -1;
    }
    if (h > 23 || mi > 59 || sec > 59) {
        snprintf(buf, sizeof buf, "time %02d:%02d:%02d is out of range", h, mi, sec);
        set_why(why, whylen, buf);
        return -1;
    }
    if (p < end && (*p == 'Z' || *p == 'z')) {
        p++;
    } else if (p < end && (*p == '+' || *p == '-')) {
        int zh, zm = 0, sign = *p == '-' ? -1 : 1;
        if (!digits(p + 1, end, 2, &zh)) {
            set_why(why, whylen, iso_forms);
            return -1;
        }
        p += 3;
        if (p < end && *p == ':')
            p++;
        if (p < end) {
            if (!digits(p, end, 2, &zm)) {
                set_why(why, whylen, iso_forms);
                return -1;
            }
            p += 2;
        }
        if (zh > 23 || zm > 59) {
            set_why(why, whylen, "time zone offset is out of range");
            return -1;
        }
        zone = sign * (zh * 3600L + zm * 60L);
    }
    if (p != end) {
        set_why(why, whylen, iso_forms);
        return -1;
    }
    k = SH_TIME_DATETIME;
done:
    *stamp = sh_days_from_civil(y, mo, d) * DAY_SECONDS + h * 3600L + mi * 60L + sec - zone;
    *kind = k;
    return 0;
}

char *sh_time_format(int64_t stamp, int kind, char *buf, size_t len)
{
    int64_t days = floor_div(stamp, DAY_SECONDS), sod = floor_mod(stamp, DAY_SECONDS);
    long y;
    int m, d;
    sh_civil_from_days(days, &y, &m, &d);
    switch (kind) {
    case SH_TIME_YEAR:
        snprintf(buf, len, "%04ld", y);
        break;
    case SH_TIME_QUARTER:
        snprintf(buf, len, "%04ld-Q%d", y, (m - 1) / 3 + 1);
        break;
    case SH_TIME_MONTH:
        snprintf(buf, len, "%04ld-%02d", y, m);
        break;
    case SH_TIME_DATETIME:
        snprintf(buf, len, "%04ld-%02d-%02dT%02d:%02d:%02d", y, m, d, (int)(sod / 3600),
                 (int)(sod / 60 % 60), (int)(sod % 60));
        break;
    default:
        snprintf(buf, len, "%04ld-%02d-%02d", y, m, d);
        break;
    }
    return buf;
}

const char *sh_freq_name(int freq)
{
    switch (freq) {
    case SH_FREQ_NONE:      return "none";
    case SH_FREQ_HOURLY:    return "hourly";
    case SH_FREQ_DAILY:     return "daily";
    case SH_FREQ_BUSINESS:  return "business daily";
    case SH_FREQ_WEEKLY:    return "weekly";
    case SH_FREQ_MONTHLY:   return "monthly";
    case SH_FREQ_QUARTERLY: return "quarterly";
    case SH_FREQ_YEARLY:    return "yearly";
    case SH_FREQ_IRREGULAR: return "irregular";
    default:                return "unknown";
    }
}

int sh_freq_season(int freq)
{
    switch (freq) {
    case SH_FREQ_HOURLY:    return 24;
    case SH_FREQ_DAILY:     return 7;
    case SH_FREQ_BUSINESS:  return 5;
    case SH_FREQ_WEEKLY:    return 52;
    case SH_FREQ_MONTHLY:   return 12;
    case SH_FREQ_QUARTERLY: return 4;
    case SH_FREQ_YEARLY:    return 1;
    default:                return 0;
    }
}

typedef enum { U_SECONDS, U_DAYS, U_BDAYS, U_MONTHS } unit_kind;

/* Length of interval I (between stamps I-1 and I) in base units of UK. */
static int64_t interval(const int64_t *st, size_t i, unit_kind uk)
{
    switch (uk) {
    case U_SECONDS:
        return st[i] - st[i - 1];
    case U_DAYS:
        return floor_div(st[i], DAY_SECONDS) - floor_div(st[i - 1], DAY_SECONDS);
    case U_BDAYS:
        return weekdays_before(floor_div(st[i], DAY_SECONDS)) -
               weekdays_before(floor_div(st[i - 1], DAY_SECONDS));
    default:
        return month_index(st[i]) - month_index(st[i - 1]);
    }
}

/* Does unit U (in base units of UK) fit?  If so fill the gap counts. */
static int try_unit(const int64_t *st, size_t n, unit_kind uk, int64_t u, sh_freq_info *out)
{
    size_t ones = 0, gaps = 0, first = 0, periods = 0;
    for (size_t i = 1; i < n; i++) {
        int64_t d = interval(st, i, uk);
        if (d <= 0 || d % u != 0)
            return 0;
        if (d == u) {
            ones++;
        } else {
            if (!gaps)
                first = i;
            gaps++;
            periods += (size_t)(d / u - 1);
        }
    }
    if (2 * ones < n - 1)
        return 0;
    out->n_gaps = gaps;
    out->n_gap_periods = periods;
    out->first_gap = first;
    return 1;
}

static int set_freq(sh_freq_info *out, int freq)
{
    out->freq = freq;
    out->season = sh_freq_season(freq);
    return HN_OK;
}

int sh_freq_detect(const int64_t *stamp, size_t n, int kind, sh_freq_info *out)
{
    if (!out || (!stamp && n))
        return HN_EINVAL;
    memset(out, 0, sizeof *out);
    if (n < 2 || kind == SH_TIME_NONE)
        return set_freq(out, SH_FREQ_NONE);

    if (kind == SH_TIME_YEAR)
        return set_freq(out, try_unit(stamp, n, U_MONTHS, 12, out) ? SH_FREQ_YEARLY : SH_FREQ_IRREGULAR);
    if (kind == SH_TIME_QUARTER) {
        if (try_unit(stamp, n, U_MONTHS, 3, out))
            return set_freq(out, SH_FREQ_QUARTERLY);
        if (try_unit(stamp, n, U_MONTHS, 12, out))
            return set_freq(out, SH_FREQ_YEARLY);
        return set_freq(out, SH_FREQ_IRREGULAR);
    }

    int same_dom = 1, month_ends = 1, same_tod = 1, weekend = 0;
    long y0;
    int m0, d0;
    int64_t tod0 = floor_mod(stamp[0], DAY_SECONDS);
    sh_civil_from_days(floor_div(stamp[0], DAY_SECONDS), &y0, &m0, &d0);
    for (size_t i = 0; i < n; i++) {
        long y;
        int m, d;
        int64_t days = floor_div(stamp[i], DAY_SECONDS);
        sh_civil_from_days(days, &y, &m, &d);
        if (d != d0)
            same_dom = 0;
        if (d != days_in_month(y, m))
            month_ends = 0;
        if (floor_mod(stamp[i], DAY_SECONDS) != tod0)
            same_tod = 0;
        if (weekday(days) >= 5)
            weekend = 1;
    }

    if (kind == SH_TIME_DATETIME && !same_tod)
        return set_freq(out, try_unit(stamp, n, U_SECONDS, 3600, out) ? SH_FREQ_HOURLY
                                                                       : SH_FREQ_IRREGULAR);
    if (kind == SH_TIME_MONTH || same_dom || month_ends) {
        if (try_unit(stamp, n, U_MONTHS, 1, out))
            return set_freq(out, SH_FREQ_MONTHLY);
        if (try_unit(stamp, n, U_MONTHS, 3, out))
            return set_freq(out, SH_FREQ_QUARTERLY);
        if (try_unit(stamp, n, U_MONTHS, 12, out))
            return set_freq(out, SH_FREQ_YEARLY);
        if (kind == SH_TIME_MONTH)
            return set_freq(out, SH_FREQ_IRREGULAR);
    }
    if (!weekend) {
        int spans_weekend = 0;
        for (size_t i = 1; i < n && !spans_weekend; i++)
            if (interval(stamp, i, U_DAYS) > interval(stamp, i, U_BDAYS))
                spans_weekend = 1;
        if (spans_weekend && try_unit(stamp, n, U_BDAYS, 1, out))
            return set_freq(out, SH_FREQ_BUSINESS);
    }
    if (try_unit(stamp, n, U_DAYS, 1, out))
        return set_freq(out, SH_FREQ_DAILY);
    if (try_unit(stamp, n, U_DAYS, 7, out))
        return set_freq(out, SH_FREQ_WEEKLY);
    memset(out, 0, sizeof *out);
    return set_freq(out, SH_FREQ_IRREGULAR);
}

int64_t sh_time_advance(int64_t stamp, int freq, long k)
{
    int64_t days = floor_div(stamp, DAY_SECONDS), sod = floor_mod(stamp, DAY_SECONDS);
    switch (freq) {
    case SH_FREQ_HOURLY:
        return stamp + (int64_t)k * 3600;
    case SH_FREQ_DAILY:
        return stamp + (int64_t)k * DAY_SECONDS;
    case SH_FREQ_WEEKLY:
        return stamp + (int64_t)k * 7 * DAY_SECONDS;
    case SH_FREQ_BUSINESS: {
        /* index of the weekday on or before DAYS, then back to a calendar day */
        int64_t idx = weekdays_before(days + 1) - 1 + k;
        int64_t target = 4 + floor_div(idx, 5) * 7 + floor_mod(idx, 5);
        return target * DAY_SECONDS + sod;
    }
    case SH_FREQ_MONTHLY:
    case SH_FREQ_QUARTERLY:
    case SH_FREQ_YEARLY: {
        long y;
        int m, d;
        int64_t step = freq == SH_FREQ_MONTHLY ? 1 : freq == SH_FREQ_QUARTERLY ? 3 : 12;
        sh_civil_from_days(days, &y, &m, &d);
        int end = d == days_in_month(y, m);
        int64_t mi = (int64_t)y * 12 + (m - 1) + step * k;
        long ny = (long)floor_div(mi, 12);
        int nm = (int)floor_mod(mi, 12) + 1;
        int dim = days_in_month(ny, nm);
        int nd = end || d > dim ? dim : d;
        return sh_days_from_civil(ny, nm, nd) * DAY_SECONDS + sod;
    }
    default:
        return stamp;
    }
}
