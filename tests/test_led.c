/*
 * test_led.c - LED models and the series-loop solution, against the
 * published closed form, GSL, and Kirchhoff's voltage law.
 */
#include "testutil.h"
#include <gsl/gsl_errno.h>
#include "gslref.h"
#include <gsl/gsl_sf_lambert.h>
#include <lampwick/lampwick.h>

static lw_led base_led(lw_led_model m)
{
    lw_led led;
    memset(&led, 0, sizeof led);
    led.model = m;
    led.count = 1;
    led.strings = 1;
    led.v_scale = 1;
    led.flux_lm = 10;
    led.flux_current_a = 0.02;
    led.flux_exponent = 1;
    return led;
}

/* Junction temperature at which k*T/q equals a given thermal voltage. */
static double junction_for_vt(double vt)
{
    return vt * LW_ELEMENTARY_C / LW_BOLTZMANN_J_K - 273.15;
}

/* REFERENCES.md check value 1 [checked]: diode + resistor, E = 0.9 V,
 * Is = 25 fA, n = 1, Vt = 1.38e-23*298/1.6e-19 V, R = 249.3 ohm ->
 * I = 1.08485 mA (Banwell & Jayakumar's closed form, published worked example
 * of a general-purpose maths library). */
static void shockley_published_example(void **state)
{
    (void)state;
    lw_led led = base_led(LW_LED_SHOCKLEY);
    led.ideality = 1;
    led.saturation_a = 25e-15;
    led.junction_c = junction_for_vt(1.38e-23 * 298 / 1.6e-19);
    lw_error e;
    lw_error_clear(&e);
    double i = 0;
    assert_int_equal(lw_led_solve(&led, 0.9, 249.3, &i, NULL, &e), LW_OK);
    assert_close(i * 1e3, 1.08485, 5e-6);
}

struct diode {
    double e, r, a, is, rs;
};

static double diode_residual(double i, void *p)
{
    const struct diode *d = p;
    return d->e - i * d->r - d->a * log1p(i / d->is) - d->rs * i;
}

/* Against GSL: the same loop solved with gsl_sf_lambert_W0 (Banwell &
 * Jayakumar's formula written directly) and with GSL's Brent root finder on
 * Kirchhoff's voltage law. */
static void shockley_against_gsl(void **state)
{
    (void)state;
    const double ns[] = {1.0, 2.0, 3.5}, iss[] = {1e-12, 1e-15, 4.6e-18},
                 rs[] = {0.0, 1.5, 10.0}, rr[] = {0.5, 33.0, 470.0}, es[] = {2.0, 3.3, 4.7};
    for (size_t a = 0; a < 3; a++)
        for (size_t b = 0; b < 3; b++)
            for (size_t c = 0; c < 3; c++) {
                lw_led led = base_led(LW_LED_SHOCKLEY);
                led.ideality = ns[a];
                led.saturation_a = iss[a];
                led.series_ohm = rs[b];
                led.junction_c = 25;
                double vt = lw_led_thermal_voltage(25), nvt = ns[a] * vt;
                lw_error e;
                lw_error_clear(&e);
                double i = 0;
                assert_int_equal(lw_led_solve(&led, es[c], rr[b], &i, NULL, &e), LW_OK);
                double rt = rr[b] + rs[b];
                double arg = iss[a] * rt / nvt * exp((es[c] + iss[a] * rt) / nvt);
                if (isfinite(arg)) {
                    double ref = nvt / rt * gsl_sf_lambert_W0(arg) - iss[a];
                    assert_close(i, ref, 1e-11);
                }
                struct diode d = {es[c], rr[b], nvt, iss[a], rs[b]};
                assert_close(i, gsl_brent(diode_residual, &d, 0, es[c] / rt, 0, 1e-14), 1e-11);
                /* Kirchhoff's voltage law at the solution */
                assert_near(es[c] - i * rr[b] - lw_led_voltage(&led, i, NULL), 0.0,
                            1e-12 * es[c]);
            }
}

/* With no resistance at all the closed form's limit is the diode equation. */
static void shockley_zero_resistance_limit(void **state)
{
    (void)state;
    lw_led led = base_led(LW_LED_SHOCKLEY);
    led.ideality = 2;
    led.saturation_a = 1e-12;
    led.junction_c = 25;
    lw_error e;
    lw_error_clear(&e);
    double i = 0, vt = lw_led_thermal_voltage(25);
    assert_int_equal(lw_led_solve(&led, 1.0, 0.0, &i, NULL, &e), LW_OK);
    assert_close(i, 1e-12 * expm1(1.0 / (2 * vt)), 1e-13);
    /* and it meets the tiny-resistance closed form continuously */
    double i2 = 0;
    assert_int_equal(lw_led_solve(&led, 1.0, 1e-9, &i2, NULL, &e), LW_OK);
    assert_close(i2, i, 1e-6);
}

/* Common practice, no source: the series resistor for a constant-Vf LED is
 * R = (E - Vf)/I; at the minimum resistor (E - Vf)/I_max the LED sits
 * exactly at I_max, and any larger resistor keeps it below. */
static void constant_model_minimum_resistor(void **state)
{
    (void)state;
    lw_led led = base_led(LW_LED_CONSTANT);
    led.forward_v = 2.0;
    const double e_v = 5.0, imax = 0.020;
    double r_min = (e_v - led.forward_v) / imax; /* 150 ohm */
    lw_error err;
    lw_error_clear(&err);
    double i = 0;
    assert_int_equal(lw_led_solve(&led, e_v, r_min, &i, NULL, &err), LW_OK);
    assert_close(i, imax, 1e-15);
    assert_int_equal(lw_led_solve(&led, e_v, 1.1 * r_min, &i, NULL, &err), LW_OK);
    assert_true(i < imax);
    assert_int_equal(lw_led_solve(&led, 1.9, 100, &i, NULL, &err), LW_OK);
    assert_true(i == 0.0); /* below the forward voltage: dark */
    lw_error_clear(&err);
    assert_int_equal(lw_led_solve(&led, 5, 0, &i, NULL, &err), LW_EINPUT);
}

/* Linear model: Ohm's law with the threshold, I = (E - N Vth)/(R + N Rd). */
static void linear_model_closed_form(void **state)
{
    (void)state;
    lw_led led = base_led(LW_LED_LINEAR);
    led.count = 3;
    led.threshold_v = 2.6;
    led.slope_ohm = 4;
    lw_error e;
    lw_error_clear(&e);
    double i = 0;
    assert_int_equal(lw_led_solve(&led, 12.0, 47, &i, NULL, &e), LW_OK);
    assert_close(i, (12.0 - 3 * 2.6) / (47 + 3 * 4), 1e-15);
    assert_near(12.0 - 47 * i - 3 * lw_led_voltage(&led, i, NULL), 0, 1e-14);
}

static double table_residual(double i, void *p)
{
    const lw_led *led = p;
    return 3.7 - 2.2 * i - lw_led_voltage(led, i, NULL);
}

/* Table model: the safeguarded solver against GSL's Brent on the same
 * interpolated curve; extrapolation is flagged. */
static void table_model_against_gsl(void **state)
{
    (void)state;
    const double ia[] = {0.01, 0.05, 0.1, 0.2, 0.3, 0.5}, v[] = {2.62, 2.76, 2.84, 2.95, 3.03,
                                                                   3.16};
    lw_error e;
    lw_error_clear(&e);
    lw_led led = base_led(LW_LED_TABLE);
    led.iv = lw_interp_new(ia, v, 6, &e);
    double i = 0;
    bool ext = false;
    assert_int_equal(lw_led_solve(&led, 3.7, 2.2, &i, &ext, &e), LW_OK);
    assert_false(ext);
    assert_close(i, gsl_brent(table_residual, &led, 0, 3.7 / 2.2, 0, 1e-14), 1e-10);
    /* a stiff supply pushes the current past the table: flagged */
    assert_int_equal(lw_led_solve(&led, 4.2, 0.5, &i, &ext, &e), LW_OK);
    assert_true(ext);
    assert_true(i > 0.5);
    /* below the first voltage: dark */
    assert_int_equal(lw_led_solve(&led, 2.5, 1.0, &i, &ext, &e), LW_OK);
    assert_true(i == 0.0);
    lw_led_clear(&led);
}

static void flux_models(void **state)
{
    (void)state;
    lw_led led = base_led(LW_LED_CONSTANT);
    led.flux_exponent = 0.9;
    assert_close(lw_led_flux(&led, 0.02, NULL), 10, 1e-15);
    assert_close(lw_led_flux(&led, 0.04, NULL), 10 * pow(2, 0.9), 1e-14);
    assert_true(lw_led_flux(&led, 0, NULL) == 0);
    const double ia[] = {0, 0.1, 0.2}, lm[] = {0, 15, 28};
    lw_error e;
    lw_error_clear(&e);
    led.flux = lw_interp_new(ia, lm, 3, &e);
    bool ext = false;
    assert_close(lw_led_flux(&led, 0.1, &ext), 15, 1e-15);
    assert_false(ext);
    assert_close(lw_led_flux(&led, 0.3, &ext), 28 + 13, 1e-12); /* last slope */
    assert_true(ext);
    lw_led_clear(&led);
}

/* k and q are exact in the 2019 SI; k T / q at 25 C = 25.693 mV. */
static void thermal_voltage(void **state)
{
    (void)state;
    assert_close(lw_led_thermal_voltage(25), 1.380649e-23 * 298.15 / 1.602176634e-19, 1e-15);
    assert_close(lw_led_thermal_voltage(25), 0.025693, 1e-4);
}

/* LED temperature, the model of docs/model.md ("LED temperature"): at a
 * junction dT above the data's, every model's forward voltage moves by
 * exactly tc * dT (with a typical white-LED coefficient, -2 mV/K, and
 * -0.3 %/K of output, ../shared/REFERENCES.md, from memory), the output by
 * the factor 1 + tc_flux * dT, and the loop solution equals the cold one
 * with the supply shifted by N * tc * dT (Kirchhoff's voltage law).  Signs:
 * a hotter junction has a lower forward voltage and less light. */
static void junction_temperature_shifts_voltage_and_output(void **state)
{
    (void)state;
    lw_error e;
    lw_error_clear(&e);
    const double ia[] = {0.01, 0.05, 0.1, 0.2, 0.3, 0.5}, v[] = {2.62, 2.76, 2.84, 2.95, 3.03,
                                                                   3.16};
    for (int m = 0; m < LW_LED_MODEL_COUNT; m++) {
        lw_led led = base_led((lw_led_model)m);
        led.forward_v = 2.9;
        led.threshold_v = 2.6, led.slope_ohm = 1.2;
        led.ideality = 3, led.saturation_a = 1e-18, led.series_ohm = 0.4;
        led.junction_c = 25;
        if (m == LW_LED_TABLE)
            led.iv = lw_interp_new(ia, v, 6, &e);
        led.count = 3;
        led.tc_forward_v_k = -2e-3;
        led.tc_flux_per_k = -0.3e-2;
        led.t_junction_c = 25;
        double v_cold = lw_led_voltage(&led, 0.15, NULL), f_cold = lw_led_flux(&led, 0.15, NULL);
        double i_cold, i_shifted;
        assert_int_equal(lw_led_solve(&led, 9.6 + 3 * 2e-3 * 60, 4.7, &i_shifted, NULL, &e),
                         LW_OK);
        led.t_junction_c = 85; /* 60 K hotter */
        double v_hot = lw_led_voltage(&led, 0.15, NULL), f_hot = lw_led_flux(&led, 0.15, NULL);
        assert_close(v_hot - v_cold, -2e-3 * 60, 1e-9);
        assert_close(f_hot / f_cold, 1 - 0.3e-2 * 60, 1e-13);
        assert_true(v_hot < v_cold && f_hot < f_cold);
        /* hot at 9.6 V = cold at 9.6 V + 3 x 0.12 V */
        double v_at = 0;
        assert_int_equal(lw_led_solve_v(&led, 9.6, 4.7, &i_cold, &v_at, NULL, &e), LW_OK);
        assert_close(i_cold, i_shifted, 1e-12);
        assert_close(9.6 - i_cold * 4.7, 3 * v_at, 1e-12); /* the loop balances */
        /* the output factor stops at zero far above */
        led.t_junction_c = 25 + 1000;
        assert_true(lw_led_flux(&led, 0.15, NULL) == 0.0);
        /* no supply, no current, whatever the shift */
        double i0 = 1;
        assert_int_equal(lw_led_solve(&led, 0.0, 4.7, &i0, NULL, &e), LW_OK);
        assert_true(i0 == 0.0);
        lw_led_clear(&led);
    }
}

int main(void)
{
    gsl_set_error_handler_off();
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(shockley_published_example),
        cmocka_unit_test(shockley_against_gsl),
        cmocka_unit_test(shockley_zero_resistance_limit),
        cmocka_unit_test(constant_model_minimum_resistor),
        cmocka_unit_test(linear_model_closed_form),
        cmocka_unit_test(table_model_against_gsl),
        cmocka_unit_test(flux_models),
        cmocka_unit_test(thermal_voltage),
        cmocka_unit_test(junction_temperature_shifts_voltage_and_output),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
