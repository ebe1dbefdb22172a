/* sh_cairo.c - the cairo functions the shell calls, resolved from libcairo.so.2 on first use. */
#include "sh_cairo.h"

#include <dlfcn.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>

#include <cairo.h>
#include <cairo-pdf.h>
#include <cairo-svg.h>

#include "hn_status.h"

/* (return type, name, parameters, arguments) of each function called;
 * V: returns nothing. */
#define CAIRO_FNS(R, V) \
    V(cairo_arc, (cairo_t *cr, double xc, double yc, double r, double a1, double a2), \
      (cr, xc, yc, r, a1, a2)) \
    V(cairo_clip, (cairo_t *cr), (cr)) \
    V(cairo_close_path, (cairo_t *cr), (cr)) \
    R(cairo_t *, cairo_create, (cairo_surface_t *s), (s)) \
    V(cairo_destroy, (cairo_t *cr), (cr)) \
    V(cairo_fill, (cairo_t *cr), (cr)) \
    V(cairo_fill_preserve, (cairo_t *cr), (cr)) \
    V(cairo_get_current_point, (cairo_t *cr, double *x, double *y), (cr, x, y)) \
    R(cairo_surface_t *, cairo_image_surface_create, (cairo_format_t f, int w, int h), (f, w, h)) \
    V(cairo_line_to, (cairo_t *cr, double x, double y), (cr, x, y)) \
    V(cairo_move_to, (cairo_t *cr, double x, double y), (cr, x, y)) \
    V(cairo_new_path, (cairo_t *cr), (cr)) \
    V(cairo_new_sub_path, (cairo_t *cr), (cr)) \
    V(cairo_paint, (cairo_t *cr), (cr)) \
    R(cairo_surface_t *, cairo_pdf_surface_create, (const char *f, double w, double h), (f, w, h)) \
    V(cairo_rectangle, (cairo_t *cr, double x, double y, double w, double h), (cr, x, y, w, h)) \
    V(cairo_restore, (cairo_t *cr), (cr)) \
    V(cairo_rotate, (cairo_t *cr, double a), (cr, a)) \
    V(cairo_save, (cairo_t *cr), (cr)) \
    V(cairo_scale, (cairo_t *cr, double sx, double sy), (cr, sx, sy)) \
    V(cairo_select_font_face, (cairo_t *cr, const char *family, cairo_font_slant_t slant, \
                               cairo_font_weight_t weight), (cr, family, slant, weight)) \
    V(cairo_set_dash, (cairo_t *cr, const double *d, int nd, double off), (cr, d, nd, off)) \
    V(cairo_set_font_size, (cairo_t *cr, double size), (cr, size)) \
    V(cairo_set_line_join, (cairo_t *cr, cairo_line_join_t j), (cr, j)) \
    V(cairo_set_line_width, (cairo_t *cr, double w), (cr, w)) \
    V(cairo_set_source_rgb, (cairo_t *cr, double r, double g, double b), (cr, r, g, b)) \
    V(cairo_set_source_rgba, (cairo_t *cr, double r, double g, double b, double a), \
      (cr, r, g, b, a)) \
    V(cairo_show_page, (cairo_t *cr), (cr)) \
    V(cairo_show_text, (cairo_t *cr, const char *utf8), (cr, utf8)) \
    R(cairo_status_t, cairo_status, (cairo_t *cr), (cr)) \
    R(const char *, cairo_status_to_string, (cairo_status_t st), (st)) \
    V(cairo_stroke, (cairo_t *cr), (cr)) \
    V(cairo_surface_destroy, (cairo_surface_t *s), (s)) \
    V(cairo_surface_finish, (cairo_surface_t *s), (s)) \
    R(cairo_status_t, cairo_surface_status, (cairo_surface_t *s), (s)) \
    R(cairo_status_t, cairo_surface_write_to_png, (cairo_surface_t *s, const char *f), (s, f)) \
    R(cairo_surface_t *, cairo_svg_surface_create_for_stream, \
      (cairo_write_func_t wf, void *cl, double w, double h), (wf, cl, w, h)) \
    V(cairo_svg_surface_set_document_unit, (cairo_surface_t *s, cairo_svg_unit_t u), (s, u)) \
    V(cairo_text_extents, (cairo_t *cr, const char *utf8, cairo_text_extents_t *ex), \
      (cr, utf8, ex)) \
    V(cairo_translate, (cairo_t *cr, double tx, double ty), (cr, tx, ty))

#define PTR_R(ret, name, params, args) ret (*name) params;
#define PTR_V(name, params, args) void (*name) params;
static struct {
    CAIRO_FNS(PTR_R, PTR_V)
} fn;

static pthread_once_t once = PTHREAD_ONCE_INIT;
static char failure[256];          /* empty when every function resolved */

static void resolve(void)
{
    const char *lib = getenv("HONE_CAIRO");
    if (!lib || !*lib)
        lib = "libcairo.so.2";
    void *h = dlopen(lib, RTLD_NOW | RTLD_LOCAL);
    if (!h) {
        const char *e = dlerror();
        snprintf(failure, sizeof failure, "drawing needs the cairo library: %s",
                 e ? e : "it cannot be loaded");
        return;
    }
#define RESOLVE(name) \
    if (!(*(void **)&fn.name = dlsym(h, #name))) { \
        snprintf(failure, sizeof failure, "drawing needs the cairo library, but %s lacks %s", \
                 lib, #name); \
        return; \
    }
#define RES_R(ret, name, params, args) RESOLVE(name)
#define RES_V(name, params, args) RESOLVE(name)
    CAIRO_FNS(RES_R, RES_V)
}

int sh_cairo_open(char *why, size_t whylen)
{
    pthread_once(&once, resolve);
    if (!failure[0])
        return HN_OK;
    if (why && whylen)
        snprintf(why, whylen, "%s", failure);
    return HN_EIO;
}

/* Called only after sh_cairo_open succeeded (every drawing entry point
 * checks); a call without the library is a defect, stopped here rather
 * than followed through a null pointer. */
static void need(int ok, const char *name)
{
    if (!ok) {
        fprintf(stderr, "hone: internal error: %s called without the cairo library\n", name);
        abort();
    }
}

#define DEF_R(ret, name, params, args) \
    ret name params \
    { \
        need(fn.name != NULL, #name); \
        return fn.name args; \
    }
#define DEF_V(name, params, args) \
    void name params \
    { \
        need(fn.name != NULL, #name); \
        fn.name args; \
    }
CAIRO_FNS(DEF_R, DEF_V)
