/* diag_fftsplit.c - one decimation-in-time step over FFTW transforms, its pieces as OpenMP tasks. */
#include "diag_fftsplit.h"
#include "diag_dftdirect.h"
#include "diag_dftrader.h"
#include "diag_fftplan.h"
#include "hn_mem.h"
#include "hn_status.h"

#include <limits.h>
#include <math.h>
#include <omp.h>
#include <stdlib.h>
#include <string.h>

/* Samples gathered per task in step 1; tasks in step 3 (its columns are
 * dealt out in chunks of a multiple of 4, see below). */
#define GATHER_BLOCK 8192
#define RADIX_TASKS 8

size_t diag_smallest_factor(size_t n)
{
    for (size_t f = 2; f <= n / f; f++)
        if (n % f == 0)
            return f;
    return n;
}

size_t diag_split_radix(size_t len)
{
    static const size_t kernel[] = { 13, 11, 7, 5, 3, 2 };
    for (size_t i = 0; i < sizeof kernel / sizeof kernel[0]; i++)
        if (len % kernel[i] == 0 && len > kernel[i])
            return kernel[i];
    return diag_smallest_factor(len);
}

void diag_split_free(diag_split *out)
{
    if (!out)
        return;
    free(out->t);
    out->t = NULL;
}

/* exp(-2 pi i e / len) for 0 <= e < len as the product of a coarse and a
 * fine factor (e = hi B + lo, B the power of 2 at or above sqrt(len)), each
 * correctly rounded to within an ulp: a few ulps in all, for 2 sqrt(len)
 * sines and cosines instead of 2 len. */
typedef struct {
    double *coarse, *fine;
    int shift;
    size_t mask;
} turns;

static int turns_make(turns *w, size_t len)
{
    int shift = 0;
    while (((size_t)1 << shift) * ((size_t)1 << shift) < len)
        shift++;
    size_t B = (size_t)1 << shift, A = (len >> shift) + 1;
    double *tab = malloc(2 * (A + B) * sizeof *tab);
    if (!tab)
        return HN_ENOMEM;
    w->coarse = tab;
    w->fine = tab + 2 * A;
    w->shift = shift;
    w->mask = B - 1;
    for (size_t k = 0; k < A; k++) {
        double th = 2.0 * M_PI * (double)(k * B) / (double)len;
        w->coarse[2 * k] = cos(th);
        w->coarse[2 * k + 1] = -sin(th);
    }
    for (size_t k = 0; k < B; k++) {
        double th = 2.0 * M_PI * (double)k / (double)len;
        w->fine[2 * k] = cos(th);
        w->fine[2 * k + 1] = -sin(th);
    }
    return HN_OK;
}

/* Row a (A > 0): entry k1 of SRC times exp(-2 pi i a k1 / len) into DST
 * (the same array or another); a k1 < len, so the exponent is stepped
 * exactly without reduction. */
static void turn_row(fftw_complex *dst, const fftw_complex *src, size_t s, size_t a, const turns *w)
{
    dst[0][0] = src[0][0];
    dst[0][1] = src[0][1];
    for (size_t k1 = 1, e = a; k1 < s; k1++, e += a) {
        const double *c = w->coarse + 2 * (e >> w->shift), *f = w->fine + 2 * (e & w->mask);
        double wr = c[0] * f[0] - c[1] * f[1], wi = c[0] * f[1] + c[1] * f[0];
        double zr = src[k1][0], zi = src[k1][1];
        dst[k1][0] = zr * wr - zi * wi;
        dst[k1][1] = zr * wi + zi * wr;
    }
}

/* A column kernel: the direct sum for small primes, Rader's convolution
 * from RADER_FROM on where it takes the prime (both faster there than
 * FFTW's generic steps; diag_dftdirect.h, diag_dftrader.h), or, for the
 * second pass of a row (below), FFTW down all the columns of an array
 * when the length's prime factors are at most 13. */
#define RADER_FROM 61

typedef struct {
    int kind;                  /* 0 none, 1 direct, 2 Rader, 3 FFTW columns */
    diag_direct d;
    diag_rader q;
    diag_plan *f;
} colk;

/* M without prime factors above 7, or above 13 (TOP 4 or 6 of them). */
static int smooth(size_t m, int top)
{
    static const size_t f[] = { 2, 3, 5, 7, 11, 13 };
    for (int i = 0; i < top; i++)
        while (m % f[i] == 0)
            m /= f[i];
    return m == 1;
}

/* FFTW plans lengths with factors 11 or 13 slowly, and not in proportion to
 * them: 0.8 to 7 ms for those tried up to 3500 (down 37 columns), 24 ms for
 * 4004 and 72 for 20020; above this, the second pass takes only 7-smooth
 * lengths. */
#define SMOOTH13_MAX 3500

static int colk_kind(size_t p)
{
    if (p >= RADER_FROM && diag_rader_takes(p))
        return 2;
    return diag_direct_takes(p) ? 1 : 0;
}

/* The kernel for length P; WIDTH > 0 asks for FFTW down WIDTH columns at a
 * pitch of WIDTH where P has no kernel of its own. */
static int colk_make(colk *k, size_t p, size_t width)
{
    memset(k, 0, sizeof *k);
    k->kind = colk_kind(p);
    if (k->kind == 1)
        return diag_direct_make(&k->d, p);
    if (k->kind == 2)
        return diag_rader_make(&k->q, p);
    if (width == 0)
        return HN_OK;
    fftw_complex *a = hn_alloc_long_aligned(64, p * width * sizeof *a);
    k->f = a ? diag_plan_cols((int)p, (int)width, a) : NULL;
    free(a);
    if (!k->f)
        return HN_ENOMEM;
    k->kind = 3;
    return HN_OK;
}

static void colk_free(colk *k)
{
    if (k->kind == 1)
        diag_direct_free(&k->d);
    else if (k->kind == 2)
        diag_rader_free(&k->q);
    else if (k->kind == 3)
        diag_plan_release(k->f);
    k->kind = 0;
}

/* Entries of work space a kernel needs (aligned to 64 bytes). */
static size_t colk_work(const colk *k)
{
    return k->kind == 2 ? (diag_rader_work(&k->q) + 3) & ~(size_t)3 : 0;
}

/* Columns [C0, C1) of T at PITCH (a kind 3 kernel: all of them, at the
 * pitch it was made for), with colk_work(K) entries at WORK. */
static int colk_run(const colk *k, fftw_complex *t, size_t pitch, size_t c0, size_t c1,
                    fftw_complex *work)
{
    if (k->kind == 1) {
        diag_direct_cols(&k->d, t, pitch, c0, c1);
        return HN_OK;
    }
    if (k->kind == 3) {
        fftw_execute_dft(k->f->p, t, t);
        return HN_OK;
    }
    return diag_rader_cols_with(&k->q, t, pitch, c0, c1, work);
}

/* Rows of length s = p m are transformed in two passes (below) instead of by
 * FFTW when p, the largest prime factor of s, is above 13 and has a kernel of
 * its own, and m is a prime with one too or has no prime factor above 7
 * (above 13 up to SMOOTH13_MAX; FFTW then takes the second pass): P and M
 * are set, and 1 returned. */
static int two_pass(size_t s, size_t *p, size_t *m)
{
    size_t f = s, big = 1;
    for (size_t d = 2; d <= f / d; d++)
        while (f % d == 0) {
            big = d;
            f /= d;
        }
    if (f > 1)
        big = f;
    if (big <= 13 || big == s || !colk_kind(big))
        return 0;
    size_t rest = s / big;
    if (!(diag_smallest_factor(rest) == rest && colk_kind(rest)) && !smooth(rest, 4) &&
        !(rest <= SMOOTH13_MAX && smooth(rest, 6)))
        return 0;
    *p = big;
    *m = rest;
    return 1;
}

/* Two real rows of S points as one complex row Z, X0 + i X1 (X1 NULL: a
 * row alone, imaginary parts zero). */
static void pack_rows(const double *x0, const double *x1, size_t s, fftw_complex *z)
{
    for (size_t k = 0; k < s; k++) {
        z[k][0] = x0[k];
        z[k][1] = x1 ? x1[k] : 0.0;
    }
}

/* The transforms of the two real rows packed into Z (odd length s), from
 * Z's: X0_k = (Z_k + conj Z_{s-k}) / 2 into Z, X1_k = (Z_k - conj Z_{s-k}) /
 * 2i into Z1. */
static void unpack_rows(fftw_complex *z, fftw_complex *z1, size_t s)
{
    z1[0][0] = z[0][1];
    z1[0][1] = 0.0;
    z[0][1] = 0.0;
    for (size_t k = 1, j = s - 1; k < j; k++, j--) {
        double ar = z[k][0], ai = z[k][1], br = z[j][0], bi = -z[j][1];
        z[k][0] = 0.5 * (ar + br);
        z[k][1] = 0.5 * (ai + bi);
        z1[k][0] = 0.5 * (ai - bi);
        z1[k][1] = -0.5 * (ar - br);
        /* at s - k: Z_{s-k} and conj Z_k */
        double cr = br, ci = -bi, dr = ar, di = -ai;
        z[j][0] = 0.5 * (cr + dr);
        z[j][1] = 0.5 * (ci + di);
        z1[j][0] = 0.5 * (ci - di);
        z1[j][1] = -0.5 * (cr - dr);
    }
}

/* exp(-2 pi i a k1 / s) at TW[k1 m + a] for the rows' two passes. */
static int row_turns(size_t p, size_t m, fftw_complex **tw)
{
    const size_t s = p * m;
    turns ws;
    *tw = hn_alloc_long_aligned(64, s * sizeof **tw);
    if (!*tw || turns_make(&ws, s) != HN_OK) {
        free(*tw);
        *tw = NULL;
        return HN_ENOMEM;
    }
    for (size_t k1 = 0; k1 < p; k1++)
        for (size_t a = 0, e = 0; a < m; a++, e += k1) {
            const double *c = ws.coarse + 2 * (e >> ws.shift), *f = ws.fine + 2 * (e & ws.mask);
            (*tw)[k1 * m + a][0] = c[0] * f[0] - c[1] * f[1];
            (*tw)[k1 * m + a][1] = c[0] * f[1] + c[1] * f[0];
        }
    free(ws.coarse);
    return HN_OK;
}

/* Row A of length s = p m (at Z) in two passes (decimation in time, x_{m u
 * + a} at row u, column a): p-point transforms down the m columns in place;
 * entry (k1, a) turned by TW into SC at (a, k1); m-point transforms down
 * the p columns of SC, leaving X_{k1 + p k2} at (k2, k1), the natural
 * order, copied back with the split's own turn (W) for rows A > 0. */
static int row_two_pass(fftw_complex *z, size_t p, size_t m, const colk *kp, const colk *km,
                        const fftw_complex *tw, fftw_complex *sc, fftw_complex *work, size_t a,
                        const turns *w)
{
    int rc = colk_run(kp, z, m, 0, m, work);
    if (rc != HN_OK)
        return rc;
    for (size_t k1 = 0; k1 < p; k1++) {
        const fftw_complex *y = z + k1 * m, *v = tw + k1 * m;
        for (size_t u = 0; u < m; u++) {
            double zr = y[u][0], zi = y[u][1], wr = v[u][0], wi = v[u][1];
            sc[u * p + k1][0] = zr * wr - zi * wi;
            sc[u * p + k1][1] = zr * wi + zi * wr;
        }
    }
    if ((rc = colk_run(km, sc, p, 0, p, work)) != HN_OK)
        return rc;
    if (a > 0)
        turn_row(z, sc, p * m, a, w);
    else
        memcpy(z, sc, p * m * sizeof *z);
    return HN_OK;
}

int diag_split_dft(const double *x, int packed, size_t len, diag_split *out)
{
    memset(out, 0, sizeof *out);
    if (!x || len < 4 || len > INT_MAX)
        return HN_EINVAL;
    size_t r = diag_split_radix(len);
    if (r == len)
        return HN_EINVAL;
    size_t s = len / r;
    /* Rows start on 64-byte boundaries, so that each sits at the alignment
     * of the arrays its plan was made for (FFTW's new-array rule). */
    size_t pitch = (s + 3) & ~(size_t)3, rpitch = (s + 7) & ~(size_t)7;
    fftw_complex *t = hn_alloc_long_aligned(64, r * pitch * sizeof *t);
    double *re = packed ? NULL : hn_alloc_long_aligned(64, r * rpitch * sizeof *re);
    turns w = { NULL, NULL, 0, 0 };
    fftw_complex *tw = NULL, *ws = NULL;
    diag_plan *row = NULL;
    fftw_plan many = NULL, last = NULL;
    colk kc, kp, km;
    memset(&kp, 0, sizeof kp);
    memset(&km, 0, sizeof km);
    int cols = colk_make(&kc, r, 0) == HN_OK ? kc.kind : -1;
    size_t p2 = 0, m2 = 0;
    /* real rows go two to a complex row (s is odd for them) */
    int two = two_pass(s, &p2, &m2) && (packed || s % 2 == 1);
    /* step 3: transforms across a, in chunks of C (a multiple of 4, so that
     * each chunk's first column is aligned like the first) */
    size_t C = ((s + RADIX_TASKS - 1) / RADIX_TASKS + 3) & ~(size_t)3;
    size_t chunks = (s + C - 1) / C, tail = s - (chunks - 1) * C;
    int rc = HN_OK, failed = 0;
    if (!t || (!packed && !re) || turns_make(&w, len) != HN_OK || cols < 0 ||
        (two && (colk_make(&kp, p2, 0) != HN_OK || (m2 != p2 && colk_make(&km, m2, p2) != HN_OK) ||
                 row_turns(p2, m2, &tw) != HN_OK))) {
        rc = HN_ENOMEM;
        goto done;
    }
    if (!two)
        row = packed ? diag_plan_get(DIAG_PLAN_C2C_FWD, (int)s, t, t)
                     : diag_plan_get(DIAG_PLAN_R2C, (int)s, re, t);
    /* work space for each thread of the team the tasks run on: a row's
     * second array and the kernels' (a task has no scheduling point inside,
     * so no thread runs two of them at once) */
    size_t kw = colk_work(&kc);
    if (two) {
        size_t k2 = colk_work(&kp) > colk_work(&km) ? colk_work(&kp) : colk_work(&km);
        kw = kw > k2 ? kw : k2;
    }
    size_t arena = (two ? (s + 3) & ~(size_t)3 : 0) + kw;
    int nthr = omp_in_parallel() ? omp_get_num_threads() : 1;
    if (arena && !(ws = hn_alloc_long_aligned(64, (size_t)nthr * arena * sizeof *ws))) {
        rc = HN_ENOMEM;
        goto done;
    }
    if (!cols && chunks > 1)
        many = diag_plan_many((int)r, (int)C, t, (int)pitch, 1);
    if (!cols)
        last = diag_plan_many((int)r, (int)tail, t, (int)pitch, 1);
    if ((!two && !row) || (!cols && ((chunks > 1 && !many) || !last))) {
        rc = HN_ENOMEM;
        goto done;
    }

    /* 1. x_{a + r u} into row a at u: x is read in order, r rows written. */
#pragma omp taskgroup
    for (size_t u0 = 0; u0 < s; u0 += GATHER_BLOCK) {
#pragma omp task firstprivate(u0) shared(x, t, re)
        {
            size_t u1 = u0 + GATHER_BLOCK < s ? u0 + GATHER_BLOCK : s;
            if (packed) {
                for (size_t u = u0; u < u1; u++)
                    for (size_t a = 0; a < r; a++) {
                        t[a * pitch + u][0] = x[2 * (a + r * u)];
                        t[a * pitch + u][1] = x[2 * (a + r * u) + 1];
                    }
            } else {
                for (size_t u = u0; u < u1; u++)
                    for (size_t a = 0; a < r; a++)
                        re[a * rpitch + u] = x[a + r * u];
            }
        }
    }

    /* 2. Each row's transform (a real row's upper half from the lower by
     * symmetry), then its turn; in two passes, real rows by pairs. */
    const size_t step = two && !packed ? 2 : 1;
#pragma omp taskgroup
    for (size_t a = 0; a < r; a += step) {
#pragma omp task firstprivate(a) shared(t, re, row, w, tw, kp, km, ws, failed)
        {
            fftw_complex *z = t + a * pitch;
            int ok = 1;
            if (two) {
                const colk *k2 = m2 == p2 ? &kp : &km;
                fftw_complex *sc = ws + (size_t)omp_get_thread_num() * arena;
                if (!packed)
                    pack_rows(re + a * rpitch, a + 1 < r ? re + (a + 1) * rpitch : NULL, s, z);
                ok = row_two_pass(z, p2, m2, &kp, k2, tw, sc, sc + (arena - kw),
                                  packed ? a : 0, &w) == HN_OK;
                if (ok && !packed) {
                    fftw_complex *z1 = a + 1 < r ? t + (a + 1) * pitch : NULL;
                    if (z1) {
                        unpack_rows(z, z1, s);
                        turn_row(z1, z1, s, a + 1, &w);
                    }
                    if (a > 0)
                        turn_row(z, z, s, a, &w);
                }
            } else if (packed) {
                fftw_execute_dft(row->p, z, z);
            } else {
                fftw_execute_dft_r2c(row->p, re + a * rpitch, z);
                for (size_t k1 = s / 2 + 1; k1 < s; k1++) {
                    z[k1][0] = z[s - k1][0];
                    z[k1][1] = -z[s - k1][1];
                }
            }
            if (!ok) {
#pragma omp atomic write
                failed = 1;
            } else if (a > 0 && !two) {
                turn_row(z, z, s, a, &w);
            }
        }
    }

    /* 3. Length-r transforms down the columns, in place: column k1's
     * entries a become X_{k1 + s a}. */
    if (!failed) {
#pragma omp taskgroup
        for (size_t c = 0; c < chunks; c++) {
#pragma omp task firstprivate(c) shared(t, many, last, kc, ws, failed)
            {
                size_t c1 = c + 1 < chunks ? (c + 1) * C : s;
                fftw_complex *work = ws ? ws + (size_t)omp_get_thread_num() * arena + (arena - kw) : NULL;
                if (!cols)
                    fftw_execute_dft(c + 1 < chunks ? many : last, t + c * C, t + c * C);
                else if (colk_run(&kc, t, pitch, c * C, c1, work) != HN_OK) {
#pragma omp atomic write
                    failed = 1;
                }
            }
        }
    }
    if (failed) {
        rc = HN_ENOMEM;
        goto done;
    }

    out->t = t;
    out->r = r;
    out->s = s;
    out->pitch = pitch;
    t = NULL;
done:
    diag_plan_release(row);
    diag_plan_destroy(many);
    diag_plan_destroy(last);
    free(t);
    free(re);
    free(w.coarse);
    free(tw);
    free(ws);
    if (cols >= 0)
        colk_free(&kc);
    colk_free(&kp);
    colk_free(&km);
    return rc;
}
