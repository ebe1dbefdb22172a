/* sh_tchart.h - terminal charts drawn in text cells from a chart description.
 *
 * A chart fills exactly HEIGHT lines of at most WIDTH columns (trailing blanks
 * are trimmed; every line ends with '\n').  The layout, top to bottom: the
 * title (when there is one), the plot with its y labels and axis, the x axis,
 * the x labels, and one legend line (when there is something to explain).
 * Glyphs are Unicode block elements and box-drawing characters, or plain
 * ASCII with SH_TC_ASCII.  ANSI colours are written only with SH_TC_COLOR:
 * the caller decides (isatty, NO_COLOR).  Output is deterministic. */
#ifndef SH_TCHART_H
#define SH_TCHART_H

#include <stddef.h>
#include <stdio.h>

#include "sh_chart.h"

#define SH_TC_ASCII 1u   /* ASCII glyphs only */
#define SH_TC_COLOR 2u   /* ANSI colour escapes */

#define SH_TC_MIN_WIDTH 20  /* smallest WIDTH accepted */
#define SH_TC_MIN_ROWS 3    /* smallest number of plot rows left by HEIGHT */

/* Render chart C into a malloc'd NUL-terminated string *OUT (length in *LEN
 * when LEN is not NULL); the caller frees it with free().
 * Returns HN_OK; HN_EINVAL for a NULL chart, an unknown kind or a size too
 * small for the frame (then *OUT is NULL); HN_ENOMEM. */
int sh_tchart_string(const sh_chart *c, int width, int height, unsigned flags,
                     char **out, size_t *len);

/* Render chart C and write it to OUT.  Returns as sh_tchart_string, or
 * HN_EIO when writing fails. */
int sh_tchart_write(FILE *out, const sh_chart *c, int width, int height, unsigned flags);

#endif
