/* diag_stats.c - accurate mean and sd, ACF by direct sums or FFT, PACF by Durbin-Levinson. */
#include "diag_stats.h"
#include "diag_sum.h"
#include "hn_status.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_fft_real.h>
#include <gsl/gsl_fft_halfcomplex.h>

/* Mean of X (SQUARE = 0) or of its squares (1) as a rounded part M0 plus a
 * small correction C: m0 + c is the
 * mean to about twice double precision (the correction is the mean of the
 * deviations from m0, a blocked compensated sum, diag_sum.h).  The
 * deviations x_i - m0 are exact when x_i and m0 lie within a factor of two
 * of each other (Sterbenz), the usual case for data whose spread is small
 * against their level.  S1 and S2 are the sums of the deviations from m0
 * and of their squares. */
static int mean_parts_of(const double *x, size_t n, int square, double *m0, double *c, double *s1,
                         double *s2)
{
    double s = square ? diag_sum_sq(x, n) : diag_sum(x, n);
    if (!isfinite(s))
        return HN_ENUMERIC;   /* a non-finite value, or a sum beyond the double range */
    double m = s / (double)n;
    if (square)
        diag_sum_dev2_sq(x, n, m, s1, s2);
    else
        diag_sum_dev2(x, n, m, s1, s2);
    *m0 = m;
    *c = *s1 / (double)n;
    if (!isfinite(*m0) || !isfinite(*c))
        return HN_ENUMERIC;
    return HN_OK;
}

/* The same for X; with SS, the sum of squares of the corrected deviations,
 * sum ((x_i - m0) - c)^2 = S2 - c S1. */
static int mean_parts(const double *x, size_t n, double *m0, double *c, double *ss)
{
    double s1, s2;
    int rc = mean_parts_of(x, n, 0, m0, c, &s1, &s2);
    if (rc == HN_OK && ss)
        *ss = s2 - *c * s1;
    return rc;
}

int diag_center(const double *x, size_t n, double *d)
{
    double m0, c;
    if (n < 1)
        return HN_ESHORT;
    int rc = mean_parts(x, n, &m0, &c, NULL);
    if (rc != HN_OK)
        return rc;
    for (size_t i = 0; i < n; i++)
        d[i] = (x[i] - m0) - c;
    return HN_OK;
}

static int all_finite(const double *x, size_t n)
{
    for (size_t i = 0; i < n; i++)
        if (!isfinite(x[i]))
            return 0;
    return 1;
}

int diag_mean_sd(const double *x, size_t n, double *mean, double *sd)
{
    double m0, c, ss;
    if (n < 1 || (sd && n < 2))
        return HN_ESHORT;
    /* Sums of values and of their squares cannot overflow below 2^500;
     * above, work on x * 2^-e (an exact power-of-two scaling) and scale the
     * results back. */
    double mx = diag_max_abs(x, n);
    if (mx > 0x1p500) {
        if (!all_finite(x, n))
            return HN_ENUMERIC;
        int e;
        frexp(mx, &e);
        double k = ldexp(1.0, -e);
        double *xs = malloc(n * sizeof *xs);
        if (!xs)
            return HN_ENOMEM;
        for (size_t i = 0; i < n; i++)
            xs[i] = x[i] * k;
        double ms = 0.0, sc = 0.0;
        int rc = diag_mean_sd(xs, n, mean ? &ms : NULL, sd ? &sc : NULL);
        free(xs);
        if (rc != HN_OK)
            return rc;
        if (mean)
            *mean = ms / k;
        if (sd) {
            *sd = sc / k;
            if (!isfinite(*sd))
                return HN_ENUMERIC;
        }
        return HN_OK;
    }
    int rc = mean_parts(x, n, &m0, &c, sd ? &ss : NULL);
    if (rc != HN_OK)
        return rc;
    if (mean)
        *mean = m0 + c;
    if (sd) {
        double v = ss / (double)(n - 1);
        if (!isfinite(v))
            return HN_ENUMERIC;
        *sd = sqrt(v > 0.0 ? v : 0.0);
    }
    return HN_OK;
}

int diag_center_ss(const double *x, size_t n, double *d, double *ss)
{
    double m0, c;
    if (n < 1)
        return HN_ESHORT;
    int rc = mean_parts(x, n, &m0, &c, NULL);
    if (rc != HN_OK)
        return rc;
    double v = diag_sum_center(x, n, m0, c, d);
    if (!isfinite(v))
        return HN_ENUMERIC;
    *ss = v;
    return HN_OK;
}

int diag_center_ss_sd(const double *x, size_t n, double *d, double *ss, double *mean, double *sd)
{
    if (n < 2)
        return HN_ESHORT;
    if (diag_max_abs(x, n) > 0x1p500) {
        /* diag_mean_sd's scaled route, then the centring apart */
        int rc = diag_mean_sd(x, n, mean, sd);
        return rc == HN_OK ? diag_center_ss(x, n, d, ss) : rc;
    }
    double m0, c, s1, s2;
    int rc = mean_parts_of(x, n, 0, &m0, &c, &s1, &s2);
    if (rc != HN_OK)
        return rc;
    /* as diag_mean_sd forms them from the same parts */
    double v = (s2 - c * s1) / (double)(n - 1);
    if (!isfinite(v))
        return HN_ENUMERIC;
    *mean = m0 + c;
    *sd = sqrt(v > 0.0 ? v : 0.0);
    double w = diag_sum_center(x, n, m0, c, d);
    if (!isfinite(w))
        return HN_ENUMERIC;
    *ss = w;
    return HN_OK;
}

int diag_center_moments(const double *x, size_t n, double s[3])
{
    double m0, c;
    if (n < 1)
        return HN_ESHORT;
    int rc = mean_parts(x, n, &m0, &c, NULL);
    if (rc != HN_OK)
        return rc;
    diag_sum_moments_of(x, n, m0, c, s);
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
    double *d = malloc(n * sizeof *d), v;
    if (!d)
        return HN_ENOMEM;
    int rc = diag_center_ss(x, n, d, &v);
    if (rc == HN_OK && v <= 0.0)
        rc = HN_ECONST;
    if (rc != HN_OK) {
        free(d);
        return rc;
    }
    *dev = d;
    *ss0 = v;
    return HN_OK;
}

int diag_lag_sums_of(const double *x, size_t n, int square, int maxlag, diag_lag_sums *s,
                     double *lag)
{
    double s2;
    int rc = mean_parts_of(x, n, square, &s->m0, &s->c, &s->s1, &s2);
    if (rc != HN_OK)
        return rc;
    if (maxlag <= DIAG_SUM_MAXLAG) {
        diag_sum_center_lagged(x, n, square, s->m0, s->c, maxlag, &s->ss0, lag);
    } else {
        /* the centred copy and one sum a lag, the same digits */
        double *d = malloc(n * sizeof *d);
        if (!d)
            return HN_ENOMEM;
        if (square)
            for (size_t i = 0; i < n; i++)
                d[i] = x[i] * x[i];
        s->ss0 = diag_sum_center(square ? d : x, n, s->m0, s->c, d);
        for (int k = 1; k <= maxlag; k++)
            lag[k - 1] = diag_sum_dot(d + k, d, n - (size_t)k);
        free(d);
    }
    if (!isfinite(s->ss0))
        return HN_ENUMERIC;
    return HN_OK;
}

/* The direct ACF of X or of its squares, from the sums above. */
static int acf_direct_of(const double *x, size_t n, int square, int maxlag, double *acf)
{
    if (n < 2)
        return HN_ESHORT;
    if (maxlag < 1 || (size_t)maxlag > n - 1)
        return HN_EINVAL;
    diag_lag_sums s;
    int rc = diag_lag_sums_of(x, n, square, maxlag, &s, acf);
    if (rc != HN_OK)
        return rc;
    if (s.ss0 <= 0.0)
        return HN_ECONST;
    for (int k = 0; k < maxlag; k++)
        acf[k] /= s.ss0;
    return HN_OK;
}

/* Lags 1..MAXLAG of the centred D with lag-0 sum SS0. */
static void acf_sums(const double *d, size_t n, double ss0, int maxlag, double *acf)
{
    if (maxlag <= DIAG_SUM_MAXLAG) {
        diag_sum_lagged(d, n, maxlag, acf);
        for (int k = 0; k < maxlag; k++)
            acf[k] /= ss0;
    } else {
        for (int k = 1; k <= maxlag; k++)
            acf[k - 1] = diag_sum_dot(d + k, d, n - (size_t)k) / ss0;
    }
}

/* The lagged products sum_{t=k}^{n-1} d_t d_{t-k} are blocked compensated
 * sums (diag_sum.h); all lags are formed in one cache-blocked sweep, each
 * with the digits of its own pass. */
int diag_acf_direct(const double *x, size_t n, int maxlag, double *acf)
{
    return acf_direct_of(x, n, 0, maxlag, acf);
}

int diag_acf_centred(const double *d, size_t n, double ss0, int maxlag, double *acf)
{
    if (n < 2)
        return HN_ESHORT;
    if (maxlag < 1 || (size_t)maxlag > n - 1)
        return HN_EINVAL;
    if (!(ss0 > 0.0))
        return HN_ECONST;
    acf_sums(d, n, ss0, maxlag, acf);
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

int diag_acf_sq(const double *x, size_t n, int maxlag, double *acf)
{
    if (n < 2)
        return HN_ESHORT;
    if (diag_acf_is_direct(n, maxlag))
        return acf_direct_of(x, n, 1, maxlag, acf);
    double *sq = malloc(n * sizeof *sq);
    if (!sq)
        return HN_ENOMEM;
    for (size_t i = 0; i < n; i++)
        sq[i] = x[i] * x[i];
    int rc = diag_acf_fft(sq, n, maxlag, acf);
    free(sq);
    return rc;
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

#if defined(__SSE2__)
#include <emmintrin.h>
#endif

/* Values A[I0..I1-1] within [LO, HI] appended to BUF from position M (the
 * new M returned), those below LO counted into *BELOW.  Without branches
 * (whether a value falls within is unpredictable): every value is stored
 * at BUF[M] and M advances past the ones that fall within; with SSE2 the
 * comparisons are made two at a time. */
static size_t filter_range(const double *a, size_t i0, size_t i1, double lo, double hi,
                           double *buf, size_t m, size_t *below)
{
    size_t i = i0, b = 0;
#if defined(__SSE2__)
    __m128d vlo = _mm_set1_pd(lo), vhi = _mm_set1_pd(hi);
    __m128i cnt = _mm_setzero_si128();
    for (; i + 2 <= i1; i += 2) {
        __m128d u = _mm_loadu_pd(a + i);
        cnt = _mm_sub_epi64(cnt, _mm_castpd_si128(_mm_cmplt_pd(u, vlo)));
        int in = _mm_movemask_pd(_mm_and_pd(_mm_cmpge_pd(u, vlo), _mm_cmple_pd(u, vhi)));
        buf[m] = a[i];
        m += (size_t)(in & 1);
        buf[m] = a[i + 1];
        m += (size_t)(in >> 1);
    }
    long long c[2];
    _mm_storeu_si128((__m128i *)c, cnt);
    b = (size_t)(c[0] + c[1]);
#endif
    for (; i < i1; i++) {
        double v = a[i];
        b += v < lo;
        buf[m] = v;
        m += (v >= lo) & (v <= hi);
    }
    *below += b;
    return m;
}

/* Below this length the median is a selection on a copy. */
#define MEDIAN_DIRECT_N 4096
/* Values filtered per check of the buffer's room. */
#define MEDIAN_CHUNK 1024

/* Median by a sample (in the manner of Floyd and Rivest): from about n/64
 * values spread over A, two bounds whose ranks in the sample enclose the
 * median's with a margin of 4 sample standard deviations; one branch-free
 * pass counts the values below the lower bound and copies those between
 * the bounds (about a tenth of them), and a selection in that copy finds
 * the middle order statistics, the values a full sort would give.  When the
 * bounds miss (rare: the sample only affects the speed), or the copy
 * outgrows its room, the selection runs on a copy of all of A. */
int diag_median(const double *a, size_t n, double *med)
{
    if (n < 1)
        return HN_ESHORT;
    size_t k1 = (n - 1) / 2, k2 = n / 2;
    if (n >= MEDIAN_DIRECT_N) {
        size_t ns = n / 64, step = n / ns;
        double g = 4.0 * sqrt((double)ns) / 2.0 + 2.0;   /* 4 sd of a sample rank near the middle */
        size_t cap = (size_t)((2.0 * g / (double)ns + 0.02) * (double)n) + 2 * MEDIAN_CHUNK;
        double *smp = malloc(ns * sizeof *smp), *buf = malloc(cap * sizeof *buf);
        int rc = HN_ENOMEM, done = 0;
        if (smp && buf) {
            rc = HN_OK;
            /* one value from each stretch of STEP, at a position that
             * wanders within it (fixed sequence: reproducible) */
            unsigned long long state = 0x9e3779b97f4a7c15ULL;
            for (size_t i = 0; i < ns; i++) {
                state = state * 6364136223846793005ULL + 1442695040888963407ULL;
                smp[i] = a[i * step + (size_t)((state >> 33) % step)];
            }
            double c = (double)k1 / (double)n * (double)ns;
            long rl = (long)floor(c - g), rh = (long)ceil(c + g);
            if (rl < 0)
                rl = 0;
            if (rh > (long)ns - 1)
                rh = (long)ns - 1;
            double lo = select_kth(smp, ns, (size_t)rl);
            double hi = select_kth(smp + rl, ns - (size_t)rl, (size_t)(rh - rl));
            size_t below = 0, m = 0, i = 0;
            int room = 1;
            while (i < n && room) {
                size_t e = i + MEDIAN_CHUNK < n ? i + MEDIAN_CHUNK : n;
                m = filter_range(a, i, e, lo, hi, buf, m, &below);
                i = e;
                room = m + MEDIAN_CHUNK <= cap;
            }
            if (room && below <= k1 && k2 < below + m) {
                double x1 = select_kth(buf, m, k1 - below), x2 = x1;
                if (k2 != k1) {
                    /* the next order statistic: the least value above position k1 */
                    x2 = buf[k1 - below + 1];
                    for (size_t j = k1 - below + 2; j < m; j++)
                        if (buf[j] < x2)
                            x2 = buf[j];
                }
                /* + 0.0: a zero median prints as 0 whichever of the equal
                 * zeros the selection met */
                *med = (k2 == k1 ? x1 : 0.5 * (x1 + x2)) + 0.0;
                done = 1;
            }
        }
        free(smp);
        if (done) {
            free(buf);
            return HN_OK;
        }
        free(buf);
        if (rc != HN_OK)
            return rc;
    }
    double *cp = malloc(n * sizeof *cp);
    if (!cp)
        return HN_ENOMEM;
    memcpy(cp, a, n * sizeof *a);
    *med = diag_median_inplace(cp, n) + 0.0;
    free(cp);
    return HN_OK;
}
