/* sh_stamps.h - the time stamps of the loaded column, read again from its file. */
#ifndef SH_STAMPS_H
#define SH_STAMPS_H

#include <stdint.h>
#include "sh_session.h"

typedef struct {
    int64_t *stamp;          /* n_raw stamps of the loaded values (owned) */
    int kind;                /* sh_time_kind */
    int freq;                /* sh_freq */
} sh_stamps;

/* The session keeps only the loaded values, so the file is read again and
 * its time column accepted only when the file gives exactly the loaded
 * values (any missing-value policy).  Returns 0 with *T filled (free
 * T->stamp with free()), or -1 when there are no stamps to be had (no time
 * column, simulated data, or the file changed); then T->stamp is NULL. */
int sh_stamps_load(const sh_session *s, sh_stamps *t);

#endif
