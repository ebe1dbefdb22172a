/* sh_cmd.h - the command table: one entry per command, from which the
 * runner, help and tab completion are all generated. */
#ifndef SH_CMD_H
#define SH_CMD_H

#include "sh_session.h"

typedef int (*sh_handler)(sh_session *s, sh_words *w);

#define SH_MAX_OPTIONS 10

typedef struct {
    const char *name;
    const char *usage;                    /* e.g. "load FILE [column=NAME|N] [time=NAME]" */
    const char *summary;                  /* one line */
    const char *options[SH_MAX_OPTIONS];  /* accepted KEY of KEY=VALUE, NULL-terminated */
    int min_args, max_args;               /* positional words after the name */
    sh_handler fn;
    const char *help;                     /* paragraph for 'help NAME' */
} sh_command;

/* An options list of just SH_FREE_TEXT marks a command whose words are text:
 * KEY=VALUE is not parsed and every word counts as an argument. */
#define SH_FREE_TEXT "*"
int sh_command_free_text(const sh_command *c);

/* The table and its length. */
const sh_command *sh_command_table(int *n);
/* Exact name, or a unique prefix of at least 2 letters; NULL otherwise. */
const sh_command *sh_command_find(const char *name);
/* The command name closest to NAME (for "did you mean"), or NULL. */
const char *sh_command_suggest(const char *name);

/* Check the options (KEY=VALUE keys against C's list, none twice) and the
 * number of positional words of W against C.  0, or -1 with the session's
 * error set and pointing at the offending word. */
int sh_command_check(sh_session *s, const sh_command *c, sh_words *w);

/* Index of the K-th positional word (0-based, after the command name), or -1. */
int sh_arg(const sh_words *w, int k);
/* Number of positional words after the command name. */
int sh_nargs(const sh_words *w);

#endif
