/* sh_journal_read.c - a small strict parser for audit journals, safe on any bytes. */
#include "sh_journal_read.h"
#include "hn_status.h"

#include <errno.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* One line of the buffer: [off, off+len), without its '\n'. */
typedef struct {
    size_t off, len;
    int has_nl;
} line_t;

static int fail(char *err, size_t errlen, long *errline, long line, const char *fmt, ...)
{
    if (err && errlen) {
        va_list ap;
        va_start(ap, fmt);
        vsnprintf(err, errlen, fmt, ap);
        va_end(ap);
    }
    if (errline)
        *errline = line;
    return HN_EPARSE;
}

/* Does line L start with the keyword KEY followed by a blank (or end)?  On
 * success VOFF and VLEN give the value after the blanks. */
static int keyword(const char *t, line_t l, const char *key, size_t *voff, size_t *vlen)
{
    size_t k = strlen(key);
    if (l.len < k || memcmp(t + l.off, key, k))
        return 0;
    if (l.len > k && t[l.off + k] != ' ')
        return 0;
    size_t i = k;
    while (i < l.len && t[l.off + i] == ' ')
        i++;
    *voff = l.off + i;
    *vlen = l.len - i;
    return 1;
}

static int is_hex(char c)
{
    return (c >= '0' && c <= '9') || (c >= 'a' && c <= 'f');
}

/* "sha256=HEX bytes=N path=PATH" */
static int parse_input(const char *t, size_t off, size_t len, sh_jinput *in)
{
    const char *p = t + off, *e = t + off + len;
    if (e - p < 7 + 64 || memcmp(p, "sha256=", 7))
        return -1;
    p += 7;
    for (int i = 0; i < 64; i++)
        if (!is_hex(p[i]))
            return -1;
    memcpy(in->sha256, p, 64);
    in->sha256[64] = '\0';
    p += 64;
    if (e - p < 7 || memcmp(p, " bytes=", 7))
        return -1;
    p += 7;
    long long b = 0;
    int digits = 0;
    while (p < e && *p >= '0' && *p <= '9') {
        if (b > (long long)1e17)
            return -1;
        b = b * 10 + (*p - '0');
        p++;
        digits++;
    }
    if (!digits)
        return -1;
    in->bytes = b;
    if (e - p < 7 || memcmp(p, " path=", 6))
        return -1;
    p += 6;
    if (p >= e)
        return -1;
    in->path_off = (size_t)(p - t);
    in->path_len = (size_t)(e - p);
    return 0;
}

static int grow(void **arr, int *cap, int need, size_t size)
{
    if (need <= *cap)
        return 0;
    int c = *cap ? *cap * 2 : 32;
    while (c < need)
        c *= 2;
    void *a = realloc(*arr, (size_t)c * size);
    if (!a)
        return -1;
    *arr = a;
    *cap = c;
    return 0;
}

int sh_jdoc_parse(const char *buf, size_t len, sh_jdoc *doc, char *err, size_t errlen, long *errline)
{
    memset(doc, 0, sizeof *doc);
    if (err && errlen)
        err[0] = '\0';
    if (errline)
        *errline = 0;
    if (len > (size_t)SH_JREAD_MAX_BYTES) {
        if (err && errlen)
            snprintf(err, errlen, "journal larger than %ld bytes", SH_JREAD_MAX_BYTES);
        return HN_ELIMIT;
    }
    doc->text = malloc(len + 1);
    if (!doc->text)
        return HN_ENOMEM;
    if (len)
        memcpy(doc->text, buf, len);
    doc->text[len] = '\0';
    doc->len = len;
    const char *t = doc->text;
    if (memchr(t, '\0', len)) {
        long ln = 1;
        for (const char *q = t; *q; q++)
            ln += *q == '\n';
        return fail(err, errlen, errline, ln, "a NUL byte: this is not a text journal");
    }

    int ecap = 0, icap = 0;
    size_t pos = 0;
    long ln = 0;
    int in_entry = 0;          /* inside an entry: after '>' before its closing line */
    int seen_entry = 0, ended = 0;
    sh_jentry *cur = NULL;

    while (pos < len) {
        line_t l;
        const char *nl = memchr(t + pos, '\n', len - pos);
        l.off = pos;
        l.len = nl ? (size_t)(nl - (t + pos)) : len - pos;
        l.has_nl = nl != NULL;
        pos += l.len + (nl ? 1 : 0);
        ln++;
        doc->nlines = ln;
        if (!l.has_nl)
            doc->partial_line = 1;
        else if (l.len && t[l.off + l.len - 1] == '\r')
            l.len--;                    /* a journal saved with CRLF line ends */
        const char *s = t + l.off;
        size_t voff, vlen;

        if (ln == 1) {
            static const char magic[] = "hone-journal ";
            size_t k = sizeof magic - 1;
            if (l.len <= k || memcmp(s, magic, k))
                return fail(err, errlen, errline, ln, "not a hone journal (the first line should read 'hone-journal 1')");
            int v = 0;
            for (size_t i = k; i < l.len; i++) {
                if (s[i] < '0' || s[i] > '9' || v > 1000)
                    return fail(err, errlen, errline, ln, "bad journal version '%.*s'",
                                (int)(l.len - k > 20 ? 20 : l.len - k), s + k);
                v = v * 10 + (s[i] - '0');
            }
            if (v != 1)
                return fail(err, errlen, errline, ln, "journal layout version %d is not supported (this program reads version 1)", v);
            doc->version = v;
            continue;
        }
        if (ended)
            return fail(err, errlen, errline, ln, "text after the 'ended' line");

        if (in_entry) {
            if (l.len >= 1 && s[0] == '|') {
                if (l.len >= 2 && s[1] != ' ')
                    return fail(err, errlen, errline, ln, "an output line must start with '| '");
                cur->noutput++;
                cur->end_line = ln;
                cur->raw_len = pos - cur->raw_off;
                continue;
            }
            if (l.len == 4 && !memcmp(s, "= ok", 4)) {
                cur->status = SH_JENTRY_OK;
            } else if (l.len >= 2 && s[0] == '!' && s[1] == ' ' && l.has_nl) {
                cur->status = SH_JENTRY_ERROR;
                cur->err_off = l.off + 2;
                cur->err_len = l.len - 2;
            } else if (!l.has_nl && ((l.len >= 1 && (s[0] == '=' || s[0] == '!')) || l.len == 0)) {
                /* the closing line itself was cut short */
                cur->end_line = ln;
                cur->raw_len = pos - cur->raw_off;
                break;
            } else {
                return fail(err, errlen, errline, ln,
                            "entry of line %ld ('> ...') is not closed by '= ok' or '! error'", cur->line);
            }
            if (!l.has_nl) {
                if (cur->status == SH_JENTRY_ERROR)
                    cur->status = SH_JENTRY_INCOMPLETE;
            }
            cur->end_line = ln;
            cur->raw_len = pos - cur->raw_off;
            in_entry = 0;
            if (cur->status == SH_JENTRY_INCOMPLETE)
                break;
            continue;
        }

        if (l.len >= 2 && s[0] == '>' && s[1] == ' ') {
            if (grow((void **)&doc->entries, &ecap, doc->nentries + 1, sizeof *doc->entries))
                return HN_ENOMEM;
            cur = &doc->entries[doc->nentries++];
            memset(cur, 0, sizeof *cur);
            cur->line = cur->end_line = ln;
            cur->cmd_off = l.off + 2;
            cur->cmd_len = l.len - 2;
            cur->raw_off = l.off;
            cur->raw_len = pos - l.off;
            cur->status = SH_JENTRY_INCOMPLETE;
            in_entry = 1;
            seen_entry = 1;
            if (!l.has_nl)
                break;
            continue;
        }
        if (!l.has_nl) {
            /* a header or input line cut short: nothing of it is used */
            break;
        }
        if (keyword(t, l, "input", &voff, &vlen)) {
            if (grow((void **)&doc->inputs, &icap, doc->ninputs + 1, sizeof *doc->inputs))
                return HN_ENOMEM;
            sh_jinput *in = &doc->inputs[doc->ninputs];
            memset(in, 0, sizeof *in);
            if (parse_input(t, voff, vlen, in))
                return fail(err, errlen, errline, ln, "bad input line (want 'input sha256=HEX bytes=N path=PATH')");
            in->line = ln;
            in->before = -1;
            doc->ninputs++;
            continue;
        }
        if (keyword(t, l, "ended", &voff, &vlen)) {
            doc->ended_off = voff;
            doc->ended_len = vlen;
            ended = 1;
            continue;
        }
        if (!seen_entry) {
            struct { const char *k; size_t *o, *n; } hdr[] = {
                { "tool", &doc->tool_off, &doc->tool_len },
                { "started", &doc->started_off, &doc->started_len },
                { "by", &doc->by_off, &doc->by_len },
                { "settings", &doc->settings_off, &doc->settings_len },
                { "cwd", &doc->cwd_off, &doc->cwd_len },
                { "state", &doc->state_off, &doc->state_len },
            };
            int hit = 0;
            for (size_t h = 0; h < sizeof hdr / sizeof hdr[0] && !hit; h++)
                if (keyword(t, l, hdr[h].k, &voff, &vlen)) {
                    *hdr[h].o = voff;
                    *hdr[h].n = vlen;
                    hit = 1;
                }
            if (hit)
                continue;
        }
        return fail(err, errlen, errline, ln, "unexpected line '%.*s'", (int)(l.len > 40 ? 40 : l.len), s);
    }
    if (doc->version == 0)
        return fail(err, errlen, errline, 1, "empty file: not a hone journal");
    if (doc->nentries && doc->entries[doc->nentries - 1].status == SH_JENTRY_INCOMPLETE)
        doc->truncated = 1;
    /* attach every input to the entry recorded after it */
    for (int i = 0, e = 0; i < doc->ninputs; i++) {
        while (e < doc->nentries && doc->entries[e].line < doc->inputs[i].line)
            e++;
        doc->inputs[i].before = e;
    }
    return HN_OK;
}

int sh_jdoc_read(const char *path, sh_jdoc *doc, char *err, size_t errlen, long *errline)
{
    memset(doc, 0, sizeof *doc);
    if (errline)
        *errline = 0;
    FILE *f = fopen(path, "rb");
    if (!f) {
        snprintf(err, errlen, "cannot read journal %s: %s", path, strerror(errno));
        return HN_EIO;
    }
    size_t cap = 65536, n = 0, k;
    char *buf = malloc(cap);
    while (buf && (k = fread(buf + n, 1, cap - n, f)) > 0) {
        n += k;
        if (n > (size_t)SH_JREAD_MAX_BYTES)
            break;
        if (n == cap) {
            char *b = realloc(buf, cap * 2);
            if (!b) {
                free(buf);
                buf = NULL;
                break;
            }
            buf = b;
            cap *= 2;
        }
    }
    int bad = ferror(f);
    fclose(f);
    if (!buf)
        return HN_ENOMEM;
    if (bad) {
        free(buf);
        snprintf(err, errlen, "cannot read journal %s", path);
        return HN_EIO;
    }
    int rc = sh_jdoc_parse(buf, n, doc, err, errlen, errline);
    free(buf);
    return rc;
}

void sh_jdoc_free(sh_jdoc *doc)
{
    if (!doc)
        return;
    free(doc->text);
    free(doc->entries);
    free(doc->inputs);
    memset(doc, 0, sizeof *doc);
}

int sh_jdoc_setting(const sh_jdoc *doc, const char *key, char *buf, size_t len)
{
    if (len)
        buf[0] = '\0';
    if (!doc->text || !doc->settings_len)
        return 0;
    const char *p = doc->text + doc->settings_off, *e = p + doc->settings_len;
    size_t k = strlen(key);
    while (p < e) {
        while (p < e && *p == ' ')
            p++;
        const char *w = p;
        while (p < e && *p != ' ')
            p++;
        if ((size_t)(p - w) > k && !memcmp(w, key, k) && w[k] == '=') {
            size_t vl = (size_t)(p - w) - k - 1;
            if (len) {
                if (vl >= len)
                    vl = len - 1;
                memcpy(buf, w + k + 1, vl);
                buf[vl] = '\0';
            }
            return 1;
        }
    }
    return 0;
}

char *sh_jdoc_span(const sh_jdoc *doc, size_t off, size_t n, char *buf, size_t len)
{
    if (!len)
        return buf;
    if (!doc->text || off > doc->len)
        n = 0;
    else if (n > doc->len - off)
        n = doc->len - off;
    if (n >= len)
        n = len - 1;
    if (n)
        memcpy(buf, doc->text + off, n);
    buf[n] = '\0';
    return buf;
}
