/* testutil.h - shared helpers for the cmocka unit tests. */
#ifndef TESTUTIL_H
#define TESTUTIL_H

#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Directory of the external reference data, or NULL when it is absent
 * ($HONE_REFERENCE_DIR, else ../shared/reference from the checkout). */
static inline const char *tu_ref_dir(void)
{
    const char *d = getenv("HONE_REFERENCE_DIR");
    static char buf[4096];
    if (!d || !*d)
        d = "../shared/reference";
    snprintf(buf, sizeof buf, "%s/README.md", d);
    FILE *f = fopen(buf, "r");
    if (!f)
        return NULL;
    fclose(f);
    return d;
}

/* Skip the calling test with a clear message when the reference data are absent. */
#define TU_NEED_REF(dir)                                                         \
    const char *dir = tu_ref_dir();                                              \
    if (!dir) {                                                                  \
        printf("skip: reference data not found (set HONE_REFERENCE_DIR)\n");     \
        skip();                                                                  \
    }

/* Sum of squared deviations of Y[0..n-1] about their mean (two passes):
 * divide by n - 1 for the sample variance, by n for the moment estimate. */
static inline double tu_sum_sq_dev(const double *y, size_t n)
{
    double m = 0.0, s = 0.0;
    for (size_t t = 0; t < n; t++)
        m += y[t];
    m /= (double)n;
    for (size_t t = 0; t < n; t++)
        s += (y[t] - m) * (y[t] - m);
    return s;
}

/* Log relative error: -log10(|x - want| / |want|), or -log10|x| when want is 0;
 * 16 for an exact match. */
static inline double tu_lre(double x, double want)
{
    double d = fabs(x - want);
    if (d == 0.0)
        return 16.0;
    double r = want != 0.0 ? d / fabs(want) : d;
    double l = -log10(r);
    return l > 16.0 ? 16.0 : l;
}

/* Assert |x - want| <= tol * max(1, |want|), printing both on failure. */
#define TU_NEAR(x, want, tol)                                                    \
    do {                                                                         \
        double tu_x_ = (x), tu_w_ = (want), tu_t_ = (tol);                        \
        double tu_s_ = fabs(tu_w_) > 1.0 ? fabs(tu_w_) : 1.0;                     \
        if (!(fabs(tu_x_ - tu_w_) <= tu_t_ * tu_s_)) {                            \
            print_error("%s = %.17g, want %.17g (tol %g)\n", #x, tu_x_, tu_w_, tu_t_); \
            fail();                                                              \
        }                                                                        \
    } while (0)

/* Read one numeric column (0-based index COL) of a CSV file with a header
 * row into a malloc'd array; returns the count, 0 on failure. */
static inline size_t tu_read_column(const char *path, int col, double **out)
{
    FILE *f = fopen(path, "r");
    char line[4096];
    size_t n = 0, cap = 256;
    double *v = malloc(cap * sizeof *v);
    *out = NULL;
    if (!f || !v) {
        if (f) fclose(f);
        free(v);
        return 0;
    }
    if (!fgets(line, sizeof line, f)) {
        fclose(f);
        free(v);
        return 0;
    }
    while (fgets(line, sizeof line, f)) {
        char *p = line;
        for (int c = 0; c < col && p; c++) {
            p = strchr(p, ',');
            if (p) p++;
        }
        if (!p || *p == '\n' || *p == '\r' || !*p)
            continue;
        if (n == cap) {
            double *w = realloc(v, 2 * cap * sizeof *v);
            if (!w) { free(v); fclose(f); return 0; }
            v = w;
            cap *= 2;
        }
        v[n++] = strtod(p, NULL);
    }
    fclose(f);
    *out = v;
    return n;
}

#endif
