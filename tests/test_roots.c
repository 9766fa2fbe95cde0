/*
 * test_roots.c - Wright omega and Brent's method against published values
 * and GSL.
 */
#include "testutil.h"
#include <gsl/gsl_errno.h>
#include "gslref.h"
#include <gsl/gsl_sf_lambert.h>
#include <lampwick/lampwick.h>

/* REFERENCES.md check value 2: omega(-2..2) from reference-library
 * documentation [checked]. */
static void wright_omega_published_values(void **state)
{
    (void)state;
    assert_close(lw_root_wright_omega(-2), 0.12002824, 5e-8);
    assert_close(lw_root_wright_omega(-1), 0.27846454, 5e-8);
    assert_close(lw_root_wright_omega(0), 0.56714329, 5e-8);
    assert_close(lw_root_wright_omega(1), 1.0, 1e-15);
    assert_close(lw_root_wright_omega(2), 1.5571456, 5e-8);
}

/* Independent reference: GSL's gsl_sf_lambert_W0(e^x) where e^x does not
 * overflow; beyond, the defining identity w + ln w = x. */
static void wright_omega_against_gsl_and_identity(void **state)
{
    (void)state;
    for (double x = -60; x <= 700; x += 0.37) {
        double w = lw_root_wright_omega(x);
        double ref = gsl_sf_lambert_W0(exp(x));
        assert_close(w, ref, 1e-13);
    }
    /* GSL 2.7's W0 loses accuracy below about e^-80 (and returns 0 at e^-100); there the
     * defining identity is the reference */
    for (double x = -700; x < -60; x += 1.3) {
        double w = lw_root_wright_omega(x);
        assert_close(w + log(w), x, 1e-14);
    }
    for (double x = 710; x < 1e8; x *= 1.7) {
        double w = lw_root_wright_omega(x);
        assert_close(w + log(w), x, 1e-15);
    }
    assert_true(lw_root_wright_omega(-800) == 0.0);
    assert_close(lw_root_wright_omega(-50), exp(-50), 1e-15);
}

static double cubic_fn(double x, void *ctx)
{
    (void)ctx;
    return x * x * x - 2 * x - 5; /* Wallis's example; root 2.0945514815423265 */
}

static double gsl_cubic(double x, void *p)
{
    return cubic_fn(x, p);
}

/* Brent's method against GSL's gsl_root_fsolver_brent on the same function. */
static void brent_against_gsl(void **state)
{
    (void)state;
    lw_error e;
    lw_error_clear(&e);
    double r = 0;
    assert_int_equal(lw_root_brent(cubic_fn, NULL, 2, 3, cubic_fn(2, NULL), cubic_fn(3, NULL),
                                   1e-14, 100, &r, &e),
                     LW_OK);
    double ref = gsl_brent(gsl_cubic, NULL, 2, 3, 1e-15, 0);
    assert_close(r, ref, 1e-13);
    assert_close(r, 2.0945514815423265, 1e-13);
}

static void brent_refuses_no_bracket_and_caps_iterations(void **state)
{
    (void)state;
    lw_error e;
    lw_error_clear(&e);
    double r = 42;
    assert_int_equal(lw_root_brent(cubic_fn, NULL, 3, 4, cubic_fn(3, NULL), cubic_fn(4, NULL),
                                   1e-12, 100, &r, &e),
                     LW_EINPUT);
    assert_close(r, 42, 0);
    lw_error_clear(&e);
    assert_int_equal(lw_root_brent(cubic_fn, NULL, 2, 3, cubic_fn(2, NULL), cubic_fn(3, NULL),
                                   1e-300, 2, &r, &e),
                     LW_ENUMERIC);
    assert_non_null(strstr(e.msg, "no convergence"));
}

/* The omega with its logarithm: w the same as lw_root_wright_omega, and
 * ln w from the iteration within 1e-14 absolute of libm's log (so flux and
 * Peukert powers taken from it agree to rounding). */
static void wright_omega_log_matches_log(void **state)
{
    (void)state;
    for (double x = -700; x < 1e6; x = x < 0 ? x + 3.1 : (x + 1.0) * 1.3) {
        double lw, w = lw_root_wright_omega_log(x, &lw);
        assert_true(w == lw_root_wright_omega(x));
        if (w > 0.0 && fabs(lw - log(w)) > 1e-14 * fmax(1.0, fabs(log(w))))
            fail_msg("x %g: ln w %.17g against %.17g", x, lw, log(w));
    }
}

/* The rough logarithm: within 1.3e-5 absolute of libm's log from 1e-300
 * to 1e300 (four terms of the series ln x = 2 atanh t, t = (x - 1)/(x + 1),
 * Abramowitz and Stegun ch. 4 - the equation number from memory; with
 * |t| <= 1/3 the first term left out is 2 t^9 / 9 <= 1.1e-5). */
static void rough_log_is_close(void **state)
{
    (void)state;
    double worst = 0.0;
    for (double x = 1e-300; x < 1e300; x *= 1.0137)
        worst = fmax(worst, fabs(lw_root_rough_log(x) - log(x)));
    for (double x = 0.5; x < 4.0; x += 1e-4)
        worst = fmax(worst, fabs(lw_root_rough_log(x) - log(x)));
    assert_true(worst <= 1.3e-5);
    assert_true(worst > 1e-9); /* rough, as documented: not libm in disguise */
}

int main(void)
{
    gsl_set_error_handler_off();
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(wright_omega_published_values),
        cmocka_unit_test(wright_omega_against_gsl_and_identity),
        cmocka_unit_test(brent_against_gsl),
        cmocka_unit_test(brent_refuses_no_bracket_and_caps_iterations),
        cmocka_unit_test(wright_omega_log_matches_log),
        cmocka_unit_test(rough_log_is_close),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
