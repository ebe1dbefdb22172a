/* fit_garch_hess.c - analytic Hessian of the AR-GARCH(1,1) conditional log-likelihood. */
#include "fit_garch_lik.h"
#include "hn_clones.h"
#include "hn_status.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_sf_psi.h>
#include <omp.h>

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

/* The recursion's state between two residuals (see the body). */
#define HESS_TRI (FIT_GARCH_HESS_MAX * (FIT_GARCH_HESS_MAX + 1) / 2)
typedef struct {
    double dh[FIT_GARCH_HESS_MAX], dE[FIT_GARCH_HESS_MAX], H2[HESS_TRI], d2E[HESS_TRI];
    double Eprev, hprev;
} hess_state;

/* A stretch's sums: the packed Hessian over the parameters sigma2 depends
 * on, the nu row, the nu-nu term and the score outer product. */
typedef struct {
    double acc[HESS_TRI], nacc[FIT_GARCH_HESS_MAX], nunu;
    double opg[FIT_GARCH_HESS_MAX * FIT_GARCH_HESS_MAX];
} hess_part;

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

/* One stretch (see the body) with the counts fixed at compile time where
 * they are common, chosen from their run-time values; not inlined, so that
 * a parallel region calling it runs the fixed copies. */
static HN_HOT_CLONES __attribute__((noinline)) void
hess_any(fit_garch_work *w, const double *th, hess_part *pt, double *ring, int km, int moff,
         int nma, int nu, int want_opg, size_t lo, size_t hi, const hess_state *in,
         hess_state *out, int warm)
{
#define FIXED(K, M)                                                                    \
    do {                                                                               \
        if (nu)                                                                        \
            hess_fixed(w, th, pt, NULL, K, M, 0, 1, want_opg, lo, hi, in, out, warm);  \
        else                                                                           \
            hess_fixed(w, th, pt, NULL, K, M, 0, 0, want_opg, lo, hi, in, out, warm);  \
        return;                                                                        \
    } while (0)
    if (nma == 0) {
        if (km == 0)
            FIXED(0, 0);
        if (moff && km == 1)
            FIXED(1, 1);
        if (moff && km == 2)
            FIXED(2, 1);
        if (moff && km == 3)
            FIXED(3, 1);
    }
#undef FIXED
    /* the common means with MA terms: a constant with ma(1), arma(1,1),
     * arma(2,1), ma(2) and arma(1,2) (the second derivatives of e_t follow
     * their recursion over RING) */
#define FIXED_MA(K, Q)                                                                 \
    do {                                                                               \
        if (nu)                                                                        \
            hess_fixed(w, th, pt, ring, K, 1, Q, 1, want_opg, lo, hi, in, out, warm);  \
        else                                                                           \
            hess_fixed(w, th, pt, ring, K, 1, Q, 0, want_opg, lo, hi, in, out, warm);  \
        return;                                                                        \
    } while (0)
    if (moff && nma == 1 && km >= 2 && km <= 4) {
        if (km == 2)
            FIXED_MA(2, 1);
        if (km == 3)
            FIXED_MA(3, 1);
        FIXED_MA(4, 1);
    }
    if (moff && nma == 2 && km >= 3 && km <= 4) {
        if (km == 3)
            FIXED_MA(3, 2);
        FIXED_MA(4, 2);
    }
#undef FIXED_MA
    if (nu)
        hess_general(w, th, pt, ring, km, moff, nma, 1, want_opg, lo, hi, in, out, warm);
    else
        hess_general(w, th, pt, ring, km, moff, nma, 0, want_opg, lo, hi, in, out, warm);
}

/* As the likelihood pass, series of this many residuals or more (without
 * MA terms, whose second derivatives follow a recursion of their own) are
 * taken as two halves, the second on its own thread when one is free. */
#define HESS_SPLIT_MIN 65536

int fit_garch_hessian(fit_garch_work *w, const double *th, double *ll, double *grad,
                      double *hess, double *opg)
{
    const int km = w->k_mean, nu = w->has_nu, moff = w->spec.mean ? 1 : 0, nma = w->spec.n_ma;
    const int np = w->np, kv = km + 3, io = km;
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
    /* The second half starts from the state recovered over the W residuals
     * before it, on one thread or two alike, so that the sums do not depend
     * on the threads.  (Unlike the likelihood's, this state cannot be
     * checked bit for bit against the first half's end: the second
     * derivatives of a constant input, such as d2h/dmu2, settle on a fixed
     * point of the rounded recursion, and a recursion can have several
     * adjacent ones; the two agree to a few units in the last place.) */
    const size_t N = w->N;
    const double beta = th[io + 2];
    size_t W = 0;
    if (nma == 0 && N >= HESS_SPLIT_MIN && beta > 0.0 && beta < 1.0) {
        double wd = ceil(46.0 / -log(beta));
        W = wd < (double)(N / 4) ? (size_t)wd : 0;
    }
    const size_t split = W > 0 ? N / 2 : N;
    const int want_opg = opg != NULL;
    hess_part *pp = calloc(2, sizeof *pp);
    hess_state *st = malloc(2 * sizeof *st);
    if (!pp || !st) {
        free(pp);
        free(st);
        free(ring);
        return HN_ENOMEM;
    }
    memset(st, 0, 2 * sizeof *st);
    const int par = split < N && !omp_in_parallel() && omp_get_max_threads() > 1;
#pragma omp parallel num_threads(2) if (par)
    {
        const int me = omp_get_thread_num(), team = omp_get_num_threads();
        if (me == 0)
            hess_any(w, th, &pp[0], ring, km, moff, nma, nu, want_opg, 0, split, NULL, NULL, 0);
        if (split < N && (me == 1 || team == 1)) {
            hess_any(w, th, NULL, ring, km, moff, nma, nu, want_opg, split - W, split, NULL,
                     &st[0], 1);
            hess_any(w, th, &pp[1], ring, km, moff, nma, nu, want_opg, split, N, &st[0], &st[1],
                     0);
        }
    }
    free(ring);
    /* the halves' sums, in order */
    const int two = split < N;
    for (int a = 0; a < kv; a++)
        for (int b = 0; b <= a; b++) {
            const int t = TRI(a, b);
            hess[a * np + b] = hess[b * np + a] = two ? pp[0].acc[t] + pp[1].acc[t] : pp[0].acc[t];
        }
    if (nu) {
        const double nuv = th[np - 1], nm2 = nuv - 2.0;
        const double K2 = 0.25 * gsl_sf_psi_1(0.5 * (nuv + 1.0)) - 0.25 * gsl_sf_psi_1(0.5 * nuv) +
                          0.5 / nm2 - 1.0 / (nm2 * nm2);
        for (int a = 0; a < kv; a++)
            hess[a * np + np - 1] = hess[(np - 1) * np + a] =
                two ? pp[0].nacc[a] + pp[1].nacc[a] : pp[0].nacc[a];
        hess[(np - 1) * np + np - 1] =
            (two ? pp[0].nunu + pp[1].nunu : pp[0].nunu) + (double)N * K2;
    }
    if (want_opg)
        for (int a = 0; a < np; a++)
            for (int b = 0; b <= a; b++)
                opg[a * np + b] = opg[b * np + a] =
                    two ? pp[0].opg[a * np + b] + pp[1].opg[a * np + b] : pp[0].opg[a * np + b];
    free(pp);
    free(st);
    for (int a = 0; a < np * np; a++)
        if (!isfinite(hess[a]))
            return HN_ENUMERIC;
    return HN_OK;
}
