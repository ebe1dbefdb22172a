/* fit_garch.c - joint ARMA mean and GARCH(1,1) variance by conditional ML. */
#include "fit_garch.h"
#include "fit_arma.h"
#include "fit_garch_lik.h"
#include "fit_internal.h"
#include "fit_optim.h"
#include "hn_status.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <lapacke.h>

/* Unconstrained parameters x seen by the optimiser (natural theta in fit_spec.h order):
 *   mean terms    x = theta / scale    (mu scaled by the sd of y, AR/MA as they are)
 *   omega         = var(y) exp(x_o) (1 - P)                 (> 0)
 *   alpha1        = P q,  beta1 = P (1 - q),  P = L(x_p), q = L(x_q),
 *                   L the logistic function                 (> 0 each, alpha1 + beta1 < 1)
 * so that x_o is the log of the variance level omega / (1 - alpha1 - beta1)
 * against var(y): the direction the data determine best.  As alpha1 goes
 * to 0, beta1 ceases to be identified, and with omega itself as a
 * coordinate the likelihood's ridge is curved (omega must follow beta1 to
 * keep the level), where quasi-Newton steps creep; in the level it is flat
 * along x_p alone.
 *   nu            = 2 + (NU_MAX - 2) L(x_nu)                 (2 < nu < NU_MAX)
 * The mean part is not constrained: its roots are reported after the fit. */
#define NU_MAX 300.0
#define NU_WARN_HIGH 200.0      /* nu above this: at the normal limit */
#define NU_WARN_LOW 2.05        /* nu below this: variance barely finite */
#define NEAR_UNIT 0.99          /* persistence above this is reported */
#define ALPHA_ZERO 1e-4         /* alpha1 below this: beta1 not identified */
#define SHORT_GARCH 500         /* fewer residuals than this: variance model is weakly
                                   determined (a rule of thumb, common practice) */

typedef struct {
    fit_garch_work w;
    double sy;                  /* sd of y: scale of mu */
    double vy;                  /* variance of y: scale of omega */
    double *theta;              /* np natural parameters (scratch) */
    double *gth;                /* np natural gradient (scratch) */
    double *scale;              /* np scales of the natural parameters (Hessian) */
    const double *L;            /* preconditioner: lower Cholesky factor (np x np) of an
                                   approximate Hessian in x, or NULL */
    const double *x0;           /* origin of the preconditioned coordinates */
    double *xz, *gz;            /* np scratch each for obj_z */
    volatile int *interrupt;    /* the caller's stop flag, or NULL */
    int rough;                  /* 1: a first look (the subsample of a long series):
                                   no Newton steps after BFGS2 */
    int cached;                 /* 1: cx, cf, cg hold the last evaluation of obj_x */
    double cx[FIT_MAX_PARAMS], cf, cg[FIT_MAX_PARAMS];
} garch_ctx;

static double logistic(double x)
{
    return x >= 0.0 ? 1.0 / (1.0 + exp(-x)) : exp(x) / (1.0 + exp(x));
}

static double logit(double p)
{
    return log(p / (1.0 - p));
}

/* theta from x; when JAC is not NULL it receives the 2 x 2 block
 * d(alpha, beta)/d(x_p, x_q) as J[0]=da/dxp J[1]=da/dxq J[2]=db/dxp J[3]=db/dxq,
 * and J[4] = d omega / d x_p (d omega / d x_o is omega). */
static void x_to_theta(const garch_ctx *c, const double *x, double *th, double *jac)
{
    const fit_garch_work *w = &c->w;
    const int io = w->i_omega;
    for (int i = 0; i < w->k_mean; i++)
        th[i] = x[i];
    if (w->spec.mean)
        th[0] = x[0] * c->sy;
    double P = logistic(x[io + 1]), q = logistic(x[io + 2]);
    th[io] = c->vy * exp(x[io]) * logistic(-x[io + 1]);     /* 1 - P without cancellation */
    th[io + 1] = P * q;
    th[io + 2] = P * (1.0 - q);
    if (jac) {
        double dP = P * (1.0 - P), dq = q * (1.0 - q);
        jac[0] = dP * q;
        jac[1] = P * dq;
        jac[2] = dP * (1.0 - q);
        jac[3] = -P * dq;
        jac[4] = -th[io] * P;                                 /* d omega / d x_p */
    }
    if (w->has_nu)
        th[w->np - 1] = 2.0 + (NU_MAX - 2.0) * logistic(x[w->np - 1]);
}

/* x from a feasible theta (alpha1, beta1 > 0, alpha1 + beta1 < 1, 2 < nu < NU_MAX). */
static void theta_to_x(const garch_ctx *c, const double *th, double *x)
{
    const fit_garch_work *w = &c->w;
    const int io = w->i_omega;
    for (int i = 0; i < w->k_mean; i++)
        x[i] = th[i];
    if (w->spec.mean)
        x[0] = th[0] / c->sy;
    double P = th[io + 1] + th[io + 2];
    x[io] = log(th[io] / (1.0 - P) / c->vy);
    x[io + 1] = logit(P);
    x[io + 2] = logit(th[io + 1] / P);
    if (w->has_nu)
        x[w->np - 1] = logit((th[w->np - 1] - 2.0) / (NU_MAX - 2.0));
}

/* The gradient of minus the log-likelihood per residual in x, GX, from the
 * gradient G of the log-likelihood in theta at TH = theta(X), JAC as
 * x_to_theta gives it. */
static void grad_to_x(const garch_ctx *c, const double *x, const double *th, const double *jac,
                      const double *g, double *gx)
{
    const fit_garch_work *w = &c->w;
    const int io = w->i_omega, np = w->np;
    const double inv = -1.0 / (double)w->N;
    for (int i = 0; i < w->k_mean; i++)
        gx[i] = inv * g[i];
    if (w->spec.mean)
        gx[0] *= c->sy;
    gx[io] = inv * g[io] * th[io];
    gx[io + 1] = inv * (g[io + 1] * jac[0] + g[io + 2] * jac[2] + g[io] * jac[4]);
    gx[io + 2] = inv * (g[io + 1] * jac[1] + g[io + 2] * jac[3]);
    if (w->has_nu) {
        double L = logistic(x[np - 1]);
        gx[np - 1] = inv * g[np - 1] * (NU_MAX - 2.0) * L * (1.0 - L);
    }
}

/* Optimiser objective: minus the log-likelihood per residual, in x.  The
 * gradient is always computed (it costs little beyond the value) and the last
 * point is remembered, because line searches often ask for the value and
 * then the gradient at the same point. */
static int obj_x(const double *x, double *f, double *grad, void *vctx)
{
    garch_ctx *c = vctx;
    fit_garch_work *w = &c->w;
    const int np = w->np;
    if (c->cached && memcmp(x, c->cx, (size_t)np * sizeof *x) == 0) {
        *f = c->cf;
        if (grad)
            memcpy(grad, c->cg, (size_t)np * sizeof *grad);
        return HN_OK;
    }
    c->cached = 0;
    double jac[5], ll;
    x_to_theta(c, x, c->theta, jac);
    int rc = fit_garch_loglik(w, c->theta, &ll, c->gth, NULL, NULL);
    if (rc != HN_OK)
        return rc;
    grad_to_x(c, x, c->theta, jac, c->gth, c->cg);
    c->cf = -ll / (double)w->N;
    memcpy(c->cx, x, (size_t)np * sizeof *x);
    c->cached = 1;
    *f = c->cf;
    if (grad)
        memcpy(grad, c->cg, (size_t)np * sizeof *grad);
    return HN_OK;
}

/* Hessian objective: minus the log-likelihood per residual in scaled natural
 * parameters u_i = theta_i / scale_i (so that one relative step fits all). */
static int obj_u(const double *u, double *f, double *grad, void *vctx)
{
    garch_ctx *c = vctx;
    fit_garch_work *w = &c->w;
    double ll;
    for (int i = 0; i < w->np; i++)
        c->theta[i] = u[i] * c->scale[i];
    int rc = fit_garch_loglik(w, c->theta, &ll, grad ? c->gth : NULL, NULL, NULL);
    if (rc != HN_OK)
        return rc;
    const double inv = -1.0 / (double)w->N;
    *f = inv * ll;
    if (grad)
        for (int i = 0; i < w->np; i++)
            grad[i] = inv * c->gth[i] * c->scale[i];
    return HN_OK;
}

/* Variance (divisor n) of Y[0..n-1] by two passes with the correction term. */
static double variance(const double *y, size_t n)
{
    double s = 0.0;
    for (size_t i = 0; i < n; i++)
        s += y[i];
    double mu = s / (double)n, ss = 0.0, sc = 0.0;
    for (size_t i = 0; i < n; i++) {
        double d = y[i] - mu;
        ss += d * d;
        sc += d;
    }
    return (ss - sc * sc / (double)n) / (double)n;
}

static double vnorm(const double *g, int np)
{
    double s = 0.0;
    for (int i = 0; i < np; i++)
        s += g[i] * g[i];
    return sqrt(s);
}

/* The Hessian of the optimiser's objective (minus the log-likelihood per
 * residual) in x at X, into H (np x np): from the analytic Hessian in theta
 * by the chain rule, H_x = -(J' H_theta J + sum_k g_k d2theta_k/dx dx') / N,
 * with J = dtheta/dx and g the log-likelihood's gradient.  HN_EINVAL where
 * the analytic Hessian does not apply (a long mean), else as fit_garch_hessian. */
static int hessian_x(garch_ctx *c, const double *x, double *H)
{
    fit_garch_work *w = &c->w;
    const int np = w->np, io = w->i_omega;
    if (np > FIT_GARCH_HESS_MAX)
        return HN_EINVAL;
    double th[FIT_MAX_PARAMS], g[FIT_MAX_PARAMS], jac[5], ll;
    double Ht[FIT_GARCH_HESS_MAX * FIT_GARCH_HESS_MAX], J[FIT_GARCH_HESS_MAX * FIT_GARCH_HESS_MAX];
    x_to_theta(c, x, th, jac);
    c->cached = 0;
    int rc = fit_garch_hessian(w, th, &ll, g, Ht, NULL);
    if (rc != HN_OK)
        return rc;
    memset(J, 0, (size_t)np * (size_t)np * sizeof *J);    /* J[k][i] = dtheta_k/dx_i */
    for (int i = 0; i < w->k_mean; i++)
        J[i * np + i] = 1.0;
    if (w->spec.mean)
        J[0] = c->sy;
    J[io * np + io] = th[io];
    J[io * np + io + 1] = jac[4];
    J[(io + 1) * np + io + 1] = jac[0];
    J[(io + 1) * np + io + 2] = jac[1];
    J[(io + 2) * np + io + 1] = jac[2];
    J[(io + 2) * np + io + 2] = jac[3];
    double Lnu = 0.0;
    if (w->has_nu) {
        Lnu = logistic(x[np - 1]);
        J[(np - 1) * np + np - 1] = (NU_MAX - 2.0) * Lnu * (1.0 - Lnu);
    }
    for (int i = 0; i < np; i++)
        for (int j = 0; j < np; j++) {
            double v = 0.0;
            for (int a = 0; a < np; a++)
                for (int b = 0; b < np; b++)
                    v += J[a * np + i] * Ht[a * np + b] * J[b * np + j];
            H[i * np + j] = v;
        }
    /* second derivatives of the transforms: omega = vy e^x_o (1 - P); alpha =
     * P q, beta = P (1 - q) with P, q logistic; nu = 2 + (NU_MAX - 2) L */
    const double P = logistic(x[io + 1]), q = logistic(x[io + 2]);
    const double P1 = P * (1.0 - P), P2 = P1 * (1.0 - 2.0 * P);
    const double q1 = q * (1.0 - q), q2 = q1 * (1.0 - 2.0 * q);
    const int ip = io + 1, iq = io + 2;
    H[io * np + io] += g[io] * th[io];
    H[io * np + ip] -= g[io] * th[io] * P;
    H[ip * np + io] -= g[io] * th[io] * P;
    H[ip * np + ip] += g[ip] * P2 * q + g[iq] * P2 * (1.0 - q) - g[io] * th[io] * P * (1.0 - 2.0 * P);
    H[ip * np + iq] += g[ip] * P1 * q1 - g[iq] * P1 * q1;
    H[iq * np + ip] += g[ip] * P1 * q1 - g[iq] * P1 * q1;
    H[iq * np + iq] += g[ip] * P * q2 - g[iq] * P * q2;
    if (w->has_nu)
        H[(np - 1) * np + np - 1] +=
            g[np - 1] * (NU_MAX - 2.0) * Lnu * (1.0 - Lnu) * (1.0 - 2.0 * Lnu);
    const double inv = -1.0 / (double)w->N;
    for (int i = 0; i < np * np; i++)
        H[i] *= inv;
    return HN_OK;
}

/* Newton steps on the objective in x with the Hessian (analytic where
 * hessian_x applies, else from differences of the analytic gradient), after
 * BFGS2: near the optimum the objective changes
 * by less than its rounding error, so line searches on it stall, while the
 * gradient still carries information.  Steps aim at 1e-4 TOL; one is kept
 * when it lowers the gradient norm without raising the objective beyond
 * rounding.  Updates X and *GN (final gradient norm).  HN_OK or HN_ENOMEM. */
static int newton_polish(garch_ctx *c, double *x, double tol, double *gn)
{
    const int np = c->w.np;
    size_t nn = (size_t)np * (size_t)np;
    double *H = malloc((nn + 4 * (size_t)np) * sizeof *H);
    if (!H)
        return HN_ENOMEM;
    double *g = H + nn, *d = g + np, *xt = d + np, *gt = xt + np;
    double f, ft;
    int rc = obj_x(x, &f, g, c);
    if (rc != HN_OK) {
        free(H);
        return HN_OK;
    }
    *gn = vnorm(g, np);
    /* Aim well below the tolerance: the extra digits cost a few passes. */
    const double target = 1e-4 * tol;
    for (int it = 0; it < 6 && *gn >= target; it++) {
        if (hessian_x(c, x, H) != HN_OK && fit_hessian_fd(np, x, obj_x, c, H) != HN_OK)
            break;
        memcpy(d, g, (size_t)np * sizeof *d);
        if (LAPACKE_dposv(LAPACK_ROW_MAJOR, 'L', np, 1, H, np, d, 1) != 0)
            break;
        int kept = 0;
        for (double lam = 1.0; lam > 0.1 && !kept; lam *= 0.5) {
            for (int i = 0; i < np; i++)
                xt[i] = x[i] - lam * d[i];
            if (obj_x(xt, &ft, gt, c) != HN_OK)
                continue;
            double gnt = vnorm(gt, np);
            if (gnt < *gn && ft <= f + 8.0 * DBL_EPSILON * fabs(f)) {
                memcpy(x, xt, (size_t)np * sizeof *x);
                memcpy(g, gt, (size_t)np * sizeof *g);
                f = ft;
                *gn = gnt;
                kept = 1;
            }
        }
        if (!kept)
            break;
    }
    free(H);
    return HN_OK;
}

/* Newton steps on the log-likelihood in theta itself, the natural
 * parameters, from X: where the subsample's optimum lies near a bound (beta1
 * close to 0, say) the logistic maps are flat there, the objective in x has
 * a plateau with a small gradient and an indefinite Hessian, and steps in x
 * creep; in theta the log-likelihood is concave near an interior optimum and
 * Newton's step crosses the plateau at once.  Bounds are met by an active
 * set: a parameter whose full step would leave its range (omega, alpha1,
 * beta1 > 0, 2 < nu < NU_MAX) is held where it is and the step re-solved for
 * the others, and alpha1 and beta1 are held together where alpha1 is below
 * 1e-3 and the Hessian is singular (beta1 is not identified as alpha1 goes
 * to 0).  The step is then halved until theta is feasible (alpha1 + beta1 <
 * 1) and the objective does not rise beyond rounding.  The steps stop when
 * the gradient norm in x is below 1e-4 TOL, or below TOL without having
 * fallen a hundredfold in the last step, when no step is kept, or after 8.
 * Updates X and *GN; returns the steps kept (0 also where the analytic
 * Hessian does not apply). */
static int theta_newton(garch_ctx *c, double *x, double tol, double *gn)
{
    fit_garch_work *w = &c->w;
    const int np = w->np, io = w->i_omega, inu = w->has_nu ? np - 1 : -1;
    if (np > FIT_GARCH_HESS_MAX)
        return 0;
    double th[FIT_MAX_PARAMS], tt[FIT_MAX_PARAMS], g[FIT_MAX_PARAMS], d[FIT_MAX_PARAMS];
    double xt[FIT_MAX_PARAMS], gx[FIT_MAX_PARAMS], H[FIT_GARCH_HESS_MAX * FIT_GARCH_HESS_MAX];
    double A[FIT_GARCH_HESS_MAX * FIT_GARCH_HESS_MAX], b[FIT_GARCH_HESS_MAX];
    double f, ft, ll;
    if (obj_x(x, &f, gx, c) != HN_OK)
        return 0;
    *gn = vnorm(gx, np);
    int kept = 0;
    for (int it = 0; it < 8 && *gn >= 1e-4 * tol; it++) {
        if (c->interrupt && *c->interrupt)
            break;
        x_to_theta(c, x, th, NULL);
        c->cached = 0;
        if (fit_garch_hessian(w, th, &ll, g, H, NULL) != HN_OK)
            break;
        int held[FIT_GARCH_HESS_MAX] = { 0 }, solved = 0;
        for (int round = 0; round <= np && !solved; round++) {
            int idx[FIT_GARCH_HESS_MAX], m = 0;
            for (int i = 0; i < np; i++)
                if (!held[i])
                    idx[m++] = i;
            if (m == 0)
                break;
            for (int i = 0; i < m; i++) {      /* -H on the free set: positive definite at a maximum */
                b[i] = g[idx[i]];
                for (int j = 0; j < m; j++)
                    A[i * m + j] = -H[idx[i] * np + idx[j]];
            }
            if (LAPACKE_dposv(LAPACK_ROW_MAJOR, 'L', m, 1, A, m, b, 1) != 0) {
                if (th[io + 1] < 1e-3 && !held[io + 1]) {
                    held[io + 1] = held[io + 2] = 1;
                    continue;
                }
                break;
            }
            for (int i = 0; i < np; i++)
                d[i] = 0.0;
            for (int i = 0; i < m; i++)
                d[idx[i]] = b[i];
            /* the free bounded parameter whose full step goes furthest past its bound */
            int worst = -1;
            double over = 0.0;
            for (int k = io; k < np; k++) {
                if (held[k])
                    continue;
                double v = th[k] + d[k], lo = k == inu ? 2.0 : 0.0, hi = k == inu ? NU_MAX : INFINITY;
                double o = v <= lo ? (lo - v) / fabs(d[k]) : v >= hi ? (v - hi) / fabs(d[k]) : 0.0;
                if (o > over) {
                    over = o;
                    worst = k;
                }
            }
            if (worst < 0)
                solved = 1;
            else
                held[worst] = 1;
        }
        if (!solved)
            break;
        int ok = 0;
        for (double lam = 1.0; lam > 1e-3 && !ok; lam *= 0.5) {
            for (int i = 0; i < np; i++)
                tt[i] = th[i] + lam * d[i];
            if (!(tt[io] > 0.0 && tt[io + 1] > 0.0 && tt[io + 2] > 0.0 &&
                  tt[io + 1] + tt[io + 2] < 1.0) ||
                (w->has_nu && !(tt[inu] > 2.0 && tt[inu] < NU_MAX)))
                continue;
            theta_to_x(c, tt, xt);
            if (obj_x(xt, &ft, gx, c) != HN_OK || !(ft <= f + 8.0 * DBL_EPSILON * fabs(f)))
                continue;
            ok = 1;
        }
        if (!ok)
            break;
        memcpy(x, xt, (size_t)np * sizeof *x);
        f = ft;
        const double gprev = *gn;
        *gn = vnorm(gx, np);
        kept++;
        /* below TOL and no longer gaining two digits a step (a flat
         * direction, beta1 with alpha1 near 0): further passes buy nothing */
        if (*gn < tol && *gn > 1e-2 * gprev)
            break;
    }
    return kept;
}

/* The gradient norm at which BFGS2 hands over to Newton steps. */
#define BFGS_TOL 1e-4

/* Candidate (alpha1, beta1) pairs for the starting points, tried in order. */
static const double start_ab[][2] = {
    { 0.05, 0.90 }, { 0.10, 0.80 }, { 0.15, 0.65 }, { 0.03, 0.95 },
    { 0.20, 0.50 }, { 0.08, 0.70 }, { 0.02, 0.80 }, { 0.30, 0.60 },
};
#define N_START_AB ((int)(sizeof start_ab / sizeof start_ab[0]))

/* Standard errors at the estimate: Hessian of minus the log-likelihood in
 * scaled natural parameters, from HESS (the analytic Hessian in theta) or
 * else by differences of the analytic gradient, and the sandwich
 * H^-1 (G'G) H^-1 with G the per-observation scores; OPG holds G'G at TH
 * from the caller's pass (NULL: computed here). */
static int standard_errors(garch_ctx *c, const double *th, fit_result *r, const double *opg,
                           const double *hess)
{
    fit_garch_work *w = &c->w;
    const int np = w->np;
    const size_t N = w->N;
    for (int i = 0; i < np; i++) {
        r->se[i] = NAN;
        r->se_robust[i] = NAN;
    }
    /* Scales: the parameter's size, floored at a fraction of its natural unit. */
    for (int i = 0; i < np; i++) {
        double unit = 1.0;
        if (w->spec.mean && i == 0)
            unit = c->sy;
        else if (i == w->i_omega)
            unit = c->vy;
        double a = fabs(th[i]);
        c->scale[i] = a > 1e-3 * unit ? a : 1e-3 * unit;
    }
    size_t nn = (size_t)np * (size_t)np;
    double *H = malloc(3 * nn * sizeof *H);
    double *u = malloc((size_t)np * sizeof *u);
    if (!H || !u) {
        free(H);
        free(u);
        return HN_ENOMEM;
    }
    double *Hi = H + nn, *B = H + 2 * nn;
    for (int i = 0; i < np; i++)
        u[i] = th[i] / c->scale[i];
    int rc = HN_OK;
    if (hess) {                                /* analytic, in theta: to u */
        for (int i = 0; i < np; i++)
            for (int j = 0; j < np; j++)
                H[i * np + j] = -hess[i * np + j] * c->scale[i] * c->scale[j];
    } else {
        rc = fit_hessian_fd(np, u, obj_u, c, H);
        if (rc == HN_OK)
            for (size_t i = 0; i < nn; i++)
                H[i] *= (double)N;             /* total, not per residual */
    }
    if (rc == HN_OK)
        rc = fit_spd_inverse(np, H, Hi);
    /* With alpha1 at its bound the Hessian is singular along beta1 (and the
     * variance parameters' errors have no usual asymptotics there); the mean
     * terms, whose information is apart from the variance parameters' for a
     * symmetric density, take theirs from their own block, the leading km x
     * km one (common practice at a boundary; the variance parameters and nu
     * get none). */
    int m = np;
    if (rc == HN_ESINGULAR && th[w->i_omega + 1] < ALPHA_ZERO && w->k_mean > 0) {
        m = w->k_mean;
        for (int i = 0; i < m; i++)
            for (int j = 0; j < m; j++)
                B[i * m + j] = H[i * np + j];
        memcpy(H, B, (size_t)m * (size_t)m * sizeof *H);
        rc = fit_spd_inverse(m, H, Hi);
        if (rc == HN_OK)
            r->warnings |= FIT_WARN_SE_MEAN_ONLY;
    }
    if (rc == HN_OK) {
        double ll;
        if (opg)
            memcpy(B, opg, nn * sizeof *B);
        else
            rc = fit_garch_loglik(w, th, &ll, NULL, NULL, B);
    }
    if (rc == HN_OK) {
        /* B = sum_t s_t s_t' in theta, then in u (times the scales), its
         * leading m x m block packed to stride m. */
        for (int i = 0; i < m; i++)
            for (int j = 0; j < m; j++)
                B[i * m + j] = B[i * np + j] * c->scale[i] * c->scale[j];
        /* cov_u = Hi B Hi, reusing H for Hi B. */
        for (int i = 0; i < m; i++)
            for (int j = 0; j < m; j++) {
                double s = 0.0;
                for (int k = 0; k < m; k++)
                    s += Hi[i * m + k] * B[k * m + j];
                H[i * m + j] = s;
            }
        r->cov = malloc(nn * sizeof *r->cov);
        if (!r->cov)
            rc = HN_ENOMEM;
    }
    if (rc == HN_OK) {
        for (size_t i = 0; i < nn; i++)
            r->cov[i] = NAN;
        for (int i = 0; i < m; i++) {
            for (int j = 0; j < m; j++)
                r->cov[i * np + j] = Hi[i * m + j] * c->scale[i] * c->scale[j];
            double rob = 0.0;
            for (int k = 0; k < m; k++)
                rob += H[i * m + k] * Hi[k * m + i];
            r->se[i] = sqrt(r->cov[i * np + i]);
            r->se_robust[i] = rob > 0.0 ? sqrt(rob) * c->scale[i] : NAN;
        }
    }
    free(H);
    free(u);
    if (rc == HN_ENOMEM)
        return rc;
    if (rc != HN_OK)
        r->warnings |= FIT_WARN_SINGULAR;
    return HN_OK;
}

/* Everything else of the result once the estimate TH is known. */
static int fill_result(garch_ctx *c, const double *th, fit_result *r)
{
    fit_garch_work *w = &c->w;
    const int io = w->i_omega, np = w->np;
    const size_t N = w->N;
    double ll;
    /* The log-likelihood, e_t and sigma2_t at TH and the outer product of
     * the scores there, which the sandwich needs; for means of up to
     * FIT_GARCH_HESS_KM terms the analytic Hessian too (two passes in all,
     * where differences of the gradient would take 2 np). */
    double *opg = malloc(2 * (size_t)np * (size_t)np * sizeof *opg);
    if (!opg)
        return HN_ENOMEM;
    double *hess = opg + (size_t)np * (size_t)np;
    int rc = fit_garch_hessian(w, th, &ll, NULL, hess, opg);
    if (rc != HN_OK) {
        hess = NULL;
        rc = fit_garch_loglik(w, th, &ll, NULL, NULL, opg);
    }
    if (rc != HN_OK) {
        free(opg);
        opg = NULL;
        rc = fit_garch_loglik(w, th, &ll, NULL, NULL, NULL);
    }
    if (rc != HN_OK)
        return HN_ENUMERIC;
    memcpy(r->par, th, (size_t)np * sizeof *th);
    r->loglik = ll;
    if (hess) {
        /* No pass follows (the standard errors need none): the work's e_t
         * and sigma2_t arrays become the result's, instead of copies that
         * would be written, and faulted in, afresh. */
        free(r->resid);
        free(r->sigma_t);
        r->resid = w->e;
        r->sigma_t = w->h;
        w->e = w->h = NULL;
        w->last_kind = 0;
        for (size_t i = 0; i < N; i++) {
            r->sigma_t[i] = sqrt(r->sigma_t[i]);
            r->std_resid[i] = r->resid[i] / r->sigma_t[i];
        }
    } else {
        for (size_t i = 0; i < N; i++) {
            r->resid[i] = w->e[i];
            r->sigma_t[i] = sqrt(w->h[i]);
            r->std_resid[i] = w->e[i] / r->sigma_t[i];
        }
    }
    fit_result_criteria(r, np);
    double a = th[io + 1], b = th[io + 2];
    r->persistence = a + b;
    r->sigma2 = r->persistence < 1.0 ? th[io] / (1.0 - r->persistence) : INFINITY;
    r->half_life = r->persistence < 1.0 && r->persistence > 0.0
                       ? log(0.5) / log(r->persistence) : INFINITY;
    /* with alpha1 at its bound beta1, and so the persistence, is not
     * identified: the one warning says so, not a persistence near 1 too */
    if (a < ALPHA_ZERO)
        r->warnings |= FIT_WARN_ALPHA_ZERO;
    else if (r->persistence > NEAR_UNIT)
        r->warnings |= FIT_WARN_NEAR_UNIT;
    if (N < SHORT_GARCH)
        r->warnings |= FIT_WARN_SHORT_GARCH;
    if (w->has_nu && (th[np - 1] > NU_WARN_HIGH || th[np - 1] < NU_WARN_LOW))
        r->warnings |= FIT_WARN_NU_BOUND;
    rc = fit_result_roots(r);
    if (rc == HN_OK)
        rc = standard_errors(c, th, r, opg, hess);
    free(opg);
    return rc;
}

/* Preconditioned objective: x = x0 + L^-T z, so that a Hessian close to
 * L L' in x is close to the identity in z; grad_z = L^-1 grad_x. */
static int obj_z(const double *z, double *f, double *grad, void *vctx)
{
    garch_ctx *c = vctx;
    const int np = c->w.np;
    const double *L = c->L;
    for (int i = np - 1; i >= 0; i--) {        /* solve L' d = z */
        double v = z[i];
        for (int k = i + 1; k < np; k++)
            v -= L[k * np + i] * c->xz[k];
        c->xz[i] = v / L[i * np + i];
    }
    for (int i = 0; i < np; i++)
        c->xz[i] += c->x0[i];
    int rc = obj_x(c->xz, f, grad ? c->gz : NULL, c);
    if (rc != HN_OK || !grad)
        return rc;
    for (int i = 0; i < np; i++) {             /* solve L g = grad_x */
        double v = c->gz[i];
        for (int k = 0; k < i; k++)
            v -= L[i * np + k] * grad[k];
        grad[i] = v / L[i * np + i];
    }
    return HN_OK;
}

/* Quasi-Newton steps with unit length on the whole series, from the metric
 * B = L L' (the subsample Hessian) updated by the BFGS formula after each
 * step: one likelihood pass per step, superlinear once B has learnt the
 * whole-series curvature.  A step is kept when it lowers the gradient norm
 * without raising the objective beyond rounding; otherwise a half step is
 * tried, then the steps stop.  Updates X and *GN; returns the steps kept. */
static int metric_polish(garch_ctx *c, double *x, double tol, double *gn)
{
    const int np = c->w.np;
    double B[FIT_MAX_PARAMS * FIT_MAX_PARAMS], F[FIT_MAX_PARAMS * FIT_MAX_PARAMS];
    double g[FIT_MAX_PARAMS], d[FIT_MAX_PARAMS], xt[FIT_MAX_PARAMS], gt[FIT_MAX_PARAMS];
    double Bs[FIT_MAX_PARAMS], yv[FIT_MAX_PARAMS];
    double f, ft;
    int kept = 0;
    if (obj_x(x, &f, g, c) != HN_OK)
        return 0;
    *gn = vnorm(g, np);
    const double *L = c->L;
    for (int i = 0; i < np; i++)               /* B = L L' */
        for (int j = 0; j < np; j++) {
            double v = 0.0;
            for (int k = 0; k <= (i < j ? i : j); k++)
                v += L[i * np + k] * L[j * np + k];
            B[i * np + j] = v;
        }
    for (int it = 0; it < 20 && *gn >= 1e-2 * tol; it++) {
        if (c->interrupt && *c->interrupt)
            break;
        memcpy(F, B, (size_t)np * (size_t)np * sizeof *F);
        memcpy(d, g, (size_t)np * sizeof *d);
        if (LAPACKE_dposv(LAPACK_ROW_MAJOR, 'L', np, 1, F, np, d, 1) != 0)
            break;
        int ok = 0;
        double lam = 1.0;
        for (int half = 0; half < 2 && !ok; half++, lam = 0.5) {
            for (int i = 0; i < np; i++)
                xt[i] = x[i] - lam * d[i];
            if (obj_x(xt, &ft, gt, c) != HN_OK)
                continue;
            double gnt = vnorm(gt, np);
            ok = gnt < *gn && ft <= f + 8.0 * DBL_EPSILON * fabs(f);
            if (ok)
                *gn = gnt;
        }
        if (!ok)
            break;
        kept++;
        /* BFGS update with s = xt - x, y = gt - g. */
        double sy = 0.0, sBs = 0.0;
        for (int i = 0; i < np; i++) {
            double si = xt[i] - x[i];
            d[i] = si;
            yv[i] = gt[i] - g[i];
            sy += si * yv[i];
        }
        for (int i = 0; i < np; i++) {
            double v = 0.0;
            for (int j = 0; j < np; j++)
                v += B[i * np + j] * d[j];
            Bs[i] = v;
            sBs += d[i] * v;
        }
        if (sy > 1e-12 * sBs && sBs > 0.0)
            for (int i = 0; i < np; i++)
                for (int j = 0; j < np; j++)
                    B[i * np + j] += yv[i] * yv[j] / sy - Bs[i] * Bs[j] / sBs;
        memcpy(x, xt, (size_t)np * sizeof *x);
        memcpy(g, gt, (size_t)np * sizeof *g);
        f = ft;
    }
    return kept;
}

/* Frobenius norm of the lower triangle of L (np x np): bounds the factor
 * between gradient norms in z and in x. */
static double lower_norm(const double *L, int np)
{
    double s = 0.0;
    for (int i = 0; i < np; i++)
        for (int j = 0; j <= i; j++)
            s += L[i * np + j] * L[i * np + j];
    return sqrt(s);
}

/* Preconditioner at X from the outer product of the scores (BHHH; by the
 * information equality it estimates the Hessian): in x per residual,
 * J' (sum s_t s_t') J / N with J = d theta / d x; its lower Cholesky factor
 * goes to L.  HN_OK, or the likelihood's error, or HN_ESINGULAR. */
static int opg_factor(garch_ctx *c, const double *x, double *L)
{
    fit_garch_work *w = &c->w;
    const int np = w->np, io = w->i_omega;
    double B[FIT_MAX_PARAMS * FIT_MAX_PARAMS], J[FIT_MAX_PARAMS * FIT_MAX_PARAMS];
    double jac[5], ll;
    x_to_theta(c, x, c->theta, jac);
    c->cached = 0;
    int rc = fit_garch_loglik(w, c->theta, &ll, NULL, NULL, B);
    if (rc != HN_OK)
        return rc;
    memset(J, 0, (size_t)np * (size_t)np * sizeof *J);
    for (int i = 0; i < w->k_mean; i++)
        J[i * np + i] = 1.0;
    if (w->spec.mean)
        J[0] = c->sy;
    J[io * np + io] = c->theta[io];
    J[io * np + io + 1] = jac[4];
    J[(io + 1) * np + io + 1] = jac[0];
    J[(io + 1) * np + io + 2] = jac[1];
    J[(io + 2) * np + io + 1] = jac[2];
    J[(io + 2) * np + io + 2] = jac[3];
    if (w->has_nu) {
        double q = logistic(x[np - 1]);
        J[(np - 1) * np + np - 1] = (NU_MAX - 2.0) * q * (1.0 - q);
    }
    for (int i = 0; i < np; i++)               /* L = J' B J / N */
        for (int j = 0; j < np; j++) {
            double v = 0.0;
            for (int a = 0; a < np; a++)
                for (int b = 0; b < np; b++)
                    v += J[a * np + i] * B[a * np + b] * J[b * np + j];
            L[i * np + j] = v / (double)w->N;
        }
    if (LAPACKE_dpotrf(LAPACK_ROW_MAJOR, 'L', np, L, np) != 0)
        return HN_ESINGULAR;
    for (int i = 0; i < np; i++)
        for (int j = i + 1; j < np; j++)
            L[i * np + j] = 0.0;
    return HN_OK;
}

/* BFGS2 from X (overwritten with the result), in the coordinates
 * preconditioned by the score outer product at X when that is positive
 * definite, else in x itself.  Returns as fit_optim_minimise. */
static int bfgs_from(garch_ctx *c, double *x, const fit_optim_options *oo,
                     fit_optim_report *rep)
{
    const int np = c->w.np;
    double L[FIT_MAX_PARAMS * FIT_MAX_PARAMS], x0[FIT_MAX_PARAMS], z[FIT_MAX_PARAMS];
    if (opg_factor(c, x, L) != HN_OK)
        return fit_optim_minimise(np, x, obj_x, c, oo, rep);
    memcpy(x0, x, (size_t)np * sizeof *x0);
    const double *Lsave = c->L, *x0save = c->x0;
    c->L = L;
    c->x0 = x0;
    fit_optim_options oz = *oo;
    oz.grad_tol = oo->grad_tol / lower_norm(L, np);
    for (int i = 0; i < np; i++)
        z[i] = 0.0;
    int rc = fit_optim_minimise(np, z, obj_z, c, &oz, rep);
    double f;
    if (obj_z(z, &f, NULL, c) == HN_OK)        /* x of the final z */
        memcpy(x, c->xz, (size_t)np * sizeof *x);
    c->L = Lsave;
    c->x0 = x0save;
    return rc;
}

/* Starting points: the mean start MSTART with several (alpha1, beta1),
 * omega matching the residual variance S2, nu = 8.  Each is screened by one
 * likelihood pass; BFGS2 (then Newton steps) runs from the best, and from the
 * next ones only while a run fails to converge.  Writes the best point to
 * XBEST and its report to *REP.  HN_OK,
 * HN_EINTR, HN_ENOMEM, HN_EINVAL or HN_ENUMERIC (no start was feasible). */
static int multistart(garch_ctx *c, const fit_options *o, const double *mstart, double s2,
                      double *xbest, fit_optim_report *rep_best)
{
    fit_garch_work *w = &c->w;
    const int np = w->np, ns = o->n_starts, io = w->i_omega;
    double *xs = malloc(2 * (size_t)ns * (size_t)np * sizeof *xs);
    double *fs = malloc((size_t)ns * sizeof *fs);
    if (!xs || !fs) {
        free(xs);
        free(fs);
        return HN_ENOMEM;
    }
    double *xb = xs + (size_t)ns * np;
    double th[FIT_MAX_PARAMS];
    memcpy(th, mstart, (size_t)w->k_mean * sizeof *th);
    for (int k = 0; k < ns; k++) {
        double a, b;
        if (k < N_START_AB) {
            a = start_ab[k][0];
            b = start_ab[k][1];
        } else {                               /* beyond the table: spread over a grid */
            a = 0.02 + 0.25 * (double)((k * 7) % 11) / 10.0;
            b = (0.97 - a) * (0.4 + 0.6 * (double)((k * 3) % 7) / 6.0);
        }
        th[io] = s2 * (1.0 - a - b);
        th[io + 1] = a;
        th[io + 2] = b;
        if (w->has_nu)
            th[np - 1] = 8.0;
        double *x = xs + (size_t)k * np;
        theta_to_x(c, th, x);
        if (obj_x(x, &fs[k], NULL, c) != HN_OK || !isfinite(fs[k]))
            fs[k] = INFINITY;
    }

    int rc = HN_OK, best = -1;
    double fbest = INFINITY;
    memset(rep_best, 0, sizeof *rep_best);
    fit_optim_options oo = fit_optim_default_options();
    oo.max_iter = o->max_iter;
    oo.grad_tol = o->grad_tol;
    oo.interrupt = o->interrupt;
    for (int tried = 0; tried < ns; tried++) {
        int k = -1;
        for (int j = 0; j < ns; j++)           /* next best unexplored start */
            if (isfinite(fs[j]) && (k < 0 || fs[j] < fs[k]))
                k = j;
        if (k < 0)
            break;
        fs[k] = NAN;                           /* mark explored */
        double *x = xb + (size_t)k * np;
        memcpy(x, xs + (size_t)k * np, (size_t)np * sizeof *x);
        fit_optim_report rep;
        /* BFGS2 to BFGS_TOL only: from there Newton steps with the Hessian
         * converge quadratically where BFGS2 creeps; BFGS2 again to the full
         * tolerance if they fall short of it. */
        fit_optim_options o1 = oo;
        const int two_phase = !c->rough && BFGS_TOL > oo.grad_tol;
        if (two_phase)
            o1.grad_tol = BFGS_TOL;
        int orc = bfgs_from(c, x, &o1, &rep);
        if (two_phase && (orc == HN_OK || orc == HN_ENOCONV)) {
            rc = newton_polish(c, x, o->grad_tol, &rep.grad_norm);
            if (rc != HN_OK)
                break;
            if (rep.grad_norm >= o->grad_tol) {
                fit_optim_report r2;
                orc = bfgs_from(c, x, &oo, &r2);
                r2.iterations += rep.iterations;
                rep = r2;
            }
        }
        if (orc == HN_EINTR || orc == HN_ENOMEM || orc == HN_EINVAL) {
            rc = orc;
            break;
        }
        if (orc != HN_OK && orc != HN_ENOCONV)
            continue;
        rc = c->rough ? HN_OK : newton_polish(c, x, o->grad_tol, &rep.grad_norm);
        if (rc != HN_OK)
            break;
        rep.converged = rep.grad_norm < o->grad_tol;
        obj_x(x, &rep.f, NULL, c);
        if (rep.f < fbest || (rep.converged && !rep_best->converged && rep.f <= fbest + 1e-12)) {
            fbest = rep.f;
            best = k;
            *rep_best = rep;
        }
        if (rep_best->converged)
            break;
    }
    if (rc == HN_OK && best < 0)
        rc = HN_ENUMERIC;
    if (rc == HN_OK)
        memcpy(xbest, xb + (size_t)best * np, (size_t)np * sizeof *xbest);
    free(xs);
    free(fs);
    return rc;
}

/* Long series: a fit on the first SUB_N residuals (multistart) gives a point
 * close to the optimum and, from its Hessian, a metric; quasi-Newton steps
 * from there on the whole series (metric_polish) finish in a handful of
 * passes.  Where they stall (the subsample's optimum near a bound, on the
 * plateau the logistic maps make there), Newton steps in theta cross over;
 * then BFGS2 in x to BFGS_TOL and Newton steps in x.  A GARCH(1,1) fit of 10^6 values takes about 10 whole-series passes
 * plus the subsample's (measured: 106 passes over 20000 values), where a
 * cold start took hundreds. */
#define SUB_N 20000
#define LONG_N (4 * SUB_N)
/* The subsample's optimum lies O(1/sqrt(SUB_N)) from the whole series' one:
 * its gradient need not be driven far below that. */
#define SUB_TOL 1e-6

static int two_stage(garch_ctx *c, const fit_options *o, const double *mstart, double s2,
                     double *xbest, fit_optim_report *rep, int *evals)
{
    fit_garch_work *w = &c->w;
    const int np = w->np;
    garch_ctx sub = *c;
    memset(&sub.w, 0, sizeof sub.w);
    sub.L = NULL;
    sub.cached = 0;
    int rc = fit_garch_work_init(&sub.w, w->y, w->start + SUB_N, &w->spec);
    if (rc != HN_OK)
        return rc;
    double xs[FIT_MAX_PARAMS];
    double *H = malloc((size_t)np * (size_t)np * sizeof *H);
    if (!H) {
        fit_garch_work_free(&sub.w);
        return HN_ENOMEM;
    }
    fit_optim_report srep;
    fit_options so = *o;
    so.grad_tol = SUB_TOL;
    sub.rough = 1;
    rc = multistart(&sub, &so, mstart, s2, xs, &srep);
    if (rc == HN_OK) {
        rc = fit_hessian_fd(np, xs, obj_x, &sub, H);
        if (rc == HN_OK && LAPACKE_dpotrf(LAPACK_ROW_MAJOR, 'L', np, H, np) != 0)
            rc = HN_ESINGULAR;
        /* a flat direction (alpha1 at its bound, say): the score outer
         * product, positive definite wherever the scores vary, instead */
        if (rc == HN_ESINGULAR)
            rc = opg_factor(&sub, xs, H);
    }
    *evals += (int)sub.w.passes;
    fit_garch_work_free(&sub.w);
    if (rc == HN_EINTR || rc == HN_ENOMEM) {
        free(H);
        return rc;
    }
    if (rc != HN_OK) {                         /* no usable preconditioner */
        free(H);
        return multistart(c, o, mstart, s2, xbest, rep);
    }
    for (int i = 0; i < np; i++)               /* keep the lower triangle */
        for (int j = i + 1; j < np; j++)
            H[i * np + j] = 0.0;
    c->L = H;
    c->x0 = xs;
    fit_optim_options oo = fit_optim_default_options();
    oo.max_iter = o->max_iter;
    oo.grad_tol = o->grad_tol / lower_norm(H, np);   /* |g_x| <= |L|_F |g_z| */
    oo.interrupt = o->interrupt;
    /* Fixed-metric steps from the subsample optimum first: near the optimum
     * each gains about one digit for one pass; the rest only when they stall. */
    memcpy(xbest, xs, (size_t)np * sizeof *xbest);
    int steps = metric_polish(c, xbest, o->grad_tol, &rep->grad_norm);
    rep->converged = rep->grad_norm < o->grad_tol;
    if (!rep->converged) {
        steps += theta_newton(c, xbest, o->grad_tol, &rep->grad_norm);
        rep->converged = rep->grad_norm < o->grad_tol;
    }
    rep->iterations = srep.iterations + steps;
    if (!rep->converged) {
        /* BFGS2 in x itself to BFGS_TOL (the subsample's metric has just
         * failed: near a bound it stretches the flat directions, and BFGS2
         * in z crept there for thousands of passes), Newton steps from
         * there, and BFGS2 to the full tolerance only if they fall short */
        c->L = NULL;
        fit_optim_options o1 = oo;
        o1.grad_tol = BFGS_TOL > o->grad_tol ? BFGS_TOL : o->grad_tol;
        int its = srep.iterations + steps;
        int orc = fit_optim_minimise(np, xbest, obj_x, c, &o1, rep);
        if (orc == HN_EINTR || orc == HN_ENOMEM || orc == HN_EINVAL) {
            rc = orc;
        } else if (orc == HN_OK || orc == HN_ENOCONV) {
            its += rep->iterations;
            rc = newton_polish(c, xbest, o->grad_tol, &rep->grad_norm);
            if (rc == HN_OK && rep->grad_norm >= o->grad_tol) {
                oo.grad_tol = o->grad_tol;
                orc = bfgs_from(c, xbest, &oo, rep);
                its += rep->iterations;
                if (orc == HN_EINTR || orc == HN_ENOMEM || orc == HN_EINVAL)
                    rc = orc;
                else
                    rc = newton_polish(c, xbest, o->grad_tol, &rep->grad_norm);
            }
            rep->iterations = its;
            rep->converged = rep->grad_norm < o->grad_tol;
        } else {                               /* the whole-series start failed */
            c->L = NULL;
            rc = multistart(c, o, mstart, s2, xbest, rep);
        }
    }
    c->L = NULL;
    c->x0 = NULL;
    free(H);
    return rc;
}

int fit_garch_estimate(const double *y, size_t n, const fit_spec *spec,
                       const fit_options *opt, fit_result *res)
{
    if (!res)
        return HN_EINVAL;
    memset(res, 0, sizeof *res);
    if (!y || !spec || !spec->garch)
        return HN_EINVAL;
    for (size_t i = 0; i < n; i++)
        if (!isfinite(y[i]))
            return HN_EINVAL;
    fit_options o = opt ? *opt : fit_default_options();
    if (o.n_starts < 1)
        o.n_starts = 1;
    const int np = fit_spec_nparams(spec);
    if (n < fit_min_obs(spec))
        return HN_ESHORT;

    garch_ctx c;
    memset(&c, 0, sizeof c);
    const double vy = variance(y, n);
    if (!(vy > 0.0))
        return HN_ECONST;
    c.sy = sqrt(vy);
    c.vy = vy;
    c.interrupt = o.interrupt;
    int rc = fit_garch_work_init(&c.w, y, n, spec);
    if (rc != HN_OK)
        return rc;
    double *buf = malloc(6 * (size_t)np * sizeof *buf);
    if (!buf) {
        fit_garch_work_free(&c.w);
        return HN_ENOMEM;
    }
    c.theta = buf;
    c.gth = buf + np;
    c.scale = buf + 2 * np;
    c.xz = buf + 3 * np;
    c.gz = buf + 4 * np;
    double *th = buf + 5 * np;

    /* Mean start (Hannan-Rissanen) and the residual variance there.  A
     * long series without MA terms takes them from the subsample that
     * two_stage fits first (their likelihood in the mean is close to
     * quadratic); with MA terms from the whole series, whose start decides
     * between the local optima of near-cancelling AR and MA roots. */
    double mstart[FIT_MAX_PARAMS], xbest[FIT_MAX_PARAMS];
    const size_t n0 = c.w.N >= LONG_N && spec->n_ma == 0 ? c.w.start + SUB_N : n;
    rc = fit_arma_start(spec, y, n0, mstart);
    double s2 = vy;
    if (rc == HN_OK) {
        double ssr;
        if (fit_arma_resid(c.w.aw, y, n0, mstart, NULL, NULL, &ssr, NULL) == HN_OK &&
            ssr > 0.0 && isfinite(ssr))
            s2 = ssr / (double)(n0 - c.w.start);
    }
    int evaluations = 0;
    fit_optim_report rep;
    memset(&rep, 0, sizeof rep);
    if (rc == HN_OK) {
        if (c.w.N >= LONG_N)
            rc = two_stage(&c, &o, mstart, s2, xbest, &rep, &evaluations);
        else
            rc = multistart(&c, &o, mstart, s2, xbest, &rep);
    }
    if (rc == HN_OK) {
        x_to_theta(&c, xbest, th, NULL);
        rc = fit_result_init(res, spec, n, c.w.start, 1);
    }
    if (rc == HN_OK) {
        res->evaluations = evaluations + (int)c.w.passes;
        res->converged = rep.converged;
        res->iterations = rep.iterations;
        res->grad_norm = rep.grad_norm;
        if (!rep.converged)
            res->warnings |= FIT_WARN_NOCONV;
        rc = fill_result(&c, th, res);
    }
    free(buf);
    fit_garch_work_free(&c.w);
    if (rc != HN_OK) {
        fit_result_free(res);
        memset(res, 0, sizeof *res);
    }
    return rc;
}
