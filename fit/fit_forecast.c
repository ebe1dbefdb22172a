/* fit_forecast.c - ARMA mean forecasts, psi-weight error variances and GARCH variance paths. */
#include "fit_forecast.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_randist.h>

fit_forecast *fit_forecast_alloc(int h)
{
    if (h < 1)
        return NULL;
    fit_forecast *fc = calloc(1, sizeof *fc);
    if (!fc)
        return NULL;
    size_t m = (size_t)h;
    fc->h = h;
    fc->mean = malloc(m * sizeof *fc->mean);
    fc->se = malloc(m * sizeof *fc->se);
    fc->lo = malloc(m * sizeof *fc->lo);
    fc->hi = malloc(m * sizeof *fc->hi);
    fc->cond_var = malloc(m * sizeof *fc->cond_var);
    fc->psi = malloc(m * sizeof *fc->psi);
    if (!fc->mean || !fc->se || !fc->lo || !fc->hi || !fc->cond_var || !fc->psi) {
        fit_forecast_free(fc);
        return NULL;
    }
    return fc;
}

void fit_forecast_free(fit_forecast *fc)
{
    if (!fc)
        return;
    free(fc->mean);
    free(fc->se);
    free(fc->lo);
    free(fc->hi);
    free(fc->cond_var);
    free(fc->psi);
    free(fc);
}

/* Dense coefficient arrays by lag (index lag-1) of the AR and MA parts. */
static void dense_coef(const fit_result *fr, double *ar, int P, double *ma, int Q)
{
    const fit_spec *s = &fr->spec;
    const int off = s->mean ? 1 : 0;
    for (int k = 0; k < P; k++)
        ar[k] = 0.0;
    for (int k = 0; k < Q; k++)
        ma[k] = 0.0;
    for (int i = 0; i < s->n_ar; i++)
        ar[s->ar_lag[i] - 1] = fr->par[off + i];
    for (int j = 0; j < s->n_ma; j++)
        ma[s->ma_lag[j] - 1] = fr->par[off + s->n_ar + j];
}

int fit_forecast_run(const fit_result *fr, const double *y, size_t n, double level,
                     fit_forecast *fc)
{
    if (!fr || !y || !fc || fc->h < 1 || n != fr->n || n == 0 || !fr->resid ||
        !(level > 0.0 && level < 1.0) || fr->start >= n)
        return HN_EINVAL;
    const fit_spec *s = &fr->spec;
    const int P = fit_spec_max_ar(s), Q = fit_spec_max_ma(s), h = fc->h;
    const double mu = s->mean ? fr->par[0] : 0.0;
    const size_t T = n - 1, start = fr->start;
    if (s->garch && !fr->sigma_t)
        return HN_EINVAL;

    /* Work: dense AR/MA coefficients, then the extended paths of y and e over
     * the last max(P, Q) times and the h future ones. */
    const size_t back = (size_t)(P > Q ? P : Q);
    const size_t len = back + (size_t)h;
    double *buf = malloc(((size_t)P + (size_t)Q + 2 * len) * sizeof *buf);
    if (!buf)
        return HN_ENOMEM;
    double *ar = buf, *ma = buf + P, *yp = ma + Q, *ep = yp + len;
    dense_coef(fr, ar, P, ma, Q);
    /* yp[i], ep[i] hold time T - back + 1 + i; times before 0 never get read
     * for y (the first residual is at the max AR lag), and shocks before the
     * first residual are zero. */
    for (size_t i = 0; i < back; i++) {
        size_t need = back - i;              /* time T + 1 - need */
        if (need > T + 1) {
            yp[i] = mu;
            ep[i] = 0.0;
            continue;
        }
        size_t t = T + 1 - need;
        yp[i] = y[t];
        ep[i] = t >= start ? fr->resid[t - start] : 0.0;
    }
    for (int k = 0; k < h; k++) {
        size_t i = back + (size_t)k;
        double v = mu;
        for (int l = 1; l <= P; l++)
            v += ar[l - 1] * (yp[i - (size_t)l] - mu);
        for (int l = 1; l <= Q; l++)
            v += ma[l - 1] * ep[i - (size_t)l];
        yp[i] = v;
        ep[i] = 0.0;
        fc->mean[k] = v;
    }

    /* psi_0 = 1, psi_j = ma_j + sum_{i=1..min(j,P)} ar_i psi_{j-i}. */
    for (int j = 0; j < h; j++) {
        double v = j == 0 ? 1.0 : (j <= Q ? ma[j - 1] : 0.0);
        for (int i = 1; i <= P && i <= j; i++)
            v += ar[i - 1] * fc->psi[j - i];
        fc->psi[j] = v;
    }

    /* Innovation variance path. */
    if (s->garch) {
        const int io = (s->mean ? 1 : 0) + s->n_ar + s->n_ma;
        const double omega = fr->par[io], alpha = fr->par[io + 1], beta = fr->par[io + 2];
        const double eT = fr->resid[fr->n_eff - 1], sT = fr->sigma_t[fr->n_eff - 1];
        fc->cond_var[0] = omega + alpha * eT * eT + beta * sT * sT;
        for (int k = 1; k < h; k++)
            fc->cond_var[k] = omega + (alpha + beta) * fc->cond_var[k - 1];
    } else {
        for (int k = 0; k < h; k++)
            fc->cond_var[k] = fr->sigma2;
    }

    double q;
    const double pr = 0.5 * (1.0 + level);
    if (s->dist == FIT_DIST_T) {
        double nu = fr->par[fr->np - 1];
        /* Two Newton steps on the distribution function make the quantile
         * agree with it to rounding level. */
        double x = gsl_cdf_tdist_Pinv(pr, nu);
        for (int it = 0; it < 2; it++) {
            double d = gsl_ran_tdist_pdf(x, nu);
            if (d > 0.0)
                x -= (gsl_cdf_tdist_P(x, nu) - pr) / d;
        }
        q = x * sqrt((nu - 2.0) / nu);
    } else {
        q = gsl_cdf_ugaussian_Pinv(pr);
    }
    fc->level = level;
    fc->quantile = q;
    int rc = HN_OK;
    for (int k = 0; k < h; k++) {
        /* se_k^2 = sum_{j=0}^{k} psi_j^2 v_{T+k+1-j} (0-based k). */
        double v = 0.0;
        for (int j = 0; j <= k; j++)
            v += fc->psi[j] * fc->psi[j] * fc->cond_var[k - j];
        fc->se[k] = sqrt(v);
        fc->lo[k] = fc->mean[k] - q * fc->se[k];
        fc->hi[k] = fc->mean[k] + q * fc->se[k];
        if (!isfinite(fc->mean[k]) || !isfinite(fc->se[k]))
            rc = HN_ENUMERIC;
    }
    free(buf);
    return rc;
}
