/* test_figure.c - the session charts: correlogram values and bands, rolling
 * moments, fitted values and the forecast fan, on Box-Jenkins Series F.
 * Sources: the NIST/SEMATECH e-Handbook sample ACF of Series F (see
 * reference/box-jenkins-series-f/SOURCE.md); normal quantiles from scipy
 * 1.10.1 (Debian python3-scipy) norm.ppf; rolling and squared-series
 * moments from numpy 1.24.2. */
#include "testutil.h"
#include "sh_figure.h"
#include "sh_session.h"
#include "fit_forecast.h"
#include "hn_status.h"

/* A session holding Series F as its working series, or NULL (skipped). */
static int load_f(sh_session *s)
{
    const char *dir = tu_ref_dir();
    if (!dir)
        return -1;
    char path[4096];
    snprintf(path, sizeof path, "%s/box-jenkins-series-f/series_f.csv", dir);
    double *y = NULL;
    size_t n = tu_read_column(path, 1, &y);
    if (n != 70) {
        free(y);
        return -1;
    }
    sh_session_init(s);
    double *raw = malloc(n * sizeof *raw);
    memcpy(raw, y, n * sizeof *raw);
    s->raw = raw;
    s->n_raw = n;
    sh_set_series(s, y, n);
    s->loaded = 1;
    snprintf(s->path, sizeof s->path, "%.1000s", path);
    snprintf(s->column, sizeof s->column, "yield");
    return 0;
}

#define NEED_F(s)                                                                \
    sh_session s;                                                                \
    if (load_f(&s)) {                                                            \
        printf("skip: reference data not found (set HONE_REFERENCE_DIR)\n");     \
        skip();                                                                  \
    }

static void test_acf_of_series(void **state)
{
    (void)state;
    NEED_F(s);
    sh_figure f;
    char err[256];
    assert_int_equal(sh_figure_build(&s, SH_FIG_ACF, 1, NULL, &f, err, sizeof err), 0);
    assert_int_equal(f.chart.kind, SH_CHART_CORR);
    assert_int_equal(f.chart.first_lag, 1);
    /* e-Handbook sample ACF of Series F, lags 1, 2, 3 (9 decimals as printed) */
    TU_NEAR(f.chart.series[0].y[0], -0.389878319, 1e-9);
    TU_NEAR(f.chart.series[0].y[1], 0.304394082, 1e-9);
    TU_NEAR(f.chart.series[0].y[2], -0.165554717, 1e-9);
    /* band z/sqrt(n): scipy 1.10.1 norm.ppf(0.975) = 1.959963984540054 */
    TU_NEAR(f.chart.band, 1.959963984540054 / sqrt(70.0), 1e-14);
    sh_figure_free(&f);

    s.alpha = 0.01;   /* norm.ppf(0.995) = 2.5758293035489004 (scipy 1.10.1) */
    assert_int_equal(sh_figure_build(&s, SH_FIG_PACF, 1, NULL, &f, err, sizeof err), 0);
    TU_NEAR(f.chart.band, 2.5758293035489004 / sqrt(70.0), 1e-14);
    /* the PACF at lag 1 equals the ACF at lag 1 (common practice) */
    TU_NEAR(f.chart.series[0].y[0], -0.389878319, 1e-9);
    sh_figure_free(&f);

    /* ACF of the squares, mean removed: numpy 1.24.2 on y**2 */
    assert_int_equal(sh_figure_build(&s, SH_FIG_ACF2, 1, NULL, &f, err, sizeof err), 0);
    TU_NEAR(f.chart.series[0].y[0], -0.39020986007653335, 1e-12);
    TU_NEAR(f.chart.series[0].y[1], 0.3299642559058792, 1e-12);
    sh_figure_free(&f);
    sh_session_free(&s);
}

static void test_rolling_of_series(void **state)
{
    (void)state;
    NEED_F(s);
    sh_figure f;
    char err[256];
    assert_int_equal(sh_figure_build(&s, SH_FIG_ROLLING, 0, NULL, &f, err, sizeof err), 0);
    /* window max(10, n/10) = 10: 61 windows; numpy 1.24.2 mean and std(ddof=1) */
    assert_int_equal(f.chart.series[0].n, 61);
    TU_NEAR(f.chart.series[0].y[0], 51.0, 1e-12);
    TU_NEAR(f.chart.series[1].y[0], 14.514360704718161, 1e-12);
    TU_NEAR(f.chart.series[0].y[60], 48.8, 1e-12);
    TU_NEAR(f.chart.series[1].y[60], 13.538422688366946, 1e-12);
    assert_int_equal(f.chart.nrefs, 2);
    TU_NEAR(f.chart.refs[0].y, 51.128571428571426, 1e-12);
    TU_NEAR(f.chart.refs[1].y, 11.90898020503055, 1e-12);
    TU_NEAR(f.chart.x0, 10.0, 0);       /* plotted at the window's last observation */
    sh_figure_free(&f);
    sh_session_free(&s);
}

static void test_model_charts(void **state)
{
    (void)state;
    NEED_F(s);
    sh_figure f;
    char err[256];
    /* no model yet: residual charts refuse with a message */
    assert_int_equal(sh_figure_build(&s, SH_FIG_RESID, 0, NULL, &f, err, sizeof err), -1);
    assert_non_null(strstr(err, "needs a model"));
    sh_figure_free(&f);

    fit_spec spec;
    char e2[128];
    int pos;
    assert_int_equal(fit_spec_parse("ar(2)", &spec, e2, sizeof e2, &pos), HN_OK);
    fit_result r;
    assert_int_equal(fit_model(s.y, s.n, &spec, NULL, &r), HN_OK);
    sh_model *m = sh_add_model(&s, &r, 0, "test");
    assert_non_null(m);

    assert_int_equal(sh_figure_build(&s, SH_FIG_FIT, 0, NULL, &f, err, sizeof err), 0);
    assert_int_equal(f.chart.nseries, 2);
    const double *fit = f.chart.series[1].y;
    assert_true(isnan(fit[0]) && isnan(fit[1]));
    for (size_t i = 2; i < s.n; i++)
        TU_NEAR(fit[i], s.y[i] - m->fit.resid[i - 2], 1e-12);
    sh_figure_free(&f);

    assert_int_equal(sh_figure_build(&s, SH_FIG_RESID, 0, NULL, &f, err, sizeof err), 0);
    assert_int_equal(f.chart.series[0].n, 68);
    TU_NEAR(f.chart.x0, 3.0, 0);
    sh_figure_free(&f);

    assert_int_equal(sh_figure_build(&s, SH_FIG_PROFILE, 0, NULL, &f, err, sizeof err), 0);
    assert_true(m->checked);            /* the profile ran the battery */
    assert_int_equal(f.chart.kind, SH_CHART_PROFILE);
    sh_figure_free(&f);

    assert_int_equal(sh_figure_build(&s, SH_FIG_FAN, 0, NULL, &f, err, sizeof err), -1);
    sh_figure_free(&f);
    fit_forecast *fc = fit_forecast_alloc(6);
    assert_non_null(fc);
    assert_int_equal(fit_forecast_run(&m->fit, s.y, s.n, 0.95, fc), HN_OK);
    assert_int_equal(sh_figure_build(&s, SH_FIG_FAN, 0, fc, &f, err, sizeof err), 0);
    assert_int_equal(f.chart.fan_h, 6);
    assert_int_equal(f.chart.series[0].n, 60);          /* max(4h, 60) capped at n */
    TU_NEAR(f.chart.x0, 11.0, 0);
    TU_NEAR(f.chart.fan_level[0], 95.0, 1e-12);
    sh_figure_free(&f);
    fit_forecast_free(fc);

    /* after a transform the model no longer belongs on the charts */
    snprintf(s.transforms, sizeof s.transforms, "demean");
    assert_int_equal(sh_figure_build(&s, SH_FIG_QQ, 0, NULL, &f, err, sizeof err), -1);
    sh_figure_free(&f);
    sh_session_free(&s);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_acf_of_series),
        cmocka_unit_test(test_rolling_of_series),
        cmocka_unit_test(test_model_charts),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
