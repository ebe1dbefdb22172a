/* test_draw.c - cairo charts: PNG size and drawn content, SVG and PDF output, rectangles, errors.
 * Pixels are read back with cairo's own PNG reader (Debian libcairo2). */
#include "testutil.h"
#include "sh_draw.h"
#include "hn_status.h"

#include <unistd.h>

static char tmpdir[64];

/* Fontconfig keeps its font cache for the life of the process; the leak
 * checker of the sanitizer build is told so (it calls this hook by name). */
const char *__lsan_default_suppressions(void);
const char *__lsan_default_suppressions(void)
{
    return "leak:libfontconfig.so\n";
}

static int setup(void **state)
{
    (void)state;
    strcpy(tmpdir, "/tmp/hone-draw-XXXXXX");
    return mkdtemp(tmpdir) ? 0 : -1;
}

static int teardown(void **state)
{
    (void)state;
    cairo_debug_reset_static_data();
    return rmdir(tmpdir);
}

/* Pixels in the rectangle whose colour is clearly not grey: the data marks
 * (series, bars, points, bands) are coloured; paper, grid, axes and text
 * are neutral. */
static long coloured(cairo_surface_t *s, int x0, int y0, int x1, int y1)
{
    unsigned char *d = cairo_image_surface_get_data(s);
    int stride = cairo_image_surface_get_stride(s);
    long k = 0;
    for (int y = y0; y < y1; y++)
        for (int x = x0; x < x1; x++) {
            uint32_t p;
            memcpy(&p, d + (size_t)y * (size_t)stride + 4 * (size_t)x, 4);
            int r = (int)(p >> 16 & 255), g = (int)(p >> 8 & 255), b = (int)(p & 255);
            int hi = r > g ? (r > b ? r : b) : (g > b ? g : b);
            int lo = r < g ? (r < b ? r : b) : (g < b ? g : b);
            k += hi - lo > 40;
        }
    return k;
}

/* Pixels in the rectangle that differ from white. */
static long inked(cairo_surface_t *s, int x0, int y0, int x1, int y1)
{
    unsigned char *d = cairo_image_surface_get_data(s);
    int stride = cairo_image_surface_get_stride(s);
    long k = 0;
    for (int y = y0; y < y1; y++)
        for (int x = x0; x < x1; x++) {
            uint32_t p;
            memcpy(&p, d + (size_t)y * (size_t)stride + 4 * (size_t)x, 4);
            k += (p & 0xffffffu) != 0xffffffu;
        }
    return k;
}

static double Y[300], R[24], P[24], FM[12], LO1[12], HI1[12], LO2[12], HI2[12];

static void make_data(void)
{
    for (int i = 0; i < 300; i++)
        Y[i] = sin(0.21 * i) + 0.5 * cos(1.7 * i) + (i > 150 ? 0.8 * sin(3.1 * i) : 0.0);
    Y[77] = NAN;
    for (int i = 0; i < 24; i++) {
        R[i] = 0.7 * pow(-0.6, i);
        P[i] = i == 0 ? NAN : pow(0.4, i);
    }
    for (int j = 0; j < 12; j++) {
        FM[j] = 0.3 * pow(0.8, j);
        LO1[j] = FM[j] - 0.6 * sqrt(j + 1.0);
        HI1[j] = FM[j] + 0.6 * sqrt(j + 1.0);
        LO2[j] = FM[j] - 1.0 * sqrt(j + 1.0);
        HI2[j] = FM[j] + 1.0 * sqrt(j + 1.0);
    }
}

/* Chart KIND over the demo arrays, or over nothing when EMPTY. */
static void chart_of(sh_chart *c, int kind, int empty)
{
    static const double none[] = { NAN };
    size_t n1 = empty ? 1 : 0;
    switch (kind) {
    case 0:
        sh_chart_line(c, "Series", empty ? none : Y, empty ? n1 : 300, "value");
        sh_chart_add_ref(c, 0.0, "mean");
        break;
    case 1: sh_chart_corr(c, "ACF", empty ? none : R, empty ? n1 : 24, 0.12); break;
    case 2: sh_chart_qq(c, "QQ", empty ? none : Y, empty ? n1 : 300); break;
    case 3: sh_chart_profile(c, "p by lag", empty ? none : P, empty ? n1 : 24, 0.05, 1); break;
    default:
        sh_chart_fan(c, "Forecast", empty ? none : Y + 240, empty ? n1 : 60,
                     empty ? none : FM, empty ? n1 : 12);
        if (!empty) {
            sh_chart_fan_level(c, LO2, HI2, 95);
            sh_chart_fan_level(c, LO1, HI1, 80);
        }
        break;
    }
}

static void test_png_each_kind(void **state)
{
    (void)state;
    make_data();
    const int w = 640, h = 360;
    for (int kind = 0; kind < 5; kind++) {
        long marks[2];
        for (int empty = 0; empty < 2; empty++) {
            sh_chart c;
            char path[128];
            chart_of(&c, kind, empty);
            snprintf(path, sizeof path, "%s/k%d_%d.png", tmpdir, kind, empty);
            assert_int_equal(sh_draw_png_file(&c, w, h, path), HN_OK);
            cairo_surface_t *s = cairo_image_surface_create_from_png(path);
            assert_int_equal(cairo_surface_status(s), CAIRO_STATUS_SUCCESS);
            assert_int_equal(cairo_image_surface_get_width(s), w);
            assert_int_equal(cairo_image_surface_get_height(s), h);
            /* plot area (inside the margins the renderer keeps) */
            long ink = inked(s, 80, 40, w - 20, h - 50);
            marks[empty] = coloured(s, 80, 40, w - 20, h - 50);
            assert_true(ink > 0);
            cairo_surface_destroy(s);
            unlink(path);
        }
        if (marks[0] < 500 || marks[1] != 0)
            print_error("kind %d: %ld coloured pixels with data, %ld without\n",
                        kind, marks[0], marks[1]);
        assert_true(marks[0] >= 500);   /* data drawn */
        assert_int_equal(marks[1], 0);  /* nothing drawn for nothing finite */
    }
}

static void test_svg(void **state)
{
    (void)state;
    make_data();
    for (int kind = 0; kind < 5; kind++) {
        sh_chart c;
        char *s;
        size_t n;
        chart_of(&c, kind, 0);
        assert_int_equal(sh_draw_svg_string(&c, 480, 300, NULL, &s, &n), HN_OK);
        assert_int_equal(n, strlen(s));
        assert_true(strncmp(s, "<?xml", 5) == 0 || strncmp(s, "<svg", 4) == 0);
        assert_non_null(strstr(s, "<svg"));
        assert_non_null(strstr(s, "width=\"480px\""));
        assert_non_null(strstr(s, "<path"));
        assert_non_null(strstr(s, "</svg>"));
        free(s);
    }
}

static void test_svg_prefix(void **state)
{
    (void)state;
    make_data();
    sh_chart c;
    char *s;
    chart_of(&c, 1, 0);
    assert_int_equal(sh_draw_svg_string(&c, 480, 300, "c7-", &s, NULL), HN_OK);
    int ids = 0;
    for (const char *q = strstr(s, "id=\""); q; q = strstr(q + 1, "id=\"")) {
        assert_true(strncmp(q + 4, "c7-", 3) == 0);
        ids++;
    }
    for (const char *q = strstr(s, "href=\"#"); q; q = strstr(q + 1, "href=\"#"))
        assert_true(strncmp(q + 7, "c7-", 3) == 0);
    assert_true(ids > 0);
    free(s);
    s = (char *)1;
    assert_int_equal(sh_draw_svg_string(&c, 480, 300, "bad id", &s, NULL), HN_EINVAL);
    assert_null(s);
    assert_int_equal(sh_draw_svg_string(&c, 480, 300, "9x", &s, NULL), HN_EINVAL);
}

static void test_pdf(void **state)
{
    (void)state;
    make_data();
    sh_chart c;
    char path[128], head[8] = { 0 };
    chart_of(&c, 4, 0);
    snprintf(path, sizeof path, "%s/fan.pdf", tmpdir);
    assert_int_equal(sh_draw_pdf_file(&c, 500, 300, path), HN_OK);
    FILE *f = fopen(path, "rb");
    assert_non_null(f);
    assert_int_equal(fread(head, 1, 5, f), 5);
    fclose(f);
    assert_string_equal(head, "%PDF-");
    unlink(path);
}

/* Two charts side by side on one surface: each stays in its rectangle. */
static void test_rectangles(void **state)
{
    (void)state;
    make_data();
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, 900, 400);
    cairo_t *cr = cairo_create(s);
    sh_chart a, b;
    chart_of(&a, 1, 0);
    chart_of(&b, 3, 0);
    assert_int_equal(sh_draw_chart(cr, &a, 10, 20, 420, 360), HN_OK);
    assert_int_equal(sh_draw_chart(cr, &b, 460, 20, 420, 360), HN_OK);
    cairo_destroy(cr);
    cairo_surface_flush(s);
    /* the untouched strips stay transparent (all-zero pixels) */
    unsigned char *d = cairo_image_surface_get_data(s);
    int stride = cairo_image_surface_get_stride(s);
    long stray = 0;
    for (int y = 0; y < 400; y++)
        for (int x = 0; x < 900; x++) {
            int inside = y >= 20 && y < 380 && ((x >= 10 && x < 430) || (x >= 460 && x < 880));
            uint32_t p;
            memcpy(&p, d + (size_t)y * (size_t)stride + 4 * (size_t)x, 4);
            if (!inside && p != 0)
                stray++;
        }
    assert_int_equal(stray, 0);
    assert_true(coloured(s, 10, 20, 430, 380) > 500);
    assert_true(coloured(s, 460, 20, 880, 380) > 200);
    cairo_surface_destroy(s);
}

static void test_errors(void **state)
{
    (void)state;
    make_data();
    sh_chart c;
    chart_of(&c, 0, 0);
    assert_int_equal(sh_draw_png_file(&c, 100, 300, "/tmp/never.png"), HN_EINVAL);
    assert_int_equal(sh_draw_png_file(&c, 300, 300, "/nonexistent-dir/x.png"), HN_EIO);
    assert_int_equal(sh_draw_png_file(NULL, 300, 300, "/tmp/never.png"), HN_EINVAL);
    cairo_surface_t *s = cairo_image_surface_create(CAIRO_FORMAT_ARGB32, 200, 200);
    cairo_t *cr = cairo_create(s);
    c.kind = (sh_chart_kind)42;
    assert_int_equal(sh_draw_chart(cr, &c, 0, 0, 200, 200), HN_EINVAL);
    cairo_destroy(cr);
    cairo_surface_destroy(s);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_png_each_kind),
        cmocka_unit_test(test_svg),
        cmocka_unit_test(test_svg_prefix),
        cmocka_unit_test(test_pdf),
        cmocka_unit_test(test_rectangles),
        cmocka_unit_test(test_errors),
    };
    return cmocka_run_group_tests(tests, setup, teardown);
}
