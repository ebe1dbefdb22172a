/* diag_normal.c - normality (information for intervals): Jarque-Bera, skewness, kurtosis. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>

#include <gsl/gsl_cdf.h>

#include "diag_checks.h"
#include "diag_stats.h"
#include "diag_sum.h"
#include "hn_status.h"

/* Jarque-Bera test with the biased (divisor n) central moments
 * m_k = sum (x - xbar)^k / n:  S = m3 / m2^(3/2), K = m4 / m2^2,
 * JB = n/6 (S^2 + (K-3)^2/4), referred to chi-square with 2 degrees of
 * freedom (asymptotic; conservative or liberal in small samples, said in
 * detail when n < 100).  SKEWNESS and EXCESS_KURTOSIS (K - 3) may be NULL.
 * The deviations come from diag_center (accurate even for a large mean);
 * the moments are compensated sums formed in one pass.  OUT->effect is the excess kurtosis.
 * Returns HN_OK; HN_EINVAL; HN_ESHORT (n < 8); HN_ECONST (all values equal);
 * HN_ENUMERIC; HN_ENOMEM.  On failure OUT is invalid and the moments NAN. */
/* Jarque-Bera from S, the compensated sums of d^2, d^3 and d^4 of the
 * deviations (x less its mean, as diag_center forms them). */
static int jarque_bera_sums(const double s[3], size_t n, double alpha, diag_test *out,
                            double *skewness, double *excess_kurtosis)
{
    const char *name = "jarque-bera";
    double dn = (double)n;
    double m2 = s[0] / dn, m3 = s[1] / dn, m4 = s[2] / dn;
    if (!(m2 > 0.0)) {
        diag_test_invalid(out, name, DIAG_NORMAL, "the data are constant");
        return HN_ECONST;
    }
    double S = m3 / (m2 * sqrt(m2));
    double K = m4 / (m2 * m2);
    double jb = dn / 6.0 * (S * S + 0.25 * (K - 3.0) * (K - 3.0));
    if (!isfinite(jb)) {
        diag_test_invalid(out, name, DIAG_NORMAL, "a non-finite value arose");
        return HN_ENUMERIC;
    }
    if (skewness)
        *skewness = S;
    if (excess_kurtosis)
        *excess_kurtosis = K - 3.0;
    out->name = name;
    out->criterion = DIAG_NORMAL;
    out->valid = 1;
    out->statistic = jb;
    out->df = 2.0;
    out->p = gsl_cdf_chisq_Q(jb, 2.0);
    out->pass = out->p >= alpha;
    out->effect = K - 3.0;
    out->effect_label = "excess kurtosis";
    snprintf(out->detail, sizeof out->detail,
             "skewness %.3f, excess kurtosis %.3f (moments with divisor n)%s", S, K - 3.0,
             n < 100 ? "; chi-square(2) reference is rough for n < 100" : "");
    return HN_OK;
}

/* Argument checks shared by both entry points; HN_OK or OUT marked invalid. */
static int jb_args(const double *x, size_t n, double alpha, diag_test *out, double *skewness,
                   double *excess_kurtosis)
{
    const char *name = "jarque-bera";
    if (skewness)
        *skewness = NAN;
    if (excess_kurtosis)
        *excess_kurtosis = NAN;
    if (!x || !(alpha > 0.0 && alpha < 1.0)) {
        diag_test_invalid(out, name, DIAG_NORMAL, "needs data and 0 < alpha < 1");
        return HN_EINVAL;
    }
    if (n < 8) {
        diag_test_invalid(out, name, DIAG_NORMAL, "too few observations (8 needed)");
        return HN_ESHORT;
    }
    return HN_OK;
}

int diag_jarque_bera(const double *x, size_t n, double alpha, diag_test *out,
                     double *skewness, double *excess_kurtosis)
{
    const char *name = "jarque-bera";
    int rc = jb_args(x, n, alpha, out, skewness, excess_kurtosis);
    if (rc != HN_OK)
        return rc;
    /* the deviations formed on the way, not stored */
    double s[3];
    rc = diag_center_moments(x, n, s);
    if (rc != HN_OK) {
        diag_test_invalid(out, name, DIAG_NORMAL, "a value is not finite");
        return rc;
    }
    return jarque_bera_sums(s, n, alpha, out, skewness, excess_kurtosis);
}

int diag_jarque_bera_centred(const double *d, size_t n, double alpha, diag_test *out,
                             double *skewness, double *excess_kurtosis)
{
    int rc = jb_args(d, n, alpha, out, skewness, excess_kurtosis);
    if (rc != HN_OK)
        return rc;
    double s[3];
    diag_sum_moments(d, n, s);
    return jarque_bera_sums(s, n, alpha, out, skewness, excess_kurtosis);
}
