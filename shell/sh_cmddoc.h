/* sh_cmddoc.h - the command reference in Markdown, generated from the command table. */
#ifndef SH_CMDDOC_H
#define SH_CMDDOC_H

#include <stdio.h>

#define SH_CMDDOC_BEGIN "<!-- begin: generated from the command table; do not edit by hand -->"
#define SH_CMDDOC_END "<!-- end: generated from the command table -->"

/* Write the reference of every command (usage, summary, options, help) to F,
 * from SH_CMDDOC_BEGIN to SH_CMDDOC_END inclusive.  Returns 0, or -1 when
 * writing fails. */
int sh_cmddoc_markdown(FILE *f);

#endif
