/* fit_arma.c - conditional-sum-of-squares ARMA with specific lags: residuals, gradient, starts, fit. */
#include "fit_arma.h"
#include "fit_internal.h"
#include "fit_optim.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <lapacke.h>

int fit_arma_nmean(const fit_spec *spec)
{
    return (spec->mean ? 1 : 0) + spec->n_ar + spec->n_ma;
}

struct fit_arma_ws {
    fit_spec spec;
    int nm;          /* mean parameters */
    int p;           /* max AR lag */
    size_t mask;     /* ring rows - 1 (rows: a power of two > max MA lag) */
    size_t stride;   /* ring row: e, then nm derivatives */
    double *ring;
    double *acc;     /* nm gradient accumulators */
};

fit_arma_ws *fit_arma_ws_alloc(const fit_spec *spec)
{
    if (!spec)
        return NULL;
    fit_arma_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->spec = *spec;
    w->nm = fit_arma_nmean(spec);
    w->p = fit_spec_max_ar(spec);
    size_t rows = 1;
    while (rows <= (size_t)fit_spec_max_ma(spec))
        rows *= 2;
    w->mask = rows - 1;
    w->stride = (size_t)w->nm + 1;
    w->ring = calloc(rows * w->stride, sizeof *w->ring);
    w->acc = calloc((size_t)w->nm + 1, sizeof *w->acc);
    if (!w->ring || !w->acc) {
        fit_arma_ws_free(w);
        return NULL;
    }
    return w;
}

void fit_arma_ws_free(fit_arma_ws *w)
{
    if (!w)
        return;
    free(w->ring);
    free(w->acc);
    free(w);
}

int fit_arma_resid(fit_arma_ws *w, const double *y, size_t n, const double *mpar,
                   double *e, double *de, double *ssr, double *gsum)
{
    if (!w || !y || (!mpar && w->nm > 0))
        return HN_EINVAL;
    const fit_spec *s = &w->spec;
    const size_t p = (size_t)w->p;
    if (n <= p)
        return HN_EINVAL;
    const int nm = w->nm, nar = s->n_ar, nma = s->n_ma;
    const int off = s->mean ? 1 : 0;
    const double mu = s->mean ? mpar[0] : 0.0;
    const double *ar = mpar + off, *ma = mpar + off + nar;
    const int *al = s->ar_lag, *ml = s->ma_lag;
    const size_t mask = w->mask, S = w->stride;
    double *ring = w->ring;
    const int deriv = de != NULL || gsum != NULL;

    double sum_ar = 0.0;
    for (int i = 0; i < nar; i++)
        sum_ar += ar[i];
    const double dmu = sum_ar - 1.0;    /* direct term of de_t/dmu */

    memset(ring, 0, (mask + 1) * S * sizeof *ring);
    double *acc = w->acc;
    for (int k = 0; k < nm; k++)
        acc[k] = 0.0;
    double sum = 0.0, comp = 0.0;      /* Neumaier summation of e_t^2 */

    for (size_t t = p; t < n; t++) {
        const double *yt = y + t;
        double et = yt[0] - mu;
        for (int i = 0; i < nar; i++)
            et -= ar[i] * (yt[-al[i]] - mu);
        for (int j = 0; j < nma; j++)
            et -= ma[j] * ring[((t - (size_t)ml[j]) & mask) * S];
        double *row = ring + (t & mask) * S;
        row[0] = et;
        double sq = et * et, tsum = sum + sq;
        comp += fabs(sum) >= sq ? (sum - tsum) + sq : (sq - tsum) + sum;
        sum = tsum;
        if (e)
            e[t - p] = et;
        if (!deriv)
            continue;
        double *d = row + 1;
        if (off)
            d[0] = dmu;
        for (int i = 0; i < nar; i++)
            d[off + i] = -(yt[-al[i]] - mu);
        for (int j = 0; j < nma; j++)
            d[off + nar + j] = -ring[((t - (size_t)ml[j]) & mask) * S];
        for (int j = 0; j < nma; j++) {
            const double *prev = ring + ((t - (size_t)ml[j]) & mask) * S + 1;
            const double c = ma[j];
            for (int k = 0; k < nm; k++)
                d[k] -= c * prev[k];
        }
        for (int k = 0; k < nm; k++)
            acc[k] += et * d[k];
        if (de)
            memcpy(de + (t - p) * (size_t)nm, d, (size_t)nm * sizeof *d);
    }
    double tot = sum + comp;
    if (!isfinite(tot))
        return HN_EDOMAIN;
    for (int k = 0; deriv && k < nm; k++)
        if (!isfinite(acc[k]))
            return HN_EDOMAIN;
    if (ssr)
        *ssr = tot;
    if (gsum)
        memcpy(gsum, acc, (size_t)nm * sizeof *acc);
    return HN_OK;
}

/* ---- start values ------------------------------------------------------ */

/* Least squares of B (rows) on the row-major design A (rows x cols) by
 * LAPACKE_dgels; the coefficients land in B[0..cols-1].  A and B are
 * overwritten. */
static int lsq(double *A, double *B, size_t rows, int cols)
{
    if (rows < (size_t)cols + 1)
        return HN_ESHORT;
    lapack_int info = LAPACKE_dgels(LAPACK_ROW_MAJOR, 'N', (lapack_int)rows, cols, 1,
                                    A, cols, B, 1);
    if (info < 0)
        return HN_EINVAL;
    if (info > 0)
        return HN_ESINGULAR;
    for (int k = 0; k < cols; k++)
        if (!isfinite(B[k]))
            return HN_ENUMERIC;
    return HN_OK;
}

/* Largest inverse-root modulus of 1 - sum c_i z^{lag_i} (SIGN -1) or
 * 1 + sum c_i z^{lag_i} (SIGN +1); 2 on failure. */
static double max_modulus(const int *lag, const double *c, int nterms, int sign)
{
    if (nterms == 0)
        return 0.0;
    int P = lag[nterms - 1];
    double *v = calloc((size_t)P, sizeof *v);
    fit_complex *r = malloc((size_t)P * sizeof *r);
    double m = 2.0;
    if (v && r) {
        for (int i = 0; i < nterms; i++)
            v[lag[i] - 1] = c[i];
        if (fit_inverse_roots(v, P, sign, r) == HN_OK)
            m = fit_roots_max_modulus(r, P);
    }
    free(v);
    free(r);
    return m;
}

/* Shrink MA coefficients towards zero until the inverse roots lie inside
 * radius 0.98; zero them if that fails. */
static void shrink_inside(const int *lag, double *c, int nterms, int sign)
{
    for (int it = 0; it < 60; it++) {
        if (max_modulus(lag, c, nterms, sign) < 0.98)
            return;
        for (int i = 0; i < nterms; i++)
            c[i] *= 0.9;
    }
    for (int i = 0; i < nterms; i++)
        c[i] = 0.0;
}

#define HR_MAX_ROWS 20000

int fit_arma_start(const fit_spec *spec, const double *y, size_t n, double *mpar)
{
    if (!spec || !y || (!mpar && fit_arma_nmean(spec) > 0))
        return HN_EINVAL;
    const int off = spec->mean ? 1 : 0, nar = spec->n_ar, nma = spec->n_ma;
    const size_t P = (size_t)fit_spec_max_ar(spec), Q = (size_t)fit_spec_max_ma(spec);
    const int nm = fit_arma_nmean(spec);
    if (n <= P + 1)
        return HN_ESHORT;
    for (int k = 0; k < nm; k++)
        mpar[k] = 0.0;

    /* the sample mean: the start for mu whenever the regressions cannot say */
    double ybar = 0.0;
    if (spec->mean) {
        double c = 0.0;
        for (size_t t = 0; t < n; t++) {
            double v = y[t] - c, u = ybar + v;
            c = (u - ybar) - v;
            ybar = u;
        }
        ybar /= (double)n;
        mpar[0] = ybar;
    }
    if (nm == off)
        return HN_OK;

    const double *ys = y;
    size_t nn = n;
    if (nma > 0 && n > HR_MAX_ROWS) {
        ys = y + (n - HR_MAX_ROWS);
        nn = HR_MAX_ROWS;
    }
    const double ctr = ybar;    /* regressions on centred values (0 without mean) */
    int rc = HN_OK;
    double *A = NULL, *B = NULL, *ehat = NULL;
    size_t m = 0;

    if (nma > 0) {
        /* long autoregression */
        size_t mq = 2 * (P > Q ? P : Q);
        size_t ml = (size_t)ceil(10.0 * log10((double)nn));
        if (ml > 40)
            ml = 40;
        m = mq > ml ? mq : ml;
        if (m > 400)
            m = 400;
        while (m > P && nn < m + Q + 4 * (m + 1) + 10)
            m /= 2;
        if (m < 1 || nn <= m + Q + (size_t)nm + 2) {
            rc = HN_ESHORT;
            goto done;
        }
        size_t rows = nn - m, cols = m + (size_t)off;
        A = malloc(rows * cols * sizeof *A);
        B = malloc(rows * sizeof *B);
        ehat = calloc(nn, sizeof *ehat);
        if (!A || !B || !ehat) {
            rc = HN_ENOMEM;
            goto done;
        }
        for (size_t t = m; t < nn; t++) {
            double *a = A + (t - m) * cols;
            if (off)
                a[0] = 1.0;
            for (size_t k = 1; k <= m; k++)
                a[off + k - 1] = ys[t - k] - ctr;
            B[t - m] = ys[t] - ctr;
        }
        if ((rc = lsq(A, B, rows, (int)cols)) != HN_OK)
            goto done;
        for (size_t t = m; t < nn; t++) {
            double r = ys[t] - ctr - (off ? B[0] : 0.0);
            for (size_t k = 1; k <= m; k++)
                r -= B[off + k - 1] * (ys[t - k] - ctr);
            ehat[t] = r;
        }
        free(A);
        free(B);
        A = B = NULL;
    }

    /* regression of y_t on (1, y_{t-l_i}, ehat_{t-m_j}) */
    size_t t0 = nma > 0 ? m + Q : P;
    if (t0 < P)
        t0 = P;
    size_t rows = nn - t0, cols = (size_t)nm;
    A = malloc(rows * cols * sizeof *A);
    B = malloc(rows * sizeof *B);
    if (!A || !B) {
        rc = HN_ENOMEM;
        goto done;
    }
    for (size_t t = t0; t < nn; t++) {
        double *a = A + (t - t0) * cols;
        if (off)
            a[0] = 1.0;
        for (int i = 0; i < nar; i++)
            a[off + i] = ys[t - (size_t)spec->ar_lag[i]] - ctr;
        for (int j = 0; j < nma; j++)
            a[off + nar + j] = ehat[t - (size_t)spec->ma_lag[j]];
        B[t - t0] = ys[t] - ctr;
    }
    if ((rc = lsq(A, B, rows, (int)cols)) != HN_OK)
        goto done;
    for (int k = off; k < nm; k++)
        mpar[k] = B[k];
    /* the AR part never makes the residual recursion diverge; the MA part can */
    shrink_inside(spec->ma_lag, mpar + off + nar, nma, 1);
    if (off) {
        /* intercept c = (1 - sum ar)(mu - ybar) on centred data */
        double sa = 0.0;
        for (int i = 0; i < nar; i++)
            sa += mpar[off + i];
        mpar[0] = fabs(1.0 - sa) > 1e-6 ? ybar + B[0] / (1.0 - sa) : ybar;
    }
done:
    free(A);
    free(B);
    free(ehat);
    if (rc == HN_ESINGULAR || rc == HN_ENUMERIC || rc == HN_ESHORT) {
        /* a degenerate design: fall back to zero coefficients at the mean */
        for (int k = off; k < nm; k++)
            mpar[k] = 0.0;
        rc = HN_OK;
    }
    return rc;
}

/* ---- the fit ----------------------------------------------------------- */

/* The optimiser works on the series standardised as z = (y - ybar) / scale
 * (no shift without a mean), so that its gradient tolerance does not depend
 * on the units of the data; mu_z = (mu - ybar) / scale, ar and ma unchanged.
 * The objective is the per-observation profile negative log-likelihood
 *   f = 1/2 (log(2 pi SSR/N) + 1),   grad f = sum e_t de_t / SSR. */
typedef struct {
    fit_arma_ws *ws;
    const double *z;
    size_t n;
    double N;
    double *gs;
} css_ctx;

static int css_objective(const double *x, double *f, double *grad, void *vctx)
{
    css_ctx *c = vctx;
    double ssr;
    int rc = fit_arma_resid(c->ws, c->z, c->n, x, NULL, NULL, &ssr, grad ? c->gs : NULL);
    if (rc != HN_OK)
        return rc;
    if (!(ssr > 0.0))
        return HN_EDOMAIN;
    *f = 0.5 * (log(2.0 * M_PI * ssr / c->N) + 1.0);
    if (grad)
        for (int k = 0; k < c->ws->nm; k++)
            grad[k] = c->gs[k] / ssr;
    return HN_OK;
}

int fit_arma_estimate(const double *y, size_t n, const fit_spec *spec,
                      const fit_options *opt, fit_result *res)
{
    if (!y || !spec || !res)
        return HN_EINVAL;
    fit_options o = opt ? *opt : fit_default_options();
    const size_t p = (size_t)fit_spec_max_ar(spec);
    const int nm = fit_arma_nmean(spec), off = spec->mean ? 1 : 0;
    if (n <= p + 1)
        return HN_ESHORT;

    /* location and scale of the standardisation */
    double loc = 0.0, scale = 0.0;
    if (spec->mean) {
        double c = 0.0;
        for (size_t t = 0; t < n; t++) {
            double v = y[t] - c, u = loc + v;
            c = (u - loc) - v;
            loc = u;
        }
        loc /= (double)n;
    }
    {
        double mx = 0.0, ss = 0.0;
        for (size_t t = 0; t < n; t++)
            if (fabs(y[t] - loc) > mx)
                mx = fabs(y[t] - loc);
        if (mx > 0.0)
            for (size_t t = 0; t < n; t++) {
                double r = (y[t] - loc) / mx;
                ss += r * r;
            }
        scale = mx * sqrt(ss / (double)n);
    }
    if (!(scale > 0.0) || !isfinite(scale))
        return HN_ECONST;

    int rc = fit_result_init(res, spec, n, p, 0);
    if (rc != HN_OK)
        return rc;
    double *z = malloc(n * sizeof *z);
    double *gs = malloc(((size_t)nm + 1) * sizeof *gs);
    double *H = malloc(((size_t)nm * nm + 1) * sizeof *H);
    fit_arma_ws *ws = fit_arma_ws_alloc(spec);
    if (!z || !gs || !H || !ws) {
        rc = HN_ENOMEM;
        goto fail;
    }
    for (size_t t = 0; t < n; t++)
        z[t] = (y[t] - loc) / scale;

    double x[FIT_MAX_PARAMS];
    if ((rc = fit_arma_start(spec, z, n, x)) != HN_OK)
        goto fail;
    css_ctx ctx = { ws, z, n, (double)(n - p), gs };
    fit_optim_report rep;
    memset(&rep, 0, sizeof rep);
    if (nm > 0) {
        fit_optim_options oo = fit_optim_default_options();
        oo.max_iter = o.max_iter;
        oo.grad_tol = o.grad_tol;
        oo.interrupt = o.interrupt;
        int orc = fit_optim_minimise(nm, x, css_objective, &ctx, &oo, &rep);
        if (orc == HN_EINTR || orc == HN_ENOMEM || orc == HN_EINVAL) {
            rc = orc;
            goto fail;
        }
        if (orc == HN_EDOMAIN) {
            /* the start itself was infeasible: retry from zero coefficients */
            for (int k = off; k < nm; k++)
                x[k] = 0.0;
            if (off)
                x[0] = 0.0;
            orc = fit_optim_minimise(nm, x, css_objective, &ctx, &oo, &rep);
            if (orc == HN_EINTR || orc == HN_EDOMAIN || orc == HN_ENOMEM) {
                rc = orc == HN_EDOMAIN ? HN_ENUMERIC : orc;
                goto fail;
            }
        }
        res->converged = orc == HN_OK;
    } else {
        res->converged = 1;
    }
    res->iterations = rep.iterations;
    res->evaluations = rep.evaluations;
    res->grad_norm = rep.grad_norm;
    if (!res->converged)
        res->warnings |= FIT_WARN_NOCONV;

    /* residuals and likelihood at the optimum, in the units of the data */
    double ssr_z;
    if ((rc = fit_arma_resid(ws, z, n, x, res->resid, NULL, &ssr_z, NULL)) != HN_OK) {
        rc = HN_ENUMERIC;
        goto fail;
    }
    const double N = (double)(n - p);
    for (int k = 0; k < nm; k++)
        res->par[k] = x[k];
    if (off)
        res->par[0] = loc + scale * x[0];
    for (size_t t = 0; t < n - p; t++)
        res->resid[t] *= scale;
    double ssr = ssr_z * scale * scale;
    res->sigma2 = ssr / N;
    res->loglik = -0.5 * N * (log(2.0 * M_PI * res->sigma2) + 1.0);
    double sd = sqrt(res->sigma2);
    for (size_t t = 0; t < n - p; t++)
        res->std_resid[t] = res->resid[t] / sd;

    /* standard errors: the Hessian of the profile negative log-likelihood
     * N f in the standardised parameters, mapped back with the Jacobian
     * d x_z / d x = diag(1/scale, 1, ..., 1). */
    if (nm > 0) {
        if (fit_hessian_fd(nm, x, css_objective, &ctx, H) == HN_OK) {
            for (int i = 0; i < nm; i++)
                for (int j = 0; j < nm; j++) {
                    double v = N * H[i * nm + j];
                    if (off && i == 0) v /= scale;
                    if (off && j == 0) v /= scale;
                    H[i * nm + j] = v;
                }
            if ((rc = fit_result_covariance(res, H)) != HN_OK)
                goto fail;
        } else {
            res->warnings |= FIT_WARN_SINGULAR;
        }
    }
    fit_result_criteria(res, nm + 1);
    if ((rc = fit_result_roots(res)) != HN_OK)
        goto fail;
    free(z);
    free(gs);
    free(H);
    fit_arma_ws_free(ws);
    return HN_OK;

fail:
    free(z);
    free(gs);
    free(H);
    fit_arma_ws_free(ws);
    fit_result_free(res);
    memset(res, 0, sizeof *res);
    return rc;
}
