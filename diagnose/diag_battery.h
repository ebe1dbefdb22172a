/* diag_battery.h - the white-noise battery and its overall verdict.
 *
 * The battery is a table of checks (diag_checks.h) run on one residual
 * series.  Each criterion's p-value is the Bonferroni-adjusted smallest p of
 * its checks; Holm's step-down procedure across the white-noise criteria
 * (all but normality) controls the family-wise error at alpha. */
#ifndef DIAG_BATTERY_H
#define DIAG_BATTERY_H

#include <stddef.h>
#include "diag_test.h"

#define DIAG_MAX_TESTS 24

typedef struct {
    int lags;             /* portmanteau m; 0 = rule: min(10, n/5) */
    int df_adjust;        /* ARMA terms p+q removed from the portmanteau df */
    int arch_lags;        /* ARCH-LM q; 0 = rule: 5 (fewer for short series) */
    size_t window;        /* block width for local mean/sd; 0 = rule */
    double alpha;         /* 0.05 by default */
    int standardised;     /* 1: X are standardised residuals of a GARCH model */
} diag_options;

diag_options diag_default_options(void);

typedef struct {
    size_t n;
    int m;                              /* portmanteau lags used */
    const char *lag_rule;               /* how m was chosen, in words */
    size_t window;                      /* block width used */
    const char *window_rule;
    double alpha;
    double band;                        /* z_{1-alpha/2} / sqrt(n) */
    double mean, sd;                    /* of X: divisor n-1 for sd */
    int ntests;
    diag_test tests[DIAG_MAX_TESTS];
    double *acf, *pacf;                 /* lags 1..acf_lags (index 0 = lag 1) */
    int acf_lags;                       /* max(m, 20) capped at n-1 */
    double *profile_q, *profile_p;      /* Ljung-Box Q(k) and p for k = 1..acf_lags */

    double crit_p[DIAG_NCRIT];          /* criterion p (Bonferroni within); NAN if no valid test */
    int crit_pass[DIAG_NCRIT];          /* Holm decision (normality: its own alpha) */
    int holm_rank[DIAG_NCRIT];          /* 1-based Holm step of each criterion, 0 if none */
    int white;                          /* every white-noise criterion passed */
    char summary[512];                  /* plain-words reading of the verdict */
} diag_battery;

/* Run every check on X[0..n-1].  HN_OK (individual checks may be invalid),
 * HN_ESHORT when n < 8, HN_ENOMEM.  Free with diag_battery_free. */
int diag_battery_run(const double *x, size_t n, const diag_options *opt, diag_battery *out);
void diag_battery_free(diag_battery *b);

#endif
