/* sh_journal.h - the audit journal: a plain-text record of a session.
 *
 * Layout (line-oriented, UTF-8; docs/commands.md describes it for readers):
 *   hone-journal 1                                 (layout version)
 *   tool      hone VERSION (built DATE)
 *   started   ISO 8601 UTC time
 *   by        USER on HOST
 *   cwd       working directory (relative input paths are relative to it)
 *   settings  alpha=A lags=M level=L width=W charts=utf8|ascii color=yes|no
 *   state     ...                                  (only when recording began with data
 *                                                   already loaded or models fitted)
 *   input     sha256=HEX bytes=N path=PATH        (one per file read, written when it is
 *                                                   read, just before the entry of the
 *                                                   command that read it)
 *   > COMMAND LINE
 *   | output line                                  (every line of the text output)
 *   = ok        or        ! error message          (closes the entry)
 *   ended     ISO 8601 UTC time                    (when recording stopped cleanly)
 * Every entry is flushed and synced to disk before the next command runs, so
 * a killed process loses at most the entry it was writing.  Clock times
 * appear only in the header and the 'ended' line, never in command output,
 * so that replay can compare outputs byte for byte.  The record command
 * itself is not recorded. */
#ifndef SH_JOURNAL_H
#define SH_JOURNAL_H

#include <stddef.h>

typedef struct sh_journal sh_journal;

#define SH_JOURNAL_MAX_LISTED 32   /* input files a journal remembers for reports */

/* An input line as written: the file, its SHA-256 and size. */
typedef struct {
    char path[1024];
    char sha256[65];
    long long bytes;
} sh_journal_file;
struct sh_session;

/* Create PATH and write the header.  An existing file is replaced only when
 * it is empty or itself a journal; anything else is refused.  NULL on
 * failure with a message in ERR. */
sh_journal *sh_journal_open(const char *path, const struct sh_session *s, char *err, size_t errlen);
/* Record a command, its text output, and ERROR (NULL on success). */
void sh_journal_entry(sh_journal *j, const char *line, const char *output, const char *error);
/* Record an input file with its size and SHA-256 (computed here). */
int sh_journal_input(sh_journal *j, const char *path);
/* A journal kept in memory (used by replay to capture each command's entry
 * exactly as it would be written), named LABEL (e.g. the journal being
 * replayed; copied).  NULL when out of memory. */
sh_journal *sh_journal_open_memory(const char *label);
/* Memory journal: the text of the last entry ("> ...\n| ...\n= ok\n"),
 * length in *LEN; valid until the next entry or close.  "" for a file journal. */
const char *sh_journal_last(sh_journal *j, size_t *len);
/* The input lines written so far (the first SH_JOURNAL_MAX_LISTED), count
 * in *N; storage of J. */
const sh_journal_file *sh_journal_inputs(const sh_journal *j, int *n);
/* The journal's path (static storage of J). */
const char *sh_journal_path(const sh_journal *j);
/* Write the 'ended' line (file journals), close and free J (NULL is fine). */
void sh_journal_close(sh_journal *j);

/* SHA-256 of a file as 64 hex digits into HEX (65 bytes); *SIZE its bytes.
 * HN_OK or HN_EIO. */
int sh_sha256_file(const char *path, char hex[65], long long *size);

#endif
