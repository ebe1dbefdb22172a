/* fit_garch.h - joint conditional ML of an ARMA mean with a GARCH(1,1) variance. */
#ifndef FIT_GARCH_H
#define FIT_GARCH_H

#include <stddef.h>
#include "fit.h"

/* Estimate SPEC (spec->garch set) on Y[0..n-1] by joint conditional maximum
 * likelihood (conventions in fit.h: sigma2_0 = e2_0 = mean of e_t^2 at the
 * current mean parameters, all N = n - max AR lag terms with their constants;
 * normal or standardised Student-t innovations).  OPT may be NULL for
 * defaults; opt->grad_tol applies to the gradient of minus the
 * log-likelihood per residual in the unconstrained coordinates below.
 *
 * Method: positivity of omega, alpha1, beta1 > 0, alpha1 + beta1 < 1 and
 * 2 < nu < 300 hold by reparameterisation (fit_garch.c); the mean part is
 * free and its roots are reported.  Starting points: Hannan-Rissanen mean
 * start with opt->n_starts (alpha1, beta1) pairs, screened by one likelihood
 * pass each; BFGS2 (fit_optim_minimise) with the analytic gradient runs from
 * the best, then Newton steps; further starts only while a run fails to
 * converge.  Series with 80000 residuals or more are first fitted on their
 * first 20000, whose Hessian preconditions quasi-Newton steps on the whole
 * series (BFGS2 in the preconditioned coordinates if those stall).
 * Standard errors in the natural parameters: inverse of the Hessian from
 * central differences of the analytic gradient (se, cov), and the
 * Bollerslev-Wooldridge sandwich H^-1 (G'G) H^-1 with G the per-observation
 * scores (se_robust).  Criteria use k = np and N = n_eff.
 *
 * res->evaluations counts likelihood passes of the estimation (those on the
 * 20000-value subsample too), not those of the standard errors.
 *
 * On HN_OK *RES is filled completely and owns its arrays (release with
 * fit_result_free), also when the optimiser stopped short (FIT_WARN_NOCONV).
 * Warnings: FIT_WARN_NEAR_UNIT (alpha1 + beta1 > 0.99), FIT_WARN_ALPHA_ZERO
 * (alpha1 < 1e-4), FIT_WARN_SHORT_GARCH (fewer than 500 residuals: a rule of
 * thumb, common practice), FIT_WARN_NU_BOUND (nu > 200 or nu < 2.05),
 * FIT_WARN_SINGULAR, and those of the mean roots.  On error *RES is zeroed:
 * HN_EINVAL, HN_ESHORT (n < fit_min_obs(spec)), HN_ECONST,
 * HN_ENOMEM, HN_EINTR, HN_ENUMERIC. */
int fit_garch_estimate(const double *y, size_t n, const fit_spec *spec,
                       const fit_options *opt, fit_result *res);

#endif
