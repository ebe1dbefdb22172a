/* fit_garch.h - joint conditional ML of an ARMA mean with a GARCH(1,1) variance. */
#ifndef FIT_GARCH_H
#define FIT_GARCH_H

#include <stddef.h>
#include "fit.h"

/* Estimate SPEC (spec->garch set) on Y[0..n-1] by joint conditional maximum
 * likelihood (conventions in fit.h).  OPT may be NULL for defaults.  On HN_OK
 * *RES is filled completely and owns its arrays (release with
 * fit_result_free); on error *RES is zeroed.  Errors: HN_EINVAL, HN_ESHORT,
 * HN_ECONST, HN_ENOMEM, HN_EINTR, HN_ENUMERIC. */
int fit_garch_estimate(const double *y, size_t n, const fit_spec *spec,
                       const fit_options *opt, fit_result *res);

#endif
