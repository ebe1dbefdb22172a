/* sh_notes.c - per-session lists of the analyst's notes. */
#include "sh_notes.h"

#include <pthread.h>
#include <stdlib.h>
#include <string.h>

typedef struct {
    const struct sh_session *owner;
    sh_note *v;
    int n, cap;
} note_list;

#define MAX_LISTS 16            /* sessions alive at once (replay nests a few) */
static note_list lists[MAX_LISTS];
static pthread_mutex_t lock = PTHREAD_MUTEX_INITIALIZER;   /* batch runs sessions on threads */

static note_list *find(const struct sh_session *s, int create)
{
    for (int i = 0; i < MAX_LISTS; i++)
        if (lists[i].owner == s)
            return &lists[i];
    if (!create)
        return NULL;
    for (int i = 0; i < MAX_LISTS; i++)
        if (!lists[i].owner) {
            memset(&lists[i], 0, sizeof lists[i]);
            lists[i].owner = s;
            return &lists[i];
        }
    return NULL;
}

static int add_locked(const struct sh_session *s, int model, const char *text)
{
    note_list *l = find(s, 1);
    if (!l)
        return -1;
    if (l->n == l->cap) {
        int c = l->cap ? 2 * l->cap : 8;
        sh_note *v = realloc(l->v, (size_t)c * sizeof *v);
        if (!v)
            return -1;
        l->v = v;
        l->cap = c;
    }
    char *t = strdup(text);
    if (!t)
        return -1;
    l->v[l->n].model = model;
    l->v[l->n].text = t;
    l->n++;
    return 0;
}

int sh_notes_add(const struct sh_session *s, int model, const char *text)
{
    pthread_mutex_lock(&lock);
    int rc = add_locked(s, model, text);
    pthread_mutex_unlock(&lock);
    return rc;
}

const sh_note *sh_notes_get(const struct sh_session *s, int *n)
{
    pthread_mutex_lock(&lock);
    note_list *l = find(s, 0);
    *n = l ? l->n : 0;
    const sh_note *v = l ? l->v : NULL;
    pthread_mutex_unlock(&lock);
    return v;
}

static void clear_locked(const struct sh_session *s)
{
    note_list *l = find(s, 0);
    if (!l)
        return;
    for (int i = 0; i < l->n; i++)
        free(l->v[i].text);
    free(l->v);
    memset(l, 0, sizeof *l);
}

void sh_notes_clear(const struct sh_session *s)
{
    pthread_mutex_lock(&lock);
    clear_locked(s);
    pthread_mutex_unlock(&lock);
}

void sh_notes_move(const struct sh_session *to, const struct sh_session *from)
{
    pthread_mutex_lock(&lock);
    clear_locked(to);
    note_list *l = find(from, 0);
    if (l)
        l->owner = to;
    pthread_mutex_unlock(&lock);
}
