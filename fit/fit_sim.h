/* fit_sim.h - simulate a series from an ARMA mean with optional GARCH(1,1) variance. */
#ifndef FIT_SIM_H
#define FIT_SIM_H

#include <stddef.h>
#include "fit_spec.h"

/* Simulate N values of SPEC into OUT[0..n-1] (caller-owned), after BURN
 * discarded values.  PAR holds the parameters in the order of fit_spec.h
 * (fit_spec_nparams(spec) values); a spec without GARCH part takes one
 * more value, PAR[np] = sigma2, the innovation variance.  Without a mean
 * (nomean) mu is 0.
 *
 * Recipe (a seed reproduces a series exactly):
 *   the generator is GSL's gsl_rng_mt19937 set with gsl_rng_set(r, SEED)
 *   (GSL maps seed 0 to its default seed 4357);
 *   for t = 0 .. burn+n-1 one standard draw z_t is taken, in this order:
 *     normal:    z_t = gsl_ran_gaussian(r, 1.0)
 *     Student-t: z_t = gsl_ran_tdist(r, nu) * sqrt((nu - 2) / nu)  (unit variance)
 *   variance: h_t = sigma2 without GARCH; with GARCH h_0 = omega/(1-alpha1-beta1)
 *     (the unconditional variance) and h_t = omega + alpha1 e_{t-1}^2 + beta1 h_{t-1};
 *   e_t = sqrt(h_t) z_t;
 *   y_t = mu + sum_i ar_i (y_{t-l_i} - mu) + e_t + sum_j ma_j e_{t-m_j},
 *     with y_s = mu and e_s = 0 for s < 0;
 *   OUT[k] = y_{burn+k}.
 * Returns HN_OK; HN_EINVAL (NULL arguments, n = 0, Student-t without GARCH);
 * HN_EDOMAIN (sigma2 <= 0, omega <= 0, alpha1 or beta1 < 0,
 * alpha1 + beta1 >= 1, nu <= 2); HN_ENOMEM; HN_ENUMERIC (the path
 * overflowed, e.g. an explosive AR part). */
int fit_simulate(const fit_spec *spec, const double *par, size_t n, size_t burn,
                 unsigned long seed, double *out);

#endif
