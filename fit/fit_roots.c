/* fit_roots.c - AR and MA inverse roots from companion-matrix eigenvalues. */
#include "fit_roots.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <lapacke.h>

static int by_modulus_desc(const void *a, const void *b)
{
    const fit_complex *x = a, *y = b;
    double mx = hypot(x->re, x->im), my = hypot(y->re, y->im);
    if (mx > my) return -1;
    if (mx < my) return 1;
    if (x->im > y->im) return -1;   /* conjugate pairs: positive part first */
    if (x->im < y->im) return 1;
    return 0;
}

int fit_inverse_roots(const double *coef, int P, int sign, fit_complex *out)
{
    if (P < 0 || (P > 0 && (!coef || !out)) || (sign != 1 && sign != -1))
        return HN_EINVAL;
    if (P == 0)
        return HN_OK;
    for (int k = 0; k < P; k++)
        if (!isfinite(coef[k]))
            return HN_ENUMERIC;
    /* Companion matrix of x^P - a_1 x^(P-1) - ... - a_P with a_k = c_k on
     * the AR side and a_k = -c_k on the MA side: first row a, ones on the
     * subdiagonal.  Its eigenvalues x satisfy poly(1/x) = 0. */
    size_t pp = (size_t)P;
    double *A = calloc(pp * pp + 2 * pp, sizeof *A);
    if (!A)
        return HN_ENOMEM;
    double *wr = A + pp * pp, *wi = wr + pp;
    for (int k = 0; k < P; k++)
        A[k] = sign < 0 ? coef[k] : -coef[k];
    for (int i = 1; i < P; i++)
        A[(size_t)i * pp + (size_t)(i - 1)] = 1.0;
    lapack_int info = LAPACKE_dgeev(LAPACK_ROW_MAJOR, 'N', 'N', P, A, P, wr, wi,
                                    NULL, 1, NULL, 1);
    int rc = HN_OK;
    if (info < 0)
        rc = HN_EINVAL;
    else if (info > 0)
        rc = HN_ENUMERIC;
    else {
        for (int k = 0; k < P; k++) {
            out[k].re = wr[k];
            out[k].im = wi[k];
        }
        qsort(out, pp, sizeof *out, by_modulus_desc);
    }
    free(A);
    return rc;
}

double fit_roots_max_modulus(const fit_complex *r, int n)
{
    double m = 0.0;
    for (int k = 0; k < n; k++) {
        double a = hypot(r[k].re, r[k].im);
        if (a > m)
            m = a;
    }
    return m;
}

/* Coefficients by lag 1..P from the spec's lag list and estimates. */
static double *by_lag(const int *lag, const double *c, int nterms, int P)
{
    double *v = calloc((size_t)(P > 0 ? P : 1), sizeof *v);
    if (!v)
        return NULL;
    for (int i = 0; i < nterms; i++)
        v[lag[i] - 1] = c[i];
    return v;
}

int fit_result_roots(fit_result *res)
{
    const fit_spec *s = &res->spec;
    int P = fit_spec_max_ar(s), Q = fit_spec_max_ma(s);
    int off = s->mean ? 1 : 0;
    free(res->ar_roots);
    free(res->ma_roots);
    res->ar_roots = res->ma_roots = NULL;
    res->n_ar_roots = res->n_ma_roots = 0;
    res->stationary = res->invertible = 1;

    double *a = by_lag(s->ar_lag, res->par + off, s->n_ar, P);
    double *b = by_lag(s->ma_lag, res->par + off + s->n_ar, s->n_ma, Q);
    fit_complex *ra = P > 0 ? malloc((size_t)P * sizeof *ra) : NULL;
    fit_complex *rm = Q > 0 ? malloc((size_t)Q * sizeof *rm) : NULL;
    int rc = HN_OK;
    if (!a || !b || (P > 0 && !ra) || (Q > 0 && !rm))
        rc = HN_ENOMEM;
    if (rc == HN_OK)
        rc = fit_inverse_roots(a, P, -1, ra);
    if (rc == HN_OK)
        rc = fit_inverse_roots(b, Q, 1, rm);
    free(a);
    free(b);
    if (rc != HN_OK) {
        free(ra);
        free(rm);
        return rc;
    }
    res->ar_roots = ra;
    res->ma_roots = rm;
    res->n_ar_roots = P;
    res->n_ma_roots = Q;
    double ma_ar = fit_roots_max_modulus(ra, P), ma_ma = fit_roots_max_modulus(rm, Q);
    if (ma_ar >= 1.0) {
        res->stationary = 0;
        res->warnings |= FIT_WARN_NONSTATIONARY;
    }
    for (int k = 0; k < P; k++)
        if (fabs(hypot(ra[k].re, ra[k].im) - 1.0) < 0.01)
            res->warnings |= FIT_WARN_NEAR_UNIT_ROOT;
    if (ma_ma >= 1.0) {
        res->invertible = 0;
        res->warnings |= FIT_WARN_NONINVERTIBLE;
    }
    return HN_OK;
}
