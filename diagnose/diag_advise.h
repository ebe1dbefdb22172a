/* diag_advise.h - advice on the next model from the criteria a battery failed.
 *
 * Rules (docs/advice.md explains them in full):
 *   no serial correlation fails: a residual PACF spike at lag k proposes an
 *     AR term at k (the next order when k is one past a full AR(p), a
 *     chosen-lag term otherwise); an ACF spike at k an MA term at k; a spike
 *     at the seasonal period is labelled seasonal; the next AR lag and the
 *     next MA lag are always offered as the smallest change (on the
 *     criterion's p when no single lag leaves the band);
 *   mean zero fails: difference when the unit-root result says so, else add
 *     the constant when the model has none, else name a level shift;
 *   volatility clustering fails without GARCH: add GARCH(1,1) (and, when the
 *     residuals are heavy-tailed, also GARCH(1,1) with Student-t);
 *   clustering gone with GARCH, normality fails with excess kurtosis > 0:
 *     Student-t innovations;
 *   constant variance fails without volatility clustering: a break or a
 *     variance-stabilising transform, not GARCH (no model proposed);
 *   nothing failed: the model is adequate; simpler neighbours are offered.
 * Bounds: a lag k is proposed only when k < n/4 and k <= the ACF/PACF lags
 * the battery computed; a model only when it keeps at least
 * obs_per_param residuals per estimated parameter, needs no more than n
 * observations by fit_min_obs, stays within the term limits, and is not in
 * the list of models already fitted.  The strength of each item is
 * -log10 of its evidence p-value; items are ranked strongest first. */
#ifndef DIAG_ADVISE_H
#define DIAG_ADVISE_H

#include <stddef.h>
#include "diag_battery.h"
#include "diag_unitroot.h"
#include "fit_spec.h"

#define DIAG_MAX_ADVICE 16

typedef enum {
    DIAG_ADV_AR = 0,        /* add an AR term (next order or chosen lag) */
    DIAG_ADV_MA,            /* add an MA term */
    DIAG_ADV_SEASONAL_AR,   /* AR term at the seasonal lag */
    DIAG_ADV_SEASONAL_MA,   /* MA term at the seasonal lag */
    DIAG_ADV_CONSTANT,      /* estimate the constant */
    DIAG_ADV_DIFFERENCE,    /* difference the series (no spec) */
    DIAG_ADV_LEVEL_SHIFT,   /* mean not zero with a constant: a break (no spec) */
    DIAG_ADV_GARCH,         /* add a GARCH(1,1) variance */
    DIAG_ADV_STUDENT_T,     /* Student-t innovations */
    DIAG_ADV_VARIANCE_SHIFT,/* variance break or transform (no spec) */
    DIAG_ADV_VOL_REMAINS,   /* clustering left with GARCH(1,1) (no spec) */
    DIAG_ADV_ADEQUATE,      /* nothing failed (no spec) */
    DIAG_ADV_SIMPLER        /* a simpler neighbour, for parsimony */
} diag_advice_kind;

typedef struct {
    diag_advice_kind kind;
    int has_spec;               /* 1: SPEC is a model to fit */
    fit_spec spec;
    char spec_text[128];        /* canonical text of SPEC, "" when none */
    diag_criterion criterion;   /* the criterion behind it */
    const char *check;          /* check name, e.g. "pacf", "mcleod-li" (static), or NULL */
    int lag;                    /* lag of a spike, 0 when none */
    double statistic;           /* spike value or test statistic; NAN when none */
    double p;                   /* evidence p-value; NAN when none */
    double strength;            /* -log10 p (ranking key); 0 for parsimony */
    int rank;                   /* 1 = strongest */
    char reason[400];           /* the evidence in words */
} diag_advice;

typedef struct {
    size_t n;                   /* observations of the series; 0: the battery's n */
    int season;                 /* seasonal period (7, 5, 12, 4, 52) or 0 */
    const diag_unitroot *unitroot;  /* pre-fit unit-root result, or NULL */
    const fit_spec *fitted;     /* models already fitted to this series, or NULL */
    int nfitted;
    int max_ar_terms;           /* AR terms in one model (default 6) */
    int max_ma_terms;           /* MA terms in one model (default 6) */
    int obs_per_param;          /* residuals per estimated parameter (default 10) */
    int spikes;                 /* strongest spikes used per function (default 2) */
} diag_advise_context;

typedef struct {
    int n;
    diag_advice item[DIAG_MAX_ADVICE];
    int adequate;               /* the battery passed */
    int dropped;                /* proposals left out by the bounds or as fitted already */
    char dropped_why[256];      /* the first such reason, in words */
} diag_advice_list;

/* Defaults listed beside the fields above; N, SEASON, UNITROOT and FITTED
 * empty. */
diag_advise_context diag_advise_default_context(void);

/* Advice for a model CUR whose residuals gave battery B.  CTX may be NULL
 * for the defaults.  Fills *OUT (no allocation; nothing to free), items
 * ranked strongest first.  Returns HN_OK or HN_EINVAL (NULL arguments, a
 * battery without ACF/PACF). */
int diag_advise(const diag_battery *b, const fit_spec *cur, const diag_advise_context *ctx,
                diag_advice_list *out);

/* 1 when SPEC is within the bounds above for a series of N observations
 * (CTX may be NULL); when it is not and WHY is given, the reason is written
 * there (LEN bytes). */
int diag_advise_supported(const fit_spec *spec, size_t n, const diag_advise_context *ctx, char *why,
                          size_t len);

/* Short identifier of a kind for JSON: "ar", "ma", "seasonal-ar", ... */
const char *diag_advice_kind_id(diag_advice_kind k);

#endif
