/* fit_spec.h - the model specification and its text form.
 *
 * Text grammar (case-insensitive, blanks ignored around symbols):
 *   spec  := term { '+' term } { word }
 *   term  := 'arma(' P ',' Q ')' | 'ar(' P ')' | 'ma(' Q ')'
 *          | 'ar[' LAG { ',' LAG } ']' | 'ma[' LAG { ',' LAG } ']'
 *          | 'garch(1,1)'
 *   word  := 't' | 'normal' | 'nomean'
 * 'ar(2)' means AR lags 1 and 2; 'ar[1,7]' means AR lags 1 and 7 only.
 * 'garch(1,1)' alone is a constant mean with a GARCH(1,1) variance;
 * 'arma(0,0)' a constant mean alone.  'nomean' fixes the mean at zero.
 *
 * Parameter order in every parameter vector of libhone:
 *   mu (if mean), ar at each lag, ma at each lag, omega alpha1 beta1 (if garch),
 *   nu (if Student-t). */
#ifndef FIT_SPEC_H
#define FIT_SPEC_H

#include <stddef.h>

#define FIT_MAX_TERMS 32        /* AR or MA lags in one spec */
#define FIT_MAX_LAG 400         /* largest lag accepted */
#define FIT_MAX_PARAMS (1 + 2 * FIT_MAX_TERMS + 4)

typedef enum { FIT_DIST_NORMAL = 0, FIT_DIST_T = 1 } fit_dist;

typedef struct {
    int mean;                      /* 1: constant mu estimated; 0: mean fixed at 0 */
    int n_ar;                      /* number of AR terms */
    int ar_lag[FIT_MAX_TERMS];     /* strictly increasing, >= 1 */
    int n_ma;
    int ma_lag[FIT_MAX_TERMS];
    int garch;                     /* 1: GARCH(1,1) conditional variance */
    fit_dist dist;                 /* innovations; FIT_DIST_T needs garch */
} fit_spec;

/* The constant-mean white-noise spec arma(0,0). */
fit_spec fit_spec_default(void);

/* Parse TEXT into *OUT.  On failure returns HN_EPARSE, writes a message to
 * ERR (ERRLEN bytes) and the 0-based offending offset to *ERRPOS (may be NULL). */
int fit_spec_parse(const char *text, fit_spec *out, char *err, size_t errlen, int *errpos);

/* Canonical text of a spec, e.g. "arma(2,1)+garch(1,1) t".  Returns BUF. */
char *fit_spec_format(const fit_spec *s, char *buf, size_t len);

/* Number of estimated parameters, and the name of parameter I ("mu", "ar1",
 * "ma12", "omega", "alpha1", "beta1", "nu"). */
int fit_spec_nparams(const fit_spec *s);
const char *fit_spec_param_name(const fit_spec *s, int i, char *buf, size_t len);

/* Largest AR lag (observations used as conditioning values) and MA lag. */
int fit_spec_max_ar(const fit_spec *s);
int fit_spec_max_ma(const fit_spec *s);

/* Number of ARMA coefficients (n_ar + n_ma): the portmanteau df adjustment. */
int fit_spec_arma_terms(const fit_spec *s);

/* Add an AR or MA lag to a spec (kept sorted); HN_OK, or HN_EINVAL when the
 * lag is present already, out of range, or the spec is full. */
int fit_spec_add_ar(fit_spec *s, int lag);
int fit_spec_add_ma(fit_spec *s, int lag);

/* 1 when the two specs describe the same model. */
int fit_spec_equal(const fit_spec *a, const fit_spec *b);

#endif
