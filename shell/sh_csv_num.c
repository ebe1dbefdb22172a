/* sh_csv_num.c - blanks and strict C-locale decimal numbers in CSV cells. */
#include "sh_csv_num.h"

#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

static int is_blank(char c)
{
    return c == ' ' || c == '\t';
}

static inline void trim_blanks(const char **s, size_t *len)
{
    const char *p = *s, *e = *s + *len;
    while (p < e && is_blank(*p))
        p++;
    while (e > p && is_blank(e[-1]))
        e--;
    *s = p;
    *len = (size_t)(e - p);
}

void sh_csv_trim(const char **s, size_t *len)
{
    trim_blanks(s, len);
}

/* The 8 bytes at P as a number when all are decimal digits, else -1.  Eight steps of
 * mant = 10 mant + digit at once: after subtracting '0' the bytes (first digit lowest)
 * are combined pairwise into 16-bit lanes (10 a + b <= 99), those into 32-bit lanes
 * (100 ab + cd <= 9999) and those into one (10^4 abcd + efgh); no lane overflows into
 * the next. */
static inline long long eight_digits(const char *p)
{
#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_LITTLE_ENDIAN__
    uint64_t x;
    memcpy(&x, p, sizeof x);
    const uint64_t hi = 0xF0F0F0F0F0F0F0F0ull, zeros = 0x3030303030303030ull;
    /* every high nibble 3, and no low nibble above 9 (adding 6 would carry into the high
     * nibble; no byte can carry into the next) */
    if ((x & hi) != zeros || ((x + 0x0606060606060606ull) & hi) != zeros)
        return -1;
    x -= zeros;
    x = (x * 10 + (x >> 8)) & 0x00FF00FF00FF00FFull;
    x = (x * 100 + (x >> 16)) & 0x0000FFFF0000FFFFull;
    x = (x * 10000 + (x >> 32)) & 0xFFFFFFFFull;
    return (long long)x;
#else
    (void)p;
    return -1;
#endif
}

static int word_at(const char *s, size_t len, const char *w)
{
    return strlen(w) == len && strncasecmp(s, w, len) == 0;
}

sh_num_result sh_csv_number(const char *s, size_t len, double *v)
{
    /* exact powers of ten (10^22 is the largest that a double holds exactly) */
    static const double p10[23] = {1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,
                                   1e8,  1e9,  1e10, 1e11, 1e12, 1e13, 1e14, 1e15,
                                   1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
    trim_blanks(&s, &len);
    if (len == 0)
        return SH_NUM_EMPTY;
    size_t i = 0, nd = 0;
    uint64_t mant = 0;   /* significant digits, while they fit */
    int sig = 0, inexact = 0;
    long e10 = 0;
    long long d8;
    int neg = s[0] == '-';
    if (s[i] == '+' || s[i] == '-')
        i++;
    /* Eight digits at a time where the loop below would take all eight into MANT (it is
     * nonzero, so no leading zero is skipped, and sig stays below 19): the same MANT, SIG,
     * E10 and ND as eight turns of it. */
    for (; i < len; i++, nd++) {
        if (mant != 0 && sig <= 11 && len - i >= 8 && (d8 = eight_digits(s + i)) >= 0) {
            mant = mant * 100000000u + (uint64_t)d8, sig += 8;
            i += 7, nd += 7;
            continue;
        }
        if (s[i] < '0' || s[i] > '9')
            break;
        if (mant == 0 && s[i] == '0')
            continue;
        if (sig < 19)
            mant = mant * 10 + (uint64_t)(s[i] - '0'), sig++;
        else
            inexact = 1;
    }
    if (i < len && s[i] == '.') {
        for (i++; i < len; i++, nd++) {
            if (mant != 0 && sig <= 11 && len - i >= 8 && (d8 = eight_digits(s + i)) >= 0) {
                mant = mant * 100000000u + (uint64_t)d8, sig += 8, e10 -= 8;
                i += 7, nd += 7;
                continue;
            }
            if (s[i] < '0' || s[i] > '9')
                break;
            if (mant == 0 && s[i] == '0') {
                e10--;
                continue;
            }
            if (sig < 19)
                mant = mant * 10 + (uint64_t)(s[i] - '0'), sig++, e10--;
            else
                inexact = 1;
        }
    }
    int ok = nd > 0;
    if (ok && i < len && (s[i] == 'e' || s[i] == 'E')) {
        size_t ne = 0;
        long x = 0;
        int eneg = 0;
        i++;
        if (i < len && (s[i] == '+' || s[i] == '-'))
            eneg = s[i++] == '-';
        for (; i < len && s[i] >= '0' && s[i] <= '9'; i++, ne++)
            if (x < 100000)
                x = x * 10 + (s[i] - '0');
        ok = ne > 0;
        e10 += eneg ? -x : x;
    }
    if (!ok || i != len) {
        size_t j = (s[0] == '+' || s[0] == '-') ? 1 : 0;
        if (word_at(s + j, len - j, "nan") || word_at(s + j, len - j, "inf") ||
            word_at(s + j, len - j, "infinity"))
            return SH_NUM_NANINF;
        int comma = 0, other = 0;
        for (size_t k = 0; k < len; k++) {
            char c = s[k];
            if (c == ',')
                comma = 1;
            else if (!((c >= '0' && c <= '9') || c == '.' || c == '+' || c == '-' || c == 'e' ||
                       c == 'E' || c == ' '))
                other = 1;
        }
        return comma && !other ? SH_NUM_COMMA : SH_NUM_TEXT;
    }
    /* Clinger's fast path: an integer below 2^53 times or over an exact power of ten
     * is one correctly rounded operation, the same result strtod gives */
    if (!inexact && mant <= (1ull << 53) && e10 >= -22 && e10 <= 22) {
        double x = (double)mant;
        x = e10 >= 0 ? x * p10[e10] : x / p10[-e10];
        *v = neg ? -x : x;
        return SH_NUM_OK;
    }
#if LDBL_MANT_DIG == 64 && (defined(__x86_64__) || defined(__i386__))
    /* The same with x87 extended precision, for the 16 to 19 digits that
     * printed doubles carry: the digits (below 10^19 < 2^64) and 10^k for
     * k <= 27 (5^27 < 2^63) are exact in its 64-bit significand, so the
     * product or quotient is one correctly rounded extended operation.
     * Rounding that to double gives the correctly rounded double unless the
     * extended result lies exactly half-way between two doubles (its low 11
     * significand bits 10000000000); then strtod decides. */
    if (!inexact && e10 >= -27 && e10 <= 27) {
        static const long double q10[28] = {
            1e0L,  1e1L,  1e2L,  1e3L,  1e4L,  1e5L,  1e6L,  1e7L,  1e8L,  1e9L,
            1e10L, 1e11L, 1e12L, 1e13L, 1e14L, 1e15L, 1e16L, 1e17L, 1e18L, 1e19L,
            1e20L, 1e21L, 1e22L, 1e23L, 1e24L, 1e25L, 1e26L, 1e27L};
        long double r = (long double)mant;
        r = e10 >= 0 ? r * q10[e10] : r / q10[-e10];
        uint64_t bits;
        memcpy(&bits, &r, sizeof bits);   /* x87 layout: the significand comes first */
        if ((bits & 0x7ff) != 0x400) {
            double x = (double)r;
            *v = neg ? -x : x;
            return SH_NUM_OK;
        }
    }
#endif
    char *end;
    double x = strtod(s, &end);
    if (end != s + len)
        return SH_NUM_TEXT;
    if (isinf(x))
        return SH_NUM_RANGE;
    *v = x; /* underflow to a subnormal or zero is accepted */
    return SH_NUM_OK;
}
