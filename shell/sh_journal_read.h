/* sh_journal_read.h - parse an audit journal (layout in sh_journal.h) into entries.
 *
 * The parser takes arbitrary bytes: it never reads outside the buffer, never
 * crashes on malformed input, and says where the text stopped making sense.
 * A journal whose last entry lacks its closing '=' or '!' line (the process
 * was killed while writing it) parses: that entry is marked incomplete.
 * CRLF line ends are read as LF (the raw spans keep the bytes as they are). */
#ifndef SH_JOURNAL_READ_H
#define SH_JOURNAL_READ_H

#include <stddef.h>

#define SH_JREAD_MAX_BYTES (256L * 1024 * 1024)  /* larger journals are refused */

typedef enum {
    SH_JENTRY_OK = 0,      /* closed by "= ok" */
    SH_JENTRY_ERROR,       /* closed by "! message" */
    SH_JENTRY_INCOMPLETE   /* no closing line: the journal ends inside it */
} sh_jentry_status;

typedef struct {
    long line;             /* journal line of its "> " line (1-based) */
    long end_line;         /* line of its closing line; last line read when incomplete */
    size_t cmd_off, cmd_len;   /* command text in sh_jdoc.text */
    size_t raw_off, raw_len;   /* the whole entry, "> " line to closing line with its '\n' */
    size_t err_off, err_len;   /* error message (SH_JENTRY_ERROR), else 0, 0 */
    int noutput;           /* "| " lines */
    int status;            /* sh_jentry_status */
} sh_jentry;

typedef struct {
    long line;             /* journal line */
    char sha256[65];       /* 64 lower-case hex digits */
    long long bytes;
    size_t path_off, path_len; /* in sh_jdoc.text */
    int before;            /* index of the entry it was recorded in (the next entry), or
                              nentries when none follows */
} sh_jinput;

typedef struct {
    char *text;            /* copy of the journal bytes, NUL-terminated (owned) */
    size_t len;
    int version;           /* from "hone-journal N" */
    long nlines;
    /* header values (offsets into text, length 0 when absent) */
    size_t tool_off, tool_len, started_off, started_len, by_off, by_len;
    size_t settings_off, settings_len, cwd_off, cwd_len, state_off, state_len;
    size_t ended_off, ended_len;
    sh_jentry *entries;    /* owned */
    int nentries;
    sh_jinput *inputs;     /* owned */
    int ninputs;
    int truncated;         /* the last entry is SH_JENTRY_INCOMPLETE */
    int partial_line;      /* the bytes end without a final '\n' */
} sh_jdoc;

/* Parse BUF[0..LEN-1] into *DOC (which owns a copy afterwards; free with
 * sh_jdoc_free, also after a failure).  Returns HN_OK; HN_EPARSE with a
 * reason in ERR (ERRLEN bytes) and the offending line in *ERRLINE (may be
 * NULL) when the text is not a journal in this layout; HN_ELIMIT above
 * SH_JREAD_MAX_BYTES; HN_ENOMEM. */
int sh_jdoc_parse(const char *buf, size_t len, sh_jdoc *doc, char *err, size_t errlen, long *errline);

/* Read and parse the file PATH.  As sh_jdoc_parse, plus HN_EIO when the
 * file cannot be read (reason in ERR). */
int sh_jdoc_read(const char *path, sh_jdoc *doc, char *err, size_t errlen, long *errline);

/* Release what DOC owns and zero it (NULL and repeated calls are fine). */
void sh_jdoc_free(sh_jdoc *doc);

/* The value of KEY in the settings line ("alpha=0.05 lags=0 ...") copied
 * into BUF (LEN bytes).  Returns 1 when found, 0 otherwise (BUF = ""). */
int sh_jdoc_setting(const sh_jdoc *doc, const char *key, char *buf, size_t len);

/* Copy the span OFF, N of DOC's text into BUF (LEN bytes, truncated and
 * NUL-terminated).  Returns BUF. */
char *sh_jdoc_span(const sh_jdoc *doc, size_t off, size_t n, char *buf, size_t len);

#endif
