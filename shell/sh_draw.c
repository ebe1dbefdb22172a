/* sh_draw.c - cairo rendering of chart descriptions onto any surface (SVG, PDF, PNG). */
#include "sh_draw.h"
#include "sh_cairo.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cairo-pdf.h>
#include <cairo-svg.h>

#include "hn_status.h"

/* ---- palette ---------------------------------------------------------- */

typedef struct {
    double r, g, b;
} rgb;

static const rgb INK = { 0.137, 0.188, 0.231 };      /* text and axes */
static const rgb GRID = { 0.906, 0.914, 0.922 };     /* grid lines */
static const rgb GUIDE = { 0.490, 0.522, 0.553 };    /* reference lines, y = x */
static const rgb ALERT = { 0.722, 0.196, 0.235 };    /* beyond band, below alpha */
static const rgb PAPER = { 1.0, 1.0, 1.0 };
static const rgb SERIES[SH_CHART_MAX_SERIES] = {
    { 0.106, 0.435, 0.541 },   /* deep teal */
    { 0.769, 0.341, 0.165 },   /* burnt orange */
    { 0.357, 0.549, 0.227 },   /* moss */
    { 0.490, 0.306, 0.624 },   /* violet */
};

static void colour(cairo_t *cr, rgb c, double a)
{
    cairo_set_source_rgba(cr, c.r, c.g, c.b, a);
}

#define FONT_SIZE 11.0
#define TITLE_SIZE 13.0

/* ---- plot geometry ---------------------------------------------------- */

typedef struct {
    double px0, px1, py0, py1;   /* plot area: left, right, top, bottom */
    double x0, x1, y0, y1;       /* data ranges shown */
} axes;

static double sx(const axes *a, double v) { return a->px0 + (v - a->x0) / (a->x1 - a->x0) * (a->px1 - a->px0); }
static double sy(const axes *a, double v) { return a->py1 - (v - a->y0) / (a->y1 - a->y0) * (a->py1 - a->py0); }

/* Tick step from 1, 2, 5 times a power of ten giving about TARGET ticks. */
static double tick_step(double lo, double hi, int target)
{
    double raw = (hi - lo) / (double)target;
    if (!(raw > 0.0) || !isfinite(raw))
        return 1.0;
    double mag = pow(10.0, floor(log10(raw))), f = raw / mag;
    return (f < 1.5 ? 1.0 : f < 3.0 ? 2.0 : f < 7.0 ? 5.0 : 10.0) * mag;
}

static void fmt_tick(char *buf, size_t n, double v, double step)
{
    int dec = step >= 1.0 ? 0 : (int)ceil(-log10(step) - 1e-9);
    if (dec > 12) dec = 12;
    if (fabs(v) < step * 1e-9) v = 0.0;
    if (fabs(v) >= 1e6 || (fabs(v) > 0.0 && fabs(v) < 1e-4))
        snprintf(buf, n, "%.3g", v);
    else
        snprintf(buf, n, "%.*f", dec, v);
}

static void text_at(cairo_t *cr, double x, double y, const char *s, double halign, double valign)
{
    cairo_text_extents_t te;
    cairo_text_extents(cr, s, &te);
    cairo_move_to(cr, x - te.x_advance * halign - te.x_bearing * (halign == 0.0),
                  y + FONT_SIZE * 0.72 * valign);
    cairo_show_text(cr, s);
}

static void set_font(cairo_t *cr, double size, int bold)
{
    cairo_select_font_face(cr, "sans-serif", CAIRO_FONT_SLANT_NORMAL,
                           bold ? CAIRO_FONT_WEIGHT_BOLD : CAIRO_FONT_WEIGHT_NORMAL);
    cairo_set_font_size(cr, size);
}

/* Legend entries are collected while a chart is drawn (right to left), then
 * placed beside the title, or on a line of their own when the title leaves
 * too little room. */
#define LEG_MAX 12
enum { MK_LINE, MK_DASH, MK_BOX, MK_DOT, MK_RING };

typedef struct {
    int mark;
    rgb c;
    double alpha;
    char label[64];
} leg_item;

typedef struct {
    leg_item it[LEG_MAX];
    int n;
} legend;

static void leg_add(legend *lg, int mark, rgb c, double alpha, const char *label)
{
    if (lg->n >= LEG_MAX)
        return;
    leg_item *e = &lg->it[lg->n++];
    e->mark = mark;
    e->c = c;
    e->alpha = alpha;
    snprintf(e->label, sizeof e->label, "%s", label);
}

#define LEG_MARK 22.0   /* room for the mark before a label */
#define LEG_GAP 14.0    /* room between entries */

static double leg_width(cairo_t *cr, const legend *lg)
{
    double w = 0.0;
    cairo_text_extents_t te;
    set_font(cr, FONT_SIZE - 1.0, 0);
    for (int i = 0; i < lg->n; i++) {
        cairo_text_extents(cr, lg->it[i].label, &te);
        w += te.x_advance + LEG_MARK + (i ? LEG_GAP : 0.0);
    }
    return w;
}

/* Draw the entries right-aligned at RIGHT on the line at Y, none left of LEFT. */
static void leg_draw(cairo_t *cr, const legend *lg, double right, double left, double y)
{
    double x = right;
    cairo_text_extents_t te;
    for (int i = 0; i < lg->n; i++) {
        const leg_item *e = &lg->it[i];
        set_font(cr, FONT_SIZE - 1.0, 0);
        cairo_text_extents(cr, e->label, &te);
        double tx = x - te.x_advance, mx = tx - LEG_MARK;
        if (mx < left)
            break;
        cairo_new_path(cr);
        colour(cr, INK, 1.0);
        cairo_move_to(cr, tx, y + 4.0);
        cairo_show_text(cr, e->label);
        cairo_new_path(cr);
        colour(cr, e->c, e->alpha);
        cairo_set_line_width(cr, 2.0);
        switch (e->mark) {
        case MK_DASH: {
            double d[] = { 4.0, 3.0 };
            cairo_set_dash(cr, d, 2, 0.0);
            cairo_move_to(cr, mx, y);
            cairo_line_to(cr, mx + 18.0, y);
            cairo_stroke(cr);
            cairo_set_dash(cr, NULL, 0, 0.0);
            break;
        }
        case MK_BOX:
            cairo_rectangle(cr, mx + 2.0, y - 5.0, 14.0, 10.0);
            cairo_fill(cr);
            break;
        case MK_DOT:
            cairo_arc(cr, mx + 9.0, y, 3.0, 0.0, 2.0 * M_PI);
            cairo_fill(cr);
            break;
        case MK_RING:
            cairo_set_line_width(cr, 1.3);
            cairo_arc(cr, mx + 9.0, y, 3.0, 0.0, 2.0 * M_PI);
            cairo_stroke(cr);
            break;
        default:
            cairo_move_to(cr, mx, y);
            cairo_line_to(cr, mx + 18.0, y);
            cairo_stroke(cr);
            break;
        }
        x = mx - LEG_GAP;
    }
}

/* Frame: background, title, grid, ticks and labels for the ranges in *A.
 * LOGY: the y range is in log10 units and labels show powers of ten. */
static void frame(cairo_t *cr, const sh_chart *c, const axes *a, int logy, int integer_x)
{
    char buf[48];
    set_font(cr, FONT_SIZE, 0);
    /* y grid and labels */
    double ys = logy ? 1.0 : tick_step(a->y0, a->y1, 5);
    if (logy && a->y1 - a->y0 > 8.0)
        ys = ceil((a->y1 - a->y0) / 6.0);
    cairo_set_line_width(cr, 1.0);
    for (double v = ceil(a->y0 / ys - 1e-9) * ys; v <= a->y1 + ys * 1e-9; v += ys) {
        double py = floor(sy(a, v)) + 0.5;
        colour(cr, GRID, 1.0);
        cairo_move_to(cr, a->px0, py);
        cairo_line_to(cr, a->px1, py);
        cairo_stroke(cr);
        if (logy) {
            int e = (int)lround(v);
            if (e >= -3) snprintf(buf, sizeof buf, "%.*f", -e, pow(10.0, e));
            else snprintf(buf, sizeof buf, "1e%d", e);
        } else {
            fmt_tick(buf, sizeof buf, v, ys);
        }
        colour(cr, INK, 1.0);
        text_at(cr, a->px0 - 6.0, py, buf, 1.0, 0.5);
    }
    /* x grid and labels */
    double xs = tick_step(a->x0, a->x1, 7);
    if (integer_x && xs < 1.0) xs = 1.0;
    for (double v = ceil(a->x0 / xs - 1e-9) * xs; v <= a->x1 + xs * 1e-9; v += xs) {
        double px = floor(sx(a, v)) + 0.5;
        colour(cr, GRID, 1.0);
        cairo_move_to(cr, px, a->py0);
        cairo_line_to(cr, px, a->py1);
        cairo_stroke(cr);
        colour(cr, INK, 1.0);
        cairo_move_to(cr, px, a->py1);
        cairo_line_to(cr, px, a->py1 + 4.0);
        cairo_stroke(cr);
        fmt_tick(buf, sizeof buf, v, xs);
        text_at(cr, px, a->py1 + 8.0, buf, 0.5, 1.0);
    }
    /* axes */
    colour(cr, INK, 1.0);
    cairo_move_to(cr, floor(a->px0) + 0.5, a->py0);
    cairo_line_to(cr, floor(a->px0) + 0.5, floor(a->py1) + 0.5);
    cairo_line_to(cr, a->px1, floor(a->py1) + 0.5);
    cairo_stroke(cr);
    if (c->xlabel && *c->xlabel)
        text_at(cr, 0.5 * (a->px0 + a->px1), a->py1 + 24.0, c->xlabel, 0.5, 1.0);
    if (c->ylabel && *c->ylabel) {
        cairo_save(cr);
        cairo_translate(cr, a->px0 - 50.0, 0.5 * (a->py0 + a->py1));
        cairo_rotate(cr, -M_PI / 2.0);
        text_at(cr, 0.0, 0.0, c->ylabel, 0.5, 0.0);
        cairo_restore(cr);
    }
}

static void clip_plot(cairo_t *cr, const axes *a)
{
    cairo_save(cr);
    cairo_rectangle(cr, a->px0, a->py0 - 1.0, a->px1 - a->px0 + 1.0, a->py1 - a->py0 + 2.0);
    cairo_clip(cr);
}

static void hline(cairo_t *cr, const axes *a, double v, rgb c, int dashed)
{
    if (!isfinite(v) || v < a->y0 || v > a->y1)
        return;
    double d[] = { 5.0, 3.5 };
    colour(cr, c, 1.0);
    cairo_set_line_width(cr, 1.2);
    if (dashed)
        cairo_set_dash(cr, d, 2, 0.0);
    cairo_move_to(cr, a->px0, sy(a, v));
    cairo_line_to(cr, a->px1, sy(a, v));
    cairo_stroke(cr);
    cairo_set_dash(cr, NULL, 0, 0.0);
}

/* Polyline of Y against x = X0 + (OFF + i) * DX, broken at non-finite values;
 * a lone finite value between gaps becomes a dot.  START, when finite, is
 * joined to the first value (a forecast leaving the last observation). */
static void polyline(cairo_t *cr, const axes *a, const double *y, size_t n, size_t off,
                     double x0, double dx, double start)
{
    int open = 0;
    size_t run = 0;
    if (isfinite(start) && off > 0) {
        cairo_move_to(cr, sx(a, x0 + (double)(off - 1) * dx), sy(a, start));
        open = 1;
        run = 1;
    }
    for (size_t i = 0; i <= n; i++) {
        int ok = i < n && isfinite(y[i]);
        if (ok) {
            double px = sx(a, x0 + (double)(off + i) * dx), py = sy(a, y[i]);
            if (open) cairo_line_to(cr, px, py);
            else cairo_move_to(cr, px, py);
            open = 1;
            run++;
        } else if (open) {
            if (run == 1) {
                double px, py;
                cairo_get_current_point(cr, &px, &py);
                cairo_new_sub_path(cr);
                cairo_arc(cr, px, py, 1.6, 0.0, 2.0 * M_PI);
                cairo_fill(cr);
            } else {
                cairo_stroke(cr);
            }
            open = 0;
            run = 0;
        }
    }
}

static void pad(double *lo, double *hi, double share)
{
    if (!(*hi > *lo)) {
        double d = *lo != 0.0 ? 0.5 * fabs(*lo) : 1.0;
        *lo -= d;
        *hi += d;
        return;
    }
    double d = (*hi - *lo) * share;
    *lo -= d;
    *hi += d;
}

static void no_data(cairo_t *cr, const axes *a)
{
    colour(cr, GUIDE, 1.0);
    set_font(cr, FONT_SIZE + 1.0, 0);
    text_at(cr, 0.5 * (a->px0 + a->px1), 0.5 * (a->py0 + a->py1), "no finite values to draw", 0.5, 0.5);
}

/* ---- chart kinds ------------------------------------------------------ */

static void draw_line(cairo_t *cr, const sh_chart *c, axes *a, legend *lg)
{
    double lo = INFINITY, hi = -INFINITY;
    size_t xn = 0, finite = 0;
    for (int s = 0; s < c->nseries; s++) {
        finite += sh_chart_range(c->series[s].y, c->series[s].n, &lo, &hi);
        if (c->series[s].n > xn) xn = c->series[s].n;
    }
    for (int r = 0; r < c->nrefs; r++)
        if (isfinite(c->refs[r].y)) {
            lo = fmin(lo, c->refs[r].y);
            hi = fmax(hi, c->refs[r].y);
        }
    a->x0 = c->x0;
    a->x1 = c->x0 + (double)(xn > 1 ? xn - 1 : 1) * c->dx;
    if (xn <= 1) { a->x0 -= c->dx; }
    if (finite == 0) { lo = 0.0; hi = 1.0; }
    pad(&lo, &hi, 0.05);
    a->y0 = lo;
    a->y1 = hi;
    frame(cr, c, a, 0, 0);
    if (finite == 0) {
        no_data(cr, a);
        return;
    }
    clip_plot(cr, a);
    for (int r = 0; r < c->nrefs; r++)
        hline(cr, a, c->refs[r].y, GUIDE, 1);
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    for (int s = 0; s < c->nseries; s++) {
        colour(cr, SERIES[s], 1.0);
        cairo_set_line_width(cr, xn > 400 ? 1.0 : 1.5);
        polyline(cr, a, c->series[s].y, c->series[s].n, 0, c->x0, c->dx, NAN);
    }
    cairo_restore(cr);
    for (int r = c->nrefs - 1; r >= 0; r--)
        if (c->refs[r].label)
            leg_add(lg, MK_DASH, GUIDE, 1.0, c->refs[r].label);
    for (int s = c->nseries - 1; s >= 0; s--)
        if (c->series[s].label)
            leg_add(lg, MK_LINE, SERIES[s], 1.0, c->series[s].label);
}

static double band_at(const sh_chart *c, size_t i)
{
    double b = c->band_lag ? c->band_lag[i] : c->band;
    return isfinite(b) && b > 0.0 ? b : 0.0;
}

static void draw_corr(cairo_t *cr, const sh_chart *c, axes *a, legend *lg)
{
    const double *r = c->series[0].y;
    size_t m = c->nseries > 0 ? c->series[0].n : 0;
    double lo = INFINITY, hi = -INFINITY, bmax = 0.0;
    size_t finite = sh_chart_range(r, m, &lo, &hi);
    for (size_t i = 0; i < m; i++)
        bmax = fmax(bmax, band_at(c, i));
    double lim = finite ? fmax(fmax(fabs(lo), fabs(hi)), bmax) * 1.15 : 1.0;
    if (!(lim > 0.0)) lim = 1.0;
    a->x0 = (double)c->first_lag - 0.8;
    a->x1 = (double)c->first_lag + (double)(m > 0 ? m - 1 : 0) + 0.8;
    a->y0 = -lim;
    a->y1 = lim;
    frame(cr, c, a, 0, 1);
    if (finite == 0) {
        no_data(cr, a);
        return;
    }
    clip_plot(cr, a);
    hline(cr, a, 0.0, INK, 0);
    double bw = fmax(1.0, 0.6 * (sx(a, 1.0) - sx(a, 0.0)));
    int nout = 0;
    for (size_t i = 0; i < m; i++) {
        if (!isfinite(r[i]))
            continue;
        double b = band_at(c, i), px = sx(a, (double)c->first_lag + (double)i);
        int out = b > 0.0 && fabs(r[i]) > b;
        nout += out;
        colour(cr, out ? ALERT : SERIES[0], 1.0);
        double y0 = sy(a, 0.0), y1 = sy(a, r[i]);
        cairo_rectangle(cr, px - 0.5 * bw, fmin(y0, y1), bw, fabs(y1 - y0));
        cairo_fill(cr);
    }
    /* Band lines: straight when constant, steps when they vary by lag. */
    double d[] = { 5.0, 3.5 };
    colour(cr, GUIDE, 1.0);
    cairo_set_line_width(cr, 1.2);
    cairo_set_dash(cr, d, 2, 0.0);
    for (int side = -1; side <= 1; side += 2) {
        int open = 0;
        for (size_t i = 0; i < m; i++) {
            double b = band_at(c, i);
            double xl = c->band_lag ? sx(a, (double)c->first_lag + (double)i - 0.5) : a->px0;
            double xr = c->band_lag ? sx(a, (double)c->first_lag + (double)i + 0.5) : a->px1;
            if (b <= 0.0) {
                if (open) cairo_stroke(cr);
                open = 0;
                continue;
            }
            double py = sy(a, side * b);
            if (open) cairo_line_to(cr, xl, py);
            else cairo_move_to(cr, xl, py);
            cairo_line_to(cr, xr, py);
            open = 1;
            if (!c->band_lag)
                break;
        }
        if (open) cairo_stroke(cr);
    }
    cairo_set_dash(cr, NULL, 0, 0.0);
    cairo_restore(cr);
    char buf[64];
    if (bmax > 0.0) {
        if (nout)
            leg_add(lg, MK_BOX, ALERT, 1.0, "beyond band");
        if (c->band_lag)
            snprintf(buf, sizeof buf, "band");
        else
            snprintf(buf, sizeof buf, "band \u00b1%.3g", c->band);
        leg_add(lg, MK_DASH, GUIDE, 1.0, buf);
    }
}

static void draw_qq(cairo_t *cr, const sh_chart *c, axes *a, legend *lg, int *rc)
{
    double *xq, *yq;
    size_t k;
    if (sh_chart_qq_points(c, &xq, &yq, &k) != 0) {
        *rc = HN_ENOMEM;
        return;
    }
    double lim = 0.0;
    for (size_t i = 0; i < k; i++)
        lim = fmax(lim, fmax(fabs(xq[i]), fabs(yq[i])));
    lim = lim > 0.0 ? lim * 1.08 : 1.0;
    a->x0 = a->y0 = -lim;
    a->x1 = a->y1 = lim;
    frame(cr, c, a, 0, 0);
    if (k == 0) {
        no_data(cr, a);
        return;
    }
    clip_plot(cr, a);
    colour(cr, GUIDE, 1.0);
    cairo_set_line_width(cr, 1.2);
    cairo_move_to(cr, sx(a, -lim), sy(a, -lim));
    cairo_line_to(cr, sx(a, lim), sy(a, lim));
    cairo_stroke(cr);
    double rad = k > 500 ? 1.6 : 2.4;
    for (size_t i = 0; i < k; i++) {
        cairo_new_sub_path(cr);
        cairo_arc(cr, sx(a, xq[i]), sy(a, yq[i]), rad, 0.0, 2.0 * M_PI);
    }
    colour(cr, SERIES[0], 0.75);
    cairo_fill(cr);
    cairo_restore(cr);
    char buf[64];
    snprintf(buf, sizeof buf, "n = %zu", k);
    leg_add(lg, MK_LINE, GUIDE, 1.0, "y = x");
    leg_add(lg, MK_DOT, SERIES[0], 0.75, buf);
    free(xq);
    free(yq);
}

static void draw_profile(cairo_t *cr, const sh_chart *c, axes *a, legend *lg, int *rc)
{
    const double *p = c->series[0].y;
    size_t m = c->nseries > 0 ? c->series[0].n : 0;
    double lo = INFINITY, hi = -INFINITY, floorv = 0.0;
    size_t finite = sh_chart_range(p, m, &lo, &hi);
    a->x0 = (double)c->first_lag - 0.8;
    a->x1 = (double)c->first_lag + (double)(m > 0 ? m - 1 : 0) + 0.8;
    if (c->log_scale) {
        double small = 1.0;
        for (size_t i = 0; i < m; i++)
            if (isfinite(p[i]) && p[i] > 0.0) small = fmin(small, p[i]);
        if (c->alpha > 0.0) small = fmin(small, c->alpha);
        double d = floor(log10(small));
        if (d > -1.0) d = -1.0;
        if (d < -16.0) d = -16.0;
        floorv = pow(10.0, d);
        a->y0 = d;
        a->y1 = 0.0;
    } else {
        a->y0 = 0.0;
        a->y1 = 1.0;
    }
    /* a little room at both ends */
    double room = 0.03 * (a->y1 - a->y0);
    a->y0 -= room;
    a->y1 += room;
    frame(cr, c, a, c->log_scale, 1);
    if (finite == 0) {
        no_data(cr, a);
        return;
    }
    clip_plot(cr, a);
    double ya = c->log_scale ? log10(c->alpha) : c->alpha;
    if (c->alpha > 0.0)
        hline(cr, a, ya, ALERT, 1);
    colour(cr, SERIES[0], 0.45);
    cairo_set_line_width(cr, 1.0);
    double *yv = calloc(m, sizeof *yv);
    if (!yv) {
        cairo_restore(cr);
        *rc = HN_ENOMEM;
        return;
    }
    for (size_t i = 0; i < m; i++)
        yv[i] = !isfinite(p[i]) ? NAN : c->log_scale ? log10(fmax(p[i], floorv)) : p[i];
    polyline(cr, a, yv, m, 0, (double)c->first_lag, 1.0, NAN);
    int nbelow = 0;
    for (size_t i = 0; i < m; i++) {
        if (!isfinite(yv[i]))
            continue;
        int below = c->alpha > 0.0 && p[i] < c->alpha;
        nbelow += below;
        cairo_new_sub_path(cr);
        cairo_arc(cr, sx(a, (double)c->first_lag + (double)i), sy(a, yv[i]), 3.0, 0.0, 2.0 * M_PI);
        if (below) {
            colour(cr, ALERT, 1.0);
            cairo_fill(cr);
        } else {
            colour(cr, PAPER, 1.0);
            cairo_fill_preserve(cr);
            colour(cr, SERIES[0], 1.0);
            cairo_set_line_width(cr, 1.4);
            cairo_stroke(cr);
        }
    }
    free(yv);
    cairo_restore(cr);
    char buf[64];
    if (c->alpha > 0.0) {
        if (nbelow)
            leg_add(lg, MK_DOT, ALERT, 1.0, "below alpha");
        snprintf(buf, sizeof buf, "alpha %.3g", c->alpha);
        leg_add(lg, MK_DASH, ALERT, 1.0, buf);
    }
    leg_add(lg, MK_RING, SERIES[0], 1.0, c->ylabel ? c->ylabel : "p-value");
}

static void draw_fan(cairo_t *cr, const sh_chart *c, axes *a, legend *lg)
{
    size_t n = c->nseries > 0 ? c->series[0].n : 0, h = c->fan_h, xn = n + h;
    double lo = INFINITY, hi = -INFINITY;
    size_t finite = sh_chart_range(c->series[0].y, n, &lo, &hi);
    finite += sh_chart_range(c->fan_mean, h, &lo, &hi);
    for (int l = 0; l < c->nlevels; l++) {
        sh_chart_range(c->fan_lo[l], h, &lo, &hi);
        sh_chart_range(c->fan_hi[l], h, &lo, &hi);
    }
    a->x0 = c->x0;
    a->x1 = c->x0 + (double)(xn > 1 ? xn - 1 : 1) * c->dx;
    if (finite == 0) { lo = 0.0; hi = 1.0; }
    pad(&lo, &hi, 0.05);
    a->y0 = lo;
    a->y1 = hi;
    frame(cr, c, a, 0, 0);
    if (finite == 0) {
        no_data(cr, a);
        return;
    }
    clip_plot(cr, a);
    double last = n > 0 ? c->series[0].y[n - 1] : NAN;
    /* Bands, wider first, each a polygon along lo and back along hi;
     * a non-finite bound ends one polygon. */
    static const double shade[2][2] = { { 0.16, 0.0 }, { 0.16, 0.30 } };
    for (int l = 0; l < c->nlevels; l++) {
        const double *bl = c->fan_lo[l], *bh = c->fan_hi[l];
        size_t i = 0;
        while (i < h) {
            while (i < h && !(isfinite(bl[i]) && isfinite(bh[i]))) i++;
            size_t j = i;
            while (j < h && isfinite(bl[j]) && isfinite(bh[j])) j++;
            if (j > i) {
                int join = i == 0 && isfinite(last);
                if (join)
                    cairo_move_to(cr, sx(a, c->x0 + (double)(n - 1) * c->dx), sy(a, last));
                for (size_t k = i; k < j; k++) {
                    double px = sx(a, c->x0 + (double)(n + k) * c->dx);
                    if (k == i && !join) cairo_move_to(cr, px, sy(a, bl[k]));
                    else cairo_line_to(cr, px, sy(a, bl[k]));
                }
                for (size_t k = j; k-- > i;)
                    cairo_line_to(cr, sx(a, c->x0 + (double)(n + k) * c->dx), sy(a, bh[k]));
                cairo_close_path(cr);
                colour(cr, SERIES[0], shade[c->nlevels - 1][l]);
                cairo_fill(cr);
            }
            i = j;
        }
    }
    /* forecast origin */
    if (n > 0 && h > 0) {
        double px = floor(sx(a, c->x0 + (double)(n - 1) * c->dx)) + 0.5, d[] = { 2.0, 3.0 };
        colour(cr, GUIDE, 1.0);
        cairo_set_line_width(cr, 1.0);
        cairo_set_dash(cr, d, 2, 0.0);
        cairo_move_to(cr, px, a->py0);
        cairo_line_to(cr, px, a->py1);
        cairo_stroke(cr);
        cairo_set_dash(cr, NULL, 0, 0.0);
    }
    cairo_set_line_join(cr, CAIRO_LINE_JOIN_ROUND);
    colour(cr, INK, 0.85);
    cairo_set_line_width(cr, xn > 400 ? 1.0 : 1.4);
    polyline(cr, a, c->series[0].y, n, 0, c->x0, c->dx, NAN);
    colour(cr, SERIES[1], 1.0);
    cairo_set_line_width(cr, 2.0);
    polyline(cr, a, c->fan_mean, h, n, c->x0, c->dx, last);
    cairo_restore(cr);
    char buf[32];
    for (int l = 0; l < c->nlevels; l++) {
        snprintf(buf, sizeof buf, "%.3g%%", c->fan_level[l]);
        leg_add(lg, MK_BOX, SERIES[0], c->nlevels == 2 && l == 1 ? 0.42 : 0.16, buf);
    }
    leg_add(lg, MK_LINE, SERIES[1], 1.0, "forecast");
    leg_add(lg, MK_LINE, INK, 0.85, c->series[0].label ? c->series[0].label : "observed");
}

/* ---- entry points ----------------------------------------------------- */

static int cairo_rc(cairo_status_t st)
{
    if (st == CAIRO_STATUS_SUCCESS)
        return HN_OK;
    return st == CAIRO_STATUS_NO_MEMORY ? HN_ENOMEM : HN_EIO;
}

/* Draw the body of chart C (everything but title and legend) with plot area *A. */
static void draw_body(cairo_t *cr, const sh_chart *c, axes *a, legend *lg, int *rc)
{
    switch (c->kind) {
    case SH_CHART_LINE:    draw_line(cr, c, a, lg); break;
    case SH_CHART_CORR:    draw_corr(cr, c, a, lg); break;
    case SH_CHART_QQ:      draw_qq(cr, c, a, lg, rc); break;
    case SH_CHART_PROFILE: draw_profile(cr, c, a, lg, rc); break;
    case SH_CHART_FAN:     draw_fan(cr, c, a, lg); break;
    }
}

int sh_draw_chart(cairo_t *cr, const sh_chart *c, double x, double y, double w, double h)
{
    if (sh_cairo_open(NULL, 0) != HN_OK)
        return HN_EIO;
    if (!cr || !c || !(w >= SH_DRAW_MIN_SIZE) || !(h >= SH_DRAW_MIN_SIZE) ||
        (unsigned)c->kind > (unsigned)SH_CHART_FAN)
        return HN_EINVAL;
    int rc = HN_OK;
    axes a;
    a.px0 = c->ylabel && *c->ylabel ? 70.0 : 56.0;
    a.px1 = w - 16.0;
    a.py0 = 34.0;
    a.py1 = h - (c->xlabel && *c->xlabel ? 44.0 : 28.0);

    /* A first pass on a one-pixel surface collects the legend, so that the
     * plot can make room for it before the real drawing. */
    legend lg = { .n = 0 };
    cairo_surface_t *ms = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, 1, 1);
    cairo_t *mc = cairo_create(ms);
    axes ma = a;
    draw_body(mc, c, &ma, &lg, &rc);
    if (rc == HN_OK)
        rc = cairo_rc(cairo_status(mc));
    cairo_destroy(mc);
    cairo_surface_destroy(ms);
    if (rc != HN_OK)
        return rc;

    cairo_save(cr);
    cairo_translate(cr, x, y);
    cairo_rectangle(cr, 0.0, 0.0, w, h);
    cairo_clip(cr);
    colour(cr, PAPER, 1.0);
    cairo_paint(cr);
    double title_end = 0.0;
    if (c->title && *c->title) {
        cairo_text_extents_t te;
        colour(cr, INK, 1.0);
        set_font(cr, TITLE_SIZE, 1);
        cairo_text_extents(cr, c->title, &te);
        cairo_move_to(cr, 12.0, 20.0);
        cairo_show_text(cr, c->title);
        title_end = 12.0 + te.x_advance;
    }
    double lw = leg_width(cr, &lg), ly = 16.0, lleft = title_end + 16.0;
    if (lg.n > 0 && lleft + lw > w - 16.0) {
        ly = 36.0;          /* a line of its own below the title */
        lleft = 12.0;
        a.py0 += 18.0;
    }
    leg_draw(cr, &lg, w - 16.0, lleft, ly);
    lg.n = 0;
    draw_body(cr, c, &a, &lg, &rc);
    cairo_restore(cr);
    if (rc == HN_OK)
        rc = cairo_rc(cairo_status(cr));
    return rc;
}

typedef struct {
    char *p;
    size_t len, cap;
} sbuf;

static cairo_status_t svg_write(void *closure, const unsigned char *data, unsigned int n)
{
    sbuf *b = closure;
    if (b->len + n + 1 > b->cap) {
        size_t cap = b->cap ? b->cap : 4096;
        while (b->len + n + 1 > cap)
            cap *= 2;
        char *q = realloc(b->p, cap);
        if (!q)
            return CAIRO_STATUS_NO_MEMORY;
        b->p = q;
        b->cap = cap;
    }
    memcpy(b->p + b->len, data, n);
    b->len += n;
    b->p[b->len] = '\0';
    return CAIRO_STATUS_SUCCESS;
}

/* Draw C on surface S (W x H), finish it and fold every status into one code. */
static int render_on(cairo_surface_t *s, const sh_chart *c, double w, double h)
{
    int rc = cairo_rc(cairo_surface_status(s));
    if (rc == HN_OK) {
        cairo_t *cr = cairo_create(s);
        rc = sh_draw_chart(cr, c, 0.0, 0.0, w, h);
        cairo_destroy(cr);
    }
    return rc;
}

/* Copy SVG text S with PFX put in front of every id and every reference to
 * one, so that several charts can live in one HTML page.  NULL on failure. */
static char *prefix_ids(const char *s, const char *pfx)
{
    static const char *const keys[] = { "id=\"", "href=\"#", "url(#" };
    size_t np = strlen(pfx), extra = 0;
    for (const char *q = s; *q; q++)
        for (int k = 0; k < 3; k++)
            if (strncmp(q, keys[k], strlen(keys[k])) == 0)
                extra += np;
    char *out = malloc(strlen(s) + extra + 1), *w = out;
    if (!out)
        return NULL;
    while (*s) {
        int hit = 0;
        for (int k = 0; k < 3 && !hit; k++) {
            size_t kl = strlen(keys[k]);
            if (strncmp(s, keys[k], kl) == 0) {
                memcpy(w, s, kl);
                memcpy(w + kl, pfx, np);
                w += kl + np;
                s += kl;
                hit = 1;
            }
        }
        if (!hit)
            *w++ = *s++;
    }
    *w = '\0';
    return out;
}

int sh_draw_svg_string(const sh_chart *c, double w, double h, const char *id_prefix,
                       char **out, size_t *len)
{
    *out = NULL;
    if (len)
        *len = 0;
    if (sh_cairo_open(NULL, 0) != HN_OK)
        return HN_EIO;
    if (!c || !(w >= SH_DRAW_MIN_SIZE) || !(h >= SH_DRAW_MIN_SIZE))
        return HN_EINVAL;
    if (id_prefix) {
        if (!*id_prefix || !((id_prefix[0] | 0x20) >= 'a' && (id_prefix[0] | 0x20) <= 'z'))
            return HN_EINVAL;
        for (const char *q = id_prefix; *q; q++)
            if (!(((*q | 0x20) >= 'a' && (*q | 0x20) <= 'z') || (*q >= '0' && *q <= '9') ||
                  *q == '-' || *q == '_'))
                return HN_EINVAL;
    }
    sbuf b = { NULL, 0, 0 };
    cairo_surface_t *s = cairo_svg_surface_create_for_stream(svg_write, &b, w, h);
    /* pixels, so that a chart inlined in HTML has the size asked for */
    cairo_svg_surface_set_document_unit(s, CAIRO_SVG_UNIT_PX);
    int rc = render_on(s, c, w, h);
    cairo_surface_finish(s);
    if (rc == HN_OK)
        rc = cairo_rc(cairo_surface_status(s));
    cairo_surface_destroy(s);
    if (rc == HN_OK && !b.p)
        rc = HN_EIO;
    if (rc == HN_OK && id_prefix) {
        char *q = prefix_ids(b.p, id_prefix);
        free(b.p);
        b.p = q;
        if (!q)
            rc = HN_ENOMEM;
        else
            b.len = strlen(q);
    }
    if (rc != HN_OK) {
        free(b.p);
        return rc;
    }
    *out = b.p;
    if (len)
        *len = b.len;
    return HN_OK;
}

int sh_draw_png_file(const sh_chart *c, int w, int h, const char *path)
{
    if (sh_cairo_open(NULL, 0) != HN_OK)
        return HN_EIO;
    if (!c || !path || w < (int)SH_DRAW_MIN_SIZE || h < (int)SH_DRAW_MIN_SIZE || w > 20000 || h > 20000)
        return HN_EINVAL;
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, w, h);
    int rc = render_on(s, c, (double)w, (double)h);
    if (rc == HN_OK && cairo_surface_write_to_png(s, path) != CAIRO_STATUS_SUCCESS)
        rc = HN_EIO;
    cairo_surface_destroy(s);
    return rc;
}

int sh_draw_pdf_file(const sh_chart *c, double w, double h, const char *path)
{
    if (sh_cairo_open(NULL, 0) != HN_OK)
        return HN_EIO;
    if (!c || !path || !(w >= SH_DRAW_MIN_SIZE) || !(h >= SH_DRAW_MIN_SIZE))
        return HN_EINVAL;
    cairo_surface_t *s = cairo_pdf_surface_create(path, w, h);
    int rc = render_on(s, c, w, h);
    cairo_surface_finish(s);
    if (rc == HN_OK)
        rc = cairo_rc(cairo_surface_status(s));
    cairo_surface_destroy(s);
    return rc;
}
