/* fit_arma.c - conditional-sum-of-squares ARMA with specific lags: residuals, gradient, starts, fit. */
#include "fit_arma.h"
#include "fit_arma_pass.h"
#include "fit_internal.h"
#include "fit_optim.h"
#include "hn_mem.h"
#include "hn_status.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <lapacke.h>

/* Two doubles a vector (GCC's vector extension: SSE2 on x86-64, scalar code
 * elsewhere); each lane does the scalar operations. */
typedef double v2d __attribute__((vector_size(16)));

int fit_arma_nmean(const fit_spec *spec)
{
    return (spec->mean ? 1 : 0) + spec->n_ar + spec->n_ma;
}

struct fit_arma_ws {
    fit_spec spec;
    int nm;          /* mean parameters */
    int p;           /* max AR lag */
    size_t mask;     /* ring rows - 1 (rows: a power of two > max MA lag) */
    size_t stride;   /* ring row: e, then nm derivatives */
    double *ring;
    double *ring2;   /* second derivatives: nm * nm a row (fit_arma_hessian) */
    int fast;        /* fit_arma_pass covers the spec */
};

fit_arma_ws *fit_arma_ws_alloc(const fit_spec *spec)
{
    if (!spec)
        return NULL;
    fit_arma_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->spec = *spec;
    w->nm = fit_arma_nmean(spec);
    w->p = fit_spec_max_ar(spec);
    size_t rows = 1;
    while (rows <= (size_t)fit_spec_max_ma(spec))
        rows *= 2;
    w->mask = rows - 1;
    w->stride = (size_t)w->nm + 1;
    w->fast = fit_arma_pass_covers(spec);
    w->ring = calloc(rows * w->stride, sizeof *w->ring);
    if (!w->ring) {
        fit_arma_ws_free(w);
        return NULL;
    }
    return w;
}

void fit_arma_ws_free(fit_arma_ws *w)
{
    if (!w)
        return;
    free(w->ring);
    free(w->ring2);
    free(w);
}

/* Loops over the parameters unroll in full in the fixed-count copies below
 * (a hint only; the order of the operations stays as written). */
#if defined(__GNUC__)
#define UNROLL _Pragma("GCC unroll 16")
#else
#define UNROLL
#endif

/* The residual pass behind fit_arma_resid for OFF mean, NAR autoregressive
 * and NMA moving-average terms; JTJ (may be NULL) also receives
 * sum de_t de_t' (nm x nm), the Gauss-Newton matrix of SSR / 2. */
static inline __attribute__((always_inline)) int
resid_body(fit_arma_ws *w, const double *y, size_t n, const double *mpar, double *e, double *de,
           double *ssr, double *gsum, double *jtj, const int off, const int nar, const int nma)
{
    const fit_spec *s = &w->spec;
    const size_t p = (size_t)w->p;
    const int nm = off + nar + nma;
    const double mu = off ? mpar[0] : 0.0;
    /* coefficients, lags and accumulators in locals, which the compiler
     * may keep in registers (no aliasing with the output arrays) */
    double ar[FIT_MAX_PARAMS], ma[FIT_MAX_PARAMS], acc[FIT_MAX_PARAMS];
    size_t al[FIT_MAX_PARAMS], ml[FIT_MAX_PARAMS];
    for (int i = 0; i < nar; i++) {
        ar[i] = mpar[off + i];
        al[i] = (size_t)s->ar_lag[i];
    }
    for (int j = 0; j < nma; j++) {
        ma[j] = mpar[off + nar + j];
        ml[j] = (size_t)s->ma_lag[j];
    }
    const size_t mask = w->mask, S = (size_t)nm + 1;   /* = w->stride */
    double *ring = w->ring;
    const int deriv = de != NULL || gsum != NULL || jtj != NULL;
    const size_t ntri = (size_t)nm * (size_t)(nm + 1) / 2;
    double jacc[FIT_MAX_PARAMS * (FIT_MAX_PARAMS + 1) / 2];
    if (jtj)
        for (size_t k = 0; k < ntri; k++)
            jacc[k] = 0.0;

    double sum_ar = 0.0;
    for (int i = 0; i < nar; i++)
        sum_ar += ar[i];
    const double dmu = sum_ar - 1.0;    /* direct term of de_t/dmu */

    memset(ring, 0, (mask + 1) * S * sizeof *ring);
    for (int k = 0; k < nm; k++)
        acc[k] = 0.0;
    double sum = 0.0, comp = 0.0;      /* Neumaier summation of e_t^2 */

    for (size_t t = p; t < n; t++) {
        const double *yt = y + t;
        double et = yt[0] - mu;
        for (int i = 0; i < nar; i++)
            et -= ar[i] * (yt[-(ptrdiff_t)al[i]] - mu);
        for (int j = 0; j < nma; j++)
            et -= ma[j] * ring[((t - ml[j]) & mask) * S];
        double *row = ring + (t & mask) * S;
        row[0] = et;
        double sq = et * et, tsum = sum + sq;
        comp += fabs(sum) >= sq ? (sum - tsum) + sq : (sq - tsum) + sum;
        sum = tsum;
        if (e)
            e[t - p] = et;
        if (!deriv)
            continue;
        double d[FIT_MAX_PARAMS];
        if (off)
            d[0] = dmu;
        for (int i = 0; i < nar; i++)
            d[off + i] = -(yt[-(ptrdiff_t)al[i]] - mu);
        for (int j = 0; j < nma; j++)
            d[off + nar + j] = -ring[((t - ml[j]) & mask) * S];
        for (int j = 0; j < nma; j++) {
            const double *prev = ring + ((t - ml[j]) & mask) * S + 1;
            const double c = ma[j];
            for (int k = 0; k < nm; k++)
                d[k] -= c * prev[k];
        }
        for (int k = 0; k < nm; k++) {
            acc[k] += et * d[k];
            row[1 + k] = d[k];
        }
        if (jtj) {
            size_t idx = 0;
            UNROLL
            for (int k = 0; k < nm; k++)
                UNROLL
                for (int l = 0; l <= k; l++, idx++)
                    jacc[idx] += d[k] * d[l];
        }
        if (de)
            memcpy(de + (t - p) * (size_t)nm, d, (size_t)nm * sizeof *d);
    }
    double tot = sum + comp;
    if (!isfinite(tot))
        return HN_EDOMAIN;
    for (int k = 0; deriv && k < nm; k++)
        if (!isfinite(acc[k]))
            return HN_EDOMAIN;
    if (ssr)
        *ssr = tot;
    if (gsum)
        memcpy(gsum, acc, (size_t)nm * sizeof *acc);
    if (jtj) {
        size_t idx = 0;
        for (int k = 0; k < nm; k++)
            for (int l = 0; l <= k; l++, idx++)
                jtj[k * nm + l] = jtj[l * nm + k] = jacc[idx];
    }
    return HN_OK;
}

/* The orders met most often get copies of the pass with the term counts
 * fixed at compile time, so that the loops over the terms unroll; each copy
 * does the same operations in the same order as the general one, hence the
 * same result to the last bit. */
#define ARMA_ORDERS(X)  X(1, 0, 0) X(1, 1, 0) X(1, 2, 0) X(1, 0, 1) X(1, 1, 1) X(1, 2, 1) \
                        X(1, 1, 2) X(1, 2, 2) X(0, 1, 0) X(0, 2, 1) X(0, 1, 1)

static int resid_pass(fit_arma_ws *w, const double *y, size_t n, const double *mpar,
                      double *e, double *de, double *ssr, double *gsum, double *jtj)
{
    if (!w || !y || (!mpar && w->nm > 0))
        return HN_EINVAL;
    const fit_spec *s = &w->spec;
    if (n <= (size_t)w->p)
        return HN_EINVAL;
    if (w->fast && (de || gsum || jtj)) {
        double g[FIT_MAX_PARAMS];
        return fit_arma_pass(s, y, n, mpar, e, de, ssr, gsum ? gsum : g, jtj, NULL);
    }
    const int off = s->mean ? 1 : 0, nar = s->n_ar, nma = s->n_ma;
#define RESID_CASE(O, A, M) \
    if (off == (O) && nar == (A) && nma == (M)) \
        return resid_body(w, y, n, mpar, e, de, ssr, gsum, jtj, O, A, M);
    ARMA_ORDERS(RESID_CASE)
#undef RESID_CASE
    return resid_body(w, y, n, mpar, e, de, ssr, gsum, jtj, off, nar, nma);
}

int fit_arma_resid(fit_arma_ws *w, const double *y, size_t n, const double *mpar,
                   double *e, double *de, double *ssr, double *gsum)
{
    return resid_pass(w, y, n, mpar, e, de, ssr, gsum, NULL);
}

/* The second-order pass behind fit_arma_hessian, term counts as in
 * resid_body; E (may be NULL) also
 * receives the residuals, as in fit_arma_resid. */
static inline __attribute__((always_inline)) int
hessian_body(fit_arma_ws *w, const double *y, size_t n, const double *mpar, double *e,
             double *ssr, double *gsum, double *hsum, double *jtj, const int off, const int nar,
             const int nma)
{
    const fit_spec *s = &w->spec;
    const size_t p = (size_t)w->p;
    const int nm = off + nar + nma, ma0 = off + nar;
    /* second derivatives are kept as the packed lower triangle, k >= l,
     * entry k (k + 1) / 2 + l */
    const size_t ntri = (size_t)nm * (size_t)(nm + 1) / 2;
    const size_t mask = w->mask, S = (size_t)nm + 1;   /* = w->stride */
    if (!w->ring2) {
        w->ring2 = malloc((mask + 1) * (ntri ? ntri : 1) * sizeof *w->ring2);
        if (!w->ring2)
            return HN_ENOMEM;
    }
    const double mu = off ? mpar[0] : 0.0;
    double ar[FIT_MAX_PARAMS], ma[FIT_MAX_PARAMS], acc[FIT_MAX_PARAMS];
    size_t al[FIT_MAX_PARAMS], ml[FIT_MAX_PARAMS];
    for (int i = 0; i < nar; i++) {
        ar[i] = mpar[off + i];
        al[i] = (size_t)s->ar_lag[i];
    }
    for (int j = 0; j < nma; j++) {
        ma[j] = mpar[off + nar + j];
        ml[j] = (size_t)s->ma_lag[j];
    }
    double *ring = w->ring, *ring2 = w->ring2;
    double sum_ar = 0.0;
    for (int i = 0; i < nar; i++)
        sum_ar += ar[i];
    memset(ring, 0, (mask + 1) * S * sizeof *ring);
    memset(ring2, 0, (mask + 1) * ntri * sizeof *ring2);
    double hacc[FIT_MAX_PARAMS * (FIT_MAX_PARAMS + 1) / 2];
    double jacc[FIT_MAX_PARAMS * (FIT_MAX_PARAMS + 1) / 2];
    for (size_t k = 0; k < ntri; k++)
        hacc[k] = jacc[k] = 0.0;
    for (int k = 0; k < nm; k++)
        acc[k] = 0.0;
    double sum = 0.0, comp = 0.0;

    for (size_t t = p; t < n; t++) {
        const double *yt = y + t;
        double et = yt[0] - mu;
        for (int i = 0; i < nar; i++)
            et -= ar[i] * (yt[-(ptrdiff_t)al[i]] - mu);
        for (int j = 0; j < nma; j++)
            et -= ma[j] * ring[((t - ml[j]) & mask) * S];
        double *row = ring + (t & mask) * S, *d = row + 1;
        double *restrict h2 = ring2 + (t & mask) * ntri;
        row[0] = et;
        double sq = et * et, tsum = sum + sq;
        comp += fabs(sum) >= sq ? (sum - tsum) + sq : (sq - tsum) + sum;
        sum = tsum;
        if (off)
            d[0] = sum_ar - 1.0;
        for (int i = 0; i < nar; i++)
            d[off + i] = -(yt[-(ptrdiff_t)al[i]] - mu);
        for (int j = 0; j < nma; j++)
            d[ma0 + j] = -ring[((t - ml[j]) & mask) * S];
        if (e)
            e[t - p] = et;
        if (nma == 0) {
            for (size_t k = 0; k < ntri; k++)
                h2[k] = 0.0;
            if (off)
                for (int i = 0; i < nar; i++)
                    h2[(size_t)(off + i) * (size_t)(off + i + 1) / 2] = 1.0;
        }
        for (int j = 0; j < nma; j++) {
            const size_t r = (t - ml[j]) & mask;
            const double *pd = ring + r * S + 1;
            const double *restrict ph = ring2 + r * ntri;
            const double c = ma[j];
            for (int k = 0; k < nm; k++)
                d[k] -= c * pd[k];
            if (j == 0)
                for (size_t k = 0; k < ntri; k++)
                    h2[k] = -c * ph[k];
            else
                for (size_t k = 0; k < ntri; k++)
                    h2[k] -= c * ph[k];
            if (j == 0 && off)   /* the pairs (ar_i, mu): row off+i, column 0 */
                for (int i = 0; i < nar; i++)
                    h2[(size_t)(off + i) * (size_t)(off + i + 1) / 2] += 1.0;
            /* the terms from differentiating -ma_j e_{t-m_j} by ma_j: the
             * pair (q, k) gets -de_{t-m_j}/dth_k, the diagonal twice */
            const int q = ma0 + j;
            const size_t rq = (size_t)q * (size_t)(q + 1) / 2;
            for (int k = 0; k < q; k++)
                h2[rq + (size_t)k] -= pd[k];
            h2[rq + (size_t)q] -= 2.0 * pd[q];
            for (int k = q + 1; k < nm; k++)
                h2[(size_t)k * (size_t)(k + 1) / 2 + (size_t)q] -= pd[k];
        }
        size_t idx = 0;
        UNROLL
        for (int k = 0; k < nm; k++) {
            acc[k] += et * d[k];
            const double dk = d[k];
            UNROLL
            for (int l = 0; l <= k; l++, idx++) {
                double dd = dk * d[l];
                jacc[idx] += dd;
                hacc[idx] += dd + et * h2[idx];
            }
        }
    }
    double tot = sum + comp;
    if (!isfinite(tot))
        return HN_EDOMAIN;
    size_t idx = 0;
    for (int k = 0; k < nm; k++)
        for (int l = 0; l <= k; l++, idx++) {
            if (!isfinite(hacc[idx]))
                return HN_EDOMAIN;
            hsum[k * nm + l] = hsum[l * nm + k] = hacc[idx];
            if (jtj)
                jtj[k * nm + l] = jtj[l * nm + k] = jacc[idx];
        }
    if (ssr)
        *ssr = tot;
    if (gsum)
        memcpy(gsum, acc, (size_t)nm * sizeof *acc);
    return HN_OK;
}

static int hessian_pass(fit_arma_ws *w, const double *y, size_t n, const double *mpar,
                        double *e, double *ssr, double *gsum, double *hsum, double *jtj)
{
    if (!w || !y || (!mpar && w->nm > 0) || !hsum)
        return HN_EINVAL;
    const fit_spec *s = &w->spec;
    if (n <= (size_t)w->p)
        return HN_EINVAL;
    if (w->fast) {
        double g[FIT_MAX_PARAMS];
        return fit_arma_pass(s, y, n, mpar, e, NULL, ssr, gsum ? gsum : g, jtj, hsum);
    }
    const int off = s->mean ? 1 : 0, nar = s->n_ar, nma = s->n_ma;
#define HESSIAN_CASE(O, A, M) \
    if (off == (O) && nar == (A) && nma == (M)) \
        return hessian_body(w, y, n, mpar, e, ssr, gsum, hsum, jtj, O, A, M);
    ARMA_ORDERS(HESSIAN_CASE)
#undef HESSIAN_CASE
    return hessian_body(w, y, n, mpar, e, ssr, gsum, hsum, jtj, off, nar, nma);
}

int fit_arma_hessian(fit_arma_ws *w, const double *y, size_t n, const double *mpar,
                     double *ssr, double *gsum, double *hsum, double *jtj)
{
    return hessian_pass(w, y, n, mpar, NULL, ssr, gsum, hsum, jtj);
}

/* ---- start values ------------------------------------------------------ */

/* Least squares of B (rows) on the row-major design A (rows x cols) by
 * LAPACKE_dgels; the coefficients land in B[0..cols-1].  A and B are
 * overwritten. */
static int lsq(double *A, double *B, size_t rows, int cols)
{
    if (rows < (size_t)cols + 1)
        return HN_ESHORT;
    lapack_int info = LAPACKE_dgels(LAPACK_ROW_MAJOR, 'N', (lapack_int)rows, cols, 1,
                                    A, cols, B, 1);
    if (info < 0)
        return HN_EINVAL;
    if (info > 0)
        return HN_ESINGULAR;
    for (int k = 0; k < cols; k++)
        if (!isfinite(B[k]))
            return HN_ENUMERIC;
    return HN_OK;
}

/* Largest inverse-root modulus of 1 - sum c_i z^{lag_i} (SIGN -1) or
 * 1 + sum c_i z^{lag_i} (SIGN +1); 2 on failure. */
static double max_modulus(const int *lag, const double *c, int nterms, int sign)
{
    if (nterms == 0)
        return 0.0;
    int P = lag[nterms - 1];
    double *v = calloc((size_t)P, sizeof *v);
    fit_complex *r = malloc((size_t)P * sizeof *r);
    double m = 2.0;
    if (v && r) {
        for (int i = 0; i < nterms; i++)
            v[lag[i] - 1] = c[i];
        if (fit_inverse_roots(v, P, sign, r) == HN_OK)
            m = fit_roots_max_modulus(r, P);
    }
    free(v);
    free(r);
    return m;
}

/* Shrink MA coefficients towards zero until the inverse roots lie inside
 * radius 0.98; zero them if that fails. */
static void shrink_inside(const int *lag, double *c, int nterms, int sign)
{
    for (int it = 0; it < 60; it++) {
        if (max_modulus(lag, c, nterms, sign) < 0.98)
            return;
        for (int i = 0; i < nterms; i++)
            c[i] *= 0.9;
    }
    for (int i = 0; i < nterms; i++)
        c[i] = 0.0;
}

#define HR_MAX_ROWS 20000

/* Pure AR on a long series: the least-squares coefficients from the normal
 * equations, accumulated in one pass over centred values (sums in blocks of
 * 4096 terms to limit rounding) and solved by Cholesky (LAPACKE_dposv).
 * On a long series a QR of the whole design would cost many likelihood
 * passes; the normal equations lose some digits when the design is
 * ill-conditioned, which the optimiser's gradient check then recovers. */
static int ar_normal_equations(const fit_spec *spec, const double *ys, size_t nn,
                               double ctr, double *mpar)
{
    const int off = spec->mean ? 1 : 0, nar = spec->n_ar, c = off + nar;
    const size_t P = (size_t)fit_spec_max_ar(spec), cc = (size_t)c;
    double *A = calloc(3 * cc * cc + 3 * cc, sizeof *A);
    if (!A)
        return HN_ENOMEM;
    double *Ab = A + cc * cc, *b = Ab + cc * cc, *bb = b + cc, *x = bb + cc;
    double *L = x + cc;
    for (size_t t0 = P; t0 < nn; t0 += 4096) {
        size_t t1 = t0 + 4096 < nn ? t0 + 4096 : nn;
        memset(Ab, 0, cc * cc * sizeof *Ab);
        memset(bb, 0, cc * sizeof *bb);
        for (size_t t = t0; t < t1; t++) {
            if (off)
                x[0] = 1.0;
            for (int i = 0; i < nar; i++)
                x[off + i] = ys[t - (size_t)spec->ar_lag[i]] - ctr;
            double yt = ys[t] - ctr;
            for (int k = 0; k < c; k++) {
                bb[k] += x[k] * yt;
                for (int l = 0; l <= k; l++)
                    Ab[k * c + l] += x[k] * x[l];
            }
        }
        for (size_t k = 0; k < cc * cc; k++)
            A[k] += Ab[k];
        for (size_t k = 0; k < cc; k++)
            b[k] += bb[k];
    }
    for (int k = 0; k < c; k++)
        for (int l = 0; l <= k; l++)
            A[l * c + k] = A[k * c + l];
    memcpy(L, A, cc * cc * sizeof *L);
    lapack_int info = LAPACKE_dposv(LAPACK_ROW_MAJOR, 'L', c, 1, L, c, b, 1);
    int rc = info == 0 ? HN_OK : info > 0 ? HN_ESINGULAR : HN_EINVAL;
    for (int k = 0; rc == HN_OK && k < c; k++)
        if (!isfinite(b[k]))
            rc = HN_ENUMERIC;
    if (rc == HN_OK) {
        for (int i = 0; i < nar; i++)
            mpar[off + i] = b[off + i];
        if (off) {
            double sa = 0.0;
            for (int i = 0; i < nar; i++)
                sa += b[off + i];
            mpar[0] = fabs(1.0 - sa) > 1e-6 ? ctr + b[0] / (1.0 - sa) : ctr;
        }
    }
    free(A);
    return rc;
}

/* The long autoregression of Hannan-Rissanen: coefficients of z_t = ys_t -
 * ctr on an intercept (OFF = 1) and lags 1..M of z, t = M..nn-1, from the
 * normal equations solved by Cholesky (LAPACKE_dposv).  The lag cross
 * products S(k, l) = sum_t z_{t-k} z_{t-l} come from the lag structure:
 * S(0, d) is one sum per lag d, and S(k+1, k+1+d) = S(k, k+d) minus the
 * product leaving at the end of the window plus the one entering at its
 * start, so the whole matrix costs M + 1 passes of multiply-adds instead of
 * a QR of the rows x (M+1) design.  These are start values, which the
 * optimiser refines, so the digits the normal equations can lose on an
 * ill-conditioned design do not reach the estimates.  COEF (OFF + M).
 * HN_OK, HN_ENOMEM, or HN_ESINGULAR when the matrix is not positive
 * definite (the caller then uses the QR). */
static int long_ar_normal(const double *ys, size_t nn, size_t M, double ctr, int off, double *coef)
{
    const size_t c = M + (size_t)off, o = (size_t)off;
    double *A = calloc(c * c + c + nn + M + 1, sizeof *A);
    if (!A)
        return HN_ENOMEM;
    double *b = A + c * c, *z = b + c, *S = z + nn;
    for (size_t t = 0; t < nn; t++)
        z[t] = ys[t] - ctr;
    /* S[d] = S(0, d) and T = sum_t z_t over the window t = M..nn-1; the
     * M + 1 sums advance side by side, each still in the order of t, so
     * that their additions overlap */
    for (size_t d = 0; d <= M; d++)
        S[d] = 0.0;
    for (size_t t = M; t < nn; t++) {
        const double zt = z[t];
        for (size_t d = 0; d <= M; d++)
            S[d] += zt * z[t - d];
    }
    double tk = 0.0;
    for (size_t t = M; t < nn; t++)
        tk += z[t];
    /* b: lag k against lag 0; A: lags k, l >= 1 (walk k along each diagonal) */
    for (size_t k = 1; k <= M; k++)
        b[o + k - 1] = S[k];
    for (size_t d = 0; d < M; d++) {
        double s = S[d];
        for (size_t k = 0; k + d < M; k++) {
            /* S(k, k+d) -> S(k+1, k+1+d): the window moves one step back */
            s += z[M - k - 1] * z[M - k - 1 - d] - z[nn - 1 - k] * z[nn - 1 - k - d];
            size_t r = o + k, q = o + k + d;       /* lags k+1 and k+1+d */
            A[q * c + r] = A[r * c + q] = s;
        }
    }
    if (off) {
        A[0] = (double)(nn - M);
        b[0] = tk;
        for (size_t k = 0; k < M; k++) {   /* T(k+1) = sum_t z_{t-k-1} */
            tk += z[M - k - 1] - z[nn - 1 - k];
            A[k + 1] = A[(k + 1) * c] = tk;
        }
    }
    lapack_int info = LAPACKE_dposv(LAPACK_ROW_MAJOR, 'L', (lapack_int)c, 1, A, (lapack_int)c, b, 1);
    int rc = info == 0 ? HN_OK : HN_ESINGULAR;
    for (size_t k = 0; rc == HN_OK && k < c; k++)
        if (!isfinite(b[k]))
            rc = HN_ESINGULAR;
    if (rc == HN_OK)
        memcpy(coef, b, c * sizeof *coef);
    free(A);
    return rc;
}

/* Kahan-compensated sum: add X to *S with correction *C (every such sum in
 * this file, in this order of operations). */
static inline void kahan_add(double *s, double *c, double x)
{
    double v = x - *c, u = *s + v;
    *c = (u - *s) - v;
    *s = u;
}

/* fit_arma_start with the sample mean YBAR of Y[0..n-1] given (0 without a
 * mean), n > max AR lag + 1. */
static int hr_start(const fit_spec *spec, const double *y, size_t n, double ybar, double *mpar)
{
    const int off = spec->mean ? 1 : 0, nar = spec->n_ar, nma = spec->n_ma;
    const size_t P = (size_t)fit_spec_max_ar(spec), Q = (size_t)fit_spec_max_ma(spec);
    const int nm = fit_arma_nmean(spec);
    for (int k = 0; k < nm; k++)
        mpar[k] = 0.0;
    /* the sample mean: the start for mu whenever the regressions cannot say */
    if (spec->mean)
        mpar[0] = ybar;
    if (nm == off)
        return HN_OK;

    const double *ys = y;
    size_t nn = n;
    if (nma > 0 && n > HR_MAX_ROWS) {
        ys = y + (n - HR_MAX_ROWS);
        nn = HR_MAX_ROWS;
    }
    const double ctr = ybar;    /* regressions on centred values (0 without mean) */
    int rc = HN_OK;
    double *A = NULL, *B = NULL, *ehat = NULL;
    size_t m = 0;

    if (nma > 0) {
        /* long autoregression */
        size_t mq = 2 * (P > Q ? P : Q);
        size_t ml = (size_t)ceil(10.0 * log10((double)nn));
        if (ml > 30)
            ml = 30;
        m = mq > ml ? mq : ml;
        if (m > 400)
            m = 400;
        while (m > P && nn < m + Q + 4 * (m + 1) + 10)
            m /= 2;
        if (m < 1 || nn <= m + Q + (size_t)nm + 2) {
            rc = HN_ESHORT;
            goto done;
        }
        size_t rows = nn - m, cols = m + (size_t)off;
        B = malloc((rows > cols ? rows : cols) * sizeof *B);
        ehat = calloc(nn, sizeof *ehat);
        if (!B || !ehat) {
            rc = HN_ENOMEM;
            goto done;
        }
        rc = long_ar_normal(ys, nn, m, ctr, off, B);
        if (rc == HN_ENOMEM)
            goto done;
        if (rc != HN_OK) {      /* not positive definite: the QR of the design */
            A = malloc(rows * cols * sizeof *A);
            if (!A) {
                rc = HN_ENOMEM;
                goto done;
            }
            for (size_t t = m; t < nn; t++) {
                double *a = A + (t - m) * cols;
                if (off)
                    a[0] = 1.0;
                for (size_t k = 1; k <= m; k++)
                    a[off + k - 1] = ys[t - k] - ctr;
                B[t - m] = ys[t] - ctr;
            }
            if ((rc = lsq(A, B, rows, (int)cols)) != HN_OK)
                goto done;
        }
        /* lag by lag over all t (each residual takes its terms in the same
         * order as one t at a time, and the t are independent) */
        for (size_t t = m; t < nn; t++)
            ehat[t] = ys[t] - ctr - (off ? B[0] : 0.0);
        const v2d cv = { ctr, ctr };
        for (size_t k = 1; k <= m; k++) {
            const double bk = B[off + k - 1];
            const v2d bv = { bk, bk };
            size_t t = m;
            for (; t + 2 <= nn; t += 2) {
                v2d ev, xv;
                memcpy(&ev, ehat + t, sizeof ev);
                memcpy(&xv, ys + t - k, sizeof xv);
                ev -= bv * (xv - cv);
                memcpy(ehat + t, &ev, sizeof ev);
            }
            for (; t < nn; t++)
                ehat[t] -= bk * (ys[t - k] - ctr);
        }
        free(A);
        free(B);
        A = B = NULL;
    }

    /* regression of y_t on (1, y_{t-l_i}, ehat_{t-m_j}) */
    size_t t0 = nma > 0 ? m + Q : P;
    if (t0 < P)
        t0 = P;
    size_t rows = nn - t0, cols = (size_t)nm;
    if (nma == 0 && rows > HR_MAX_ROWS) {
        rc = ar_normal_equations(spec, ys, nn, ctr, mpar);
        goto done;
    }
    A = malloc(rows * cols * sizeof *A);
    B = malloc(rows * sizeof *B);
    if (!A || !B) {
        rc = HN_ENOMEM;
        goto done;
    }
    for (size_t t = t0; t < nn; t++) {
        double *a = A + (t - t0) * cols;
        if (off)
            a[0] = 1.0;
        for (int i = 0; i < nar; i++)
            a[off + i] = ys[t - (size_t)spec->ar_lag[i]] - ctr;
        for (int j = 0; j < nma; j++)
            a[off + nar + j] = ehat[t - (size_t)spec->ma_lag[j]];
        B[t - t0] = ys[t] - ctr;
    }
    if ((rc = lsq(A, B, rows, (int)cols)) != HN_OK)
        goto done;
    for (int k = off; k < nm; k++)
        mpar[k] = B[k];
    /* the AR part never makes the residual recursion diverge; the MA part can */
    shrink_inside(spec->ma_lag, mpar + off + nar, nma, 1);
    if (off) {
        /* intercept c = (1 - sum ar)(mu - ybar) on centred data */
        double sa = 0.0;
        for (int i = 0; i < nar; i++)
            sa += mpar[off + i];
        mpar[0] = fabs(1.0 - sa) > 1e-6 ? ybar + B[0] / (1.0 - sa) : ybar;
    }
done:
    free(A);
    free(B);
    free(ehat);
    if (rc == HN_ESINGULAR || rc == HN_ENUMERIC || rc == HN_ESHORT) {
        /* a degenerate design: fall back to zero coefficients at the mean */
        for (int k = off; k < nm; k++)
            mpar[k] = 0.0;
        rc = HN_OK;
    }
    return rc;
}

int fit_arma_start(const fit_spec *spec, const double *y, size_t n, double *mpar)
{
    if (!spec || !y || (!mpar && fit_arma_nmean(spec) > 0))
        return HN_EINVAL;
    if (n <= (size_t)fit_spec_max_ar(spec) + 1)
        return HN_ESHORT;
    double ybar = 0.0;
    if (spec->mean) {
        double c = 0.0;
        for (size_t t = 0; t < n; t++)
            kahan_add(&ybar, &c, y[t]);
        ybar /= (double)n;
    }
    return hr_start(spec, y, n, ybar, mpar);
}

/* ---- the fit ----------------------------------------------------------- */

/* sum_t x_t over Y[0..n-1], x_t = (y_t - shift)^(1 + SQUARE), or with
 * Z given x_t = (y_t - shift) / div, also stored in Z[t]; by Kahan sums in
 * sixteen interleaved lanes (eight vectors), whose additions overlap instead
 * of each waiting on the last, then the lanes and the last n mod 16 terms in
 * one more Kahan sum.  As accurate as one sequential sum, but not always
 * equal to it in the last bit. */
#define LANE_VECS 8
static inline __attribute__((always_inline)) double
lanes_body(const double *y, size_t n, double shift, const int square, double *z, double div)
{
    v2d s[LANE_VECS], c[LANE_VECS];
    const v2d sh = { shift, shift }, dv = { div, div };
    for (int l = 0; l < LANE_VECS; l++)
        s[l] = c[l] = sh - sh;
    size_t t = 0;
    for (; t + 2 * LANE_VECS <= n; t += 2 * LANE_VECS)
        _Pragma("GCC unroll 8")
        for (int l = 0; l < LANE_VECS; l++) {
            v2d x;
            memcpy(&x, y + t + 2 * (size_t)l, sizeof x);
            x -= sh;
            if (square)
                x *= x;
            if (z) {
                x /= dv;
                memcpy(z + t + 2 * (size_t)l, &x, sizeof x);
            }
            v2d v = x - c[l], u = s[l] + v;
            c[l] = (u - s[l]) - v;
            s[l] = u;
        }
    double tot = 0.0, comp = 0.0;
    for (int l = 0; l < LANE_VECS; l++)
        for (int i = 0; i < 2; i++) {
            kahan_add(&tot, &comp, s[l][i]);
            kahan_add(&tot, &comp, -c[l][i]);
        }
    for (; t < n; t++) {
        double r = y[t] - shift;
        if (z)
            r = z[t] = r / div;
        kahan_add(&tot, &comp, square ? r * r : r);
    }
    return tot - comp;
}

static double lanes_sum(const double *y, size_t n, double shift, int square)
{
    return square ? lanes_body(y, n, shift, 1, NULL, 1.0) : lanes_body(y, n, shift, 0, NULL, 1.0);
}

/* The standardisation of Y[0..n-1]: LOC, the mean (0 without MEAN); SCALE,
 * the root mean square about it; Z = (y - loc) / scale and ZBAR, the mean
 * of Z; each sum by lanes_body, so that none waits on its own additions:
 * two reads of Y, and one more that writes Z. */
static void standardise(const double *y, size_t n, int mean, double *z, double *loc_out,
                        double *scale_out, double *zbar_out)
{
    const double loc = mean ? lanes_sum(y, n, 0.0, 0) / (double)n : 0.0;
    const double scale = sqrt(lanes_sum(y, n, loc, 1) / (double)n);
    *loc_out = loc;
    *scale_out = scale;
    *zbar_out = isfinite(scale) && scale > 0.0 ? lanes_body(y, n, loc, 0, z, scale) / (double)n : 0.0;
}

/* The optimiser works on the series standardised as z = (y - ybar) / scale
 * (no shift without a mean), so that its gradient tolerance does not depend
 * on the units of the data; mu_z = (mu - ybar) / scale, ar and ma unchanged.
 * The objective is the per-observation profile negative log-likelihood
 *   f = 1/2 (log(2 pi SSR/N) + 1),   grad f = sum e_t de_t / SSR. */
typedef struct {
    fit_arma_ws *ws;
    const double *z;
    size_t n;
    double N;
    double *gs;
    /* the point of the last Gauss-Newton pass, with f and its gradient, so
     * that BFGS2's first evaluation there costs no second pass */
    int memo;
    double mx[FIT_MAX_PARAMS], mf, mg[FIT_MAX_PARAMS];
    /* the point of the last second-order pass (css_gn with WANT_H), with its
     * SSR and gradient sums; its residuals are in E and its Hessian sums in
     * H, which the fit reads instead of a pass of its own when it stops
     * there */
    double *e, *H;
    int hmemo;
    double hx[FIT_MAX_PARAMS], hssr, hg[FIT_MAX_PARAMS];
} css_ctx;

static int css_objective(const double *x, double *f, double *grad, void *vctx)
{
    css_ctx *c = vctx;
    const size_t nmb = (size_t)c->ws->nm * sizeof *x;
    if (c->memo && memcmp(x, c->mx, nmb) == 0) {
        *f = c->mf;
        if (grad)
            memcpy(grad, c->mg, nmb);
        return HN_OK;
    }
    double ssr;
    int rc = fit_arma_resid(c->ws, c->z, c->n, x, NULL, NULL, &ssr, grad ? c->gs : NULL);
    if (rc != HN_OK)
        return rc;
    if (!(ssr > 0.0))
        return HN_EDOMAIN;
    *f = 0.5 * (log(2.0 * M_PI * ssr / c->N) + 1.0);
    if (grad)
        for (int k = 0; k < c->ws->nm; k++)
            grad[k] = c->gs[k] / ssr;
    return HN_OK;
}

/* f, its gradient and the Gauss-Newton matrix M = J'J / SSR at X in one
 * pass (J: the derivative rows de_t/dtheta); M is positive semi-definite and
 * close to the Hessian of f near the optimum.  With WANT_H (and C->H set)
 * the pass is the second-order one, which gives the same SSR, gradient and
 * J'J to the last bit and also the residuals and Hessian sums (the memo
 * above); should it fail, the plain pass decides. */
static int css_gn(css_ctx *c, const double *x, double *f, double *g, double *M, int want_h)
{
    const int nm = c->ws->nm;
    double ssr;
    int rc = HN_EDOMAIN;
    if (want_h && c->H) {
        c->hmemo = 0;
        rc = hessian_pass(c->ws, c->z, c->n, x, c->e, &ssr, c->gs, c->H, M);
        if (rc == HN_OK) {
            memcpy(c->hx, x, (size_t)nm * sizeof *x);
            memcpy(c->hg, c->gs, (size_t)nm * sizeof *c->gs);
            c->hssr = ssr;
            c->hmemo = 1;
        }
    }
    if (rc != HN_OK)
        rc = resid_pass(c->ws, c->z, c->n, x, NULL, NULL, &ssr, c->gs, M);
    if (rc != HN_OK)
        return rc;
    if (!(ssr > 0.0))
        return HN_EDOMAIN;
    *f = 0.5 * (log(2.0 * M_PI * ssr / c->N) + 1.0);
    for (int k = 0; k < nm; k++) {
        g[k] = c->gs[k] / ssr;
        for (int l = 0; l < nm; l++)
            M[k * nm + l] /= ssr;
    }
    memcpy(c->mx, x, (size_t)nm * sizeof *x);
    memcpy(c->mg, g, (size_t)nm * sizeof *g);
    c->mf = *f;
    c->memo = 1;
    return HN_OK;
}

/* BFGS2 runs in preconditioned coordinates u, x = x0 + L^-T u, where L L'
 * is the Hessian at the start (or its Gauss-Newton part when the Hessian is
 * not positive definite there): then the Hessian in u is the identity at
 * the start and BFGS begins close to Newton's method.  The gradient in u is
 * L^-1 grad_x; the optimiser's tolerance applies to it (a Newton-decrement
 * measure, free of the parameters' units). */
typedef struct {
    css_ctx *c;
    int nm;
    const double *x0, *L;   /* L: lower Cholesky factor, row-major */
    double *xt, *gt;
} pre_ctx;

/* V = L^-T U (back substitution); the caller adds x0. */
static void pre_to_x(const pre_ctx *p, const double *u, double *x)
{
    const int nm = p->nm;
    for (int i = nm - 1; i >= 0; i--) {
        double v = u[i];
        for (int k = i + 1; k < nm; k++)
            v -= p->L[k * nm + i] * x[k];
        x[i] = v / p->L[i * nm + i];
    }
}

static int pre_objective(const double *u, double *f, double *grad, void *vctx)
{
    pre_ctx *p = vctx;
    const int nm = p->nm;
    pre_to_x(p, u, p->xt);
    for (int i = 0; i < nm; i++)
        p->xt[i] += p->x0[i];
    int rc = css_objective(p->xt, f, grad ? p->gt : NULL, p->c);
    if (rc != HN_OK || !grad)
        return rc;
    /* grad_u = L^-1 grad_x (forward substitution) */
    for (int i = 0; i < nm; i++) {
        double v = p->gt[i];
        for (int k = 0; k < i; k++)
            v -= p->L[i * nm + k] * grad[k];
        grad[i] = v / p->L[i * nm + i];
    }
    return HN_OK;
}

/* Lower Cholesky factor of the nm x nm matrix A into L; 0 on success. */
static int cholesky(int nm, const double *A, double *L)
{
    memcpy(L, A, (size_t)nm * (size_t)nm * sizeof *L);
    if (LAPACKE_dpotrf(LAPACK_ROW_MAJOR, 'L', nm, L, nm) != 0)
        return -1;
    double dmax = 0.0, dmin = INFINITY;
    for (int i = 0; i < nm; i++) {
        for (int k = i + 1; k < nm; k++)
            L[i * nm + k] = 0.0;
        double d = fabs(L[i * nm + i]);
        if (d > dmax) dmax = d;
        if (d < dmin) dmin = d;
    }
    return dmin > 1e-8 * dmax ? 0 : -1;
}

/* Newton decrement sqrt(g' H^-1 g) from the Cholesky factor L of H. */
static double decrement(int nm, const double *L, const double *g, double *tmp)
{
    double s2 = 0.0;
    for (int i = 0; i < nm; i++) {
        double v = g[i];
        for (int k = 0; k < i; k++)
            v -= L[i * nm + k] * tmp[k];
        tmp[i] = v / L[i * nm + i];
        s2 += tmp[i] * tmp[i];
    }
    return sqrt(s2);
}

/* Minimise f from X (overwritten).
 *   1. Gauss-Newton steps x <- x - M^-1 g (at most 8), each kept only when f
 *      does not rise beyond rounding; they stop at the tolerance (measured
 *      as the decrement sqrt(g' M^-1 g)), at a singular M or at a rejected
 *      step.  On a long series each step gains about a factor sqrt(N).
 *   2. BFGS2 (fit_optim_minimise) from there in coordinates preconditioned by
 *      the Cholesky factor of M, where its gradient tolerance is the same
 *      decrement; after successful Gauss-Newton steps it confirms
 *      convergence at its first evaluation.  Up to four rounds, each
 *      preconditioned afresh where the previous one stopped.
 * REP counts Gauss-Newton steps as iterations and their passes as
 * evaluations, on top of BFGS2's own. */
static int css_minimise(css_ctx *c, double *x, const fit_options *o, fit_optim_report *rep)
{
    const int nm = c->ws->nm;
    const size_t nn = (size_t)nm * (size_t)nm;
    double *buf = malloc((3 * nn + 7 * (size_t)nm) * sizeof *buf);
    if (!buf)
        return HN_ENOMEM;
    double *M = buf, *M1 = M + nn, *L = M1 + nn;
    double *x0 = L + nn, *u = x0 + nm, *xt = u + nm, *gt = xt + nm, *g = gt + nm;
    double *x1 = g + nm, *g1 = x1 + nm;
    int steps = 0, passes = 1;
    double f;
    /* without MA terms the start is the least-squares optimum itself, so
     * the first pass is likely the last */
    int rc = css_gn(c, x, &f, g, M, c->ws->spec.n_ma == 0);
    if (rc != HN_OK) {
        free(buf);
        return rc;
    }
    int have_L = cholesky(nm, M, L) == 0;
    double dec, dec_prev = 0.0;
    while (have_L && steps < 8 && (dec = decrement(nm, L, g, u)) >= o->grad_tol) {
        if (o->interrupt && *o->interrupt) {
            free(buf);
            return HN_EINTR;
        }
        /* x1 = x - M^-1 g = x + L^-T (-L^-1 g); u holds L^-1 g */
        for (int i = 0; i < nm; i++)
            u[i] = -u[i];
        pre_ctx p0 = { c, nm, x, L, xt, gt };
        pre_to_x(&p0, u, x1);
        for (int i = 0; i < nm; i++)
            x1[i] += x[i];
        /* the decrement falls by about the same factor each step: when that
         * puts the next one below the tolerance, x1 is likely where the fit
         * stops, and its pass is the second-order one the fit needs there */
        int last = steps > 0 && dec * (dec / dec_prev) < o->grad_tol;
        double f1;
        passes++;
        if (css_gn(c, x1, &f1, g1, M1, last) != HN_OK ||
            f1 > f + 64 * DBL_EPSILON * (1.0 + fabs(f)))
            break;
        memcpy(x, x1, (size_t)nm * sizeof *x);
        memcpy(M, M1, nn * sizeof *M);
        memcpy(g, g1, (size_t)nm * sizeof *g);
        f = f1;
        dec_prev = dec;
        steps++;
        have_L = cholesky(nm, M, L) == 0;
    }
    /* BFGS2 in rounds: each round is preconditioned at its own start (the
     * Gauss-Newton matrix there, else the identity), so that a poor metric
     * from a distant start does not persist; a round ends at the tolerance,
     * at a stall, or after a quarter of the iteration budget. */
    fit_optim_options oo = fit_optim_default_options();
    oo.grad_tol = o->grad_tol;
    oo.interrupt = o->interrupt;
    oo.line_tol = 0.9;      /* the usual curvature constant for quasi-Newton */
    int budget = o->max_iter > 0 ? o->max_iter : 1, used = 0, evals = 0;
    fit_optim_report r1;
    memset(&r1, 0, sizeof r1);
    rc = HN_ENOCONV;
    for (int round = 0; round < 4 && used < budget; round++) {
        if (round > 0) {
            if (css_gn(c, x, &f, g, M, 0) != HN_OK)
                break;
            passes++;
            have_L = cholesky(nm, M, L) == 0;
        }
        if (!have_L) {
            memset(L, 0, nn * sizeof *L);
            for (int i = 0; i < nm; i++)
                L[i * nm + i] = 1.0;
        }
        memcpy(x0, x, (size_t)nm * sizeof *x0);
        double gnorm = decrement(nm, L, g, u);
        memset(u, 0, (size_t)nm * sizeof *u);
        pre_ctx p = { c, nm, x0, L, xt, gt };
        int left = budget - used;
        oo.max_iter = round < 3 && left > budget / 4 ? (budget + 3) / 4 : left;
        /* the first trial step: the Gauss-Newton step's length in u */
        oo.step = gnorm < 1e-6 ? 1e-6 : gnorm > 1.0 ? 1.0 : gnorm;
        double f_before = f;
        rc = fit_optim_minimise(nm, u, pre_objective, &p, &oo, &r1);
        used += r1.iterations;
        evals += r1.evaluations;
        if (rc == HN_OK || rc == HN_ENOCONV || rc == HN_EINTR) {
            pre_to_x(&p, u, x);
            for (int i = 0; i < nm; i++)
                x[i] += x0[i];
            f = r1.f;
        }
        if (rc != HN_ENOCONV || !(f < f_before - 1e-15 * (1.0 + fabs(f_before))))
            break;
    }
    if (rep) {
        *rep = r1;
        rep->iterations = used + steps;
        rep->evaluations = evals + passes;
    }
    free(buf);
    return rc;
}

int fit_arma_estimate(const double *y, size_t n, const fit_spec *spec,
                      const fit_options *opt, fit_result *res)
{
    if (!y || !spec || !res)
        return HN_EINVAL;
    fit_options o = opt ? *opt : fit_default_options();
    const size_t p = (size_t)fit_spec_max_ar(spec);
    const int nm = fit_arma_nmean(spec), off = spec->mean ? 1 : 0;
    if (n <= p + 1)
        return HN_ESHORT;

    int rc = fit_result_init(res, spec, n, p, 0);
    if (rc != HN_OK)
        return rc;
    /* the standardised series lives in res->std_resid, grown to n values,
     * until the standardised residuals replace it at the end (after the last
     * pass): one array fewer to allocate and touch */
    free(res->std_resid);
    double *z = res->std_resid = hn_alloc_long(n * sizeof *z);
    double *gs = malloc(((size_t)nm + 1) * sizeof *gs);
    double *H = malloc(((size_t)nm * nm + 1) * sizeof *H);
    fit_arma_ws *ws = fit_arma_ws_alloc(spec);
    if (!z || !gs || !H || !ws) {
        rc = HN_ENOMEM;
        goto fail;
    }
    /* location and scale of the standardisation, z, and its mean for the
     * start (fit_model refuses |y| > 1e150, so the squares cannot
     * overflow) */
    double loc, scale, zbar;
    standardise(y, n, spec->mean, z, &loc, &scale, &zbar);
    if (!isfinite(scale) || !isfinite(loc)) {
        rc = HN_ENUMERIC;
        goto fail;
    }
    if (!(scale > 0.0)) {
        rc = HN_ECONST;
        goto fail;
    }

    double x[FIT_MAX_PARAMS];
    if ((rc = hr_start(spec, z, n, spec->mean ? zbar : 0.0, x)) != HN_OK)
        goto fail;
    css_ctx ctx;
    memset(&ctx, 0, sizeof ctx);
    ctx.ws = ws;
    ctx.z = z;
    ctx.n = n;
    ctx.N = (double)(n - p);
    ctx.gs = gs;
    ctx.e = res->resid;
    ctx.H = H;
    fit_optim_report rep;
    memset(&rep, 0, sizeof rep);
    if (nm > 0) {
        int orc = css_minimise(&ctx, x, &o, &rep);
        if (orc == HN_EDOMAIN) {
            /* the start itself was infeasible: retry from zero coefficients */
            int ev = rep.evaluations;
            for (int k = 0; k < nm; k++)
                x[k] = 0.0;
            orc = css_minimise(&ctx, x, &o, &rep);
            rep.evaluations += ev;
            if (orc == HN_EDOMAIN)
                orc = HN_ENUMERIC;
        }
        if (orc != HN_OK && orc != HN_ENOCONV) {
            rc = orc;
            goto fail;
        }
        res->converged = orc == HN_OK;
    } else {
        res->converged = 1;
    }
    res->iterations = rep.iterations;
    res->evaluations = rep.evaluations;
    res->grad_norm = rep.grad_norm;
    if (!res->converged)
        res->warnings |= FIT_WARN_NOCONV;

    /* one second-order pass at the optimum: residuals, SSR, gradient and
     * the exact Hessian of f = 1/2 (log(2 pi SSR/N) + 1),
     *   d2f = A / SSR - 2 g g' / SSR^2,  A = sum (de de' + e d2e), g = sum e de */
    double ssr_z;
    if (nm > 0 && ctx.hmemo && memcmp(x, ctx.hx, (size_t)nm * sizeof *x) == 0) {
        /* the optimiser stopped at the last second-order pass: its results */
        ssr_z = ctx.hssr;
        memcpy(gs, ctx.hg, (size_t)nm * sizeof *gs);
    } else {
        if (nm > 0)
            rc = hessian_pass(ws, z, n, x, res->resid, &ssr_z, gs, H, NULL);
        else
            rc = fit_arma_resid(ws, z, n, x, res->resid, NULL, &ssr_z, NULL);
        if (rc != HN_OK || !(ssr_z > 0.0)) {
            rc = rc == HN_ENOMEM ? rc : HN_ENUMERIC;
            goto fail;
        }
        res->evaluations++;
    }
    const double N = (double)(n - p);
    for (int k = 0; k < nm; k++)
        res->par[k] = x[k];
    if (off)
        res->par[0] = loc + scale * x[0];
    double ssr = ssr_z * scale * scale;
    res->sigma2 = ssr / N;
    res->loglik = -0.5 * N * (log(2.0 * M_PI * res->sigma2) + 1.0);
    const double sd = sqrt(res->sigma2);
    {
        /* two at a time in vectors (the same operations on each); the
         * arrays in locals, which the stores cannot change */
        const v2d sv = { scale, scale }, dv = { sd, sd };
        double *const rv = res->resid, *const st = res->std_resid;
        size_t t = 0;
        for (; t + 2 <= n - p; t += 2) {
            v2d et;
            memcpy(&et, rv + t, sizeof et);
            et *= sv;
            memcpy(rv + t, &et, sizeof et);
            et /= dv;
            memcpy(st + t, &et, sizeof et);
        }
        for (; t < n - p; t++) {
            double et = rv[t] * scale;
            rv[t] = et;
            st[t] = et / sd;
        }
    }

    /* standard errors: the Hessian of the profile negative log-likelihood
     * N f in the standardised parameters, mapped back with the Jacobian
     * d x_z / d x = diag(1/scale, 1, ..., 1) */
    if (nm > 0) {
        double gn = 0.0;
        for (int k = 0; k < nm; k++) {
            double gk = gs[k] / ssr_z;
            gn += gk * gk;
        }
        res->grad_norm = sqrt(gn);
        for (int k = 0; k < nm; k++)
            for (int l = 0; l < nm; l++)
                H[k * nm + l] = H[k * nm + l] / ssr_z - 2.0 * gs[k] * gs[l] / (ssr_z * ssr_z);
        for (int i = 0; i < nm; i++)
            for (int j = 0; j < nm; j++) {
                double v = N * H[i * nm + j];
                if (off && i == 0) v /= scale;
                if (off && j == 0) v /= scale;
                H[i * nm + j] = v;
            }
        for (int i = 0; i < nm; i++)          /* exact symmetry */
            for (int j = 0; j < i; j++)
                H[i * nm + j] = H[j * nm + i] = 0.5 * (H[i * nm + j] + H[j * nm + i]);
        if ((rc = fit_result_covariance(res, H)) != HN_OK)
            goto fail;
    }
    fit_result_criteria(res, nm + 1);
    if ((rc = fit_result_roots(res)) != HN_OK)
        goto fail;
    free(gs);
    free(H);
    fit_arma_ws_free(ws);
    return HN_OK;

fail:
    free(gs);
    free(H);
    fit_arma_ws_free(ws);
    fit_result_free(res);
    memset(res, 0, sizeof *res);
    return rc;
}
