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

/* The pair (k, l), k >= l, of the packed lower triangle can have a non-zero
 * second derivative: d2e_t/dth_k dth_l obeys a recursion with zero start
 * whose direct term is 1 for (ar_i, mu), the lagged derivatives for pairs
 * with an MA coefficient, and nothing else.  Elsewhere it is zero. */
#define NONZERO(k, l) ((k) >= ma0 || (off && (l) == 0 && (k) >= off))

static inline __attribute__((always_inline)) int
pass_body(const fit_spec *s, const double *y, size_t n, const double *mpar, double *e,
          double *de, double *ssr, double *gsum, double *jtj, double *hsum, const int off,
          const int nar, const int nma, const int want_j, const int want_h)
{
    const size_t p = (size_t)fit_spec_max_ar(s);
    const int nm = off + nar + nma, ma0 = off + nar;
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

    /* pe[j], pd[j], ph[j]: e, de and d2e at t - 1 - j (zero before the start) */
    double pe[Q_MAX], pd[Q_MAX][NM_MAX], ph[Q_MAX][NT_MAX];
    double acc[NM_MAX], jac[NT_MAX], hac[NT_MAX];
    UNROLL
    for (int j = 0; j < nma; j++) {
        pe[j] = 0.0;
        UNROLL
        for (int k = 0; k < nm; k++)
            pd[j][k] = 0.0;
        UNROLL
        for (int k = 0; k < NT_MAX; k++)
            ph[j][k] = 0.0;
    }
    UNROLL
    for (int k = 0; k < nm; k++)
        acc[k] = 0.0;
    UNROLL
    for (int k = 0; k < NT_MAX; k++)
        jac[k] = hac[k] = 0.0;
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

        double d[NM_MAX];
        if (off)
            d[0] = dmu;
        UNROLL
        for (int i = 0; i < nar; i++)
            d[off + i] = -xa[i];
        UNROLL
        for (int j = 0; j < nma; j++)
            d[ma0 + j] = -pe[j];
        UNROLL
        for (int j = 0; j < nma; j++)
            UNROLL
            for (int k = 0; k < nm; k++)
                d[k] -= ma[j] * pd[j][k];

        /* second derivatives, each as fit_arma_hessian forms it: per lag j,
         * minus ma_j times its value at t - 1 - j, then (j = 0) the direct
         * term of (ar_i, mu), then the lagged derivative where the pair
         * holds ma_j (twice on the diagonal) */
        double h[NT_MAX];
        if (want_h) {
            UNROLL
            for (int k = 0; k < nm; k++)
                UNROLL
                for (int l = 0; l <= k; l++) {
                    const int idx = k * (k + 1) / 2 + l;
                    if (!NONZERO(k, l))
                        continue;
                    if (off && l == 0 && k > off && k < ma0) {
                        h[idx] = h[off * (off + 1) / 2];   /* every (ar_i, mu): one sequence */
                        continue;
                    }
                    double v = 1.0;                 /* (ar_i, mu) without MA terms */
                    UNROLL
                    for (int j = 0; j < nma; j++) {
                        const int q = ma0 + j;
                        if (j == 0)
                            v = -ma[0] * ph[0][idx];
                        else
                            v -= ma[j] * ph[j][idx];
                        if (j == 0 && off && l == 0 && k >= off && k < ma0)
                            v += 1.0;
                        if (k == q && l < q)
                            v -= pd[j][l];
                        else if (k == q && l == q)
                            v -= 2.0 * pd[j][q];
                        else if (l == q && k > q)
                            v -= pd[j][k];
                    }
                    h[idx] = v;
                }
        }

        UNROLL
        for (int k = 0; k < nm; k++)
            acc[k] += et * d[k];
        if (want_j || want_h) {
            UNROLL
            for (int k = 0; k < nm; k++)
                UNROLL
                for (int l = 0; l <= k; l++) {
                    const int idx = k * (k + 1) / 2 + l;
                    double dd = d[k] * d[l];
                    jac[idx] += dd;
                    if (want_h && NONZERO(k, l))
                        hac[idx] += dd + et * h[idx];
                }
        }
        if (de)
            memcpy(de + (t - p) * (size_t)nm, d, (size_t)nm * sizeof *d);

        UNROLL
        for (int j = nma - 1; j > 0; j--) {
            pe[j] = pe[j - 1];
            UNROLL
            for (int k = 0; k < nm; k++)
                pd[j][k] = pd[j - 1][k];
            if (want_h)
                UNROLL
                for (int k = 0; k < nm * (nm + 1) / 2; k++)
                    ph[j][k] = ph[j - 1][k];
        }
        if (nma > 0) {
            pe[0] = et;
            UNROLL
            for (int k = 0; k < nm; k++)
                pd[0][k] = d[k];
            if (want_h)
                UNROLL
                for (int k = 0; k < nm; k++)
                    UNROLL
                    for (int l = 0; l <= k; l++)
                        if (NONZERO(k, l))
                            ph[0][k * (k + 1) / 2 + l] = h[k * (k + 1) / 2 + l];
        }
    }

    double tot = sum + comp;
    if (!isfinite(tot))
        return HN_EDOMAIN;
    if (want_h) {
        /* where the second derivative is zero, the sum is J'J's */
        for (int k = 0; k < nm; k++)
            for (int l = 0; l <= k; l++) {
                const int idx = k * (k + 1) / 2 + l;
                const double v = NONZERO(k, l) ? hac[idx] : jac[idx];
                if (!isfinite(v))
                    return HN_EDOMAIN;
                hsum[k * nm + l] = hsum[l * nm + k] = v;
            }
    } else {
        for (int k = 0; k < nm; k++)
            if (!isfinite(acc[k]))
                return HN_EDOMAIN;
    }
    if (ssr)
        *ssr = tot;
    memcpy(gsum, acc, (size_t)nm * sizeof *acc);
    if (jtj)
        for (int k = 0; k < nm; k++)
            for (int l = 0; l <= k; l++)
                jtj[k * nm + l] = jtj[l * nm + k] = jac[k * (k + 1) / 2 + l];
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
