/* diag_dftrader.c - Rader's convolution for prime lengths, a block of columns at a time. */
#include "diag_dftrader.h"
#include "diag_fftplan.h"
#include "hn_mem.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define RB DIAG_RADER_BLOCK

static size_t pow_mod(size_t b, size_t e, size_t m)
{
    size_t r = 1;
    b %= m;
    for (; e; e >>= 1) {
        if (e & 1)
            r = r * b % m;
        b = b * b % m;
    }
    return r;
}

static int is_prime(size_t p)
{
    if (p < 2)
        return 0;
    for (size_t f = 2; f <= p / f; f++)
        if (p % f == 0)
            return 0;
    return 1;
}

/* The smallest g whose powers run through 1..p-1: g^((p-1)/f) != 1 for
 * each prime f dividing p - 1. */
static size_t generator(size_t p)
{
    for (size_t g = 2; g < p; g++) {
        size_t m = p - 1;
        int ok = 1;
        for (size_t f = 2; f <= m && ok; f++) {
            if (m % f)
                continue;
            if (pow_mod(g, (p - 1) / f, p) == 1)
                ok = 0;
            while (m % f == 0)
                m /= f;
        }
        if (ok)
            return g;
    }
    return 0;
}

int diag_rader_takes(size_t p)
{
    if (p < DIAG_RADER_MIN || p > DIAG_RADER_MAX || !is_prime(p))
        return 0;
    size_t m = p - 1;
    static const size_t f[] = { 2, 3, 5, 7 };
    for (int i = 0; i < 4; i++)
        while (m % f[i] == 0)
            m /= f[i];
    return m == 1;
}

void diag_rader_free(diag_rader *r)
{
    if (!r)
        return;
    diag_plan_destroy(r->plan);
    free(r->up);
    free(r->b);
    r->plan = NULL;
    r->up = r->down = NULL;
    r->b = NULL;
}

int diag_rader_make(diag_rader *r, size_t p)
{
    memset(r, 0, sizeof *r);
    if (!diag_rader_takes(p))
        return HN_EINVAL;
    size_t n = p - 1, g = generator(p), gi = pow_mod(g, p - 2, p);
    r->p = p;
    r->n = n;
    r->up = malloc(2 * n * sizeof *r->up);
    r->b = hn_alloc_long_aligned(64, n * sizeof *r->b);
    fftw_complex *buf = hn_alloc_long_aligned(64, n * RB * sizeof *buf);
    fftw_plan one = NULL;
    int rc = HN_ENOMEM;
    if (!r->up || !r->b || !buf)
        goto done;
    r->down = r->up + n;
    for (size_t q = 0, u = 1, d = 1; q < n; q++, u = u * g % p, d = d * gi % p) {
        r->up[q] = u;
        r->down[q] = d;
    }
    for (size_t k = 0; k < n; k++) {
        double th = 2.0 * M_PI * (double)r->down[k] / (double)p;
        r->b[k][0] = cos(th);
        r->b[k][1] = -sin(th);
    }
    one = diag_plan_many((int)n, 1, r->b, 1, (int)n);
    r->plan = diag_plan_many((int)n, RB, buf, 1, (int)n);
    if (!one || !r->plan)
        goto done;
    fftw_execute_dft(one, r->b, r->b);
    /* the inverse transform's 1 / n, once */
    for (size_t k = 0; k < n; k++) {
        r->b[k][0] /= (double)n;
        r->b[k][1] /= (double)n;
    }
    rc = HN_OK;
done:
    diag_plan_destroy(one);
    free(buf);
    if (rc != HN_OK)
        diag_rader_free(r);
    return rc;
}

/* Columns [c, c + w) of T, w <= RB, through BUF: column j's sequence at
 * BUF + j n (FFTW's plan runs on contiguous transforms without copying). */
static void block(const diag_rader *r, fftw_complex *t, size_t pitch, size_t c, size_t w,
                  fftw_complex *buf, fftw_complex *x0)
{
    const size_t n = r->n;
    for (size_t q = 0; q < n; q++) {
        const fftw_complex *src = t + r->up[q] * pitch + c;
        for (size_t j = 0; j < w; j++) {
            buf[j * n + q][0] = src[j][0];
            buf[j * n + q][1] = src[j][1];
        }
    }
    if (w < RB)
        memset(buf + w * n, 0, (RB - w) * n * sizeof *buf);
    memcpy(x0, t + c, w * sizeof *x0);
    fftw_execute_dft(r->plan, buf, buf);
    /* X_0 = x_0 + A_0, into row 0 last (the others read x_0) */
    fftw_complex first[RB];
    for (size_t j = 0; j < w; j++) {
        first[j][0] = x0[j][0] + buf[j * n][0];
        first[j][1] = x0[j][1] + buf[j * n][1];
    }
    /* the inverse transform as a forward one of the conjugates:
     * conj(A_q B_q), whose transform is conj(n c_m) */
    const double *bq = (const double *)r->b;
    for (size_t j = 0; j < w; j++) {
        double *z = (double *)(buf + j * n);
        for (size_t q = 0; q < 2 * n; q += 2) {
            double ar = z[q], ai = z[q + 1], br = bq[q], bi = bq[q + 1];
            z[q] = ar * br - ai * bi;
            z[q + 1] = -(ar * bi + ai * br);
        }
    }
    fftw_execute_dft(r->plan, buf, buf);
    for (size_t m = 0; m < n; m++) {
        fftw_complex *out = t + r->down[m] * pitch + c;
        for (size_t j = 0; j < w; j++) {
            out[j][0] = x0[j][0] + buf[j * n + m][0];
            out[j][1] = x0[j][1] - buf[j * n + m][1];
        }
    }
    memcpy(t + c, first, w * sizeof *first);
}

size_t diag_rader_work(const diag_rader *r)
{
    return r->n * RB;
}

int diag_rader_cols_with(const diag_rader *r, fftw_complex *t, size_t pitch, size_t c0, size_t c1,
                         fftw_complex *work)
{
    fftw_complex x0[RB];
    for (size_t c = c0; c < c1; c += RB)
        block(r, t, pitch, c, c1 - c < RB ? c1 - c : RB, work, x0);
    return HN_OK;
}

int diag_rader_cols(const diag_rader *r, fftw_complex *t, size_t pitch, size_t c0, size_t c1)
{
    if (c1 <= c0)
        return HN_OK;
    fftw_complex *buf = hn_alloc_long_aligned(64, diag_rader_work(r) * sizeof *buf);
    if (!buf)
        return HN_ENOMEM;
    diag_rader_cols_with(r, t, pitch, c0, c1, buf);
    free(buf);
    return HN_OK;
}
