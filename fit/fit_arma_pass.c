/* fit_arma_pass.c - ARMA residual, gradient and Hessian passes with the MA history in registers. */
#include "fit_arma_pass.h"
#include "hn_status.h"

#include <math.h>
#include <string.h>

/* The term counts with a copy of the pass (mean, AR terms, MA terms); the
 * largest sizes they need bound the local arrays below. */
#define PASS_ORDERS(X)  X(1, 0, 0) X(1, 1, 0) X(1, 2, 0) X(1, 0, 1) X(1, 1, 1) X(1, 2, 1) \
                        X(1, 1, 2) X(1, 2, 2) X(1, 0, 2) X(0, 1, 0) X(0, 2, 1) X(0, 1, 1)
#define NM_MAX 5
#define Q_MAX 2
#define NT_MAX (NM_MAX * (NM_MAX + 1) / 2)

/* Every loop below runs over a term count fixed at compile time; unrolled in
 * full, its arrays become registers (a hint: the order of operations stays
 * as written). */
#if defined(__GNUC__)
#define UNROLL _Pragma("GCC unroll 16")
#else
#define UNROLL
#endif

/* Vectors of two doubles (GCC's vector extension: SSE2 on x86-64, plain
 * scalar code elsewhere): each lane does the operations of the scalar pass
 * in the same order, so the results are the same to the last bit. */
typedef double v2d __attribute__((vector_size(16)));
#define SPLAT(x) ((v2d){ (x), (x) })
#define NV_MAX ((NM_MAX + 1) / 2)

/* The pair (k, l), k >= l, can have a non-zero second derivative:
 * d2e_t/dth_k dth_l obeys a recursion with zero start whose direct term is 1
 * for (ar_i, mu), the lagged derivatives for pairs with an MA coefficient,
 * and nothing else.  Elsewhere it is zero, and sum (de de' + e d2e) is J'J's
 * entry. */
#define NONZERO(k, l) ((k) >= ma0 || (off && (l) == 0 && (k) >= off))

/* Lane L of the vectors V[] holding a row of values. */
#define LANE(v, l) ((v)[(l) / 2][(l) % 2])

static inline __attribute__((always_inline)) int
pass_body(const fit_spec *s, const double *y, size_t n, const double *mpar, double *e,
          double *de, double *ssr, double *gsum, double *jtj, double *hsum, const int off,
          const int nar, const int nma, const int want_j, const int want_h)
{
    const size_t p = (size_t)fit_spec_max_ar(s);
    const int nm = off + nar + nma, nv = (nm + 1) / 2, ma0 = off + nar;
    const double mu = off ? mpar[0] : 0.0;
    double ar[NM_MAX], ma[Q_MAX];
    ptrdiff_t al[NM_MAX];
    UNROLL
    for (int i = 0; i < nar; i++) {
        ar[i] = mpar[off + i];
        al[i] = (ptrdiff_t)s->ar_lag[i];
    }
    UNROLL
    for (int j = 0; j < nma; j++)
        ma[j] = mpar[ma0 + j];
    double sum_ar = 0.0;
    UNROLL
    for (int i = 0; i < nar; i++)
        sum_ar += ar[i];
    const double dmu = sum_ar - 1.0;

    /* at t - 1 - j: pe[j] = e, pdv[j] = de, phm[j] = d2e of every (ar_i, mu),
     * phv[j][r] = the row of d2e of MA coefficient r (zero before the start);
     * rows of the lower triangle as vectors, row k in k / 2 + 1 of them */
    double pe[Q_MAX], phm[Q_MAX];
    v2d pdv[Q_MAX][NV_MAX], phv[Q_MAX][Q_MAX][NV_MAX];
    v2d accv[NV_MAX], jacv[NM_MAX][NV_MAX], hacv[NM_MAX][NV_MAX];
    const v2d zero = SPLAT(0.0);
    UNROLL
    for (int j = 0; j < nma; j++) {
        pe[j] = phm[j] = 0.0;
        UNROLL
        for (int m = 0; m < nv; m++) {
            pdv[j][m] = zero;
            UNROLL
            for (int r = 0; r < nma; r++)
                phv[j][r][m] = zero;
        }
    }
    UNROLL
    for (int m = 0; m < nv; m++)
        accv[m] = zero;
    UNROLL
    for (int k = 0; k < nm; k++)
        UNROLL
        for (int m = 0; m < nv; m++)
            jacv[k][m] = hacv[k][m] = zero;
    double sum = 0.0, comp = 0.0;      /* Neumaier summation of e_t^2 */

    for (size_t t = p; t < n; t++) {
        const double *yt = y + t;
        double xa[NM_MAX];
        double et = yt[0] - mu;
        UNROLL
        for (int i = 0; i < nar; i++) {
            xa[i] = yt[-al[i]] - mu;
            et -= ar[i] * xa[i];
        }
        UNROLL
        for (int j = 0; j < nma; j++)
            et -= ma[j] * pe[j];
        double sq = et * et, tsum = sum + sq;
        comp += fabs(sum) >= sq ? (sum - tsum) + sq : (sq - tsum) + sum;
        sum = tsum;
        if (e)
            e[t - p] = et;

        /* de_t: the direct terms, then minus ma_j times de_{t-1-j}, j in order */
        double di[2 * NV_MAX];
        if (off)
            di[0] = dmu;
        UNROLL
        for (int i = 0; i < nar; i++)
            di[off + i] = -xa[i];
        UNROLL
        for (int j = 0; j < nma; j++)
            di[ma0 + j] = -pe[j];
        di[2 * nv - 1] = nm % 2 ? 0.0 : di[2 * nv - 1];
        v2d dv[NV_MAX];
        UNROLL
        for (int m = 0; m < nv; m++)
            dv[m] = (v2d){ di[2 * m], di[2 * m + 1] };
        UNROLL
        for (int j = 0; j < nma; j++)
            UNROLL
            for (int m = 0; m < nv; m++)
                dv[m] -= SPLAT(ma[j]) * pdv[j][m];

        /* second derivatives, each as fit_arma_hessian forms it: per lag j,
         * minus ma_j times its value at t - 1 - j, then (j = 0) the direct
         * term of (ar_i, mu), then the lagged derivative where the pair
         * holds ma_j (twice on the diagonal); lanes past the diagonal are
         * never read */
        double hm = 1.0;                    /* (ar_i, mu) without MA terms */
        v2d hv[Q_MAX][NV_MAX];
        if (want_h) {
            if (nma > 0) {
                hm = -ma[0] * phm[0];
                hm += 1.0;
                UNROLL
                for (int j = 1; j < nma; j++)
                    hm -= ma[j] * phm[j];
            }
            UNROLL
            for (int r = 0; r < nma; r++) {
                const int k = ma0 + r;
                UNROLL
                for (int m = 0; m <= k / 2; m++) {
                    v2d v = zero;
                    UNROLL
                    for (int j = 0; j < nma; j++) {
                        const int q = ma0 + j;
                        if (j == 0)
                            v = SPLAT(-ma[0]) * phv[0][r][m];
                        else
                            v -= SPLAT(ma[j]) * phv[j][r][m];
                        if (k == q && 2 * m <= q)
                            v -= 2 * m == q ? pdv[j][m] * (v2d){ 2.0, 1.0 }
                                 : 2 * m + 1 == q ? pdv[j][m] * (v2d){ 1.0, 2.0 } : pdv[j][m];
                        else if (k > q && q / 2 == m)
                            v -= q % 2 ? (v2d){ 0.0, LANE(pdv[j], k) } : (v2d){ LANE(pdv[j], k), 0.0 };
                    }
                    hv[r][m] = v;
                }
            }
        }

        const v2d ev = SPLAT(et);
        UNROLL
        for (int m = 0; m < nv; m++)
            accv[m] += ev * dv[m];
        if (want_j || want_h) {
            UNROLL
            for (int k = 0; k < nm; k++) {
                const v2d dk = SPLAT(LANE(dv, k));
                UNROLL
                for (int m = 0; m <= k / 2; m++) {
                    const v2d dd = dk * dv[m];
                    jacv[k][m] += dd;
                    if (want_h && k >= ma0)
                        hacv[k][m] += dd + ev * hv[k - ma0][m];
                    else if (want_h && off && k >= off && m == 0)
                        hacv[k][0] += dd + ev * (v2d){ hm, 0.0 };
                }
            }
        }
        if (de) {
            double *row = de + (t - p) * (size_t)nm;
            UNROLL
            for (int k = 0; k < nm; k++)
                row[k] = LANE(dv, k);
        }

        UNROLL
        for (int j = nma - 1; j > 0; j--) {
            pe[j] = pe[j - 1];
            phm[j] = phm[j - 1];
            UNROLL
            for (int m = 0; m < nv; m++) {
                pdv[j][m] = pdv[j - 1][m];
                if (want_h)
                    UNROLL
                    for (int r = 0; r < nma; r++)
                        phv[j][r][m] = phv[j - 1][r][m];
            }
        }
        if (nma > 0) {
            pe[0] = et;
            phm[0] = hm;
            UNROLL
            for (int m = 0; m < nv; m++) {
                pdv[0][m] = dv[m];
                if (want_h)
                    UNROLL
                    for (int r = 0; r < nma; r++)
                        if (m <= (ma0 + r) / 2)
                            phv[0][r][m] = hv[r][m];
            }
        }
    }

    /* (the loops below unroll too, so that no array above needs memory) */
    double tot = sum + comp;
    if (!isfinite(tot))
        return HN_EDOMAIN;
    double acc[NM_MAX];
    UNROLL
    for (int k = 0; k < nm; k++)
        acc[k] = LANE(accv, k);
    if (want_h) {
        UNROLL
        for (int k = 0; k < nm; k++)
            UNROLL
            for (int l = 0; l <= k; l++) {
                const double v = NONZERO(k, l) ? LANE(hacv[k], l) : LANE(jacv[k], l);
                if (!isfinite(v))
                    return HN_EDOMAIN;
                hsum[k * nm + l] = hsum[l * nm + k] = v;
            }
    } else {
        UNROLL
        for (int k = 0; k < nm; k++)
            if (!isfinite(acc[k]))
                return HN_EDOMAIN;
    }
    if (ssr)
        *ssr = tot;
    UNROLL
    for (int k = 0; k < nm; k++)
        gsum[k] = acc[k];
    if (jtj)
        UNROLL
        for (int k = 0; k < nm; k++)
            UNROLL
            for (int l = 0; l <= k; l++)
                jtj[k * nm + l] = jtj[l * nm + k] = LANE(jacv[k], l);
    return HN_OK;
}

static int consecutive_ma(const fit_spec *s)
{
    for (int j = 0; j < s->n_ma; j++)
        if (s->ma_lag[j] != j + 1)
            return 0;
    return 1;
}

int fit_arma_pass_covers(const fit_spec *spec)
{
    if (!spec || !consecutive_ma(spec))
        return 0;
    const int off = spec->mean ? 1 : 0, nar = spec->n_ar, nma = spec->n_ma;
#define COVER_CASE(O, A, M) \
    if (off == (O) && nar == (A) && nma == (M)) \
        return 1;
    PASS_ORDERS(COVER_CASE)
#undef COVER_CASE
    return 0;
}

int fit_arma_pass(const fit_spec *spec, const double *y, size_t n, const double *mpar,
                  double *e, double *de, double *ssr, double *gsum, double *jtj, double *hsum)
{
    if (!fit_arma_pass_covers(spec) || !y || !mpar || !gsum ||
        n <= (size_t)fit_spec_max_ar(spec))
        return HN_EINVAL;
    const int off = spec->mean ? 1 : 0, nar = spec->n_ar, nma = spec->n_ma;
#define PASS_CASE(O, A, M) \
    if (off == (O) && nar == (A) && nma == (M)) { \
        _Static_assert((O) + (A) + (M) <= NM_MAX && (M) <= Q_MAX, "local arrays too small"); \
        if (hsum) \
            return pass_body(spec, y, n, mpar, e, de, ssr, gsum, jtj, hsum, O, A, M, 1, 1); \
        if (jtj) \
            return pass_body(spec, y, n, mpar, e, de, ssr, gsum, jtj, NULL, O, A, M, 1, 0); \
        return pass_body(spec, y, n, mpar, e, de, ssr, gsum, NULL, NULL, O, A, M, 0, 0); \
    }
    PASS_ORDERS(PASS_CASE)
#undef PASS_CASE
    return HN_EINVAL;
}
