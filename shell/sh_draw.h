/* sh_draw.h - charts drawn with cairo, for SVG (inline in HTML), PDF and PNG output.
 *
 * One drawing routine serves every cairo surface: it draws a chart
 * description (sh_chart.h) into a rectangle of a caller's cairo context.
 * Lengths are in the surface's units (pixels for PNG, points for PDF/SVG). */
#ifndef SH_DRAW_H
#define SH_DRAW_H

#include <stddef.h>

#include <cairo.h>

#include "sh_chart.h"

#define SH_DRAW_MIN_SIZE 120.0  /* smallest width and height accepted */

/* Draw chart C into the rectangle X, Y, W, H of CR, background included.
 * The context's state is saved and restored around the drawing.
 * Returns HN_OK; HN_EINVAL for a NULL argument, an unknown kind or a
 * rectangle smaller than SH_DRAW_MIN_SIZE; HN_ENOMEM when memory runs out;
 * HN_EIO when the context reports another error, and before anything is
 * drawn when the cairo library cannot be loaded (sh_cairo.h). */
int sh_draw_chart(cairo_t *cr, const sh_chart *c, double x, double y, double w, double h);

/* Render chart C alone as an SVG document of W x H pixels (the document's
 * unit is px) into a malloc'd NUL-terminated string *OUT (length in *LEN when
 * LEN is not NULL); the caller frees it with free().  ID_PREFIX, when not NULL, is put in front of
 * every id in the document and every reference to one, so that several
 * charts can be inlined in one HTML page (a letter, then letters, digits,
 * '-' or '_'; anything else is HN_EINVAL).  The text starts with an XML
 * declaration; a page inlining it may start from "<svg".
 * Returns as sh_draw_chart; *OUT is NULL on failure. */
int sh_draw_svg_string(const sh_chart *c, double w, double h, const char *id_prefix,
                       char **out, size_t *len);

/* Render chart C as a W x H pixel PNG image to PATH.
 * Returns as sh_draw_chart, or HN_EIO when the file cannot be written. */
int sh_draw_png_file(const sh_chart *c, int w, int h, const char *path);

/* Render chart C as a one-page PDF of W x H points to PATH.
 * Returns as sh_draw_png_file. */
int sh_draw_pdf_file(const sh_chart *c, double w, double h, const char *path);

#endif
