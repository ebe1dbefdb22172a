/* fit_optim.c - BFGS2 driver with analytic gradients, finite-difference Hessians, SPD inverse. */
#include "fit_optim.h"
#include "hn_status.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_errno.h>
#include <gsl/gsl_multimin.h>
#include <gsl/gsl_vector.h>
#include <lapacke.h>

fit_optim_options fit_optim_default_options(void)
{
    fit_optim_options o;
    o.max_iter = 1000;
    o.grad_tol = 1e-8;
    o.step = 0.01;
    o.line_tol = 0.1;
    o.interrupt = NULL;
    return o;
}

/* What the GSL callbacks need: the caller's objective, the value that
 * stands in for an infeasible point so that the line search backs off, and
 * the last point evaluated.  GSL's line search asks for f and then for the
 * gradient at the same trial point; every evaluation computes both, so the
 * second request is answered from the cache. */
#define MAX_NP 256
typedef struct {
    fit_objective fn;
    void *ctx;
    int np;
    int evaluations;
    double bad_f;
    int cached;
    double xc[MAX_NP], fc, gc[MAX_NP];
} driver;

static void eval(driver *d, const gsl_vector *v, double *f, double *g)
{
    double xs[MAX_NP];
    const double *x = v->data;
    size_t np = (size_t)d->np;
    if (v->stride != 1) {
        for (size_t i = 0; i < np; i++)
            xs[i] = gsl_vector_get(v, i);
        x = xs;
    }
    if (!d->cached || memcmp(x, d->xc, np * sizeof *x) != 0) {
        d->evaluations++;
        int rc = d->fn(x, &d->fc, d->gc, d->ctx);
        int ok = rc == HN_OK && isfinite(d->fc);
        for (size_t i = 0; ok && i < np; i++)
            if (!isfinite(d->gc[i]))
                ok = 0;
        if (!ok) {
            d->fc = d->bad_f;
            for (size_t i = 0; i < np; i++)
                d->gc[i] = 0.0;
        }
        memcpy(d->xc, x, np * sizeof *x);
        d->cached = 1;
    }
    *f = d->fc;
    if (g)
        memcpy(g, d->gc, np * sizeof *g);
}

static double cb_f(const gsl_vector *x, void *params)
{
    double f;
    eval(params, x, &f, NULL);
    return f;
}

static void cb_df(const gsl_vector *x, void *params, gsl_vector *g)
{
    double f;
    eval(params, x, &f, g->data);
}

static void cb_fdf(const gsl_vector *x, void *params, double *f, gsl_vector *g)
{
    eval(params, x, f, g->data);
}

static double norm2(const double *g, int np)
{
    double s = 0.0, scale = 0.0;
    for (int i = 0; i < np; i++)
        if (fabs(g[i]) > scale)
            scale = fabs(g[i]);
    if (scale == 0.0)
        return 0.0;
    for (int i = 0; i < np; i++) {
        double r = g[i] / scale;
        s += r * r;
    }
    return scale * sqrt(s);
}

/* Polishing applies only this close to a stationary point. */
#define POLISH_BELOW 1e-4

/* Near the optimum the decrease of the objective along a step, about
 * |g|^2 / H, falls below the rounding of f itself, so a line search on f
 * stalls with the gradient a little above tolerance.  Newton steps with the
 * finite-difference Hessian of the analytic gradient need no comparison of
 * f values: a step is kept when it shrinks the gradient norm and does not
 * raise f beyond rounding.  HN_OK when the tolerance is met; X, *F and
 * *GN are updated with every kept step. */
static int newton_polish(int np, double *x, double *f, double *gn, fit_objective fn,
                         void *ctx, double tol, int *evals)
{
    size_t n = (size_t)np;
    double *H = malloc((n * n + 3 * n) * sizeof *H);
    if (!H)
        return HN_ENOMEM;
    double *g = H + n * n, *xt = g + n, *gt = xt + n;
    int rc = HN_ENOCONV;
    for (int it = 0; it < 4; it++) {
        double fx;
        (*evals)++;
        if (fn(x, &fx, g, ctx) != HN_OK)
            break;
        *evals += 2 * np;
        if (fit_hessian_fd(np, x, fn, ctx, H) != HN_OK)
            break;
        lapack_int info = LAPACKE_dpotrf(LAPACK_ROW_MAJOR, 'L', np, H, np);
        if (info != 0)
            break;
        for (int i = 0; i < np; i++)
            xt[i] = -g[i];
        if (LAPACKE_dpotrs(LAPACK_ROW_MAJOR, 'L', np, 1, H, np, xt, 1) != 0)
            break;
        for (int i = 0; i < np; i++)
            xt[i] += x[i];
        double ft;
        (*evals)++;
        if (fn(xt, &ft, gt, ctx) != HN_OK || !isfinite(ft))
            break;
        double gnt = norm2(gt, np);
        if (!(gnt < *gn) || ft > fx + 64 * DBL_EPSILON * (1.0 + fabs(fx)))
            break;
        memcpy(x, xt, n * sizeof *x);
        *f = ft;
        *gn = gnt;
        if (gnt < tol) {
            rc = HN_OK;
            break;
        }
    }
    free(H);
    return rc;
}

int fit_optim_minimise(int np, double *x, fit_objective fn, void *ctx,
                       const fit_optim_options *opt, fit_optim_report *rep)
{
    fit_optim_options o = opt ? *opt : fit_optim_default_options();
    fit_optim_report r;
    memset(&r, 0, sizeof r);
    if (rep)
        *rep = r;
    if (np <= 0 || np > MAX_NP || !x || !fn)
        return HN_EINVAL;
    gsl_set_error_handler_off();

    driver dd = { fn, ctx, np, 0, 0.0, 0, { 0 }, 0.0, { 0 } };
    driver *const d = &dd;
    /* the start, evaluated once: it seeds the cache for GSL's first call */
    d->evaluations = 1;
    int rc = fn(x, &d->fc, d->gc, ctx);
    if (rc == HN_OK && !isfinite(d->fc))
        rc = HN_EDOMAIN;
    for (int i = 0; rc == HN_OK && i < np; i++)
        if (!isfinite(d->gc[i]))
            rc = HN_EDOMAIN;
    if (rep)
        rep->evaluations = d->evaluations;
    if (rc != HN_OK)
        return rc;
    memcpy(d->xc, x, (size_t)np * sizeof *x);
    d->cached = 1;
    /* Far above any value reached from the start, yet finite, so the
     * interpolating line search shortens the step. */
    d->bad_f = fabs(d->fc) * 1e6 + 1e6;
    r.f = d->fc;
    r.grad_norm = norm2(d->gc, np);
    r.evaluations = d->evaluations;
    if (r.grad_norm < o.grad_tol) {
        r.converged = 1;
        if (rep)
            *rep = r;
        return HN_OK;
    }

    gsl_multimin_function_fdf fdf = { cb_f, cb_df, cb_fdf, (size_t)np, d };
    gsl_multimin_fdfminimizer *m =
        gsl_multimin_fdfminimizer_alloc(gsl_multimin_fdfminimizer_vector_bfgs2, (size_t)np);
    gsl_vector *v = gsl_vector_alloc((size_t)np);
    if (!m || !v) {
        if (m) gsl_multimin_fdfminimizer_free(m);
        if (v) gsl_vector_free(v);
        return HN_ENOMEM;
    }
    for (int i = 0; i < np; i++)
        gsl_vector_set(v, (size_t)i, x[i]);
    if (gsl_multimin_fdfminimizer_set(m, &fdf, v, o.step, o.line_tol) != GSL_SUCCESS) {
        gsl_multimin_fdfminimizer_free(m);
        gsl_vector_free(v);
        return HN_ENUMERIC;
    }

    int status = HN_ENOCONV, stalls = 0;
    while (r.iterations < o.max_iter) {
        if (o.interrupt && *o.interrupt) {
            status = HN_EINTR;
            break;
        }
        int gs = gsl_multimin_fdfminimizer_iterate(m);
        r.iterations++;
        const gsl_vector *g = gsl_multimin_fdfminimizer_gradient(m);
        double gn = norm2(g->data, np);
        if (gn < o.grad_tol && m->f < d->bad_f) {
            status = HN_OK;
            break;
        }
        if (gs == GSL_ENOPROG || gs == GSL_FAILURE) {
            /* No progress along the current search direction: restart once
             * from the steepest descent direction before giving up. */
            if (++stalls >= 2)
                break;
            gsl_multimin_fdfminimizer_restart(m);
            continue;
        }
        if (gs != GSL_SUCCESS)
            break;
        stalls = 0;
    }

    const gsl_vector *xb = gsl_multimin_fdfminimizer_x(m);
    const gsl_vector *gb = gsl_multimin_fdfminimizer_gradient(m);
    if (m->f < d->bad_f && isfinite(m->f)) {
        for (int i = 0; i < np; i++)
            x[i] = gsl_vector_get(xb, (size_t)i);
        r.f = m->f;
        r.grad_norm = norm2(gb->data, np);
    }
    if (status == HN_ENOCONV && r.grad_norm < POLISH_BELOW) {
        int pe = 0;
        if (newton_polish(np, x, &r.f, &r.grad_norm, fn, ctx, o.grad_tol, &pe) == HN_OK)
            status = HN_OK;
        d->evaluations += pe;
    }
    r.converged = status == HN_OK;
    r.evaluations = d->evaluations;
    if (rep)
        *rep = r;
    gsl_multimin_fdfminimizer_free(m);
    gsl_vector_free(v);
    return status;
}

int fit_hessian_fd(int np, const double *x, fit_objective fn, void *ctx, double *H)
{
    if (np <= 0 || !x || !fn || !H)
        return HN_EINVAL;
    double *xw = malloc(3 * (size_t)np * sizeof *xw);
    if (!xw)
        return HN_ENOMEM;
    double *gp = xw + np, *gm = xw + 2 * np;
    memcpy(xw, x, (size_t)np * sizeof *xw);
    /* Central differences of the analytic gradient, with a step scaled to
     * each parameter: h_i = eps^(1/3) max(|x_i|, 1) (common practice), made
     * exactly representable so that x+h - (x-h) is exactly 2h. */
    const double c = cbrt(DBL_EPSILON);
    int rc = HN_OK;
    for (int i = 0; i < np && rc == HN_OK; i++) {
        double h = c * (fabs(x[i]) > 1.0 ? fabs(x[i]) : 1.0);
        volatile double up = x[i] + h, dn = x[i] - h;
        double f;
        xw[i] = up;
        rc = fn(xw, &f, gp, ctx);
        if (rc == HN_OK) {
            xw[i] = dn;
            rc = fn(xw, &f, gm, ctx);
        }
        xw[i] = x[i];
        double width = up - dn;
        for (int j = 0; j < np && rc == HN_OK; j++) {
            H[i * np + j] = (gp[j] - gm[j]) / width;
            if (!isfinite(H[i * np + j]))
                rc = HN_ENUMERIC;
        }
    }
    if (rc == HN_OK)
        for (int i = 0; i < np; i++)
            for (int j = 0; j < i; j++) {
                double s = 0.5 * (H[i * np + j] + H[j * np + i]);
                H[i * np + j] = H[j * np + i] = s;
            }
    free(xw);
    return rc;
}

int fit_spd_inverse(int np, const double *A, double *inv)
{
    if (np <= 0 || !A || !inv || A == inv)
        return HN_EINVAL;
    /* Equilibrate first, C = D^-1/2 A D^-1/2 with D = diag(A), so that the
     * singularity test does not depend on the parameters' units; then
     * A^-1 = D^-1/2 C^-1 D^-1/2. */
    size_t n2 = (size_t)np * (size_t)np;
    double *dsc = malloc((size_t)np * sizeof *dsc);
    if (!dsc)
        return HN_ENOMEM;
    int rc = HN_OK;
    for (int i = 0; i < np && rc == HN_OK; i++) {
        double a = A[i * np + i];
        if (!(a > 0.0) || !isfinite(a))
            rc = HN_ESINGULAR;
        else
            dsc[i] = 1.0 / sqrt(a);
    }
    for (size_t k = 0; k < n2 && rc == HN_OK; k++)
        if (!isfinite(A[k]))
            rc = HN_ESINGULAR;
    if (rc != HN_OK) {
        free(dsc);
        return rc;
    }
    for (int i = 0; i < np; i++)
        for (int j = 0; j < np; j++)
            inv[i * np + j] = A[i * np + j] * dsc[i] * dsc[j];
    lapack_int n = np;
    lapack_int info = LAPACKE_dpotrf(LAPACK_ROW_MAJOR, 'L', n, inv, n);
    if (info < 0)
        rc = HN_EINVAL;
    else if (info > 0)
        rc = HN_ESINGULAR;
    else {
        /* a tiny pivot of the equilibrated matrix (condition number beyond
         * about 1e14) means the inverse is mostly rounding error */
        for (int i = 0; i < np; i++)
            if (!(fabs(inv[i * np + i]) > 1e-7))
                rc = HN_ESINGULAR;
    }
    if (rc == HN_OK) {
        info = LAPACKE_dpotri(LAPACK_ROW_MAJOR, 'L', n, inv, n);
        rc = info < 0 ? HN_EINVAL : info > 0 ? HN_ESINGULAR : HN_OK;
    }
    if (rc == HN_OK)
        for (int i = 0; i < np; i++)
            for (int j = 0; j <= i; j++) {
                double v = inv[i * np + j] * dsc[i] * dsc[j];
                inv[i * np + j] = inv[j * np + i] = v;
            }
    free(dsc);
    return rc;
}
