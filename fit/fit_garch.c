/* fit_garch.c - joint ARMA mean and GARCH(1,1) variance by conditional ML. */
#include <string.h>

#include "fit_garch.h"
#include "hn_status.h"

/* Not yet implemented: refuses every call (see fit_garch.h). */
int fit_garch_estimate(const double *y, size_t n, const fit_spec *spec,
                       const fit_options *opt, fit_result *res)
{
    (void)y;
    (void)n;
    (void)spec;
    (void)opt;
    if (res)
        memset(res, 0, sizeof *res);
    return HN_EINVAL;
}
