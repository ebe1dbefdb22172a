/* diag_fftsplit.c - one decimation-in-time step over FFTW transforms, its pieces as OpenMP tasks. */
#include "diag_fftsplit.h"
#include "diag_dftdirect.h"
#include "diag_fftplan.h"
#include "hn_mem.h"
#include "hn_status.h"

#include <limits.h>
#include <math.h>
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

/* Row a (A > 0): entry k1 times exp(-2 pi i a k1 / len); a k1 < len, so
 * the exponent is stepped exactly without reduction. */
static void turn_row(fftw_complex *row, size_t s, size_t a, const turns *w)
{
    for (size_t k1 = 1, e = a; k1 < s; k1++, e += a) {
        const double *c = w->coarse + 2 * (e >> w->shift), *f = w->fine + 2 * (e & w->mask);
        double wr = c[0] * f[0] - c[1] * f[1], wi = c[0] * f[1] + c[1] * f[0];
        double zr = row[k1][0], zi = row[k1][1];
        row[k1][0] = zr * wr - zi * wi;
        row[k1][1] = zr * wi + zi * wr;
    }
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
    diag_plan *row = NULL;
    fftw_plan many = NULL, last = NULL;
    diag_direct dd = { 0, 0, NULL, NULL };
    int direct = diag_direct_takes(r);
    /* step 3: transforms across a, in chunks of C (a multiple of 4, so that
     * each chunk's first column is aligned like the first) */
    size_t C = ((s + RADIX_TASKS - 1) / RADIX_TASKS + 3) & ~(size_t)3;
    size_t chunks = (s + C - 1) / C, tail = s - (chunks - 1) * C;
    int rc = HN_OK;
    if (!t || (!packed && !re) || turns_make(&w, len) != HN_OK ||
        (direct && diag_direct_make(&dd, r) != HN_OK)) {
        rc = HN_ENOMEM;
        goto done;
    }
    row = packed ? diag_plan_get(DIAG_PLAN_C2C_FWD, (int)s, t, t)
                 : diag_plan_get(DIAG_PLAN_R2C, (int)s, re, t);
    if (!direct && chunks > 1)
        many = diag_plan_many((int)r, (int)C, t, (int)pitch, 1);
    if (!direct)
        last = diag_plan_many((int)r, (int)tail, t, (int)pitch, 1);
    if (!row || (!direct && ((chunks > 1 && !many) || !last))) {
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
     * symmetry), then its turn. */
#pragma omp taskgroup
    for (size_t a = 0; a < r; a++) {
#pragma omp task firstprivate(a) shared(t, re, row, w)
        {
            fftw_complex *z = t + a * pitch;
            if (packed) {
                fftw_execute_dft(row->p, z, z);
            } else {
                fftw_execute_dft_r2c(row->p, re + a * rpitch, z);
                for (size_t k1 = s / 2 + 1; k1 < s; k1++) {
                    z[k1][0] = z[s - k1][0];
                    z[k1][1] = -z[s - k1][1];
                }
            }
            if (a > 0)
                turn_row(z, s, a, &w);
        }
    }

    /* 3. Length-r transforms down the columns, in place: column k1's
     * entries a become X_{k1 + s a}. */
#pragma omp taskgroup
    for (size_t c = 0; c < chunks; c++) {
#pragma omp task firstprivate(c) shared(t, many, last, dd)
        {
            if (direct)
                diag_direct_cols(&dd, t, pitch, c * C, c + 1 < chunks ? (c + 1) * C : s);
            else
                fftw_execute_dft(c + 1 < chunks ? many : last, t + c * C, t + c * C);
        }
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
    diag_direct_free(&dd);
    return rc;
}
