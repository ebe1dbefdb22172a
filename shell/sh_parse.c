/* sh_parse.c - command-line words, options and strict numbers. */
#include "sh_parse.h"
#include "hn_status.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

int sh_words_split(const char *line, sh_words *w, int *errpos, const char **why)
{
    size_t len = strlen(line);
    memset(w, 0, sizeof *w);
    w->store = malloc(len + 1);
    if (!w->store)
        return HN_ENOMEM;
    char *out = w->store;
    size_t i = 0;
    for (;;) {
        while (i < len && (line[i] == ' ' || line[i] == '\t' || line[i] == '\r' || line[i] == '\n'))
            i++;
        if (i >= len || line[i] == '#')
            break;
        if (w->n >= SH_MAX_WORDS) {
            if (errpos) *errpos = (int)i;
            if (why) *why = "too many words on one line (at most 64)";
            sh_words_free(w);
            return HN_EPARSE;
        }
        w->offset[w->n] = (int)i;
        w->word[w->n] = out;
        while (i < len && line[i] != ' ' && line[i] != '\t' && line[i] != '\r' && line[i] != '\n') {
            if (line[i] == '"') {
                size_t q = i++;
                while (i < len && line[i] != '"') {
                    if (line[i] == '\\' && i + 1 < len && (line[i + 1] == '"' || line[i + 1] == '\\'))
                        i++;
                    *out++ = line[i++];
                }
                if (i >= len) {
                    if (errpos) *errpos = (int)q;
                    if (why) *why = "unterminated quote";
                    sh_words_free(w);
                    return HN_EPARSE;
                }
                i++;
            } else {
                *out++ = line[i++];
            }
        }
        *out++ = '\0';
        w->n++;
    }
    return HN_OK;
}

void sh_words_free(sh_words *w)
{
    free(w->store);
    memset(w, 0, sizeof *w);
}

int sh_words_option(sh_words *w, const char *key)
{
    size_t k = strlen(key);
    for (int i = 1; i < w->n; i++)
        if (!strncmp(w->word[i], key, k) && w->word[i][k] == '=') {
            w->used[i] = 1;
            return i;
        }
    return -1;
}

const char *sh_words_value(sh_words *w, const char *key)
{
    int i = sh_words_option(w, key);
    return i < 0 ? NULL : w->word[i] + strlen(key) + 1;
}

int sh_parse_double(const char *s, double *out)
{
    char *end;
    if (!s || !*s)
        return -1;
    errno = 0;
    double x = strtod(s, &end);
    if (*end || errno == ERANGE || !isfinite(x))
        return -1;
    /* strtod accepts "nan", "inf" and hex floats: refuse the words. */
    for (const char *p = s; *p; p++)
        if (*p == 'n' || *p == 'N' || *p == 'i' || *p == 'I' || *p == 'x' || *p == 'X')
            return -1;
    *out = x;
    return 0;
}

int sh_parse_long(const char *s, long *out)
{
    char *end;
    if (!s || !*s)
        return -1;
    errno = 0;
    long x = strtol(s, &end, 10);
    if (*end || errno == ERANGE)
        return -1;
    *out = x;
    return 0;
}

int sh_parse_range(const char *s, long *lo, long *hi)
{
    const char *dots = strstr(s, "..");
    if (!dots)
        return sh_parse_long(s, lo) ? -1 : (*hi = *lo, 0);
    char a[32];
    size_t k = (size_t)(dots - s);
    if (k == 0 || k >= sizeof a)
        return -1;
    memcpy(a, s, k);
    a[k] = '\0';
    if (sh_parse_long(a, lo) || sh_parse_long(dots + 2, hi) || *hi < *lo)
        return -1;
    return 0;
}

char **sh_split_commands(const char *text, int *n)
{
    size_t len = strlen(text);
    char **v = calloc(len / 2 + 2, sizeof *v);
    int k = 0, inq = 0;
    size_t start = 0;
    if (!v)
        return NULL;
    for (size_t i = 0; i <= len; i++) {
        if (text[i] == '"' && (i == 0 || text[i - 1] != '\\'))
            inq = !inq;
        if ((text[i] == ';' && !inq) || text[i] == '\0') {
            size_t l = i - start;
            char *c = malloc(l + 1);
            if (!c) {
                sh_free_commands(v, k);
                return NULL;
            }
            memcpy(c, text + start, l);
            c[l] = '\0';
            v[k++] = c;
            start = i + 1;
        }
    }
    *n = k;
    return v;
}

void sh_free_commands(char **cmds, int n)
{
    for (int i = 0; i < n; i++)
        free(cmds[i]);
    free(cmds);
}
