/* sh_refine.h - advice for the current model, and the step and refine engines that follow it.
 *
 * Nothing here prints: the commands in sh_cmd_advise.c render the results.
 *
 * Comparing models.  A model is clearly better than another when its
 * residuals pass more of the five white-noise criteria, or as many and its
 * information criterion (AICc or BIC) is smaller by more than
 * SH_IC_MARGIN = 2 units (a difference below 2 is commonly read as no real
 * evidence between two models).  The criteria are compared per residual,
 * IC/N with N = n_eff, scaled back by the smaller N: models with a larger
 * AR lag condition on more observations and sum fewer likelihood terms.
 * Among the proposals of one round the higher-ranked advice is kept unless
 * a later one passes more criteria, or as many with a criterion smaller by
 * more than a near-tie band: 2 plus one residual's share of the criterion
 * (IC/N) for each residual by which the two counts differ, since scaling
 * per residual is no more exact than that.  Within the band the proposal
 * with fewer parameters wins, then the one with fewer MA terms: when the
 * data cannot tell an AR term from an MA term, the AR form (linear in its
 * coefficients, conditioned on observed values) is kept, as is common
 * practice. */
#ifndef SH_REFINE_H
#define SH_REFINE_H

#include "sh_session.h"
#include "diag_advise.h"

#define SH_REFINE_MAX_STEPS 50
#define SH_REFINE_DEFAULT_STEPS 8
#define SH_IC_MARGIN 2.0

typedef enum { SH_IC_AICC = 0, SH_IC_BIC = 1 } sh_ic;

/* Information criterion IC of F divided by its residual count. */
double sh_ic_per_obs(const fit_result *f, sh_ic ic);

/* Number of white-noise criteria (mean, variance, serial, volatility,
 * randomness) battery B passes. */
int sh_criteria_passed(const diag_battery *b);

/* Advice for model M of session S: runs the battery first when M has not
 * been checked; the context holds the session's seasonal period, the
 * series length, every spec already fitted to the same series and, when
 * the mean criterion fails, the unit-root tests of the working series.
 * Returns HN_OK or the failing status (battery, advice). */
int sh_advise_model(sh_session *s, sh_model *m, diag_advice_list *out);

/* Fit SPEC to the working series, add it to the model list with PARENT and
 * ORIGIN, and run the battery on it.  On HN_OK *ID is the new model's id;
 * on failure nothing is added and the status is returned (HN_ESHORT when
 * the series is shorter than fit_min_obs). */
int sh_fit_and_check(sh_session *s, const fit_spec *spec, int parent, const char *origin, int *id);

typedef struct {
    int max_steps;          /* rounds of advice (1..SH_REFINE_MAX_STEPS) */
    sh_ic by;               /* tie-break criterion */
} sh_refine_options;

sh_refine_options sh_refine_default_options(void);

typedef enum {
    SH_STOP_WHITE = 0,      /* the residuals pass (and no accepted change remains) */
    SH_STOP_NO_IMPROVEMENT, /* every proposal was fitted; none was better */
    SH_STOP_NO_ADVICE,      /* no rule proposed a model */
    SH_STOP_BUDGET,         /* max_steps rounds used */
    SH_STOP_INTERRUPTED,    /* Ctrl-C; finished models kept */
    SH_STOP_ERROR           /* the battery or advice failed */
} sh_stop;

typedef struct {
    int from_id;            /* model whose advice was followed */
    int tried;              /* proposals fitted in this round */
    int failed;             /* proposals that could not be fitted */
    int first_id, last_id;  /* ids of the models added this round (0 when none) */
    int chosen_id;          /* the better model moved to, 0 when none */
    int passed;             /* criteria the chosen model passes */
    int white;
    double ic;              /* its criterion per residual */
    char spec[128];         /* its spec text */
    char evidence[400];     /* the advice that produced it */
} sh_refine_step;

typedef struct {
    int nsteps;
    sh_refine_step step[SH_REFINE_MAX_STEPS];
    int start_id, final_id;
    int fitted;             /* models added to the list in all */
    sh_stop stop;
    char why[400];          /* the closing reason in words */
} sh_refine_result;

/* Refine from the current model of S: each round takes the advice, fits and
 * checks every proposed model (all of them are added to the list, parent =
 * the round's model, origin = the advice), and moves to the best proposal
 * if it is clearly better than the round's model (see above).  When the
 * round's model already passes, only a proposal that still passes is
 * accepted: with a criterion smaller by more than 2, or, having fewer
 * parameters, smaller at all.  Stops at the first of: passes with nothing
 * accepted, no improvement, no advice, max_steps rounds, Ctrl-C.  The
 * current model is the final one.  OPT may be NULL.  Returns HN_OK (the
 * reason is in *R) or HN_EINVAL when there is no current model. */
int sh_refine(sh_session *s, const sh_refine_options *opt, sh_refine_result *r);

#endif
