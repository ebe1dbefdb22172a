/* fit_garch_lik.c - ARMA-GARCH(1,1) conditional log-likelihood with its analytic gradient. */
#include "fit_garch_lik.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_sf_gamma.h>
#include <gsl/gsl_sf_psi.h>

/* Neumaier's compensated sum: running sum S and correction C. */
typedef struct { double s, c; } ksum;

static void ksum_add(ksum *k, double x)
{
    double t = k->s + x;
    if (fabs(k->s) >= fabs(x))
        k->c += (k->s - t) + x;
    else
        k->c += (x - t) + k->s;
    k->s = t;
}

static double ksum_value(const ksum *k) { return k->s + k->c; }

int fit_garch_work_init(fit_garch_work *w, const double *y, size_t n, const fit_spec *spec)
{
    memset(w, 0, sizeof *w);
    if (!y || !spec || !spec->garch)
        return HN_EINVAL;
    size_t p = (size_t)fit_spec_max_ar(spec);
    if (n <= p + 1)
        return HN_EINVAL;
    w->y = y;
    w->n = n;
    w->spec = *spec;
    w->start = p;
    w->N = n - p;
    w->k_mean = (spec->mean ? 1 : 0) + spec->n_ar + spec->n_ma;
    w->np = fit_spec_nparams(spec);
    w->i_omega = w->k_mean;
    w->has_nu = spec->dist == FIT_DIST_T;
    w->e = malloc(w->N * sizeof *w->e);
    w->h = malloc(w->N * sizeof *w->h);
    w->de = w->k_mean ? malloc(w->N * (size_t)w->k_mean * sizeof *w->de) : NULL;
    w->aw = fit_arma_ws_alloc(spec);
    if (!w->e || !w->h || (w->k_mean && !w->de) || !w->aw) {
        fit_garch_work_free(w);
        return HN_ENOMEM;
    }
    return HN_OK;
}

void fit_garch_work_free(fit_garch_work *w)
{
    free(w->e);
    free(w->de);
    free(w->h);
    fit_arma_ws_free(w->aw);
    w->e = w->de = w->h = NULL;
    w->aw = NULL;
}

/* Loops over the parameters unroll in full in the fixed-count copies (a
 * hint only; the order of the operations stays as written). */
#if defined(__GNUC__)
#define UNROLL _Pragma("GCC unroll 16")
#else
#define UNROLL
#endif

/* The pass behind fit_garch_loglik for KM mean parameters and Student-t
 * (HAS_NU = 1) or normal innovations, AR_ONLY = 1 when the mean has no MA
 * terms; the caller has counted the pass and
 * checked TH.  Sums and derivatives live in locals (no aliasing with the
 * output arrays). */
static inline __attribute__((always_inline)) int
loglik_body(fit_garch_work *w, const double *th, double *ll, double *grad, double *scores,
            double *opg, const int km, const int has_nu, const int ar_only)
{
    const int np = km + 3 + has_nu, io = km;
    const int kv = km + 3;                 /* parameters the variance depends on */
    const size_t N = w->N;
    const int want_d = grad != NULL || scores != NULL || opg != NULL;
    const double omega = th[io], alpha = th[io + 1], beta = th[io + 2];
    const double nu = has_nu ? th[np - 1] : 0.0;
    const double *ev = w->e, *dev = w->de;
    double *hv = w->h;

    /* Pass 1 (fit_arma_resid): e_t, de_t/dtheta_mean, sum e_t^2 and
     * sum e_t de_t.  sigma2_0 = e2_0 = s2 = mean e_t^2 at these mean parameters. */
    double dh[FIT_MAX_PARAMS];             /* d sigma2_t        (kv) */
    double de2[FIT_MAX_PARAMS];            /* d e^2_{t-1}       (km) */
    double g[FIT_MAX_PARAMS];              /* gradient          (np) */
    double rowl[FIT_MAX_PARAMS];           /* this term's scores without SCORES */
    double ssr;
    int rc = fit_arma_resid(w->aw, w->y, w->n, th, w->e, want_d && !ar_only ? w->de : NULL, &ssr,
                            want_d ? de2 : NULL);
    /* Without MA terms de_t/dtheta_mean is (sum ar - 1, -(y_{t-lag} - mu)...):
     * formed below as fit_arma_resid forms it, instead of stored and read back. */
    const int moff = w->spec.mean ? 1 : 0, nar = w->spec.n_ar;
    const double *y0 = w->y + w->start;    /* y_t for residual 0 */
    double amu = 0.0, admu = 0.0, dloc[FIT_MAX_PARAMS];
    ptrdiff_t alag[FIT_MAX_TERMS];
    if (ar_only) {
        amu = moff ? th[0] : 0.0;
        double sum_ar = 0.0;
        for (int k = 0; k < nar; k++) {
            sum_ar += th[moff + k];
            alag[k] = (ptrdiff_t)w->spec.ar_lag[k];
        }
        admu = sum_ar - 1.0;
    }
    if (rc != HN_OK)
        return HN_EDOMAIN;
    const double s2 = ssr / (double)N;
    if (!(s2 > 0.0) || !isfinite(s2))
        return HN_EDOMAIN;
    if (opg)
        memset(opg, 0, (size_t)np * (size_t)np * sizeof *opg);
    if (want_d) {
        memset(g, 0, (size_t)np * sizeof *g);
        memset(dh, 0, (size_t)kv * sizeof *dh);
        for (int c = 0; c < km; c++) {
            dh[c] = 2.0 * de2[c] / (double)N;  /* d sigma2_0 */
            de2[c] = dh[c];                     /* d e2_0 */
        }
    }

    /* Constant of each term, and its derivative in nu. */
    double cst, dcst = 0.0;
    if (has_nu) {
        cst = gsl_sf_lngamma(0.5 * (nu + 1.0)) - gsl_sf_lngamma(0.5 * nu) -
              0.5 * log(M_PI * (nu - 2.0));
        dcst = 0.5 * gsl_sf_psi(0.5 * (nu + 1.0)) - 0.5 * gsl_sf_psi(0.5 * nu) -
               0.5 / (nu - 2.0);
    } else {
        cst = -0.5 * log(2.0 * M_PI);
    }

    ksum acc = { 0.0, 0.0 };
    double hprev = s2, e2prev = s2;
    for (size_t i = 0; i < N; i++) {
        const double e = ev[i];
        const double h = omega + alpha * e2prev + beta * hprev;
        if (!(h > 0.0) || !isfinite(h))
            return HN_EDOMAIN;
        hv[i] = h;
        const double e2 = e * e;
        double lt, dl_dh, dl_de, dl_dnu = 0.0;
        if (has_nu) {
            const double u = e2 / (h * (nu - 2.0));
            const double lu = log1p(u);
            lt = -0.5 * log(h) - 0.5 * (nu + 1.0) * lu;
            dl_dh = -0.5 / h * (1.0 - (nu + 1.0) * u / (1.0 + u));
            dl_de = -(nu + 1.0) * e / (h * (nu - 2.0) * (1.0 + u));
            dl_dnu = dcst - 0.5 * lu + 0.5 * (nu + 1.0) * u / ((1.0 + u) * (nu - 2.0));
        } else {
            lt = -0.5 * (log(h) + e2 / h);
            dl_dh = -0.5 / h * (1.0 - e2 / h);
            dl_de = -e / h;
        }
        ksum_add(&acc, lt);

        if (want_d) {
            /* d sigma2_t = [mean: alpha d e2_{t-1}; omega 1; alpha e2_{t-1};
             *               beta sigma2_{t-1}] + beta d sigma2_{t-1} */
            UNROLL
            for (int c = 0; c < km; c++)
                dh[c] = alpha * de2[c] + beta * dh[c];
            dh[km] = 1.0 + beta * dh[km];
            dh[km + 1] = e2prev + beta * dh[km + 1];
            dh[km + 2] = hprev + beta * dh[km + 2];
            const double *d;
            if (ar_only) {
                const double *yt = y0 + i;
                if (moff)
                    dloc[0] = admu;
                for (int k = 0; k < nar; k++)
                    dloc[moff + k] = -(yt[-alag[k]] - amu);
                d = dloc;
            } else {
                d = dev + i * (size_t)km;
            }
            double *row = scores ? scores + i * (size_t)np : rowl;
            UNROLL
            for (int c = 0; c < km; c++)
                row[c] = dl_dh * dh[c] + dl_de * d[c];
            UNROLL
            for (int c = km; c < kv; c++)
                row[c] = dl_dh * dh[c];
            if (has_nu)
                row[np - 1] = dl_dnu;
            UNROLL
            for (int c = 0; c < np; c++)
                g[c] += row[c];
            if (opg)
                UNROLL
                for (int a = 0; a < np; a++)
                    UNROLL
                    for (int b = 0; b <= a; b++)
                        opg[a * np + b] += row[a] * row[b];
            UNROLL
            for (int c = 0; c < km; c++)
                de2[c] = 2.0 * e * d[c];
        }
        hprev = h;
        e2prev = e2;
    }

    double total = ksum_value(&acc) + (double)N * cst;
    if (!isfinite(total))
        return HN_EDOMAIN;
    *ll = total;
    if (grad)
        memcpy(grad, g, (size_t)np * sizeof *grad);
    if (opg)
        for (int a = 0; a < np; a++)
            for (int b = a + 1; b < np; b++)
                opg[a * np + b] = opg[b * np + a];
    return HN_OK;
}

int fit_garch_loglik(fit_garch_work *w, const double *th, double *ll,
                     double *grad, double *scores, double *opg)
{
    const int km = w->k_mean, np = w->np;
    w->passes++;
    for (int i = 0; i < np; i++)
        if (!isfinite(th[i]))
            return HN_EDOMAIN;
    if (w->has_nu && !(th[np - 1] > 2.0))
        return HN_EDOMAIN;
    /* copies with the parameter counts fixed at compile time for the
     * common mean models: the same operations in the same order */
    const int ar = w->spec.n_ma == 0;
#define LOGLIK_CASE(K) \
    if (km == (K)) { \
        if (ar) \
            return w->has_nu ? loglik_body(w, th, ll, grad, scores, opg, K, 1, 1) \
                             : loglik_body(w, th, ll, grad, scores, opg, K, 0, 1); \
        return w->has_nu ? loglik_body(w, th, ll, grad, scores, opg, K, 1, 0) \
                         : loglik_body(w, th, ll, grad, scores, opg, K, 0, 0); \
    }
    LOGLIK_CASE(0) LOGLIK_CASE(1) LOGLIK_CASE(2) LOGLIK_CASE(3) LOGLIK_CASE(4)
#undef LOGLIK_CASE
    return w->has_nu ? loglik_body(w, th, ll, grad, scores, opg, km, 1, ar)
                     : loglik_body(w, th, ll, grad, scores, opg, km, 0, ar);
}
