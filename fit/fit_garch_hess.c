/* fit_garch_hess.c - analytic Hessian of the AR-GARCH(1,1) conditional log-likelihood. */
#include "fit_garch_lik.h"
#include "hn_status.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_sf_psi.h>

/* Notation.  theta = (m, v, nu): mean m (km values: [mu] ar..), variance
 * v = (omega, alpha, beta), nu for Student-t.  E_t = e_t^2; before the sample
 * E_{-1} = h_{-1} = s2 = (1/N) sum e_t^2, so both depend on m.
 *   h_t = omega + alpha E_{t-1} + beta h_{t-1}
 *   dh_t/da     = [a=omega] + [a=alpha] E_{t-1} + alpha dE_{t-1}/da + [a=beta] h_{t-1}
 *                 + beta dh_{t-1}/da
 *   d2h_t/dadb  = beta d2h_{t-1}/dadb + alpha d2E_{t-1}/dadb + [a=alpha] dE_{t-1}/db
 *                 + [b=alpha] dE_{t-1}/da + [a=beta] dh_{t-1}/db + [b=beta] dh_{t-1}/da
 * with dE/dm_c = 2 e de_c, d2E/dm_c dm_d = 2 (de_c de_d + e d2e_cd).  Without MA
 * terms e_t = (y_t - mu) - sum_k ar_k (y_{t-k} - mu) is linear in each parameter,
 * d2e/dmu dar_k = 1 the only second derivative; MA terms add the recursion
 * of ma_second.  Each term l_t(h_t, e_t, nu) adds
 *   l_h d2h_ab + l_hh dh_a dh_b + l_he (dh_a de_b + de_a dh_b) + l_ee de_a de_b + l_e d2e_ab
 * to the (a, b) entry, and l_hnu dh_a + l_enu de_a, l_nunu to the nu row.
 * Normal:    l = -1/2 (log 2 pi + log h + e^2/h).
 * Student-t: l = K(nu) + nu/2 log h - (nu+1)/2 log q,  q = h (nu-2) + e^2,
 *            K = lnG((nu+1)/2) - lnG(nu/2) - 1/2 log pi + nu/2 log(nu-2),
 * the standardised t density written so that its partial derivatives in
 * (h, e, nu) are short. */

/* Packed lower triangle index of (a, b), a >= b. */
#define TRI(a, b) ((a) * ((a) + 1) / 2 + (b))

/* d2e_t for residual I of a mean with NMA MA terms (mean parameters from
 * index M0 on), from DE (N x KM first derivatives) and RING (the last R
 * values of d2e, TRI-packed), into OUT, which is also stored in RING.
 * Returns OUT. */
static inline double *ma_second(const double *de, double *ring, size_t i, const double *d2c,
                                double *out, const double *ma, const size_t *mlag, size_t R,
                                const int km, const int m0, const int nma)
{
    const int T = km * (km + 1) / 2;
    memcpy(out, d2c, (size_t)T * sizeof *out);
    for (int j = 0; j < nma; j++) {
        if (i < mlag[j])
            continue;                       /* pre-sample: zero */
        const size_t s = i - mlag[j];
        const double *past = ring + (s % R) * (size_t)T, *dp = de + s * (size_t)km;
        for (int t = 0; t < T; t++)
            out[t] -= ma[j] * past[t];
        const int c = m0 + j;               /* the row and column of ma_j */
        for (int b = 0; b < km; b++) {
            const int hi = c > b ? c : b, lo = c > b ? b : c;
            out[TRI(hi, lo)] -= dp[b] * (b == c ? 2.0 : 1.0);
        }
    }
    memcpy(ring + (i % R) * (size_t)T, out, (size_t)T * sizeof *out);
    return out;
}

#define HESS_BODY hess_fixed
#if defined(__GNUC__)
#define HESS_UNROLL _Pragma("GCC unroll 16")
#else
#define HESS_UNROLL
#endif
#include "fit_garch_hess_body.inc"
#undef HESS_BODY
#undef HESS_UNROLL

#define HESS_BODY hess_general
#define HESS_UNROLL
#include "fit_garch_hess_body.inc"
#undef HESS_BODY
#undef HESS_UNROLL

int fit_garch_hessian(fit_garch_work *w, const double *th, double *ll, double *grad,
                      double *hess, double *opg)
{
    const int km = w->k_mean, nu = w->has_nu, moff = w->spec.mean ? 1 : 0, nma = w->spec.n_ma;
    if (km > FIT_GARCH_HESS_KM)
        return HN_EINVAL;
    /* The log-likelihood, gradient, e_t, h_t (and with MA terms de_t) come
     * from the ordinary pass, so they are the same numbers as everywhere
     * else; this pass adds the second derivatives (and the score outer
     * product when asked). */
    double gbuf[FIT_MAX_PARAMS];
    int rc = fit_garch_loglik(w, th, ll, grad ? grad : nma ? gbuf : NULL, NULL, NULL);
    if (rc != HN_OK)
        return rc;
    /* compiled with the counts fixed for the common means: nothing, a
     * constant, a constant with one or two AR terms; the rest in general */
#define FIXED(K, M) \
    (nu ? hess_fixed(w, th, hess, opg, NULL, K, M, 0, 1, opg != NULL) \
        : hess_fixed(w, th, hess, opg, NULL, K, M, 0, 0, opg != NULL))
    if (nma == 0) {
        if (km == 0)
            return FIXED(0, 0);
        if (moff && km <= 3)
            return km == 1 ? FIXED(1, 1) : km == 2 ? FIXED(2, 1) : FIXED(3, 1);
    }
#undef FIXED
    double *ring = NULL;
    if (nma) {                              /* the ring of past second derivatives */
        size_t R = 1;
        for (int j = 0; j < nma; j++)
            if ((size_t)w->spec.ma_lag[j] + 1 > R)
                R = (size_t)w->spec.ma_lag[j] + 1;
        ring = malloc(R * (size_t)(km * (km + 1) / 2) * sizeof *ring);
        if (!ring)
            return HN_ENOMEM;
    }
    rc = nu ? hess_general(w, th, hess, opg, ring, km, moff, nma, 1, opg != NULL)
            : hess_general(w, th, hess, opg, ring, km, moff, nma, 0, opg != NULL);
    free(ring);
    return rc;
}
