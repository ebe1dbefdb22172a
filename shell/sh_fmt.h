/* sh_fmt.h - number formatting for human-readable tables. */
#ifndef SH_FMT_H
#define SH_FMT_H

#include <stddef.h>

/* X with SIG significant digits ("%.*g"), or "n/a" when not finite.
 * Returns BUF. */
char *sh_num(char *buf, size_t len, double x, int sig);
/* A p-value: "0.0123", "1.2e-05", "<1e-16", or "n/a". */
char *sh_pval(char *buf, size_t len, double p);

#endif
