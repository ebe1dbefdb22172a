/* sh_notes.h - the analyst's own notes of a session, kept for the journal
 * and the report.  Each note remembers the model that was current when it
 * was written.  The notes live in the session (sh_session.notes) and are
 * freed with it. */
#ifndef SH_NOTES_H
#define SH_NOTES_H

#include <stddef.h>

struct sh_session;

typedef struct {
    int model;          /* id of the current model when written, 0 = none */
    char *text;         /* owned */
} sh_note;

/* Append a copy of TEXT to session S.  0, or -1 when out of memory. */
int sh_notes_add(struct sh_session *s, int model, const char *text);
/* The notes of S (count in *N); borrowed, valid until the next change. */
const sh_note *sh_notes_get(const struct sh_session *s, int *n);
/* Drop every note of S. */
void sh_notes_clear(struct sh_session *s);

#endif
