/* diag_stats.c - accurate mean and sd, ACF by direct sums or FFT, PACF by Durbin-Levinson. */
#include "diag_stats.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_fft_real.h>
#include <gsl/gsl_fft_halfcomplex.h>

/* Neumaier's compensated sum: the running sum S and the lost low-order part C. */
typedef struct { double s, c; } ksum;

static void ksum_add(ksum *k, double v)
{
    double t = k->s + v;
    if (fabs(k->s) >= fabs(v))
        k->c += (k->s - t) + v;
    else
        k->c += (v - t) + k->s;
    k->s = t;
}

static double ksum_value(const ksum *k)
{
    return k->s + k->c;
}

/* Mean of X as a rounded part M0 plus a small correction C: m0 + c is the
 * mean to about twice double precision.  The deviations x_i - m0 are exact
 * when x_i and m0 lie within a factor of two of each other (Sterbenz), the
 * usual case for data whose spread is small against their level. */
static int mean_parts(const double *x, size_t n, double *m0, double *c)
{
    ksum s = { 0.0, 0.0 };
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(x[i]))
            return HN_ENUMERIC;
        ksum_add(&s, x[i]);
    }
    double m = ksum_value(&s) / (double)n;
    ksum r = { 0.0, 0.0 };
    for (size_t i = 0; i < n; i++)
        ksum_add(&r, x[i] - m);
    *m0 = m;
    *c = ksum_value(&r) / (double)n;
    if (!isfinite(*m0) || !isfinite(*c))
        return HN_ENUMERIC;
    return HN_OK;
}

int diag_center(const double *x, size_t n, double *d)
{
    double m0, c;
    if (n < 1)
        return HN_ESHORT;
    int rc = mean_parts(x, n, &m0, &c);
    if (rc != HN_OK)
        return rc;
    for (size_t i = 0; i < n; i++)
        d[i] = (x[i] - m0) - c;
    return HN_OK;
}

/* Power of two by which X may be divided so that sums of its values and of
 * their squares cannot overflow: 1 for ordinary data, 2^-k (exact) when the
 * largest |x_i| is above 2^500. */
static double safe_scale(const double *x, size_t n)
{
    double mx = 0.0;
    for (size_t i = 0; i < n; i++)
        if (fabs(x[i]) > mx)
            mx = fabs(x[i]);
    if (!(mx > 0x1p500))
        return 1.0;
    int e;
    frexp(mx, &e);
    return ldexp(1.0, -e);
}

int diag_mean_sd(const double *x, size_t n, double *mean, double *sd)
{
    double m0, c;
    if (n < 1 || (sd && n < 2))
        return HN_ESHORT;
    for (size_t i = 0; i < n; i++)
        if (!isfinite(x[i]))
            return HN_ENUMERIC;
    double k = safe_scale(x, n);
    if (k != 1.0) {
        /* Values near the top of the double range: work on x * k (an exact
         * power-of-two scaling) and scale the results back. */
        double *xs = malloc(n * sizeof *xs);
        if (!xs)
            return HN_ENOMEM;
        for (size_t i = 0; i < n; i++)
            xs[i] = x[i] * k;
        double ms = 0.0, ss = 0.0;
        int rc = diag_mean_sd(xs, n, mean ? &ms : NULL, sd ? &ss : NULL);
        free(xs);
        if (rc != HN_OK)
            return rc;
        if (mean)
            *mean = ms / k;
        if (sd) {
            *sd = ss / k;
            if (!isfinite(*sd))
                return HN_ENUMERIC;
        }
        return HN_OK;
    }
    int rc = mean_parts(x, n, &m0, &c);
    if (rc != HN_OK)
        return rc;
    if (mean)
        *mean = m0 + c;
    if (sd) {
        ksum ss = { 0.0, 0.0 };
        for (size_t i = 0; i < n; i++) {
            double d = (x[i] - m0) - c;
            ksum_add(&ss, d * d);
        }
        double v = ksum_value(&ss) / (double)(n - 1);
        if (!isfinite(v))
            return HN_ENUMERIC;
        *sd = sqrt(v);
    }
    return HN_OK;
}

/* Shared argument checks and centring: a malloc'd array of deviations and
 * their compensated sum of squares. */
static int acf_prepare(const double *x, size_t n, int maxlag, double **dev, double *ss0)
{
    *dev = NULL;
    if (n < 2)
        return HN_ESHORT;
    if (maxlag < 1 || (size_t)maxlag > n - 1)
        return HN_EINVAL;
    double *d = malloc(n * sizeof *d);
    if (!d)
        return HN_ENOMEM;
    int rc = diag_center(x, n, d);
    if (rc != HN_OK) {
        free(d);
        return rc;
    }
    ksum s = { 0.0, 0.0 };
    for (size_t i = 0; i < n; i++)
        ksum_add(&s, d[i] * d[i]);
    double v = ksum_value(&s);
    if (!isfinite(v)) {
        free(d);
        return HN_ENUMERIC;
    }
    if (v <= 0.0) {
        free(d);
        return HN_ECONST;
    }
    *dev = d;
    *ss0 = v;
    return HN_OK;
}

/* sum_{t=k}^{n-1} d_t d_{t-k}: plain sums over blocks of 64 terms (four
 * interleaved partial sums of 16 terms each), and the block sums added with
 * compensation (Neumaier).  The error is that of summing 16 terms plus a
 * compensated sum of the blocks, far below the digits the ACF is quoted to,
 * at under half the cost of compensating every term. */
static double lag_product_sum(const double *d, size_t n, size_t k)
{
    ksum tot = { 0.0, 0.0 };
    size_t t = k;
    for (; t + 64 <= n; t += 64) {
        double a = 0.0, b = 0.0, c = 0.0, e = 0.0;
        const double *p = d + t, *q = d + t - k;
        for (size_t i = 0; i < 64; i += 4) {
            a += p[i] * q[i];
            b += p[i + 1] * q[i + 1];
            c += p[i + 2] * q[i + 2];
            e += p[i + 3] * q[i + 3];
        }
        ksum_add(&tot, (a + b) + (c + e));
    }
    for (; t < n; t++)
        ksum_add(&tot, d[t] * d[t - k]);
    return ksum_value(&tot);
}

int diag_acf_direct(const double *x, size_t n, int maxlag, double *acf)
{
    double *d, ss0;
    int rc = acf_prepare(x, n, maxlag, &d, &ss0);
    if (rc != HN_OK)
        return rc;
    for (int k = 1; k <= maxlag; k++)
        acf[k - 1] = lag_product_sum(d, n, (size_t)k) / ss0;
    free(d);
    return HN_OK;
}

/* Smallest power of two >= 2n. */
static size_t fft_length(size_t n)
{
    size_t N = 1;
    while (N < 2 * n)
        N <<= 1;
    return N;
}

int diag_acf_fft(const double *x, size_t n, int maxlag, double *acf)
{
    double *d, ss0;
    int rc = acf_prepare(x, n, maxlag, &d, &ss0);
    if (rc != HN_OK)
        return rc;
    size_t N = fft_length(n);
    double *w = calloc(N, sizeof *w);
    if (!w) {
        free(d);
        return HN_ENOMEM;
    }
    memcpy(w, d, n * sizeof *w);
    free(d);
    if (gsl_fft_real_radix2_transform(w, 1, N) != 0) {
        free(w);
        return HN_ENUMERIC;
    }
    /* Half-complex radix-2 layout: w[0] = Re X_0, w[i] = Re X_i and
     * w[N-i] = Im X_i for 0 < i < N/2, w[N/2] = Re X_{N/2}.  Replace the
     * spectrum by |X_i|^2 (real, so every imaginary part becomes 0). */
    w[0] = w[0] * w[0];
    w[N / 2] = w[N / 2] * w[N / 2];
    for (size_t i = 1; i < N / 2; i++) {
        double re = w[i], im = w[N - i];
        w[i] = re * re + im * im;
        w[N - i] = 0.0;
    }
    if (gsl_fft_halfcomplex_radix2_inverse(w, 1, N) != 0) {
        free(w);
        return HN_ENUMERIC;
    }
    /* w[k] = sum_t d_t d_{t+k}: no wrap-around since N >= 2n. */
    for (int k = 1; k <= maxlag; k++)
        acf[k - 1] = w[k] / ss0;
    free(w);
    for (int k = 0; k < maxlag; k++)
        if (!isfinite(acf[k]))
            return HN_ENUMERIC;
    return HN_OK;
}

int diag_acf_is_direct(size_t n, int maxlag)
{
    double lg = log2((double)fft_length(n));
    return (double)maxlag + 1.0 <= 3.0 * lg;
}

int diag_acf(const double *x, size_t n, int maxlag, double *acf)
{
    if (n < 2)
        return HN_ESHORT;
    if (diag_acf_is_direct(n, maxlag))
        return diag_acf_direct(x, n, maxlag, acf);
    return diag_acf_fft(x, n, maxlag, acf);
}

int diag_pacf(const double *acf, int maxlag, double *pacf)
{
    if (maxlag < 1)
        return HN_EINVAL;
    double *phi = malloc(2 * (size_t)maxlag * sizeof *phi);
    if (!phi)
        return HN_ENOMEM;
    double *prev = phi + maxlag;
    /* v = prediction-error variance ratio after order k-1 (starts at 1). */
    double v = 1.0;
    int rc = HN_OK;
    for (int k = 1; k <= maxlag; k++) {
        double num = acf[k - 1];
        for (int j = 1; j < k; j++)
            num -= prev[j - 1] * acf[k - j - 1];
        double a = num / v;
        if (!(v > 0.0) || !isfinite(a) || fabs(a) >= 1.0) {
            rc = HN_ENUMERIC;
            for (int j = k; j <= maxlag; j++)
                pacf[j - 1] = NAN;
            break;
        }
        phi[k - 1] = a;
        for (int j = 1; j < k; j++)
            phi[j - 1] = prev[j - 1] - a * prev[k - j - 1];
        memcpy(prev, phi, (size_t)k * sizeof *phi);
        v *= 1.0 - a * a;
        pacf[k - 1] = a;
    }
    free(phi);
    return rc;
}

double diag_predictable_share(const double *pacf, int order, size_t n_obs)
{
    if (order < 1)
        return NAN;
    double keep = 1.0;
    for (int k = 0; k < order; k++) {
        if (!isfinite(pacf[k]))
            return NAN;
        keep *= 1.0 - pacf[k] * pacf[k];
    }
    if (n_obs > (size_t)order + 1) {
        double adj = 1.0 - keep * (double)(n_obs - 1) / (double)(n_obs - (size_t)order - 1);
        return adj > 0.0 ? adj : 0.0;
    }
    return 1.0 - keep;
}

int diag_share_order(size_t n)
{
    if (n < 3)
        return 0;
    size_t k = n / 10;
    if (k > DIAG_SHARE_MAX)
        k = DIAG_SHARE_MAX;
    if (k < 1)
        k = 1;
    if (k > n - 2)
        k = n - 2;
    return (int)k;
}

/* The K-th smallest (0-based) of A[0..n-1], by Wirth's selection with a
 * median-of-three pivot; A is reordered so that A[i] <= A[K] <= A[j] for
 * i < K < j.  The value is that of a full sort, found in O(n) on average. */
static double select_kth(double *a, size_t n, size_t k)
{
    long l = 0, m = (long)n - 1, kk = (long)k;
    while (l < m) {
        double u = a[l], v = a[l + (m - l) / 2], w = a[m];
        double x = u < v ? (v < w ? v : (u < w ? w : u)) : (u < w ? u : (v < w ? w : v));
        long i = l, j = m;
        do {
            while (a[i] < x)
                i++;
            while (x < a[j])
                j--;
            if (i <= j) {
                double t = a[i];
                a[i] = a[j];
                a[j] = t;
                i++;
                j--;
            }
        } while (i <= j);
        if (j < kk)
            l = i;
        if (kk < i)
            m = j;
    }
    return a[kk];
}

/* Median of A[0..n-1] (n > 0); A is reordered. */
double diag_median_inplace(double *a, size_t n)
{
    size_t h = n / 2;
    if (n % 2)
        return select_kth(a, n, h);
    double lo = select_kth(a, n, h - 1), hi = a[h];
    for (size_t i = h + 1; i < n; i++)
        if (a[i] < hi)
            hi = a[i];
    return 0.5 * (lo + hi);
}
