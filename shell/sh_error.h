/* sh_error.h - an error report with its place in an input file, shared by the shell modules. */
#ifndef SH_ERROR_H
#define SH_ERROR_H

/* Where and what went wrong.  MESSAGE is complete and self-contained: it
 * starts with the place ("FILE:LINE:COLUMN: ", parts that do not apply are
 * left out) and then says what was wrong, quoting the offending text.  The
 * place is also kept in the fields for callers that want it structured. */
typedef struct {
    char file[1024];   /* input file, "" when none */
    long line;         /* 1-based physical line in FILE, 0 when not applicable */
    long column;       /* 1-based field number, 0 when not applicable */
    char message[512]; /* full text, see above */
} sh_error;

/* Reset E to "no error" (all fields empty or 0).  E may be NULL. */
void sh_error_clear(sh_error *e);

/* Fill E: FILE (may be NULL), LINE and COLUMN (0 = not applicable) and the
 * printf-style text; MESSAGE becomes "FILE:LINE:COLUMN: text".  Text longer
 * than the buffer is cut.  E may be NULL (then nothing happens). */
void sh_error_set(sh_error *e, const char *file, long line, long column, const char *fmt, ...)
    __attribute__((format(printf, 5, 6)));

#endif
