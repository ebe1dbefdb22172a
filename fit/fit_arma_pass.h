/* fit_arma_pass.h - ARMA residual passes kept in registers, for MA lags 1..q (internal to fit/). */
#ifndef FIT_ARMA_PASS_H
#define FIT_ARMA_PASS_H

#include <stddef.h>
#include "fit_spec.h"

/* 1 when fit_arma_pass handles SPEC: MA lags 1..q (or no MA terms) and term
 * counts with a fixed-count copy of the pass; 0 otherwise. */
int fit_arma_pass_covers(const fit_spec *spec);

/* One pass over Y[0..n-1] at the mean parameters MPAR, for a spec that
 * fit_arma_pass_covers; n must exceed the largest AR lag p.  The outputs and
 * the order of every operation are those of the ring-buffer passes behind
 * fit_arma_resid (E, DE, SSR, GSUM) and fit_arma_hessian (HSUM, JTJ); only
 * the last q residuals and their derivatives are kept, in locals instead of
 * a ring in memory.  Below 65536 residuals the results agree with the ring
 * passes' to the last bit.  From there the sums are formed over two
 * stretches, the second from the half-way point (on a second thread when
 * one is free, from a warmed-up state checked bit for bit against the
 * first stretch's end), and added: E and DE still agree to the last bit,
 * the sums to rounding; on one thread or two they are the same bits.
 *   GSUM  must not be NULL: this pass always forms the derivatives;
 *   JTJ   (may be NULL) sum de_t de_t' (nmean x nmean, row-major);
 *   HSUM  (may be NULL) sum (de_t de_t' + e_t d2e_t), the second-derivative
 *         terms formed only for the pairs where they can be non-zero: pairs
 *         of an MA coefficient with any parameter, and (ar_i, mu);
 *   E, DE (may be NULL) as fit_arma_resid.
 * Returns HN_OK, or HN_EDOMAIN for a non-finite SSR, gradient (without
 * HSUM) or HSUM entry, as the passes it stands for. */
int fit_arma_pass(const fit_spec *spec, const double *y, size_t n, const double *mpar,
                  double *e, double *de, double *ssr, double *gsum, double *jtj, double *hsum);

#endif
