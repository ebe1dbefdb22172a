/* diag_sum.c - blocked compensated sums: one block driver, a few term shapes.
 *
 * The four interleaved partial sums of a block are the lanes of one
 * four-wide vector (GCC vector extension): one AVX register where the CPU
 * has AVX2, two SSE2 registers (lanes (0, 1) and (2, 3)) otherwise, from
 * the same text compiled twice.  Vector arithmetic is elementwise IEEE
 * arithmetic, so each lane does exactly what a scalar accumulator would,
 * and both builds give the same bits. */
#include "diag_sum.h"

#include <string.h>

#pragma GCC diagnostic ignored "-Wpsabi"   /* the wide vectors stay inside this file */

typedef double v2d __attribute__((vector_size(16)));
/* lanes of long, the type a comparison of two v2d gives (0 or -1): with
 * long long each lane would be converted one at a time */
typedef long v2l __attribute__((vector_size(16)));
typedef double v4 __attribute__((vector_size(32)));

#define AI inline __attribute__((always_inline))

static AI v2d load2(const double *p)
{
    v2d v;
    memcpy(&v, p, sizeof v);
    return v;
}

static AI v2d splat(double a)
{
    v2d v = { a, a };
    return v;
}

static AI v4 load4(const double *p)
{
    v4 v;
    memcpy(&v, p, sizeof v);
    return v;
}

static AI v4 splat4(double a)
{
    v4 v = { a, a, a, a };
    return v;
}

#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
#define HAVE_AVX2_BUILD 1
static int use_avx2(void)
{
    return __builtin_cpu_supports("avx2");
}
#endif

enum { T_X, T_DOT, T_DEV, T_DEV2, T_CENTER2, T_P2, T_P3, T_P4 };

/* Where a term's value v comes from: the data as stored, their squares, or
 * either less a centre (sm, sc) as (v - sm) - sc.  Forming the squares or
 * the deviations on load gives the bits a stored copy would hold, so a sum
 * over them has the digits of the same sum over that copy. */
enum { S_RAW, S_SQ, S_CEN, S_SQCEN };

static AI v2d src2(int src, const double *x, size_t i, v2d sm, v2d sc)
{
    v2d v = load2(x + i);
    switch (src) {
    case S_SQ:    return v * v;
    case S_CEN:   return (v - sm) - sc;
    case S_SQCEN: return (v * v - sm) - sc;
    }
    return v;
}

static AI v4 src4(int src, const double *x, size_t i, v4 sm, v4 sc)
{
    v4 v = load4(x + i);
    switch (src) {
    case S_SQ:    return v * v;
    case S_CEN:   return (v - sm) - sc;
    case S_SQCEN: return (v * v - sm) - sc;
    }
    return v;
}

static AI double src1(int src, const double *x, size_t i, double sm, double sc)
{
    double v = x[i];
    switch (src) {
    case S_SQ:    return v * v;
    case S_CEN:   return (v - sm) - sc;
    case S_SQCEN: return (v * v - sm) - sc;
    }
    return v;
}

/* Terms I..I+3 of shape WHAT on values V (compile-time constants after
 * inlining); Y is read only by T_DOT. */
static AI v4 term4(int what, v4 v, const double *y, size_t i, v4 m0, v4 c)
{
    v4 e;
    switch (what) {
    case T_X:       return v;
    case T_DOT:     return v * load4(y + i);
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
static AI double term1(int what, double v, const double *y, size_t i, double m0, double c)
{
    double e;
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
static AI void two_sum2(v2d *s, v2d *c, v2d v)
{
    v2d t = *s + v, z = t - *s;
    *c += (*s - (t - z)) + (v - z);
    *s = t;
}

static AI void two_sum4(v4 *s, v4 *c, v4 v)
{
    v4 t = *s + v, z = t - *s;
    *c += (*s - (t - z)) + (v - z);
    *s = t;
}

/* A block's four lanes added as (0 + 1) + (2 + 3). */
static AI double lanes(v2d lo, v2d hi)
{
    return (lo[0] + lo[1]) + (hi[0] + hi[1]);
}

static AI double lanes4(v4 a)
{
    return (a[0] + a[1]) + (a[2] + a[3]);
}

/* The lanes and error terms of a lane-compensated sum added to TOT, the
 * four sums first. */
static AI double comp_value(v4 s, v4 e, diag_ksum *tot)
{
    double parts[8] = { s[0], s[1], s[2], s[3], e[0], e[1], e[2], e[3] };
    for (int l = 0; l < 8; l++)
        diag_ksum_add(tot, parts[l]);
    return diag_ksum_value(tot);
}

/* One sum of shape W over values from SRC, plain (COMP = 0: blocks of 64
 * in four lanes of 16 terms, block sums compensated) or compensated lane by
 * lane (COMP = 1, for terms that cancel or repeat: plain partial sums of
 * terms such as integers minus a mean round the same way again and again,
 * and that bias grows with n); the tail term by term; with D, D[i] =
 * (x_i - m0) - c written on the way. */
static AI double sum1(int w, int comp, int src, const double *x, const double *y, size_t n,
                      double m0, double c, double *d)
{
    diag_ksum tot = { 0.0, 0.0 };
    v4 vm = splat4(m0), vc = splat4(c), zero = splat4(0.0), s = zero, e = zero;
    size_t t = 0;
    for (; t + DIAG_SUM_BLOCK <= n; t += DIAG_SUM_BLOCK) {
        v4 acc = zero;
        for (size_t i = t; i < t + DIAG_SUM_BLOCK; i += 4) {
            v4 u = term4(w, src4(src, x, i, zero, zero), y, i, vm, vc);
            if (comp)
                two_sum4(&s, &e, u);
            else
                acc += u;
            if (d) {
                v4 du = (load4(x + i) - vm) - vc;
                memcpy(d + i, &du, sizeof du);
            }
        }
        if (!comp)
            diag_ksum_add(&tot, lanes4(acc));
    }
    for (; t < n; t++) {
        diag_ksum_add(&tot, term1(w, src1(src, x, t, 0.0, 0.0), y, t, m0, c));
        if (d)
            d[t] = (x[t] - m0) - c;
    }
    return comp ? comp_value(s, e, &tot) : diag_ksum_value(&tot);
}

/* Up to three compensated sums of shapes W0, W1, W2 (NW of them) over the
 * same values (from SRC with centre SM, SC) in one pass, each as sum1 with
 * COMP = 1 gives it. */
static AI void sum3(int nw, int w0, int w1, int w2, int src, const double *x, size_t n, double m0,
                    double sm, double sc, double *out)
{
    diag_ksum t0 = { 0.0, 0.0 }, t1 = t0, t2 = t0;
    v4 vm = splat4(m0), zero = splat4(0.0), vsm = splat4(sm), vsc = splat4(sc);
    v4 s0 = zero, e0 = zero, s1 = zero, e1 = zero, s2 = zero, e2 = zero;
    size_t t = 0;
    for (; t + 4 <= n; t += 4) {
        v4 a = src4(src, x, t, vsm, vsc);
        two_sum4(&s0, &e0, term4(w0, a, NULL, t, vm, zero));
        if (nw > 1)
            two_sum4(&s1, &e1, term4(w1, a, NULL, t, vm, zero));
        if (nw > 2)
            two_sum4(&s2, &e2, term4(w2, a, NULL, t, vm, zero));
    }
    for (; t < n; t++) {
        double v = src1(src, x, t, sm, sc);
        diag_ksum_add(&t0, term1(w0, v, NULL, t, m0, 0.0));
        if (nw > 1)
            diag_ksum_add(&t1, term1(w1, v, NULL, t, m0, 0.0));
        if (nw > 2)
            diag_ksum_add(&t2, term1(w2, v, NULL, t, m0, 0.0));
    }
    out[0] = comp_value(s0, e0, &t0);
    if (nw > 1)
        out[1] = comp_value(s1, e1, &t1);
    if (nw > 2)
        out[2] = comp_value(s2, e2, &t2);
}

/* The forms the entry points take, each compiled for both builds. */
enum { F_X, F_SQ, F_DOT, F_CENTER, F_DEV2, F_DEV2_SQ, F_MOM, F_MOM_OF };

static AI void sum_form(int f, const double *x, const double *y, size_t n, double m0, double c,
                        double *d, double *out)
{
    switch (f) {
    case F_X:       out[0] = sum1(T_X, 0, S_RAW, x, NULL, n, 0.0, 0.0, NULL); break;
    case F_SQ:      out[0] = sum1(T_X, 0, S_SQ, x, NULL, n, 0.0, 0.0, NULL); break;
    case F_DOT:     out[0] = sum1(T_DOT, 0, S_RAW, x, y, n, 0.0, 0.0, NULL); break;
    case F_CENTER:  out[0] = sum1(T_CENTER2, 1, S_RAW, x, NULL, n, m0, c, d); break;
    case F_DEV2:    sum3(2, T_DEV, T_DEV2, T_DEV2, S_RAW, x, n, m0, 0.0, 0.0, out); break;
    case F_DEV2_SQ: sum3(2, T_DEV, T_DEV2, T_DEV2, S_SQ, x, n, m0, 0.0, 0.0, out); break;
    case F_MOM:     sum3(3, T_P2, T_P3, T_P4, S_RAW, x, n, 0.0, 0.0, 0.0, out); break;
    case F_MOM_OF:  sum3(3, T_P2, T_P3, T_P4, S_CEN, x, n, 0.0, m0, c, out); break;
    }
}

static void sum_base(int f, const double *x, const double *y, size_t n, double m0, double c,
                     double *d, double *out)
{
    sum_form(f, x, y, n, m0, c, d, out);
}

#ifdef HAVE_AVX2_BUILD
__attribute__((target("avx2"))) static void
sum_avx2(int f, const double *x, const double *y, size_t n, double m0, double c, double *d,
         double *out)
{
    sum_form(f, x, y, n, m0, c, d, out);
}
#endif

static void sum_run(int f, const double *x, const double *y, size_t n, double m0, double c,
                    double *d, double *out)
{
#ifdef HAVE_AVX2_BUILD
    if (use_avx2()) {
        sum_avx2(f, x, y, n, m0, c, d, out);
        return;
    }
#endif
    sum_base(f, x, y, n, m0, c, d, out);
}

double diag_sum(const double *x, size_t n)
{
    double s;
    sum_run(F_X, x, NULL, n, 0.0, 0.0, NULL, &s);
    return s;
}

double diag_sum_sq(const double *x, size_t n)
{
    double s;
    sum_run(F_SQ, x, NULL, n, 0.0, 0.0, NULL, &s);
    return s;
}

double diag_sum_dot(const double *p, const double *q, size_t n)
{
    double s;
    sum_run(F_DOT, p, q, n, 0.0, 0.0, NULL, &s);
    return s;
}

void diag_sum_dev2(const double *x, size_t n, double m, double *s1, double *s2)
{
    double s[2];
    sum_run(F_DEV2, x, NULL, n, m, 0.0, NULL, s);
    *s1 = s[0];
    *s2 = s[1];
}

void diag_sum_dev2_sq(const double *x, size_t n, double m, double *s1, double *s2)
{
    double s[2];
    sum_run(F_DEV2_SQ, x, NULL, n, m, 0.0, NULL, s);
    *s1 = s[0];
    *s2 = s[1];
}

double diag_sum_center(const double *x, size_t n, double m0, double c, double *d)
{
    double s;
    sum_run(F_CENTER, x, NULL, n, m0, c, d, &s);
    return s;
}

void diag_sum_moments(const double *d, size_t n, double s[3])
{
    sum_run(F_MOM, d, NULL, n, 0.0, 0.0, NULL, s);
}

void diag_sum_moments_of(const double *x, size_t n, double m0, double c, double s[3])
{
    sum_run(F_MOM_OF, x, NULL, n, m0, c, NULL, s);
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

/* The lagged sums.  Lag k's block j is the 64 products d_t d_{t-k},
 * t = k + 64 j ..., four plain lanes of 16, added as (0 + 1) + (2 + 3), and
 * the blocks of one lag are added with compensation in the order of j: the
 * digits of diag_sum_dot(d + k, d, n - k).  The blocks are taken one at a
 * time and, within a block, up to LAG_GROUP lags side by side: each value
 * of the unlagged factor is loaded once for the group, and the block and
 * its neighbours stay in the first-level cache while every lag reads them.
 * The series is read through a window W holding d[OFF ...]. */
#define LAG_GROUP 8
/* Without AVX, half as many: two registers a lag, sixteen in all. */
#define LAG_GROUP_SSE2 4
/* Blocks per window of the streamed form (16 KB of the series). */
#define LAG_CHUNK 32

/* Sums of lags K0 .. K0 + G - 1 over the block at P (P[i] = d_{t0+i}):
 * OUT[g] = sum_i P[i + K0 + g] P[i], G a constant after inlining. */
static inline __attribute__((always_inline)) void
group_sse2(const double *p, size_t k0, const int g, double *out)
{
    v2d lo[LAG_GROUP], hi[LAG_GROUP];
#pragma GCC unroll 8
    for (int l = 0; l < g; l++)
        lo[l] = hi[l] = splat(0.0);
    for (size_t i = 0; i < DIAG_SUM_BLOCK; i += 4) {
        v2d a = load2(p + i), b = load2(p + i + 2);
#pragma GCC unroll 8
        for (int l = 0; l < g; l++) {
            lo[l] += load2(p + i + k0 + (size_t)l) * a;
            hi[l] += load2(p + i + 2 + k0 + (size_t)l) * b;
        }
    }
#pragma GCC unroll 8
    for (int l = 0; l < g; l++)
        out[l] = lanes(lo[l], hi[l]);
}

/* Adds to TOT[k-1] (k = 1..K) lag k's blocks j in [J0, J1), reading
 * d_i as W[i - OFF]. */
static void lagged_blocks_sse2(const double *w, size_t off, size_t n, size_t K, size_t j0,
                               size_t j1, diag_ksum *tot)
{
    for (size_t j = j0; j < j1; j++) {
        const double *p = w + (j * DIAG_SUM_BLOCK - off);
        /* lags whose block j is full: j < (n - k) / 64, i.e. k <= n - 64 (j + 1) */
        size_t room = n - (j + 1) * DIAG_SUM_BLOCK, kv = K < room ? K : room;
        double b[LAG_GROUP];
        size_t k = 1;
        for (; k + LAG_GROUP_SSE2 - 1 <= kv; k += LAG_GROUP_SSE2) {
            group_sse2(p, k, LAG_GROUP_SSE2, b);
            for (int l = 0; l < LAG_GROUP_SSE2; l++)
                diag_ksum_add(&tot[k - 1 + (size_t)l], b[l]);
        }
        for (; k <= kv; k++) {
            group_sse2(p, k, 1, b);
            diag_ksum_add(&tot[k - 1], b[0]);
        }
    }
}

#ifdef HAVE_AVX2_BUILD
/* The same with the four lanes of a block in one AVX register: the lanes
 * are the same four partial sums, so the digits are the same. */
typedef v4 v4d;

__attribute__((target("avx2"))) static inline __attribute__((always_inline)) void
group_avx2(const double *p, size_t k0, const int g, double *out)
{
    v4d acc[LAG_GROUP];
#pragma GCC unroll 8
    for (int l = 0; l < g; l++)
        acc[l] = (v4d){ 0.0, 0.0, 0.0, 0.0 };
    for (size_t i = 0; i < DIAG_SUM_BLOCK; i += 4) {
        v4d a;
        memcpy(&a, p + i, sizeof a);
#pragma GCC unroll 8
        for (int l = 0; l < g; l++) {
            v4d u;
            memcpy(&u, p + i + k0 + (size_t)l, sizeof u);
            acc[l] += u * a;
        }
    }
#pragma GCC unroll 8
    for (int l = 0; l < g; l++)
        out[l] = (acc[l][0] + acc[l][1]) + (acc[l][2] + acc[l][3]);
}

__attribute__((target("avx2"))) static void
lagged_blocks_avx2(const double *w, size_t off, size_t n, size_t K, size_t j0, size_t j1,
                   diag_ksum *tot)
{
    for (size_t j = j0; j < j1; j++) {
        const double *p = w + (j * DIAG_SUM_BLOCK - off);
        size_t room = n - (j + 1) * DIAG_SUM_BLOCK, kv = K < room ? K : room;
        double b[LAG_GROUP];
        size_t k = 1;
        for (; k + LAG_GROUP - 1 <= kv; k += LAG_GROUP) {
            group_avx2(p, k, LAG_GROUP, b);
            for (int l = 0; l < LAG_GROUP; l++)
                diag_ksum_add(&tot[k - 1 + (size_t)l], b[l]);
        }
        if (k + 3 <= kv) {
            group_avx2(p, k, 4, b);
            for (int l = 0; l < 4; l++)
                diag_ksum_add(&tot[k - 1 + (size_t)l], b[l]);
            k += 4;
        }
        for (; k <= kv; k++) {
            group_avx2(p, k, 1, b);
            diag_ksum_add(&tot[k - 1], b[0]);
        }
    }
}
#endif

static void lagged_blocks(const double *w, size_t off, size_t n, size_t K, size_t j0, size_t j1,
                          diag_ksum *tot)
{
#ifdef HAVE_AVX2_BUILD
    if (use_avx2()) {
        lagged_blocks_avx2(w, off, n, K, j0, j1, tot);
        return;
    }
#endif
    lagged_blocks_sse2(w, off, n, K, j0, j1, tot);
}

/* Full blocks of some lag: those of lag 1, j < (n - 1) / 64. */
static size_t lag_blocks(size_t n)
{
    return n > 1 ? (n - 1) / DIAG_SUM_BLOCK : 0;
}

void diag_sum_lagged(const double *d, size_t n, int maxlag, double *s)
{
    diag_ksum tot[DIAG_SUM_MAXLAG];
    size_t K = (size_t)maxlag;
    for (size_t k = 0; k < K; k++)
        tot[k].s = tot[k].c = 0.0;
    lagged_blocks(d, 0, n, K, 0, lag_blocks(n), tot);
    for (size_t k = 1; k <= K; k++) {
        for (size_t t = k + (n - k) / DIAG_SUM_BLOCK * DIAG_SUM_BLOCK; t < n; t++)
            diag_ksum_add(&tot[k - 1], d[t] * d[t - k]);
        s[k - 1] = diag_ksum_value(&tot[k - 1]);
    }
}

/* Values I0 .. I1 - 1 of the centred series from X into W (W[0] = d_I0). */
static AI void center_fill(int square, const double *x, size_t i0, size_t i1, double m0, double c,
                           double *w)
{
    v4 vm = splat4(m0), vc = splat4(c);
    size_t i = i0;
    for (; i + 4 <= i1; i += 4) {
        v4 v = src4(square ? S_SQCEN : S_CEN, x, i, vm, vc);
        memcpy(w + (i - i0), &v, sizeof v);
    }
    for (; i < i1; i++)
        w[i - i0] = src1(square ? S_SQCEN : S_CEN, x, i, m0, c);
}

static AI double center_one(int square, const double *x, size_t i, double m0, double c)
{
    return square ? src1(S_SQCEN, x, i, m0, c) : src1(S_CEN, x, i, m0, c);
}

/* The fused pass: windows of LAG_CHUNK blocks (plus MAXLAG values) are
 * centred into a buffer on the stack, their squares added to the lanes of
 * the lag-0 sum in the order diag_sum_center adds them (full blocks of 64
 * in four compensated lanes, then the tail term by term), and every lag's
 * blocks taken from the buffer.  Compiled for both builds as the sums
 * above. */
static AI void center_lagged(int square, const double *x, size_t n, double m0, double c,
                             int maxlag, double *ss, double *s)
{
    double w[LAG_CHUNK * DIAG_SUM_BLOCK + DIAG_SUM_MAXLAG];
    diag_ksum tot[DIAG_SUM_MAXLAG], t0 = { 0.0, 0.0 };
    size_t K = (size_t)maxlag, nb1 = lag_blocks(n);
    v4 s0 = splat4(0.0), e0 = s0;
    for (size_t k = 0; k < K; k++)
        tot[k].s = tot[k].c = 0.0;
    for (size_t j0 = 0; j0 < nb1; j0 += LAG_CHUNK) {
        size_t j1 = j0 + LAG_CHUNK < nb1 ? j0 + LAG_CHUNK : nb1;
        size_t off = j0 * DIAG_SUM_BLOCK, end = j1 * DIAG_SUM_BLOCK + K;
        if (end > n)
            end = n;
        center_fill(square, x, off, end, m0, c, w);
        for (size_t i = 0; i < (j1 - j0) * DIAG_SUM_BLOCK; i += 4) {
            v4 u = load4(w + i);
            two_sum4(&s0, &e0, u * u);
        }
        lagged_blocks(w, off, n, K, j0, j1, tot);
    }
    /* the lag-0 sum's remaining full blocks and tail */
    size_t t = nb1 * DIAG_SUM_BLOCK;
    for (; t + DIAG_SUM_BLOCK <= n; t += DIAG_SUM_BLOCK) {
        center_fill(square, x, t, t + DIAG_SUM_BLOCK, m0, c, w);
        for (size_t i = 0; i < DIAG_SUM_BLOCK; i += 4) {
            v4 u = load4(w + i);
            two_sum4(&s0, &e0, u * u);
        }
    }
    for (; t < n; t++) {
        double e = center_one(square, x, t, m0, c);
        diag_ksum_add(&t0, e * e);
    }
    *ss = comp_value(s0, e0, &t0);
    for (size_t k = 1; k <= K; k++) {
        for (size_t u = k + (n - k) / DIAG_SUM_BLOCK * DIAG_SUM_BLOCK; u < n; u++)
            diag_ksum_add(&tot[k - 1], center_one(square, x, u, m0, c) * center_one(square, x, u - k, m0, c));
        s[k - 1] = diag_ksum_value(&tot[k - 1]);
    }
}

static void center_lagged_base(int square, const double *x, size_t n, double m0, double c,
                               int maxlag, double *ss, double *s)
{
    if (square)
        center_lagged(1, x, n, m0, c, maxlag, ss, s);
    else
        center_lagged(0, x, n, m0, c, maxlag, ss, s);
}

#ifdef HAVE_AVX2_BUILD
__attribute__((target("avx2"))) static void
center_lagged_avx2(int square, const double *x, size_t n, double m0, double c, int maxlag,
                   double *ss, double *s)
{
    if (square)
        center_lagged(1, x, n, m0, c, maxlag, ss, s);
    else
        center_lagged(0, x, n, m0, c, maxlag, ss, s);
}
#endif

void diag_sum_center_lagged(const double *x, size_t n, int square, double m0, double c,
                            int maxlag, double *ss, double *s)
{
#ifdef HAVE_AVX2_BUILD
    if (use_avx2()) {
        center_lagged_avx2(square, x, n, m0, c, maxlag, ss, s);
        return;
    }
#endif
    center_lagged_base(square, x, n, m0, c, maxlag, ss, s);
}
