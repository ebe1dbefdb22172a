/* sh_tchart.c - terminal charts: a grid of text cells filled per chart kind, then printed. */
#include "sh_tchart.h"

#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

#include "hn_status.h"

/* ---- glyph sets ------------------------------------------------------- */

typedef struct {
    const char *hline, *vline, *corner, *ytick, *xtick, *ref;
    const char *flat[SH_CHART_MAX_SERIES], *vert[SH_CHART_MAX_SERIES];
    const char *eighth[9];   /* 1..8: lower eighth blocks, growing upward */
    const char *top_half, *top_eighth;  /* tips of bars growing downward */
    const char *dot, *dots, *hollow, *solid, *diag, *marker;
    const char *shade[2];    /* outer, inner band */
    const char *pm;
} glyphs;

static const glyphs G_UTF8 = {
    "\u2500", "\u2502", "\u2514", "\u2524", "\u252c", "\u2504",
    { "\u2500", "\u2501", "\u2550", "\u2508" },
    { "\u2502", "\u2503", "\u2551", "\u250a" },
    { "", "\u2581", "\u2582", "\u2583", "\u2584", "\u2585", "\u2586", "\u2587", "\u2588" },
    "\u2580", "\u2594",
    "\u2022", "\u25cf", "\u25cb", "\u25cf", "\u2571", "\u25b2",
    { "\u2591", "\u2592" },
    "\u00b1",
};

static const glyphs G_ASCII = {
    "-", "|", "+", "+", "+", ".",
    { "*", "o", "+", "x" },
    { "*", "o", "+", "x" },
    { "", "", "", "", "#", "#", "#", "#", "#" },
    "#", "",
    "o", "O", "o", "x", "/", "^",
    { ":", "%" },
    "+-",
};

/* Colour slots: 1..4 series, 5 guides (reference lines, bands), 6 alert, 7 title. */
enum { C_NONE = 0, C_GUIDE = 5, C_ALERT = 6, C_TITLE = 7 };
static const char *const ANSI[] = { "", "36", "33", "35", "32", "90", "31", "1" };

/* ---- the cell grid ---------------------------------------------------- */

typedef struct {
    char g[5];            /* one UTF-8 character, "" for blank */
    unsigned char col;
} cell;

typedef struct {
    int w, h;
    cell *c;
    const glyphs *gl;
    unsigned flags;
} canvas;

static void put(canvas *cv, int row, int col, const char *g, int colour)
{
    if (row < 0 || row >= cv->h || col < 0 || col >= cv->w || !g || !*g)
        return;
    cell *p = &cv->c[(size_t)row * (size_t)cv->w + (size_t)col];
    size_t n = strlen(g);
    if (n > 4)
        n = 4;
    memcpy(p->g, g, n);
    p->g[n] = '\0';
    p->col = (unsigned char)colour;
}

static int blank(const canvas *cv, int row, int col)
{
    if (row < 0 || row >= cv->h || col < 0 || col >= cv->w)
        return 0;
    return cv->c[(size_t)row * (size_t)cv->w + (size_t)col].g[0] == '\0';
}

/* Bytes in the UTF-8 character starting at S. */
static int u8len(const char *s)
{
    unsigned char b = (unsigned char)*s;
    int n = b < 0x80 ? 1 : b >= 0xf0 ? 4 : b >= 0xe0 ? 3 : b >= 0xc0 ? 2 : 1;
    for (int i = 1; i < n; i++)
        if (!s[i])
            return i;
    return n;
}

/* Display columns of S, one per UTF-8 character. */
static int u8cols(const char *s)
{
    int k = 0;
    while (*s) {
        s += u8len(s);
        k++;
    }
    return k;
}

/* Write S from column COL, at most MAXW columns; returns columns written. */
static int text(canvas *cv, int row, int col, const char *s, int maxw, int colour)
{
    int k = 0;
    char g[5];
    while (*s && k < maxw && col + k < cv->w) {
        int n = u8len(s);
        memcpy(g, s, (size_t)n);
        g[n] = '\0';
        if (!(n == 1 && g[0] == ' '))
            put(cv, row, col + k, g, colour);
        s += n;
        k++;
    }
    return k;
}

/* ---- output buffer ---------------------------------------------------- */

typedef struct {
    char *p;
    size_t len, cap;
    int err;
} sbuf;

static void sb_add(sbuf *b, const char *s, size_t n)
{
    if (b->err)
        return;
    if (b->len + n + 1 > b->cap) {
        size_t cap = b->cap ? b->cap : 256;
        while (b->len + n + 1 > cap)
            cap *= 2;
        char *q = realloc(b->p, cap);
        if (!q) {
            b->err = 1;
            return;
        }
        b->p = q;
        b->cap = cap;
    }
    memcpy(b->p + b->len, s, n);
    b->len += n;
    b->p[b->len] = '\0';
}

static void sb_str(sbuf *b, const char *s) { sb_add(b, s, strlen(s)); }

static void emit(const canvas *cv, sbuf *b)
{
    int colour = cv->flags & SH_TC_COLOR;
    for (int r = 0; r < cv->h; r++) {
        const cell *row = &cv->c[(size_t)r * (size_t)cv->w];
        int last = cv->w - 1;
        while (last >= 0 && row[last].g[0] == '\0')
            last--;
        int cur = 0;
        for (int k = 0; k <= last; k++) {
            int want = row[k].g[0] ? row[k].col : cur;  /* blanks keep the run */
            if (colour && want != cur) {
                if (cur)
                    sb_str(b, "\033[0m");
                if (want) {
                    sb_str(b, "\033[");
                    sb_str(b, ANSI[want]);
                    sb_str(b, "m");
                }
                cur = want;
            }
            sb_str(b, row[k].g[0] ? row[k].g : " ");
        }
        if (colour && cur)
            sb_str(b, "\033[0m");
        sb_str(b, "\n");
    }
}

/* ---- numbers and layout ----------------------------------------------- */

static void fmt_num(char *buf, size_t n, double v)
{
    if (v == 0.0 || fabs(v) < 1e-300)
        v = 0.0;
    snprintf(buf, n, "%.3g", v);
}

typedef struct {
    int top, rows;        /* plot rows */
    int left, cols;       /* plot columns; the y axis sits at left - 1 */
    int axis_row, xlab_row, legend_row;
    double ymin, ymax;    /* values at the bottom and top plot rows */
} frame;

#define MAX_YLAB 8
typedef struct {
    double v[MAX_YLAB];
    int n;
    int pow10;            /* 1: the axis is log10 and labels show 10^v */
} ylabels;

static void ylab_add(ylabels *yl, double v)
{
    if (yl->n < MAX_YLAB && isfinite(v))
        yl->v[yl->n++] = v;
}

/* Label I as printed: a power of ten on a log axis; a value within a
 * millionth of the axis span of zero (rounding residue) prints as 0. */
static double ylab_value(const ylabels *yl, const frame *f, int i)
{
    double v = yl->v[i];
    if (yl->pow10)
        return pow(10.0, v);
    return fabs(v) < 1e-6 * (f->ymax - f->ymin) ? 0.0 : v;
}

static int row_of(const frame *f, double v)
{
    double t = (f->ymax - v) / (f->ymax - f->ymin) * (double)(f->rows - 1);
    if (t < 0.0) t = 0.0;
    if (t > (double)(f->rows - 1)) t = (double)(f->rows - 1);
    return f->top + (int)lround(t);
}

/* Rows left for the plot by a canvas of height H. */
static int plot_rows(const sh_chart *c, int h, int legend)
{
    return h - (c->title && *c->title ? 1 : 0) - 2 - (legend ? 1 : 0);
}

/* Lay out the frame: title, y labels (at most one per row, first come first
 * served), y axis, x axis. */
static void frame_draw(canvas *cv, const sh_chart *c, frame *f, const ylabels *yl, int legend)
{
    const glyphs *g = cv->gl;
    char buf[32];
    int lw = 1, used[MAX_YLAB];
    f->top = 0;
    if (c->title && *c->title) {
        text(cv, 0, 0, c->title, cv->w, C_TITLE);
        f->top = 1;
    }
    f->rows = plot_rows(c, cv->h, legend);
    for (int i = 0; i < yl->n; i++) {
        fmt_num(buf, sizeof buf, ylab_value(yl, f, i));
        int k = (int)strlen(buf);
        if (k > lw) lw = k;
    }
    f->left = lw + 1;
    f->cols = cv->w - f->left;
    f->axis_row = f->top + f->rows;
    f->xlab_row = f->axis_row + 1;
    f->legend_row = legend ? f->xlab_row + 1 : -1;
    for (int r = f->top; r < f->axis_row; r++)
        put(cv, r, lw, g->vline, C_NONE);
    for (int i = 0; i < yl->n; i++) {
        int r = row_of(f, yl->v[i]);
        used[i] = r;
        int taken = 0;
        for (int j = 0; j < i; j++)
            if (used[j] == r) taken = 1;
        if (taken)
            continue;
        fmt_num(buf, sizeof buf, ylab_value(yl, f, i));
        text(cv, r, lw - (int)strlen(buf), buf, lw, C_NONE);
        put(cv, r, lw, g->ytick, C_NONE);
    }
    put(cv, f->axis_row, lw, g->corner, C_NONE);
    for (int k = 0; k < f->cols; k++)
        put(cv, f->axis_row, f->left + k, g->hline, C_NONE);
}

/* An x label centred on plot column COL (clamped inside the plot) unless it
 * would touch text already on the label row; a tick on the axis above. */
static void xlab(canvas *cv, const frame *f, int col, const char *s)
{
    int n = u8cols(s);
    int start = f->left + col - n / 2;
    if (start < f->left) start = f->left;
    if (start + n > f->left + f->cols) start = f->left + f->cols - n;
    if (start < 0)
        return;
    for (int k = start - 1; k <= start + n; k++)
        if (k >= 0 && k < cv->w && !blank(cv, f->xlab_row, k))
            return;
    text(cv, f->xlab_row, start, s, n, C_NONE);
    put(cv, f->axis_row, f->left + col, cv->gl->xtick, C_NONE);
}

typedef struct {
    canvas *cv;
    int row, col;
} legline;

/* Append "GLYPH TEXT" (printf-style text) to the legend line. */
static void leg_add(legline *lg, const char *glyph, int colour, const char *fmt, ...)
{
    char buf[160];
    va_list ap;
    if (lg->row < 0)
        return;
    va_start(ap, fmt);
    vsnprintf(buf, sizeof buf, fmt, ap);
    va_end(ap);
    if (lg->col > 0)
        lg->col += 2;
    if (glyph && *glyph) {
        put(lg->cv, lg->row, lg->col, glyph, colour);
        lg->col += u8cols(glyph) + 1;
    }
    lg->col += text(lg->cv, lg->row, lg->col, buf, lg->cv->w - lg->col, C_NONE);
}

/* The message drawn when there is nothing finite to plot. */
static void empty_chart(canvas *cv, const sh_chart *c)
{
    int r = 0;
    if (c->title && *c->title)
        text(cv, r++, 0, c->title, cv->w, C_TITLE);
    text(cv, r, 0, "(no finite values)", cv->w, C_NONE);
}

/* Lag labels for NSHOW values starting at FIRST, one every STEP lags with
 * STEP from 1, 2, 5, 10, 20, 50, ... wide enough for the labels. */
static void lag_labels(canvas *cv, const frame *f, int first, int nshow,
                       int (*colmap)(const frame *, int, int))
{
    char buf[16];
    snprintf(buf, sizeof buf, "%d", first + nshow - 1);
    int need = (int)strlen(buf) + 1;
    double per = nshow > 1 ? (double)(f->cols - 1) / (double)(nshow - 1) : (double)f->cols;
    static const int mult[] = { 1, 2, 5 };
    int step = 1;
    for (int e = 1, found = 0; !found && e <= 100000; e *= 10)
        for (int i = 0; i < 3 && !found; i++) {
            step = mult[i] * e;
            found = per * step >= need;
        }
    for (int i = 0; i < nshow; i++) {
        int lag = first + i;
        if (i != 0 && lag % step != 0)
            continue;
        snprintf(buf, sizeof buf, "%d", lag);
        xlab(cv, f, colmap(f, i, nshow), buf);
    }
}

/* ---- line traces ------------------------------------------------------ */

/* Value of Y at fractional index T by linear interpolation, NaN where a
 * neighbour is missing. */
static double interp(const double *y, size_t n, double t)
{
    if (n == 0 || t < 0.0 || t > (double)(n - 1))
        return NAN;
    size_t i0 = (size_t)floor(t);
    double fr = t - (double)i0;
    if (fr == 0.0 || i0 + 1 >= n)
        return fr == 0.0 ? y[i0] : NAN;
    if (!isfinite(y[i0]) || !isfinite(y[i0 + 1]))
        return NAN;
    return y[i0] + fr * (y[i0 + 1] - y[i0]);
}

/* Draw Y (indices OFF .. OFF+N-1 of a shared x axis of XN points): each plot
 * column covers an interval of x; its cells run from the smallest to the
 * largest value seen there (interpolated ends and samples inside). */
static void trace(canvas *cv, const frame *f, const double *y, size_t n, size_t off,
                  size_t xn, const char *flat, const char *vert, int colour)
{
    if (n == 0)
        return;
    if (xn <= 1 || f->cols == 1) {
        if (isfinite(y[0]))
            put(cv, row_of(f, y[0]), f->left + f->cols / 2, flat, colour);
        return;
    }
    double s = (double)(xn - 1) / (double)(f->cols - 1);
    for (int c = 0; c < f->cols; c++) {
        double a = ((double)c - 0.5) * s - (double)off, b = ((double)c + 0.5) * s - (double)off;
        if (b < 0.0 || a > (double)(n - 1))
            continue;
        if (a < 0.0) a = 0.0;
        if (b > (double)(n - 1)) b = (double)(n - 1);
        double lo = INFINITY, hi = -INFINITY, v;
        v = interp(y, n, a);
        if (isfinite(v)) { lo = fmin(lo, v); hi = fmax(hi, v); }
        v = interp(y, n, b);
        if (isfinite(v)) { lo = fmin(lo, v); hi = fmax(hi, v); }
        for (size_t i = (size_t)ceil(a); (double)i <= b && i < n; i++)
            if (isfinite(y[i])) { lo = fmin(lo, y[i]); hi = fmax(hi, y[i]); }
        if (lo > hi)
            continue;
        int r0 = row_of(f, hi), r1 = row_of(f, lo);
        for (int r = r0; r <= r1; r++)
            put(cv, r, f->left + c, r0 == r1 ? flat : vert, colour);
    }
}

static void hline_at(canvas *cv, const frame *f, double v, int colour)
{
    if (!isfinite(v) || v < f->ymin || v > f->ymax)
        return;
    int r = row_of(f, v);
    for (int k = 0; k < f->cols; k++)
        put(cv, r, f->left + k, cv->gl->ref, colour);
}

/* Widen a degenerate range so that it can be drawn. */
static void widen(double *lo, double *hi)
{
    if (*hi > *lo)
        return;
    double d = *lo != 0.0 ? 0.5 * fabs(*lo) : 1.0;
    *lo -= d;
    *hi += d;
}

static void x_ends(canvas *cv, const frame *f, const sh_chart *c, size_t xn)
{
    char buf[32];
    snprintf(buf, sizeof buf, "%.6g", c->x0);
    if (xn <= 1) {
        xlab(cv, f, f->cols / 2, buf);
        return;
    }
    xlab(cv, f, 0, buf);
    snprintf(buf, sizeof buf, "%.6g", c->x0 + (double)(xn - 1) * c->dx);
    xlab(cv, f, f->cols - 1, buf);
    if (c->xlabel && *c->xlabel)
        xlab(cv, f, f->cols / 2, c->xlabel);
}

/* ---- chart kinds ------------------------------------------------------ */

static int draw_line(canvas *cv, const sh_chart *c)
{
    const glyphs *g = cv->gl;
    double lo = INFINITY, hi = -INFINITY;
    size_t finite = 0, xn = 0;
    int legend = 0;
    for (int s = 0; s < c->nseries; s++) {
        finite += sh_chart_range(c->series[s].y, c->series[s].n, &lo, &hi);
        if (c->series[s].n > xn) xn = c->series[s].n;
        if (c->series[s].label) legend = 1;
    }
    if (finite == 0) {
        empty_chart(cv, c);
        return HN_OK;
    }
    for (int r = 0; r < c->nrefs; r++) {
        if (isfinite(c->refs[r].y)) {
            lo = fmin(lo, c->refs[r].y);
            hi = fmax(hi, c->refs[r].y);
        }
        if (c->refs[r].label) legend = 1;
    }
    if (plot_rows(c, cv->h, legend) < SH_TC_MIN_ROWS)
        return HN_EINVAL;
    widen(&lo, &hi);
    frame f = { .ymin = lo, .ymax = hi };
    ylabels yl = { .n = 0 };
    ylab_add(&yl, hi);
    ylab_add(&yl, lo);
    for (int r = 0; r < c->nrefs; r++)
        ylab_add(&yl, c->refs[r].y);
    frame_draw(cv, c, &f, &yl, legend);
    for (int r = 0; r < c->nrefs; r++)
        hline_at(cv, &f, c->refs[r].y, C_GUIDE);
    for (int s = 0; s < c->nseries; s++)
        trace(cv, &f, c->series[s].y, c->series[s].n, 0, xn, g->flat[s], g->vert[s], 1 + s);
    x_ends(cv, &f, c, xn);
    legline lg = { cv, f.legend_row, 0 };
    for (int s = 0; s < c->nseries; s++)
        if (c->series[s].label)
            leg_add(&lg, g->flat[s], 1 + s, "%s", c->series[s].label);
    for (int r = 0; r < c->nrefs; r++)
        if (c->refs[r].label)
            leg_add(&lg, g->ref, C_GUIDE, "%s", c->refs[r].label);
    return HN_OK;
}

/* Correlogram slots: each shown lag owns SW columns; its bar is BW wide. */
typedef struct {
    int sw, bw;
} slots;

static slots corr_slots(const frame *f, int nshow)
{
    slots s;
    s.sw = nshow > 0 ? f->cols / nshow : 1;
    if (s.sw < 1) s.sw = 1;
    s.bw = s.sw >= 4 ? 2 : 1;
    return s;
}

static int corr_col(const frame *f, int i, int nshow)
{
    slots s = corr_slots(f, nshow);
    return i * s.sw + (s.sw - s.bw) / 2;
}

static int draw_corr(canvas *cv, const sh_chart *c)
{
    const glyphs *g = cv->gl;
    const double *r = c->series[0].y;
    size_t m = c->nseries > 0 ? c->series[0].n : 0;
    double lo = INFINITY, hi = -INFINITY;
    if (sh_chart_range(r, m, &lo, &hi) == 0) {
        empty_chart(cv, c);
        return HN_OK;
    }
    if (plot_rows(c, cv->h, 1) < SH_TC_MIN_ROWS)
        return HN_EINVAL;
    double big = fmax(fabs(lo), fabs(hi)), bmax = c->band;
    if (c->band_lag) {
        bmax = 0.0;
        for (size_t i = 0; i < m; i++)
            if (isfinite(c->band_lag[i])) bmax = fmax(bmax, c->band_lag[i]);
    }
    double lim = ceil(fmax(big, bmax) * 1.1 * 20.0) / 20.0;
    if (!(lim > 0.0)) lim = 1.0;
    /* Rows above and below the zero row share one scale. */
    int rows = plot_rows(c, cv->h, 1), up = (rows - 1) / 2, down = rows - 1 - up;
    frame f = { .ymax = lim, .ymin = -lim * (double)down / (double)up };
    ylabels yl = { .n = 0 };
    ylab_add(&yl, f.ymax);
    ylab_add(&yl, 0.0);
    ylab_add(&yl, f.ymin);
    frame_draw(cv, c, &f, &yl, 1);
    int zero = f.top + up;
    for (int k = 0; k < f.cols; k++)
        put(cv, zero, f.left + k, g->hline, C_NONE);
    put(cv, zero, f.left - 1, g->ytick, C_NONE);

    int nshow = (int)(m < (size_t)f.cols ? m : (size_t)f.cols);
    slots sl = corr_slots(&f, nshow);
    double cells = (double)up / lim;   /* cells per unit of correlation */
    /* Band: a guide row at each side, over each lag's slot. */
    if (c->band > 0.0 || c->band_lag) {
        for (int i = 0; i < nshow; i++) {
            double b = c->band_lag ? c->band_lag[i] : c->band;
            if (!isfinite(b) || b <= 0.0)
                continue;
            int hb = (int)lround(b * cells);
            if (hb < 1) hb = 1;
            int x0 = i * sl.sw, x1 = (i == nshow - 1 && !c->band_lag) ? f.cols : x0 + sl.sw;
            for (int k = x0; k < x1; k++) {
                put(cv, zero - hb, f.left + k, g->ref, C_GUIDE);
                put(cv, zero + hb, f.left + k, g->ref, C_GUIDE);
            }
        }
    }
    legline lg = { cv, f.legend_row, 0 };
    char beyond[128] = "";
    size_t bl = 0;
    int nbeyond = 0;
    for (int i = 0; i < nshow; i++) {
        double v = r[i];
        if (!isfinite(v))
            continue;
        double b = c->band_lag ? c->band_lag[i] : c->band;
        int out = (c->band > 0.0 || c->band_lag) && isfinite(b) && b > 0.0 && fabs(v) > b;
        int colour = out ? C_ALERT : 1;
        int h8 = (int)lround(fabs(v) * cells * 8.0);
        int col = f.left + corr_col(&f, i, nshow);
        for (int w = 0; w < sl.bw; w++) {
            int full = h8 / 8, rem = h8 % 8;
            for (int k = 1; k <= full; k++)
                put(cv, v > 0 ? zero - k : zero + k, col + w, g->eighth[8], colour);
            if (v > 0)
                put(cv, zero - full - 1, col + w, g->eighth[rem], colour);
            else if (rem >= 4)
                put(cv, zero + full + 1, col + w, g->top_half, colour);
            else if (rem >= 1)
                put(cv, zero + full + 1, col + w, g->top_eighth, colour);
        }
        if (out) {
            nbeyond++;
            if (bl + 8 < sizeof beyond)
                bl += (size_t)snprintf(beyond + bl, sizeof beyond - bl, "%s%d",
                                       nbeyond > 1 ? " " : "", c->first_lag + i);
        }
    }
    lag_labels(cv, &f, c->first_lag, nshow, corr_col);
    for (int i = 0; i < nshow; i++) {
        double b = c->band_lag ? c->band_lag[i] : c->band;
        if (isfinite(r[i]) && isfinite(b) && b > 0.0 && fabs(r[i]) > b)
            put(cv, f.axis_row, f.left + corr_col(&f, i, nshow), g->marker, C_ALERT);
    }
    if (c->band_lag)
        leg_add(&lg, g->ref, C_GUIDE, "band");
    else if (c->band > 0.0)
        leg_add(&lg, g->ref, C_GUIDE, "%s%.3g", g->pm, c->band);
    if (c->band > 0.0 || c->band_lag) {
        if (nbeyond)
            leg_add(&lg, g->marker, C_ALERT, "beyond band: lag%s %s", nbeyond > 1 ? "s" : "", beyond);
        else
            leg_add(&lg, NULL, C_NONE, "all inside");
    }
    if ((size_t)nshow < m)
        leg_add(&lg, NULL, C_NONE, "lags %d-%d of %zu", c->first_lag,
                c->first_lag + nshow - 1, m);
    return HN_OK;
}

static int x_col(const frame *f, double x, double xmin, double xmax)
{
    double t = (x - xmin) / (xmax - xmin) * (double)(f->cols - 1);
    if (t < 0.0) t = 0.0;
    if (t > (double)(f->cols - 1)) t = (double)(f->cols - 1);
    return (int)lround(t);
}

static int draw_qq(canvas *cv, const sh_chart *c)
{
    const glyphs *g = cv->gl;
    double *xq, *yq;
    size_t k;
    if (sh_chart_qq_points(c, &xq, &yq, &k) != 0)
        return HN_ENOMEM;
    if (k == 0) {
        empty_chart(cv, c);
        return HN_OK;
    }
    if (plot_rows(c, cv->h, 1) < SH_TC_MIN_ROWS) {
        free(xq);
        free(yq);
        return HN_EINVAL;
    }
    double lim = 0.0;
    for (size_t i = 0; i < k; i++)
        lim = fmax(lim, fmax(fabs(xq[i]), fabs(yq[i])));
    lim = ceil(lim * 2.0) / 2.0;
    if (!(lim > 0.0)) lim = 1.0;
    frame f = { .ymin = -lim, .ymax = lim };
    ylabels yl = { .n = 0 };
    ylab_add(&yl, lim);
    ylab_add(&yl, 0.0);
    ylab_add(&yl, -lim);
    frame_draw(cv, c, &f, &yl, 1);
    for (int col = 0; col < f.cols; col++) {
        double x = -lim + 2.0 * lim * (double)col / (double)(f.cols - 1);
        put(cv, row_of(&f, x), f.left + col, g->diag, C_GUIDE);
    }
    /* Count points per cell; two or more get the heavier glyph. */
    size_t ncell = (size_t)f.rows * (size_t)f.cols;
    unsigned *cnt = calloc(ncell, sizeof *cnt);
    if (!cnt) {
        free(xq);
        free(yq);
        return HN_ENOMEM;
    }
    for (size_t i = 0; i < k; i++) {
        int r = row_of(&f, yq[i]) - f.top, col = x_col(&f, xq[i], -lim, lim);
        cnt[(size_t)r * (size_t)f.cols + (size_t)col]++;
    }
    for (int r = 0; r < f.rows; r++)
        for (int col = 0; col < f.cols; col++) {
            unsigned n = cnt[(size_t)r * (size_t)f.cols + (size_t)col];
            if (n)
                put(cv, f.top + r, f.left + col, n > 1 ? g->dots : g->dot, 1);
        }
    free(cnt);
    char buf[32];
    fmt_num(buf, sizeof buf, -lim);
    xlab(cv, &f, 0, buf);
    fmt_num(buf, sizeof buf, lim);
    xlab(cv, &f, f.cols - 1, buf);
    xlab(cv, &f, x_col(&f, 0.0, -lim, lim), "0");
    legline lg = { cv, f.legend_row, 0 };
    leg_add(&lg, g->dot, 1, "%s (n=%zu) against %s", c->ylabel ? c->ylabel : "value", k,
            c->xlabel ? c->xlabel : "normal quantile");
    leg_add(&lg, g->diag, C_GUIDE, "y = x");
    free(xq);
    free(yq);
    return HN_OK;
}

static int lag_col(const frame *f, int i, int nshow)
{
    if (nshow <= 1)
        return f->cols / 2;
    return (int)lround((double)i * (double)(f->cols - 1) / (double)(nshow - 1));
}

static int draw_profile(canvas *cv, const sh_chart *c)
{
    const glyphs *g = cv->gl;
    const double *p = c->series[0].y;
    size_t m = c->nseries > 0 ? c->series[0].n : 0;
    double lo = INFINITY, hi = -INFINITY;
    if (sh_chart_range(p, m, &lo, &hi) == 0) {
        empty_chart(cv, c);
        return HN_OK;
    }
    if (plot_rows(c, cv->h, 1) < SH_TC_MIN_ROWS)
        return HN_EINVAL;
    frame f = { .ymin = 0.0, .ymax = 1.0 };
    double floorv = 0.0;
    ylabels yl = { .n = 0 };
    if (c->log_scale) {
        double small = 1.0;
        for (size_t i = 0; i < m; i++)
            if (isfinite(p[i]) && p[i] > 0.0) small = fmin(small, p[i]);
        if (c->alpha > 0.0) small = fmin(small, c->alpha);
        double d = floor(log10(small));
        if (d > -1.0) d = -1.0;
        if (d < -16.0) d = -16.0;
        floorv = pow(10.0, d);
        f.ymin = d;
        f.ymax = 0.0;
    }
    /* The alpha label goes before the bottom one: it wins a shared row. */
    double ya = c->log_scale ? (c->alpha > 0.0 ? log10(c->alpha) : NAN) : c->alpha;
    ylab_add(&yl, f.ymax);
    if (c->alpha > 0.0)
        ylab_add(&yl, ya);
    ylab_add(&yl, f.ymin);
    yl.pow10 = c->log_scale;
    frame_draw(cv, c, &f, &yl, 1);
    if (c->alpha > 0.0)
        hline_at(cv, &f, ya, C_ALERT);
    int nshow = (int)m, nbelow = 0, nfinite = 0;
    for (int i = 0; i < nshow; i++) {
        double v = p[i];
        if (!isfinite(v))
            continue;
        nfinite++;
        int below = c->alpha > 0.0 && v < c->alpha;
        double y = c->log_scale ? (v > floorv ? log10(v) : log10(floorv)) : v;
        int r = row_of(&f, y), col = f.left + lag_col(&f, i, nshow);
        const cell *here = &cv->c[(size_t)r * (size_t)cv->w + (size_t)col];
        if (!below && here->col == C_ALERT && strcmp(here->g, g->solid) == 0)
            continue;   /* a failing point already drawn in this cell wins */
        put(cv, r, col, below ? g->solid : g->hollow, below ? C_ALERT : 1);
        nbelow += below;
    }
    lag_labels(cv, &f, c->first_lag, nshow, lag_col);
    legline lg = { cv, f.legend_row, 0 };
    leg_add(&lg, g->hollow, 1, "%s", c->ylabel ? c->ylabel : "p-value");
    if (c->alpha > 0.0) {
        char buf[32];
        fmt_num(buf, sizeof buf, c->alpha);
        leg_add(&lg, g->solid, C_ALERT, "below %s: %d of %d", buf, nbelow, nfinite);
    }
    if (c->log_scale)
        leg_add(&lg, NULL, C_NONE, "log scale");
    return HN_OK;
}

static int draw_fan(canvas *cv, const sh_chart *c)
{
    const glyphs *g = cv->gl;
    size_t n = c->nseries > 0 ? c->series[0].n : 0, h = c->fan_h, xn = n + h;
    double lo = INFINITY, hi = -INFINITY;
    size_t finite = sh_chart_range(c->series[0].y, n, &lo, &hi);
    finite += sh_chart_range(c->fan_mean, h, &lo, &hi);
    for (int l = 0; l < c->nlevels; l++) {
        sh_chart_range(c->fan_lo[l], h, &lo, &hi);
        sh_chart_range(c->fan_hi[l], h, &lo, &hi);
    }
    if (finite == 0) {
        empty_chart(cv, c);
        return HN_OK;
    }
    if (plot_rows(c, cv->h, 1) < SH_TC_MIN_ROWS)
        return HN_EINVAL;
    widen(&lo, &hi);
    frame f = { .ymin = lo, .ymax = hi };
    ylabels yl = { .n = 0 };
    ylab_add(&yl, hi);
    ylab_add(&yl, lo);
    frame_draw(cv, c, &f, &yl, 1);
    if (h > 0 && xn > 1 && f.cols > 1) {
        double s = (double)(xn - 1) / (double)(f.cols - 1);
        for (int l = 0; l < c->nlevels; l++)
            for (int col = 0; col < f.cols; col++) {
                double t = (double)col * s;
                long j = lround(t) - (long)n;
                if (j < 0 || (size_t)j >= h)
                    continue;
                double a = c->fan_lo[l][j], b = c->fan_hi[l][j];
                if (!isfinite(a) || !isfinite(b))
                    continue;
                int lvl = c->nlevels == 2 ? l : 0;
                for (int r = row_of(&f, fmax(a, b)); r <= row_of(&f, fmin(a, b)); r++)
                    put(cv, r, f.left + col, g->shade[lvl], C_GUIDE);
            }
    }
    trace(cv, &f, c->series[0].y, n, 0, xn, g->flat[0], g->vert[0], 1);
    trace(cv, &f, c->fan_mean, h, n, xn, g->flat[1], g->vert[1], 2);
    x_ends(cv, &f, c, xn);
    legline lg = { cv, f.legend_row, 0 };
    leg_add(&lg, g->flat[0], 1, "%s", c->series[0].label ? c->series[0].label : "observed");
    leg_add(&lg, g->flat[1], 2, "forecast");
    for (int l = c->nlevels - 1; l >= 0; l--)
        leg_add(&lg, g->shade[c->nlevels == 2 ? l : 0], C_GUIDE, "%.3g%%", c->fan_level[l]);
    return HN_OK;
}

/* ---- entry points ----------------------------------------------------- */

int sh_tchart_string(const sh_chart *c, int width, int height, unsigned flags,
                     char **out, size_t *len)
{
    *out = NULL;
    if (len)
        *len = 0;
    if (!c || width < SH_TC_MIN_WIDTH || height < SH_TC_MIN_ROWS + 2 || width > 4096 || height > 4096)
        return HN_EINVAL;
    canvas cv = { width, height, NULL, (flags & SH_TC_ASCII) ? &G_ASCII : &G_UTF8, flags };
    cv.c = calloc((size_t)width * (size_t)height, sizeof *cv.c);
    if (!cv.c)
        return HN_ENOMEM;
    int rc;
    switch (c->kind) {
    case SH_CHART_LINE:    rc = draw_line(&cv, c); break;
    case SH_CHART_CORR:    rc = draw_corr(&cv, c); break;
    case SH_CHART_QQ:      rc = draw_qq(&cv, c); break;
    case SH_CHART_PROFILE: rc = draw_profile(&cv, c); break;
    case SH_CHART_FAN:     rc = draw_fan(&cv, c); break;
    default:               rc = HN_EINVAL; break;
    }
    if (rc == HN_OK) {
        sbuf b = { NULL, 0, 0, 0 };
        emit(&cv, &b);
        if (b.err) {
            free(b.p);
            rc = HN_ENOMEM;
        } else {
            *out = b.p;
            if (len)
                *len = b.len;
        }
    }
    free(cv.c);
    return rc;
}

int sh_tchart_write(FILE *out, const sh_chart *c, int width, int height, unsigned flags)
{
    char *s;
    size_t n;
    int rc = sh_tchart_string(c, width, height, flags, &s, &n);
    if (rc != HN_OK)
        return rc;
    if (fwrite(s, 1, n, out) != n)
        rc = HN_EIO;
    free(s);
    return rc;
}
