/* sh_csv_num.h - the blanks and numbers of CSV cells, shared by the general reader and its fast path. */
#ifndef SH_CSV_NUM_H
#define SH_CSV_NUM_H

#include <stddef.h>

/* What a value cell holds. */
typedef enum {
    SH_NUM_OK,      /* a finite number (or one that underflows to a subnormal or zero) */
    SH_NUM_EMPTY,   /* nothing but blanks */
    SH_NUM_TEXT,    /* anything else */
    SH_NUM_COMMA,   /* a number written with a decimal comma */
    SH_NUM_NANINF,  /* NaN, Inf or Infinity, any case, optionally signed */
    SH_NUM_RANGE    /* beyond the range of a double */
} sh_num_result;

/* Move *S and shrink *LEN past the blanks (space, tab) at either end. */
void sh_csv_trim(const char **s, size_t *len);

/* Read the LEN bytes at S (blanks around are ignored) as a strict C-locale
 * decimal number: [sign] digits [. digits] [e [sign] digits], digits on at
 * least one side of the point, correctly rounded (the double strtod gives).
 * S[LEN] must exist and must not continue a number (a digit, '.', 'e', ...):
 * the rare cases left to strtod read up to it.  *V is set only for SH_NUM_OK. */
sh_num_result sh_csv_number(const char *s, size_t len, double *v);

#endif
