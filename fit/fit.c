/* fit.c - fit_model dispatcher, options, result helpers, criteria. */
#include "fit.h"
#include "fit_arma.h"
#include "fit_garch.h"
#include "fit_internal.h"
#include "fit_optim.h"
#include "hn_mem.h"
#include "hn_status.h"

#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

fit_options fit_default_options(void)
{
    fit_options o;
    o.max_iter = 1000;
    o.grad_tol = 1e-8;
    o.n_starts = 4;
    o.interrupt = NULL;
    return o;
}

size_t fit_min_obs(const fit_spec *spec)
{
    if (!spec)
        return 0;
    size_t k = 3 * (size_t)fit_spec_nparams(spec);
    size_t m = (size_t)fit_spec_max_ar(spec) + (k > 10 ? k : 10);
    if (spec->garch && m < 100)
        m = 100;
    return m;
}

double fit_work_bytes(const fit_spec *spec, size_t n)
{
    if (!spec)
        return 0.0;
    int k = (spec->mean ? 1 : 0) + spec->n_ar + spec->n_ma;
    double per = spec->garch ? 8.0 * (k + 5) : 40.0;
    return per * (double)n;
}

int fit_check_input(const double *y, size_t n, const fit_spec *spec)
{
    if (!spec || (!y && n > 0))
        return HN_EINVAL;
    if (spec->dist == FIT_DIST_T && !spec->garch)
        return HN_EINVAL;
    if (spec->n_ar < 0 || spec->n_ar > FIT_MAX_TERMS || spec->n_ma < 0 ||
        spec->n_ma > FIT_MAX_TERMS)
        return HN_EINVAL;
    for (int i = 0; i < spec->n_ar; i++)
        if (spec->ar_lag[i] < 1 || spec->ar_lag[i] > FIT_MAX_LAG ||
            (i > 0 && spec->ar_lag[i] <= spec->ar_lag[i - 1]))
            return HN_EINVAL;
    for (int j = 0; j < spec->n_ma; j++)
        if (spec->ma_lag[j] < 1 || spec->ma_lag[j] > FIT_MAX_LAG ||
            (j > 0 && spec->ma_lag[j] <= spec->ma_lag[j - 1]))
            return HN_EINVAL;
    /* a non-finite value anywhere outranks a value beyond the limit; the
     * first scan has no early exit, so that it vectorises, and only a value
     * outside the limit (NaN included) needs the second */
    typedef double v2d __attribute__((vector_size(16)));
    typedef long long v2i __attribute__((vector_size(16)));
    const v2d lim = { FIT_MAX_ABS_VALUE, FIT_MAX_ABS_VALUE };
    const v2i abs_bits = { INT64_MAX, INT64_MAX };
    v2i outv = { 0, 0 };
    size_t t0 = 0;
    for (; t0 + 2 <= n; t0 += 2) {      /* two at a time; a NaN compares false */
        v2d v;
        memcpy(&v, y + t0, sizeof v);
        outv |= ~((v2d)((v2i)v & abs_bits) <= lim);
    }
    int out = (outv[0] | outv[1]) != 0;
    for (; t0 < n; t0++)
        out |= !(fabs(y[t0]) <= FIT_MAX_ABS_VALUE);
    if (out) {
        for (size_t t = 0; t < n; t++)
            if (!isfinite(y[t]))
                return HN_EINVAL;
        return HN_ELIMIT;
    }
    if (fit_work_bytes(spec, n) > FIT_MAX_WORK_BYTES)
        return HN_ELIMIT;
    if (n < fit_min_obs(spec))
        return HN_ESHORT;
    for (size_t t = 1; t < n; t++)
        if (y[t] != y[0])
            return HN_OK;
    return HN_ECONST;
}

int fit_model(const double *y, size_t n, const fit_spec *spec,
              const fit_options *opt, fit_result *res)
{
    if (!res)
        return HN_EINVAL;
    memset(res, 0, sizeof *res);
    int rc = fit_check_input(y, n, spec);
    if (rc != HN_OK)
        return rc;
    fit_options o = opt ? *opt : fit_default_options();
    if (spec->garch)
        rc = fit_garch_estimate(y, n, spec, &o, res);
    else
        rc = fit_arma_estimate(y, n, spec, &o, res);
    if (rc != HN_OK) {
        fit_result_free(res);
        memset(res, 0, sizeof *res);
    }
    return rc;
}

void fit_result_free(fit_result *res)
{
    if (!res)
        return;
    free(res->cov);
    free(res->resid);
    free(res->sigma_t);
    free(res->std_resid);
    free(res->ar_roots);
    free(res->ma_roots);
    res->cov = res->resid = res->sigma_t = res->std_resid = NULL;
    res->ar_roots = res->ma_roots = NULL;
}

static int dup(void **dst, const void *src, size_t bytes)
{
    *dst = NULL;
    if (!src)
        return HN_OK;
    *dst = malloc(bytes ? bytes : 1);
    if (!*dst)
        return HN_ENOMEM;
    memcpy(*dst, src, bytes);
    return HN_OK;
}

int fit_result_copy(fit_result *dst, const fit_result *src)
{
    if (!dst || !src || dst == src)
        return HN_EINVAL;
    fit_result r = *src;
    size_t ne = src->n_eff * sizeof(double), nc = (size_t)src->np * (size_t)src->np * sizeof(double);
    int rc = HN_OK;
    void *p[6];
    rc |= dup(&p[0], src->cov, nc);
    rc |= dup(&p[1], src->resid, ne);
    rc |= dup(&p[2], src->sigma_t, ne);
    rc |= dup(&p[3], src->std_resid, ne);
    rc |= dup(&p[4], src->ar_roots, (size_t)src->n_ar_roots * sizeof(fit_complex));
    rc |= dup(&p[5], src->ma_roots, (size_t)src->n_ma_roots * sizeof(fit_complex));
    r.cov = p[0];
    r.resid = p[1];
    r.sigma_t = p[2];
    r.std_resid = p[3];
    r.ar_roots = p[4];
    r.ma_roots = p[5];
    if (rc != HN_OK) {
        fit_result_free(&r);
        memset(dst, 0, sizeof *dst);
        return HN_ENOMEM;
    }
    *dst = r;
    return HN_OK;
}

int fit_result_init(fit_result *res, const fit_spec *spec, size_t n, size_t start,
                    int with_sigma_t)
{
    if (!res || !spec || start >= n)
        return HN_EINVAL;
    memset(res, 0, sizeof *res);
    res->spec = *spec;
    res->np = fit_spec_nparams(spec);
    res->n = n;
    res->start = start;
    res->n_eff = n - start;
    for (int i = 0; i < FIT_MAX_PARAMS; i++) {
        res->se[i] = NAN;
        res->se_robust[i] = NAN;
    }
    res->loglik = res->aic = res->aicc = res->bic = res->hq = NAN;
    res->resid = hn_calloc_long(res->n_eff * sizeof *res->resid);
    res->std_resid = hn_calloc_long(res->n_eff * sizeof *res->std_resid);
    if (with_sigma_t)
        res->sigma_t = hn_calloc_long(res->n_eff * sizeof *res->sigma_t);
    if (!res->resid || !res->std_resid || (with_sigma_t && !res->sigma_t)) {
        fit_result_free(res);
        memset(res, 0, sizeof *res);
        return HN_ENOMEM;
    }
    return HN_OK;
}

void fit_result_criteria(fit_result *res, int k)
{
    double N = (double)res->n_eff, ll2 = -2.0 * res->loglik, kk = (double)k;
    res->k_ic = k;
    res->aic = ll2 + 2.0 * kk;
    res->aicc = N - kk - 1.0 > 0.0 ? res->aic + 2.0 * kk * (kk + 1.0) / (N - kk - 1.0) : NAN;
    res->bic = ll2 + kk * log(N);
    res->hq = N >= 3.0 ? ll2 + 2.0 * kk * log(log(N)) : NAN;
}

int fit_result_covariance(fit_result *res, const double *H)
{
    int np = res->np;
    free(res->cov);
    res->cov = NULL;
    for (int i = 0; i < np; i++)
        res->se[i] = NAN;
    if (np <= 0)
        return HN_OK;
    double *inv = malloc((size_t)np * (size_t)np * sizeof *inv);
    if (!inv)
        return HN_ENOMEM;
    if (fit_spd_inverse(np, H, inv) != HN_OK) {
        free(inv);
        res->warnings |= FIT_WARN_SINGULAR;
        return HN_OK;
    }
    for (int i = 0; i < np; i++) {
        double v = inv[i * np + i];
        if (!(v > 0.0) || !isfinite(v)) {
            free(inv);
            for (int j = 0; j < np; j++)
                res->se[j] = NAN;
            res->warnings |= FIT_WARN_SINGULAR;
            return HN_OK;
        }
        res->se[i] = sqrt(v);
    }
    res->cov = inv;
    return HN_OK;
}
