/* diag_checks.h - the individual residual checks (one pure function each).
 *
 * Every check reads X[0..n-1] and fills *OUT (see diag_test.h); it returns
 * HN_OK, or HN_ESHORT / HN_EINVAL / HN_ENOMEM, in which case *OUT is marked
 * invalid with the reason.  ALPHA decides OUT->pass. */
#ifndef DIAG_CHECKS_H
#define DIAG_CHECKS_H

#include <stddef.h>
#include "diag_stats.h"
#include "diag_test.h"

/* --- mean zero, serial correlation (diag_portmanteau.c, diag_stats.c) --- */
int diag_mean_ttest(const double *x, size_t n, double alpha, diag_test *out);
/* The same from the mean and sd (divisor n-1) of the N values, as
 * diag_mean_sd gives them. */
int diag_mean_ttest_from(double mean, double sd, size_t n, double alpha, diag_test *out);
/* Ljung-Box / Box-Pierce on ACF lags 1..m with df = m - df_adjust. */
int diag_ljung_box(const double *x, size_t n, int m, int df_adjust, double alpha, diag_test *out);
int diag_box_pierce(const double *x, size_t n, int m, int df_adjust, double alpha, diag_test *out);
/* Cumulative periodogram with Bartlett's Kolmogorov-Smirnov bound. */
int diag_cum_periodogram(const double *x, size_t n, double alpha, diag_test *out);
/* The same three from autocorrelations already computed (diag_acf of the
 * same X, divisor n): ACF[0..nlags-1] holds r_1..r_nlags, with nlags at
 * least diag_share_order(n) (for the effect) and, for the portmanteau
 * tests, at least m; ACF is only read and stays the caller's.  They give
 * what the X-taking forms give when ACF equals what those compute (for
 * the direct route of diag_acf, bit for bit).  HN_EINVAL, OUT marked
 * invalid, when NLAGS is too small. */
int diag_ljung_box_acf(const double *acf, int nlags, size_t n, int m, int df_adjust,
                       double alpha, diag_test *out);
int diag_box_pierce_acf(const double *acf, int nlags, size_t n, int m, int df_adjust,
                        double alpha, diag_test *out);
int diag_cum_periodogram_acf(const double *x, size_t n, const double *acf, int nlags,
                             double alpha, diag_test *out);
/* The same with D[0..n-1], X less its mean as diag_center gives it (only
 * read), in place of its own centred copy. */
int diag_cum_periodogram_centred(const double *x, const double *d, size_t n, const double *acf,
                                 int nlags, double alpha, diag_test *out);
/* The same from D alone, without the practical size (effect NAN, no
 * label): for a caller that sets it from its own ACF. */
int diag_cum_periodogram_bare(const double *d, size_t n, double alpha, diag_test *out);

/* --- constant variance: global against local (diag_variance.c) --- */
/* Equality of block variances (Brown-Forsythe: Levene on |x - block median|)
 * and of block means (one-way ANOVA), X cut into NBLOCKS consecutive blocks. */
int diag_brown_forsythe_blocks(const double *x, size_t n, size_t nblocks, double alpha, diag_test *out);
int diag_anova_blocks(const double *x, size_t n, size_t nblocks, double alpha, diag_test *out);
/* Both from one pass over the blocks (each with the digits it has alone):
 * returns Brown-Forsythe's code, *RC_ANOVA gets ANOVA's. */
int diag_block_tests(const double *x, size_t n, size_t nblocks, double alpha, diag_test *bf,
                     diag_test *anova, int *rc_anova);
/* The same tests for arbitrary groups: X holds the groups one after another,
 * SIZES[g] observations in group g.  F statistic, dfs and p returned. */
int diag_anova_groups(const double *x, const size_t *sizes, size_t ngroups,
                      double *F, double *df1, double *df2, double *p);
int diag_levene_groups(const double *x, const size_t *sizes, size_t ngroups, int median_centred,
                       double *W, double *df1, double *df2, double *p);
/* Rolling-window mean and sd (divisor w-1) of width W: n-w+1 values each. */
int diag_rolling(const double *x, size_t n, size_t w, double *mean, double *sd);

/* --- volatility clustering (diag_arch.c) --- */
int diag_mcleod_li(const double *x, size_t n, int m, double alpha, diag_test *out);
/* McLeod-Li from ACF2[0..nlags-1], the autocorrelations of x^2 (nlags >= m;
 * only read); as diag_mcleod_li for that ACF. */
int diag_mcleod_li_acf(const double *acf2, int nlags, size_t n, int m, double alpha,
                       diag_test *out);
/* Engle's ARCH-LM: regress x_t^2 on 1, x_{t-1}^2..x_{t-q}^2; statistic (n-q) R^2, df q.
 * Returns HN_OK; HN_EINVAL; HN_ESHORT (n < 2q + 3); HN_ENUMERIC (a value not
 * finite, or the squares' sums overflow); HN_ECONST (regressand constant);
 * HN_ESINGULAR (collinear lags); HN_ENOMEM.  OUT is marked invalid on failure. */
int diag_arch_lm(const double *x, size_t n, int q, double alpha, diag_test *out);
/* The same from S and LAG[0..nlags-1] (nlags >= q), diag_lag_sums_of for
 * the squares of X (only read; X is read for its first and last q values):
 * the digits of diag_arch_lm. */
int diag_arch_lm_sums(const double *x, size_t n, int q, const diag_lag_sums *s,
                      const double *lag, int nlags, double alpha, diag_test *out);

/* --- randomness (diag_runs.c) --- */
/* Wald-Wolfowitz runs above/below the median (values equal to the median dropped). */
int diag_runs_test(const double *x, size_t n, double alpha, diag_test *out);
int diag_turning_points(const double *x, size_t n, double alpha, diag_test *out);

/* --- normality, information only (diag_normal.c) --- */
/* Jarque-Bera with biased (divisor n) moments; also skewness and excess kurtosis. */
int diag_jarque_bera(const double *x, size_t n, double alpha, diag_test *out,
                     double *skewness, double *excess_kurtosis);
/* The same from D[0..n-1], X less its mean as diag_center gives it. */
int diag_jarque_bera_centred(const double *d, size_t n, double alpha, diag_test *out,
                             double *skewness, double *excess_kurtosis);

#endif
