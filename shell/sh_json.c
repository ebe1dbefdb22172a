/* sh_json.c - JSON writer with round-trip numbers and null reasons. */
#include "sh_json.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void sh_json_init(sh_json *j)
{
    memset(j, 0, sizeof *j);
}

void sh_json_free(sh_json *j)
{
    free(j->buf);
    free(j->reasons);
    memset(j, 0, sizeof *j);
}

void sh_json_reset(sh_json *j)
{
    char *b = j->buf, *r = j->reasons;
    size_t c = j->cap, rc = j->reasons_cap;
    memset(j, 0, sizeof *j);
    j->buf = b;
    j->cap = c;
    j->reasons = r;
    j->reasons_cap = rc;
    if (b)
        b[0] = '\0';
}

const char *sh_json_text(const sh_json *j)
{
    return j->buf ? j->buf : "";
}

static int grow(char **buf, size_t *cap, size_t need)
{
    if (need <= *cap)
        return 0;
    size_t c = *cap ? *cap : 256;
    while (c < need)
        c *= 2;
    char *b = realloc(*buf, c);
    if (!b)
        return -1;
    *buf = b;
    *cap = c;
    return 0;
}

static void put(sh_json *j, const char *s, size_t n)
{
    if (j->failed)
        return;
    if (grow(&j->buf, &j->cap, j->len + n + 1)) {
        j->failed = 1;
        return;
    }
    memcpy(j->buf + j->len, s, n);
    j->len += n;
    j->buf[j->len] = '\0';
}

static void puts_(sh_json *j, const char *s) { put(j, s, strlen(s)); }

/* Comma before a value unless it follows a key or opens a container. */
static void before_value(sh_json *j)
{
    if (j->after_key) {
        j->after_key = 0;
        return;
    }
    if (j->depth > 0) {
        if (!j->first[j->depth])
            put(j, ",", 1);
        j->first[j->depth] = 0;
    }
}

static void put_escaped(sh_json *j, const char *s)
{
    put(j, "\"", 1);
    for (const unsigned char *p = (const unsigned char *)(s ? s : ""); *p; p++) {
        char esc[8];
        switch (*p) {
        case '"':  puts_(j, "\\\""); break;
        case '\\': puts_(j, "\\\\"); break;
        case '\n': puts_(j, "\\n"); break;
        case '\r': puts_(j, "\\r"); break;
        case '\t': puts_(j, "\\t"); break;
        default:
            if (*p < 0x20) {
                snprintf(esc, sizeof esc, "\\u%04x", *p);
                puts_(j, esc);
            } else {
                put(j, (const char *)p, 1);
            }
        }
    }
    put(j, "\"", 1);
}

void sh_json_begin_object(sh_json *j)
{
    before_value(j);
    put(j, "{", 1);
    if (j->depth + 1 < SH_JSON_DEPTH)
        j->depth++;
    j->first[j->depth] = 1;
}

static void add_reasons(sh_json *j)
{
    if (!j->reasons_len)
        return;
    sh_json_key(j, "null_reasons");
    put(j, "{", 1);
    put(j, j->reasons, j->reasons_len);
    put(j, "}", 1);
    j->reasons_len = 0;
}

void sh_json_end_object(sh_json *j)
{
    if (j->depth == 1)
        add_reasons(j);
    put(j, "}", 1);
    if (j->depth > 0)
        j->depth--;
}

void sh_json_begin_array(sh_json *j)
{
    before_value(j);
    put(j, "[", 1);
    if (j->depth + 1 < SH_JSON_DEPTH)
        j->depth++;
    j->first[j->depth] = 1;
}

void sh_json_end_array(sh_json *j)
{
    put(j, "]", 1);
    if (j->depth > 0)
        j->depth--;
}

void sh_json_key(sh_json *j, const char *key)
{
    before_value(j);
    put_escaped(j, key);
    put(j, ":", 1);
    j->after_key = 1;
    if (j->depth == 1) {
        snprintf(j->key_path, sizeof j->key_path, "%s", key);
    } else if (j->depth == 2) {
        char *dot = strchr(j->key_path, '.');
        if (dot)
            *dot = '\0';
        size_t l = strlen(j->key_path);
        if (l + strlen(key) + 2 < sizeof j->key_path)
            snprintf(j->key_path + l, sizeof j->key_path - l, ".%s", key);
    }
}

void sh_json_string(sh_json *j, const char *s)
{
    before_value(j);
    put_escaped(j, s);
}

void sh_fmt_double(char *buf, size_t len, double x)
{
    for (int prec = 15; prec <= 17; prec++) {
        snprintf(buf, len, "%.*g", prec, x);
        if (strtod(buf, NULL) == x)
            return;
    }
}

static void note_reason(sh_json *j, const char *why)
{
    /* The reason is keyed by the path of the value, e.g. "se.mu". */
    if (j->reasons_len) {
        char pat[300];
        snprintf(pat, sizeof pat, "\"%s\":", j->key_path);
        if (strstr(j->reasons, pat))
            return;
    }
    char *save_buf = j->buf;
    size_t save_len = j->len, save_cap = j->cap;
    int save_failed = j->failed;
    j->buf = j->reasons;
    j->len = j->reasons_len;
    j->cap = j->reasons_cap;
    if (j->len)
        put(j, ",", 1);
    put_escaped(j, j->key_path);
    put(j, ":", 1);
    put_escaped(j, why ? why : "not computable");
    j->reasons = j->buf;
    j->reasons_len = j->len;
    j->reasons_cap = j->cap;
    j->buf = save_buf;
    j->len = save_len;
    j->cap = save_cap;
    j->failed = j->failed || save_failed;
}

void sh_json_number(sh_json *j, double x, const char *why)
{
    before_value(j);
    if (!isfinite(x)) {
        puts_(j, "null");
        note_reason(j, why);
        return;
    }
    char b[40];
    sh_fmt_double(b, sizeof b, x);
    puts_(j, b);
}

void sh_json_int(sh_json *j, long long x)
{
    char b[32];
    before_value(j);
    snprintf(b, sizeof b, "%lld", x);
    puts_(j, b);
}

void sh_json_bool(sh_json *j, int b)
{
    before_value(j);
    puts_(j, b ? "true" : "false");
}

void sh_json_null(sh_json *j)
{
    before_value(j);
    puts_(j, "null");
}

void sh_json_kstring(sh_json *j, const char *key, const char *s) { sh_json_key(j, key); sh_json_string(j, s); }
void sh_json_knumber(sh_json *j, const char *key, double x, const char *why) { sh_json_key(j, key); sh_json_number(j, x, why); }
void sh_json_kint(sh_json *j, const char *key, long long x) { sh_json_key(j, key); sh_json_int(j, x); }
void sh_json_kbool(sh_json *j, const char *key, int b) { sh_json_key(j, key); sh_json_bool(j, b); }

void sh_json_knumbers(sh_json *j, const char *key, const double *x, size_t n, const char *why)
{
    sh_json_key(j, key);
    sh_json_begin_array(j);
    for (size_t i = 0; i < n; i++)
        sh_json_number(j, x[i], why);
    sh_json_end_array(j);
}
