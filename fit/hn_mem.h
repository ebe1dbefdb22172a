/* hn_mem.h - allocation of long arrays (a series, its residuals, a file's bytes).
 *
 * A long array is touched once, front to back, soon after it is allocated;
 * at a million values its first-touch page faults cost as much as a pass
 * over it.  The whole 2 MiB pages inside a block of HN_MEM_LONG bytes or
 * more are therefore offered to the kernel for transparent huge pages
 * before they are touched (512 times fewer faults where the kernel grants
 * them, no change where it does not).  The blocks come from malloc as they
 * are, so that freed ones are reused as before; free them with free(). */
#ifndef HN_MEM_H
#define HN_MEM_H

#include <stddef.h>

#define HN_MEM_LONG ((size_t)4 << 20)

/* BYTES of uninitialised memory, or NULL. */
void *hn_alloc_long(size_t bytes);

/* BYTES of zeroed memory, or NULL. */
void *hn_calloc_long(size_t bytes);

/* BYTES of uninitialised memory at a multiple of ALIGN (a power of two,
 * at least sizeof(void *)), advised likewise, or NULL. */
void *hn_alloc_long_aligned(size_t align, size_t bytes);

/* realloc(P, BYTES), advised likewise; NULL on failure, P then untouched. */
void *hn_realloc_long(void *p, size_t bytes);

#endif
