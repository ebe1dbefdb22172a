/* sh_alloc.h - the program's memory policy (glibc), set once at start. */
#ifndef SH_ALLOC_H
#define SH_ALLOC_H

/* Keep freed memory for the next allocation of like size instead of handing
 * it back to the system: a fit, the checks and FFTW's transforms allocate
 * and free arrays of about the same sizes over and over, and each return
 * costs a page fault per page the next time.  The thresholds are glibc's
 * largest, which its own rule reaches only after the first large block is
 * freed.  A no-op where the C library has no mallopt. */
void sh_alloc_policy(void);

#endif
