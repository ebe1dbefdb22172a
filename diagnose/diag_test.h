/* diag_test.h - the result of one residual check, shared by every check.
 *
 * Each check is a small pure function over a double array that fills one
 * diag_test; the battery (diag_battery.h) is a table of such checks. */
#ifndef DIAG_TEST_H
#define DIAG_TEST_H

#include <stddef.h>

/* The white-noise criteria.  DIAG_NORMAL is information for intervals and
 * is not part of the white-noise verdict. */
typedef enum {
    DIAG_MEAN = 0,      /* mean zero */
    DIAG_VARIANCE,      /* constant variance over time (global vs local) */
    DIAG_SERIAL,        /* no serial correlation */
    DIAG_VOLATILITY,    /* no volatility clustering */
    DIAG_RANDOM,        /* randomness of order (runs, turning points) */
    DIAG_NORMAL,        /* normality (not part of the verdict) */
    DIAG_NCRIT
} diag_criterion;

/* "mean zero", "constant variance", ... (static storage). */
const char *diag_criterion_name(diag_criterion c);
/* Short identifier for JSON: "mean", "variance", "serial", "volatility",
 * "randomness", "normality". */
const char *diag_criterion_id(diag_criterion c);

typedef struct {
    const char *name;          /* stable identifier, e.g. "ljung-box" (static storage) */
    diag_criterion criterion;
    int valid;                 /* 0: could not be computed; reason in detail */
    double statistic;
    double df;                 /* NAN when the test has no degrees of freedom */
    double p;                  /* p-value; NAN when !valid */
    int pass;                  /* p >= alpha (1 when !valid: no evidence either way) */
    double effect;             /* practical size, NAN when none */
    const char *effect_label;  /* what EFFECT measures (static storage) or NULL */
    char detail[256];          /* e.g. lags or windows that stand out, in words */
} diag_test;

/* Fill T as "not computable" with a reason. */
void diag_test_invalid(diag_test *t, const char *name, diag_criterion c, const char *why);

/* Fill T as a computed check: valid, pass = !(P < ALPHA), detail empty.
 * DF and EFFECT may be NAN; EFFECT_LABEL may be NULL. */
void diag_test_fill(diag_test *t, const char *name, diag_criterion c, double statistic, double df,
                    double p, double alpha, double effect, const char *effect_label);

#endif
