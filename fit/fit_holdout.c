/* fit_holdout.c - refit on a training span, forecast the held-out span and score it. */
#include "fit_holdout.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

int fit_holdout_score(const double *train, size_t n_train, const double *actual,
                      const fit_forecast *fc, fit_holdout_scores *sc)
{
    if (!train || !actual || !fc || !sc || n_train < 2 || fc->h < 1)
        return HN_EINVAL;
    memset(sc, 0, sizeof *sc);
    double sa = 0.0, s2 = 0.0, sn = 0.0;
    for (int k = 0; k < fc->h; k++) {
        double d = actual[k] - fc->mean[k];
        sa += fabs(d);
        s2 += d * d;
        if (actual[k] >= fc->lo[k] && actual[k] <= fc->hi[k])
            sc->inside++;
    }
    for (size_t t = 1; t < n_train; t++)
        sn += fabs(train[t] - train[t - 1]);
    sc->h = fc->h;
    sc->mae = sa / fc->h;
    sc->rmse = sqrt(s2 / fc->h);
    sc->mase_scale = sn / (double)(n_train - 1);
    sc->mase = sc->mase_scale > 0.0 ? sc->mae / sc->mase_scale : NAN;
    sc->coverage = (double)sc->inside / fc->h;
    return HN_OK;
}

void fit_holdout_free(fit_holdout *ho)
{
    if (!ho)
        return;
    free(ho->actual);
    fit_forecast_free(ho->fc);
    fit_result_free(&ho->fit);
    memset(ho, 0, sizeof *ho);
}

int fit_holdout_run(const double *y, size_t n, const fit_spec *spec, const fit_options *opt,
                    int h, double level, fit_holdout *out)
{
    if (!out)
        return HN_EINVAL;
    memset(out, 0, sizeof *out);
    if (!y || !spec || h < 1 || (size_t)h >= n || !(level > 0.0 && level < 1.0))
        return HN_EINVAL;
    const size_t nt = n - (size_t)h;
    out->n_train = nt;
    out->level = level;
    int rc = fit_model(y, nt, spec, opt, &out->fit);
    if (rc != HN_OK) {
        memset(out, 0, sizeof *out);
        return rc;
    }
    out->fc = fit_forecast_alloc(h);
    out->actual = malloc((size_t)h * sizeof *out->actual);
    if (!out->fc || !out->actual)
        rc = HN_ENOMEM;
    if (rc == HN_OK) {
        memcpy(out->actual, y + nt, (size_t)h * sizeof *out->actual);
        rc = fit_forecast_run(&out->fit, y, nt, level, out->fc);
    }
    if (rc == HN_OK)
        rc = fit_holdout_score(y, nt, out->actual, out->fc, &out->sc);
    if (rc != HN_OK)
        fit_holdout_free(out);
    return rc;
}
