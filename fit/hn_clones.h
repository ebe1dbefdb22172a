/* hn_clones.h - more copies of the hottest passes, for CPUs with AVX2 or AVX-512.
 *
 * The GARCH passes carry a dozen derivative recursions at once; with the 16
 * vector registers of baseline x86-64 some of them live on the stack, and
 * each step then waits on a store and a reload.  AVX-512's 32 registers hold
 * them all (about 20 % less time per fit measured on such a CPU); AVX2's
 * wider vectors take fewer instructions for them (GARCH(1,1) at 10^6 65.9
 * -> 59.7 ms, AR(1)-GARCH(1,1) 82.7 -> 76.9 ms, medians of 7 alternating
 * runs on an AVX2 CPU).  The
 * build turns off the fusing of multiplies and adds (-ffp-contract=off in
 * the Makefile), so all copies do the same IEEE operations in the same
 * order and give the same bits; the loader picks the copy once.  Not
 * under the sanitizers: AddressSanitizer's stack-use-after-return frames
 * are not 64-byte aligned, and the AVX-512 copy's aligned loads of local
 * arrays then fault. */
#ifndef HN_CLONES_H
#define HN_CLONES_H

#if defined(__GNUC__) && !defined(__clang__) && defined(__x86_64__) && defined(__linux__) && \
    !defined(HN_NO_CLONES) && !defined(__SANITIZE_ADDRESS__) && !defined(__SANITIZE_THREAD__)
#define HN_HOT_CLONES __attribute__((target_clones("avx512f", "avx2", "default")))
#else
#define HN_HOT_CLONES
#endif

#endif
