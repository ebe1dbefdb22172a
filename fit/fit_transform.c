/* fit_transform.c - log, differences, demeaning and Box-Cox on double arrays. */
#include "fit_transform.h"

#include "hn_status.h"

#include <math.h>

static int check_finite(const double *y, size_t n, size_t *bad)
{
    for (size_t i = 0; i < n; i++)
        if (!isfinite(y[i])) {
            if (bad)
                *bad = i;
            return HN_EINVAL;
        }
    return HN_OK;
}

int fit_tr_mean(const double *y, size_t n, double *mean, size_t *bad)
{
    if (!y || !mean)
        return HN_EINVAL;
    if (n == 0)
        return HN_ESHORT;
    int rc = check_finite(y, n, bad);
    if (rc != HN_OK)
        return rc;
    /* Neumaier's compensated sum */
    double s = 0.0, c = 0.0;
    for (size_t i = 0; i < n; i++) {
        double t = s + y[i];
        if (fabs(s) >= fabs(y[i]))
            c += (s - t) + y[i];
        else
            c += (y[i] - t) + s;
        s = t;
    }
    double m = (s + c) / (double)n;
    if (!isfinite(m)) {
        /* the sum overflowed: add the values divided by n, again compensated */
        s = 0.0, c = 0.0;
        for (size_t i = 0; i < n; i++) {
            double x = y[i] / (double)n, t = s + x;
            if (fabs(s) >= fabs(x))
                c += (s - t) + x;
            else
                c += (x - t) + s;
            s = t;
        }
        m = s + c;
    }
    /* no second pass over y - m: with a compensated first pass it cannot improve the
     * result, and residuals such as 1e16 - 0.5 are themselves rounded */
    *mean = m;
    return HN_OK;
}

int fit_tr_log(const double *y, size_t n, double *out, size_t *bad)
{
    if ((!y || !out) && n)
        return HN_EINVAL;
    int rc = check_finite(y, n, bad);
    if (rc != HN_OK)
        return rc;
    for (size_t i = 0; i < n; i++)
        if (!(y[i] > 0.0)) {
            if (bad)
                *bad = i;
            return HN_EDOMAIN;
        }
    for (size_t i = 0; i < n; i++)
        out[i] = log(y[i]);
    return HN_OK;
}

int fit_tr_diff(const double *y, size_t n, size_t k, double *out, size_t *n_out, size_t *bad)
{
    if (!y || !out || !n_out || k == 0)
        return HN_EINVAL;
    if (n <= k)
        return HN_ESHORT;
    int rc = check_finite(y, n, bad);
    if (rc != HN_OK)
        return rc;
    /* forward order keeps in-place use safe: Y[i] is read before OUT[i] is written,
     * and later steps read only Y[j], j > i */
    for (size_t i = 0; i + k < n; i++)
        out[i] = y[i + k] - y[i];
    *n_out = n - k;
    return HN_OK;
}

int fit_tr_sdiff(const double *y, size_t n, size_t s, double *out, size_t *n_out, size_t *bad)
{
    return fit_tr_diff(y, n, s, out, n_out, bad);
}

int fit_tr_demean(const double *y, size_t n, double *out, double *mean, size_t *bad)
{
    double m;
    if (!out)
        return HN_EINVAL;
    int rc = fit_tr_mean(y, n, &m, bad);
    if (rc != HN_OK)
        return rc;
    for (size_t i = 0; i < n; i++)
        out[i] = y[i] - m;
    if (mean)
        *mean = m;
    return HN_OK;
}

int fit_tr_boxcox(const double *y, size_t n, double lambda, double *out, size_t *bad)
{
    if ((!y || !out) && n)
        return HN_EINVAL;
    if (!isfinite(lambda))
        return HN_EINVAL;
    int rc = check_finite(y, n, bad);
    if (rc != HN_OK)
        return rc;
    for (size_t i = 0; i < n; i++)
        if (!(y[i] > 0.0)) {
            if (bad)
                *bad = i;
            return HN_EDOMAIN;
        }
    for (size_t i = 0; i < n; i++) {
        double l = log(y[i]);
        double v = lambda == 0.0 ? l : expm1(lambda * l) / lambda;
        if (!isfinite(v)) {
            if (bad)
                *bad = i;
            return HN_ENUMERIC;
        }
        out[i] = v;
    }
    return HN_OK;
}

int fit_tr_undiff(const double *d, size_t h, const double *last, size_t k, double *out)
{
    if ((!d || !out) && h)
        return HN_EINVAL;
    if (k == 0 || !last)
        return HN_EINVAL;
    if (check_finite(d, h, NULL) != HN_OK || check_finite(last, k, NULL) != HN_OK)
        return HN_EINVAL;
    for (size_t i = 0; i < h; i++)
        out[i] = d[i] + (i < k ? last[i] : out[i - k]);
    return HN_OK;
}

int fit_tr_inv_boxcox(const double *z, size_t n, double lambda, double *out, size_t *bad)
{
    if ((!z || !out) && n)
        return HN_EINVAL;
    if (!isfinite(lambda))
        return HN_EINVAL;
    int rc = check_finite(z, n, bad);
    if (rc != HN_OK)
        return rc;
    for (size_t i = 0; i < n; i++) {
        double v;
        if (lambda == 0.0) {
            v = exp(z[i]);
        } else {
            double a = lambda * z[i];
            if (!(a > -1.0)) {
                if (bad)
                    *bad = i;
                return HN_EDOMAIN;
            }
            v = exp(log1p(a) / lambda);
        }
        if (!isfinite(v)) {
            if (bad)
                *bad = i;
            return HN_ENUMERIC;
        }
        out[i] = v;
    }
    return HN_OK;
}
