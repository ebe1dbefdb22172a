/* sh_notes.c - the analyst's notes held in the session. */
#include "sh_notes.h"
#include "sh_session.h"

#include <stdlib.h>
#include <string.h>

int sh_notes_add(sh_session *s, int model, const char *text)
{
    if (s->nnotes == s->notes_cap) {
        int c = s->notes_cap ? 2 * s->notes_cap : 8;
        sh_note *v = realloc(s->notes, (size_t)c * sizeof *v);
        if (!v)
            return -1;
        s->notes = v;
        s->notes_cap = c;
    }
    char *copy = malloc(strlen(text) + 1);
    if (!copy)
        return -1;
    strcpy(copy, text);
    s->notes[s->nnotes].model = model;
    s->notes[s->nnotes].text = copy;
    s->nnotes++;
    return 0;
}

const sh_note *sh_notes_get(const sh_session *s, int *n)
{
    *n = s->nnotes;
    return s->notes;
}

void sh_notes_clear(sh_session *s)
{
    for (int i = 0; i < s->nnotes; i++)
        free(s->notes[i].text);
    free(s->notes);
    s->notes = NULL;
    s->nnotes = s->notes_cap = 0;
}
