/* diag_variance.c - constant variance over time: block ANOVA, Brown-Forsythe, rolling mean/sd. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <gsl/gsl_cdf.h>

#include "diag_checks.h"
#include "diag_stats.h"
#include "diag_sum.h"
#include "hn_status.h"

/* Numerics.  Every sum of squares is taken about a centre computed first
 * (two passes), and all data are shifted by their first value before that,
 * so that data with a large common offset (NIST StRD SmLs07: 1e12 + 0.x)
 * keep the digits of their differences.  Each two-pass mean adds the mean of
 * the first-pass deviations as a correction; the second pass gives the sum
 * of squares about the corrected mean too (blocked compensated sums,
 * diag_sum.h). */

/* Two-pass mean of X[0..n-1] (n > 0) and, with SS, the sum of squared
 * deviations from it: sum (x - m0)^2 - c S1 = sum (x - m)^2 for m = m0 + c,
 * c = S1 / n the correction. */
static double mean_ss(const double *x, size_t n, double *ss)
{
    double m0 = diag_sum(x, n) / (double)n, s1, s2;
    diag_sum_dev2(x, n, m0, &s1, &s2);
    double c = s1 / (double)n;
    if (ss) {
        double v = s2 - c * s1;
        *ss = v < 0.0 ? 0.0 : v;   /* NaN (overflow) is passed on */
    }
    return m0 + c;
}

static double mean_of(const double *x, size_t n)
{
    return mean_ss(x, n, NULL);
}

/* Median of X[0..n-1] using SCRATCH (n doubles) for the reordered copy. */
static double median_of(const double *x, size_t n, double *scratch)
{
    memcpy(scratch, x, n * sizeof *x);
    return diag_median_inplace(scratch, n);
}

/* Each group's mean GM[g] and sum of squared deviations GS[g]. */
static void block_moments(const double *d, const size_t *sizes, size_t k, double *gm, double *gs)
{
    const double *p = d;
    for (size_t g = 0; g < k; g++) {
        gm[g] = mean_ss(p, sizes[g], &gs[g]);
        p += sizes[g];
    }
}

/* Between and within sums of squares from each group's mean GM[g] and sum
 * of squared deviations GS[g]; the grand mean is the size-weighted mean of
 * the group means (compensated). */
static void anova_combine(const size_t *sizes, size_t k, const double *gm, const double *gs,
                          double *ssb, double *ssw)
{
    size_t ntot = 0;
    diag_ksum tot = { 0.0, 0.0 }, w = { 0.0, 0.0 };
    for (size_t g = 0; g < k; g++) {
        diag_ksum_add(&tot, (double)sizes[g] * gm[g]);
        diag_ksum_add(&w, gs[g]);
        ntot += sizes[g];
    }
    double grand = diag_ksum_value(&tot) / (double)ntot, b = 0.0;
    for (size_t g = 0; g < k; g++) {
        double dm = gm[g] - grand;
        b += (double)sizes[g] * dm * dm;
    }
    *ssb = b;
    *ssw = diag_ksum_value(&w);
}

/* One-way ANOVA sums on D (already shifted), groups of SIZES.  Fills the
 * between and within sums of squares.  Requires every size > 0; HN_OK or
 * HN_ENOMEM. */
static int anova_sums(const double *d, const size_t *sizes, size_t k, double *ssb, double *ssw)
{
    double *gm = malloc(2 * k * sizeof *gm);
    if (!gm)
        return HN_ENOMEM;
    double *gs = gm + k;
    block_moments(d, sizes, k, gm, gs);
    anova_combine(sizes, k, gm, gs, ssb, ssw);
    free(gm);
    return HN_OK;
}

/* F test from the sums; returns HN_ENUMERIC when a sum overflowed (values
 * near the top of the double range) and HN_ECONST when the within sum is
 * zero. */
static int f_from_sums(double ssb, double ssw, size_t ntot, size_t k,
                       double *F, double *df1, double *df2, double *p)
{
    double d1 = (double)(k - 1), d2 = (double)(ntot - k);
    *df1 = d1;
    *df2 = d2;
    if (!isfinite(ssb) || !isfinite(ssw)) {
        *F = NAN;
        *p = NAN;
        return HN_ENUMERIC;
    }
    if (!(ssw > 0.0)) {
        *F = NAN;
        *p = NAN;
        return HN_ECONST;
    }
    *F = (ssb / d1) / (ssw / d2);
    *p = gsl_cdf_fdist_Q(*F, d1, d2);
    return HN_OK;
}

static int check_groups(const size_t *sizes, size_t k, size_t min_size, size_t *ntot)
{
    size_t t = 0;
    if (!sizes || k < 2)
        return HN_EINVAL;
    for (size_t g = 0; g < k; g++) {
        if (sizes[g] < min_size)
            return HN_ESHORT;
        t += sizes[g];
    }
    if (t <= k)
        return HN_ESHORT;
    *ntot = t;
    return HN_OK;
}

/* Shifted copy of X: d_i = x_i - x_0 (malloc'd; NULL on failure). */
static double *shifted_copy(const double *x, size_t n)
{
    double *d = malloc(n * sizeof *d);
    if (!d)
        return NULL;
    for (size_t i = 0; i < n; i++)
        d[i] = x[i] - x[0];
    return d;
}

/* One-way ANOVA F test of equal group means.
 *   x: the groups one after another; sizes[g] > 0 observations in group g,
 *   ngroups >= 2, total > ngroups.  Outputs F = MSB/MSW, df1 = k-1,
 *   df2 = N-k, p = upper tail of F(df1, df2).  Returns HN_OK, HN_EINVAL,
 *   HN_ESHORT, HN_ECONST (all groups constant: F undefined), HN_ENUMERIC
 *   (sums of squares beyond the double range) or HN_ENOMEM.
 *   Nothing is kept; outputs are NAN on failure. */
int diag_anova_groups(const double *x, const size_t *sizes, size_t ngroups,
                      double *F, double *df1, double *df2, double *p)
{
    size_t ntot = 0;
    *F = *df1 = *df2 = *p = NAN;
    if (!x)
        return HN_EINVAL;
    int rc = check_groups(sizes, ngroups, 1, &ntot);
    if (rc != HN_OK)
        return rc;
    double *d = shifted_copy(x, ntot);
    if (!d)
        return HN_ENOMEM;
    double ssb, ssw;
    rc = anova_sums(d, sizes, ngroups, &ssb, &ssw);
    free(d);
    if (rc != HN_OK)
        return rc;
    return f_from_sums(ssb, ssw, ntot, ngroups, F, df1, df2, p);
}

/* Absolute deviations from each group's median (or mean): Z (N doubles).
 * HN_OK or HN_ENOMEM. */
static int abs_deviations(const double *d, const size_t *sizes, size_t k,
                          int median_centred, double *z)
{
    const double *p = d;
    double *q = z;
    for (size_t g = 0; g < k; g++) {
        double c;
        if (median_centred) {
            if (diag_median(p, sizes[g], &c) != HN_OK)
                return HN_ENOMEM;
        } else {
            c = mean_of(p, sizes[g]);
        }
        for (size_t i = 0; i < sizes[g]; i++)
            q[i] = fabs(p[i] - c);
        p += sizes[g];
        q += sizes[g];
    }
    return HN_OK;
}

/* Levene's test of equal group variances: one-way ANOVA on |x - centre_g|,
 * centre the group median (MEDIAN_CENTRED != 0: the Brown-Forsythe variant)
 * or the group mean.  Arguments and returns as diag_anova_groups, with
 * W the F statistic of the deviations. */
int diag_levene_groups(const double *x, const size_t *sizes, size_t ngroups, int median_centred,
                       double *W, double *df1, double *df2, double *p)
{
    size_t ntot = 0;
    *W = *df1 = *df2 = *p = NAN;
    if (!x)
        return HN_EINVAL;
    int rc = check_groups(sizes, ngroups, 1, &ntot);
    if (rc != HN_OK)
        return rc;
    double *d = shifted_copy(x, ntot);
    double *z = malloc(ntot * sizeof *z);
    if (!d || !z) {
        free(d);
        free(z);
        return HN_ENOMEM;
    }
    double ssb, ssw;
    rc = abs_deviations(d, sizes, ngroups, median_centred, z);
    if (rc == HN_OK)
        rc = anova_sums(z, sizes, ngroups, &ssb, &ssw);
    free(d);
    free(z);
    if (rc != HN_OK)
        return rc;
    return f_from_sums(ssb, ssw, ntot, ngroups, W, df1, df2, p);
}

/* ---- consecutive blocks ---- */

/* Sizes of NB consecutive blocks of N: floor(N/NB) each, the first N % NB
 * blocks one larger. */
static void block_sizes(size_t n, size_t nb, size_t *sizes)
{
    size_t base = n / nb, extra = n % nb;
    for (size_t b = 0; b < nb; b++)
        sizes[b] = base + (b < extra ? 1 : 0);
}

/* Append "; " + TEXT to BUF (size CAP), ending with "..." if it does not fit. */
static void append(char *buf, size_t cap, const char *text)
{
    size_t len = strlen(buf);
    size_t need = strlen(text) + (len ? 2 : 0);
    if (len + need + 4 > cap) {
        if (len + 4 <= cap && (len < 3 || strcmp(buf + len - 3, "...") != 0))
            strcat(buf, "...");
        return;
    }
    if (len)
        strcat(buf, "; ");
    strcat(buf, text);
}

/* Blocks whose mean (WHICH = 0) or sd (WHICH = 1) stands out, in words,
 * into DETAIL, from the block means BM and sums of squared deviations BSS.
 * The global reference is taken robustly, so that one deviant
 * block does not make every other block look deviant: the median of the
 * block means and the median of the block sds.  Rule, Bonferroni over the
 * NB blocks at ALPHA:
 *   mean: |mean_b - median of block means| > z_{1-alpha/(2 NB)} s_w / sqrt(n_b),
 *         s_w the pooled within-block sd;
 *   sd:   (n_b - 1) s_b^2 / s_med^2 outside the chi-square(n_b - 1) quantiles
 *         alpha/(2 NB) and 1 - alpha/(2 NB), s_med the median block sd.
 * SCRATCH holds 2 NB doubles. */
static void describe_blocks(const double *bm, const double *bss, const size_t *sizes, size_t nb,
                            size_t n, double alpha, int which, char *detail, size_t cap,
                            double *scratch)
{
    double *bs = scratch, *tmp = scratch + nb;
    double ssw = 0.0;
    for (size_t b = 0; b < nb; b++) {
        ssw += bss[b];
        bs[b] = sqrt(bss[b] / (double)(sizes[b] - 1));
    }
    double sw = sqrt(ssw / (double)(n - nb));
    double mref = median_of(bm, nb, tmp), sref = median_of(bs, nb, tmp);
    double a = alpha / (2.0 * (double)nb);
    const char *rule = which == 0
        ? "|block mean - median block mean| > z*pooled sd/sqrt(block n)"
        : "block variance outside chi-square band about the median block sd";
    char list[256] = "";
    size_t flagged = 0, start = 0;
    /* the quantiles for the last block size met (the sizes take at most two
     * values, and each inversion is an iteration) */
    double z = gsl_cdf_ugaussian_Qinv(a), qlo = 0.0, qhi = 0.0;
    size_t qm = 0;
    for (size_t b = 0; b < nb; b++) {
        size_t m = sizes[b];
        int out = 0;
        char item[96];
        if (which == 0) {
            out = sw > 0.0 && fabs(bm[b] - mref) > z * sw / sqrt((double)m);
            snprintf(item, sizeof item, "block %zu (obs %zu-%zu) mean %+.3g pooled sd off",
                     b + 1, start + 1, start + m, sw > 0.0 ? (bm[b] - mref) / sw : 0.0);
        } else {
            double nu = (double)(m - 1);
            double q = sref > 0.0 ? nu * bs[b] * bs[b] / (sref * sref) : 0.0;
            if (m != qm) {
                qlo = gsl_cdf_chisq_Pinv(a, nu);
                qhi = gsl_cdf_chisq_Qinv(a, nu);
                qm = m;
            }
            out = sref > 0.0 && (q < qlo || q > qhi);
            snprintf(item, sizeof item, "block %zu (obs %zu-%zu) sd %.3g x median block sd",
                     b + 1, start + 1, start + m, sref > 0.0 ? bs[b] / sref : 0.0);
        }
        if (out) {
            append(list, 120, item);
            flagged++;
        }
        start += m;
    }
    if (flagged)
        snprintf(detail, cap, "%s (rule: %s, Bonferroni over %zu blocks)", list, rule, nb);
    else
        snprintf(detail, cap, "no block %s stands out (rule: %s, Bonferroni over %zu blocks)",
                 which == 0 ? "mean" : "sd", rule, nb);
}

typedef double v2d __attribute__((vector_size(16)));
typedef long v2l __attribute__((vector_size(16)));

/* OUT[i] = X[i] - C, or |X[i] - C| with ABS (OUT may equal X), two values
 * at a time (|.| by clearing the sign bit, as fabs does). */
static void shift_abs(const double *x, size_t n, double c, int abs, double *out)
{
    const v2d vc = { c, c };
    const v2l mag = { 0x7fffffffffffffffL, 0x7fffffffffffffffL };
    size_t i = 0;
    for (; i + 2 <= n; i += 2) {
        v2d v;
        memcpy(&v, x + i, sizeof v);
        v -= vc;
        if (abs)
            v = (v2d)((v2l)v & mag);
        memcpy(out + i, &v, sizeof v);
    }
    for (; i < n; i++)
        out[i] = abs ? fabs(x[i] - c) : x[i] - c;
}

/* The block sums, one block at a time in SCRATCH (room for the largest
 * block, which stays in cache for every pass over it): the shifted values
 * d = x - x_0, their mean BM[g] and sum of squares BSS[g] and, with WHICH
 * (Brown-Forsythe), those of |d - block median|, ZM[g] and ZS[g].  The
 * values and the order of every sum are those of the groups' forms over a
 * shifted copy of all of X.  HN_OK or HN_ENOMEM. */
static int block_pass(const double *x, const size_t *sizes, size_t nb, int which, double *scratch,
                      double *bm, double *bss, double *zm, double *zs)
{
    const double *p = x, x0 = x[0];
    for (size_t g = 0; g < nb; g++) {
        size_t m = sizes[g];
        shift_abs(p, m, x0, 0, scratch);
        bm[g] = mean_ss(scratch, m, &bss[g]);
        if (which) {
            double med;
            if (diag_median(scratch, m, &med) != HN_OK)
                return HN_ENOMEM;
            shift_abs(scratch, m, med, 1, scratch);
            zm[g] = mean_ss(scratch, m, &zs[g]);
        }
        p += m;
    }
    return HN_OK;
}

/* The two block tests from one block pass: BF (Brown-Forsythe of spreads)
 * and AOV (ANOVA of means), either NULL for not wanted.  The block means and
 * sums of squares are the same whether or not BF is wanted, so each test
 * has the same digits alone or in the pair.  Returns BF's code when BF is
 * wanted, else AOV's; *RC_AOV (may be NULL) gets AOV's. */
static int block_tests(const double *x, size_t n, size_t nblocks, double alpha, diag_test *bf,
                       diag_test *aov, int *rc_aov)
{
    diag_test *want[2] = { aov, bf };
    int rcs[2] = { HN_OK, HN_OK };
    if (!x || nblocks < 2 || !(alpha > 0.0 && alpha < 1.0) || n < 3 * nblocks) {
        int rc = n < 3 * nblocks && x && nblocks >= 2 && alpha > 0.0 && alpha < 1.0 ? HN_ESHORT
                                                                                     : HN_EINVAL;
        for (int which = 0; which < 2; which++)
            if (want[which])
                diag_test_invalid(want[which], which ? "brown-forsythe" : "anova", DIAG_VARIANCE,
                                  rc == HN_EINVAL
                                      ? "needs data, at least 2 blocks and 0 < alpha < 1"
                                      : "too few observations for the blocks (3 per block needed)");
        if (rc_aov)
            *rc_aov = rc;
        return rc;
    }
    size_t *sizes = malloc(nblocks * sizeof *sizes);
    double *scratch = malloc(6 * nblocks * sizeof *scratch);
    double *blk = malloc((n / nblocks + 1) * sizeof *blk);
    int rc = sizes && scratch && blk ? HN_OK : HN_ENOMEM;
    /* block means and sums of squares of the shifted data, for the detail
     * and (Brown-Forsythe) the practical size */
    double *bm = NULL, *bss = NULL, *more = NULL, *zm = NULL, *zs = NULL;
    if (rc == HN_OK) {
        bm = scratch;
        bss = scratch + nblocks;
        more = scratch + 2 * nblocks;
        zm = scratch + 4 * nblocks;
        zs = scratch + 5 * nblocks;
        block_sizes(n, nblocks, sizes);
        rc = block_pass(x, sizes, nblocks, bf != NULL, blk, bm, bss, zm, zs);
    }
    free(blk);
    for (int which = 0; which < 2; which++) {
        diag_test *out = want[which];
        const char *name = which ? "brown-forsythe" : "anova";
        if (!out)
            continue;
        if (rc == HN_ENOMEM) {
            diag_test_invalid(out, name, DIAG_VARIANCE, "out of memory");
            rcs[which] = HN_ENOMEM;
            continue;
        }
        double ssb, ssw, F, df1, df2, p;
        if (which)
            anova_combine(sizes, nblocks, zm, zs, &ssb, &ssw);
        else
            anova_combine(sizes, nblocks, bm, bss, &ssb, &ssw);
        int r = f_from_sums(ssb, ssw, n, nblocks, &F, &df1, &df2, &p);
        if (r == HN_ENUMERIC) {
            diag_test_invalid(out, name, DIAG_VARIANCE,
                              "the sums of squares overflow: values too large for the test");
        } else if (r != HN_OK) {
            diag_test_invalid(out, name, DIAG_VARIANCE, "the data are constant within every block");
        } else if (which) {
            /* practical size: largest over smallest block sd */
            double lo = INFINITY, hi = 0.0;
            for (size_t b = 0; b < nblocks; b++) {
                double sd = sqrt(bss[b] / (double)(sizes[b] - 1));
                lo = sd < lo ? sd : lo;
                hi = sd > hi ? sd : hi;
            }
            diag_test_fill(out, name, DIAG_VARIANCE, F, df1, p, alpha, lo > 0.0 ? hi / lo : INFINITY,
                 "largest over smallest block sd");
            describe_blocks(bm, bss, sizes, nblocks, n, alpha, 1, out->detail, sizeof out->detail, more);
        } else {
            diag_test_fill(out, name, DIAG_VARIANCE, F, df1, p, alpha, ssb / (ssb + ssw),
                 "share of variance explained by block means (eta squared)");
            describe_blocks(bm, bss, sizes, nblocks, n, alpha, 0, out->detail, sizeof out->detail, more);
        }
        rcs[which] = r == HN_ECONST || r == HN_ENUMERIC ? r : HN_OK;
    }
    free(sizes);
    free(scratch);
    if (rc_aov)
        *rc_aov = rcs[0];
    return bf ? rcs[1] : rcs[0];
}

/* Brown-Forsythe test of equal variances over NBLOCKS consecutive blocks of
 * X[0..n-1] (sizes differ by at most one, the first blocks larger).  OUT:
 * statistic W ~ F(k-1, n-k), df = k-1 (df2 = n-k in detail's context),
 * effect = largest / smallest block sd; detail names the blocks whose sd
 * stands out (rule stated there and at describe_blocks).  Returns HN_OK, HN_EINVAL, HN_ESHORT
 * (fewer than 3 observations a block), HN_ECONST, HN_ENUMERIC (sums of
 * squares overflow) or HN_ENOMEM. */
int diag_brown_forsythe_blocks(const double *x, size_t n, size_t nblocks, double alpha, diag_test *out)
{
    return block_tests(x, n, nblocks, alpha, out, NULL, NULL);
}

/* One-way ANOVA of the means of NBLOCKS consecutive blocks of X[0..n-1].
 * OUT: F ~ F(k-1, n-k), df = k-1, effect = eta squared; detail names the
 * blocks whose mean stands out.  Returns as diag_brown_forsythe_blocks. */
int diag_anova_blocks(const double *x, size_t n, size_t nblocks, double alpha, diag_test *out)
{
    return block_tests(x, n, nblocks, alpha, NULL, out, NULL);
}

int diag_block_tests(const double *x, size_t n, size_t nblocks, double alpha, diag_test *bf,
                     diag_test *anova, int *rc_anova)
{
    return block_tests(x, n, nblocks, alpha, bf, anova, rc_anova);
}

/* Two-pass mean and sum of squared deviations of X[0..w-1]. */
static void window_exact(const double *x, size_t w, double *m, double *m2)
{
    double mm = mean_of(x, w), s = 0.0;
    for (size_t i = 0; i < w; i++)
        s += (x[i] - mm) * (x[i] - mm);
    *m = mm;
    *m2 = s;
}

/* Rolling mean and sd (divisor w-1) over windows X[i..i+w-1], i = 0..n-w,
 * into MEAN and SD (caller's arrays of n-w+1 doubles; either may be NULL).
 * O(n): each step updates the window mean and sum of squares by removing
 * the oldest and adding the newest value (Welford-style), and every W steps
 * both are recomputed exactly by two passes so that rounding cannot drift.
 * Returns HN_OK, HN_EINVAL (w < 2 or no X) or HN_ESHORT (w > n). */
int diag_rolling(const double *x, size_t n, size_t w, double *mean, double *sd)
{
    if (!x || w < 2)
        return HN_EINVAL;
    if (w > n)
        return HN_ESHORT;
    double m, m2;
    window_exact(x, w, &m, &m2);
    for (size_t i = 0;; i++) {
        if (mean)
            mean[i] = m;
        if (sd)
            sd[i] = sqrt((m2 > 0.0 ? m2 : 0.0) / (double)(w - 1));
        if (i + w >= n)
            break;
        if ((i + 1) % w == 0) {
            window_exact(x + i + 1, w, &m, &m2);
        } else {
            double xo = x[i], xn = x[i + w];
            double mnew = m + (xn - xo) / (double)w;
            m2 += (xn - xo) * ((xn - mnew) + (xo - m));
            m = mnew;
        }
    }
    return HN_OK;
}
