/* diag_unitroot.c - ADF and KPSS tests with published critical values, and the advice to difference. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_multifit.h>

#include "diag_stats.h"
#include "diag_unitroot.h"
#include "hn_status.h"

const double diag_ur_levels[DIAG_UR_NLEVELS] = {0.01, 0.05, 0.10};

/* MacKinnon, J. G. (2010), "Critical Values for Cointegration Tests",
 * Queen's Economics Department Working Paper 1227, response-surface
 * estimates for N = 1 (tau_nc, tau_c, tau_ct) at 1, 5, 10 %:
 * b_inf, b_1, b_2, b_3.  Must equal reference/tables/adf_mackinnon2010_tau_N1.csv
 * (a unit test compares them). */
static const double adf_beta[DIAG_ADF_NCASE][DIAG_UR_NLEVELS][4] = {
    /* no constant */
    {{-2.56574, -2.2358, -3.627, 0.0},
     {-1.94100, -0.2686, -3.365, 31.223},
     {-1.61682, 0.2656, -2.714, 25.364}},
    /* constant */
    {{-3.43035, -6.5393, -16.786, -79.433},
     {-2.86154, -2.8903, -4.234, -40.040},
     {-2.56677, -1.5384, -2.809, 0.0}},
    /* constant and trend */
    {{-3.95877, -9.0531, -28.428, -134.155},
     {-3.41049, -4.3904, -9.036, -45.374},
     {-3.12705, -2.5856, -3.925, -22.380}},
};

/* Kwiatkowski, Phillips, Schmidt and Shin (1992), J. Econometrics 54,
 * Table 1: upper-tail asymptotic critical values at 1, 5, 10 % of eta_mu
 * (level) and eta_tau (trend).  Must equal reference/tables/kpss1992_table1.csv. */
static const double kpss_cv[2][DIAG_UR_NLEVELS] = {
    {0.739, 0.463, 0.347},
    {0.216, 0.146, 0.119},
};

static int level_index(double level)
{
    for (int i = 0; i < DIAG_UR_NLEVELS; i++)
        if (fabs(level - diag_ur_levels[i]) < 1e-12)
            return i;
    return -1;
}

/* Coefficients of case C at LEVEL into BETA[4]; HN_OK or HN_EINVAL. */
int diag_adf_surface(diag_adf_case c, double level, double beta[4])
{
    int i = level_index(level);
    if ((int)c < 0 || c >= DIAG_ADF_NCASE || i < 0 || !beta)
        return HN_EINVAL;
    memcpy(beta, adf_beta[c][i], 4 * sizeof *beta);
    return HN_OK;
}

/* C(T) = b_inf + b_1/T + b_2/T^2 + b_3/T^3 of case C at LEVEL into *CV;
 * HN_OK or HN_EINVAL (T must be >= 1). */
int diag_adf_critical(diag_adf_case c, double level, size_t T, double *cv)
{
    double b[4];
    if (T < 1 || !cv || diag_adf_surface(c, level, b) != HN_OK)
        return HN_EINVAL;
    double r = 1.0 / (double)T;
    *cv = b[0] + r * (b[1] + r * (b[2] + r * b[3]));
    return HN_OK;
}

/* KPSS Table 1 value of case C at LEVEL; HN_OK or HN_EINVAL. */
int diag_kpss_critical(diag_kpss_case c, double level, double *cv)
{
    int i = level_index(level);
    if ((c != DIAG_KPSS_LEVEL && c != DIAG_KPSS_TREND) || i < 0 || !cv)
        return HN_EINVAL;
    *cv = kpss_cv[c][i];
    return HN_OK;
}

static void ur_invalid(diag_ur_test *t, const char *name, int det, const char *why)
{
    memset(t, 0, sizeof *t);
    t->name = name;
    t->valid = 0;
    t->deterministic = det;
    t->statistic = NAN;
    t->p = NAN;
    for (int i = 0; i < DIAG_UR_NLEVELS; i++)
        t->crit[i] = NAN;
    snprintf(t->detail, sizeof t->detail, "%s", why);
}

/* ---- ADF ---- */

static size_t n_det(diag_adf_case c)
{
    return c == DIAG_ADF_NONE ? 0 : c == DIAG_ADF_CONST ? 1 : 2;
}

/* Largest lag by Schwert's rule, kept so that rows - columns >= 10. */
int diag_adf_maxlag(size_t n, diag_adf_case c)
{
    if ((int)c < 0 || c >= DIAG_ADF_NCASE)
        return -1;
    size_t det = n_det(c);
    /* rows = n - 1 - k, columns = 1 + k + det */
    if (n < 12 + det)
        return -1;
    int k = (int)floor(12.0 * pow((double)n / 100.0, 0.25));
    int cap = (int)((n - 12 - det) / 2);
    return k < cap ? k : cap;
}

typedef struct {
    double tau;      /* t of y_{t-1} */
    double t_last;   /* t of the last lagged difference (0 when k = 0) */
    size_t rows;
} adf_fit;

/* OLS of the ADF regression with K lags over rows t = FIRST..n-1 (0-based
 * time index), FIRST >= K + 1.  DY[t] = y[t] - y[t-1] for t >= 1. */
static int adf_regress(const double *y, const double *dy, size_t n, diag_adf_case c, int k,
                       size_t first, adf_fit *f)
{
    size_t det = n_det(c), rows = n - first, cols = 1 + (size_t)k + det;
    int rc = HN_OK;
    gsl_matrix *X = gsl_matrix_alloc(rows, cols);
    gsl_vector *v = gsl_vector_alloc(rows);
    gsl_vector *b = gsl_vector_alloc(cols);
    gsl_matrix *cov = gsl_matrix_alloc(cols, cols);
    gsl_multifit_linear_workspace *w = gsl_multifit_linear_alloc(rows, cols);
    if (!X || !v || !b || !cov || !w) {
        rc = HN_ENOMEM;
        goto done;
    }
    for (size_t i = 0; i < rows; i++) {
        size_t t = first + i, j = 0;
        gsl_matrix_set(X, i, j++, y[t - 1]);
        for (int l = 1; l <= k; l++)
            gsl_matrix_set(X, i, j++, dy[t - (size_t)l]);
        if (det >= 1)
            gsl_matrix_set(X, i, j++, 1.0);
        if (det >= 2)
            gsl_matrix_set(X, i, j++, (double)t);
        gsl_vector_set(v, i, dy[t]);
    }
    double chisq;
    size_t rank;
    int st = gsl_multifit_linear_tsvd(X, v, GSL_DBL_EPSILON * (double)rows, b, cov, &chisq, &rank, w);
    if (st != GSL_SUCCESS || rank < cols) {
        rc = HN_ESINGULAR;
        goto done;
    }
    double sdy = 0.0;
    for (size_t i = 0; i < rows; i++)
        sdy += gsl_vector_get(v, i) * gsl_vector_get(v, i);
    if (!(chisq > 1e-24 * sdy)) {   /* exact fit: nothing left to test */
        rc = HN_ECONST;
        goto done;
    }
    /* cov = s^2 (X'X)^{-1}, s^2 = chisq / (rows - cols) */
    double v0 = gsl_matrix_get(cov, 0, 0);
    f->tau = gsl_vector_get(b, 0) / sqrt(v0);
    f->t_last = k > 0 ? gsl_vector_get(b, (size_t)k) / sqrt(gsl_matrix_get(cov, (size_t)k, (size_t)k)) : 0.0;
    f->rows = rows;
    if (!isfinite(f->tau) || !isfinite(f->t_last))
        rc = HN_ENUMERIC;
done:
    gsl_matrix_free(X);
    gsl_vector_free(v);
    gsl_vector_free(b);
    gsl_matrix_free(cov);
    if (w)
        gsl_multifit_linear_free(w);
    return rc;
}

/* p of T->statistic from T->crit.  ADF (KPSS = 0): the normal quantile of p
 * is interpolated linearly against tau between the tabulated points.  KPSS:
 * p itself is interpolated linearly against eta.  Outside the table p is
 * clamped to the end level and p_bound set. */
static void interp_p(diag_ur_test *t, int kpss)
{
    const double *cv = t->crit, *lv = diag_ur_levels;
    double s = t->statistic;
    /* order the points by increasing evidence against the null:
     * ADF: cv[0] < cv[1] < cv[2] and rejection for small tau;
     * KPSS: cv[0] > cv[1] > cv[2] and rejection for large eta. */
    double sign = kpss ? -1.0 : 1.0;
    if (sign * s <= sign * cv[0]) {
        t->p = lv[0];
        t->p_bound = -1;
        return;
    }
    if (sign * s >= sign * cv[DIAG_UR_NLEVELS - 1]) {
        t->p = lv[DIAG_UR_NLEVELS - 1];
        t->p_bound = 1;
        return;
    }
    t->p_bound = 0;
    for (int i = 0; i + 1 < DIAG_UR_NLEVELS; i++) {
        double a = cv[i], b = cv[i + 1];
        if (sign * s >= sign * a && sign * s <= sign * b) {
            double u = (s - a) / (b - a);
            if (kpss) {
                t->p = lv[i] + u * (lv[i + 1] - lv[i]);
            } else {
                double qa = gsl_cdf_ugaussian_Pinv(lv[i]), qb = gsl_cdf_ugaussian_Pinv(lv[i + 1]);
                t->p = gsl_cdf_ugaussian_P(qa + u * (qb - qa));
            }
            return;
        }
    }
}

static const char *adf_case_words(diag_adf_case c)
{
    return c == DIAG_ADF_NONE ? "no constant" : c == DIAG_ADF_CONST ? "constant" : "constant and trend";
}

int diag_adf(const double *y, size_t n, diag_adf_case c, int lags, double level, diag_ur_test *out)
{
    const char *name = "adf";
    int li = level_index(level);
    if (!y || !out || (int)c < 0 || c >= DIAG_ADF_NCASE || li < 0) {
        if (out)
            ur_invalid(out, name, (int)c, "needs data, a known case and a level of 0.01, 0.05 or 0.10");
        return HN_EINVAL;
    }
    int kmax = diag_adf_maxlag(n, c);
    if (kmax < 0) {
        ur_invalid(out, name, (int)c, "too few observations for the ADF regression");
        return HN_ESHORT;
    }
    if (lags > kmax) {
        ur_invalid(out, name, (int)c, "more lags asked than the series allows");
        return HN_ESHORT;
    }
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(y[i])) {
            ur_invalid(out, name, (int)c, "a value is not finite");
            return HN_ENUMERIC;
        }
    }
    double *dy = malloc(n * sizeof *dy);
    if (!dy) {
        ur_invalid(out, name, (int)c, "out of memory");
        return HN_ENOMEM;
    }
    dy[0] = 0.0;
    for (size_t t = 1; t < n; t++)
        dy[t] = y[t] - y[t - 1];

    gsl_error_handler_t *old = gsl_set_error_handler_off();
    int rc = HN_OK, k = lags;
    adf_fit f = {0};
    if (lags < 0) {
        /* general-to-specific on the common sample of kmax */
        for (k = kmax; k > 0; k--) {
            rc = adf_regress(y, dy, n, c, k, (size_t)kmax + 1, &f);
            if (rc != HN_OK)
                break;
            if (fabs(f.t_last) > 1.645)
                break;
        }
    }
    if (rc == HN_OK)
        rc = adf_regress(y, dy, n, c, k, (size_t)k + 1, &f);
    gsl_set_error_handler(old);
    free(dy);
    if (rc != HN_OK) {
        ur_invalid(out, name, (int)c,
                   rc == HN_ECONST ? "the regression fits exactly (no variation left)"
                   : rc == HN_ESINGULAR ? "the ADF regressors are collinear"
                   : rc == HN_ENOMEM ? "out of memory" : "a non-finite value arose");
        return rc;
    }
    memset(out, 0, sizeof *out);
    out->name = name;
    out->valid = 1;
    out->deterministic = (int)c;
    out->statistic = f.tau;
    out->lags = k;
    out->max_lags = lags < 0 ? kmax : lags;
    out->nobs = f.rows;
    for (int i = 0; i < DIAG_UR_NLEVELS; i++)
        diag_adf_critical(c, diag_ur_levels[i], f.rows, &out->crit[i]);
    interp_p(out, 0);
    out->reject = f.tau < out->crit[li];
    if (lags < 0)
        snprintf(out->detail, sizeof out->detail,
                 "ADF with %s, %d lagged differences (from at most %d by Schwert's rule, last lag kept "
                 "when |t| > 1.645), T = %zu; MacKinnon (2010) critical values; p interpolated, "
                 "clamped to 0.01..0.10",
                 adf_case_words(c), k, kmax, f.rows);
    else
        snprintf(out->detail, sizeof out->detail,
                 "ADF with %s, %d lagged differences (fixed), T = %zu; MacKinnon (2010) critical values; "
                 "p interpolated, clamped to 0.01..0.10",
                 adf_case_words(c), k, f.rows);
    return HN_OK;
}

/* ---- KPSS ---- */

int diag_kpss_bandwidth(size_t n)
{
    if (n < 3)
        return 0;
    int l = (int)floor(12.0 * pow((double)n / 100.0, 0.25));
    return l > (int)n - 2 ? (int)n - 2 : l;
}

int diag_kpss(const double *y, size_t n, diag_kpss_case c, int bandwidth, double level,
              diag_ur_test *out)
{
    const char *name = "kpss";
    int li = level_index(level);
    if (!y || !out || (c != DIAG_KPSS_LEVEL && c != DIAG_KPSS_TREND) || li < 0) {
        if (out)
            ur_invalid(out, name, (int)c, "needs data, a known case and a level of 0.01, 0.05 or 0.10");
        return HN_EINVAL;
    }
    if (n < 10) {
        ur_invalid(out, name, (int)c, "too few observations (10 needed)");
        return HN_ESHORT;
    }
    int l = bandwidth < 0 ? diag_kpss_bandwidth(n) : bandwidth;
    if (l > (int)n - 2) {
        ur_invalid(out, name, (int)c, "bandwidth too large for the series");
        return HN_EINVAL;
    }
    double *e = malloc(n * sizeof *e);
    if (!e) {
        ur_invalid(out, name, (int)c, "out of memory");
        return HN_ENOMEM;
    }
    int rc = diag_center(y, n, e);
    if (rc != HN_OK) {
        free(e);
        ur_invalid(out, name, (int)c, "a value is not finite");
        return rc;
    }
    double dn = (double)n, syy = 0.0;
    for (size_t t = 0; t < n; t++)
        syy += e[t] * e[t];
    if (c == DIAG_KPSS_TREND) {
        /* slope on the centred time index: e = (y - ybar) - b (t - tbar) */
        double tb = 0.5 * (dn - 1.0), sty = 0.0, stt = 0.0;
        for (size_t t = 0; t < n; t++) {
            double u = (double)t - tb;
            sty += u * e[t];
            stt += u * u;
        }
        double b = sty / stt;
        for (size_t t = 0; t < n; t++)
            e[t] -= b * ((double)t - tb);
    }
    /* partial sums and long-run variance */
    double S = 0.0, num = 0.0, g0 = 0.0;
    for (size_t t = 0; t < n; t++) {
        S += e[t];
        num += S * S;
        g0 += e[t] * e[t];
    }
    if (!(g0 > 1e-24 * syy)) {
        free(e);
        ur_invalid(out, name, (int)c, "no variation about the fitted level or trend");
        return HN_ECONST;
    }
    double lrv = g0;
    for (int s = 1; s <= l; s++) {
        double gs = 0.0;
        for (size_t t = (size_t)s; t < n; t++)
            gs += e[t] * e[t - (size_t)s];
        lrv += 2.0 * (1.0 - (double)s / (double)(l + 1)) * gs;
    }
    free(e);
    lrv /= dn;
    if (!(lrv > 0.0) || !isfinite(lrv)) {
        ur_invalid(out, name, (int)c, "the long-run variance estimate is not positive");
        return HN_ENUMERIC;
    }
    memset(out, 0, sizeof *out);
    out->name = name;
    out->valid = 1;
    out->deterministic = (int)c;
    out->statistic = num / (dn * dn * lrv);
    out->lags = l;
    out->max_lags = l;
    out->nobs = n;
    for (int i = 0; i < DIAG_UR_NLEVELS; i++)
        out->crit[i] = kpss_cv[c][i];
    interp_p(out, 1);
    out->reject = out->statistic > out->crit[li];
    snprintf(out->detail, sizeof out->detail,
             "KPSS about a %s, Bartlett bandwidth %d (%s); KPSS (1992) Table 1 critical values; "
             "p interpolated linearly in the table, clamped to 0.01..0.10",
             c == DIAG_KPSS_LEVEL ? "level" : "trend", l,
             bandwidth < 0 ? "rule floor(12 (n/100)^(1/4))" : "fixed");
    return HN_OK;
}

/* ---- both, and the advice ---- */

static void p_words(const diag_ur_test *t, char *buf, size_t cap)
{
    if (t->p_bound < 0)
        snprintf(buf, cap, "p <= %.2f", t->p);
    else if (t->p_bound > 0)
        snprintf(buf, cap, "p >= %.2f", t->p);
    else
        snprintf(buf, cap, "p = %.3f", t->p);
}

int diag_unitroot_check(const double *y, size_t n, int trend, double level, diag_unitroot *out)
{
    if (!out)
        return HN_EINVAL;
    memset(out, 0, sizeof *out);
    out->level = level;
    out->difference = -1;
    int ra = diag_adf(y, n, trend ? DIAG_ADF_TREND : DIAG_ADF_CONST, -1, level, &out->adf);
    int rk = diag_kpss(y, n, trend ? DIAG_KPSS_TREND : DIAG_KPSS_LEVEL, -1, level, &out->kpss);
    const char *about = trend ? "a trend" : "a level";
    if (ra != HN_OK || rk != HN_OK) {
        snprintf(out->conclusion, sizeof out->conclusion,
                 "no advice on differencing: %s", ra != HN_OK ? out->adf.detail : out->kpss.detail);
        return ra != HN_OK ? ra : rk;
    }
    char pa[32], pk[32];
    p_words(&out->adf, pa, sizeof pa);
    p_words(&out->kpss, pk, sizeof pk);
    int a = out->adf.reject, k = out->kpss.reject;
    if (a && !k) {
        out->difference = 0;
        snprintf(out->conclusion, sizeof out->conclusion,
                 "stationary about %s: ADF rejects a unit root (tau %.3f, %s) and KPSS does not reject "
                 "stationarity (eta %.3f, %s) at %g %%; no difference needed",
                 about, out->adf.statistic, pa, out->kpss.statistic, pk, 100.0 * level);
    } else if (!a && k) {
        out->difference = 1;
        snprintf(out->conclusion, sizeof out->conclusion,
                 "unit root: ADF does not reject a unit root (tau %.3f, %s) and KPSS rejects stationarity "
                 "(eta %.3f, %s) at %g %%; take a first difference and test the differences again",
                 out->adf.statistic, pa, out->kpss.statistic, pk, 100.0 * level);
    } else if (a && k) {
        snprintf(out->conclusion, sizeof out->conclusion,
                 "conflicting: ADF rejects a unit root (tau %.3f, %s) but KPSS also rejects stationarity "
                 "(eta %.3f, %s) at %g %%; long memory, a level shift or a trend may explain it; "
                 "compare models on levels and on differences",
                 out->adf.statistic, pa, out->kpss.statistic, pk, 100.0 * level);
    } else {
        snprintf(out->conclusion, sizeof out->conclusion,
                 "undecided: neither ADF (tau %.3f, %s) nor KPSS (eta %.3f, %s) rejects at %g %%; "
                 "the series is too short or too noisy to tell; compare models on levels and on differences",
                 out->adf.statistic, pa, out->kpss.statistic, pk, 100.0 * level);
    }
    return HN_OK;
}
