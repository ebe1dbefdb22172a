/* fit_arma_pass.c - ARMA residual, gradient and Hessian passes with the MA history in registers. */
#include "fit_arma_pass.h"
#include "hn_status.h"

#include <math.h>
#include <omp.h>
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

/* What the recursion carries from one residual to the next: at t - 1 - j,
 * pe[j] = e, pdv[j] = de, phm[j] = d2e of every (ar_i, mu), phv[j][r] = the
 * row of d2e of MA coefficient r (rows of the lower triangle as vectors, row
 * k in k / 2 + 1 of them); all zero before the first residual. */
typedef struct {
    double pe[Q_MAX], phm[Q_MAX];
    v2d pdv[Q_MAX][NV_MAX], phv[Q_MAX][Q_MAX][NV_MAX];
} pass_state;

/* One stretch's sums: e^2 (Neumaier: SUM and its correction COMP), e de,
 * de de' and de de' + e d2e (row k of the lower triangle). */
typedef struct {
    double sum, comp;
    v2d accv[NV_MAX], jacv[NM_MAX][NV_MAX], hacv[NM_MAX][NV_MAX];
} pass_sums;

static inline __attribute__((always_inline)) void
range_body(const fit_spec *s, const double *y, size_t lo, size_t hi, const double *mpar,
           double *e, double *de, pass_state *st, pass_sums *out, const int off, const int nar,
           const int nma, const int want_j, const int want_h)
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
        pe[j] = st->pe[j];
        phm[j] = st->phm[j];
        UNROLL
        for (int m = 0; m < nv; m++) {
            pdv[j][m] = st->pdv[j][m];
            UNROLL
            for (int r = 0; r < nma; r++)
                phv[j][r][m] = st->phv[j][r][m];
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

    for (size_t t = lo; t < hi; t++) {
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

    /* the state and the stretch's sums, for the caller (the loops below
     * unroll too, so that no array above needs memory) */
    UNROLL
    for (int j = 0; j < nma; j++) {
        st->pe[j] = pe[j];
        st->phm[j] = phm[j];
        UNROLL
        for (int m = 0; m < nv; m++) {
            st->pdv[j][m] = pdv[j][m];
            UNROLL
            for (int r = 0; r < nma; r++)
                st->phv[j][r][m] = phv[j][r][m];
        }
    }
    out->sum = sum;
    out->comp = comp;
    UNROLL
    for (int m = 0; m < nv; m++)
        out->accv[m] = accv[m];
    UNROLL
    for (int k = 0; k < nm; k++)
        UNROLL
        for (int m = 0; m <= k / 2; m++) {
            out->jacv[k][m] = jacv[k][m];
            out->hacv[k][m] = hacv[k][m];
        }
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

/* range_body with the term counts and the sums wanted fixed at compile
 * time, chosen here so that each thread of the split below runs a
 * specialised copy (MODE: 0 the gradient, 1 and J'J, 2 and the Hessian). */
static void range_any(const fit_spec *spec, const double *y, size_t lo, size_t hi,
                      const double *mpar, double *e, double *de, pass_state *st,
                      pass_sums *out, int mode)
{
    const int off = spec->mean ? 1 : 0, nar = spec->n_ar, nma = spec->n_ma;
#define PASS_CASE(O, A, M) \
    if (off == (O) && nar == (A) && nma == (M)) { \
        _Static_assert((O) + (A) + (M) <= NM_MAX && (M) <= Q_MAX, "local arrays too small"); \
        if (mode == 2) \
            range_body(spec, y, lo, hi, mpar, e, de, st, out, O, A, M, 1, 1); \
        else if (mode == 1) \
            range_body(spec, y, lo, hi, mpar, e, de, st, out, O, A, M, 1, 0); \
        else \
            range_body(spec, y, lo, hi, mpar, e, de, st, out, O, A, M, 0, 0); \
        return; \
    }
    PASS_ORDERS(PASS_CASE)
#undef PASS_CASE
}

static int same_bits(double x, double y)
{
    return memcmp(&x, &y, sizeof x) == 0;
}

/* The same state, bit for bit, in every entry the pass reads (lanes past a
 * row's diagonal never are). */
static int same_state(const pass_state *a, const pass_state *b, int nm, int ma0, int nma,
                      int want_h)
{
    for (int j = 0; j < nma; j++) {
        if (!same_bits(a->pe[j], b->pe[j]) || (want_h && !same_bits(a->phm[j], b->phm[j])))
            return 0;
        for (int k = 0; k < nm; k++)
            if (!same_bits(LANE(a->pdv[j], k), LANE(b->pdv[j], k)))
                return 0;
        for (int r = 0; want_h && r < nma; r++)
            for (int l = 0; l <= ma0 + r; l++)
                if (!same_bits(LANE(a->phv[j][r], l), LANE(b->phv[j][r], l)))
                    return 0;
    }
    return 1;
}

/* Series of at least this many residuals are summed as two stretches, the
 * second from the half-way point, on two threads when they are free;
 * shorter ones as one.  Which it is depends on the length alone, so the
 * digits never depend on the threads. */
#define PASS_SPLIT_MIN 65536

/* How many residuals before the second stretch a state started at zero
 * needs to forget its start: the recursion's homogeneous part is the MA
 * filter x_t = -sum_j ma_j x_{t-j}, which shrinks as rho^t, rho the largest
 * modulus of the roots of z^q + ma_1 z^(q-1) + ... + ma_q; the derivatives
 * carry factors t and t^2 on top, so rho^W is taken well below 1e-30.
 * SPAN is the first stretch's length and ROOM the most W may be; 0 where
 * the filter does not shrink fast enough for that (the caller then runs
 * the stretches one after the other). */
static size_t warm_length(const double *ma, int nma, size_t span, size_t room)
{
    double rho = 0.0;
    if (nma == 1) {
        rho = fabs(ma[0]);
    } else if (nma == 2) {
        const double disc = ma[0] * ma[0] - 4.0 * ma[1];
        if (disc >= 0.0) {
            const double r = sqrt(disc);
            rho = fmax(fabs(-ma[0] + r), fabs(-ma[0] - r)) / 2.0;
        } else {
            rho = sqrt(ma[1]);        /* complex pair: |z|^2 = ma_2 */
        }
    }
    if (!(rho < 0.999))
        return 0;
    const double w = rho > 0.0 ? 64.0 + ceil(80.0 / -log(rho)) : 64.0;
    if (!(w <= (double)room))
        return 0;
    /* The derivatives in mu, and the second derivatives fed by them, have
     * constant inputs: whatever the data, their values depend on t alone,
     * and in rounded arithmetic they end in a cycle of a few adjacent values
     * rather than at one.  A warm-up matches them only where it is as far
     * round the cycle as the first stretch, so it starts a multiple of
     * CYCLES residuals after the first residual (every cycle of length 1 to
     * 10 and 12 divides it; a longer one costs a second run, never a wrong
     * bit). */
    const size_t CYCLES = 2520, W = (size_t)w + (span - (size_t)w) % CYCLES;
    return W <= room ? W : 0;
}

int fit_arma_pass(const fit_spec *spec, const double *y, size_t n, const double *mpar,
                  double *e, double *de, double *ssr, double *gsum, double *jtj, double *hsum)
{
    if (!fit_arma_pass_covers(spec) || !y || !mpar || !gsum ||
        n <= (size_t)fit_spec_max_ar(spec))
        return HN_EINVAL;
    const int off = spec->mean ? 1 : 0, nar = spec->n_ar, nma = spec->n_ma;
    const int nm = off + nar + nma, ma0 = off + nar;
    const int mode = hsum ? 2 : jtj ? 1 : 0;
    const size_t p = (size_t)fit_spec_max_ar(spec), N = n - p;
    const size_t mid = N >= PASS_SPLIT_MIN ? p + N / 2 : n;

    pass_state st0, st1, warm;
    memset(&st0, 0, sizeof st0);
    pass_sums sm[2];
    int again = mid < n;
    /* the second stretch on its own thread starts from a state W residuals
     * before it, checked bit for bit against the first stretch's end; where
     * they differ it runs again from that end (without MA terms there is
     * no state to recover) */
    const size_t W = mid < n && nma ? warm_length(mpar + ma0, nma, mid - p, (mid - p) / 2) : 0;
    if (mid < n && (W > 0 || nma == 0) && !omp_in_parallel() && omp_get_max_threads() > 1) {
#pragma omp parallel num_threads(2)
        {
            if (omp_get_thread_num() == 0) {
                range_any(spec, y, p, mid, mpar, e, de, &st0, &sm[0], mode);
            } else {
                pass_sums scratch;
                memset(&warm, 0, sizeof warm);
                range_any(spec, y, mid - W, mid, mpar, NULL, NULL, &warm, &scratch, mode);
                st1 = warm;
                range_any(spec, y, mid, n, mpar, e, de, &st1, &sm[1], mode);
            }
        }
        again = !same_state(&st0, &warm, nm, ma0, nma, mode == 2);
    } else {
        range_any(spec, y, p, mid, mpar, e, de, &st0, &sm[0], mode);
    }
    if (again) {
        st1 = st0;
        range_any(spec, y, mid, n, mpar, e, de, &st1, &sm[1], mode);
    }

    /* the stretches' sums, in order */
    double sum = sm[0].sum, comp = sm[0].comp;
    double acc[NM_MAX], jt[NM_MAX][NM_MAX], ht[NM_MAX][NM_MAX];
    for (int k = 0; k < nm; k++) {
        acc[k] = LANE(sm[0].accv, k);
        for (int l = 0; l <= k; l++) {
            jt[k][l] = LANE(sm[0].jacv[k], l);
            ht[k][l] = NONZERO(k, l) ? LANE(sm[0].hacv[k], l) : jt[k][l];
        }
    }
    if (mid < n) {
        const double b = sm[1].sum, tsum = sum + b;
        comp += fabs(sum) >= fabs(b) ? (sum - tsum) + b : (b - tsum) + sum;
        sum = tsum;
        comp += sm[1].comp;
        for (int k = 0; k < nm; k++) {
            acc[k] += LANE(sm[1].accv, k);
            for (int l = 0; l <= k; l++) {
                const double j1 = LANE(sm[1].jacv[k], l);
                jt[k][l] += j1;
                ht[k][l] += NONZERO(k, l) ? LANE(sm[1].hacv[k], l) : j1;
            }
        }
    }
    const double tot = sum + comp;
    if (!isfinite(tot))
        return HN_EDOMAIN;
    if (hsum) {
        for (int k = 0; k < nm; k++)
            for (int l = 0; l <= k; l++) {
                if (!isfinite(ht[k][l]))
                    return HN_EDOMAIN;
                hsum[k * nm + l] = hsum[l * nm + k] = ht[k][l];
            }
    } else {
        for (int k = 0; k < nm; k++)
            if (!isfinite(acc[k]))
                return HN_EDOMAIN;
    }
    if (ssr)
        *ssr = tot;
    for (int k = 0; k < nm; k++)
        gsum[k] = acc[k];
    if (jtj)
        for (int k = 0; k < nm; k++)
            for (int l = 0; l <= k; l++)
                jtj[k * nm + l] = jtj[l * nm + k] = jt[k][l];
    return HN_OK;
}
