/* diag_runs.c - randomness of order: runs about the median and turning points. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>

#include "diag_checks.h"
#include "diag_stats.h"
#include "diag_sum.h"
#include "hn_status.h"

#if defined(__SSE2__)
/* The comparisons two values at a time with SSE2: a true comparison is an
 * all-ones lane, -1 as an integer.  (GCC's generic vectors turn the AND
 * and OR of two comparison masks into lane-by-lane scalar code.) */
#include <emmintrin.h>
#define VEC_COUNTS 1
#endif

/* Wald-Wolfowitz runs test about the median.  Values above the median are
 * coded +, below -, values equal to the median are dropped; R is the number
 * of runs of like signs in the remaining sequence, n1 and n2 the counts.
 * Z = (R - E R) / sd R with E R = 2 n1 n2 / (n1 + n2) + 1 and
 * var R = 2 n1 n2 (2 n1 n2 - n1 - n2) / ((n1 + n2)^2 (n1 + n2 - 1)), two-sided
 * normal p-value, WITHOUT continuity correction (as in the NIST/SEMATECH
 * e-Handbook 1.3.5.13 definition).  OUT->statistic is Z (positive: more runs
 * than expected, i.e. alternation; negative: too few, i.e. persistence),
 * effect = R / E R - 1.  Returns HN_OK; HN_EINVAL; HN_ESHORT (fewer than 2
 * values on either side of the median); HN_ENUMERIC; HN_ENOMEM.  OUT is
 * marked invalid on failure. */
int diag_runs_test(const double *x, size_t n, double alpha, diag_test *out)
{
    const char *name = "runs";
    if (!x || !(alpha > 0.0 && alpha < 1.0)) {
        diag_test_invalid(out, name, DIAG_RANDOM, "needs data and 0 < alpha < 1");
        return HN_EINVAL;
    }
    if (n < 4) {
        diag_test_invalid(out, name, DIAG_RANDOM, "too few observations");
        return HN_ESHORT;
    }
    if (!diag_all_finite(x, n)) {
        diag_test_invalid(out, name, DIAG_RANDOM, "a value is not finite");
        return HN_ENUMERIC;
    }
    double med;
    if (diag_median(x, n, &med) != HN_OK) {
        diag_test_invalid(out, name, DIAG_RANDOM, "out of memory");
        return HN_ENOMEM;
    }

    /* Runs of the signs with the zeros (values equal to the median)
     * dropped: one for the first nonzero sign, one more for every change
     * between neighbours that are both nonzero, and, across each stretch of
     * zeros, one when the signs on either side differ.  The first three
     * are counted two neighbour pairs at a time without branches (the
     * signs of residuals are as unpredictable as coin tosses); the
     * stretches of zeros are few and looked at one by one. */
    size_t n1 = (x[0] > med), n2 = (x[0] < med), nz = (x[0] == med), runs = 0, i = 1;
#ifdef VEC_COUNTS
    __m128d vm = _mm_set1_pd(med);
    __m128i up = _mm_setzero_si128(), down = up, flips = up, zeros = up;
    for (; i + 2 <= n; i += 2) {
        __m128d prev = _mm_loadu_pd(x + i - 1), cur = _mm_loadu_pd(x + i);
        __m128d u = _mm_cmpgt_pd(cur, vm), l = _mm_cmplt_pd(cur, vm);
        __m128d f = _mm_or_pd(_mm_and_pd(_mm_cmpgt_pd(prev, vm), l),
                              _mm_and_pd(_mm_cmplt_pd(prev, vm), u));
        up = _mm_sub_epi64(up, _mm_castpd_si128(u));
        down = _mm_sub_epi64(down, _mm_castpd_si128(l));
        zeros = _mm_sub_epi64(zeros, _mm_castpd_si128(_mm_cmpeq_pd(cur, vm)));
        flips = _mm_sub_epi64(flips, _mm_castpd_si128(f));
    }
    long long c[8];
    _mm_storeu_si128((__m128i *)c, up);
    _mm_storeu_si128((__m128i *)(c + 2), down);
    _mm_storeu_si128((__m128i *)(c + 4), zeros);
    _mm_storeu_si128((__m128i *)(c + 6), flips);
    n1 += (size_t)(c[0] + c[1]);
    n2 += (size_t)(c[2] + c[3]);
    nz += (size_t)(c[4] + c[5]);
    runs += (size_t)(c[6] + c[7]);
#endif
    for (; i < n; i++) {
        n1 += x[i] > med;
        n2 += x[i] < med;
        nz += x[i] == med;
        runs += ((x[i - 1] > med) & (x[i] < med)) | ((x[i - 1] < med) & (x[i] > med));
    }
    runs += n1 + n2 > 0;
    for (size_t j = 0; nz > 0 && j < n; j++) {
        if (x[j] != med)
            continue;
        size_t a = j, b = j;
        while (b < n && x[b] == med)
            b++;
        nz -= b - a;
        if (a > 0 && b < n)
            runs += (x[a - 1] > med) != (x[b] > med);
        j = b;
    }
    if (n1 < 2 || n2 < 2) {
        diag_test_invalid(out, name, DIAG_RANDOM, "too few values on one side of the median");
        return HN_ESHORT;
    }
    double a = (double)n1, b = (double)n2, m = a + b;
    double er = 2.0 * a * b / m + 1.0;
    double vr = 2.0 * a * b * (2.0 * a * b - a - b) / (m * m * (m - 1.0));
    double z = ((double)runs - er) / sqrt(vr);
    diag_test_fill(out, name, DIAG_RANDOM, z, NAN, 2.0 * gsl_cdf_ugaussian_Q(fabs(z)), alpha, (double)runs / er - 1.0,
         "runs relative to expected, minus 1");
    snprintf(out->detail, sizeof out->detail,
             "%zu runs about the median %.6g (expected %.1f); %zu above, %zu below, %zu equal dropped; "
             "normal approximation, no continuity correction",
             runs, med, er, n1, n2, n - n1 - n2);
    return HN_OK;
}

/* Turning-point test.  A turning point is an interior x_i strictly above
 * both neighbours or strictly below both (ties are not turning points:
 * common practice).  Under independence the count T has mean 2(n-2)/3 and
 * variance (16n-29)/90; Z = (T - mean)/sd with a two-sided normal p-value
 * (no continuity correction).  OUT->statistic is Z, effect = T / mean - 1.
 * Returns HN_OK, HN_EINVAL, HN_ESHORT (n < 7), HN_ENUMERIC.  OUT is marked
 * invalid on failure. */
int diag_turning_points(const double *x, size_t n, double alpha, diag_test *out)
{
    const char *name = "turning-points";
    if (!x || !(alpha > 0.0 && alpha < 1.0)) {
        diag_test_invalid(out, name, DIAG_RANDOM, "needs data and 0 < alpha < 1");
        return HN_EINVAL;
    }
    if (n < 7) {
        diag_test_invalid(out, name, DIAG_RANDOM, "too few observations (7 needed)");
        return HN_ESHORT;
    }
    if (!diag_all_finite(x, n)) {
        diag_test_invalid(out, name, DIAG_RANDOM, "a value is not finite");
        return HN_ENUMERIC;
    }
    /* counted without branches (whether a point turns is a coin toss), two
     * points at a time where SSE2 is there */
    size_t tp = 0, ties = 0, i = 1;
#ifdef VEC_COUNTS
    __m128i vtp = _mm_setzero_si128(), vties = vtp;
    for (; i + 2 < n; i += 2) {
        __m128d l = _mm_loadu_pd(x + i - 1), c = _mm_loadu_pd(x + i), r = _mm_loadu_pd(x + i + 1);
        __m128d t = _mm_or_pd(_mm_and_pd(_mm_cmpgt_pd(c, l), _mm_cmpgt_pd(c, r)),
                              _mm_and_pd(_mm_cmplt_pd(c, l), _mm_cmplt_pd(c, r)));
        vtp = _mm_sub_epi64(vtp, _mm_castpd_si128(t));
        vties = _mm_sub_epi64(vties, _mm_castpd_si128(_mm_or_pd(_mm_cmpeq_pd(c, l), _mm_cmpeq_pd(c, r))));
    }
    long long k[4];
    _mm_storeu_si128((__m128i *)k, vtp);
    _mm_storeu_si128((__m128i *)(k + 2), vties);
    tp = (size_t)(k[0] + k[1]);
    ties = (size_t)(k[2] + k[3]);
#endif
    for (; i + 1 < n; i++) {
        double l = x[i - 1], c = x[i], r = x[i + 1];
        tp += (size_t)(((c > l) & (c > r)) | ((c < l) & (c < r)));
        ties += (size_t)((c == l) | (c == r));
    }
    double dn = (double)n;
    double mean = 2.0 * (dn - 2.0) / 3.0;
    double var = (16.0 * dn - 29.0) / 90.0;
    double z = ((double)tp - mean) / sqrt(var);
    diag_test_fill(out, name, DIAG_RANDOM, z, NAN, 2.0 * gsl_cdf_ugaussian_Q(fabs(z)), alpha, (double)tp / mean - 1.0,
         "turning points relative to expected, minus 1");
    snprintf(out->detail, sizeof out->detail,
             "%zu turning points (expected %.1f, sd %.2f)%s", tp, mean, sqrt(var),
             ties ? "; ties with a neighbour present, the count is then low" : "");
    return HN_OK;
}
