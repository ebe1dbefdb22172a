/* hn_mem.c - long arrays advised for transparent huge pages. */
#include "hn_mem.h"

#include <stdint.h>
#include <stdlib.h>
#include <sys/mman.h>

#define HUGE_PAGE ((size_t)2 << 20)

/* Advise the whole 2 MiB pages inside [P, P + BYTES), before they are touched. */
static void *advise(void *p, size_t bytes)
{
#ifdef MADV_HUGEPAGE
    uintptr_t a = ((uintptr_t)p + HUGE_PAGE - 1) & ~(uintptr_t)(HUGE_PAGE - 1);
    uintptr_t z = ((uintptr_t)p + bytes) & ~(uintptr_t)(HUGE_PAGE - 1);
    /* advice only: where the kernel has no huge pages the call fails and
     * the block is the same memory in small pages */
    if (p && z > a)
        (void)madvise((void *)a, z - a, MADV_HUGEPAGE);
#else
    (void)bytes;
#endif
    return p;
}

void *hn_alloc_long(size_t bytes)
{
    if (bytes < HN_MEM_LONG)
        return malloc(bytes ? bytes : 1);
    return advise(malloc(bytes), bytes);
}

void *hn_alloc_long_aligned(size_t align, size_t bytes)
{
    void *p = NULL;
    if (posix_memalign(&p, align, bytes ? bytes : 1) != 0)
        return NULL;
    return bytes < HN_MEM_LONG ? p : advise(p, bytes);
}

void *hn_calloc_long(size_t bytes)
{
    if (bytes < HN_MEM_LONG)
        return calloc(1, bytes ? bytes : 1);
    return advise(calloc(1, bytes), bytes);
}

void *hn_realloc_long(void *p, size_t bytes)
{
    if (bytes < HN_MEM_LONG)
        return realloc(p, bytes ? bytes : 1);
    /* pages the old block had touched stay as they are; the rest is advised */
    return advise(realloc(p, bytes), bytes);
}
