/* fit_internal.h - result helpers shared by the ARMA and GARCH engines (internal to fit/). */
#ifndef FIT_INTERNAL_H
#define FIT_INTERNAL_H

#include <stddef.h>
#include "fit.h"
#include "fit_roots.h"

/* Zero *RES and prepare it for SPEC on N observations whose first residual
 * is at index START: sets spec, np, n, start, n_eff = n - start, se and
 * se_robust to NAN, cov NULL; allocates resid and std_resid (n_eff each)
 * and, when WITH_SIGMA_T, sigma_t.  HN_OK or HN_ENOMEM (then nothing is
 * left allocated).  Release with fit_result_free. */
int fit_result_init(fit_result *res, const fit_spec *spec, size_t n, size_t start,
                    int with_sigma_t);

/* Information criteria from res->loglik and res->n_eff with K parameters
 * (stored in res->k_ic): AIC = -2LL + 2k, AICc = AIC + 2k(k+1)/(N-k-1)
 * (NAN when N-k-1 <= 0), BIC = -2LL + k log N, HQ = -2LL + 2k log log N
 * (NAN when N < 3). */
void fit_result_criteria(fit_result *res, int k);

/* Covariance and standard errors from H, the np x np Hessian of the
 * negative log-likelihood in the parameters of res->par (row-major).
 * Allocates res->cov and fills res->se.  A Hessian that is not positive
 * definite leaves cov NULL, se NAN and sets FIT_WARN_SINGULAR; that is
 * still HN_OK.  HN_ENOMEM when out of memory. */
int fit_result_covariance(fit_result *res, const double *H);

/* Input checks shared by every engine: HN_EINVAL (NULL, non-finite values,
 * Student-t without GARCH, a bad spec), HN_ESHORT (n < fit_min_obs(spec)),
 * HN_ECONST (all values equal). */
int fit_check_input(const double *y, size_t n, const fit_spec *spec);

#endif
