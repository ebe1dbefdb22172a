/* fit_sim.c - seeded simulation of ARMA means with optional GARCH(1,1) variance (recipe in fit_sim.h). */
#include "fit_sim.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>

#include <gsl/gsl_randist.h>
#include <gsl/gsl_rng.h>

int fit_simulate(const fit_spec *spec, const double *par, size_t n, size_t burn,
                 unsigned long seed, double *out)
{
    if (!spec || !par || !out || n == 0)
        return HN_EINVAL;
    if (spec->dist == FIT_DIST_T && !spec->garch)
        return HN_EINVAL;
    const int off = spec->mean ? 1 : 0, nar = spec->n_ar, nma = spec->n_ma;
    const double mu = spec->mean ? par[0] : 0.0;
    const double *ar = par + off, *ma = par + off + nar;
    const double *vp = par + off + nar + nma;
    double omega = 0.0, alpha = 0.0, beta = 0.0, nu = 0.0, sigma2 = 0.0;
    if (spec->garch) {
        omega = vp[0];
        alpha = vp[1];
        beta = vp[2];
        if (!(omega > 0.0) || !(alpha >= 0.0) || !(beta >= 0.0) || !(alpha + beta < 1.0))
            return HN_EDOMAIN;
        if (spec->dist == FIT_DIST_T) {
            nu = vp[3];
            if (!(nu > 2.0) || !isfinite(nu))
                return HN_EDOMAIN;
        }
    } else {
        sigma2 = vp[0];
        if (!(sigma2 > 0.0) || !isfinite(sigma2))
            return HN_EDOMAIN;
    }

    const size_t total = burn + n;
    if (total < n)
        return HN_EINVAL;
    /* full paths of y and e: the lags reach back up to FIT_MAX_LAG */
    double *y = malloc(total * sizeof *y), *e = malloc(total * sizeof *e);
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    if (!y || !e || !r) {
        free(y);
        free(e);
        if (r) gsl_rng_free(r);
        return HN_ENOMEM;
    }
    gsl_rng_set(r, seed);
    const double tscale = spec->dist == FIT_DIST_T ? sqrt((nu - 2.0) / nu) : 1.0;
    double h = spec->garch ? omega / (1.0 - alpha - beta) : sigma2;
    int rc = HN_OK;
    for (size_t t = 0; t < total; t++) {
        double z = spec->dist == FIT_DIST_T ? gsl_ran_tdist(r, nu) * tscale
                                            : gsl_ran_gaussian(r, 1.0);
        if (spec->garch && t > 0)
            h = omega + alpha * e[t - 1] * e[t - 1] + beta * h;
        double et = sqrt(h) * z;
        double v = mu + et;
        for (int i = 0; i < nar; i++) {
            size_t l = (size_t)spec->ar_lag[i];
            if (t >= l)
                v += ar[i] * (y[t - l] - mu);
        }
        for (int j = 0; j < nma; j++) {
            size_t l = (size_t)spec->ma_lag[j];
            if (t >= l)
                v += ma[j] * e[t - l];
        }
        e[t] = et;
        y[t] = v;
        if (!isfinite(v)) {
            rc = HN_ENUMERIC;
            break;
        }
    }
    if (rc == HN_OK)
        for (size_t k = 0; k < n; k++)
            out[k] = y[burn + k];
    gsl_rng_free(r);
    free(y);
    free(e);
    return rc;
}
