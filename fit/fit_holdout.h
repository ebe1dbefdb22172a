/* fit_holdout.h - hold-out check: refit on the first n - h values, score the last h. */
#ifndef FIT_HOLDOUT_H
#define FIT_HOLDOUT_H

#include <stddef.h>
#include "fit.h"
#include "fit_forecast.h"

/* Accuracy of h forecasts against the held-out values. */
typedef struct {
    int h;               /* values scored */
    double mae;          /* mean |actual - forecast| */
    double rmse;         /* sqrt(mean (actual - forecast)^2) */
    double mase_scale;   /* in-sample mean |y_t - y_{t-1}| over the training values
                            (one-step naive forecast, no season) */
    double mase;         /* mae / mase_scale; NAN when the scale is 0 */
    double coverage;     /* share of actual values inside [lo, hi] */
    int inside;          /* how many were inside */
} fit_holdout_scores;

/* The whole check: the training fit, its forecasts, the held-out values and the scores. */
typedef struct {
    size_t n_train;      /* values the model was fitted on (n - h) */
    double level;        /* interval coverage asked for */
    double *actual;      /* the h held-out values (owned) */
    fit_forecast *fc;    /* forecasts from the training fit (owned) */
    fit_result fit;      /* the training fit (owned) */
    fit_holdout_scores sc;
} fit_holdout;

/* Score forecasts FC (fc->h values) against ACTUAL[0..h-1], with the
 * MASE scale from TRAIN[0..n_train-1] (n_train >= 2).  Fills *SC.
 * Returns HN_OK or HN_EINVAL. */
int fit_holdout_score(const double *train, size_t n_train, const double *actual,
                      const fit_forecast *fc, fit_holdout_scores *sc);

/* Fit SPEC (fit_model, options OPT, may be NULL) to Y[0..n-h-1], forecast
 * H >= 1 steps at coverage LEVEL and score them against Y[n-h..n-1].
 * On HN_OK *OUT owns its parts: release with fit_holdout_free.  Errors:
 * HN_EINVAL (bad arguments, H >= n), the errors of fit_model (for example
 * HN_ESHORT when n - h is too short for SPEC) and of fit_forecast_run;
 * *OUT is then empty. */
int fit_holdout_run(const double *y, size_t n, const fit_spec *spec, const fit_options *opt,
                    int h, double level, fit_holdout *out);

/* Release the parts of HO (safe on an emptied HO). */
void fit_holdout_free(fit_holdout *ho);

#endif
