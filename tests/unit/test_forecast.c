/* test_forecast.c - forecasts against closed forms, GARCH variance paths, hold-out scores. */
#include "testutil.h"

#include "fit.h"
#include "fit_forecast.h"
#include "fit_holdout.h"
#include "fit_sim.h"
#include "hn_status.h"

static fit_spec spec_of(const char *text)
{
    fit_spec s;
    char err[128];
    assert_int_equal(fit_spec_parse(text, &s, err, sizeof err, NULL), HN_OK);
    return s;
}

/* Invented series: SPEC at PAR, N values, seeded (seed given at each call). */
static double *simulate(const fit_spec *s, const double *par, size_t n, unsigned long seed)
{
    double *y = malloc(n * sizeof *y);
    assert_non_null(y);
    assert_int_equal(fit_simulate(s, par, n, 500, seed, y), HN_OK);
    return y;
}

/* AR(1): y_{T+h} forecast mu + phi^h (y_T - mu), error variance
 * sigma2 (1 - phi^{2h}) / (1 - phi^2) (textbook closed forms, common practice). */
static void test_ar1_closed_form(void **state)
{
    (void)state;
    fit_spec s = spec_of("ar(1)");
    const double par[3] = { 2.0, 0.7, 1.5 };          /* mu, phi, sigma2 */
    const size_t n = 400;
    double *y = simulate(&s, par, n, 31UL);
    fit_result r;
    assert_int_equal(fit_model(y, n, &s, NULL, &r), HN_OK);
    const int h = 12;
    fit_forecast *fc = fit_forecast_alloc(h);
    assert_non_null(fc);
    assert_int_equal(fit_forecast_run(&r, y, n, 0.95, fc), HN_OK);
    const double mu = r.par[0], phi = r.par[1], s2 = r.sigma2;
    for (int k = 1; k <= h; k++) {
        TU_NEAR(fc->mean[k - 1], mu + pow(phi, k) * (y[n - 1] - mu), 1e-12);
        double v = s2 * (1.0 - pow(phi, 2 * k)) / (1.0 - phi * phi);
        TU_NEAR(fc->se[k - 1], sqrt(v), 1e-12);
        TU_NEAR(fc->cond_var[k - 1], s2, 1e-15);
        /* 97.5% normal quantile 1.959963984540054 (scipy 1.10.1, norm.ppf). */
        TU_NEAR(fc->hi[k - 1] - fc->mean[k - 1], 1.959963984540054 * sqrt(v), 1e-12);
        TU_NEAR(fc->mean[k - 1] - fc->lo[k - 1], 1.959963984540054 * sqrt(v), 1e-12);
    }
    /* Wrong series length: refused. */
    assert_int_equal(fit_forecast_run(&r, y, n - 1, 0.95, fc), HN_EINVAL);
    assert_int_equal(fit_forecast_run(&r, y, n, 1.0, fc), HN_EINVAL);
    fit_forecast_free(fc);
    fit_result_free(&r);
    free(y);
}

/* MA(1): forecast mu + theta e_T one step ahead, mu beyond; error variances
 * sigma2 and sigma2 (1 + theta^2) (closed forms, common practice). */
static void test_ma1_closed_form(void **state)
{
    (void)state;
    fit_spec s = spec_of("ma(1)");
    const double par[3] = { -1.0, 0.6, 0.8 };
    const size_t n = 500;
    double *y = simulate(&s, par, n, 32UL);
    fit_result r;
    assert_int_equal(fit_model(y, n, &s, NULL, &r), HN_OK);
    fit_forecast *fc = fit_forecast_alloc(4);
    assert_non_null(fc);
    assert_int_equal(fit_forecast_run(&r, y, n, 0.8, fc), HN_OK);
    const double mu = r.par[0], th = r.par[1];
    TU_NEAR(fc->mean[0], mu + th * r.resid[r.n_eff - 1], 1e-12);
    for (int k = 1; k < 4; k++)
        TU_NEAR(fc->mean[k], mu, 1e-12);
    TU_NEAR(fc->se[0], sqrt(r.sigma2), 1e-12);
    for (int k = 1; k < 4; k++)
        TU_NEAR(fc->se[k], sqrt(r.sigma2 * (1.0 + th * th)), 1e-12);
    /* 90% normal quantile 1.2815515655446004 (scipy 1.10.1, norm.ppf(0.9)). */
    TU_NEAR(fc->quantile, 1.2815515655446004, 1e-12);
    fit_forecast_free(fc);
    fit_result_free(&r);
    free(y);
}

/* GARCH(1,1), constant mean: v_{T+1} = omega + alpha e_T^2 + beta sigma2_T and
 * v_{T+k} = s2 + (alpha+beta)^{k-1} (v_{T+1} - s2), s2 = omega/(1-alpha-beta)
 * (closed form of the recursion, common practice); se_k = sqrt(v_{T+k}). */
static void test_garch_variance_path(void **state)
{
    (void)state;
    fit_spec s = spec_of("garch(1,1)");
    const double par[4] = { 0.1, 0.05, 0.1, 0.85 };
    const size_t n = 2000;
    double *y = simulate(&s, par, n, 33UL);
    fit_result r;
    assert_int_equal(fit_model(y, n, &s, NULL, &r), HN_OK);
    const int h = 30;
    fit_forecast *fc = fit_forecast_alloc(h);
    assert_non_null(fc);
    assert_int_equal(fit_forecast_run(&r, y, n, 0.95, fc), HN_OK);
    const double om = r.par[1], a = r.par[2], b = r.par[3];
    const double eT = r.resid[r.n_eff - 1], sT = r.sigma_t[r.n_eff - 1];
    const double v1 = om + a * eT * eT + b * sT * sT, s2 = om / (1.0 - a - b);
    TU_NEAR(r.sigma2, s2, 1e-12);
    for (int k = 1; k <= h; k++) {
        double v = s2 + pow(a + b, k - 1) * (v1 - s2);
        TU_NEAR(fc->cond_var[k - 1], v, 1e-12);
        TU_NEAR(fc->se[k - 1], sqrt(v), 1e-12);
        TU_NEAR(fc->mean[k - 1], r.par[0], 1e-15);
    }
    fit_forecast_free(fc);
    fit_result_free(&r);
    free(y);
}

/* AR(1)-GARCH(1,1) t: the mean error variance sums psi_j^2 = phi^{2j} times
 * the variance path, se_k^2 = sum_{j<k} phi^{2j} v_{T+k-j}; the interval uses
 * the unit-variance t quantile t_nu^{-1}(0.975) sqrt((nu-2)/nu). */
static void test_ar1_garch_t(void **state)
{
    (void)state;
    fit_spec s = spec_of("ar(1)+garch(1,1) t");
    const double par[6] = { 0.0, 0.4, 0.05, 0.1, 0.85, 7.0 };
    const size_t n = 3000;
    double *y = simulate(&s, par, n, 34UL);
    fit_result r;
    assert_int_equal(fit_model(y, n, &s, NULL, &r), HN_OK);
    const int h = 10;
    fit_forecast *fc = fit_forecast_alloc(h);
    assert_non_null(fc);
    assert_int_equal(fit_forecast_run(&r, y, n, 0.95, fc), HN_OK);
    const double mu = r.par[0], phi = r.par[1];
    for (int k = 1; k <= h; k++) {
        double v = 0.0;
        for (int j = 0; j < k; j++)
            v += pow(phi, 2 * j) * fc->cond_var[k - 1 - j];
        TU_NEAR(fc->se[k - 1], sqrt(v), 1e-12);
        TU_NEAR(fc->mean[k - 1], mu + pow(phi, k) * (y[n - 1] - mu), 1e-12);
        TU_NEAR(fc->psi[k - 1], pow(phi, k - 1), 1e-12);
    }
    /* With nu set to 6: t_6^{-1}(0.975) = 2.446911851144966, times sqrt(4/6)
     * = 1.9978951602913977.  Source: the closed form of the t distribution for
     * even nu, P(|T| < t) = sin th (1 + cos^2 th / 2 + 3 cos^4 th / 8),
     * th = atan(t / sqrt 6) (Abramowitz & Stegun 26.7; section number from
     * memory), solved by bisection; scipy 1.10.1 t.cdf gives 0.975 there
     * (its t.ppf(0.975, 6) = 2.4469118487916806 is off by 2e-9). */
    fit_result r6;
    assert_int_equal(fit_result_copy(&r6, &r), HN_OK);
    r6.par[r6.np - 1] = 6.0;
    assert_int_equal(fit_forecast_run(&r6, y, n, 0.95, fc), HN_OK);
    TU_NEAR(fc->quantile, 1.9978951602913977, 1e-12);
    fit_result_free(&r6);
    fit_forecast_free(fc);
    fit_result_free(&r);
    free(y);
}

/* Scores worked by hand: forecasts 5, 5, 5 with bounds [2, 8]; actual 6, 9, 5;
 * training 3 7 4 6 5 5 2 8 5 5. Errors 1, 4, 0: MAE 5/3, RMSE sqrt(17/3);
 * naive differences 4+3+2+1+0+3+6+3+0 = 22 over 9: scale 22/9, MASE 15/22;
 * 9 lies outside: coverage 2/3. */
static const double train10[10] = { 3, 7, 4, 6, 5, 5, 2, 8, 5, 5 };

static void test_holdout_scores_by_hand(void **state)
{
    (void)state;
    fit_forecast *fc = fit_forecast_alloc(3);
    assert_non_null(fc);
    for (int k = 0; k < 3; k++) {
        fc->mean[k] = 5.0;
        fc->lo[k] = 2.0;
        fc->hi[k] = 8.0;
    }
    const double actual[3] = { 6, 9, 5 };
    fit_holdout_scores sc;
    assert_int_equal(fit_holdout_score(train10, 10, actual, fc, &sc), HN_OK);
    TU_NEAR(sc.mae, 5.0 / 3.0, 1e-15);
    TU_NEAR(sc.rmse, sqrt(17.0 / 3.0), 1e-15);
    TU_NEAR(sc.mase_scale, 22.0 / 9.0, 1e-15);
    TU_NEAR(sc.mase, 15.0 / 22.0, 1e-15);
    TU_NEAR(sc.coverage, 2.0 / 3.0, 1e-15);
    assert_int_equal(sc.inside, 2);
    /* A constant training span has no naive error: MASE undefined. */
    const double flat[3] = { 1, 1, 1 };
    assert_int_equal(fit_holdout_score(flat, 3, actual, fc, &sc), HN_OK);
    assert_true(isnan(sc.mase));
    fit_forecast_free(fc);
}

/* The whole hold-out on the same numbers with arma(0,0): mu = mean 5,
 * sigma2 = SSR/N = 28/10 = 2.8, so the forecasts are 5 with half-width
 * 1.959963984540054 sqrt(2.8) = 3.2796 (scipy 1.10.1 quantile): 9 is
 * outside, 6 and 5 inside -- the scores above again. */
static void test_holdout_run_by_hand(void **state)
{
    (void)state;
    double y[13];
    memcpy(y, train10, sizeof train10);
    y[10] = 6;
    y[11] = 9;
    y[12] = 5;
    fit_spec s = spec_of("arma(0,0)");
    fit_holdout ho;
    assert_int_equal(fit_holdout_run(y, 13, &s, NULL, 3, 0.95, &ho), HN_OK);
    assert_int_equal(ho.n_train, 10);
    TU_NEAR(ho.fit.par[0], 5.0, 1e-10);
    TU_NEAR(ho.fit.sigma2, 2.8, 1e-10);
    for (int k = 0; k < 3; k++) {
        TU_NEAR(ho.fc->mean[k], 5.0, 1e-10);
        TU_NEAR(ho.fc->hi[k] - 5.0, 1.959963984540054 * sqrt(2.8), 1e-9);
    }
    TU_NEAR(ho.sc.mae, 5.0 / 3.0, 1e-10);
    TU_NEAR(ho.sc.rmse, sqrt(17.0 / 3.0), 1e-10);
    TU_NEAR(ho.sc.mase, 15.0 / 22.0, 1e-10);
    TU_NEAR(ho.sc.coverage, 2.0 / 3.0, 1e-15);
    fit_holdout_free(&ho);
    /* Too long a hold-out: the training span is too short for the spec. */
    assert_int_equal(fit_holdout_run(y, 13, &s, NULL, 8, 0.95, &ho), HN_ESHORT);
    assert_null(ho.fc);
    assert_int_equal(fit_holdout_run(y, 13, &s, NULL, 13, 0.95, &ho), HN_EINVAL);
}

/* Hold-out with a GARCH part: the same numbers as fitting the training span,
 * forecasting and scoring by hand from the parts. */
static void test_holdout_garch_parts(void **state)
{
    (void)state;
    fit_spec s = spec_of("ar(1)+garch(1,1)");
    const double par[5] = { 0.5, 0.3, 0.05, 0.1, 0.85 };
    const size_t n = 1200;
    double *y = simulate(&s, par, n, 35UL);
    const int h = 20;
    fit_holdout ho;
    assert_int_equal(fit_holdout_run(y, n, &s, NULL, h, 0.9, &ho), HN_OK);
    fit_result r;
    assert_int_equal(fit_model(y, n - h, &s, NULL, &r), HN_OK);
    fit_forecast *fc = fit_forecast_alloc(h);
    assert_non_null(fc);
    assert_int_equal(fit_forecast_run(&r, y, n - h, 0.9, fc), HN_OK);
    double sa = 0.0, s2 = 0.0, sn = 0.0;
    int in = 0;
    for (int k = 0; k < h; k++) {
        double d = y[n - h + k] - fc->mean[k];
        sa += fabs(d);
        s2 += d * d;
        in += y[n - h + k] >= fc->lo[k] && y[n - h + k] <= fc->hi[k];
        TU_NEAR(ho.fc->mean[k], fc->mean[k], 1e-12);
        TU_NEAR(ho.fc->cond_var[k], fc->cond_var[k], 1e-12);
    }
    for (size_t t = 1; t < n - h; t++)
        sn += fabs(y[t] - y[t - 1]);
    TU_NEAR(ho.sc.mae, sa / h, 1e-12);
    TU_NEAR(ho.sc.rmse, sqrt(s2 / h), 1e-12);
    TU_NEAR(ho.sc.mase, (sa / h) / (sn / (double)(n - h - 1)), 1e-12);
    assert_int_equal(ho.sc.inside, in);
    assert_int_equal(ho.fit.n, n - h);
    fit_forecast_free(fc);
    fit_result_free(&r);
    fit_holdout_free(&ho);
    free(y);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_ar1_closed_form),
        cmocka_unit_test(test_ma1_closed_form),
        cmocka_unit_test(test_garch_variance_path),
        cmocka_unit_test(test_ar1_garch_t),
        cmocka_unit_test(test_holdout_scores_by_hand),
        cmocka_unit_test(test_holdout_run_by_hand),
        cmocka_unit_test(test_holdout_garch_parts),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
