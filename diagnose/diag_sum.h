/* diag_sum.h - the blocked compensated sums every check uses (internal to diagnose/).
 *
 * Plain sums (diag_sum, diag_sum_dot, diag_sum_lagged) add their terms in
 * blocks of DIAG_SUM_BLOCK with four interleaved plain partial sums of 16
 * terms each (independent chains the compiler turns into vector code), and
 * add the block sums with Neumaier's compensation: the error is that of
 * summing 16 terms plus a compensated sum of the blocks, at a fraction of
 * the cost of compensating every term.  The sums of deviations, squares and
 * moments, whose terms cancel or repeat (rounded data), keep four
 * interleaved sums each compensated term by term with a branch-free
 * two-sum, combined with compensation at the end: as accurate as one
 * compensated sum, and still vector code.  A sum comes out non-finite when
 * a term is. */
#ifndef DIAG_SUM_H
#define DIAG_SUM_H

#include <math.h>
#include <stddef.h>

#define DIAG_SUM_BLOCK 64

/* Neumaier's compensated sum: the running sum S and the lost low-order part
 * C.  The operands are chosen by selection rather than a branch (the order
 * of magnitudes is unpredictable); the arithmetic is the usual one. */
typedef struct { double s, c; } diag_ksum;

static inline void diag_ksum_add(diag_ksum *k, double v)
{
    double t = k->s + v;
    int keep = fabs(k->s) >= fabs(v);
    double big = keep ? k->s : v, small = keep ? v : k->s;
    k->c += (big - t) + small;
    k->s = t;
}

static inline double diag_ksum_value(const diag_ksum *k)
{
    return k->s + k->c;
}

/* sum_i x_i. */
double diag_sum(const double *x, size_t n);
/* sum_i x_i^2 with the squares formed on the way: the digits of diag_sum
 * over a stored copy of the squares (so too the _sq and _of forms below). */
double diag_sum_sq(const double *x, size_t n);
/* sum_i p_i q_i (the lagged products of the ACF: p = d + k, q = d). */
double diag_sum_dot(const double *p, const double *q, size_t n);
/* S[k-1] = sum_{t=k..n-1} d_t d_{t-k} for k = 1..MAXLAG (MAXLAG <=
 * DIAG_SUM_MAXLAG, < n): each the same digits as diag_sum_dot(d + k, d,
 * n - k), in one cache-blocked sweep over D instead of MAXLAG passes. */
#define DIAG_SUM_MAXLAG 64
void diag_sum_lagged(const double *d, size_t n, int maxlag, double *s);
/* S1 = sum_i (x_i - m) and S2 = sum_i (x_i - m)^2, in one pass. */
void diag_sum_dev2(const double *x, size_t n, double m, double *s1, double *s2);
/* The same over the squares x_i^2. */
void diag_sum_dev2_sq(const double *x, size_t n, double m, double *s1, double *s2);
/* D[i] = (x_i - m0) - c written and sum_i D[i]^2 returned, in one pass
 * (D may equal X). */
double diag_sum_center(const double *x, size_t n, double m0, double c, double *d);
/* sum_i d_i^2, d_i^3 and d_i^4 into S[0..2], in one pass. */
void diag_sum_moments(const double *d, size_t n, double s[3]);
/* The same over d_i = (x_i - m0) - c, formed on the way. */
void diag_sum_moments_of(const double *x, size_t n, double m0, double c, double s[3]);
/* With d_i = (v_i - m0) - c, v_i = x_i (SQUARE = 0) or x_i^2 (1), never
 * stored: SS = sum_i d_i^2 (the digits of diag_sum_center) and S[k-1] =
 * sum_{t=k..n-1} d_t d_{t-k}, k = 1..MAXLAG (0 <= MAXLAG <= DIAG_SUM_MAXLAG,
 * < n; the digits of diag_sum_lagged), in one pass over X. */
void diag_sum_center_lagged(const double *x, size_t n, int square, double m0, double c,
                            int maxlag, double *ss, double *s);
/* 1 when every x_i is finite, else 0 (one vectorised pass, no branch). */
int diag_all_finite(const double *x, size_t n);
/* The largest |x_i| (0 for n = 0; NaNs are passed over). */
double diag_max_abs(const double *x, size_t n);

#endif
