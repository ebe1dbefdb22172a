/* fit_optim.h - the optimiser driver shared by the ARMA and GARCH fits.
 *
 * Minimises a smooth objective with GSL's BFGS2 using an analytic gradient,
 * and computes Hessians by central differences of that gradient. */
#ifndef FIT_OPTIM_H
#define FIT_OPTIM_H

#include <stddef.h>

/* Objective: fill *F and, when GRAD is not NULL, GRAD[0..np-1].  Return
 * HN_OK, or HN_EDOMAIN when X is infeasible (the driver then backs off). */
typedef int (*fit_objective)(const double *x, double *f, double *grad, void *ctx);

typedef struct {
    int max_iter;               /* iteration budget */
    double grad_tol;            /* stop when the gradient 2-norm is below this */
    double step;                /* first trial step of BFGS2 (default 0.01) */
    double line_tol;            /* line-search tolerance (default 0.1) */
    volatile int *interrupt;    /* polled each iteration; may be NULL */
} fit_optim_options;

fit_optim_options fit_optim_default_options(void);

typedef struct {
    int iterations;
    int evaluations;            /* objective calls */
    int converged;              /* 1 when grad_tol was met */
    double f;                   /* final objective */
    double grad_norm;           /* final gradient 2-norm */
} fit_optim_report;

/* Minimise from X[0..np-1] (overwritten with the best point found).
 * HN_OK when converged; HN_ENOCONV when stopped short (X still the best
 * point); HN_EINTR when interrupted; HN_EDOMAIN if the start is infeasible. */
int fit_optim_minimise(int np, double *x, fit_objective fn, void *ctx,
                       const fit_optim_options *opt, fit_optim_report *rep);

/* Hessian H (np x np, row-major, symmetrised) by central differences of the
 * analytic gradient at X.  HN_OK or the objective's error. */
int fit_hessian_fd(int np, const double *x, fit_objective fn, void *ctx, double *H);

/* Inverse of a symmetric positive-definite matrix (LAPACKE Cholesky, after
 * equilibrating by the diagonal so that the test for singularity does not
 * depend on units).  HN_OK, HN_ESINGULAR (not positive definite, or
 * condition number beyond about 1e14), HN_ENOMEM.  A and INV may not alias. */
int fit_spd_inverse(int np, const double *A, double *inv);

#endif
