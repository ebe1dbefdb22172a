/* diag_periodogram.c - periodogram ordinates by FFTW: half-length complex, real or chirp-z route,
 * the first two in one piece or split into tasks, the chirp on a smooth or a ladder length. */
#include "diag_periodogram.h"
#include "diag_fftplan.h"
#include "diag_fftsplit.h"
#include "diag_sum.h"
#include "hn_mem.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <fftw3.h>

/* Largest prime factor of n (n >= 2), by trial division. */
static size_t largest_prime_factor(size_t n)
{
    size_t p = 1;
    for (size_t f = 2; f <= n / f; f++)
        while (n % f == 0) {
            p = f;
            n /= f;
        }
    return n > 1 ? n : p;
}

/* Smallest L >= m whose prime factors are all 2, 3, 5 or 7. */
static size_t smooth_length(size_t m)
{
    for (size_t L = m;; L++) {
        size_t r = L;
        static const size_t f[] = { 2, 3, 5, 7 };
        for (int i = 0; i < 4; i++)
            while (r % f[i] == 0)
                r /= f[i];
        if (r == 1)
            return L;
    }
}

/* Smallest L >= m of the form 2^k or 3 x 2^k: the chirp's lengths below
 * LADDER_MAX, few enough that every series length in a range shares the
 * plans of one or two of them. */
static size_t ladder_length(size_t m)
{
    size_t p = 1;
    while (p < m)
        p <<= 1;
    return 3 * (p / 4) >= m ? 3 * (p / 4) : p;
}

/* Odd n whose largest prime factor exceeds this take the chirp-z route
 * (measured at n near 10^6 and 10^5: FFTW's real transform is faster up to
 * factors of about 10^4, such as 999997 = 757 x 1321 and 1000001 = 101 x
 * 9901, and 2 to 8 times slower for 999995 = 5 x 199999 and the prime
 * 99991, planning included).  Even n keep the half-length route: a prime
 * half-length costs FFTW less than the chirp's three transforms. */
#define CHIRP_PRIME 16384
/* A transform of at least SPLIT_MIN points (half-length complex for even n,
 * real for odd n) whose length has a prime factor above SMOOTH_PRIME (FFTW
 * has fixed-size kernels up to 16) and is not prime goes through
 * diag_split_dft, whose pieces the battery's threads share: such lengths
 * cost FFTW 2 to 4 times as much per point as smooth ones (999998 = 2 x 31
 * x 127^2, 999999 = 3^3 7 11 13 37), and the split's shorter pieces cost
 * it less even on one thread (16 lengths drawn from 32768..131071: faster
 * in 12, by up to 30 %, at most 17 % slower in the others; 1.4 to 2.6
 * times faster on two threads).  With SPLIT_MIN at LADDER_MAX / 2 every
 * awkward length above the chirp's ladder is split.  The rule depends on
 * the length alone, so the digits never depend on the number of threads. */
#define SPLIT_MIN 16384
#define SMOOTH_PRIME 16

/* Below LADDER_MAX, an n whose transform (half-length complex for even n,
 * real for odd n) has a prime factor above LADDER_PRIME takes the chirp on
 * a ladder length.  FFTW plans each length anew, and for such lengths the
 * plan costs far more than the transform: at n near 2 x 10^4, 0.6 to 57 ms
 * (a prime length) against 0.2 to 2.8 ms for the transform, under the
 * planner's lock, which a batch over series of many lengths then waits on.
 * Factors of 11 and 13 do it too, though FFTW has kernels for them: complex
 * lengths 10^4 to 1.6 x 10^4 such as 10890 = 2 3^2 5 11^2 took 4 to 40 ms
 * to plan and 0.1 ms to run, where 24 lengths with no prime factor above
 * 7 took at most 1.1 ms to plan.  The chirp's three transforms on 2^15
 * points take about 0.6 ms there, and their plans serve every length up to
 * the next rung. */
#define LADDER_MAX 32768
#define LADDER_PRIME 7
/* From this many ordinates their formation is split into ORD_TASKS tasks,
 * which the threads of an enclosing team share (the battery's other checks
 * are done by then, and the transform's last step leaves a thread idle). */
#define ORD_TASK_MIN 65536
#define ORD_TASKS 8

static int splits(size_t len)
{
    return len >= SPLIT_MIN && largest_prime_factor(len) > SMOOTH_PRIME &&
           diag_smallest_factor(len) < len;
}

int diag_periodogram_route(size_t n)
{
    size_t len = n % 2 == 0 ? n / 2 : n;
    if (n < LADDER_MAX && len > 1 && largest_prime_factor(len) > LADDER_PRIME)
        return 5;
    if (n % 2 == 0)
        return splits(n / 2) ? 3 : 0;
    if (largest_prime_factor(n) > CHIRP_PRIME)
        return 2;
    return splits(n) ? 4 : 1;
}

/* A transform's entries: X_k at t[(k / s) * pitch + k % s] (one row when
 * FFTW made it whole, r rows when diag_split_dft did), and a cursor stepped
 * along them one entry at a time either way. */
typedef struct {
    const fftw_complex *t;
    size_t s, pitch;
} spectrum;

typedef struct {
    const fftw_complex *row;
    size_t k1;
} cursor;

static cursor cursor_at(const spectrum *z, size_t k)
{
    cursor c = { z->t + (k / z->s) * z->pitch, k % z->s };
    return c;
}

static inline void cursor_up(cursor *c, const spectrum *z)
{
    if (++c->k1 == z->s) {
        c->k1 = 0;
        c->row += z->pitch;
    }
}

static inline void cursor_down(cursor *c, const spectrum *z)
{
    if (c->k1-- == 0) {
        c->k1 = z->s - 1;
        c->row -= z->pitch;
    }
}

/* Ordinates j of the B-blocks [C0, C1) (block c: j = c B .. c B + B - 1,
 * j from 1 to Q) from the half-length transform Z (see periodogram_even). */
static void even_ordinates(const spectrum *z, size_t m, size_t n, size_t q, size_t B,
                           const double *fine, size_t c0, size_t c1, double *I)
{
    size_t jfirst = c0 == 0 ? 1 : c0 * B;
    cursor up = cursor_at(z, jfirst), down = cursor_at(z, m - jfirst);
    for (size_t j0 = c0 * B; j0 < c1 * B && j0 <= q; j0 += B) {
        double tha = 2.0 * M_PI * (double)j0 / (double)n;
        double ca = cos(tha), sa = -sin(tha);
        for (size_t b = 0; b < B && j0 + b <= q; b++) {
            size_t j = j0 + b;
            if (j == 0)
                continue;
            double cb = fine[2 * b], sb = fine[2 * b + 1];
            double c = ca * cb - sa * sb, sn = ca * sb + sa * cb;
            double zr = up.row[up.k1][0], zi = up.row[up.k1][1];
            double cr = down.row[down.k1][0], ci = -down.row[down.k1][1];   /* conj Z_{m-j} */
            double er = 0.5 * (zr + cr), ei = 0.5 * (zi + ci);
            double orr = 0.5 * (zi - ci), oi = -0.5 * (zr - cr);      /* (Z - conj)/(2i) */
            double xr = er + c * orr - sn * oi, xi = ei + c * oi + sn * orr;
            I[j - 1] = xr * xr + xi * xi;
            cursor_up(&up, z);
            cursor_down(&down, z);
        }
    }
}

/* Even n = 2m: with z_t = d_{2t} + i d_{2t+1} and Z its length-m DFT, the
 * even and odd samples have the transforms E_j = (Z_j + conj Z_{m-j})/2 and
 * O_j = (Z_j - conj Z_{m-j})/(2i), and X_j = E_j + exp(-2 pi i j/n) O_j.
 * FFTW's complex transform of length m handles any factorisation of m in
 * O(m log m), and about twice as fast as its real transform of length n
 * including the planning (SPLIT: by diag_split_dft).  The twiddles
 * exp(-2 pi i j/n) are formed on the way as products of a coarse and a fine
 * factor (j = a B + b, B about sqrt(q)), so that about 2 sqrt(q) sines and
 * cosines are evaluated instead of 2q; each factor is correctly rounded to
 * within an ulp, so the product is good to a few ulps, below the
 * transform's own rounding. */
static int periodogram_even(const double *d, size_t n, size_t q, int split, double *I)
{
    size_t m = n / 2, B = (size_t)sqrt((double)q) + 1;
    fftw_complex *a = NULL;
    diag_split sp = { NULL, 0, 0, 0 };
    double *fine = malloc(2 * B * sizeof *fine);
    diag_plan *p = NULL;
    spectrum z;
    int rc = HN_OK;
    if (!fine) {
        rc = HN_ENOMEM;
        goto done;
    }
    if (split) {
        /* z_t = d_{2t} + i d_{2t+1}: the same layout */
        if ((rc = diag_split_dft(d, 1, m, &sp)) != HN_OK)
            goto done;
        z = (spectrum){ sp.t, sp.s, sp.pitch };
    } else {
        a = hn_alloc_long_aligned(64, m * sizeof *a);
        if (!a || !(p = diag_plan_get(DIAG_PLAN_C2C_FWD, (int)m, a, a))) {
            rc = HN_ENOMEM;
            goto done;
        }
        memcpy(a, d, 2 * m * sizeof *d);
        fftw_execute_dft(p->p, a, a);
        z = (spectrum){ a, m, m };
    }
    for (size_t b = 0; b < B; b++) {
        double th = 2.0 * M_PI * (double)b / (double)n;
        fine[2 * b] = cos(th);
        fine[2 * b + 1] = -sin(th);
    }
    /* the ordinates in chunks of whole B-blocks, as tasks (each ordinate
     * is formed alone, so the chunks change nothing in the digits) */
    size_t nblk = q / B + 1, per = (nblk + ORD_TASKS - 1) / ORD_TASKS;
#pragma omp taskgroup
    for (size_t c0 = 0; c0 < nblk; c0 += per) {
        size_t c1 = c0 + per < nblk ? c0 + per : nblk;
#pragma omp task if (q >= ORD_TASK_MIN) firstprivate(c0, c1) shared(z, fine, I)
        even_ordinates(&z, m, n, q, B, fine, c0, c1, I);
    }
done:
    diag_plan_release(p);
    free(a);
    diag_split_free(&sp);
    free(fine);
    return rc;
}

/* Odd n with small prime factors: FFTW's real transform of length n
 * (SPLIT: diag_split_dft's). */
static int periodogram_real(const double *d, size_t n, size_t q, int split, double *I)
{
    double *in = NULL;
    fftw_complex *out = NULL;
    diag_split sp = { NULL, 0, 0, 0 };
    diag_plan *p = NULL;
    spectrum z;
    int rc = HN_OK;
    if (split) {
        if ((rc = diag_split_dft(d, 0, n, &sp)) != HN_OK)
            goto done;
        z = (spectrum){ sp.t, sp.s, sp.pitch };
    } else {
        in = hn_alloc_long_aligned(64, n * sizeof *in);
        out = hn_alloc_long_aligned(64, (n / 2 + 1) * sizeof *out);
        if (!in || !out || !(p = diag_plan_get(DIAG_PLAN_R2C, (int)n, in, out))) {
            rc = HN_ENOMEM;
            goto done;
        }
        memcpy(in, d, n * sizeof *d);
        fftw_execute_dft_r2c(p->p, in, out);
        z = (spectrum){ out, n, n };
    }
    size_t per = (q + ORD_TASKS - 1) / ORD_TASKS;
#pragma omp taskgroup
    for (size_t j0 = 1; j0 <= q; j0 += per) {
        size_t j1 = j0 + per <= q + 1 ? j0 + per : q + 1;
#pragma omp task if (q >= ORD_TASK_MIN) firstprivate(j0, j1) shared(z, I)
        {
            cursor c = cursor_at(&z, j0);
            for (size_t j = j0; j < j1; j++, cursor_up(&c, &z)) {
                const double *x = c.row[c.k1];
                I[j - 1] = x[0] * x[0] + x[1] * x[1];
            }
        }
    }
done:
    diag_plan_release(p);
    free(in);
    free(out);
    diag_split_free(&sp);
    return rc;
}

/* Odd n with a large prime factor (FFTW's prime-length algorithms, planning
 * included, are several times slower there than a smooth length half as
 * long again), and below LADDER_MAX any n whose transform is awkward (see
 * there): Bluestein's identity jt = (j^2 + t^2 - (j-t)^2)/2 turns X_j
 * into a convolution of a_t = d_t w_t^* with w_k = exp(i pi k^2 / n), taken
 * circularly on the smallest length L >= n + q with prime factors 2, 3, 5
 * and 7 only (LADDER: of the form 2^k or 3 x 2^k, for the plans' sake): the
 * outputs j <= q need w_k for -(n-1) <= k <= q alone, and
 * those fit without wrapping onto each other.  The outer chirp has modulus 1
 * and drops out of |X_j|^2; FFTW's unscaled inverse leaves a factor L,
 * removed at the end.  w_t is exp(i pi r / n) with r = t^2 mod 2n exact in
 * integers (stepped by odd numbers), formed as the product of a coarse and a
 * fine table (r = a B + b, B the power of 2 at or above sqrt(2n)), each
 * entry correctly rounded to within an ulp. */
/* The chirp's filter, the transform of b, kept for the ladder lengths last
 * used (n, q, L): a check repeated on series of one length then takes two
 * transforms instead of three.  An entry is never changed once kept, and
 * one evicted while in use is freed by its last user. */
#define KEEP_FILTERS 4

typedef struct {
    size_t n, q, L;
    fftw_complex *B;
    int users, current;
    unsigned long used;
} chirp_filter;

static chirp_filter *filters[KEEP_FILTERS];
static unsigned long filter_uses;

static void filter_free(chirp_filter *f)
{
    free(f->B);
    free(f);
}

/* The kept filter for (n, q, L), taken for the caller; NULL when none. */
static chirp_filter *filter_take(size_t n, size_t q, size_t L)
{
    chirp_filter *f = NULL;
#pragma omp critical(diag_chirp_filters)
    for (int i = 0; i < KEEP_FILTERS && !f; i++)
        if (filters[i] && filters[i]->n == n && filters[i]->q == q && filters[i]->L == L) {
            f = filters[i];
            f->users++;
            f->used = ++filter_uses;
        }
    return f;
}

static void filter_release(chirp_filter *f)
{
    if (!f)
        return;
#pragma omp critical(diag_chirp_filters)
    {
        f->users--;
        if (!f->current && f->users == 0)
            filter_free(f);
    }
}

/* Keep B, the filter for (n, q, L), in place of the least recently used;
 * the entry comes back taken for the caller and owns B from then on.
 * NULL when out of memory (B stays the caller's). */
static chirp_filter *filter_keep(size_t n, size_t q, size_t L, fftw_complex *B)
{
    chirp_filter *f = malloc(sizeof *f);
    if (!f)
        return NULL;
    *f = (chirp_filter){ n, q, L, B, 1, 1, 0 };
#pragma omp critical(diag_chirp_filters)
    {
        int slot = -1;
        for (int i = 0; i < KEEP_FILTERS; i++) {
            if (!filters[i]) {
                slot = i;
                break;
            }
            if (slot < 0 || filters[i]->used < filters[slot]->used)
                slot = i;
        }
        chirp_filter *old = filters[slot];
        if (old) {
            old->current = 0;
            if (old->users == 0)
                filter_free(old);
        }
        f->used = ++filter_uses;
        filters[slot] = f;
    }
    return f;
}

static int periodogram_chirp(const double *d, size_t n, size_t q, int ladder, double *I)
{
    size_t L = ladder ? ladder_length(n + q) : smooth_length(n + q);
    const size_t two_n = 2 * n;
    int shift = 0;                             /* B = 2^shift >= sqrt(2n) */
    while (((size_t)1 << shift) * ((size_t)1 << shift) < two_n)
        shift++;
    const size_t B = (size_t)1 << shift, A = (two_n >> shift) + 1;
    chirp_filter *kept_b = ladder ? filter_take(n, q, L) : NULL;
    fftw_complex *a = hn_alloc_long_aligned(64, L * sizeof *a);
    fftw_complex *b = kept_b ? NULL : hn_alloc_long_aligned(64, L * sizeof *b);
    double *tab = malloc(2 * (A + B) * sizeof *tab);
    diag_plan *fwd = NULL, *inv = NULL;
    int rc = HN_OK;
    if (!a || (!kept_b && !b) || !tab) {
        rc = HN_ENOMEM;
        goto done;
    }
    double *coarse = tab, *fine = tab + 2 * A;
    for (size_t k = 0; k < A; k++) {
        double th = M_PI * (double)(k * B) / (double)n;
        coarse[2 * k] = cos(th);
        coarse[2 * k + 1] = sin(th);
    }
    for (size_t k = 0; k < B; k++) {
        double th = M_PI * (double)k / (double)n;
        fine[2 * k] = cos(th);
        fine[2 * k + 1] = sin(th);
    }
    memset(a + n, 0, (L - n) * sizeof *a);
    if (b)
        memset(b + q + 1, 0, (L - n - q) * sizeof *b);
    /* r = t^2 mod 2n, stepped exactly: (t+1)^2 = t^2 + 2t + 1, both terms below 2n */
    for (size_t t = 0, r = 0; t < n; r += 2 * t + 1, r -= r >= two_n ? two_n : 0, t++) {
        size_t ka = r >> shift, kb = r & (B - 1);
        double ca = coarse[2 * ka], sa = coarse[2 * ka + 1], cb = fine[2 * kb], sb = fine[2 * kb + 1];
        double c = ca * cb - sa * sb, sn = sa * cb + ca * sb;     /* exp(i pi r / n) */
        a[t][0] = d[t] * c;
        a[t][1] = -d[t] * sn;
        if (!b)
            continue;
        if (t <= q) {
            b[t][0] = c;
            b[t][1] = sn;
        }
        if (t > 0) {
            b[L - t][0] = c;
            b[L - t][1] = sn;
        }
    }
    fwd = diag_plan_get(DIAG_PLAN_C2C_FWD, (int)L, a, a);
    inv = diag_plan_get(DIAG_PLAN_C2C_INV, (int)L, a, a);
    if (!fwd || !inv) {
        rc = HN_ENOMEM;
        goto done;
    }
    fftw_execute_dft(fwd->p, a, a);
    if (b) {
        fftw_execute_dft(fwd->p, b, b);
        if (ladder && (kept_b = filter_keep(n, q, L, b)) != NULL)
            b = NULL;                  /* the kept entry owns it now */
    }
    const fftw_complex *bt = kept_b ? kept_b->B : b;
    for (size_t k = 0; k < L; k++) {
        double re = a[k][0] * bt[k][0] - a[k][1] * bt[k][1];
        double im = a[k][0] * bt[k][1] + a[k][1] * bt[k][0];
        a[k][0] = re;
        a[k][1] = im;
    }
    fftw_execute_dft(inv->p, a, a);
    double s = 1.0 / ((double)L * (double)L);
    for (size_t j = 1; j <= q; j++) {
        I[j - 1] = (a[j][0] * a[j][0] + a[j][1] * a[j][1]) * s;
    }
done:
    diag_plan_release(fwd);
    diag_plan_release(inv);
    filter_release(kept_b);
    free(a);
    free(b);
    free(tab);
    return rc;
}

int diag_periodogram(const double *d, size_t n, size_t q, double *I, double *total)
{
    return diag_periodogram_by(diag_periodogram_route(n), d, n, q, I, total);
}

int diag_periodogram_by(int route, const double *d, size_t n, size_t q, double *I, double *total)
{
    if (route < 0 || route > 5 || ((route == 0 || route == 3) && n % 2 != 0))
        return HN_EINVAL;
    int rc = route == 0 || route == 3 ? periodogram_even(d, n, q, route == 3, I)
           : route == 1 || route == 4 ? periodogram_real(d, n, q, route == 4, I)
                                      : periodogram_chirp(d, n, q, route == 5, I);
    /* the ordinates are positive: a blocked sum with compensation between
     * blocks keeps the total to a few ulps, and is vector code (a sum
     * compensated term by term is one chain of dependent additions) */
    if (total)
        *total = rc == HN_OK ? diag_sum(I, q) : 0.0;
    return rc;
}
