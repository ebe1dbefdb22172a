/* diag_portmanteau.c - mean t-test, Ljung-Box, Box-Pierce and Bartlett's cumulative periodogram test. */
#include "diag_checks.h"
#include "diag_stats.h"
#include "hn_status.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_fft_complex.h>
#include <gsl/gsl_fft_real.h>

static const char SERIAL_EFFECT[] =
    "share of variance a long autoregression predicts (order-adjusted)";

static int bad_alpha(double alpha)
{
    return !(alpha > 0.0 && alpha < 1.0);
}

int diag_mean_ttest(const double *x, size_t n, double alpha, diag_test *out)
{
    static const char name[] = "mean-t";
    double mean, sd;
    if (bad_alpha(alpha)) {
        diag_test_invalid(out, name, DIAG_MEAN, "alpha must lie strictly between 0 and 1");
        return HN_EINVAL;
    }
    if (n < 2) {
        diag_test_invalid(out, name, DIAG_MEAN, "needs at least 2 observations");
        return HN_ESHORT;
    }
    int rc = diag_mean_sd(x, n, &mean, &sd);
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_MEAN, "a value is not finite");
        return HN_EINVAL;
    }
    if (!(sd > 0.0)) {
        diag_test_invalid(out, name, DIAG_MEAN, "the values are constant: no spread to test against");
        return HN_EINVAL;
    }
    double df = (double)(n - 1);
    double t = mean / (sd / sqrt((double)n));
    double p = 2.0 * gsl_cdf_tdist_Q(fabs(t), df);
    if (p > 1.0)
        p = 1.0;
    memset(out, 0, sizeof *out);
    diag_test_fill(out, name, DIAG_MEAN, t, df, p, alpha, NAN, NULL);
    out->effect = mean / sd;
    out->effect_label = "mean in standard deviations";
    snprintf(out->detail, sizeof out->detail, "mean %.6g, sd %.6g, n %zu; two-sided Student-t",
             mean, sd, n);
    return HN_OK;
}

/* The serial effect (the long-autoregression share from ACF[0..order-1],
 * order = diag_share_order(n)) and the list of lags 1..M outside
 * +/- z/sqrt(n). */
static void serial_from_acf(const double *acf, size_t n, int m, double alpha, double *effect,
                            char *lags, size_t lagslen)
{
    int order = diag_share_order(n);
    double pacf[DIAG_SHARE_MAX];
    *effect = NAN;
    if (order >= 1 && order <= DIAG_SHARE_MAX && diag_pacf(acf, order, pacf) == HN_OK)
        *effect = diag_predictable_share(pacf, order, n);

    double band = gsl_cdf_ugaussian_Qinv(alpha / 2.0) / sqrt((double)n);
    size_t used = 0;
    int count = 0, cut = 0;
    lags[0] = 0;
    for (int k = 1; k <= m; k++) {
        if (fabs(acf[k - 1]) <= band)
            continue;
        count++;
        if (cut)
            continue;
        char item[48];
        int w = snprintf(item, sizeof item, "%s%d (%.3f)", count > 1 ? ", " : "", k, acf[k - 1]);
        if (w > 0 && used + (size_t)w + 5 < lagslen) {
            memcpy(lags + used, item, (size_t)w + 1);
            used += (size_t)w;
        } else {
            memcpy(lags + used, " ...", 5);   /* room for it was kept above */
            cut = 1;
        }
    }
    if (count == 0)
        snprintf(lags, lagslen, "none");
}

/* Arguments of Ljung-Box / Box-Pierce: HN_OK, or OUT marked invalid and
 * HN_EINVAL / HN_ESHORT. */
static int portmanteau_args(const char *name, size_t n, int m, int df_adjust, double alpha,
                            diag_test *out)
{
    char why[160];
    if (bad_alpha(alpha)) {
        diag_test_invalid(out, name, DIAG_SERIAL, "alpha must lie strictly between 0 and 1");
        return HN_EINVAL;
    }
    if (n < 3) {
        diag_test_invalid(out, name, DIAG_SERIAL, "needs at least 3 observations");
        return HN_ESHORT;
    }
    if (m < 1 || (size_t)m > n - 1 || df_adjust < 0) {
        snprintf(why, sizeof why, "lags m = %d must lie in 1..n-1 = %zu (and p+q >= 0)", m, n - 1);
        diag_test_invalid(out, name, DIAG_SERIAL, why);
        return HN_EINVAL;
    }
    int df = m - df_adjust;
    if (df < 1) {
        snprintf(why, sizeof why,
                 "df = m - (p+q) = %d - %d = %d < 1: use more lags than fitted ARMA terms",
                 m, df_adjust, df);
        diag_test_invalid(out, name, DIAG_SERIAL, why);
        return HN_EINVAL;
    }
    return HN_OK;
}

/* Ljung-Box (ljung = 1) or Box-Pierce (0) from ACF lags 1..max(m, share order). */
static void portmanteau_fill(const double *acf, size_t n, int m, int df_adjust, double alpha,
                             diag_test *out, int ljung)
{
    const char *name = ljung ? "ljung-box" : "box-pierce";
    double effect;
    char lags[160];
    serial_from_acf(acf, n, m, alpha, &effect, lags, sizeof lags);
    int df = m - df_adjust;
    double dn = (double)n, q = 0.0;
    /* Sum from the highest lag down: the small terms first. */
    for (int k = m; k >= 1; k--) {
        double r2 = acf[k - 1] * acf[k - 1];
        q += ljung ? r2 / (dn - (double)k) : r2;
    }
    q *= ljung ? dn * (dn + 2.0) : dn;
    double p = gsl_cdf_chisq_Q(q, (double)df);
    memset(out, 0, sizeof *out);
    diag_test_fill(out, name, DIAG_SERIAL, q, (double)df, p, alpha, NAN, NULL);
    out->effect = effect;
    out->effect_label = SERIAL_EFFECT;
    snprintf(out->detail, sizeof out->detail, "%d lags, df %d - %d; lags outside +/-%.3f: %s",
             m, m, df_adjust, gsl_cdf_ugaussian_Qinv(alpha / 2.0) / sqrt(dn), lags);
}

/* Ljung-Box (ljung = 1) or Box-Pierce (0). */
static int portmanteau(const double *x, size_t n, int m, int df_adjust, double alpha,
                       diag_test *out, int ljung)
{
    const char *name = ljung ? "ljung-box" : "box-pierce";
    int rc = portmanteau_args(name, n, m, df_adjust, alpha, out);
    if (rc != HN_OK)
        return rc;
    int order = diag_share_order(n);
    int top = m > order ? m : order;
    double *acf = malloc((size_t)top * sizeof *acf);
    rc = acf ? diag_acf(x, n, top, acf) : HN_ENOMEM;
    if (rc != HN_OK) {
        free(acf);
        diag_test_invalid(out, name, DIAG_SERIAL,
                          rc == HN_ECONST ? "the values are constant" :
                          rc == HN_ENOMEM ? "out of memory" : "a value is not finite");
        return rc == HN_ENOMEM ? HN_ENOMEM : HN_EINVAL;
    }
    portmanteau_fill(acf, n, m, df_adjust, alpha, out, ljung);
    free(acf);
    return HN_OK;
}

int diag_ljung_box(const double *x, size_t n, int m, int df_adjust, double alpha, diag_test *out)
{
    return portmanteau(x, n, m, df_adjust, alpha, out, 1);
}

int diag_box_pierce(const double *x, size_t n, int m, int df_adjust, double alpha, diag_test *out)
{
    return portmanteau(x, n, m, df_adjust, alpha, out, 0);
}

/* The same from a given ACF (NLAGS lags, at least max(m, share order)). */
static int portmanteau_acf(const double *acf, int nlags, size_t n, int m, int df_adjust,
                           double alpha, diag_test *out, int ljung)
{
    const char *name = ljung ? "ljung-box" : "box-pierce";
    int rc = portmanteau_args(name, n, m, df_adjust, alpha, out);
    if (rc != HN_OK)
        return rc;
    int order = diag_share_order(n);
    if (!acf || nlags < m || nlags < order) {
        diag_test_invalid(out, name, DIAG_SERIAL, "the autocorrelations given are too few");
        return HN_EINVAL;
    }
    portmanteau_fill(acf, n, m, df_adjust, alpha, out, ljung);
    return HN_OK;
}

int diag_ljung_box_acf(const double *acf, int nlags, size_t n, int m, int df_adjust,
                       double alpha, diag_test *out)
{
    return portmanteau_acf(acf, nlags, n, m, df_adjust, alpha, out, 1);
}

int diag_box_pierce_acf(const double *acf, int nlags, size_t n, int m, int df_adjust,
                        double alpha, diag_test *out)
{
    return portmanteau_acf(acf, nlags, n, m, df_adjust, alpha, out, 0);
}

/* Upper tail of Kolmogorov's limiting distribution,
 * Q(l) = P(sup|B| > l) = 2 sum_{k>=1} (-1)^(k-1) exp(-2 k^2 l^2);
 * for small l the equivalent theta-function form
 * P(K <= l) = sqrt(2 pi)/l sum_{k>=1} exp(-(2k-1)^2 pi^2 / (8 l^2))
 * converges faster (common practice: both series are standard). */
double diag_kolmogorov_q(double l)
{
    if (!(l > 0.0))
        return 1.0;
    if (l < 1.0) {
        double s = 0.0, c = M_PI * M_PI / (8.0 * l * l);
        for (int k = 1; k <= 20; k++) {
            double t = exp(-(double)((2 * k - 1) * (2 * k - 1)) * c);
            s += t;
            if (t < 1e-18 * s)
                break;
        }
        double cdf = sqrt(2.0 * M_PI) / l * s;
        return cdf >= 1.0 ? 0.0 : 1.0 - cdf;
    }
    double s = 0.0;
    for (int k = 1; k <= 100; k++) {
        double t = exp(-2.0 * (double)k * (double)k * l * l);
        s += (k % 2) ? t : -t;
        if (t < 1e-18)
            break;
    }
    s *= 2.0;
    return s < 0.0 ? 0.0 : (s > 1.0 ? 1.0 : s);
}

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

/* |X_j|^2 for j = 1..q (q < n/2) of the DFT of the real D of even length
 * n = 2m, from one complex DFT of half the length: with z_t = d_{2t} +
 * i d_{2t+1} and Z its length-m DFT, the even and odd samples have the
 * transforms E_j = (Z_j + conj Z_{m-j})/2 and O_j = (Z_j - conj Z_{m-j})/(2i),
 * and X_j = E_j + exp(-2 pi i j/n) O_j.  Z comes from the chirp-z identity
 * (as in periodogram below) on a 2-3-5-7-smooth length L >= 2m - 1, this
 * time with the outer chirp applied, since Z_j and Z_{m-j} are combined.
 * Half the transform length of the direct route.  HN_OK, HN_ENOMEM or
 * HN_ENUMERIC. */
static int periodogram_even(const double *d, size_t n, size_t q, double *I)
{
    size_t m = n / 2, L = smooth_length(2 * m - 1);
    double *a = calloc(2 * L, sizeof *a), *b = calloc(2 * L, sizeof *b);
    double *ch = malloc(2 * m * sizeof *ch);   /* the chirp, kept for the outer one */
    gsl_fft_complex_wavetable *wt = gsl_fft_complex_wavetable_alloc(L);
    gsl_fft_complex_workspace *ws = gsl_fft_complex_workspace_alloc(L);
    int rc = HN_OK;
    if (!a || !b || !ch || !wt || !ws) {
        rc = HN_ENOMEM;
        goto done;
    }
    unsigned long long two_m = 2ULL * (unsigned long long)m;
    for (size_t t = 0; t < m; t++) {
        /* chirp exp(-i pi t^2 / m), with t^2 reduced mod 2m first */
        unsigned long long tt = ((unsigned long long)t * (unsigned long long)t) % two_m;
        double th = M_PI * (double)tt / (double)m;
        double c = cos(th), sn = sin(th), zr = d[2 * t], zi = d[2 * t + 1];
        a[2 * t] = zr * c + zi * sn;
        a[2 * t + 1] = zi * c - zr * sn;
        b[2 * t] = ch[2 * t] = c;
        b[2 * t + 1] = ch[2 * t + 1] = sn;
        if (t > 0) {
            b[2 * (L - t)] = c;
            b[2 * (L - t) + 1] = sn;
        }
    }
    if (gsl_fft_complex_forward(a, 1, L, wt, ws) != 0 || gsl_fft_complex_forward(b, 1, L, wt, ws) != 0) {
        rc = HN_ENUMERIC;
        goto done;
    }
    for (size_t k = 0; k < L; k++) {
        double re = a[2 * k] * b[2 * k] - a[2 * k + 1] * b[2 * k + 1];
        double im = a[2 * k] * b[2 * k + 1] + a[2 * k + 1] * b[2 * k];
        a[2 * k] = re;
        a[2 * k + 1] = im;
    }
    if (gsl_fft_complex_inverse(a, 1, L, wt, ws) != 0) {
        rc = HN_ENUMERIC;
        goto done;
    }
    /* Z_k = exp(-i pi k^2 / m) * convolution_k, for k = 0..m-1, in place */
    for (size_t k = 0; k < m; k++) {
        double c = ch[2 * k], sn = ch[2 * k + 1], re = a[2 * k], im = a[2 * k + 1];
        a[2 * k] = re * c + im * sn;
        a[2 * k + 1] = im * c - re * sn;
    }
    for (size_t j = 1; j <= q; j++) {
        double zr = a[2 * j], zi = a[2 * j + 1];
        double cr = a[2 * (m - j)], ci = -a[2 * (m - j) + 1];     /* conj Z_{m-j} */
        double er = 0.5 * (zr + cr), ei = 0.5 * (zi + ci);
        double orr = 0.5 * (zi - ci), oi = -0.5 * (zr - cr);      /* (Z - conj)/(2i) */
        double th = 2.0 * M_PI * (double)j / (double)n;
        double c = cos(th), sn = -sin(th);
        double xr = er + c * orr - sn * oi, xi = ei + c * oi + sn * orr;
        I[j - 1] = xr * xr + xi * xi;
    }
done:
    free(a);
    free(b);
    free(ch);
    if (wt)
        gsl_fft_complex_wavetable_free(wt);
    if (ws)
        gsl_fft_complex_workspace_free(ws);
    return rc;
}

/* |X_j|^2 for j = 1..q of the DFT X_j = sum_t d_t exp(-2 pi i j t / n),
 * into I[0..q-1].  D is overwritten.  Lengths whose prime factors are all
 * small go through GSL's mixed-radix real FFT; others (GSL's general-factor
 * code is O(n p) for a prime factor p) through Bluestein's chirp-z identity
 * jt = (j^2 + t^2 - (j-t)^2)/2 as a circular convolution of length
 * L >= 2n - 1, the smallest with prime factors 2, 3, 5 and 7 only (GSL's
 * mixed-radix complex FFT has fast passes for those; L is then at most a few
 * per cent above 2n - 1, where a power of two can be nearly twice); the outer chirp has
 * modulus 1 and drops out of |X_j|^2.  Returns HN_OK, HN_ENOMEM or
 * HN_ENUMERIC. */
static int periodogram(double *d, size_t n, size_t q, double *I)
{
    if (largest_prime_factor(n) <= 97) {
        gsl_fft_real_wavetable *wt = gsl_fft_real_wavetable_alloc(n);
        gsl_fft_real_workspace *ws = gsl_fft_real_workspace_alloc(n);
        int rc = HN_OK;
        if (!wt || !ws)
            rc = HN_ENOMEM;
        else if (gsl_fft_real_transform(d, 1, n, wt, ws) != 0)
            rc = HN_ENUMERIC;
        else /* half-complex layout: Re X_j = d[2j-1], Im X_j = d[2j] */
            for (size_t j = 1; j <= q; j++)
                I[j - 1] = d[2 * j - 1] * d[2 * j - 1] + d[2 * j] * d[2 * j];
        if (wt)
            gsl_fft_real_wavetable_free(wt);
        if (ws)
            gsl_fft_real_workspace_free(ws);
        return rc;
    }
    if (n % 2 == 0 && q < n / 2)
        return periodogram_even(d, n, q, I);
    size_t L = smooth_length(2 * n - 1);
    double *a = calloc(2 * L, sizeof *a), *b = calloc(2 * L, sizeof *b);
    gsl_fft_complex_wavetable *wt = gsl_fft_complex_wavetable_alloc(L);
    gsl_fft_complex_workspace *ws = gsl_fft_complex_workspace_alloc(L);
    if (!a || !b || !wt || !ws) {
        free(a);
        free(b);
        if (wt)
            gsl_fft_complex_wavetable_free(wt);
        if (ws)
            gsl_fft_complex_workspace_free(ws);
        return HN_ENOMEM;
    }
    unsigned long long two_n = 2ULL * (unsigned long long)n;
    for (size_t t = 0; t < n; t++) {
        /* exp(-i pi t^2 / n), with t^2 reduced mod 2n first for accuracy */
        unsigned long long tt = ((unsigned long long)t * (unsigned long long)t) % two_n;
        double th = M_PI * (double)tt / (double)n;
        double c = cos(th), sn = sin(th);
        a[2 * t] = d[t] * c;
        a[2 * t + 1] = -d[t] * sn;
        b[2 * t] = c;
        b[2 * t + 1] = sn;
        if (t > 0) {
            b[2 * (L - t)] = c;
            b[2 * (L - t) + 1] = sn;
        }
    }
    int rc = HN_OK;
    if (gsl_fft_complex_forward(a, 1, L, wt, ws) != 0 || gsl_fft_complex_forward(b, 1, L, wt, ws) != 0)
        rc = HN_ENUMERIC;
    if (rc == HN_OK) {
        for (size_t k = 0; k < L; k++) {
            double re = a[2 * k] * b[2 * k] - a[2 * k + 1] * b[2 * k + 1];
            double im = a[2 * k] * b[2 * k + 1] + a[2 * k + 1] * b[2 * k];
            a[2 * k] = re;
            a[2 * k + 1] = im;
        }
        if (gsl_fft_complex_inverse(a, 1, L, wt, ws) != 0)
            rc = HN_ENUMERIC;
    }
    if (rc == HN_OK)
        for (size_t j = 1; j <= q; j++)
            I[j - 1] = a[2 * j] * a[2 * j] + a[2 * j + 1] * a[2 * j + 1];
    gsl_fft_complex_wavetable_free(wt);
    gsl_fft_complex_workspace_free(ws);
    free(a);
    free(b);
    return rc;
}

/* Bartlett's cumulative periodogram test.
 * Periodogram I_j = |sum_t d_t exp(-2 pi i j t / n)|^2 at the Fourier
 * frequencies f_j = j/n, j = 1..q, q = floor((n-1)/2): frequency 0 (the mean,
 * removed) and, for even n, the Nyquist frequency 1/2 are left out, so every
 * ordinate is a chi-square(2) under Gaussian white noise.  Then
 * C_j = sum_{i<=j} I_i / sum_{i<=q} I_i for j = 1..q-1 behave as the order
 * statistics of q-1 uniforms (common practice), and the Kolmogorov-Smirnov
 * distance D between them and the uniform distribution function is referred
 * to Kolmogorov's limiting distribution with Stephens' finite-sample factor
 * sqrt(M) + 0.12 + 0.11/sqrt(M), M = q-1 (Stephens, M. A. (1970), J. R.
 * Statist. Soc. B 32, 115-122; factor recalled from memory). */
static int cum_periodogram(const double *x, size_t n, double alpha, diag_test *out,
                           const double *acf_given, int acf_given_lags)
{
    static const char name[] = "cum-periodogram";
    if (bad_alpha(alpha)) {
        diag_test_invalid(out, name, DIAG_SERIAL, "alpha must lie strictly between 0 and 1");
        return HN_EINVAL;
    }
    if (n < 7) {
        diag_test_invalid(out, name, DIAG_SERIAL, "needs at least 7 observations (3 frequencies)");
        return HN_ESHORT;
    }
    size_t q = (n - 1) / 2, M = q - 1;
    double *d = malloc(n * sizeof *d), *I = malloc(q * sizeof *I);
    int rc = HN_OK;
    if (!d || !I) {
        rc = HN_ENOMEM;
        diag_test_invalid(out, name, DIAG_SERIAL, "out of memory");
        goto done;
    }
    if (diag_center(x, n, d) != HN_OK) {
        rc = HN_EINVAL;
        diag_test_invalid(out, name, DIAG_SERIAL, "a value is not finite");
        goto done;
    }
    rc = periodogram(d, n, q, I);
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_SERIAL,
                          rc == HN_ENOMEM ? "out of memory" : "the Fourier transform failed");
        rc = rc == HN_ENOMEM ? HN_ENOMEM : HN_EINVAL;
        goto done;
    }
    double total = 0.0, comp = 0.0;
    for (size_t j = 1; j <= q; j++) {
        double y = I[j - 1] - comp, t = total + y;
        comp = (t - total) - y;
        total = t;
    }
    if (!(total > 0.0) || !isfinite(total)) {
        rc = HN_EINVAL;
        diag_test_invalid(out, name, DIAG_SERIAL, "the values are constant");
        goto done;
    }
    double cum = 0.0, D = 0.0, worst_c = 0.0, worst_u = 0.0;
    size_t worst_j = 1;
    for (size_t j = 1; j <= M; j++) {
        cum += I[j - 1];
        double c = cum / total;
        double dplus = (double)j / (double)M - c, dminus = c - (double)(j - 1) / (double)M;
        double dj = dplus > dminus ? dplus : dminus;
        if (dj > D) {
            D = dj;
            worst_j = j;
            worst_c = c;
            worst_u = dplus > dminus ? (double)j / (double)M : (double)(j - 1) / (double)M;
        }
    }
    double sm = sqrt((double)M);
    double lambda = (sm + 0.12 + 0.11 / sm) * D;
    double p = diag_kolmogorov_q(lambda);
    memset(out, 0, sizeof *out);
    diag_test_fill(out, name, DIAG_SERIAL, D, NAN, p, alpha, NAN, NULL);
    snprintf(out->detail, sizeof out->detail,
             "KS distance %.4f over %zu frequencies j/n, j = 1..%zu; largest near frequency %zu/%zu "
             "(period %.1f), cumulative share %.3f against uniform %.3f",
             D, q, q, worst_j, n, (double)n / (double)worst_j, worst_c, worst_u);
    /* Practical size as for the portmanteau tests. */
    {
        int order = diag_share_order(n);
        double pacf[DIAG_SHARE_MAX], own[DIAG_SHARE_MAX];
        if (order >= 1 && order <= DIAG_SHARE_MAX && acf_given && acf_given_lags < order)
            acf_given = NULL;
        if (order >= 1 && order <= DIAG_SHARE_MAX &&
            (acf_given || diag_acf(x, n, order, own) == HN_OK) &&
            diag_pacf(acf_given ? acf_given : own, order, pacf) == HN_OK) {
            out->effect = diag_predictable_share(pacf, order, n);
            out->effect_label = SERIAL_EFFECT;
        }
    }
done:
    free(d);
    free(I);
    return rc;
}

int diag_cum_periodogram(const double *x, size_t n, double alpha, diag_test *out)
{
    return cum_periodogram(x, n, alpha, out, NULL, 0);
}

int diag_cum_periodogram_acf(const double *x, size_t n, const double *acf, int nlags,
                             double alpha, diag_test *out)
{
    return cum_periodogram(x, n, alpha, out, acf, nlags);
}
