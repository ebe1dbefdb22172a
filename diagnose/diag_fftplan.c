/* diag_fftplan.c - FFTW plans made under one lock and kept for the lengths last used. */
#include "diag_fftplan.h"

#include <stdlib.h>

/* Making a plan costs about half a transform (its trigonometric tables),
 * more for lengths with large prime factors, and it holds the lock
 * meanwhile; so a few plans per kind are kept for the lengths last used (a
 * scan's residual series differ in length by the AR order, and would
 * otherwise take turns evicting one another; the periodogram's chirp
 * lengths stay among them in a batch over many lengths).  A kind keeps at most KEEP
 * plans and KEEP_POINTS points in all, the least recently used going
 * first; a plan still running elsewhere when it is evicted is freed by its
 * last user. */
#define KEEP 8
#define KEEP_POINTS (1L << 22)

static diag_plan *kept[DIAG_PLAN_KINDS][KEEP];
static unsigned long uses;

static void plan_drop(diag_plan *k)
{
    k->current = 0;
    if (k->users == 0) {
        fftw_destroy_plan(k->p);
        free(k);
    }
}

static diag_plan *plan_take(int kind, int n, int w, void *in, void *out)
{
    diag_plan *k = NULL;
#pragma omp critical(diag_fftw_planner)
    {
        diag_plan **slot = kept[kind];
        for (int i = 0; i < KEEP && !k; i++)
            if (slot[i] && slot[i]->n == n && slot[i]->w == w)
                k = slot[i];
        if (!k) {
            fftw_plan p = kind == DIAG_PLAN_R2C
                ? fftw_plan_dft_r2c_1d(n, in, out, FFTW_ESTIMATE)
                : kind == DIAG_PLAN_COLS
                ? fftw_plan_many_dft(1, &n, w, in, NULL, w, 1, in, NULL, w, 1, FFTW_FORWARD,
                                     FFTW_ESTIMATE)
                : fftw_plan_dft_1d(n, in, out,
                                   kind == DIAG_PLAN_C2C_FWD ? FFTW_FORWARD : FFTW_BACKWARD,
                                   FFTW_ESTIMATE);
            k = p ? malloc(sizeof *k) : NULL;
            if (k) {
                k->p = p;
                k->n = n;
                k->w = w;
                k->users = 0;
                k->current = 1;
                /* room: an empty slot, else the least recently used; then
                 * the oldest others while the points kept exceed the cap */
                long points = (long)n * (w ? w : 1);
                for (int i = 0; i < KEEP; i++)
                    if (slot[i])
                        points += (long)slot[i]->n * (slot[i]->w ? slot[i]->w : 1);
                for (;;) {
                    int old = -1, empty = -1, live = 0;
                    for (int i = 0; i < KEEP; i++) {
                        if (!slot[i]) {
                            empty = i;
                            continue;
                        }
                        live++;
                        if (old < 0 || slot[i]->used < slot[old]->used)
                            old = i;
                    }
                    if (empty >= 0 && (points <= KEEP_POINTS || live == 0)) {
                        slot[empty] = k;
                        break;
                    }
                    points -= (long)slot[old]->n * (slot[old]->w ? slot[old]->w : 1);
                    plan_drop(slot[old]);
                    slot[old] = NULL;
                }
            } else if (p) {
                fftw_destroy_plan(p);
            }
        }
        if (k) {
            k->users++;
            k->used = ++uses;
        }
    }
    return k;
}

diag_plan *diag_plan_get(int kind, int n, void *in, void *out)
{
    return kind == DIAG_PLAN_COLS ? NULL : plan_take(kind, n, 0, in, out);
}

diag_plan *diag_plan_cols(int n, int w, fftw_complex *a)
{
    return n > 0 && w > 0 ? plan_take(DIAG_PLAN_COLS, n, w, a, a) : NULL;
}

void diag_plan_release(diag_plan *k)
{
    if (!k)
        return;
#pragma omp critical(diag_fftw_planner)
    {
        k->users--;
        if (!k->current && k->users == 0) {
            fftw_destroy_plan(k->p);
            free(k);
        }
    }
}

fftw_plan diag_plan_many(int r, int howmany, fftw_complex *a, int stride, int dist)
{
    fftw_plan p;
#pragma omp critical(diag_fftw_planner)
    p = fftw_plan_many_dft(1, &r, howmany, a, NULL, stride, dist, a, NULL, stride, dist,
                           FFTW_FORWARD, FFTW_ESTIMATE);
    return p;
}

void diag_plan_destroy(fftw_plan p)
{
    if (!p)
        return;
#pragma omp critical(diag_fftw_planner)
    fftw_destroy_plan(p);
}
