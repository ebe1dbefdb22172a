/* sh_chart.h - one chart description shared by the terminal and the cairo renderers.
 *
 * A chart borrows the caller's arrays (nothing is copied); the caller keeps
 * them alive until it has rendered the chart.  NaN and infinite values are
 * skipped by every renderer (a gap in a line, no bar, no point).
 *
 * Kinds and what they read:
 *   SH_CHART_LINE     series[0..nseries-1] against x = x0 + i*dx, reference lines refs[]
 *   SH_CHART_CORR     series[0] = correlations at lags first_lag, first_lag+1, ...;
 *                     band > 0 draws +-band (or band_lag[i] per lag when not NULL)
 *   SH_CHART_QQ       series[0] = raw values; standardised (two-pass mean, sd with
 *                     divisor n-1) when standardise is 1, then plotted against normal
 *                     quantiles at Blom's positions (i - 3/8) / (n + 1/4), with y = x
 *   SH_CHART_PROFILE  series[0] = p-values at lags first_lag, ...; alpha line;
 *                     log_scale 1 puts p on a log10 axis
 *   SH_CHART_FAN      series[0] = history; fan_mean[0..fan_h-1] follows it at
 *                     x = x0 + (n + j)*dx; fan_lo/fan_hi at nlevels (1 or 2) levels,
 *                     level 0 the wider (e.g. 95%), level 1 the narrower (e.g. 80%)
 */
#ifndef SH_CHART_H
#define SH_CHART_H

#include <stddef.h>

#define SH_CHART_MAX_SERIES 4
#define SH_CHART_MAX_REFS 6

typedef enum {
    SH_CHART_LINE = 0,
    SH_CHART_CORR,
    SH_CHART_QQ,
    SH_CHART_PROFILE,
    SH_CHART_FAN
} sh_chart_kind;

typedef struct {
    const double *y;      /* values, borrowed */
    size_t n;             /* count */
    const char *label;    /* legend text, may be NULL */
} sh_chart_series;

typedef struct {
    double y;             /* height of the horizontal line */
    const char *label;    /* legend text, may be NULL */
} sh_chart_ref;

typedef struct {
    sh_chart_kind kind;
    const char *title;    /* may be NULL */
    const char *xlabel;   /* may be NULL */
    const char *ylabel;   /* may be NULL */
    sh_chart_series series[SH_CHART_MAX_SERIES];
    int nseries;
    sh_chart_ref refs[SH_CHART_MAX_REFS];
    int nrefs;
    double x0, dx;        /* x of point i is x0 + i*dx (LINE, FAN); default 1, 1 */
    int first_lag;        /* CORR, PROFILE: lag of the first value; default 1 */
    double band;          /* CORR: half-width of the band, 0 for none */
    const double *band_lag; /* CORR: per-lag half-widths (length series[0].n) or NULL */
    int standardise;      /* QQ: 1 standardise the values first (default) */
    double alpha;         /* PROFILE: significance level line, 0 for none */
    int log_scale;        /* PROFILE: 1 for a log10 p axis */
    const double *fan_mean; /* FAN: forecast means (length fan_h) */
    const double *fan_lo[2], *fan_hi[2]; /* FAN: interval bounds per level */
    double fan_level[2];  /* FAN: levels in percent, for the legend */
    int nlevels;          /* FAN: 0, 1 or 2 */
    size_t fan_h;         /* FAN: forecast horizon */
} sh_chart;

/* Line chart of Y[0..N-1] labelled LABEL; all other fields at their defaults.
 * Strings and arrays are borrowed. */
void sh_chart_line(sh_chart *c, const char *title, const double *y, size_t n,
                   const char *label);

/* Overlay one more series on a LINE chart.  Returns 0, or -1 when
 * SH_CHART_MAX_SERIES are already present. */
int sh_chart_add_series(sh_chart *c, const double *y, size_t n, const char *label);

/* Add a horizontal reference line at Y.  Returns 0, or -1 when full. */
int sh_chart_add_ref(sh_chart *c, double y, const char *label);

/* Correlogram of R[0..M-1] (lag 1 first) with a constant band of half-width
 * BAND (0 for none). */
void sh_chart_corr(sh_chart *c, const char *title, const double *r, size_t m, double band);

/* Normal QQ plot of the values V[0..N-1], standardised first. */
void sh_chart_qq(sh_chart *c, const char *title, const double *v, size_t n);

/* Profile of p-values P[0..M-1] (lag 1 first) with the ALPHA line; LOG_SCALE 1
 * for a log10 axis. */
void sh_chart_profile(sh_chart *c, const char *title, const double *p, size_t m,
                      double alpha, int log_scale);

/* Forecast fan: history HIST[0..N-1], then MEAN[0..H-1] with no band; add the
 * bands with sh_chart_fan_level. */
void sh_chart_fan(sh_chart *c, const char *title, const double *hist, size_t n,
                  const double *mean, size_t h);

/* Add one interval band LO/HI (length fan_h) at LEVEL percent to a FAN chart;
 * add the wider band first.  Returns 0, or -1 when two are already present. */
int sh_chart_fan_level(sh_chart *c, const double *lo, const double *hi, double level);

/* QQ points of a chart of kind SH_CHART_QQ: for the K finite values of
 * series[0], fills *XQ with normal quantiles and *YQ with the sorted
 * (standardised, if asked) values, both malloc'd arrays of length K that the
 * caller frees with free().  K = 0 leaves both NULL.  A constant series
 * cannot be standardised and yields its values minus the mean.
 * Returns 0 and sets *K, or -1 when memory runs out. */
int sh_chart_qq_points(const sh_chart *c, double **xq, double **yq, size_t *k);

/* Smallest and largest finite value of Y[0..N-1] folded into *LO and *HI
 * (which the caller starts at +INFINITY and -INFINITY).  Returns how many
 * finite values there were. */
size_t sh_chart_range(const double *y, size_t n, double *lo, double *hi);

#endif
