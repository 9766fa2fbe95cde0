/*
 * test_interp.c - interpolation tables (interp.h).
 */
#include "testutil.h"
#include <lampwick/lampwick.h>

static lw_interp *mk(const double *x, const double *y, size_t n)
{
    lw_error e;
    lw_error_clear(&e);
    lw_interp *t = lw_interp_new(x, y, n, &e);
    assert_non_null(t);
    return t;
}

static void linear_interpolates_and_clamps(void **state)
{
    (void)state;
    const double x[] = {0, 1, 3}, y[] = {10, 20, 0};
    lw_interp *t = mk(x, y, 3);
    assert_close(lw_interp_linear(t, 0.5), 15, 1e-15);
    assert_close(lw_interp_linear(t, 2.0), 10, 1e-15);
    assert_close(lw_interp_linear(t, -5), 10, 0);  /* clamped, not extrapolated */
    assert_close(lw_interp_linear(t, 99), 0, 0);
    assert_int_equal(lw_interp_find(t, 1.0), 1);
    assert_int_equal(lw_interp_find(t, 3.0), 1);
    assert_int_equal(lw_interp_direction(t, 0), 0);
    lw_interp_free(t);
}

static void cubic_passes_through_points_and_is_exact_on_lines(void **state)
{
    (void)state;
    const double x[] = {0, 0.5, 2, 3, 7}, y[] = {1, 2, 5, 7, 15}; /* y = 2x + 1 */
    lw_interp *t = mk(x, y, 5);
    for (size_t i = 0; i < 5; i++)
        assert_close(lw_interp_cubic(t, x[i]), y[i], 1e-15);
    for (double u = 0; u <= 7; u += 0.01)
        assert_close(lw_interp_cubic(t, u), 2 * u + 1, 1e-12);
    lw_interp_free(t);
}

/* Fritsch & Carlson (1980): with their slope conditions the interpolant of
 * monotone data is monotone.  The data below have flat stretches and sharp
 * steps, where an ordinary cubic spline overshoots. */
static void cubic_preserves_monotonicity(void **state)
{
    (void)state;
    const double x[] = {0, 1, 2, 3, 4, 5, 6, 7}, y[] = {0, 0, 0.1, 5, 5.1, 5.1, 9, 9};
    lw_interp *t = mk(x, y, 8);
    double prev = -1;
    for (double u = 0; u <= 7; u += 1e-3) {
        double v = lw_interp_cubic(t, u);
        if (v < prev - 1e-15)
            fail_msg("not monotone at %g: %g < %g", u, v, prev);
        assert_true(v >= 0 && v <= 9);
        prev = v;
    }
    lw_interp_free(t);
}

static double max_error_exp(size_t n)
{
    double x[200], y[200];
    for (size_t i = 0; i < n; i++) {
        x[i] = 2.0 * (double)i / (double)(n - 1);
        y[i] = exp(x[i]);
    }
    lw_interp *t = mk(x, y, n);
    double worst = 0;
    for (double u = 0.2; u <= 1.8; u += 1e-3)
        worst = fmax(worst, fabs(lw_interp_cubic(t, u) - exp(u)));
    lw_interp_free(t);
    return worst;
}

/* The monotone cubic with Fritsch-Butland slopes is third-order accurate on
 * smooth data away from the ends: halving h cuts the error about 8-fold (at
 * least 5-fold asserted). */
static void cubic_converges_on_smooth_data(void **state)
{
    (void)state;
    double e1 = max_error_exp(21), e2 = max_error_exp(41);
    if (!(e1 / e2 > 5.0))
        fail_msg("error ratio %g (e1 %g, e2 %g)", e1 / e2, e1, e2);
    assert_true(e2 < 1e-4);
}

static void refuses_bad_tables(void **state)
{
    (void)state;
    lw_error e;
    const double x[] = {0, 1, 1}, y[] = {0, 1, 2};
    lw_error_clear(&e);
    assert_null(lw_interp_new(x, y, 3, &e));
    assert_int_equal(e.code, LW_EINPUT);
    assert_non_null(strstr(e.msg, "point 3"));
    lw_error_clear(&e);
    assert_null(lw_interp_new(x, y, 1, &e));
    assert_int_equal(e.code, LW_EINPUT);
    const double xn[] = {0, NAN}, yn[] = {0, 1};
    lw_error_clear(&e);
    assert_null(lw_interp_new(xn, yn, 2, &e));
    assert_int_equal(e.code, LW_EINPUT);
}

static void reference_counting(void **state)
{
    (void)state;
    const double x[] = {0, 1}, y[] = {3, 1};
    lw_interp *t = mk(x, y, 2);
    assert_ptr_equal(lw_interp_ref(t), t);
    assert_int_equal(t->refs, 2);
    lw_interp_free(t);
    assert_int_equal(t->refs, 1);
    assert_int_equal(lw_interp_direction(t, 1), -1);
    lw_interp_free(t);
    lw_interp_free(NULL);
}

/* The corners of the linear interpolant: a point on the straight line
 * through its neighbours is none (the rounding of a dense resample of a
 * coarse table's own segments included), any other is; the first corner
 * above x is found by bisection and is +inf past the last. */
static void corners_are_the_bends_of_the_line(void **state)
{
    (void)state;
    /* two segments, 0..2 rising by 1 per unit, 2..4 falling; 1 and 3 on them */
    const double x[] = {0, 1, 2, 3, 4}, y[] = {0, 1, 2, 1.5, 1};
    lw_interp *t = mk(x, y, 5);
    assert_int_equal(t->ncorner, 1);
    assert_int_equal(t->corner[0], 2);
    assert_true(lw_interp_corner_above(t, 0.0) == 2.0);
    assert_true(lw_interp_corner_above(t, 1.999) == 2.0);
    assert_true(isinf(lw_interp_corner_above(t, 2.0)));
    lw_interp_free(t);
    /* 2,001 points on the straight segments of a 3-point table, each value
     * computed (and rounded) on its own: the only corner is the knot */
    enum { N = 2001 };
    static double xs[N], ys[N];
    for (int i = 0; i < N; i++) {
        xs[i] = i / (double)(N - 1);
        ys[i] = xs[i] <= 0.5 ? 4.2 - 0.7 * xs[i] : 3.85 - 1.9 * (xs[i] - 0.5);
    }
    t = mk(xs, ys, N);
    assert_int_equal(t->ncorner, 1);
    assert_true(xs[t->corner[0]] == 0.5);
    lw_interp_free(t);
    /* a bend of 1e-9 relative is a corner, however slight */
    const double x3[] = {0, 1, 2}, y3[] = {1, 1 + 1e-9, 1};
    t = mk(x3, y3, 3);
    assert_int_equal(t->ncorner, 1);
    lw_interp_free(t);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(linear_interpolates_and_clamps),
        cmocka_unit_test(cubic_passes_through_points_and_is_exact_on_lines),
        cmocka_unit_test(cubic_preserves_monotonicity),
        cmocka_unit_test(cubic_converges_on_smooth_data),
        cmocka_unit_test(refuses_bad_tables),
        cmocka_unit_test(reference_counting),
        cmocka_unit_test(corners_are_the_bends_of_the_line),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
