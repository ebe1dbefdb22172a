/* sh_time.h - ISO 8601 time cells: parsing, formatting and frequency detection. */
#ifndef SH_TIME_H
#define SH_TIME_H

#include <stddef.h>
#include <stdint.h>

/* Stamps are int64 seconds since 1970-01-01T00:00:00 UTC (proleptic
 * Gregorian calendar, years 0000-9999).  A date stands for 00:00 of that
 * day, a month for its first day, a quarter for the first day of its first
 * month, a year for 1 January.  Times without a zone are taken as UTC; a
 * zone suffix (Z, +hh:mm, -hh:mm, +hhmm) is converted to UTC. */

/* How a time column is written (all cells of one column share one kind). */
typedef enum {
    SH_TIME_NONE = 0,
    SH_TIME_YEAR,      /* YYYY (accepted only where allowed, see sh_time_parse) */
    SH_TIME_QUARTER,   /* YYYY-Qn (also YYYYQn, q in either case) */
    SH_TIME_MONTH,     /* YYYY-MM */
    SH_TIME_DATE,      /* YYYY-MM-DD */
    SH_TIME_DATETIME   /* YYYY-MM-DDThh:mm[:ss][zone]; a blank may stand for T */
} sh_time_kind;

/* Sampling frequency of a time column, with its usual seasonal period. */
typedef enum {
    SH_FREQ_NONE = 0,   /* no time column, or fewer than 2 stamps; season 0 */
    SH_FREQ_HOURLY,     /* season 24 */
    SH_FREQ_DAILY,      /* season 7 */
    SH_FREQ_BUSINESS,   /* Monday-Friday days, weekends skipped; season 5 */
    SH_FREQ_WEEKLY,     /* season 52 */
    SH_FREQ_MONTHLY,    /* season 12 */
    SH_FREQ_QUARTERLY,  /* season 4 */
    SH_FREQ_YEARLY,     /* season 1 */
    SH_FREQ_IRREGULAR   /* no regular step found; season 0 */
} sh_freq;

/* What sh_freq_detect found.  A gap is an interval between consecutive
 * stamps longer than one period of the detected frequency. */
typedef struct {
    int freq;               /* sh_freq */
    int season;             /* seasonal period for FREQ (see sh_freq) */
    size_t n_gaps;          /* intervals longer than one period */
    size_t n_gap_periods;   /* periods missing in all gaps together */
    size_t first_gap;       /* index i of the first gap (between stamp i-1 and i); 0 if none */
} sh_freq_info;

/* Parse the LEN bytes at S (blanks around are ignored) as an ISO 8601 time.
 * ALLOW_YEAR: also accept a bare YYYY (only sensible for a column known to
 * hold times, since numbers look the same).  On success stores the stamp in
 * *STAMP and the kind in *KIND and returns 0.  On failure returns -1 and,
 * when WHY is not NULL, writes a short reason (WHYLEN bytes). */
int sh_time_parse(const char *s, size_t len, int allow_year, int64_t *stamp, int *kind,
                  char *why, size_t whylen);

/* Write STAMP as text of KIND (DATETIME as YYYY-MM-DDThh:mm:ss, UTC) into
 * BUF (LEN bytes).  Returns BUF. */
char *sh_time_format(int64_t stamp, int kind, char *buf, size_t len);

/* Detect the frequency of N stamps (strictly increasing) of KIND and count
 * gaps; fills *OUT.  Returns 0 (HN_OK), or HN_EINVAL for NULL arguments.
 * Rules: a step unit u fits when every interval is a whole multiple of u and
 * at least half the intervals are exactly u.  Dates that share their day of
 * month (or are all month ends) are tried as monthly (u = 1 month), quarterly
 * (3) and yearly (12); other dates as business daily (no weekend dates and
 * at least one Friday-to-Monday step; u = 1 weekday), daily (1 day) and
 * weekly (7 days); date-times whose time of day varies as hourly; months as
 * monthly, quarterly, yearly; quarters as quarterly; years as yearly.  The
 * first unit that fits wins; none fits: SH_FREQ_IRREGULAR. */
int sh_freq_detect(const int64_t *stamp, size_t n, int kind, sh_freq_info *out);

/* Lower-case English name of a frequency ("daily", "business daily",
 * "monthly", ..., "none", "irregular"); static storage. */
const char *sh_freq_name(int freq);

/* Seasonal period of a frequency (24, 7, 5, 52, 12, 4, 1; 0 for none/irregular). */
int sh_freq_season(int freq);

/* STAMP moved K periods (K may be negative) at frequency FREQ: months add
 * calendar months keeping the day of month (a month end stays a month end,
 * other days are clamped to the month's length); business days skip Saturday
 * and Sunday.  Returns STAMP unchanged for NONE and IRREGULAR. */
int64_t sh_time_advance(int64_t stamp, int freq, long k);

/* Days since 1970-01-01 of a proleptic Gregorian date (MONTH 1-12, DAY 1-31),
 * and the inverse. */
int64_t sh_days_from_civil(long year, int month, int day);
void sh_civil_from_days(int64_t days, long *year, int *month, int *day);

#endif
