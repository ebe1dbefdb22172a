/* sh_cairo.h - cairo, loaded when the first drawing needs it.
 *
 * hone does not link cairo: its 19 libraries would cost every start a few
 * milliseconds, and most sessions never draw.  sh_cairo.c defines the cairo
 * functions the shell calls, with cairo's own names and types, each a jump
 * through a pointer that sh_cairo_open resolves from libcairo.so.2.  Every
 * drawing entry point calls sh_cairo_open first and stops on its error. */
#ifndef SH_CAIRO_H
#define SH_CAIRO_H

#include <stddef.h>

/* Load libcairo.so.2 (or the library that the environment variable
 * HONE_CAIRO names) and resolve the functions (once; safe from any
 * thread).  HN_OK, or HN_EIO with the reason in WHY (if not NULL). */
int sh_cairo_open(char *why, size_t whylen);

#endif
