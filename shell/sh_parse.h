/* sh_parse.h - split a command line into words and key=value options.
 *
 * Words are separated by blanks; double quotes group a word (with \" and \\
 * inside); '#' at the start of a word begins a comment to the end of line.
 * Each word keeps its byte offset in the line, so errors can point at it. */
#ifndef SH_PARSE_H
#define SH_PARSE_H

#include <stddef.h>

#define SH_MAX_WORDS 64

typedef struct {
    int n;                        /* words */
    char *word[SH_MAX_WORDS];     /* NUL-terminated copies (owned) */
    int offset[SH_MAX_WORDS];     /* byte offset of each word in the line */
    int used[SH_MAX_WORDS];       /* set by the getters: word consumed */
    char *store;                  /* backing storage */
} sh_words;

/* Split LINE.  HN_OK, HN_EPARSE (unterminated quote: *ERRPOS at the quote;
 * too many words), HN_ENOMEM.  Free with sh_words_free. */
int sh_words_split(const char *line, sh_words *w, int *errpos, const char **why);
void sh_words_free(sh_words *w);

/* Index of the option KEY=... among words 1.., or -1.  Marks it used. */
int sh_words_option(sh_words *w, const char *key);
/* Value text of option KEY, or NULL. */
const char *sh_words_value(sh_words *w, const char *key);

/* Strict number parsing (whole text, C locale, finite).  0 on success. */
int sh_parse_double(const char *s, double *out);
int sh_parse_long(const char *s, long *out);
/* "a..b" ranges of whole numbers (a may equal b; "3" alone means 3..3). */
int sh_parse_range(const char *s, long *lo, long *hi);

/* Split a -c argument at ';' outside quotes: returns a malloc'd array of
 * malloc'd strings (count in *N); NULL on allocation failure. */
char **sh_split_commands(const char *text, int *n);
void sh_free_commands(char **cmds, int n);

#endif
