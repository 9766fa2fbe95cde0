/* Tests of the quadrature module: the rules' nodes and weights against
 * GSL's and the closed forms, their degree of exactness, the Legendre
 * series of the interpolant against GSL's Legendre polynomials, and the
 * error estimate against integrals known in closed form. */
#include <math.h>
#include <stdbool.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <cmocka.h>
#include <gsl/gsl_integration.h>
#include <gsl/gsl_sf_legendre.h>

#include "lampwick/quadrature.h"

/* The Gauss-Legendre rules against GSL's fixed-order tables (GSL,
 * gsl_integration_glfixed: its nodes and weights, tabulated to 30 digits
 * or computed by Newton's method on P_n). */
static void gauss_rules_match_gsl(void **state)
{
    (void)state;
    for (int n = 1; n <= LW_QUAD_GAUSS_MAX; n++) {
        const lw_quad_rule *r = lw_quad_gauss(n);
        assert_int_equal(r->n, n);
        gsl_integration_glfixed_table *t = gsl_integration_glfixed_table_alloc((size_t)n);
        assert_non_null(t);
        for (int i = 0; i < n; i++) {
            double xi, wi;
            assert_int_equal(gsl_integration_glfixed_point(-1.0, 1.0, (size_t)i, &xi, &wi, t), 0);
            /* GSL lists them ascending too */
            assert_true(fabs(r->x[i] - xi) <= 4e-16);
            assert_true(fabs(r->w[i] - wi) <= 4e-16 * wi + 1e-17);
        }
        gsl_integration_glfixed_table_free(t);
    }
}

/* The Lobatto rules: ends at -1 and 1, interior nodes the roots of
 * P'_{n-1}, weights 2 / (n (n - 1) P_{n-1}(x_j)^2) (Abramowitz and Stegun
 * 25.4.32), P and P' from GSL (gsl_sf_legendre_Pl_deriv_array); and the
 * five-node rule's closed form: nodes 0, +-sqrt(3/7), +-1, weights 32/45,
 * 49/90, 1/10 (the same formula worked by hand). */
static void lobatto_rules_match_their_definition(void **state)
{
    (void)state;
    double p[LW_QUAD_LOBATTO_MAX + 1], dp[LW_QUAD_LOBATTO_MAX + 1];
    for (int n = 3; n <= LW_QUAD_LOBATTO_MAX; n++) {
        const lw_quad_rule *r = lw_quad_lobatto(n);
        assert_int_equal(r->n, n);
        assert_true(r->x[0] == -1.0 && r->x[n - 1] == 1.0);
        double sum = 0.0;
        for (int j = 0; j < n; j++) {
            assert_int_equal(gsl_sf_legendre_Pl_deriv_array(n - 1, r->x[j], p, dp), 0);
            if (j > 0 && j < n - 1) {
                assert_true(r->x[j] > r->x[j - 1]);
                /* P'_{n-1} vanishes there: to rounding of its size n^2 / 2 */
                assert_true(fabs(dp[n - 1]) <= 1e-14 * n * n);
            }
            double w = 2.0 / (n * (n - 1.0) * p[n - 1] * p[n - 1]);
            assert_true(fabs(r->w[j] - w) <= 4e-15 * w + 1e-17);
            sum += r->w[j];
        }
        assert_true(fabs(sum - 2.0) <= 1e-14);
    }
    const lw_quad_rule *r5 = lw_quad_lobatto(5);
    const double x5[] = {-1.0, -sqrt(3.0 / 7.0), 0.0, sqrt(3.0 / 7.0), 1.0};
    const double w5[] = {1.0 / 10, 49.0 / 90, 32.0 / 45, 49.0 / 90, 1.0 / 10};
    for (int j = 0; j < 5; j++) {
        assert_true(fabs(r5->x[j] - x5[j]) <= 2e-16);
        assert_true(fabs(r5->w[j] - w5[j]) <= 2e-16);
    }
}

/* Each rule integrates x^k over [-1, 1] exactly (2/(k + 1) for even k, 0
 * for odd) up to its degree, 2n - 1 (Gauss) or 2n - 3 (Lobatto), and
 * misses x^(degree + 1) by the remainder term (Abramowitz and Stegun
 * 25.4.29: R = 2^(2n+1) (n!)^4 / ((2n+1) ((2n)!)^3) f^(2n); 25.4.32:
 * R = -n (n-1)^3 2^(2n-1) ((n-2)!)^4 / ((2n-1) ((2n-2)!)^3) f^(2n-2);
 * the integral is the rule's sum plus R, and f^(D+1) of x^(D+1) is
 * (D+1)!). */
static double rule_remainder(int n, bool lobatto)
{
    if (!lobatto)
        return pow(2.0, 2 * n + 1) * pow(tgamma(n + 1.0), 4) /
               ((2 * n + 1) * pow(tgamma(2 * n + 1.0), 2));
    return -n * pow(n - 1.0, 3) * pow(2.0, 2 * n - 1) * pow(tgamma(n - 1.0), 4) /
           ((2 * n - 1) * pow(tgamma(2 * n - 1.0), 2));
}

static void rules_are_exact_to_their_degree(void **state)
{
    (void)state;
    for (int lob = 0; lob < 2; lob++)
        for (int n = lob ? 3 : 1; n <= 16; n++) {
            const lw_quad_rule *r = lob ? lw_quad_lobatto(n) : lw_quad_gauss(n);
            int deg = lw_quad_degree(r);
            assert_int_equal(deg, lob ? 2 * n - 3 : 2 * n - 1);
            for (int k = 0; k <= deg + 1; k++) {
                double f[LW_QUAD_LOBATTO_MAX];
                for (int j = 0; j < n; j++)
                    f[j] = pow(r->x[j], k);
                double got = lw_quad_sum(r, f, 1), want = k % 2 ? 0.0 : 2.0 / (k + 1);
                if (k <= deg) {
                    assert_true(fabs(got - want) <= 1e-14);
                } else {
                    double rem = rule_remainder(n, lob);
                    assert_true(fabs(want - got - rem) <= 1e-9 * fabs(rem) + 2e-15);
                    assert_true(rem != 0.0);
                }
            }
        }
}

/* The Legendre coefficients of the interpolant: P_k sampled at the nodes
 * (GSL gsl_sf_legendre_Pl) gives the k-th unit vector for every k < n, the
 * Lobatto rules' last coefficient included; and the many-function form
 * agrees with the one-function form. */
static void legendre_coefficients_of_legendre_polynomials(void **state)
{
    (void)state;
    for (int lob = 0; lob < 2; lob++)
        for (int n = lob ? 3 : 1; n <= 16; n++) {
            const lw_quad_rule *r = lob ? lw_quad_lobatto(n) : lw_quad_gauss(n);
            for (int k = 0; k < n; k++) {
                double f[16], a[16], fm[16 * 2], am[16 * 2], sums[2];
                for (int j = 0; j < n; j++) {
                    f[j] = gsl_sf_legendre_Pl(k, r->x[j]);
                    fm[j * 2] = f[j];
                    fm[j * 2 + 1] = 3.0 * f[j];
                }
                lw_quad_legendre(r, f, 1, a);
                lw_quad_legendre_many(r, fm, 2, am, sums);
                for (int i = 0; i < n; i++) {
                    assert_true(fabs(a[i] - (i == k ? 1.0 : 0.0)) <= 2e-14);
                    assert_true(fabs(am[i * 2] - a[i]) <= 1e-15);
                    assert_true(fabs(am[i * 2 + 1] - 3.0 * a[i]) <= 4e-15);
                }
                assert_true(fabs(sums[0] - lw_quad_sum(r, f, 1)) <= 1e-15);
            }
        }
}

/* A Legendre series evaluated, differentiated and integrated: P_k and P'_k
 * against GSL (gsl_sf_legendre_Pl_deriv_array); the integral from -1 to x
 * against GSL's 20-point Gauss rule on [-1, x] (exact for these degrees);
 * and the root of P_7 against GSL's Gauss nodes (the roots of P_n). */
static void legendre_series_against_gsl(void **state)
{
    (void)state;
    const double a[] = {0.3, -1.1, 0.7, 0.25, -0.4, 0.05, 0.02, -0.01};
    const int n = 8;
    double p[8], dp[8];
    gsl_integration_glfixed_table *t = gsl_integration_glfixed_table_alloc(20);
    for (double x = -1.0; x <= 1.0; x += 0.125) {
        assert_int_equal(gsl_sf_legendre_Pl_deriv_array(n - 1, x, p, dp), 0);
        double want = 0.0, dwant = 0.0;
        for (int k = 0; k < n; k++)
            want += a[k] * p[k], dwant += a[k] * dp[k];
        double d, got = lw_legendre_eval(a, n, x, &d);
        assert_true(fabs(got - want) <= 1e-14);
        assert_true(fabs(d - dwant) <= 1e-13);
        double integral = 0.0;
        if (x > -1.0)
            for (size_t i = 0; i < 20; i++) {
                double xi, wi, pi[8];
                assert_int_equal(gsl_integration_glfixed_point(-1.0, x, i, &xi, &wi, t), 0);
                assert_int_equal(gsl_sf_legendre_Pl_array(n - 1, xi, pi), 0);
                for (int k = 0; k < n; k++)
                    integral += wi * a[k] * pi[k];
            }
        assert_true(fabs(lw_legendre_integral(a, n, x) - integral) <= 1e-14);
    }
    gsl_integration_glfixed_table_free(t);
    /* P_7 = the unit vector e_7: its roots are the 7-point Gauss nodes */
    const double e7[8] = {0, 0, 0, 0, 0, 0, 0, 1};
    gsl_integration_glfixed_table *t7 = gsl_integration_glfixed_table_alloc(7);
    double xi, wi, root;
    assert_int_equal(gsl_integration_glfixed_point(-1.0, 1.0, 5, &xi, &wi, t7), 0);
    assert_true(lw_legendre_root(e7, 8, 0.0, xi - 0.05, xi + 0.05, &root));
    assert_true(fabs(root - xi) <= 1e-15);
    gsl_integration_glfixed_table_free(t7);
    /* no sign change in [lo, hi]: no root */
    assert_false(lw_legendre_root(e7, 8, 0.0, 0.99, 1.0, &root));
}

/* Integrands with integrals over [-1, 1] in closed form (elementary
 * calculus): e^x -> e - 1/e; 1/(1 + 25 x^2) (Runge's function) -> 2/5
 * atan 5; cos 3x -> 2/3 sin 3; 1/(2 - x) -> ln 3; sqrt(x + 1.5) -> 2/3
 * (2.5^1.5 - 0.5^1.5); 1/(1.1 + x)^2 -> 1/0.1 - 1/2.1 (a pole close to the
 * interval). */
typedef double (*fn)(double);
static double f_exp(double x) { return exp(x); }
static double f_runge(double x) { return 1.0 / (1.0 + 25.0 * x * x); }
static double f_cos3(double x) { return cos(3.0 * x); }
static double f_pole2(double x) { return 1.0 / (2.0 - x); }
static double f_sqrt(double x) { return sqrt(x + 1.5); }
static double f_pole11(double x) { return 1.0 / ((1.1 + x) * (1.1 + x)); }

/* The estimate is honest: wherever the coefficients fall (rate below
 * LW_QUAD_RATE_MAX) the rule's true error is within the estimate, and the
 * estimate does not cry wolf by more than a factor 1e4 where the error
 * stands well above rounding (a useful estimate, not a bound on paper). */
static void estimate_is_honest_on_smooth_functions(void **state)
{
    (void)state;
    const fn fs[] = {f_exp, f_runge, f_cos3, f_pole2, f_sqrt, f_pole11};
    const double exact[] = {exp(1.0) - exp(-1.0),
                            0.4 * atan(5.0),
                            2.0 / 3.0 * sin(3.0),
                            log(3.0),
                            2.0 / 3.0 * (pow(2.5, 1.5) - pow(0.5, 1.5)),
                            1.0 / 0.1 - 1.0 / 2.1};
    int judged = 0;
    for (size_t i = 0; i < sizeof fs / sizeof fs[0]; i++)
        for (int n = 4; n <= LW_QUAD_LOBATTO_MAX; n++) {
            const lw_quad_rule *r = lw_quad_lobatto(n);
            double f[LW_QUAD_LOBATTO_MAX], a[LW_QUAD_LOBATTO_MAX], big = 0.0;
            for (int j = 0; j < n; j++) {
                f[j] = fs[i](r->x[j]);
                big = fmax(big, fabs(f[j]));
            }
            lw_quad_legendre(r, f, 1, a);
            lw_quad_estimate est = lw_quad_estimate_error(r, a, 64 * 2.2e-16 * big);
            double err = fabs(lw_quad_sum(r, f, 1) - exact[i]);
            if (!(est.rate < LW_QUAD_RATE_MAX))
                continue; /* not resolved: the estimate is the tail itself */
            judged++;
            if (!(err <= est.error + 1e-14 * fabs(exact[i])))
                fail_msg("function %zu, %d nodes: error %.3g above the estimate %.3g (rate %.3g)",
                         i, n, err, est.error, est.rate);
            if (err > 1e-12 * fabs(exact[i]) && est.error > 1e4 * err)
                fail_msg("function %zu, %d nodes: estimate %.3g against error %.3g", i, n,
                         est.error, err);
        }
    assert_true(judged > 40);
}

/* A polynomial the rule integrates exactly has no error to estimate. */
static void exact_polynomials_estimate_zero(void **state)
{
    (void)state;
    const lw_quad_rule *r = lw_quad_lobatto(6);
    double f[6], a[6];
    for (int j = 0; j < 6; j++)
        f[j] = 1.0 + 2.0 * r->x[j] - 0.5 * r->x[j] * r->x[j];
    lw_quad_legendre(r, f, 1, a);
    lw_quad_estimate est = lw_quad_estimate_error(r, a, 1e-14);
    assert_true(est.error == 0.0 && est.rate == 0.0);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(gauss_rules_match_gsl),
        cmocka_unit_test(lobatto_rules_match_their_definition),
        cmocka_unit_test(rules_are_exact_to_their_degree),
        cmocka_unit_test(legendre_coefficients_of_legendre_polynomials),
        cmocka_unit_test(legendre_series_against_gsl),
        cmocka_unit_test(estimate_is_honest_on_smooth_functions),
        cmocka_unit_test(exact_polynomials_estimate_zero),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
