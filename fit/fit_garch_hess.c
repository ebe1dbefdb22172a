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

#if defined(__GNUC__)
#define UNROLL _Pragma("GCC unroll 16")
#else
#define UNROLL
#endif

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

/* The pass behind fit_garch_hessian with the counts fixed at compile time
 * in the common models (KM mean parameters of which MOFF = 1 is mu, HAS_NU,
 * WANT_OPG), so that the loops over parameter pairs unroll and their tests
 * fold away.  The caller has made the ordinary pass at TH. */
static inline __attribute__((always_inline)) int
hess_body(fit_garch_work *w, const double *th, double *hess, double *opg, double *ring,
          const int km, const int moff, const int nma, const int has_nu, const int want_opg)
{
    if (km > FIT_GARCH_HESS_KM || nma > km)
        __builtin_unreachable();            /* the caller's checks, for the compiler */
    const int np = km + 3 + has_nu, io = km, kv = km + 3, nar = km - moff - nma;
    const int T = km * (km + 1) / 2;
    const size_t N = w->N;
    const double alpha = th[io + 1], beta = th[io + 2];
    const double nu = has_nu ? th[np - 1] : 0.0;
    const double mu = moff ? th[0] : 0.0;
    double ar[FIT_MAX_TERMS], sum_ar = 0.0;
    ptrdiff_t lag[FIT_MAX_TERMS];
    for (int k = 0; k < nar; k++) {
        ar[k] = th[moff + k];
        lag[k] = (ptrdiff_t)w->spec.ar_lag[k];
        sum_ar += ar[k];
    }
    const double admu = sum_ar - 1.0;
    const double *y0 = w->y + w->start, *ev = w->e, *hv = w->h;
    double ma[FIT_MAX_TERMS];
    size_t mlag[FIT_MAX_TERMS], R = 1;
    for (int j = 0; j < nma; j++) {
        ma[j] = th[moff + nar + j];
        mlag[j] = (size_t)w->spec.ma_lag[j];
        if (mlag[j] + 1 > R)
            R = mlag[j] + 1;
    }

    /* d s2 and d2 s2 over the mean parameters. */
    /* d2c: the second derivatives of e_t without MA terms (1 for each
     * (mu, ar_k)); with MA terms d2e_t follows the recursion
     * d2e_t = d2c - sum_j ma_j d2e_{t-m_j} - [c = ma_j] de_{t-m_j,d} - [d = ma_j] de_{t-m_j,c},
     * kept for the last R residuals in RING (pre-sample values 0). */
    double dloc[FIT_GARCH_HESS_MAX], d2c[FIT_GARCH_HESS_MAX * (FIT_GARCH_HESS_MAX + 1) / 2];
    double d2l[FIT_GARCH_HESS_MAX * (FIT_GARCH_HESS_MAX + 1) / 2];
    const double *d = dloc, *d2e = d2c;
    memset(d2c, 0, sizeof d2c);
    if (moff)
        for (int k = 0; k < nar; k++)
            d2c[TRI(1 + k, 0)] = 1.0;
    double ds2[FIT_GARCH_HESS_MAX], d2s2[FIT_GARCH_HESS_MAX * (FIT_GARCH_HESS_MAX + 1) / 2];
    memset(ds2, 0, sizeof ds2);
    memset(d2s2, 0, sizeof d2s2);
    if (nma)
        memset(ring, 0, R * (size_t)T * sizeof *ring);
/* de_t into D (and d2e_t into D2E with MA terms) for residual I: stored by
 * the ordinary pass and continued by ma_second with MA terms, else formed
 * from y as the residual pass forms it. */
#define MEAN_DERIVS(i)                                                                   \
    do {                                                                                 \
        if (nma) {                                                                       \
            d = w->de + (i) * (size_t)km;                                                \
            d2e = ma_second(w->de, ring, (i), d2c, d2l, ma, mlag, R, km, moff + nar, nma); \
        } else {                                                                         \
            const double *yt = y0 + (i);                                                 \
            if (moff)                                                                    \
                dloc[0] = admu;                                                          \
            UNROLL                                                                       \
            for (int k = 0; k < nar; k++)                                                \
                dloc[moff + k] = -(yt[-lag[k]] - mu);                                    \
        }                                                                                \
    } while (0)
    for (size_t i = 0; i < N; i++) {
        const double e = ev[i];
        MEAN_DERIVS(i);
        for (int a = 0; a < km; a++) {
            ds2[a] += e * d[a];
            for (int b = 0; b <= a; b++)
                d2s2[TRI(a, b)] += d[a] * d[b] + e * d2e[TRI(a, b)];
        }
    }
    if (nma)
        memset(ring, 0, R * (size_t)T * sizeof *ring);
    const double iN2 = 2.0 / (double)N;
    for (int a = 0; a < km; a++)
        ds2[a] *= iN2;
    for (int a = 0; a < km * (km + 1) / 2; a++)
        d2s2[a] *= iN2;

    /* State before the sample: index -1. */
    double dh[FIT_GARCH_HESS_MAX], dE[FIT_GARCH_HESS_MAX];
    double H2[FIT_GARCH_HESS_MAX * (FIT_GARCH_HESS_MAX + 1) / 2];   /* d2h over kv */
    double d2E[FIT_GARCH_HESS_MAX * (FIT_GARCH_HESS_MAX + 1) / 2];  /* d2E over km */
    double acc[FIT_GARCH_HESS_MAX * (FIT_GARCH_HESS_MAX + 1) / 2];  /* over np */
    double nacc[FIT_GARCH_HESS_MAX];                                /* nu row, a < kv */
    double row[FIT_GARCH_HESS_MAX] = { 0.0 };
    memset(dh, 0, sizeof dh);
    memset(dE, 0, sizeof dE);
    memset(H2, 0, sizeof H2);
    memset(d2E, 0, sizeof d2E);
    memset(acc, 0, sizeof acc);
    memset(nacc, 0, sizeof nacc);
    for (int a = 0; a < km; a++) {
        dh[a] = dE[a] = ds2[a];
        for (int b = 0; b <= a; b++)
            H2[TRI(a, b)] = d2E[TRI(a, b)] = d2s2[TRI(a, b)];
    }
    double Eprev = w->s2, hprev = w->s2;
    const int ia = io + 1, ib = io + 2;
    const double nm2 = has_nu ? nu - 2.0 : 1.0;
    double nunu = 0.0;
    const double dcst = has_nu ? 0.5 * gsl_sf_psi(0.5 * (nu + 1.0)) - 0.5 * gsl_sf_psi(0.5 * nu) -
                                 0.5 / nm2 : 0.0;
    if (want_opg)
        memset(opg, 0, (size_t)np * (size_t)np * sizeof *opg);

    for (size_t i = 0; i < N; i++) {
        /* d2h_t from the state at t-1 (before dh is advanced) */
        UNROLL
        for (int a = 0; a < kv; a++)
            UNROLL
            for (int b = 0; b <= a; b++) {
                double v = beta * H2[TRI(a, b)];
                if (a < km)
                    v += alpha * d2E[TRI(a, b)];
                if (a == ia && b < km)
                    v += dE[b];
                if (a == ib)
                    v += dh[b];
                if (b == ib)
                    v += dh[a];
                H2[TRI(a, b)] = v;       /* reads only its own old value */
            }
        /* (alpha, b) with b = alpha or beta has dE = 0: nothing to add; the
         * beta row adds dh_{t-1} (twice on the diagonal, by the two tests). */
        UNROLL
        for (int a = 0; a < km; a++)
            dh[a] = alpha * dE[a] + beta * dh[a];
        dh[io] = 1.0 + beta * dh[io];
        dh[ia] = Eprev + beta * dh[ia];
        dh[ib] = hprev + beta * dh[ib];

        const double e = ev[i], h = hv[i], e2 = e * e, r = 1.0 / h;
        MEAN_DERIVS(i);
        double l_h, l_e, l_hh, l_he, l_ee, l_hn = 0.0, l_en = 0.0, l_nn = 0.0, l_n = 0.0;
        if (has_nu) {
            const double q = h * nm2 + e2, iq = 1.0 / q;
            l_h = -0.5 * r + 0.5 * (nu + 1.0) * e2 * r * iq;
            l_e = -(nu + 1.0) * e * iq;
            l_hh = -0.5 * nu * r * r + 0.5 * (nu + 1.0) * nm2 * nm2 * iq * iq;
            l_he = (nu + 1.0) * nm2 * e * iq * iq;
            l_ee = -(nu + 1.0) * (q - 2.0 * e2) * iq * iq;
            l_hn = 0.5 * r - 0.5 * (2.0 * nu - 1.0) * iq + 0.5 * (nu + 1.0) * nm2 * h * iq * iq;
            l_en = -e * iq + (nu + 1.0) * e * h * iq * iq;
            l_nn = -h * iq + 0.5 * (nu + 1.0) * h * h * iq * iq;
            if (want_opg) {
                const double u = e2 * r / nm2;
                l_n = -0.5 * log1p(u) + 0.5 * (nu + 1.0) * u / ((1.0 + u) * nm2);
            }
        } else {
            const double e2r = e2 * r;
            l_h = -0.5 * r * (1.0 - e2r);
            l_e = -e * r;
            l_hh = r * r * (0.5 - e2r);
            l_he = e * r * r;
            l_ee = -r;
        }
        UNROLL
        for (int a = 0; a < kv; a++) {
            const double dea = a < km ? d[a] : 0.0;
            UNROLL
            for (int b = 0; b <= a; b++) {
                const double deb = b < km ? d[b] : 0.0;
                double v = l_h * H2[TRI(a, b)] + l_hh * dh[a] * dh[b] +
                           l_he * (dh[a] * deb + dea * dh[b]) + l_ee * dea * deb;
                if (a < km)
                    v += l_e * d2e[TRI(a, b)];
                acc[TRI(a, b)] += v;
            }
            if (has_nu)
                nacc[a] += l_hn * dh[a] + l_en * dea;
        }
        nunu += l_nn;
        if (want_opg) {
            UNROLL
            for (int a = 0; a < kv; a++)
                row[a] = l_h * dh[a] + (a < km ? l_e * d[a] : 0.0);
            if (has_nu)
                row[np - 1] = dcst + l_n;
            UNROLL
            for (int a = 0; a < np; a++)
                UNROLL
                for (int b = 0; b <= a; b++)
                    opg[a * np + b] += row[a] * row[b];
        }
        /* state for t+1 */
        UNROLL
        for (int a = 0; a < km; a++) {
            dE[a] = 2.0 * e * d[a];
            UNROLL
            for (int b = 0; b <= a; b++)
                d2E[TRI(a, b)] = 2.0 * (d[a] * d[b] + e * d2e[TRI(a, b)]);
        }
        Eprev = e2;
        hprev = h;
    }

#undef MEAN_DERIVS
    for (int a = 0; a < kv; a++)
        for (int b = 0; b <= a; b++)
            hess[a * np + b] = hess[b * np + a] = acc[TRI(a, b)];
    if (has_nu) {
        const double K2 = 0.25 * gsl_sf_psi_1(0.5 * (nu + 1.0)) - 0.25 * gsl_sf_psi_1(0.5 * nu) +
                          0.5 / nm2 - 1.0 / (nm2 * nm2);
        for (int a = 0; a < kv; a++)
            hess[a * np + np - 1] = hess[(np - 1) * np + a] = nacc[a];
        hess[(np - 1) * np + np - 1] = nunu + (double)N * K2;
    }
    if (want_opg)
        for (int a = 0; a < np; a++)
            for (int b = a + 1; b < np; b++)
                opg[a * np + b] = opg[b * np + a];
    for (int a = 0; a < np * np; a++)
        if (!isfinite(hess[a]))
            return HN_ENUMERIC;
    return HN_OK;
}

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
    if (nma) {
        /* general counts; the ring of past second derivatives */
        size_t R = 1;
        for (int j = 0; j < nma; j++)
            if ((size_t)w->spec.ma_lag[j] + 1 > R)
                R = (size_t)w->spec.ma_lag[j] + 1;
        double *ring = malloc(R * (size_t)(km * (km + 1) / 2) * sizeof *ring);
        if (!ring)
            return HN_ENOMEM;
        rc = nu ? (opg ? hess_body(w, th, hess, opg, ring, km, moff, nma, 1, 1)
                       : hess_body(w, th, hess, NULL, ring, km, moff, nma, 1, 0))
                : (opg ? hess_body(w, th, hess, opg, ring, km, moff, nma, 0, 1)
                       : hess_body(w, th, hess, NULL, ring, km, moff, nma, 0, 0));
        free(ring);
        return rc;
    }
#define HB(K, M) \
    (nu ? (opg ? hess_body(w, th, hess, opg, NULL, K, M, 0, 1, 1) \
               : hess_body(w, th, hess, NULL, NULL, K, M, 0, 1, 0)) \
        : (opg ? hess_body(w, th, hess, opg, NULL, K, M, 0, 0, 1) \
               : hess_body(w, th, hess, NULL, NULL, K, M, 0, 0, 0)))
    if (km == 0)
        return HB(0, 0);
    if (km == 1)
        return moff ? HB(1, 1) : HB(1, 0);
    if (km == 2)
        return moff ? HB(2, 1) : HB(2, 0);
    if (km == 3)
        return moff ? HB(3, 1) : HB(3, 0);
    return moff ? HB(4, 1) : HB(4, 0);
#undef HB
}
