/*
 * test_drives.c - regulated drives, PWM and storage: linear-cc, converter,
 * duty cycle, self-discharge and standby drain, each against a published
 * law or an independent reference, and energy conservation for every drive.
 */
#include "testutil.h"
#include <gsl/gsl_poly.h>
#include "lights.h"

static void constant_led(lw_light *l, double vf)
{
    l->led.model = LW_LED_CONSTANT;
    l->led.forward_v = vf;
}

static void expect_conservation(const lw_result *r)
{
    /* drawn = LED + resistors + internal + driver, to 1e-9 */
    assert_close(r->energy_drawn_wh,
                 r->energy_led_wh + r->energy_resistor_wh + r->energy_internal_wh +
                     r->energy_driver_wh,
                 1e-9);
}

/* linear-cc in regulation on a flat cell: the current is the set current
 * all the way, so the runtime is charge / current (Coulomb counting), all
 * of it in regulation. */
static void linear_cc_coulomb_counting(void **state)
{
    (void)state;
    lw_light l;
    base_light(&l);
    flat_cell(&l, 4.0, 0.2, 2.0, 0.4, 1.0, 2.0);
    constant_led(&l, 3.0);
    l.led.strings = 2;
    l.drive.type = LW_DRIVE_LINEAR_CC;
    l.drive.set_a = 0.050;
    l.drive.dropout_v = 0.3;
    lw_result r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_CAPACITY);
    assert_close(r.runtime_h, 2.0 / (2 * 0.050), 1e-12);
    assert_close(r.regulated_h, r.runtime_h, 1e-12);
    expect_conservation(&r);
    lw_light_clear(&l);
}

/* Three sloping cells, two strings of a 2.9-V constant LED, each held at
 * 50 mA by a linear regulator with 0.25 V of dropout and 2 ohm in series
 * (invented test data). */
static void linear_cc_light(lw_light *l)
{
    base_light(l);
    sloping_cell(l);
    l->pack.series = 3;
    constant_led(l, 2.9);
    l->led.strings = 2;
    l->drive.type = LW_DRIVE_LINEAR_CC;
    l->drive.set_a = 0.050;
    l->drive.dropout_v = 0.25;
    l->drive.resistor_ohm = 2.0;
}

/* Regulator dissipation by Kirchhoff's voltage law: per string the
 * regulator drops E - I (Rs + M r) - N Vf, and dissipates that times I. */
static void linear_cc_dissipation_kvl(void **state)
{
    (void)state;
    lw_light l;
    linear_cc_light(&l);
    lw_error e;
    lw_error_clear(&e);
    bool saw_sat = false, saw_reg = false;
    for (double d = 0; d <= 1.0; d += 0.02) {
        lw_point p;
        assert_int_equal(lw_light_point(&l, d, false, &p, &e), LW_OK);
        double e_v = 3 * p.ocv_v, r_share = 3 * 2 * p.r_cell_ohm;
        double drop = e_v - p.led_a * (2.0 + r_share) - 2.9;
        assert_close(p.p_drv_w, 2 * p.led_a * drop, 1e-9);
        if (p.regime == LW_REGIME_REGULATED) {
            saw_reg = true;
            assert_close(p.led_a, 0.050, 0);
            assert_true(drop >= 0.25 - 1e-12);
        } else if (p.led_a > 0) {
            saw_sat = true;
            assert_close(drop, 0.25, 1e-9); /* saturated: exactly the dropout */
        }
    }
    assert_true(saw_reg && saw_sat);
    lw_result r = run_ok(&l, false);
    assert_true(r.regulated_h > 0 && r.regulated_h < r.runtime_h);
    expect_conservation(&r);
    lw_light_clear(&l);
}

/* A linear regulator's dissipation against its rating: the peak per string
 * is the one at switch-on (the most headroom: fresh cells), by Kirchhoff's
 * voltage law (E - I (R_s + R_share) - V_f) I; above regulator_rating_w the
 * run warns, below it not; with [thermal] the rating is derated to the
 * body's temperature (full to 70 C, zero at 155 C: common practice, no
 * source), so a hot body warns at a power the bare rating allows. */
static void linear_regulator_rating(void **state)
{
    (void)state;
    lw_light l;
    linear_cc_light(&l);
    lw_light_update_factors(&l, NULL);
    lw_result r = run_ok(&l, false);
    const lw_point *p = &r.initial;
    double e_v = 3 * p->ocv_v, r_share = 3 * 2 * p->r_cell_ohm;
    double want = (e_v - 0.05 * (2.0 + r_share) - 2.9) * 0.05;
    assert_close(r.peak_regulator_w, want, 1e-9);
    assert_close(r.peak_regulator_derated_w, want, 1e-12);
    assert_int_equal(r.warnings & LW_WARN_REGULATOR_HOT, 0); /* no rating given */
    lw_run_result_clear(&r);
    l.drive.regulator_rating_w = 0.9 * want;
    r = run_ok(&l, false);
    assert_true(r.warnings & LW_WARN_REGULATOR_HOT);
    lw_run_result_clear(&r);
    l.drive.regulator_rating_w = 1.1 * want;
    r = run_ok(&l, false);
    assert_int_equal(r.warnings & LW_WARN_REGULATOR_HOT, 0);
    lw_run_result_clear(&r);
    /* a body at steady state above 70 C (an invented poor heat path in a
     * 60 C ambient): the same rating is not enough */
    l.pack.ambient_c = 60;
    l.thermal = (lw_thermal){.enabled = true, .r_jb_k_w = 10, .r_ha_k_w = 120,
                             .losses_in_body = true, .max_touch_c = 200,
                             .foldback_from_c = NAN, .foldback_min = 1};
    l.led.heat_fraction = 0.65;
    lw_light_update_factors(&l, NULL);
    r = run_ok(&l, false);
    assert_true(r.peak_body_c > 70.0);
    assert_true(r.peak_regulator_derated_w > r.peak_regulator_w * 1.001);
    l.drive.regulator_rating_w = 1.05 * r.peak_regulator_w;
    lw_run_result_clear(&r);
    r = run_ok(&l, false);
    assert_true(r.warnings & LW_WARN_REGULATOR_HOT);
    lw_run_result_clear(&r);
    lw_light_clear(&l);
}

/* The converter's pack current against GSL's gsl_poly_solve_quadratic on
 * R Ip^2 - (E + R Iq) Ip + (E Iq + P) = 0 (smaller root), and no real root
 * beyond the discriminant condition (E + R Iq)^2 = 4 R (E Iq + P). */
static void converter_quadratic_against_gsl(void **state)
{
    (void)state;
    const double es[] = {3.0, 4.5, 7.4}, rs[] = {0.05, 0.4, 2.0}, iqs[] = {0, 60e-6, 1e-3},
                 ps[] = {0.1, 0.5, 1.0};
    for (size_t a = 0; a < 3; a++)
        for (size_t b = 0; b < 3; b++)
            for (size_t c = 0; c < 3; c++)
                for (size_t d = 0; d < 3; d++) {
                    double e_v = es[a], r = rs[b], iq = iqs[c], p = ps[d];
                    double x0, x1, ip;
                    int n = gsl_poly_solve_quadratic(r, -(e_v + r * iq), e_v * iq + p, &x0, &x1);
                    bool ok = lw_drive_converter_input_current(e_v, r, iq, p, &ip);
                    assert_int_equal(ok, n == 2);
                    if (ok)
                        assert_close(ip, fmin(x0, x1), 1e-12);
                }
    /* at the published discriminant condition, from both sides */
    double e_v = 3.0, r = 1.0, pmax = e_v * e_v / (4 * r), ip;
    assert_true(lw_drive_converter_input_current(e_v, r, 0, pmax * (1 - 1e-9), &ip));
    assert_close(ip, e_v / (2 * r), 1e-4);
    assert_false(lw_drive_converter_input_current(e_v, r, 0, pmax * (1 + 1e-9), &ip));
}

static void converter_light(lw_light *l, double fallback_a)
{
    base_light(l);
    sloping_cell(l);
    l->pack.series = 2;
    /* a deliberately weak pack so that the converter drops out */
    for (size_t i = 0; i < l->pack.cell.res->n; i++)
        l->pack.cell.res->y[i] *= 6.0;
    constant_led(l, 3.0);
    l->drive.type = LW_DRIVE_CONVERTER;
    l->drive.set_a = 0.3;
    l->drive.efficiency_pct = 85;
    l->drive.quiescent_a = 100e-6;
    l->drive.min_input_v = 1.0;
    l->drive.fallback_a = fallback_a;
    l->cutoff.cell_v = 0.3;
}

/* Input power = output power / efficiency + quiescent draw at every point
 * (the converter model), and energy conservation; the run ends exactly at
 * the dropout (discriminant zero or undervoltage). */
static void converter_power_balance_and_dropout(void **state)
{
    (void)state;
    lw_light l;
    converter_light(&l, 0.0);
    lw_error e;
    lw_error_clear(&e);
    for (double d = 0; d <= 0.6; d += 0.05) {
        lw_point p;
        assert_int_equal(lw_light_point(&l, d, false, &p, &e), LW_OK);
        if (p.regime == LW_REGIME_DROPOUT)
            continue;
        double p_in = p.p_drawn_w - p.p_int_w; /* at the converter's input */
        assert_close(p_in, p.p_led_w / 0.85 + p.pack_v * 100e-6, 1e-12);
    }
    lw_result r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_DRIVER_DROPOUT);
    assert_near(r.final.regulation_margin, 0.0, 1e-9);
    assert_close(r.regulated_h, r.runtime_h, 1e-12);
    expect_conservation(&r);
    /* with a fallback level the run goes on past the dropout */
    lw_light f;
    converter_light(&f, 0.02);
    f.cutoff.relative_pct = 1; /* let the fallback run to its own end */
    lw_result rf = run_ok(&f, false);
    assert_true(rf.runtime_h > r.runtime_h);
    assert_close(rf.regulated_h, r.runtime_h, 1e-9);
    expect_conservation(&rf);
    lw_light_clear(&f);
    lw_light_clear(&l);
}

/* An efficiency table against input voltage: the converter runs where
 * P_in = P_out / eta(V_in) + V_in I_q (power balance, by definition of
 * efficiency). */
static void converter_efficiency_table(void **state)
{
    (void)state;
    lw_light l;
    converter_light(&l, 0.0);
    const double vin[] = {1.0, 2.0, 3.0, 4.0}, eta[] = {70, 80, 88, 90};
    lw_error e;
    lw_error_clear(&e);
    l.drive.efficiency = lw_interp_new(vin, eta, 4, &e);
    assert_non_null(l.drive.efficiency);
    for (double d = 0; d <= 0.1; d += 0.02) {
        lw_point p;
        assert_int_equal(lw_light_point(&l, d, false, &p, &e), LW_OK);
        if (p.regime == LW_REGIME_DROPOUT)
            continue;
        double eta_v = lw_interp_linear(l.drive.efficiency, p.pack_v) / 100.0;
        assert_close(p.p_drawn_w - p.p_int_w, p.p_led_w / eta_v + p.pack_v * 100e-6, 1e-10);
    }
    lw_result r = run_ok(&l, false);
    expect_conservation(&r);
    lw_light_clear(&l);
}

/* A steep, non-monotone efficiency table (8 % in a 50-mV notch, the shape
 * a fuzzer found to make a fixed-point iteration oscillate): at every depth
 * the input voltage is the highest root of the power balance
 * F(V) = V (E - V)/R - V Iq - P/eta(V) (F < 0 everywhere above it), and the
 * run ends in bounded work with energy conserved. */
static void converter_steep_efficiency_notch(void **state)
{
    (void)state;
    lw_light l;
    converter_light(&l, 0.0);
    l.drive.set_a = 0.1;
    const double vin[] = {1.5, 1.55, 3.2}, eta[] = {75, 8, 90};
    lw_error e;
    lw_error_clear(&e);
    l.drive.efficiency = lw_interp_new(vin, eta, 3, &e);
    assert_non_null(l.drive.efficiency);
    int lit = 0;
    for (double d = 0; d <= 1.0; d += 1.0 / 512) {
        lw_point p;
        assert_int_equal(lw_light_point(&l, d, false, &p, &e), LW_OK);
        if (p.regime == LW_REGIME_DROPOUT)
            continue;
        lit++;
        double ev = l.pack.series * p.ocv_v;
        double r = l.pack.series * p.r_cell_ohm / l.pack.parallel;
        double pout = p.p_led_w / (l.drive.duty_pct / 100.0);
        double iq = l.drive.quiescent_a;
        double scale = ev * ev / r;
#define F_AT(v)                                                                                    \
    ((v) * (ev - (v)) / r - (v)*iq - pout / (lw_interp_linear(l.drive.efficiency, (v)) / 100.0))
        assert_near(F_AT(p.pack_v), 0.0, 1e-9 * scale);
        for (int k = 1; k <= 400; k++) {
            double v = p.pack_v + (ev - p.pack_v) * k / 400.0;
            if (F_AT(v) > 1e-9 * scale)
                fail_msg("depth %g: a root above the operating point %g V, at %g V", d,
                         p.pack_v, v);
        }
#undef F_AT
    }
    assert_true(lit > 10);
    lw_result r = run_ok(&l, false);
    assert_true(r.solves < 20000);
    expect_conservation(&r);
    lw_run_result_clear(&r);
    lw_light_clear(&l);
}

/* PWM on a flat cell with a constant-voltage LED: duty D gives D times the
 * light output and 1/D times the runtime (k = 1: Coulomb counting); the
 * peak current is what the rating check sees. */
static void pwm_scales_output_and_runtime(void **state)
{
    (void)state;
    lw_light l;
    base_light(&l);
    flat_cell(&l, 3.0, 0.5, 2.0, 0.4, 1.0, 2.0);
    constant_led(&l, 2.0);
    l.drive.resistor_ohm = 49.5; /* 20 mA peak */
    l.led.max_current_a = 0.019;
    lw_result full = run_ok(&l, false);
    l.drive.duty_pct = 25;
    lw_result pwm = run_ok(&l, false);
    assert_close(pwm.flux_30s_lm, 0.25 * full.flux_30s_lm, 1e-12);
    assert_close(pwm.runtime_h, full.runtime_h / 0.25, 1e-12);
    assert_close(pwm.initial.led_a, 0.020, 1e-12);            /* peak */
    assert_true(pwm.warnings & LW_WARN_LED_OVER_MAX);         /* rated on the peak */
    assert_close(pwm.lumen_hours, full.lumen_hours, 1e-12);   /* same charge, same light */
    expect_conservation(&pwm);
    lw_light_clear(&l);
}

/* Storage: the cell keeps (1 - s/100)^M of its charge after M months at s %
 * a month (compounded monthly on the charge left, as docs/model.md states),
 * less the standby drain; the run starts from there. */
static void stored_run_starting_depth(void **state)
{
    (void)state;
    lw_light l;
    base_light(&l);
    flat_cell(&l, 3.0, 0.5, 2.0, 0.4, 1.0, 2.0);
    constant_led(&l, 2.0);
    l.drive.resistor_ohm = 49.5;
    l.pack.cell.self_discharge_pct_month = 2.0;
    l.pack.stored_months = 12;
    double kept = pow(0.98, 12);
    assert_close(lw_light_stored_depth(&l), 1.0 - kept, 1e-12);
    lw_result r = run_ok(&l, false);
    assert_close(r.start_depth, 1.0 - kept, 1e-12);
    /* during the run the charge left r = 1 - d obeys dr/dt = -I/C - lambda r
     * (self-discharge at the same rate, lambda = -ln(0.98)/730.5 h): a linear
     * ODE whose exact solution reaches r = 0 at t = ln(1 + r0/a)/lambda with
     * a = I/(C lambda) */
    double lambda = -log(0.98) / 730.5, a = 0.020 / (2.0 * lambda);
    assert_close(lw_cell_self_discharge_per_h(&l.pack.cell), lambda, 1e-15);
    assert_close(r.runtime_h, log(1.0 + kept / a) / lambda, 1e-9);
    /* standby drain of 10 uA for the same 12 months, two cells in parallel */
    l.drive.standby_a = 10e-6;
    l.pack.parallel = 2;
    double drained = 10e-6 * 12 * 730.5 / (2 * 2.0);
    assert_close(lw_light_stored_depth(&l), 1.0 - kept + drained, 1e-12);
    /* nothing left after enough years */
    l.pack.stored_months = 600;
    assert_close(lw_light_stored_depth(&l), 1.0, 0);
    lw_light_clear(&l);
}

/* Energy conservation for every drive type on a sloping cell. */
static void energy_conserved_for_every_drive(void **state)
{
    (void)state;
    for (int t = 0; t < 4; t++) {
        lw_light l;
        base_light(&l);
        sloping_cell(&l);
        l.pack.series = 3;
        l.led.model = LW_LED_SHOCKLEY;
        l.led.ideality = 3.0;
        l.led.saturation_a = 4.6e-18;
        l.led.series_ohm = 1.5;
        l.led.junction_c = 25;
        l.led.strings = 2;
        l.drive.resistor_ohm = 33;
        if (t == 1) {
            l.drive.type = LW_DRIVE_LINEAR_CC;
            l.drive.resistor_ohm = 1.0;
            l.drive.set_a = 0.05;
            l.drive.dropout_v = 0.25;
        } else if (t == 2) {
            l.drive.type = LW_DRIVE_CONVERTER;
            l.drive.resistor_ohm = 0;
            l.drive.set_a = 0.05;
            l.drive.efficiency_pct = 85;
            l.drive.quiescent_a = 60e-6;
            l.drive.min_input_v = 2.5;
            l.drive.fallback_a = 0.005;
        } else if (t == 3) {
            l.drive.duty_pct = 40;
        }
        lw_result r = run_ok(&l, false);
        expect_conservation(&r);
        assert_true(r.runtime_h > 0);
        lw_light_clear(&l);
    }
}

/* Exact integral of a piecewise-linear table from a to b (trapezoids). */
static double table_integral(const lw_interp *t, double a, double b)
{
    double sum = 0.0;
    for (size_t i = 0; i + 1 < t->n; i++) {
        double x0 = fmax(a, t->x[i]), x1 = fmin(b, t->x[i + 1]);
        if (x1 <= x0)
            continue;
        sum += 0.5 * (x1 - x0) * (lw_interp_linear(t, x0) + lw_interp_linear(t, x1));
    }
    return sum;
}

/* Charge conservation (Kirchhoff): every ampere-hour the drive draws moves
 * the depth, so with k = 1 and no self-discharge the energy drawn from the
 * cells' EMF is S P C k_T times the integral of OCV over the depths
 * discharged, for every drive type, with and without PWM (an identity of
 * the model: E = S OCV, I_pack = P Ic, dd/dt = Ic / (k_T C)). */
static void energy_drawn_equals_charge_times_ocv(void **state)
{
    (void)state;
    for (int t = 0; t < 3; t++)
        for (int pwm = 0; pwm < 2; pwm++) {
            lw_light l;
            base_light(&l);
            sloping_cell(&l);
            l.pack.cell.peukert = 1.0;
            l.pack.cell.max_capacity_ah = l.pack.cell.capacity_ah;
            l.pack.series = 3;
            l.pack.parallel = 2;
            l.cap_factor = 0.9;
            constant_led(&l, 2.9);
            l.led.strings = 2;
            l.cutoff.cell_v = 0.5;
            l.cutoff.relative_pct = 1;
            l.drive.duty_pct = pwm ? 30 : 100;
            if (t == 0) {
                l.drive.resistor_ohm = 10;
            } else if (t == 1) {
                l.drive.type = LW_DRIVE_LINEAR_CC;
                l.drive.set_a = 0.05;
                l.drive.dropout_v = 0.25;
            } else {
                l.drive.type = LW_DRIVE_CONVERTER;
                l.drive.set_a = 0.05;
                l.drive.efficiency_pct = 85;
                l.drive.quiescent_a = 2e-3; /* large, so that its share shows */
                l.drive.min_input_v = 2.0;
            }
            lw_result r = run_ok(&l, false);
            double want = 3 * 2 * 0.9 * 2.3 *
                          table_integral(l.pack.cell.ocv, r.start_depth, r.end_depth);
            assert_close(r.energy_drawn_wh, want, 1e-9);
            expect_conservation(&r);
            lw_light_clear(&l);
        }
}

/* A converter at duty D: the LED output and the drawn power are D times the
 * on-state values, but the controller's quiescent current flows all the
 * time, so the pack's average current is D Ip + (1 - D) Iq. */
static void converter_pwm_keeps_quiescent_draw(void **state)
{
    (void)state;
    lw_light l;
    base_light(&l);
    flat_cell(&l, 4.0, 0.2, 2.0, 0.4, 1.0, 2.0);
    constant_led(&l, 3.0);
    l.drive.type = LW_DRIVE_CONVERTER;
    l.drive.set_a = 0.1;
    l.drive.efficiency_pct = 80;
    l.drive.quiescent_a = 1e-3;
    lw_error e;
    lw_error_clear(&e);
    lw_point on, pw;
    assert_int_equal(lw_light_point(&l, 0.5, false, &on, &e), LW_OK);
    l.drive.duty_pct = 30;
    assert_int_equal(lw_light_point(&l, 0.5, false, &pw, &e), LW_OK);
    assert_close(pw.pack_a, on.pack_a, 1e-15); /* the on-state current */
    assert_close(pw.pack_avg_a, 0.3 * on.pack_a + 0.7 * 1e-3, 1e-14);
    assert_close(pw.p_led_w, 0.3 * on.p_led_w, 1e-14);
    assert_close(pw.flux_lm, 0.3 * on.flux_lm, 1e-14);
    /* Coulomb counting on the flat cell: runtime = C / average current */
    lw_result r = run_ok(&l, false);
    assert_close(r.runtime_h, 2.0 / pw.pack_avg_a, 1e-12);
    lw_light_clear(&l);
}

/* A converter whose undervoltage lockout is above the fresh pack voltage
 * cannot start: without a fallback level the light never lights; with one
 * it runs at the fallback level from switch-on. */
static void converter_below_lockout_at_switch_on(void **state)
{
    (void)state;
    lw_light l;
    converter_light(&l, 0.0);
    l.drive.min_input_v = 3.3; /* the fresh pair gives 3.16 V open circuit */
    lw_result r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_NEVER_LIT);
    assert_true(r.runtime_h == 0.0);
    l.drive.fallback_a = 0.02;
    r = run_ok(&l, false);
    assert_int_equal(r.initial.regime, LW_REGIME_FALLBACK);
    assert_close(r.initial.led_a, 0.02, 0);
    assert_true(r.runtime_h > 0);
    assert_true(!(r.regulated_h > 0)); /* never at the set level */
    lw_light_clear(&l);
}

/* At a power-limit dropout the run reports the last operating point the
 * driver held: still regulated at the set current, its loaded cell voltage
 * by Ohm's law from its own current. */
static void dropout_reports_last_held_point(void **state)
{
    (void)state;
    lw_light l;
    converter_light(&l, 0.0);
    l.drive.min_input_v = 0.5; /* the power limit ends it, not the lockout */
    lw_result r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_DRIVER_DROPOUT);
    assert_int_equal(r.final.regime, LW_REGIME_REGULATED);
    assert_close(r.final.led_a, 0.3, 0);
    assert_close(r.final.cell_v, r.final.ocv_v - r.final.cell_a * r.final.r_cell_ohm, 1e-14);
    assert_near(r.final.regulation_margin, 0.0, 1e-9);
    assert_close(r.final.depth, r.end_depth, 1e-9);
    lw_light_clear(&l);
}

/* Time to half is the first time the output is at or below 50 % of the
 * reference while the light is on, a jump included: a fallback step to 10 %
 * sets it at the step; a fallback below the relative cutoff sets it at the
 * step that ends the run; a dropout to dark never does. */
static void time_to_half_at_jumps(void **state)
{
    (void)state;
    lw_light l;
    converter_light(&l, 0.03); /* 10 % of the set level */
    l.cutoff.relative_pct = 5;
    lw_result r = run_ok(&l, false);
    assert_true(r.runtime_h > r.regulated_h);
    assert_close(r.time_to_half_h, r.regulated_h, 1e-12);
    l.drive.fallback_a = 0.009; /* 3 %: below the 5 % cutoff */
    r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_RELATIVE);
    assert_close(r.time_to_half_h, r.runtime_h, 1e-12);
    l.drive.fallback_a = 0;
    r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_DRIVER_DROPOUT);
    assert_true(isnan(r.time_to_half_h));
    lw_light_clear(&l);
}

/* Sign checks of LED heating at one operating point (docs/model.md, "LED
 * temperature"; common practice, no source): a hotter junction lowers the
 * forward voltage, so through a resistor the current rises; a regulated
 * drive holds its current and only the output falls. */
static void heating_raises_resistor_current_and_lowers_regulated_output(void **state)
{
    (void)state;
    for (int drive = 0; drive < 3; drive++) {
        lw_light l;
        base_light(&l);
        flat_cell(&l, 4.0, 0.1, 2.0, 0.4, 1.0, 2.0);
        l.led.model = LW_LED_LINEAR;
        l.led.threshold_v = 2.7;
        l.led.slope_ohm = 1.5;
        l.led.junction_c = 25;
        l.led.tc_forward_v_k = -2e-3;
        l.led.tc_flux_per_k = -0.3e-2;
        l.drive.resistor_ohm = 4.7;
        if (drive == 1) {
            l.drive.type = LW_DRIVE_LINEAR_CC;
            l.drive.set_a = 0.1;
            l.drive.dropout_v = 0.2;
        } else if (drive == 2) {
            l.drive.type = LW_DRIVE_CONVERTER;
            l.drive.set_a = 0.1;
            l.drive.efficiency_pct = 85;
            l.drive.resistor_ohm = 0;
        }
        lw_error e;
        lw_error_clear(&e);
        lw_point cold, hot;
        l.led.t_junction_c = 25;
        assert_int_equal(lw_light_point(&l, 0.1, false, &cold, &e), LW_OK);
        l.led.t_junction_c = 75;
        assert_int_equal(lw_light_point(&l, 0.1, false, &hot, &e), LW_OK);
        assert_true(hot.led_v < cold.led_v);
        if (drive == 0) {
            assert_true(hot.led_a > cold.led_a);
        } else {
            assert_close(hot.led_a, cold.led_a, 1e-12);
            assert_close(hot.flux_lm / cold.flux_lm, 1 - 0.3e-2 * 50, 1e-12);
            assert_close(hot.led_v - cold.led_v, -2e-3 * 50, 1e-9);
        }
        lw_light_clear(&l);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(linear_cc_coulomb_counting),
        cmocka_unit_test(heating_raises_resistor_current_and_lowers_regulated_output),
        cmocka_unit_test(linear_cc_dissipation_kvl),
        cmocka_unit_test(linear_regulator_rating),
        cmocka_unit_test(converter_quadratic_against_gsl),
        cmocka_unit_test(converter_power_balance_and_dropout),
        cmocka_unit_test(converter_efficiency_table),
        cmocka_unit_test(converter_steep_efficiency_notch),
        cmocka_unit_test(pwm_scales_output_and_runtime),
        cmocka_unit_test(stored_run_starting_depth),
        cmocka_unit_test(energy_conserved_for_every_drive),
        cmocka_unit_test(energy_drawn_equals_charge_times_ocv),
        cmocka_unit_test(converter_pwm_keeps_quiescent_draw),
        cmocka_unit_test(converter_below_lockout_at_switch_on),
        cmocka_unit_test(dropout_reports_last_held_point),
        cmocka_unit_test(time_to_half_at_jumps),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
