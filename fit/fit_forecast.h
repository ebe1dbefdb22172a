/* fit_forecast.h - h-step forecasts with intervals from a fitted ARMA or ARMA-GARCH model. */
#ifndef FIT_FORECAST_H
#define FIT_FORECAST_H

#include <stddef.h>
#include "fit.h"

/* Forecasts of y_{T+k}, k = 1..h, at array index k-1 (T = the last
 * observation of the fitted series). */
typedef struct {
    int h;              /* steps ahead */
    double level;       /* interval coverage in (0, 1), e.g. 0.95 */
    double quantile;    /* multiplier of se used for the interval */
    double *mean;       /* point forecasts (conditional means) */
    double *se;         /* forecast-error standard deviations */
    double *lo, *hi;    /* mean -/+ quantile * se */
    double *cond_var;   /* innovation variance at T+k: the GARCH variance
                           forecast, or the constant sigma2 without GARCH */
    double *psi;        /* psi weights psi_0 .. psi_{h-1} of the mean model */
} fit_forecast;

/* A forecast for H >= 1 steps, arrays allocated (contents unset).  Returns
 * NULL when out of memory or H < 1.  Release with fit_forecast_free. */
fit_forecast *fit_forecast_alloc(int h);

/* Free FC and its arrays (NULL is allowed). */
void fit_forecast_free(fit_forecast *fc);

/* Forecast fc->h steps from the fit FR of the series Y[0..n-1] (the same
 * series: n == fr->n) at coverage LEVEL in (0, 1):
 *   mean:     the ARMA recursion with future shocks zero, observed values and
 *             the fitted residuals for times up to T (pre-sample shocks zero);
 *   variance: se_k^2 = sum_{j<k} psi_j^2 v_{T+k-j}, psi the MA(infinity)
 *             weights and v the innovation variance: sigma2 without GARCH;
 *             with GARCH v_{T+1} = omega + alpha1 e_T^2 + beta1 sigma2_T and
 *             v_{T+k} = omega + (alpha1 + beta1) v_{T+k-1} for k >= 2;
 *   interval: mean -/+ q se with q the normal quantile at (1 + LEVEL)/2, or
 *             for Student-t innovations the unit-variance t quantile
 *             t_nu^{-1}((1 + LEVEL)/2) sqrt((nu - 2)/nu) (exact at k = 1; beyond,
 *             the sum of t shocks is not t, so an approximation).
 * Returns HN_OK, or HN_EINVAL (NULL arguments, n != fr->n, LEVEL outside
 * (0, 1), a result without residuals), HN_ENUMERIC (a non-finite value). */
int fit_forecast_run(const fit_result *fr, const double *y, size_t n, double level,
                     fit_forecast *fc);

#endif
