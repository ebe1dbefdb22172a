/* diag_dftdirect.c - the direct sum for odd prime lengths, four columns at a time as vectors.
 *
 * Four columns are eight doubles, two four-wide vectors (GCC vector
 * extension): AVX registers where the CPU has AVX2, SSE2 pairs otherwise,
 * from the same text compiled twice.  Vector arithmetic is elementwise, so
 * every column gets the operations, in the order, that the one-column code
 * for the columns left over gives it: the same bits either way. */
#include "diag_dftdirect.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#pragma GCC diagnostic ignored "-Wpsabi"   /* the wide vectors stay inside this file */

typedef double v4 __attribute__((vector_size(32)));

#define AI inline __attribute__((always_inline))
#define HMAX (DIAG_DIRECT_MAX / 2)
/* outputs k formed together: 3 x 4 accumulators and the 4 inputs fill the
 * 16 AVX registers */
#define KB 3

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

int diag_direct_takes(size_t p)
{
    if (p < DIAG_DIRECT_MIN || p > DIAG_DIRECT_MAX || p % 2 == 0)
        return 0;
    for (size_t f = 3; f <= p / f; f += 2)
        if (p % f == 0)
            return 0;
    return 1;
}

void diag_direct_free(diag_direct *d)
{
    if (!d)
        return;
    free(d->c);
    d->c = d->s = NULL;
}

int diag_direct_make(diag_direct *d, size_t p)
{
    memset(d, 0, sizeof *d);
    if (!diag_direct_takes(p))
        return HN_EINVAL;
    size_t h = (p - 1) / 2;
    double cp[DIAG_DIRECT_MAX], sp[DIAG_DIRECT_MAX];
    /* rows past h (zeros) for the last group of KB outputs */
    double *tab = calloc(2 * (h + KB) * h, sizeof *tab);
    if (!tab)
        return HN_ENOMEM;
    /* exactly symmetric: cos and sin at m and p - m from the same value */
    cp[0] = 1.0;
    sp[0] = 0.0;
    for (size_t m = 1; m <= h; m++) {
        double th = 2.0 * M_PI * (double)m / (double)p;
        cp[m] = cp[p - m] = cos(th);
        sp[m] = sin(th);
        sp[p - m] = -sp[m];
    }
    d->p = p;
    d->h = h;
    d->c = tab;
    d->s = tab + (h + KB) * h;
    for (size_t k = 1; k <= h; k++)
        for (size_t j = 1; j <= h; j++) {
            d->c[(k - 1) * h + j - 1] = cp[j * k % p];
            d->s[(k - 1) * h + j - 1] = sp[j * k % p];
        }
    return HN_OK;
}

/* Columns [c, c + 4) of T (row stride PITCH2 doubles, column c at double
 * 2c of each row). */
static AI void four_columns(const diag_direct *d, double *t, size_t pitch2, size_t c)
{
    size_t p = d->p, h = d->h;
    v4 w[4 * HMAX];   /* u_j, v_j of the four columns (two vectors each) */
    double *r0 = t + 2 * c;
    v4 x0a = load4(r0), x0b = load4(r0 + 4), ta = splat4(0.0), tb = splat4(0.0);
    for (size_t j = 1; j <= h; j++) {
        const double *a = t + j * pitch2 + 2 * c, *b = t + (p - j) * pitch2 + 2 * c;
        v4 a0 = load4(a), a1 = load4(a + 4), b0 = load4(b), b1 = load4(b + 4);
        v4 *q = w + 4 * (j - 1);
        q[0] = a0 + b0;
        q[1] = a1 + b1;
        q[2] = a0 - b0;
        q[3] = a1 - b1;
        ta += q[0];
        tb += q[1];
    }
    for (size_t k0 = 1; k0 <= h; k0 += KB) {
        v4 U0[KB], U1[KB], V0[KB], V1[KB];
        for (int b = 0; b < KB; b++)
            U0[b] = U1[b] = V0[b] = V1[b] = splat4(0.0);
        const double *cr = d->c + (k0 - 1) * h, *sr = d->s + (k0 - 1) * h;
        for (size_t j = 0; j < h; j++) {
            const v4 *q = w + 4 * j;
            for (int b = 0; b < KB; b++) {
                v4 cc = splat4(cr[(size_t)b * h + j]), ss = splat4(sr[(size_t)b * h + j]);
                U0[b] += cc * q[0];
                U1[b] += cc * q[1];
                V0[b] += ss * q[2];
                V1[b] += ss * q[3];
            }
        }
        size_t nk = h - k0 + 1 < KB ? h - k0 + 1 : KB;
        double x0[8], U[8], V[8];
        memcpy(x0, &x0a, sizeof x0a);
        memcpy(x0 + 4, &x0b, sizeof x0b);
        for (size_t b = 0; b < nk; b++) {
            memcpy(U, &U0[b], sizeof U0[b]);
            memcpy(U + 4, &U1[b], sizeof U1[b]);
            memcpy(V, &V0[b], sizeof V0[b]);
            memcpy(V + 4, &V1[b], sizeof V1[b]);
            double *yk = t + (k0 + b) * pitch2 + 2 * c, *ym = t + (p - k0 - b) * pitch2 + 2 * c;
            for (int e = 0; e < 8; e += 2) {
                double ur = x0[e] + U[e], ui = x0[e + 1] + U[e + 1];
                yk[e] = ur + V[e + 1];
                yk[e + 1] = ui - V[e];
                ym[e] = ur - V[e + 1];
                ym[e + 1] = ui + V[e];
            }
        }
    }
    v4 y0 = x0a + ta, y1 = x0b + tb;
    memcpy(r0, &y0, sizeof y0);
    memcpy(r0 + 4, &y1, sizeof y1);
}

/* Column c alone: the operations of four_columns on one of its lanes. */
static void one_column(const diag_direct *d, double *t, size_t pitch2, size_t c)
{
    size_t p = d->p, h = d->h;
    double w[4 * HMAX];
    double *r0 = t + 2 * c, x0r = r0[0], x0i = r0[1], tr = 0.0, ti = 0.0;
    for (size_t j = 1; j <= h; j++) {
        const double *a = t + j * pitch2 + 2 * c, *b = t + (p - j) * pitch2 + 2 * c;
        double *q = w + 4 * (j - 1);
        q[0] = a[0] + b[0];
        q[1] = a[1] + b[1];
        q[2] = a[0] - b[0];
        q[3] = a[1] - b[1];
        tr += q[0];
        ti += q[1];
    }
    for (size_t k = 1; k <= h; k++) {
        const double *cr = d->c + (k - 1) * h, *sr = d->s + (k - 1) * h;
        double Ur = 0.0, Ui = 0.0, Vr = 0.0, Vi = 0.0;
        for (size_t j = 0; j < h; j++) {
            const double *q = w + 4 * j;
            Ur += cr[j] * q[0];
            Ui += cr[j] * q[1];
            Vr += sr[j] * q[2];
            Vi += sr[j] * q[3];
        }
        double *yk = t + k * pitch2 + 2 * c, *ym = t + (p - k) * pitch2 + 2 * c;
        double ur = x0r + Ur, ui = x0i + Ui;
        yk[0] = ur + Vi;
        yk[1] = ui - Vr;
        ym[0] = ur - Vi;
        ym[1] = ui + Vr;
    }
    r0[0] = x0r + tr;
    r0[1] = x0i + ti;
}

static AI void cols_body(const diag_direct *d, double *t, size_t pitch2, size_t c0, size_t c1)
{
    size_t c = c0;
    for (; c + 4 <= c1; c += 4)
        four_columns(d, t, pitch2, c);
    for (; c < c1; c++)
        one_column(d, t, pitch2, c);
}

#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
__attribute__((target("avx2"))) static void cols_avx2(const diag_direct *d, double *t,
                                                      size_t pitch2, size_t c0, size_t c1)
{
    cols_body(d, t, pitch2, c0, c1);
}
#endif

static void cols_plain(const diag_direct *d, double *t, size_t pitch2, size_t c0, size_t c1)
{
    cols_body(d, t, pitch2, c0, c1);
}

void diag_direct_cols(const diag_direct *d, fftw_complex *t, size_t pitch, size_t c0, size_t c1)
{
#if defined(__x86_64__) && (defined(__GNUC__) || defined(__clang__))
    if (__builtin_cpu_supports("avx2")) {
        cols_avx2(d, (double *)t, 2 * pitch, c0, c1);
        return;
    }
#endif
    cols_plain(d, (double *)t, 2 * pitch, c0, c1);
}
