/* sh_chart.c - constructors and shared computations for chart descriptions. */
#include "sh_chart.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>

static void chart_init(sh_chart *c, sh_chart_kind kind, const char *title)
{
    memset(c, 0, sizeof *c);
    c->kind = kind;
    c->title = title;
    c->x0 = 1.0;
    c->dx = 1.0;
    c->first_lag = 1;
    c->standardise = 1;
}

static void set_first(sh_chart *c, const double *y, size_t n, const char *label)
{
    c->series[0].y = y;
    c->series[0].n = y ? n : 0;
    c->series[0].label = label;
    c->nseries = 1;
}

void sh_chart_line(sh_chart *c, const char *title, const double *y, size_t n,
                   const char *label)
{
    chart_init(c, SH_CHART_LINE, title);
    set_first(c, y, n, label);
}

int sh_chart_add_series(sh_chart *c, const double *y, size_t n, const char *label)
{
    if (c->nseries >= SH_CHART_MAX_SERIES)
        return -1;
    c->series[c->nseries].y = y;
    c->series[c->nseries].n = y ? n : 0;
    c->series[c->nseries].label = label;
    c->nseries++;
    return 0;
}

int sh_chart_add_ref(sh_chart *c, double y, const char *label)
{
    if (c->nrefs >= SH_CHART_MAX_REFS)
        return -1;
    c->refs[c->nrefs].y = y;
    c->refs[c->nrefs].label = label;
    c->nrefs++;
    return 0;
}

void sh_chart_corr(sh_chart *c, const char *title, const double *r, size_t m, double band)
{
    chart_init(c, SH_CHART_CORR, title);
    set_first(c, r, m, NULL);
    c->band = band > 0.0 && isfinite(band) ? band : 0.0;
    c->xlabel = "lag";
}

void sh_chart_qq(sh_chart *c, const char *title, const double *v, size_t n)
{
    chart_init(c, SH_CHART_QQ, title);
    set_first(c, v, n, NULL);
    c->xlabel = "normal quantile";
    c->ylabel = "standardised value";
}

void sh_chart_profile(sh_chart *c, const char *title, const double *p, size_t m,
                      double alpha, int log_scale)
{
    chart_init(c, SH_CHART_PROFILE, title);
    set_first(c, p, m, NULL);
    c->alpha = alpha > 0.0 && alpha < 1.0 ? alpha : 0.0;
    c->log_scale = log_scale != 0;
    c->xlabel = "lag";
    c->ylabel = "p-value";
}

void sh_chart_fan(sh_chart *c, const char *title, const double *hist, size_t n,
                  const double *mean, size_t h)
{
    chart_init(c, SH_CHART_FAN, title);
    set_first(c, hist, n, "observed");
    c->fan_mean = mean;
    c->fan_h = mean ? h : 0;
}

int sh_chart_fan_level(sh_chart *c, const double *lo, const double *hi, double level)
{
    if (c->nlevels >= 2 || !lo || !hi)
        return -1;
    c->fan_lo[c->nlevels] = lo;
    c->fan_hi[c->nlevels] = hi;
    c->fan_level[c->nlevels] = level;
    c->nlevels++;
    return 0;
}

size_t sh_chart_range(const double *y, size_t n, double *lo, double *hi)
{
    size_t k = 0;
    if (!y)
        return 0;
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(y[i]))
            continue;
        if (y[i] < *lo) *lo = y[i];
        if (y[i] > *hi) *hi = y[i];
        k++;
    }
    return k;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

int sh_chart_qq_points(const sh_chart *c, double **xq, double **yq, size_t *k)
{
    const double *v = c->series[0].y;
    size_t n = c->nseries > 0 ? c->series[0].n : 0, m = 0;
    *xq = *yq = NULL;
    *k = 0;
    for (size_t i = 0; i < n; i++)
        if (isfinite(v[i]))
            m++;
    if (m == 0)
        return 0;
    double *x = malloc(m * sizeof *x), *y = malloc(m * sizeof *y);
    if (!x || !y) {
        free(x);
        free(y);
        return -1;
    }
    m = 0;
    for (size_t i = 0; i < n; i++)
        if (isfinite(v[i]))
            y[m++] = v[i];
    qsort(y, m, sizeof *y, cmp_double);

    if (c->standardise) {
        /* Two passes: the mean, then deviations with the first-pass error
         * folded back (the corrected two-pass algorithm). */
        double s = 0.0;
        for (size_t i = 0; i < m; i++)
            s += y[i];
        double mean = s / (double)m, ss = 0.0, sd = 0.0;
        for (size_t i = 0; i < m; i++)
            sd += y[i] - mean;
        mean += sd / (double)m;
        for (size_t i = 0; i < m; i++) {
            double d = y[i] - mean;
            ss += d * d;
        }
        double scale = m > 1 && ss > 0.0 ? sqrt(ss / (double)(m - 1)) : 1.0;
        for (size_t i = 0; i < m; i++)
            y[i] = (y[i] - mean) / scale;
    }
    for (size_t i = 0; i < m; i++) {
        double pp = ((double)(i + 1) - 0.375) / ((double)m + 0.25);
        x[i] = gsl_cdf_ugaussian_Pinv(pp);
    }
    *xq = x;
    *yq = y;
    *k = m;
    return 0;
}
