/* fit_roots.h - inverse roots of AR and MA lag polynomials (internal to fit/). */
#ifndef FIT_ROOTS_H
#define FIT_ROOTS_H

#include "fit.h"

/* Inverse roots of the lag polynomial 1 - sum_k c_k z^k (SIGN = -1, AR side)
 * or 1 + sum_k c_k z^k (SIGN = +1, MA side), where COEF[k-1] = c_k for
 * k = 1..P (zero at lags not in the model).  They are the eigenvalues of
 * the P x P companion matrix (LAPACKE_dgeev); the polynomial's roots are
 * their reciprocals, so |root| < 1 for all inverse roots means stationary
 * (AR) or invertible (MA).  OUT receives P values (caller-owned), sorted by
 * decreasing modulus.  P = 0 is valid (nothing written).  Returns HN_OK,
 * HN_EINVAL, HN_ENOMEM or HN_ENUMERIC (eigenvalue iteration failed). */
int fit_inverse_roots(const double *coef, int P, int sign, fit_complex *out);

/* Largest modulus among N inverse roots (0 when N = 0). */
double fit_roots_max_modulus(const fit_complex *r, int n);

/* Fill the AR/MA inverse roots of the mean part of RES (its spec and par),
 * allocating res->ar_roots / res->ma_roots (freed by fit_result_free), and
 * set res->stationary, res->invertible and the warnings
 * FIT_WARN_NONSTATIONARY (an AR modulus >= 1), FIT_WARN_NONINVERTIBLE (an MA
 * modulus >= 1) and FIT_WARN_NEAR_UNIT_ROOT (an AR modulus within 0.01 of 1).
 * Returns HN_OK, HN_ENOMEM or HN_ENUMERIC. */
int fit_result_roots(fit_result *res);

#endif
