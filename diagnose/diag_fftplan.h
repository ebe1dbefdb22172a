/* diag_fftplan.h - FFTW plans shared by the threads, kept across calls (internal to diagnose/).
 *
 * FFTW's planner is not thread-safe and the checks run in parallel threads
 * (scan, batch, the battery's own tasks): every plan is made and destroyed
 * under one lock; executing a plan on new arrays needs none, so one plan
 * serves every thread at once.  Arrays given to a kept plan must come from
 * fftw_alloc_* (or sit at the same alignment), as FFTW's new-array
 * execution requires. */
#ifndef DIAG_FFTPLAN_H
#define DIAG_FFTPLAN_H

#include <fftw3.h>

/* The kinds kept: complex forward and backward in place, real to complex
 * out of place, and forward transforms down the W columns of an array in
 * place (diag_plan_cols). */
enum { DIAG_PLAN_C2C_FWD, DIAG_PLAN_C2C_INV, DIAG_PLAN_R2C, DIAG_PLAN_COLS, DIAG_PLAN_KINDS };

typedef struct diag_plan {
    fftw_plan p;
    int n, w, users, current;  /* w: the columns of a DIAG_PLAN_COLS plan, else 0 */
    unsigned long used;        /* the use counter when last taken */
} diag_plan;

/* A plan of KIND (not DIAG_PLAN_COLS) and length N for arrays like IN/OUT
 * (IN == OUT for the complex kinds); NULL when FFTW cannot make one.
 * Release with diag_plan_release. */
diag_plan *diag_plan_get(int kind, int n, void *in, void *out);
/* Forward transforms of length N down each of the W columns of an array
 * like A (entry k of column j at A[k * W + j]), in place; as above. */
diag_plan *diag_plan_cols(int n, int w, fftw_complex *a);
void diag_plan_release(diag_plan *k);

/* A plan that is not kept: HOWMANY forward complex transforms of length R
 * in place on A, element k of transform j at A[j * DIST + k * STRIDE];
 * NULL when FFTW cannot make one.  Destroy with diag_plan_destroy. */
fftw_plan diag_plan_many(int r, int howmany, fftw_complex *a, int stride, int dist);
void diag_plan_destroy(fftw_plan p);

#endif
