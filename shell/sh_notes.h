/* sh_notes.h - the analyst's own notes of a session, kept for the report.
 *
 * Notes are held beside a session (keyed by its address) because the
 * session struct has no field for them; each note remembers the model that
 * was current when it was written.  The functions are thread-safe (batch
 * runs sessions on threads).  Whoever frees a session should call
 * sh_notes_clear on it, or a later session at the same address would see
 * its notes. */
#ifndef SH_NOTES_H
#define SH_NOTES_H

#include <stddef.h>

struct sh_session;

typedef struct {
    int model;          /* id of the current model when written, 0 = none */
    char *text;         /* owned */
} sh_note;

/* Append a copy of TEXT for session S.  0, or -1 when out of memory. */
int sh_notes_add(const struct sh_session *s, int model, const char *text);
/* The notes of S (count in *N); borrowed, valid until the next change. */
const sh_note *sh_notes_get(const struct sh_session *s, int *n);
/* Drop every note of S. */
void sh_notes_clear(const struct sh_session *s);
/* Give the notes of FROM to TO (TO's own notes are dropped first). */
void sh_notes_move(const struct sh_session *to, const struct sh_session *from);

#endif
