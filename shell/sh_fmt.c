/* sh_fmt.c - number formatting for human-readable tables. */
#include "sh_fmt.h"

#include <math.h>
#include <stdio.h>

char *sh_num(char *buf, size_t len, double x, int sig)
{
    if (!isfinite(x))
        snprintf(buf, len, "n/a");
    else
        snprintf(buf, len, "%.*g", sig, x == 0.0 ? 0.0 : x);
    return buf;
}

char *sh_pval(char *buf, size_t len, double p)
{
    if (!isfinite(p))
        snprintf(buf, len, "n/a");
    else if (p < 1e-16)
        snprintf(buf, len, "<1e-16");
    else if (p < 0.001)
        snprintf(buf, len, "%.1e", p);
    else
        snprintf(buf, len, "%.4f", p);
    return buf;
}
