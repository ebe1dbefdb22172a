/* sh_alloc.c - the program's memory policy. */
#include "sh_alloc.h"

#include <stdlib.h>   /* defines __GLIBC__ where it is glibc */

#if defined(__GLIBC__)
#include <malloc.h>
#endif

void sh_alloc_policy(void)
{
#if defined(__GLIBC__)
    /* measured at n = 10^6: a fit, as a whole process, 6 to 14 % faster,
     * for up to a quarter more peak memory (GARCH(1,1): 39 to 49 MB, six
     * times the data) */
    mallopt(M_MMAP_THRESHOLD, 32 * 1024 * 1024);
    mallopt(M_TRIM_THRESHOLD, 64 * 1024 * 1024);
#endif
}
