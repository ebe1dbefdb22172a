/* sh_journal.h - the audit journal: a plain-text record of a session.
 *
 * Layout (line-oriented, UTF-8):
 *   hone-journal 1
 *   tool      hone VERSION (built DATE)
 *   started   ISO 8601 UTC time
 *   by        USER on HOST
 *   settings  alpha=... lags=... level=...
 *   input     sha256=HEX bytes=N path=PATH        (one per file read, when read)
 *   > COMMAND LINE
 *   | output line                                  (every line of the text output)
 *   = ok        or        ! error message
 * Every entry is flushed and synced to disk before the next command runs. */
#ifndef SH_JOURNAL_H
#define SH_JOURNAL_H

#include <stddef.h>

typedef struct sh_journal sh_journal;
struct sh_session;

/* Create PATH (replacing an existing file) and write the header.  NULL on
 * failure with a message in ERR. */
sh_journal *sh_journal_open(const char *path, const struct sh_session *s, char *err, size_t errlen);
/* Record a command, its text output, and ERROR (NULL on success). */
void sh_journal_entry(sh_journal *j, const char *line, const char *output, const char *error);
/* Record an input file with its size and SHA-256 (computed here). */
int sh_journal_input(sh_journal *j, const char *path);
/* The journal's path (static storage of J). */
const char *sh_journal_path(const sh_journal *j);
void sh_journal_close(sh_journal *j);

/* SHA-256 of a file as 64 hex digits into HEX (65 bytes); *SIZE its bytes.
 * HN_OK or HN_EIO. */
int sh_sha256_file(const char *path, char hex[65], long long *size);

#endif
