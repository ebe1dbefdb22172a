/* sh_batch.h - hone batch: one command sequence over many series, one JSON line per series.
 *
 * A series is one value column of one CSV file.  Each series runs in a
 * session of its own: the batch loads it (the "load" object opens its list)
 * and then runs the command sequence; the first failing command ends that
 * series, the others go on.  Series run on several threads, and their lines
 * are written in input order (files as given, columns in header order), so
 * that the output does not depend on the thread count. */
#ifndef SH_BATCH_H
#define SH_BATCH_H

/* Run "hone batch ARGS..." (ARGV[0] is the word "batch").  Output goes to
 * standard output, usage errors and the progress line (only when standard
 * error is a terminal) to standard error.  Returns the process exit code:
 * 0 every series succeeded, 1 at least one failed, 2 usage or input error
 * before any series ran. */
int sh_batch_main(int argc, char **argv);

#endif
