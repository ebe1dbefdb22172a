/* sh_scan.h - a grid of ARMA(p,q) fits, optionally with GARCH(1,1), run on all cores.
 *
 * Each grid cell is fitted and checked into its own slot, so a threaded run
 * gives exactly the results of a serial one; the session's model list is
 * extended afterwards, in grid order (p outer, q inner). */
#ifndef SH_SCAN_H
#define SH_SCAN_H

#include "sh_session.h"
#include "sh_refine.h"

#define SH_SCAN_MAX_ORDER 10

typedef struct {
    int p_min, p_max;       /* AR orders p_min..p_max (at most SH_SCAN_MAX_ORDER) */
    int q_min, q_max;       /* MA orders q_min..q_max */
    int garch;              /* 1: every model has a GARCH(1,1) variance */
    fit_dist dist;          /* FIT_DIST_T needs garch */
    sh_ic by;               /* the criterion that picks the best model */
    double alpha;           /* battery level */
    int lags;               /* battery portmanteau lags, 0 = rule */
    int threads;            /* OpenMP threads, 0 = the runtime's default */
    int progress;           /* 1: a progress line on stderr */
} sh_scan_options;

sh_scan_options sh_scan_default_options(void);

typedef struct {
    fit_spec spec;
    int status;             /* hn_status of the fit (HN_ESHORT when too short) */
    fit_result fit;         /* valid when status == HN_OK; owned until committed */
    int checked;            /* battery valid */
    diag_battery battery;
    diag_options bopt;
    int id;                 /* model id once committed, else 0 */
} sh_scan_cell;

typedef struct {
    int ncells;
    sh_scan_cell *cell;     /* grid order */
    int best;               /* index of the best cell, -1 when none was fitted */
    int best_white;         /* 1: the best is chosen among models that pass */
    int interrupted;        /* Ctrl-C stopped some fits */
} sh_scan_result;

/* Fit and check every cell of the grid on Y[0..n-1].  Returns HN_OK (cells
 * carry their own status), HN_EINVAL (bad options) or HN_ENOMEM.  Free *R
 * with sh_scan_free. */
int sh_scan_run(const double *y, size_t n, const sh_scan_options *opt, sh_scan_result *r);

/* Add the fitted cells to the model list of S in grid order (ownership of
 * fits and batteries moves to the session), origin "scan"; the best model
 * becomes the current one.  Returns the number of models added. */
int sh_scan_commit(sh_session *s, sh_scan_result *r, const char *origin);

void sh_scan_free(sh_scan_result *r);

#endif
