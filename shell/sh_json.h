/* sh_json.h - a small JSON writer for the --json output contract.
 *
 * Numbers are written with 17 significant digits so that they read back to
 * the same double.  A non-finite number is written as null and its reason
 * collected; sh_json_end_object() of the outermost object then adds
 * "null_reasons": {path: reason}. */
#ifndef SH_JSON_H
#define SH_JSON_H

#include <stddef.h>

#define SH_JSON_DEPTH 32

typedef struct {
    char *buf;
    size_t len, cap;
    int depth;
    int first[SH_JSON_DEPTH];     /* no member written yet at this depth */
    int after_key;                /* a key was just written */
    char key_path[256];           /* the last top-level-relative key, for null reasons */
    char *reasons;                /* "path":"reason" pairs, comma-separated */
    size_t reasons_len, reasons_cap;
    int failed;                   /* allocation failed: output incomplete */
} sh_json;

void sh_json_init(sh_json *j);
void sh_json_free(sh_json *j);
/* Reset to empty, keeping the allocation. */
void sh_json_reset(sh_json *j);
/* The text written so far (NUL-terminated; empty string when nothing). */
const char *sh_json_text(const sh_json *j);

void sh_json_begin_object(sh_json *j);
void sh_json_end_object(sh_json *j);
void sh_json_begin_array(sh_json *j);
void sh_json_end_array(sh_json *j);
void sh_json_key(sh_json *j, const char *key);
void sh_json_string(sh_json *j, const char *s);
/* Finite X as %.17g; otherwise null, with WHY recorded (may be NULL). */
void sh_json_number(sh_json *j, double x, const char *why);
void sh_json_int(sh_json *j, long long x);
void sh_json_bool(sh_json *j, int b);
void sh_json_null(sh_json *j);

/* Shorthands: key followed by a value. */
void sh_json_kstring(sh_json *j, const char *key, const char *s);
void sh_json_knumber(sh_json *j, const char *key, double x, const char *why);
void sh_json_kint(sh_json *j, const char *key, long long x);
void sh_json_kbool(sh_json *j, const char *key, int b);
/* An array of N numbers under KEY. */
void sh_json_knumbers(sh_json *j, const char *key, const double *x, size_t n, const char *why);

/* Shortest "%.*g" text (up to 17 digits) that reads back to X exactly. */
void sh_fmt_double(char *buf, size_t len, double x);

#endif
