/* diag_test.c - names of the white-noise criteria and the "not computable" result. */
#include "diag_test.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

const char *diag_criterion_name(diag_criterion c)
{
    switch (c) {
    case DIAG_MEAN:       return "mean zero";
    case DIAG_VARIANCE:   return "constant variance";
    case DIAG_SERIAL:     return "no serial correlation";
    case DIAG_VOLATILITY: return "no volatility clustering";
    case DIAG_RANDOM:     return "randomness";
    case DIAG_NORMAL:     return "normality";
    default:              return "unknown criterion";
    }
}

const char *diag_criterion_id(diag_criterion c)
{
    switch (c) {
    case DIAG_MEAN:       return "mean";
    case DIAG_VARIANCE:   return "variance";
    case DIAG_SERIAL:     return "serial";
    case DIAG_VOLATILITY: return "volatility";
    case DIAG_RANDOM:     return "randomness";
    case DIAG_NORMAL:     return "normality";
    default:              return "unknown";
    }
}

void diag_test_invalid(diag_test *t, const char *name, diag_criterion c, const char *why)
{
    memset(t, 0, sizeof *t);
    t->name = name;
    t->criterion = c;
    t->valid = 0;
    t->statistic = NAN;
    t->df = NAN;
    t->p = NAN;
    t->pass = 1;
    t->effect = NAN;
    t->effect_label = NULL;
    snprintf(t->detail, sizeof t->detail, "%s", why ? why : "not computable");
}

void diag_test_fill(diag_test *t, const char *name, diag_criterion c, double statistic, double df,
                    double p, double alpha, double effect, const char *effect_label)
{
    t->name = name;
    t->criterion = c;
    t->valid = 1;
    t->statistic = statistic;
    t->df = df;
    t->p = p;
    t->pass = !(p < alpha);
    t->effect = effect;
    t->effect_label = effect_label;
    t->detail[0] = '\0';
}
