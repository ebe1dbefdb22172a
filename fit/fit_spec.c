/* fit_spec.c - parse and format model specifications (grammar in fit_spec.h). */
#include "fit_spec.h"
#include "hn_status.h"

#include <ctype.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

fit_spec fit_spec_default(void)
{
    fit_spec s;
    memset(&s, 0, sizeof s);
    s.mean = 1;
    s.dist = FIT_DIST_NORMAL;
    return s;
}

typedef struct {
    const char *text;
    size_t pos;
    char *err;
    size_t errlen;
    int errpos;
} parser;

static void skip_blanks(parser *p)
{
    while (p->text[p->pos] == ' ' || p->text[p->pos] == '\t')
        p->pos++;
}

static int fail(parser *p, const char *msg)
{
    if (p->err && p->errlen)
        snprintf(p->err, p->errlen, "%s", msg);
    p->errpos = (int)p->pos;
    return HN_EPARSE;
}

static int accept(parser *p, char c)
{
    skip_blanks(p);
    if (p->text[p->pos] == c) {
        p->pos++;
        return 1;
    }
    return 0;
}

/* A non-negative decimal integer no larger than FIT_MAX_LAG. */
static int read_int(parser *p, int *v)
{
    skip_blanks(p);
    if (!isdigit((unsigned char)p->text[p->pos]))
        return fail(p, "expected a whole number");
    long x = 0;
    size_t at = p->pos;
    while (isdigit((unsigned char)p->text[p->pos])) {
        x = x * 10 + (p->text[p->pos] - '0');
        if (x > FIT_MAX_LAG) {
            p->pos = at;
            return fail(p, "order or lag too large (the largest accepted is 400)");
        }
        p->pos++;
    }
    *v = (int)x;
    return HN_OK;
}

static int read_word(parser *p, char *w, size_t len)
{
    size_t k = 0;
    skip_blanks(p);
    while (isalpha((unsigned char)p->text[p->pos])) {
        if (k + 1 < len)
            w[k++] = (char)tolower((unsigned char)p->text[p->pos]);
        p->pos++;
    }
    w[k] = '\0';
    return (int)k;
}

static int add_lag(int *n, int *lags, int lag)
{
    if (lag < 1 || lag > FIT_MAX_LAG)
        return HN_EINVAL;
    for (int i = 0; i < *n; i++)
        if (lags[i] == lag)
            return HN_EINVAL;
    if (*n >= FIT_MAX_TERMS)
        return HN_EINVAL;
    int i = *n;
    while (i > 0 && lags[i - 1] > lag) {
        lags[i] = lags[i - 1];
        i--;
    }
    lags[i] = lag;
    (*n)++;
    return HN_OK;
}

int fit_spec_add_ar(fit_spec *s, int lag) { return add_lag(&s->n_ar, s->ar_lag, lag); }
int fit_spec_add_ma(fit_spec *s, int lag) { return add_lag(&s->n_ma, s->ma_lag, lag); }

/* Add lags 1..order of one kind; AR is kind 0, MA kind 1. */
static int add_order(parser *p, fit_spec *s, int kind, int order, size_t at)
{
    if (order > FIT_MAX_TERMS) {
        p->pos = at;
        return fail(p, "order too large (at most 32 terms of one kind; use a lag list like ar[1,12])");
    }
    for (int k = 1; k <= order; k++) {
        int rc = kind == 0 ? fit_spec_add_ar(s, k) : fit_spec_add_ma(s, k);
        if (rc != HN_OK) {
            p->pos = at;
            return fail(p, kind == 0 ? "AR lag given twice" : "MA lag given twice");
        }
    }
    return HN_OK;
}

static int parse_lag_list(parser *p, fit_spec *s, int kind)
{
    int rc;
    do {
        size_t at = (skip_blanks(p), p->pos);
        int lag;
        if ((rc = read_int(p, &lag)) != HN_OK)
            return rc;
        if (lag == 0) {
            p->pos = at;
            return fail(p, "lags start at 1");
        }
        rc = kind == 0 ? fit_spec_add_ar(s, lag) : fit_spec_add_ma(s, lag);
        if (rc != HN_OK) {
            p->pos = at;
            return fail(p, "lag given twice, or more than 32 lags of one kind");
        }
    } while (accept(p, ','));
    if (!accept(p, ']'))
        return fail(p, "expected ',' or ']' in the lag list");
    return HN_OK;
}

static int parse_term(parser *p, fit_spec *s, int *seen_garch)
{
    char w[16];
    size_t at = (skip_blanks(p), p->pos);
    if (!read_word(p, w, sizeof w)) {
        return fail(p, "expected a model term: arma(p,q), ar(p), ma(q), ar[lags], ma[lags] or garch(1,1)");
    }
    int rc, a, b;
    if (!strcmp(w, "arma")) {
        if (!accept(p, '('))
            return fail(p, "expected '(' after arma");
        size_t pa = (skip_blanks(p), p->pos);
        if ((rc = read_int(p, &a)) != HN_OK) return rc;
        if (!accept(p, ','))
            return fail(p, "expected ',' between the AR and MA orders");
        size_t pb = (skip_blanks(p), p->pos);
        if ((rc = read_int(p, &b)) != HN_OK) return rc;
        if (!accept(p, ')'))
            return fail(p, "expected ')'");
        if ((rc = add_order(p, s, 0, a, pa)) != HN_OK) return rc;
        return add_order(p, s, 1, b, pb);
    }
    if (!strcmp(w, "ar") || !strcmp(w, "ma")) {
        int kind = w[0] == 'm';
        if (accept(p, '['))
            return parse_lag_list(p, s, kind);
        if (!accept(p, '('))
            return fail(p, "expected '(' or '[' after ar/ma");
        size_t pa = (skip_blanks(p), p->pos);
        if ((rc = read_int(p, &a)) != HN_OK) return rc;
        if (accept(p, ',')) {
            p->pos = pa;
            return fail(p, "ar(p) takes one order; for chosen lags write ar[1,7]");
        }
        if (!accept(p, ')'))
            return fail(p, "expected ')'");
        return add_order(p, s, kind, a, pa);
    }
    if (!strcmp(w, "garch")) {
        if (!accept(p, '('))
            return fail(p, "expected '(' after garch");
        size_t pa = (skip_blanks(p), p->pos);
        if ((rc = read_int(p, &a)) != HN_OK) return rc;
        if (!accept(p, ','))
            return fail(p, "expected ',' in garch(1,1)");
        if ((rc = read_int(p, &b)) != HN_OK) return rc;
        if (!accept(p, ')'))
            return fail(p, "expected ')'");
        if (a != 1 || b != 1) {
            p->pos = pa;
            return fail(p, "only garch(1,1) is supported");
        }
        if (*seen_garch) {
            p->pos = at;
            return fail(p, "garch(1,1) given twice");
        }
        *seen_garch = 1;
        s->garch = 1;
        return HN_OK;
    }
    p->pos = at;
    return fail(p, "unknown model term (expected arma, ar, ma or garch)");
}

int fit_spec_parse(const char *text, fit_spec *out, char *err, size_t errlen, int *errpos)
{
    parser p = { text ? text : "", 0, err, errlen, 0 };
    fit_spec s = fit_spec_default();
    int seen_garch = 0, rc;

    if (err && errlen)
        err[0] = '\0';
    skip_blanks(&p);
    if (!p.text[p.pos]) {
        rc = fail(&p, "empty model specification");
        goto done;
    }
    do {
        if ((rc = parse_term(&p, &s, &seen_garch)) != HN_OK)
            goto done;
    } while (accept(&p, '+'));

    for (;;) {
        skip_blanks(&p);
        if (!p.text[p.pos])
            break;
        size_t at = p.pos;
        char w[16];
        if (!read_word(&p, w, sizeof w)) {
            rc = fail(&p, "unexpected character in model specification");
            goto done;
        }
        if (!strcmp(w, "t"))
            s.dist = FIT_DIST_T;
        else if (!strcmp(w, "normal"))
            s.dist = FIT_DIST_NORMAL;
        else if (!strcmp(w, "nomean"))
            s.mean = 0;
        else {
            p.pos = at;
            rc = fail(&p, "unknown word after the model (expected t, normal or nomean)");
            goto done;
        }
    }
    if (s.dist == FIT_DIST_T && !s.garch) {
        p.pos = 0;
        rc = fail(&p, "Student-t innovations need a variance model: add +garch(1,1)");
        goto done;
    }
    *out = s;
    rc = HN_OK;
done:
    if (errpos)
        *errpos = p.errpos;
    return rc;
}

static int contiguous(int n, const int *lags)
{
    for (int i = 0; i < n; i++)
        if (lags[i] != i + 1)
            return 0;
    return 1;
}

__attribute__((format(printf, 4, 5)))
static size_t put(char *buf, size_t len, size_t at, const char *fmt, ...)
{
    if (at >= len)
        return at;
    va_list ap;
    va_start(ap, fmt);
    int k = vsnprintf(buf + at, len - at, fmt, ap);
    va_end(ap);
    return k < 0 ? at : at + (size_t)k;
}

static size_t put_lags(char *buf, size_t len, size_t at, const char *kind, int n, const int *lags)
{
    at = put(buf, len, at, "%s", kind);
    for (int i = 0; i < n; i++)
        at = put(buf, len, at, i ? ",%d" : "%d", lags[i]);
    return put(buf, len, at, "%s", "]");
}

char *fit_spec_format(const fit_spec *s, char *buf, size_t len)
{
    size_t at = 0;
    int car = contiguous(s->n_ar, s->ar_lag), cma = contiguous(s->n_ma, s->ma_lag);
    if (!len)
        return buf;
    buf[0] = '\0';
    if (car && cma) {
        if (s->n_ar && s->n_ma)
            at = put(buf, len, at, "arma(%d,%d)", s->n_ar, s->n_ma);
        else if (s->n_ar)
            at = put(buf, len, at, "ar(%d)", s->n_ar);
        else if (s->n_ma)
            at = put(buf, len, at, "ma(%d)", s->n_ma);
        else if (!s->garch)
            at = put(buf, len, at, "%s", "arma(0,0)");
    } else {
        if (s->n_ar)
            at = car ? put(buf, len, at, "ar(%d)", s->n_ar)
                     : put_lags(buf, len, at, "ar[", s->n_ar, s->ar_lag);
        if (s->n_ma) {
            if (s->n_ar)
                at = put(buf, len, at, "%s", "+");
            at = cma ? put(buf, len, at, "ma(%d)", s->n_ma)
                     : put_lags(buf, len, at, "ma[", s->n_ma, s->ma_lag);
        }
    }
    if (s->garch)
        at = put(buf, len, at, "%s", at ? "+garch(1,1)" : "garch(1,1)");
    if (s->dist == FIT_DIST_T)
        at = put(buf, len, at, "%s", " t");
    if (!s->mean)
        at = put(buf, len, at, "%s", " nomean");
    (void)at;
    return buf;
}

int fit_spec_nparams(const fit_spec *s)
{
    return (s->mean ? 1 : 0) + s->n_ar + s->n_ma + (s->garch ? 3 : 0) +
           (s->dist == FIT_DIST_T ? 1 : 0);
}

const char *fit_spec_param_name(const fit_spec *s, int i, char *buf, size_t len)
{
    if (s->mean) {
        if (i == 0) { snprintf(buf, len, "mu"); return buf; }
        i--;
    }
    if (i < s->n_ar) { snprintf(buf, len, "ar%d", s->ar_lag[i]); return buf; }
    i -= s->n_ar;
    if (i < s->n_ma) { snprintf(buf, len, "ma%d", s->ma_lag[i]); return buf; }
    i -= s->n_ma;
    if (s->garch) {
        static const char *g[3] = { "omega", "alpha1", "beta1" };
        if (i < 3) { snprintf(buf, len, "%s", g[i]); return buf; }
        i -= 3;
    }
    if (s->dist == FIT_DIST_T && i == 0) { snprintf(buf, len, "nu"); return buf; }
    snprintf(buf, len, "?");
    return buf;
}

int fit_spec_max_ar(const fit_spec *s) { return s->n_ar ? s->ar_lag[s->n_ar - 1] : 0; }
int fit_spec_max_ma(const fit_spec *s) { return s->n_ma ? s->ma_lag[s->n_ma - 1] : 0; }
int fit_spec_arma_terms(const fit_spec *s) { return s->n_ar + s->n_ma; }

int fit_spec_equal(const fit_spec *a, const fit_spec *b)
{
    if (a->mean != b->mean || a->n_ar != b->n_ar || a->n_ma != b->n_ma ||
        a->garch != b->garch || a->dist != b->dist)
        return 0;
    return !memcmp(a->ar_lag, b->ar_lag, sizeof(int) * (size_t)a->n_ar) &&
           !memcmp(a->ma_lag, b->ma_lag, sizeof(int) * (size_t)a->n_ma);
}
