/* diag_sum.c - blocked compensated sums: one block driver, a few term shapes.
 *
 * The four interleaved partial sums of a block are the lanes of two SSE2
 * vectors (GCC vector extension, lanes (0, 1) and (2, 3)); vector
 * arithmetic is elementwise IEEE arithmetic, so each lane does exactly
 * what a scalar accumulator would. */
#include "diag_sum.h"

#include <string.h>

typedef double v2d __attribute__((vector_size(16)));
typedef long long v2l __attribute__((vector_size(16)));

static inline __attribute__((always_inline)) v2d load2(const double *p)
{
    v2d v;
    memcpy(&v, p, sizeof v);
    return v;
}

static inline __attribute__((always_inline)) v2d splat(double a)
{
    v2d v = { a, a };
    return v;
}

enum { T_X, T_DOT, T_DEV, T_DEV2, T_CENTER2, T_P2, T_P3, T_P4 };

/* Terms I, I+1 of shape WHAT (a compile-time constant after inlining). */
static inline __attribute__((always_inline)) v2d
term2(int what, const double *x, const double *y, size_t i, v2d m0, v2d c)
{
    v2d v = load2(x + i), e;
    switch (what) {
    case T_X:       return v;
    case T_DOT:     return v * load2(y + i);
    case T_DEV:     return v - m0;
    case T_DEV2:    e = v - m0; return e * e;
    case T_CENTER2: e = (v - m0) - c; return e * e;
    case T_P2:      return v * v;
    case T_P3:      return v * v * v;
    case T_P4:      e = v * v; return e * e;
    }
    return v;
}

/* The same for the single term I (the tail). */
static inline __attribute__((always_inline)) double
term1(int what, const double *x, const double *y, size_t i, double m0, double c)
{
    double v = x[i], e;
    switch (what) {
    case T_X:       return v;
    case T_DOT:     return v * y[i];
    case T_DEV:     return v - m0;
    case T_DEV2:    e = v - m0; return e * e;
    case T_CENTER2: e = (v - m0) - c; return e * e;
    case T_P2:      return v * v;
    case T_P3:      return v * v * v;
    case T_P4:      e = v * v; return e * e;
    }
    return v;
}

/* Knuth's branch-free two-sum, lane by lane: S += V with the rounding
 * error added to C. */
static inline __attribute__((always_inline)) void two_sum2(v2d *s, v2d *c, v2d v)
{
    v2d t = *s + v, z = t - *s;
    *c += (*s - (t - z)) + (v - z);
    *s = t;
}

/* A block's four lanes (a, b | e, f) added as the scalar code adds them. */
static inline __attribute__((always_inline)) double lanes(v2d lo, v2d hi)
{
    return (lo[0] + lo[1]) + (hi[0] + hi[1]);
}

/* One sum of shape W, plain (COMP = 0: blocks of 64 in four lanes of 16
 * terms, block sums compensated) or compensated lane by lane (COMP = 1,
 * for terms that cancel or repeat: plain partial sums of terms such as
 * integers minus a mean round the same way again and again, and that bias
 * grows with n); the tail term by term; with D, D[i] = (x_i - m0) - c
 * written on the way. */
static inline __attribute__((always_inline)) double
sum1(int w, int comp, const double *x, const double *y, size_t n, double m0, double c, double *d)
{
    diag_ksum tot = { 0.0, 0.0 };
    v2d vm = splat(m0), vc = splat(c), zero = splat(0.0);
    v2d s0 = zero, e0 = zero, s1 = zero, e1 = zero;
    size_t t = 0;
    for (; t + DIAG_SUM_BLOCK <= n; t += DIAG_SUM_BLOCK) {
        v2d lo = zero, hi = zero;
        for (size_t i = t; i < t + DIAG_SUM_BLOCK; i += 4) {
            v2d u = term2(w, x, y, i, vm, vc), v = term2(w, x, y, i + 2, vm, vc);
            if (comp) {
                two_sum2(&s0, &e0, u);
                two_sum2(&s1, &e1, v);
            } else {
                lo += u;
                hi += v;
            }
            if (d) {
                v2d du = (load2(x + i) - vm) - vc, dv = (load2(x + i + 2) - vm) - vc;
                memcpy(d + i, &du, sizeof du);
                memcpy(d + i + 2, &dv, sizeof dv);
            }
        }
        if (!comp)
            diag_ksum_add(&tot, lanes(lo, hi));
    }
    for (; t < n; t++) {
        diag_ksum_add(&tot, term1(w, x, y, t, m0, c));
        if (d)
            d[t] = (x[t] - m0) - c;
    }
    if (comp) {
        double parts[8] = { s0[0], s0[1], s1[0], s1[1], e0[0], e0[1], e1[0], e1[1] };
        for (int l = 0; l < 8; l++)
            diag_ksum_add(&tot, parts[l]);
    }
    return diag_ksum_value(&tot);
}

/* Lanes and error terms of one lane-compensated sum. */
typedef struct { v2d s0, e0, s1, e1; } lanes2;

static inline __attribute__((always_inline)) void lanes_add(lanes2 *l, v2d u, v2d v)
{
    two_sum2(&l->s0, &l->e0, u);
    two_sum2(&l->s1, &l->e1, v);
}

static inline __attribute__((always_inline)) double lanes_value(const lanes2 *l, diag_ksum *tot)
{
    double parts[8] = { l->s0[0], l->s0[1], l->s1[0], l->s1[1],
                        l->e0[0], l->e0[1], l->e1[0], l->e1[1] };
    for (int i = 0; i < 8; i++)
        diag_ksum_add(tot, parts[i]);
    return diag_ksum_value(tot);
}

/* Up to three compensated sums of shapes W0, W1, W2 (NW of them) over the
 * same terms in one pass, each as sum1 with COMP = 1 gives it. */
static inline __attribute__((always_inline)) void
sum3(int nw, int w0, int w1, int w2, const double *x, size_t n, double m0, double *out)
{
    diag_ksum t0 = { 0.0, 0.0 }, t1 = t0, t2 = t0;
    v2d vm = splat(m0), zero = splat(0.0);
    lanes2 l0 = { zero, zero, zero, zero }, l1 = l0, l2 = l0;
    size_t t = 0;
    for (; t + 4 <= n; t += 4) {
        lanes_add(&l0, term2(w0, x, NULL, t, vm, zero), term2(w0, x, NULL, t + 2, vm, zero));
        if (nw > 1)
            lanes_add(&l1, term2(w1, x, NULL, t, vm, zero), term2(w1, x, NULL, t + 2, vm, zero));
        if (nw > 2)
            lanes_add(&l2, term2(w2, x, NULL, t, vm, zero), term2(w2, x, NULL, t + 2, vm, zero));
    }
    for (; t < n; t++) {
        diag_ksum_add(&t0, term1(w0, x, NULL, t, m0, 0.0));
        if (nw > 1)
            diag_ksum_add(&t1, term1(w1, x, NULL, t, m0, 0.0));
        if (nw > 2)
            diag_ksum_add(&t2, term1(w2, x, NULL, t, m0, 0.0));
    }
    out[0] = lanes_value(&l0, &t0);
    if (nw > 1)
        out[1] = lanes_value(&l1, &t1);
    if (nw > 2)
        out[2] = lanes_value(&l2, &t2);
}

double diag_sum(const double *x, size_t n)
{
    return sum1(T_X, 0, x, NULL, n, 0.0, 0.0, NULL);
}

double diag_sum_dot(const double *p, const double *q, size_t n)
{
    return sum1(T_DOT, 0, p, q, n, 0.0, 0.0, NULL);
}

void diag_sum_dev2(const double *x, size_t n, double m, double *s1, double *s2)
{
    double s[2];
    sum3(2, T_DEV, T_DEV2, T_DEV2, x, n, m, s);
    *s1 = s[0];
    *s2 = s[1];
}

double diag_sum_center(const double *x, size_t n, double m0, double c, double *d)
{
    return sum1(T_CENTER2, 1, x, NULL, n, m0, c, d);
}

void diag_sum_moments(const double *d, size_t n, double s[3])
{
    sum3(3, T_P2, T_P3, T_P4, d, n, 0.0, s);
}

double diag_max_abs(const double *x, size_t n)
{
    v2d m0 = splat(0.0), m1 = m0;
    const v2l mag = { 0x7fffffffffffffffLL, 0x7fffffffffffffffLL };
    size_t i = 0;
    for (; i + 4 <= n; i += 4) {
        /* |a| by clearing the sign bit; NaN compares false and is passed over */
        v2d a = (v2d)((v2l)load2(x + i) & mag), b = (v2d)((v2l)load2(x + i + 2) & mag);
        v2l ga = a > m0, gb = b > m1;
        m0 = (v2d)(((v2l)a & ga) | ((v2l)m0 & ~ga));
        m1 = (v2d)(((v2l)b & gb) | ((v2l)m1 & ~gb));
    }
    double r = 0.0, cand[4] = { m0[0], m0[1], m1[0], m1[1] };
    for (int l = 0; l < 4; l++)
        r = cand[l] > r ? cand[l] : r;
    for (; i < n; i++)
        r = fabs(x[i]) > r ? fabs(x[i]) : r;
    return r;
}

int diag_all_finite(const double *x, size_t n)
{
    /* x * 0 is a zero for every finite x and NaN otherwise */
    v2d a = splat(0.0), b = a;
    size_t i = 0;
    for (; i + 4 <= n; i += 4) {
        a += load2(x + i) * 0.0;
        b += load2(x + i + 2) * 0.0;
    }
    double z = (a[0] + a[1]) + (b[0] + b[1]);
    for (; i < n; i++)
        z += x[i] * 0.0;
    return z == 0.0;
}

/* Two neighbouring blocks of 64 products p_i q_i at once (two independent
 * chains in flight), each with the operations of a block of diag_sum_dot
 * in the same order. */
static inline __attribute__((always_inline)) void
block_dot2(const double *p, const double *q, double *u, double *v)
{
    v2d a0 = splat(0.0), a1 = a0, b0 = a0, b1 = a0;
    const double *p2 = p + DIAG_SUM_BLOCK, *q2 = q + DIAG_SUM_BLOCK;
    for (size_t i = 0; i < DIAG_SUM_BLOCK; i += 4) {
        a0 += load2(p + i) * load2(q + i);
        a1 += load2(p + i + 2) * load2(q + i + 2);
        b0 += load2(p2 + i) * load2(q2 + i);
        b1 += load2(p2 + i + 2) * load2(q2 + i + 2);
    }
    *u = lanes(a0, a1);
    *v = lanes(b0, b1);
}

static inline __attribute__((always_inline)) double block_dot(const double *p, const double *q)
{
    v2d a0 = splat(0.0), a1 = a0;
    for (size_t i = 0; i < DIAG_SUM_BLOCK; i += 4) {
        a0 += load2(p + i) * load2(q + i);
        a1 += load2(p + i + 2) * load2(q + i + 2);
    }
    return lanes(a0, a1);
}

/* Blocks of 64 handled per lag before moving to the next lag: 32 blocks
 * (16 KB of the series, plus MAXLAG values) stay in the first-level cache
 * while every lag reads them. */
#define LAG_CHUNK 32

static void lagged_sse2(const double *d, size_t n, int maxlag, double *s)
{
    diag_ksum tot[DIAG_SUM_MAXLAG];
    size_t K = (size_t)maxlag, nb1 = n > 1 ? (n - 1) / DIAG_SUM_BLOCK : 0;
    for (size_t k = 0; k < K; k++)
        tot[k].s = tot[k].c = 0.0;
    for (size_t j0 = 0; j0 < nb1; j0 += LAG_CHUNK) {
        size_t j1 = j0 + LAG_CHUNK < nb1 ? j0 + LAG_CHUNK : nb1;
        for (size_t k = 1; k <= K; k++) {
            /* full blocks of lag k: t = k + 64 j, j < (n - k) / 64 */
            size_t nbk = (n - k) / DIAG_SUM_BLOCK, je = j1 < nbk ? j1 : nbk;
            const double *q = d, *p = d + k;
            size_t j = j0;
            for (; j + 2 <= je; j += 2) {
                double u, v;
                block_dot2(p + j * DIAG_SUM_BLOCK, q + j * DIAG_SUM_BLOCK, &u, &v);
                diag_ksum_add(&tot[k - 1], u);
                diag_ksum_add(&tot[k - 1], v);
            }
            for (; j < je; j++)
                diag_ksum_add(&tot[k - 1], block_dot(p + j * DIAG_SUM_BLOCK, q + j * DIAG_SUM_BLOCK));
        }
    }
    for (size_t k = 1; k <= K; k++) {
        for (size_t t = k + (n - k) / DIAG_SUM_BLOCK * DIAG_SUM_BLOCK; t < n; t++)
            diag_ksum_add(&tot[k - 1], d[t] * d[t - k]);
        s[k - 1] = diag_ksum_value(&tot[k - 1]);
    }
}

#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
/* The same sweep with the four lanes of a block in one AVX register: the
 * lanes are the same four partial sums, so the digits are the same. */
typedef double v4d __attribute__((vector_size(32)));

__attribute__((target("avx2"))) static void
lagged_avx2(const double *d, size_t n, int maxlag, double *s)
{
    diag_ksum tot[DIAG_SUM_MAXLAG];
    size_t K = (size_t)maxlag, nb1 = n > 1 ? (n - 1) / DIAG_SUM_BLOCK : 0;
    for (size_t k = 0; k < K; k++)
        tot[k].s = tot[k].c = 0.0;
    for (size_t j0 = 0; j0 < nb1; j0 += LAG_CHUNK) {
        size_t j1 = j0 + LAG_CHUNK < nb1 ? j0 + LAG_CHUNK : nb1;
        for (size_t k = 1; k <= K; k++) {
            size_t nbk = (n - k) / DIAG_SUM_BLOCK, je = j1 < nbk ? j1 : nbk;
            size_t j = j0;
            for (; j + 4 <= je; j += 4) {
                /* four blocks in flight: four independent chains */
                const double *p = d + k + j * DIAG_SUM_BLOCK, *q = d + j * DIAG_SUM_BLOCK;
                v4d acc[4] = { { 0.0 }, { 0.0 }, { 0.0 }, { 0.0 } };
                for (size_t i = 0; i < DIAG_SUM_BLOCK; i += 4)
#pragma GCC unroll 4
                    for (int b = 0; b < 4; b++) {
                        v4d u, v;
                        memcpy(&u, p + b * DIAG_SUM_BLOCK + i, sizeof u);
                        memcpy(&v, q + b * DIAG_SUM_BLOCK + i, sizeof v);
                        acc[b] += u * v;
                    }
                for (int b = 0; b < 4; b++)
                    diag_ksum_add(&tot[k - 1], (acc[b][0] + acc[b][1]) + (acc[b][2] + acc[b][3]));
            }
            for (; j < je; j++) {
                const double *p = d + k + j * DIAG_SUM_BLOCK, *q = d + j * DIAG_SUM_BLOCK;
                v4d acc = { 0.0, 0.0, 0.0, 0.0 };
                for (size_t i = 0; i < DIAG_SUM_BLOCK; i += 4) {
                    v4d u, v;
                    memcpy(&u, p + i, sizeof u);
                    memcpy(&v, q + i, sizeof v);
                    acc += u * v;
                }
                diag_ksum_add(&tot[k - 1], (acc[0] + acc[1]) + (acc[2] + acc[3]));
            }
        }
    }
    for (size_t k = 1; k <= K; k++) {
        for (size_t t = k + (n - k) / DIAG_SUM_BLOCK * DIAG_SUM_BLOCK; t < n; t++)
            diag_ksum_add(&tot[k - 1], d[t] * d[t - k]);
        s[k - 1] = diag_ksum_value(&tot[k - 1]);
    }
}
#endif

void diag_sum_lagged(const double *d, size_t n, int maxlag, double *s)
{
#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
    if (__builtin_cpu_supports("avx2")) {
        lagged_avx2(d, n, maxlag, s);
        return;
    }
#endif
    lagged_sse2(d, n, maxlag, s);
}
