/* test_optim.c - the BFGS2 driver, finite-difference Hessian and SPD inverse. */
#include "testutil.h"
#include "fit_optim.h"
#include "hn_status.h"

/* Rosenbrock's function: minimum 0 at (1, 1) (exact algebra). */
static int rosen(const double *x, double *f, double *g, void *ctx)
{
    (void)ctx;
    double a = 1.0 - x[0], b = x[1] - x[0] * x[0];
    *f = a * a + 100.0 * b * b;
    if (g) {
        g[0] = -2.0 * a - 400.0 * x[0] * b;
        g[1] = 200.0 * b;
    }
    return HN_OK;
}

/* A quadratic 1/2 x'Ax - b'x, infeasible (HN_EDOMAIN) for x0 > 3: the
 * minimiser A^-1 b = (1, 2) lies inside, the start near the wall. */
static int quad(const double *x, double *f, double *g, void *ctx)
{
    int *calls = ctx;
    (*calls)++;
    if (x[0] > 3.0)
        return HN_EDOMAIN;
    double A[4] = { 4.0, 1.0, 1.0, 3.0 }, b[2] = { 6.0, 7.0 };
    double Ax0 = A[0] * x[0] + A[1] * x[1], Ax1 = A[2] * x[0] + A[3] * x[1];
    *f = 0.5 * (x[0] * Ax0 + x[1] * Ax1) - b[0] * x[0] - b[1] * x[1];
    if (g) {
        g[0] = Ax0 - b[0];
        g[1] = Ax1 - b[1];
    }
    return HN_OK;
}

static void test_minimise(void **state)
{
    (void)state;
    double x[2] = { -1.2, 1.0 };   /* the classical start (common practice) */
    fit_optim_report rep;
    fit_optim_options o = fit_optim_default_options();
    assert_int_equal(fit_optim_minimise(2, x, rosen, NULL, &o, &rep), HN_OK);
    assert_true(rep.converged);
    TU_NEAR(x[0], 1.0, 1e-7);
    TU_NEAR(x[1], 1.0, 1e-7);
    assert_true(rep.grad_norm < o.grad_tol);
    assert_true(rep.iterations > 5);

    int calls = 0;
    double y[2] = { 2.99, -4.0 };
    assert_int_equal(fit_optim_minimise(2, y, quad, &calls, &o, &rep), HN_OK);
    TU_NEAR(y[0], 1.0, 1e-8);
    TU_NEAR(y[1], 2.0, 1e-8);
    double z[2] = { 3.5, 0.0 };
    assert_int_equal(fit_optim_minimise(2, z, quad, &calls, &o, &rep), HN_EDOMAIN);

    /* a budget too small: stopped short, best point kept */
    double w[2] = { -1.2, 1.0 };
    o.max_iter = 3;
    assert_int_equal(fit_optim_minimise(2, w, rosen, NULL, &o, &rep), HN_ENOCONV);
    assert_false(rep.converged);
    assert_int_equal(rep.iterations, 3);
    assert_true(rep.f < 24.2);   /* f(-1.2, 1) = 24.2 */

    volatile int stop = 1;
    o = fit_optim_default_options();
    o.interrupt = &stop;
    double v[2] = { -1.2, 1.0 };
    assert_int_equal(fit_optim_minimise(2, v, rosen, NULL, &o, &rep), HN_EINTR);
}

static void test_hessian_inverse(void **state)
{
    (void)state;
    /* Rosenbrock's Hessian at (1, 1) is [[802, -400], [-400, 200]] (exact algebra) */
    double x[2] = { 1.0, 1.0 }, H[4];
    assert_int_equal(fit_hessian_fd(2, x, rosen, NULL, H), HN_OK);
    TU_NEAR(H[0], 802.0, 1e-7);
    TU_NEAR(H[1], -400.0, 1e-7);
    TU_NEAR(H[2], -400.0, 1e-7);
    TU_NEAR(H[3], 200.0, 1e-7);
    /* its inverse: 1/400 [[200, 400], [400, 802]] */
    double inv[4];
    assert_int_equal(fit_spd_inverse(2, H, inv), HN_OK);
    TU_NEAR(inv[0], 0.5, 1e-6);
    TU_NEAR(inv[1], 1.0, 1e-6);
    TU_NEAR(inv[2], 1.0, 1e-6);
    TU_NEAR(inv[3], 802.0 / 400.0, 1e-6);
    double A[9] = { 4, 2, 0, 2, 3, 1, 0, 1, 2 }, B[9];
    assert_int_equal(fit_spd_inverse(3, A, B), HN_OK);
    /* A B = I */
    for (int i = 0; i < 3; i++)
        for (int j = 0; j < 3; j++) {
            double s = 0.0;
            for (int k = 0; k < 3; k++)
                s += A[i * 3 + k] * B[k * 3 + j];
            TU_NEAR(s, i == j ? 1.0 : 0.0, 1e-14);
        }
    double S[4] = { 1.0, 1.0, 1.0, 1.0 };        /* singular */
    assert_int_equal(fit_spd_inverse(2, S, inv), HN_ESINGULAR);
    double N[4] = { 1.0, 2.0, 2.0, 1.0 };        /* indefinite */
    assert_int_equal(fit_spd_inverse(2, N, inv), HN_ESINGULAR);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_minimise),
        cmocka_unit_test(test_hessian_inverse),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
