/* fit.h - estimate a model specification on a series, and what the fit returns.
 *
 * Conventions (docs/methods.md has the derivations and sources):
 *   y_t - mu = sum_i ar_i (y_{t-i} - mu) + e_t + sum_j ma_j e_{t-j}
 *   ARMA: the first p = max AR lag observations condition, pre-sample shocks
 *   are zero, N = n - p residuals, sigma^2 = SSR/N and
 *   loglik = -N/2 (log(2 pi sigma^2) + 1).
 *   GARCH(1,1): sigma^2_t = omega + alpha1 e^2_{t-1} + beta1 sigma^2_{t-1},
 *   started with sigma^2_0 = e^2_0 = mean of e_t^2 at the current mean
 *   parameters; the log-likelihood sums all N terms with the 2 pi constant. */
#ifndef FIT_H
#define FIT_H

#include <stddef.h>
#include "fit_spec.h"

typedef struct {
    int max_iter;              /* optimiser iterations (default 1000) */
    double grad_tol;           /* stop when |gradient| of the per-observation
                                  objective is below this (default 1e-8) */
    int n_starts;              /* GARCH starting points tried (default 4) */
    volatile int *interrupt;   /* polled each iteration; non-zero stops the fit
                                  with HN_EINTR.  May be NULL. */
} fit_options;

fit_options fit_default_options(void);

typedef struct { double re, im; } fit_complex;

/* Warnings: reported in words by the shell, never hidden. */
enum {
    FIT_WARN_NOCONV        = 1u << 0,  /* optimiser stopped short of its tolerance */
    FIT_WARN_NONSTATIONARY = 1u << 1,  /* an AR inverse root on/outside the unit circle */
    FIT_WARN_NONINVERTIBLE = 1u << 2,  /* an MA inverse root on/outside the unit circle */
    FIT_WARN_SINGULAR      = 1u << 3,  /* Hessian singular: standard errors unavailable */
    FIT_WARN_NEAR_UNIT     = 1u << 4,  /* alpha1 + beta1 close to 1 (integrated variance) */
    FIT_WARN_ALPHA_ZERO    = 1u << 5,  /* alpha1 at its bound: beta1 not identified */
    FIT_WARN_SHORT_GARCH   = 1u << 6,  /* series short for a variance model */
    FIT_WARN_NU_BOUND      = 1u << 7,  /* Student-t nu at its bound */
    FIT_WARN_NEAR_UNIT_ROOT= 1u << 8,  /* an AR inverse root modulus within 0.01 of 1 */
    FIT_WARN_SE_MEAN_ONLY  = 1u << 9   /* alpha1 at its bound: standard errors of the mean
                                          terms only, from their own block */
};

typedef struct {
    fit_spec spec;
    int np;                              /* number of estimated parameters */
    double par[FIT_MAX_PARAMS];          /* estimates, order as in fit_spec.h */
    double se[FIT_MAX_PARAMS];           /* from the inverse Hessian; NAN if unavailable */
    double se_robust[FIT_MAX_PARAMS];    /* Bollerslev-Wooldridge sandwich (GARCH); NAN otherwise */
    double *cov;                         /* np x np inverse-Hessian covariance, row-major; NULL if singular */

    size_t n;                            /* observations given */
    size_t start;                        /* index of the first residual (= max AR lag) */
    size_t n_eff;                        /* residuals in the likelihood: n - start */
    double sigma2;                       /* ARMA: SSR/N; GARCH: unconditional variance */
    double loglik, aic, aicc, bic, hq;   /* criteria use k = np (+1 for sigma2 in ARMA) and N = n_eff */
    int k_ic;                            /* parameter count used in the criteria */

    int converged;                       /* 1: gradient tolerance met */
    int iterations;                      /* optimiser iterations of the winning start */
    int evaluations;                     /* objective+gradient evaluations, all starts */
    double grad_norm;                    /* final gradient norm, per-observation objective */

    double *resid;                       /* n_eff residuals e_t, t = start .. n-1 */
    double *sigma_t;                     /* n_eff conditional sd (GARCH) or NULL */
    double *std_resid;                   /* n_eff e_t / sigma_t (GARCH) or e_t / sqrt(sigma2) */

    int n_ar_roots, n_ma_roots;          /* companion-matrix eigenvalues = inverse roots */
    fit_complex *ar_roots, *ma_roots;    /* stationary/invertible iff all moduli < 1 */
    int stationary, invertible;

    double persistence;                  /* GARCH: alpha1 + beta1 (else 0) */
    double half_life;                    /* GARCH: log(0.5)/log(persistence), INFINITY if >= 1 */
    unsigned warnings;                   /* FIT_WARN_* bits */
} fit_result;

/* Fit SPEC to Y[0..n-1].  OPT may be NULL for defaults.  On HN_OK *RES is
 * filled (and owns its arrays: release with fit_result_free), even when the
 * optimiser did not converge (then FIT_WARN_NOCONV is set and converged = 0).
 * Errors: HN_ESHORT (too few observations for the parameters), HN_ECONST,
 * HN_EINVAL, HN_ELIMIT (a value beyond FIT_MAX_ABS_VALUE, or more working memory
 * than FIT_MAX_WORK_BYTES), HN_ENOMEM, HN_EINTR,
 * HN_ENUMERIC; *RES is then zeroed. */
int fit_model(const double *y, size_t n, const fit_spec *spec,
              const fit_options *opt, fit_result *res);

void fit_result_free(fit_result *res);

/* Deep copy SRC into *DST (fresh arrays).  HN_OK or HN_ENOMEM. */
int fit_result_copy(fit_result *dst, const fit_result *src);

/* Largest |y| fit_model accepts: beyond it the sums of squares in the
 * likelihood could overflow a double (1e150 squared is 1e300, leaving room
 * for 1e8 terms), so such series are refused with HN_ELIMIT; rescale them. */
#define FIT_MAX_ABS_VALUE 1e150

/* Working memory fit_model needs for SPEC on N observations, in bytes: an
 * estimate from the arrays it allocates per observation (GARCH: the
 * residuals, variances and their derivatives in the k mean parameters,
 * about 8 (k + 5) bytes; ARMA: about 40 bytes).  Above FIT_MAX_WORK_BYTES
 * fit_model refuses with HN_ELIMIT before allocating anything. */
#define FIT_MAX_WORK_BYTES 4294967296.0
double fit_work_bytes(const fit_spec *spec, size_t n);

/* Smallest series length fit_model accepts for SPEC (stated rule:
 * max AR lag + max(10, 3 x parameters), and 100 with a GARCH part). */
size_t fit_min_obs(const fit_spec *spec);

#endif
