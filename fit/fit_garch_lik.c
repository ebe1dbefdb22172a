/* fit_garch_lik.c - ARMA-GARCH(1,1) conditional log-likelihood with its analytic gradient. */
#include "fit_garch_lik.h"
#include "hn_clones.h"
#include "hn_mem.h"
#include "hn_status.h"

#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_sf_gamma.h>
#include <gsl/gsl_sf_psi.h>
#include <omp.h>

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

/* Loops over the parameters unroll in full in the fixed-count copies (a
 * hint only; the order of the operations stays as written). */
#if defined(__GNUC__)
#define UNROLL _Pragma("GCC unroll 16")
#else
#define UNROLL
#endif

/* The window sums of an AR mean (see fit_garch_work): plain sums over
 * blocks of 64 residuals, compensated across blocks, about a shift that
 * centres y, so that the products carry no large mean. */
static inline __attribute__((always_inline)) void moments_body(fit_garch_work *w, const int K)
{
    const int B = 64;
    const size_t N = w->N;
    const double *y0 = w->y + w->start;
    ptrdiff_t lag[FIT_GARCH_MOM];
    lag[0] = 0;
    for (int k = 1; k < K; k++)
        lag[k] = (ptrdiff_t)w->spec.ar_lag[k - 1];
    ksum sc = { 0.0, 0.0 };
    for (size_t i0 = 0; i0 < N; i0 += B) {
        const size_t i1 = N - i0 > (size_t)B ? i0 + B : N;
        double b = 0.0;
        for (size_t i = i0; i < i1; i++)
            b += y0[i];
        ksum_add(&sc, b);
    }
    const double c = ksum_value(&sc) / (double)N;
    ksum m[FIT_GARCH_MOM], G[FIT_GARCH_MOM * FIT_GARCH_MOM];
    memset(m, 0, sizeof m);
    memset(G, 0, sizeof G);
    for (size_t i0 = 0; i0 < N; i0 += B) {
        const size_t i1 = N - i0 > (size_t)B ? i0 + B : N;
        double bm[FIT_GARCH_MOM] = { 0.0 }, bG[FIT_GARCH_MOM * FIT_GARCH_MOM] = { 0.0 };
        for (size_t i = i0; i < i1; i++) {
            double u[FIT_GARCH_MOM];
            UNROLL
            for (int j = 0; j < K; j++)
                u[j] = y0[(ptrdiff_t)i - lag[j]] - c;
            UNROLL
            for (int j = 0; j < K; j++) {
                bm[j] += u[j];
                UNROLL
                for (int k = 0; k <= j; k++)
                    bG[j * K + k] += u[j] * u[k];
            }
        }
        for (int j = 0; j < K; j++) {
            ksum_add(&m[j], bm[j]);
            for (int k = 0; k <= j; k++)
                ksum_add(&G[j * K + k], bG[j * K + k]);
        }
    }
    w->mom_c = c;
    for (int j = 0; j < K; j++) {
        w->mom_m[j] = ksum_value(&m[j]);
        for (int k = 0; k <= j; k++)
            w->mom_G[j * K + k] = w->mom_G[k * K + j] = ksum_value(&G[j * K + k]);
    }
    w->mom = 1;
}

/* moments_body with the number of series fixed at compile time. */
_Static_assert(FIT_GARCH_MOM == 5, "one case per AR count below FIT_GARCH_MOM");
static void moments_init(fit_garch_work *w)
{
    switch (w->spec.n_ar) {
    case 0: moments_body(w, 1); break;
    case 1: moments_body(w, 2); break;
    case 2: moments_body(w, 3); break;
    case 3: moments_body(w, 4); break;
    default: moments_body(w, 5); break;
    }
}

/* sum e_t^2 into *SSR and, when GSUM is not NULL, sum_t e_t de_t/dtheta_mean
 * (as ar_resid gives them) from the window sums: with a = (1, -ar..),
 * S = sum a, u_t as in fit_garch_work and d = mom_c - mu, e_t = a'u_t + S d,
 * so sum e^2 = a'Ga + 2 S d a'm + N (S d)^2.  The terms of a'Ga cancel by
 * about (sum |a|)^2 sum u_0^2 / sum e^2, a few digits for an AR root near 1.
 * HN_OK or HN_EDOMAIN. */
static int ar_moments(const fit_garch_work *w, const double *th, double *ssr, double *gsum)
{
    const int moff = w->spec.mean ? 1 : 0, K = w->spec.n_ar + 1;
    const double dn = (double)w->N;
    double a[FIT_GARCH_MOM], Ga[FIT_GARCH_MOM], S = 1.0, am = 0.0, aGa = 0.0;
    a[0] = 1.0;
    for (int k = 1; k < K; k++) {
        a[k] = -th[moff + k - 1];
        S += a[k];
    }
    for (int j = 0; j < K; j++) {
        double v = 0.0;
        for (int k = 0; k < K; k++)
            v += w->mom_G[j * K + k] * a[k];
        Ga[j] = v;
        aGa += a[j] * v;
        am += a[j] * w->mom_m[j];
    }
    const double d = w->mom_c - (moff ? th[0] : 0.0), delta = S * d;
    *ssr = aGa + 2.0 * delta * am + dn * delta * delta;
    if (!isfinite(*ssr))
        return HN_EDOMAIN;
    if (gsum) {
        const double se = am + dn * delta;             /* sum e_t */
        if (moff)
            gsum[0] = -S * se;
        for (int k = 1; k < K; k++)
            gsum[moff + k - 1] = -(Ga[k] + delta * w->mom_m[k] + d * se);
    }
    return HN_OK;
}

int fit_garch_mean_sums(const fit_garch_work *w, const double *th, double *s1, double *s2)
{
    if (!w->mom)
        return HN_EINVAL;
    const int moff = w->spec.mean ? 1 : 0, nar = w->spec.n_ar, K = nar + 1, km = moff + nar;
    const double dn = (double)w->N;
    double ssr;
    int rc = ar_moments(w, th, &ssr, s1);
    if (rc != HN_OK)
        return rc;
    double S = 1.0, am = 0.0;
    for (int k = 0; k < nar; k++)
        S -= th[moff + k];
    am = w->mom_m[0];
    for (int k = 1; k < K; k++)
        am -= th[moff + k - 1] * w->mom_m[k];
    const double d = w->mom_c - (moff ? th[0] : 0.0), se = am + dn * S * d;
    /* de/dmu = -S; de/dar_k = -(u_k + d); d2e/dmu dar_k = 1, else 0 */
    for (int a = 0; a < km; a++)
        for (int b = 0; b <= a; b++) {
            double v;
            if (moff && a == 0)
                v = dn * S * S;
            else if (moff && b == 0)
                v = S * (w->mom_m[a] + dn * d) + se;
            else {
                const int j = a - moff + 1, k = b - moff + 1;
                v = w->mom_G[j * K + k] + d * (w->mom_m[j] + w->mom_m[k]) + dn * d * d;
            }
            s2[a * (a + 1) / 2 + b] = v;
        }
    return HN_OK;
}

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
    w->e = hn_alloc_long(w->N * sizeof *w->e);
    w->h = hn_alloc_long(w->N * sizeof *w->h);
    w->de = w->k_mean ? hn_alloc_long(w->N * (size_t)w->k_mean * sizeof *w->de) : NULL;
    w->aw = fit_arma_ws_alloc(spec);
    if (!w->e || !w->h || (w->k_mean && !w->de) || !w->aw) {
        fit_garch_work_free(w);
        return HN_ENOMEM;
    }
    if (spec->n_ma == 0 && spec->n_ar < FIT_GARCH_MOM)
        moments_init(w);
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


/* Sum of log terms without a logarithm per observation: log prod_i v_i =
 * sum_i (k_i ln 2) + log prod_i m_i with v_i = m_i 2^k_i, m_i in [1, 2), the
 * product taken over blocks of LOG_BLOCK terms (below 2^LOG_BLOCK, so it
 * cannot overflow) and one logarithm per block.  The rounding error of a
 * block is that of LOG_BLOCK products, about that of as many logarithms, at a
 * fraction of their cost.  V must be positive, normal and finite. */
#define LOG_BLOCK 16

static inline double mantissa(double v, int64_t *ex)
{
    uint64_t b;
    memcpy(&b, &v, sizeof b);
    *ex += (int64_t)(b >> 52) - 1023;
    b = (b & 0x000FFFFFFFFFFFFFull) | 0x3FF0000000000000ull;
    memcpy(&v, &b, sizeof v);
    return v;
}

/* e_t of a mean without MA terms from the series, by the operations of
 * ar_resid (so the same value). */
static inline __attribute__((always_inline)) double
ar_resid_at(const double *yt, double amu, const double *arc, const ptrdiff_t *alag, const int nar)
{
    double e = yt[0] - amu;
    UNROLL
    for (int k = 0; k < nar; k++)
        e -= arc[k] * (yt[-alag[k]] - amu);
    return e;
}

/* One step of the derivative recursion of sigma2_t:
 * d sigma2_t = [mean: alpha d e2_{t-1}; omega 1; alpha e2_{t-1}; beta sigma2_{t-1}]
 *              + beta d sigma2_{t-1}. */
static inline __attribute__((always_inline)) void
dh_step(double *dh, const double *de2, double alpha, double beta, double e2prev, double hprev,
        const int km)
{
    UNROLL
    for (int c = 0; c < km; c++)
        dh[c] = alpha * de2[c] + beta * dh[c];
    dh[km] = 1.0 + beta * dh[km];
    dh[km + 1] = e2prev + beta * dh[km + 1];
    dh[km + 2] = hprev + beta * dh[km + 2];
}

/* de_t/dtheta_mean for residual I: without MA terms (sum ar - 1,
 * -(y_{t-lag} - mu)...) formed into DLOC as fit_arma_resid forms it, else
 * the row fit_arma_resid stored in DEV. */
static inline __attribute__((always_inline)) const double *
mean_derivs_at(const double *yt, size_t i, const double *dev, double *dloc, double amu,
               double admu, const ptrdiff_t *alag, const int km, const int ar_only,
               const int moff, const int nar)
{
    if (!ar_only)
        return dev + i * (size_t)km;
    if (moff)
        dloc[0] = admu;
    UNROLL
    for (int k = 0; k < nar; k++)
        dloc[moff + k] = -(yt[-alag[k]] - amu);
    return dloc;
}

/* Residuals of a mean without MA terms into w->e (the operations of
 * fit_arma_resid, so the same values), their sum of squares *SSR and, when
 * GSUM is not NULL, sum_t e_t de_t/dtheta_mean: no recursion, so one
 * streaming loop with block sums.  HN_OK or HN_EDOMAIN (a value not finite). */
static inline __attribute__((always_inline)) int
ar_resid_body(fit_garch_work *w, const double *th, double *ssr, double *gsum, const int moff,
              const int nar)
{
    const double mu = moff ? th[0] : 0.0;
    double ar[FIT_MAX_TERMS], sum_ar = 0.0;
    ptrdiff_t lag[FIT_MAX_TERMS];
    for (int k = 0; k < nar; k++) {
        ar[k] = th[moff + k];
        lag[k] = (ptrdiff_t)w->spec.ar_lag[k];
        sum_ar += ar[k];
    }
    const double *y0 = w->y + w->start;
    double *ev = w->e;
    const size_t N = w->N;
    ksum s_e2 = { 0.0, 0.0 }, s_e = { 0.0, 0.0 }, s_ey[FIT_MAX_TERMS];
    for (int k = 0; k < nar; k++)
        s_ey[k] = (ksum){ 0.0, 0.0 };
    for (size_t i0 = 0; i0 < N; i0 += LOG_BLOCK) {
        const size_t i1 = N - i0 > LOG_BLOCK ? i0 + LOG_BLOCK : N;
        double be2 = 0.0, be = 0.0, bey[FIT_MAX_TERMS];
        for (int k = 0; k < nar; k++)
            bey[k] = 0.0;
        for (size_t i = i0; i < i1; i++) {
            const double *yt = y0 + i;
            const double et = ar_resid_at(yt, mu, ar, lag, nar);
            ev[i] = et;
            be2 += et * et;
            if (gsum) {
                be += et;
                for (int k = 0; k < nar; k++)
                    bey[k] += et * (yt[-lag[k]] - mu);
            }
        }
        ksum_add(&s_e2, be2);
        if (gsum) {
            ksum_add(&s_e, be);
            for (int k = 0; k < nar; k++)
                ksum_add(&s_ey[k], bey[k]);
        }
    }
    *ssr = ksum_value(&s_e2);
    if (!isfinite(*ssr))
        return HN_EDOMAIN;
    if (gsum) {
        if (moff)
            gsum[0] = (sum_ar - 1.0) * ksum_value(&s_e);
        for (int k = 0; k < nar; k++)
            gsum[moff + k] = -ksum_value(&s_ey[k]);
    }
    return HN_OK;
}

/* ar_resid with the term counts fixed at compile time for the common models. */
static int ar_resid(fit_garch_work *w, const double *th, double *ssr, double *gsum)
{
    const int moff = w->spec.mean ? 1 : 0, nar = w->spec.n_ar;
#define AR_CASE(M, A) \
    if (moff == (M) && nar == (A)) \
        return gsum ? ar_resid_body(w, th, ssr, gsum, M, A) : ar_resid_body(w, th, ssr, NULL, M, A);
    AR_CASE(1, 0) AR_CASE(1, 1) AR_CASE(1, 2) AR_CASE(0, 1) AR_CASE(0, 2)
#undef AR_CASE
    return ar_resid_body(w, th, ssr, gsum, moff, nar);
}

/* The variance recursion's state between two residuals: sigma2_{t-1},
 * e^2_{t-1} and their derivatives. */
typedef struct {
    double hprev, e2prev, dh[FIT_MAX_PARAMS], de2[FIT_MAX_PARAMS];
} lik_state;

/* What a stretch of residuals adds: the log-likelihood's sum, with t the
 * sums behind the nu-gradient, the gradient and the score outer product. */
typedef struct {
    ksum acc, lu_acc;
    double gnu, g[FIT_MAX_PARAMS];
    double *opg;            /* np x np lower triangle, zeroed by the caller; NULL: none */
    int rc;
} lik_part;

/* Everything a stretch needs that is fixed in one pass. */
typedef struct {
    const double *ev, *dev, *y0, *arc;
    const ptrdiff_t *alag;
    double *hv, *ew, *scores;
    double omega, alpha, beta, nu, nm2, inm2, dcst, amu, admu;
    int inl, moff, nar;
} lik_ctx;

/* Residuals LO..HI-1 (LO a multiple of LOG_BLOCK) from the state ST, which
 * is left at HI; their sums into PT (zeroed by the caller); PT->rc is
 * HN_EDOMAIN when a variance is not positive and finite. */
static inline __attribute__((always_inline)) void
lik_range(const lik_ctx *cx, size_t lo, size_t hi, lik_state *st, lik_part *pt, const int km,
          const int has_nu, const int ar_only, const int mode, const int fmoff, const int fnar)
{
    const int np = km + 3 + has_nu, kv = km + 3;
    const int want_d = mode >= 1, want_rows = mode == 2;
    const double omega = cx->omega, alpha = cx->alpha, beta = cx->beta, nu = cx->nu;
    const double inm2 = cx->inm2, dcst = cx->dcst, amu = cx->amu, admu = cx->admu;
    const int inl = cx->inl;
    const int moff = fmoff >= 0 ? fmoff : cx->moff, nar = fmoff >= 0 ? fnar : cx->nar;
    const double *ev = cx->ev, *dev = cx->dev, *y0 = cx->y0;
    double arc[FIT_MAX_TERMS];             /* local copies: nothing stored aliases them */
    ptrdiff_t alag[FIT_MAX_TERMS];
    for (int j = 0; j < nar; j++) {
        arc[j] = cx->arc[j];
        alag[j] = cx->alag[j];
    }
    double *hv = cx->hv, *ew = cx->ew, *scores = want_rows ? cx->scores : NULL;
    double *opg = want_rows ? pt->opg : NULL;
    double dh[FIT_MAX_PARAMS], de2[FIT_MAX_PARAMS], g[FIT_MAX_PARAMS], rowl[FIT_MAX_PARAMS];
    double dloc[FIT_MAX_PARAMS];
    if (want_d) {
        UNROLL
        for (int c = 0; c < kv; c++) {
            dh[c] = st->dh[c];
            g[c] = 0.0;
        }
        UNROLL
        for (int c = 0; c < km; c++)
            de2[c] = st->de2[c];
    }
    ksum acc = { 0.0, 0.0 }, lu_acc = { 0.0, 0.0 };
    double gnu = 0.0;
    double hprev = st->hprev, e2prev = st->e2prev;
    int bad = 0;
    for (size_t i0 = lo; i0 < hi && !bad; i0 += LOG_BLOCK) {
        const size_t i1 = hi - i0 > LOG_BLOCK ? i0 + LOG_BLOCK : hi;
        double ph = 1.0, pu = 1.0, sq = 0.0, sw = 0.0;
        int64_t eh = 0, eu = 0;
        for (size_t i = i0; i < i1; i++) {
            double e;
            if (inl)
                ew[i] = e = ar_resid_at(y0 + i, amu, arc, alag, nar);
            else
                e = ev[i];
            const double h = omega + alpha * e2prev + beta * hprev;
            if (!(h >= DBL_MIN && h <= DBL_MAX)) {
                bad = 1;
                break;
            }
            hv[i] = h;
            ph *= mantissa(h, &eh);
            const double e2 = e * e, r = 1.0 / h;
            double dl_dh = 0.0, dl_de = 0.0, dl_dnu = 0.0;
            if (has_nu) {
                const double u = e2 * r * inm2, opu = 1.0 + u;
                if (!(opu <= DBL_MAX)) {
                    bad = 1;
                    break;
                }
                pu *= mantissa(opu, &eu);
                const double iopu = 1.0 / opu, wgt = (nu + 1.0) * u * iopu;
                sw += u * iopu;
                if (want_d) {
                    dl_dh = -0.5 * r * (1.0 - wgt);
                    dl_de = -(nu + 1.0) * e * r * inm2 * iopu;
                }
                if (want_rows)
                    dl_dnu = dcst - 0.5 * log1p(u) + 0.5 * wgt * inm2;
            } else {
                const double e2r = e2 * r;
                sq += e2r;
                if (want_d) {
                    dl_dh = -0.5 * r * (1.0 - e2r);
                    dl_de = -e * r;
                }
            }

            if (want_d) {
                dh_step(dh, de2, alpha, beta, e2prev, hprev, km);
                const double *d = mean_derivs_at(y0 + i, i, dev, dloc, amu, admu, alag, km,
                                                 ar_only, moff, nar);
                double *row = scores ? scores + i * (size_t)np : rowl;
                UNROLL
                for (int c = 0; c < km; c++)
                    row[c] = dl_dh * dh[c] + dl_de * d[c];
                UNROLL
                for (int c = km; c < kv; c++)
                    row[c] = dl_dh * dh[c];
                UNROLL
                for (int c = 0; c < kv; c++)
                    g[c] += row[c];
                if (has_nu)
                    row[np - 1] = dl_dnu;
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
        if (bad)
            break;
        const double lh = log(ph) + (double)eh * M_LN2;
        if (has_nu) {
            const double lu = log(pu) + (double)eu * M_LN2;
            ksum_add(&acc, -0.5 * (lh + (nu + 1.0) * lu));
            ksum_add(&lu_acc, lu);
            gnu += sw;
        } else {
            ksum_add(&acc, -0.5 * (lh + sq));
        }
    }
    pt->acc = acc;
    pt->lu_acc = lu_acc;
    pt->gnu = gnu;
    pt->rc = bad ? HN_EDOMAIN : HN_OK;
    st->hprev = hprev;
    st->e2prev = e2prev;
    if (want_d) {
        UNROLL
        for (int c = 0; c < kv; c++) {
            st->dh[c] = dh[c];
            pt->g[c] = g[c];
        }
        UNROLL
        for (int c = 0; c < km; c++)
            st->de2[c] = de2[c];
    }
    (void)np;
}

/* lik_range with the counts and modes fixed at compile time, chosen from
 * their run-time values: called from inside the parallel region, where a
 * copy inlined into loglik_body would see them as variables only (OpenMP
 * outlines the region before inlining). */
static HN_HOT_CLONES __attribute__((noinline)) void
range_any(const lik_ctx *cx, size_t lo, size_t hi, lik_state *st, lik_part *pt, int km,
          int nu, int ar, int mode, int fm, int fa)
{
#define RG(K, NU, AR, MODE, FM, FA) lik_range(cx, lo, hi, st, pt, K, NU, AR, MODE, FM, FA)
    if (fm >= 0 && mode <= 1) {
#define RF(M, A)                                                                 \
        if (fm == (M) && fa == (A)) {                                            \
            if (nu)                                                              \
                mode ? RG((M) + (A), 1, 1, 1, M, A) : RG((M) + (A), 1, 1, 0, M, A); \
            else                                                                 \
                mode ? RG((M) + (A), 0, 1, 1, M, A) : RG((M) + (A), 0, 1, 0, M, A); \
            return;                                                              \
        }
        RF(0, 0) RF(1, 0) RF(1, 1) RF(0, 1) RF(1, 2) RF(0, 2)
#undef RF
    }
#define RB(K, MODE) \
    (nu ? (ar ? RG(K, 1, 1, MODE, -1, 0) : RG(K, 1, 0, MODE, -1, 0)) \
        : (ar ? RG(K, 0, 1, MODE, -1, 0) : RG(K, 0, 0, MODE, -1, 0)))
    if (mode == 2) {
        RB(km, 2);
        return;
    }
    if (mode == 0) {
        RB(km, 0);
        return;
    }
    switch (km) {
    case 0: RB(0, 1); return;
    case 1: RB(1, 1); return;
    case 2: RB(2, 1); return;
    case 3: RB(3, 1); return;
    case 4: RB(4, 1); return;
    default: RB(km, 1); return;
    }
#undef RB
#undef RG
}

/* The state at residual LO from a rough one (sigma2 = H0, no
 * derivatives) W residuals earlier: the recursion forgets its start as
 * beta^W.  Stores nothing.  0, or -1 when a variance is not positive. */
static inline __attribute__((always_inline)) int
lik_warm(const lik_ctx *k, size_t lo, size_t W, double h0, lik_state *st, const int km,
         const int ar_only, const int mode, const int fmoff, const int fnar)
{
    const int kv = km + 3, want_d = mode >= 1;
    const double omega = k->omega, alpha = k->alpha, beta = k->beta, amu = k->amu;
    const double admu = k->admu;
    const int inl = k->inl;
    const int moff = fmoff >= 0 ? fmoff : k->moff, nar = fmoff >= 0 ? fnar : k->nar;
    const double *ev = k->ev, *dev = k->dev, *y0 = k->y0;
    double arc[FIT_MAX_TERMS];
    ptrdiff_t alag[FIT_MAX_TERMS];
    for (int j = 0; j < nar; j++) {
        arc[j] = k->arc[j];
        alag[j] = k->alag[j];
    }
    double dh[FIT_MAX_PARAMS], de2[FIT_MAX_PARAMS], dloc[FIT_MAX_PARAMS];
    double hprev = h0, e2prev = h0;
    UNROLL
    for (int c = 0; c < kv; c++)
        dh[c] = 0.0;
    UNROLL
    for (int c = 0; c < km; c++)
        de2[c] = 0.0;
    for (size_t i = lo - W; i < lo; i++) {
        const double e = inl ? ar_resid_at(y0 + i, amu, arc, alag, nar) : ev[i];
        const double h = omega + alpha * e2prev + beta * hprev;
        if (!(h >= DBL_MIN && h <= DBL_MAX))
            return -1;
        if (want_d) {
            dh_step(dh, de2, alpha, beta, e2prev, hprev, km);
            const double *d = mean_derivs_at(y0 + i, i, dev, dloc, amu, admu, alag, km, ar_only,
                                             moff, nar);
            UNROLL
            for (int c = 0; c < km; c++)
                de2[c] = 2.0 * e * d[c];
        }
        hprev = h;
        e2prev = e * e;
    }
    st->hprev = hprev;
    st->e2prev = e2prev;
    UNROLL
    for (int c = 0; c < kv; c++)
        st->dh[c] = want_d ? dh[c] : 0.0;
    UNROLL
    for (int c = 0; c < km; c++)
        st->de2[c] = want_d ? de2[c] : 0.0;
    return 0;
}

/* The same state, bit for bit, in what the pass reads. */
static int same_state(const lik_state *a, const lik_state *b, int kv, int km, int want_d)
{
    if (memcmp(&a->hprev, &b->hprev, sizeof a->hprev) || memcmp(&a->e2prev, &b->e2prev, sizeof a->e2prev))
        return 0;
    return !want_d || (memcmp(a->dh, b->dh, (size_t)kv * sizeof *a->dh) == 0 &&
                       memcmp(a->de2, b->de2, (size_t)km * sizeof *a->de2) == 0);
}

/* Series of at least this many residuals are taken as two stretches (the
 * second from the half-way point, rounded down to a multiple of LOG_BLOCK),
 * on two threads when they are free; shorter ones as one. */
#define LIK_SPLIT_MIN 65536

/* The pass behind fit_garch_loglik for KM mean parameters and Student-t
 * (HAS_NU = 1) or normal innovations, AR_ONLY = 1 when the mean has no MA
 * terms, then with FMOFF (1: a constant) and FNAR AR terms when these are
 * fixed at compile time (FMOFF < 0: read from the spec); the caller has
 * counted the pass and checked TH.  Sums and
 * derivatives live in locals (no aliasing with the output arrays).  The
 * log-likelihood's sums are plain within a block of LOG_BLOCK terms and
 * compensated (Neumaier) across blocks. */
static inline __attribute__((always_inline)) int
loglik_body(fit_garch_work *w, const double *th, double *ll, double *grad, double *scores,
            double *opg, const int km, const int has_nu, const int ar_only, const int mode,
            const int fmoff, const int fnar)
{
    const int np = km + 3 + has_nu, io = km;
    const int kv = km + 3;                 /* parameters the variance depends on */
    const size_t N = w->N;
    const int want_d = mode >= 1, want_rows = mode == 2;
    if (!want_rows)
        scores = opg = NULL;
    const double omega = th[io], alpha = th[io + 1], beta = th[io + 2];
    const double nu = has_nu ? th[np - 1] : 0.0;
    const double *ev = w->e, *dev = w->de;

    /* Pass 1 (ar_resid or fit_arma_resid): e_t, de_t/dtheta_mean, sum e_t^2
     * and sum e_t de_t.  sigma2_0 = e2_0 = s2 = mean e_t^2 at these mean parameters. */
    double dh[FIT_MAX_PARAMS];             /* d sigma2_t        (kv) */
    double de2[FIT_MAX_PARAMS];            /* d e^2_{t-1}       (km) */
    double g[FIT_MAX_PARAMS];              /* gradient          (np) */
    double ssr;
    /* with the window sums, e_t is formed in the main loop below instead */
    const int inl = ar_only && w->mom;
    int rc = inl ? ar_moments(w, th, &ssr, want_d ? de2 : NULL)
             : ar_only ? ar_resid(w, th, &ssr, want_d ? de2 : NULL)
                       : fit_arma_resid(w->aw, w->y, w->n, th, w->e, want_d ? w->de : NULL, &ssr,
                                        want_d ? de2 : NULL);
    /* Without MA terms de_t/dtheta_mean is (sum ar - 1, -(y_{t-lag} - mu)...):
     * formed below as fit_arma_resid forms it, instead of stored and read back. */
    const int moff = fmoff >= 0 ? fmoff : w->spec.mean ? 1 : 0;
    const int nar = fmoff >= 0 ? fnar : w->spec.n_ar;
    const double *y0 = w->y + w->start;    /* y_t for residual 0 */
    double amu = 0.0, admu = 0.0, arc[FIT_MAX_TERMS];
    ptrdiff_t alag[FIT_MAX_TERMS];
    if (ar_only) {
        amu = moff ? th[0] : 0.0;
        double sum_ar = 0.0;
        for (int k = 0; k < nar; k++) {
            arc[k] = th[moff + k];
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
    w->s2 = s2;
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
    const double nm2 = has_nu ? nu - 2.0 : 1.0, inm2 = 1.0 / nm2;

    /* ll = sum_t -1/2 [log h_t + e_t^2/h_t] (normal) or
     *      sum_t -1/2 [log h_t + (nu+1) log(1 + u_t)], u_t = e_t^2/(h_t (nu-2)) (t),
     * plus N times the constant; with t the nu-gradient is
     * N dcst - 1/2 sum log(1 + u_t) + (nu+1)/(2 (nu-2)) sum u_t/(1 + u_t). */

    lik_ctx k = { ev, dev, y0, arc, alag, w->h, w->e, scores,
                  omega, alpha, beta, nu, nm2, inm2, dcst, amu, admu,
                  inl, moff, nar };
    lik_state st0, st1, warm;
    st0.hprev = st0.e2prev = s2;
    if (want_d) {
        memcpy(st0.dh, dh, (size_t)kv * sizeof *dh);
        memcpy(st0.de2, de2, (size_t)km * sizeof *de2);
    }
    const size_t split = N >= LIK_SPLIT_MIN ? (N / 2) / LOG_BLOCK * LOG_BLOCK : N;
    /* the second stretch on its own thread starts from the state W residuals
     * before it forgets (beta^W below 1e-20), checked bit for bit against the
     * first stretch's end; where they differ it runs again from that end */
    size_t W = 0;
    if (split < N && beta > 0.0 && beta < 1.0) {
        double wd = ceil(46.0 / -log(beta));
        W = wd < (double)(split / 2) ? (size_t)wd : 0;
    } else if (split < N && beta == 0.0) {
        W = 1;
    }
    const int par = W > 0 && !omp_in_parallel() && omp_get_max_threads() > 1;
    lik_part pp[2];
    memset(pp, 0, sizeof pp);
    double *opg1 = NULL;                   /* the second stretch's outer product */
    if (opg) {
        memset(opg, 0, (size_t)np * (size_t)np * sizeof *opg);
        pp[0].opg = opg;
        if (split < N) {
            opg1 = calloc((size_t)np * (size_t)np, sizeof *opg1);
            if (!opg1)
                return HN_ENOMEM;
            pp[1].opg = opg1;
        }
    }
    int again = split < N;
    if (par) {
        int wok = 0;
#pragma omp parallel num_threads(2)
        {
            if (omp_get_thread_num() == 0) {
                range_any(&k, 0, split, &st0, &pp[0], km, has_nu, ar_only, mode, fmoff, fnar);
            } else {
                wok = lik_warm(&k, split, W, s2, &warm, km, ar_only, mode, fmoff, fnar) == 0;
                if (wok) {
                    st1 = warm;
                    range_any(&k, split, N, &st1, &pp[1], km, has_nu, ar_only, mode, fmoff, fnar);
                }
            }
        }
        again = !wok || (pp[0].rc == HN_OK && !same_state(&st0, &warm, kv, km, want_d));
        if (again) {
            memset(&pp[1], 0, sizeof pp[1]);
            if (opg1) {
                memset(opg1, 0, (size_t)np * (size_t)np * sizeof *opg1);
                pp[1].opg = opg1;
            }
        }
    } else {
        range_any(&k, 0, split, &st0, &pp[0], km, has_nu, ar_only, mode, fmoff, fnar);
    }
    if (again && pp[0].rc == HN_OK) {
        st1 = st0;
        range_any(&k, split, N, &st1, &pp[1], km, has_nu, ar_only, mode, fmoff, fnar);
    }
    if (pp[0].rc != HN_OK || (split < N && pp[1].rc != HN_OK)) {
        free(opg1);
        return HN_EDOMAIN;
    }
    /* the two stretches' sums, in order */
    ksum acc = pp[0].acc, lu_acc = pp[0].lu_acc;
    double gnu = pp[0].gnu;
    if (split < N) {
        ksum_add(&acc, pp[1].acc.s);
        acc.c += pp[1].acc.c;
        ksum_add(&lu_acc, pp[1].lu_acc.s);
        lu_acc.c += pp[1].lu_acc.c;
        gnu += pp[1].gnu;
    }
    if (want_d)
        for (int c = 0; c < kv; c++)
            g[c] = split < N ? pp[0].g[c] + pp[1].g[c] : pp[0].g[c];
    if (opg1)
        for (int a = 0; a < np; a++)
            for (int b = 0; b <= a; b++)
                opg[a * np + b] += opg1[a * np + b];
    free(opg1);

    double total = ksum_value(&acc) + (double)N * cst;
    if (!isfinite(total))
        return HN_EDOMAIN;
    *ll = total;
    if (has_nu && want_d)
        g[np - 1] = (double)N * dcst - 0.5 * ksum_value(&lu_acc) + 0.5 * (nu + 1.0) * inm2 * gnu;
    if (grad)
        memcpy(grad, g, (size_t)np * sizeof *grad);
    if (opg)
        for (int a = 0; a < np; a++)
            for (int b = a + 1; b < np; b++)
                opg[a * np + b] = opg[b * np + a];
    return HN_OK;
}

static int loglik_pass(fit_garch_work *w, const double *th, double *ll, double *grad,
                       double *scores, double *opg);

int fit_garch_loglik(fit_garch_work *w, const double *th, double *ll,
                     double *grad, double *scores, double *opg)
{
    const int np = w->np;
    const int kind = grad ? 2 : 1, rows = scores || opg;
    if (!rows && w->last_kind >= kind && memcmp(th, w->last_th, (size_t)np * sizeof *th) == 0) {
        *ll = w->last_ll;
        if (grad)
            memcpy(grad, w->last_g, (size_t)np * sizeof *grad);
        return HN_OK;
    }
    w->last_kind = 0;
    int rc = loglik_pass(w, th, ll, grad, scores, opg);
    if (rc == HN_OK) {
        w->last_kind = kind;
        memcpy(w->last_th, th, (size_t)np * sizeof *th);
        w->last_ll = *ll;
        if (grad)
            memcpy(w->last_g, grad, (size_t)np * sizeof *grad);
    }
    return rc;
}

/* fit_garch_loglik without the memory of the last pass. */
static int loglik_pass(fit_garch_work *w, const double *th, double *ll, double *grad,
                       double *scores, double *opg)
{
    const int km = w->k_mean, np = w->np;
    w->passes++;
    for (int i = 0; i < np; i++)
        if (!isfinite(th[i]))
            return HN_EDOMAIN;
    if (w->has_nu && !(th[np - 1] > 2.0))
        return HN_EDOMAIN;
    /* Copies with the work fixed at compile time, so that the loop holds
     * only what it needs: the log-likelihood alone, or with its gradient
     * for the common mean models (parameter counts fixed too), or with
     * per-observation scores; each does the same operations in the same
     * order as the general one. */
    const int ar = w->spec.n_ma == 0, nu = w->has_nu;
#define BODY(K, NU, AR, MODE) loglik_body(w, th, ll, grad, scores, opg, K, NU, AR, MODE, -1, 0)
#define BY_NU_AR(K, MODE) \
    (nu ? (ar ? BODY(K, 1, 1, MODE) : BODY(K, 1, 0, MODE)) \
        : (ar ? BODY(K, 0, 1, MODE) : BODY(K, 0, 0, MODE)))
    if (scores || opg)
        return BY_NU_AR(km, 2);
    /* Means without MA terms: the constant and the AR count fixed too, so
     * that e_t and de_t/dtheta_mean live in registers. */
    const int moff = w->spec.mean ? 1 : 0, nar = w->spec.n_ar, md = grad ? 1 : 0;
#define AR_FIXED(M, A) \
    if (ar && moff == (M) && nar == (A)) \
        return nu ? (md ? loglik_body(w, th, ll, grad, NULL, NULL, (M) + (A), 1, 1, 1, M, A) \
                        : loglik_body(w, th, ll, NULL, NULL, NULL, (M) + (A), 1, 1, 0, M, A)) \
                  : (md ? loglik_body(w, th, ll, grad, NULL, NULL, (M) + (A), 0, 1, 1, M, A) \
                        : loglik_body(w, th, ll, NULL, NULL, NULL, (M) + (A), 0, 1, 0, M, A));
    AR_FIXED(0, 0) AR_FIXED(1, 0) AR_FIXED(1, 1) AR_FIXED(0, 1) AR_FIXED(1, 2) AR_FIXED(0, 2)
#undef AR_FIXED
    if (!grad)
        return BY_NU_AR(km, 0);
    switch (km) {
    case 0: return BY_NU_AR(0, 1);
    case 1: return BY_NU_AR(1, 1);
    case 2: return BY_NU_AR(2, 1);
    case 3: return BY_NU_AR(3, 1);
    case 4: return BY_NU_AR(4, 1);
    default: return BY_NU_AR(km, 1);
    }
#undef BY_NU_AR
#undef BODY
}
