/* sh_error.c - filling an sh_error report. */
#include "sh_error.h"

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

void sh_error_clear(sh_error *e)
{
    if (e)
        memset(e, 0, sizeof *e);
}

void sh_error_set(sh_error *e, const char *file, long line, long column, const char *fmt, ...)
{
    if (!e)
        return;
    sh_error_clear(e);
    if (file)
        snprintf(e->file, sizeof e->file, "%s", file);
    e->line = line;
    e->column = column;

    size_t len = 0, cap = sizeof e->message;
    int k = 0;
    if (file && *file) {
        if (line > 0 && column > 0)
            k = snprintf(e->message, cap, "%s:%ld:%ld: ", file, line, column);
        else if (line > 0)
            k = snprintf(e->message, cap, "%s:%ld: ", file, line);
        else
            k = snprintf(e->message, cap, "%s: ", file);
    }
    if (k > 0)
        len = (size_t)k < cap ? (size_t)k : cap - 1;
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(e->message + len, cap - len, fmt, ap);
    va_end(ap);
}
