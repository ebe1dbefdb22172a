/* diag_runs.c - randomness of order: runs about the median and turning points. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>

#include "diag_checks.h"
#include "diag_stats.h"
#include "hn_status.h"

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
    double *s = malloc(n * sizeof *s);
    if (!s) {
        diag_test_invalid(out, name, DIAG_RANDOM, "out of memory");
        return HN_ENOMEM;
    }
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(x[i])) {
            free(s);
            diag_test_invalid(out, name, DIAG_RANDOM, "a value is not finite");
            return HN_ENUMERIC;
        }
    }
    memcpy(s, x, n * sizeof *x);
    double med = diag_median_inplace(s, n);
    free(s);

    size_t n1 = 0, n2 = 0, runs = 0;
    int prev = 0;
    for (size_t i = 0; i < n; i++) {
        int sign = x[i] > med ? 1 : x[i] < med ? -1 : 0;
        if (sign == 0)
            continue;
        if (sign > 0)
            n1++;
        else
            n2++;
        if (sign != prev)
            runs++;
        prev = sign;
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
    size_t tp = 0, ties = 0;
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(x[i])) {
            diag_test_invalid(out, name, DIAG_RANDOM, "a value is not finite");
            return HN_ENUMERIC;
        }
    }
    for (size_t i = 1; i + 1 < n; i++) {
        double l = x[i - 1], c = x[i], r = x[i + 1];
        if ((c > l && c > r) || (c < l && c < r))
            tp++;
        if (c == l || c == r)
            ties++;
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
