/* fit_garch_lik.h - ARMA-GARCH(1,1) conditional log-likelihood, gradient and scores (internal). */
#ifndef FIT_GARCH_LIK_H
#define FIT_GARCH_LIK_H

#include <stddef.h>
#include "fit_arma.h"
#include "fit_spec.h"

#define FIT_GARCH_MOM 5

/* Workspace of one fit: sized once, so likelihood passes allocate nothing.
 * Natural parameter vector theta follows fit_spec.h:
 *   [mu] ar.. ma.. omega alpha1 beta1 [nu]. */
typedef struct {
    const double *y;     /* the series (borrowed, not owned) */
    size_t n;            /* observations */
    fit_spec spec;       /* copy of the spec */
    size_t start;        /* first residual index = max AR lag */
    size_t N;            /* residuals in the likelihood: n - start */
    int k_mean;          /* mean parameters: [mu] + n_ar + n_ma */
    int np;              /* all parameters */
    int i_omega;         /* index of omega (alpha1, beta1 follow) */
    int has_nu;          /* 1 with Student-t innovations (nu last) */
    double *e;           /* N residuals at the last evaluation */
    double *de;          /* N x k_mean derivatives of e_t (row-major) */
    double *h;           /* N conditional variances at the last evaluation */
    double s2;           /* sigma2_0 = e2_0 (mean e_t^2) at the last evaluation */
    fit_arma_ws *aw;     /* residual recursion workspace */
    long passes;         /* likelihood passes made so far (work counter) */
    /* Means without MA terms and with at most FIT_GARCH_MOM - 1 AR terms:
     * sums over the residual window of u_j = y_{t-l_j} - mom_c (l_0 = 0,
     * then the AR lags) and of their products, so that sum e_t^2 (and its
     * gradient), which sets sigma2_0, needs no pass of its own. */
    int mom;             /* 1 when the sums below are set */
    double mom_c, mom_m[FIT_GARCH_MOM], mom_G[FIT_GARCH_MOM * FIT_GARCH_MOM];
    /* The last pass: e, de, h and s2 belong to it; a call at the same
     * theta asking no more than it gave is answered from here. */
    int last_kind;       /* 0: none (or failed), 1: value, 2: value and gradient */
    double last_th[FIT_MAX_PARAMS], last_ll, last_g[FIT_MAX_PARAMS];
} fit_garch_work;

/* Size W for SPEC (spec->garch set) on Y[0..n-1]; Y must outlive W.
 * HN_OK, HN_EINVAL (no GARCH part, n <= max AR lag) or HN_ENOMEM
 * (then W holds nothing to free).  Release with fit_garch_work_free. */
int fit_garch_work_init(fit_garch_work *w, const double *y, size_t n, const fit_spec *spec);

/* Free the arrays of W (safe on a zeroed or already freed W). */
void fit_garch_work_free(fit_garch_work *w);

/* Conditional log-likelihood at natural parameters THETA (w->np values):
 * e_t from the ARMA recursion (pre-sample shocks zero), sigma2_0 = e2_0 =
 * mean of e_t^2 at these mean parameters, all N terms with their constants
 * (2 pi for the normal; the standardised Student-t density otherwise).
 * Writes *LL; when GRAD is not NULL its analytic gradient (w->np values);
 * when SCORES is not NULL the per-observation scores (N x np, row-major);
 * when OPG is not NULL the sum of their outer products (np x np, row-major).
 * Leaves w->e and w->h at THETA and counts one pass in w->passes, except
 * when the last pass was at the same THETA and asked as much (no SCORES or
 * OPG, GRAD only if it gave one): then its results are given again.  HN_OK,
 * or HN_EDOMAIN when a variance is not positive, nu <= 2 or a value is not
 * finite.  The log-likelihood is summed with Neumaier's compensation. */
int fit_garch_loglik(fit_garch_work *w, const double *theta, double *ll,
                     double *grad, double *scores, double *opg);

/* For a mean without MA terms whose window sums W holds (w->mom): into
 * S1[a] sum_t e_t de_t/dm_a and into S2 (lower triangle packed by rows,
 * a >= b at a (a+1)/2 + b) sum_t (de_t/dm_a de_t/dm_b + e_t d2e_t/dm_a dm_b)
 * over the mean parameters m at THETA, with no pass over the series.
 * HN_OK, HN_EINVAL (no sums) or HN_EDOMAIN. */
int fit_garch_mean_sums(const fit_garch_work *w, const double *theta, double *s1, double *s2);

/* Most mean parameters fit_garch_hessian takes, and the parameter count
 * that allows. */
#define FIT_GARCH_HESS_KM 4
#define FIT_GARCH_HESS_MAX (FIT_GARCH_HESS_KM + 4)

/* As fit_garch_loglik with GRAD (may be NULL), plus HESS: the analytic Hessian of
 * the log-likelihood (np x np, row-major, the sum over all N terms) and, when
 * OPG is not NULL, the score outer product.  Means with at most
 * FIT_GARCH_HESS_KM parameters only (HN_EINVAL otherwise; HN_ENOMEM);
 * counts one pass (the ordinary one inside) and leaves w->e and w->h at
 * THETA.  HN_OK, HN_EDOMAIN as fit_garch_loglik, or HN_ENUMERIC. */
int fit_garch_hessian(fit_garch_work *w, const double *theta, double *ll, double *grad,
                      double *hess, double *opg);

#endif
