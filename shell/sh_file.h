/* sh_file.h - output files written atomically: a temporary file beside the
 * target, renamed over it only when complete, so an error never truncates
 * an existing file.  An existing file keeps its permission bits; a symbolic
 * link keeps pointing at the (replaced) file it names. */
#ifndef SH_FILE_H
#define SH_FILE_H

#include <stdio.h>
#include <stddef.h>

typedef struct {
    FILE *f;              /* write here */
    char path[4096];      /* final name */
    char tmp[4200];       /* temporary name */
} sh_outfile;

/* Open a temporary file for PATH.  0, or -1 with a message in ERR. */
int sh_outfile_open(sh_outfile *o, const char *path, char *err, size_t errlen);
/* Flush, sync and rename into place.  0, or -1 with a message (the
 * temporary file is removed either way). */
int sh_outfile_commit(sh_outfile *o, char *err, size_t errlen);
/* Discard the temporary file. */
void sh_outfile_abort(sh_outfile *o);

#endif
