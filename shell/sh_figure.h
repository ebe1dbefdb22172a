/* sh_figure.h - the standard charts of a session (series, residuals, correlograms,
 * rolling moments, QQ, portmanteau profile, forecast fan), built as chart
 * descriptions (sh_chart.h) for the terminal and for reports alike. */
#ifndef SH_FIGURE_H
#define SH_FIGURE_H

#include <stddef.h>

#include "sh_chart.h"
#include "sh_session.h"
#include "fit_forecast.h"

typedef enum {
    SH_FIG_SERIES = 0,   /* the working series */
    SH_FIG_FIT,          /* the working series with the model's fitted values */
    SH_FIG_RESID,        /* residuals e_t (with +-2 sigma_t for GARCH) */
    SH_FIG_ACF,          /* ACF with the band +-z/sqrt(n) */
    SH_FIG_PACF,         /* PACF with the same band */
    SH_FIG_ACF2,         /* ACF of the squared (standardised) residuals */
    SH_FIG_ROLLING,      /* rolling mean and sd against the global ones */
    SH_FIG_QQ,           /* normal QQ plot of the standardised residuals */
    SH_FIG_PROFILE,      /* Ljung-Box p-value at every lag */
    SH_FIG_FAN,          /* forecast fan */
    SH_FIG_NKINDS
} sh_fig_kind;

#define SH_FIG_BUFS 6

typedef struct {
    sh_chart chart;                  /* borrows the buffers and texts below */
    double *buf[SH_FIG_BUFS];        /* owned arrays */
    char title[200];
    char label[4][80];
    char xlabel[80], ylabel[80];
    char caption[400];               /* one sentence on what is shown and how */
} sh_figure;

/* The word for KIND at the prompt ("series", "resid", ...), static storage. */
const char *sh_fig_name(sh_fig_kind kind);

/* Build figure KIND for session S into *F.  Correlograms, rolling moments
 * and QQ use the current model's residuals (standardised for GARCH), or the
 * working series when OF_SERIES is 1 or no model exists (SERIES only for the
 * rolling chart and the correlograms).  PROFILE runs the battery on the
 * current model when it has not been checked.  FAN needs FC, a forecast of
 * the current model (NULL otherwise).  Returns 0, or -1 with a message in
 * ERR; free *F with sh_figure_free in either case. */
int sh_figure_build(sh_session *s, sh_fig_kind kind, int of_series, const fit_forecast *fc,
                    sh_figure *f, char *err, size_t errlen);

/* 1 when model M was fitted to the working series S holds now (same length,
 * file, column and transforms), else 0. */
int sh_figure_model_on_series(const sh_session *s, const sh_model *m);

/* Release the arrays of F (the chart becomes empty). */
void sh_figure_free(sh_figure *f);

#endif
