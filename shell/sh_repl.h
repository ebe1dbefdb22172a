/* sh_repl.h - the two ways commands arrive: a terminal prompt with line
 * editing, and command files (or piped standard input). */
#ifndef SH_REPL_H
#define SH_REPL_H

#include <stdio.h>
#include "sh_session.h"

/* Run commands from F, named NAME in messages ("FILE:LINE: error: ...").
 * Commands are echoed in text mode.  Stops at the first failing command
 * unless KEEP_GOING.  Returns 0 when every command succeeded, 1 otherwise. */
int sh_run_stream(sh_session *s, FILE *f, const char *name, int keep_going);

/* Interactive prompt with readline: history kept in $HONE_HISTORY (default
 * ~/.hone_history), completion of commands, options, files and column
 * names; errors never end the session.  Returns 0. */
int sh_run_interactive(sh_session *s);

/* Install the SIGINT handler that only sets sh_interrupted. */
void sh_install_interrupt(void);

#endif
