/* hbench.c - timing harness for make bench: fits, the battery and the CSV reader on one file. */
#include "fit.h"
#include "fit_spec.h"
#include "diag_battery.h"
#include "diag_checks.h"
#include "diag_stats.h"
#include "hn_status.h"
#include "sh_alloc.h"
#include "sh_csv.h"

#include <gsl/gsl_errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <time.h>

/* Usage (every mode prints one JSON object on stdout):
 *   hbench fit SPEC FILE REPS          fit_model REPS times
 *   hbench battery FILE REPS [SPEC]    diag_battery_run (m = 20, ARCH-LM 5 lags)
 *                                      on FILE, or on the residuals of SPEC
 *   hbench checks FILE REPS [SPEC]     the baseline's four checks alone: the ACF to lag 20
 *                                      with Ljung-Box, McLeod-Li (m = 20), ARCH-LM (5
 *                                      lags) and Jarque-Bera, on FILE or SPEC's residuals
 *   hbench csv FILE REPS               sh_csv_load of the first value column
 * Times are wall-clock seconds (CLOCK_MONOTONIC) of the computation only;
 * peak memory is getrusage's ru_maxrss in KiB, read before and after. */

static double now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static double cpu_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* CPU seconds of each run, beside the wall-clock ones (the machine may be shared). */
static double cpu_t[1000];

static long maxrss_kb(void)
{
    struct rusage ru;
    getrusage(RUSAGE_SELF, &ru);
    return ru.ru_maxrss;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

static double median(const double *t, int n)
{
    double *c = malloc((size_t)n * sizeof *c);
    if (!c)
        return t[0];
    memcpy(c, t, (size_t)n * sizeof *c);
    qsort(c, (size_t)n, sizeof *c, cmp_double);
    double m = n % 2 ? c[n / 2] : 0.5 * (c[n / 2 - 1] + c[n / 2]);
    free(c);
    return m;
}

static void print_times(const double *t, int n)
{
    printf("\"times_s\":[");
    for (int i = 0; i < n; i++)
        printf("%s%.6g", i ? "," : "", t[i]);
    printf("],\"median_s\":%.6g,\"cpu_median_s\":%.6g", median(t, n), median(cpu_t, n));
}

static int load(const char *path, sh_data *d)
{
    sh_error e;
    int rc = sh_csv_load(path, NULL, d, &e);
    if (rc != HN_OK)
        fprintf(stderr, "hbench: %s\n", e.message);
    return rc;
}

static int parse_spec(const char *text, fit_spec *s)
{
    char err[256];
    if (fit_spec_parse(text, s, err, sizeof err, NULL) != HN_OK) {
        fprintf(stderr, "hbench: %s: %s\n", text, err);
        return -1;
    }
    return 0;
}

static int bench_fit(const char *spec_text, const char *path, int reps, double *t)
{
    fit_spec spec;
    sh_data d;
    if (parse_spec(spec_text, &spec) || load(path, &d) != HN_OK)
        return 1;
    long rss0 = maxrss_kb();
    fit_result r;
    int rc = HN_OK;
    for (int i = 0; i < reps && rc == HN_OK; i++) {
        double t0 = now(), c0 = cpu_now();
        rc = fit_model(d.y, d.n, &spec, NULL, &r);
        t[i] = now() - t0;
        cpu_t[i] = cpu_now() - c0;
        if (rc == HN_OK && i + 1 < reps)
            fit_result_free(&r);
    }
    if (rc != HN_OK) {
        fprintf(stderr, "hbench: fit failed: %s\n", hn_strerror(rc));
        sh_data_free(&d);
        return 1;
    }
    long rss1 = maxrss_kb();
    char buf[128];
    printf("{\"what\":\"fit\",\"spec\":\"%s\",\"n\":%zu,", fit_spec_format(&spec, buf, sizeof buf), d.n);
    print_times(t, reps);
    printf(",\"evaluations\":%d,\"iterations\":%d,\"converged\":%d,\"loglik\":%.17g,\"params\":[",
           r.evaluations, r.iterations, r.converged, r.loglik);
    for (int k = 0; k < r.np; k++)
        printf("%s%.17g", k ? "," : "", r.par[k]);
    printf("],\"maxrss_kb_loaded\":%ld,\"maxrss_kb_after\":%ld,\"data_bytes\":%zu}\n", rss0, rss1,
           d.n * sizeof(double));
    fit_result_free(&r);
    sh_data_free(&d);
    return 0;
}

/* What the checks run on: the series D, or the residuals of SPEC fitted to it
 * (into R, with its ARMA term count for the portmanteau df).  Nonzero (D
 * freed) when the fit fails. */
static int checked_data(sh_data *d, const fit_spec *spec, fit_result *r, const double **x,
                        size_t *n, int *df_adjust)
{
    *x = d->y;
    *n = d->n;
    *df_adjust = 0;
    if (!spec)
        return 0;
    int rc = fit_model(d->y, d->n, spec, NULL, r);
    if (rc != HN_OK) {
        fprintf(stderr, "hbench: fit failed: %s\n", hn_strerror(rc));
        sh_data_free(d);
        return 1;
    }
    *x = r->resid;
    *n = r->n_eff;
    *df_adjust = fit_spec_arma_terms(spec);
    return 0;
}

static int bench_battery(const char *path, int reps, const char *spec_text, double *t)
{
    sh_data d;
    fit_spec spec;
    fit_result r;
    memset(&r, 0, sizeof r);
    if ((spec_text && parse_spec(spec_text, &spec)) || load(path, &d) != HN_OK)
        return 1;
    const double *x;
    size_t n;
    diag_options o = diag_default_options();
    o.lags = 20;
    o.arch_lags = 5;
    if (checked_data(&d, spec_text ? &spec : NULL, &r, &x, &n, &o.df_adjust))
        return 1;
    diag_battery b;
    int rc = HN_OK;
    for (int i = 0; i < reps && rc == HN_OK; i++) {
        double t0 = now(), c0 = cpu_now();
        rc = diag_battery_run(x, n, &o, &b);
        t[i] = now() - t0;
        cpu_t[i] = cpu_now() - c0;
        if (rc == HN_OK && i + 1 < reps)
            diag_battery_free(&b);
    }
    if (rc != HN_OK) {
        fprintf(stderr, "hbench: battery failed: %s\n", hn_strerror(rc));
        fit_result_free(&r);
        sh_data_free(&d);
        return 1;
    }
    printf("{\"what\":\"battery\",\"n\":%zu,\"m\":%d,", n, b.m);
    print_times(t, reps);
    printf(",\"checks\":%d,\"p\":{", b.ntests);
    for (int k = 0; k < b.ntests; k++)
        printf("%s\"%s\":%.6g", k ? "," : "", b.tests[k].name, b.tests[k].p);
    printf("}}\n");
    diag_battery_free(&b);
    fit_result_free(&r);
    sh_data_free(&d);
    return 0;
}

/* The checks a scripted baseline runs, one call each, as a user of the
 * library would call them. */
static int four_checks(const double *x, size_t n, int df_adjust, diag_test *t)
{
    double acf[20], skew, kurt;
    int rc = diag_acf(x, n, 20, acf);
    if (rc == HN_OK)
        rc = diag_ljung_box_acf(acf, 20, n, 20, df_adjust, 0.05, &t[0]);
    if (rc == HN_OK)
        rc = diag_mcleod_li(x, n, 20, 0.05, &t[1]);
    if (rc == HN_OK)
        rc = diag_arch_lm(x, n, 5, 0.05, &t[2]);
    if (rc == HN_OK)
        rc = diag_jarque_bera(x, n, 0.05, &t[3], &skew, &kurt);
    return rc;
}

static int bench_checks(const char *path, int reps, const char *spec_text, double *t)
{
    sh_data d;
    fit_spec spec;
    fit_result r;
    memset(&r, 0, sizeof r);
    if ((spec_text && parse_spec(spec_text, &spec)) || load(path, &d) != HN_OK)
        return 1;
    const double *x;
    size_t n;
    int df_adjust;
    if (checked_data(&d, spec_text ? &spec : NULL, &r, &x, &n, &df_adjust))
        return 1;
    diag_test tests[4];
    int rc = HN_OK;
    for (int i = 0; i < reps && rc == HN_OK; i++) {
        double t0 = now(), c0 = cpu_now();
        rc = four_checks(x, n, df_adjust, tests);
        t[i] = now() - t0;
        cpu_t[i] = cpu_now() - c0;
    }
    if (rc != HN_OK) {
        fprintf(stderr, "hbench: checks failed: %s\n", hn_strerror(rc));
        fit_result_free(&r);
        sh_data_free(&d);
        return 1;
    }
    printf("{\"what\":\"checks\",\"n\":%zu,", n);
    print_times(t, reps);
    printf(",\"checks\":4,\"p\":{");
    for (int k = 0; k < 4; k++)
        printf("%s\"%s\":%.10g", k ? "," : "", tests[k].name, tests[k].p);
    printf("}}\n");
    fit_result_free(&r);
    sh_data_free(&d);
    return 0;
}

static int bench_csv(const char *path, int reps, double *t)
{
    struct stat st;
    if (stat(path, &st) != 0) {
        perror(path);
        return 1;
    }
    size_t n = 0;
    for (int i = 0; i < reps; i++) {
        sh_data d;
        double t0 = now(), c0 = cpu_now();
        int rc = load(path, &d);
        t[i] = now() - t0;
        cpu_t[i] = cpu_now() - c0;
        if (rc != HN_OK)
            return 1;
        n = d.n;
        sh_data_free(&d);
    }
    double m = median(t, reps);
    printf("{\"what\":\"csv\",\"n\":%zu,\"bytes\":%lld,", n, (long long)st.st_size);
    print_times(t, reps);
    printf(",\"mb_per_s\":%.6g}\n", (double)st.st_size / m / 1e6);
    return 0;
}

int main(int argc, char **argv)
{
    gsl_set_error_handler_off();
    sh_alloc_policy();   /* as the program runs */
    if (argc < 4) {
        fprintf(stderr, "usage: hbench fit SPEC FILE REPS | battery|checks FILE REPS [SPEC] | csv FILE REPS\n");
        return 2;
    }
    int fit = !strcmp(argv[1], "fit");
    int reps = atoi(argv[fit ? 4 : 3]);
    if (reps < 1 || reps > 1000 || (fit && argc < 5)) {
        fprintf(stderr, "hbench: bad arguments\n");
        return 2;
    }
    double *t = calloc((size_t)reps, sizeof *t);
    if (!t)
        return 1;
    int rc;
    if (fit)
        rc = bench_fit(argv[2], argv[3], reps, t);
    else if (!strcmp(argv[1], "battery"))
        rc = bench_battery(argv[2], reps, argc > 4 ? argv[4] : NULL, t);
    else if (!strcmp(argv[1], "checks"))
        rc = bench_checks(argv[2], reps, argc > 4 ? argv[4] : NULL, t);
    else if (!strcmp(argv[1], "csv"))
        rc = bench_csv(argv[2], reps, t);
    else {
        fprintf(stderr, "hbench: unknown mode '%s'\n", argv[1]);
        rc = 2;
    }
    free(t);
    return rc;
}
