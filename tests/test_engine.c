/*
 * test_engine.c - the discharge engine against published laws and against
 * an independent GSL solution of the same model.
 *
 * The reference solution below is written from docs/model.md alone: it
 * interpolates the curve itself, solves the loop with GSL's Brent root
 * finder, finds the 30-s point and the cutoff depth with GSL root finders
 * and integrates dt/dd with GSL's adaptive QAGP at 1e-12; nothing of the
 * engine is shared except the lw_light description.
 */
#include "testutil.h"
#include <gsl/gsl_errno.h>
#include <gsl/gsl_integration.h>
#include "gslref.h"
#include "refmodel.h"
#include <lampwick/lampwick.h>

#include "lights.h"

/* ---- Coulomb counting and Peukert's law ---- */

/* Coulomb counting (charge = current x time): a flat cell driving a
 * constant-voltage LED through a resistor draws a constant current I, so it
 * runs C/I hours to full depth, and the lumen-hours are flux x time. */
static void coulomb_counting_flat_cell(void **state)
{
    (void)state;
    lw_light l;
    base_light(&l);
    flat_cell(&l, 3.0, 0.5, 2.0, 0.4, 1.0, 2.0);
    l.led.model = LW_LED_CONSTANT;
    l.led.forward_v = 2.0;
    l.drive.resistor_ohm = 49.5; /* I = (3 - 2)/(49.5 + 0.5) = 20 mA */
    lw_result r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_CAPACITY);
    assert_close(r.initial.led_a, 0.02, 1e-14);
    assert_close(r.runtime_h, 2.0 / 0.02, 1e-12);
    assert_close(r.lumen_hours, 10.0 * 100.0, 1e-12);
    assert_true(r.warnings & LW_WARN_NO_CUTOFF);
    lw_light_clear(&l);
}

/* Peukert's law in its published form t = H (C/(I H))^k for a constant
 * current (W. Peukert, 1897; REFERENCES.md): rated 2 Ah at the 5-h rate
 * (0.4 A), k = 1.15, run at 1 A. */
static void peukert_constant_current(void **state)
{
    (void)state;
    lw_light l;
    base_light(&l);
    flat_cell(&l, 3.0, 0.01, 2.0, 0.4, 1.15, 100.0);
    l.led.model = LW_LED_CONSTANT;
    l.led.forward_v = 2.0;
    l.led.flux_current_a = 1.0;
    l.drive.resistor_ohm = 0.99; /* I = 1 / (0.99 + 0.01) = 1 A */
    lw_result r = run_ok(&l, false);
    double h = 5.0, c = 2.0, i = 1.0;
    assert_close(r.runtime_h, h * pow(c / (i * h), 1.15), 1e-12);
    lw_light_clear(&l);
}

/* ---- identities at every point ---- */

/* Kirchhoff's voltage law around each string at the operating point, and
 * energy conservation over the run: drawn = LED + resistors + internal. */
static void kirchhoff_and_energy_conservation(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    lw_error e;
    lw_error_clear(&e);
    for (double d = 0; d <= 1.0; d += 0.05) {
        lw_point p;
        assert_int_equal(lw_light_point(&l, d, false, &p, &e), LW_OK);
        double e_v = 3 * p.ocv_v;
        double loop = e_v - p.led_a * (33 + 3 * 2 * p.r_cell_ohm / 1) - p.led_v;
        assert_near(loop, 0.0, 1e-12);
        assert_close(p.pack_v, e_v - p.pack_a * 3 * p.r_cell_ohm, 1e-14);
        assert_close(p.p_drawn_w, p.p_led_w + p.p_res_w + p.p_int_w, 1e-12);
    }
    lw_result r = run_ok(&l, false);
    assert_close(r.energy_drawn_wh,
                 r.energy_led_wh + r.energy_resistor_wh + r.energy_internal_wh, 1e-9);
    assert_near(r.energy_driver_wh, 0.0, 0.0);
    lw_light_clear(&l);
}

/* ---- the independent GSL reference ---- */

typedef struct ref {
    const lw_light *l;
    double flux_ref;
    double target;   /* for root finding: flux level or cell voltage */
    int what;        /* 0 time, 1 lumen-hours */
    double d0;       /* for the 30-s search */
} ref;

/* Per-string current from Kirchhoff's law with GSL's Brent solver. */
static double ref_current(const lw_light *l, double d)
{
    const lw_led *led = &l->led;
    double ocv = ref_interp(l->pack.cell.ocv, d), rc = ref_interp(l->pack.cell.res, d);
    double e = l->pack.series * ocv;
    double r = l->drive.resistor_ohm +
               l->pack.series * led->strings * rc / l->pack.parallel;
    ref_loop q = {e, r, led->count * led->ideality * lw_led_thermal_voltage(led->junction_c),
                     led->saturation_a, led->count * led->series_ohm};
    return gsl_brent(ref_loop_residual, &q, 0, e / r, 0, 1e-15);
}

static double ref_flux(const lw_light *l, double i)
{
    const lw_led *led = &l->led;
    return led->count * led->strings * led->flux_lm *
           pow(i / led->flux_current_a, led->flux_exponent);
}

static double ref_dtdd(const lw_light *l, double i)
{
    const lw_cell *c = &l->pack.cell;
    double ic = l->led.strings * i / l->pack.parallel;
    double cap = fmin(c->max_capacity_ah, c->capacity_ah * pow(c->rated_a / ic, c->peukert - 1));
    return cap / ic;
}

static double ref_integrand(double d, void *p)
{
    const ref *q = p;
    double i = ref_current(q->l, d);
    double w = ref_dtdd(q->l, i);
    return q->what == 0 ? w : ref_flux(q->l, i) * w;
}

/* The integral of an integrand over depth [a, b] by GSL's QAGP, with the
 * cell curve's knots as break points (relative 1e-12, or 1e-11 when the
 * integrand holds a nested root). */
static double integral_over(gsl_function F, const lw_light *l, double a, double b, double rel)
{
    const lw_interp *t = l->pack.cell.ocv;
    double pts[64];
    size_t np = 0;
    pts[np++] = a;
    for (size_t i = 0; i < t->n; i++)
        if (t->x[i] > a && t->x[i] < b)
            pts[np++] = t->x[i];
    pts[np++] = b;
    gsl_integration_workspace *w = gsl_integration_workspace_alloc(2000);
    double result = 0, abserr = 0;
    int st = gsl_integration_qagp(&F, pts, np, 0, rel, 2000, w, &result, &abserr);
    gsl_integration_workspace_free(w);
    assert_int_equal(st, GSL_SUCCESS);
    return result;
}

static double ref_integral(const lw_light *l, int what, double a, double b)
{
    ref q = {l, 0, 0, what, 0};
    gsl_function F = {ref_integrand, &q};
    return integral_over(F, l, a, b, 1e-12);
}

static double t_minus_30s(double d, void *p)
{
    const ref *q = p;
    return ref_integral(q->l, 0, 0, d) - 30.0 / 3600.0;
}

static double flux_minus_target(double d, void *p)
{
    const ref *q = p;
    return ref_flux(q->l, ref_current(q->l, d)) - q->target;
}

static double gsl_root(double (*f)(double, void *), void *p, double a, double b)
{
    return gsl_brent(f, p, a, b, 1e-15, 0);
}

/* Runtime, lumen-hours and time to 50 % of an independent GSL solution of
 * the model, to 1e-6 relative (the accuracy target), for several drive settings
 * and a light that ends on the relative-brightness cutoff. */
static void runtime_against_gsl_reference(void **state)
{
    (void)state;
    const double resistors[] = {22, 33, 150};
    for (size_t k = 0; k < 3; k++) {
        lw_light l;
        shockley_demo_light(&l);
        l.drive.resistor_ohm = resistors[k];
        l.cutoff.cell_v = 0.5; /* let the relative cutoff end the run */
        lw_result r = run_ok(&l, false);
        ref q = {&l, 0, 0, 0, 0};
        double d30 = gsl_root(t_minus_30s, &q, 1e-12, 0.01);
        q.flux_ref = ref_flux(&l, ref_current(&l, d30));
        q.target = 0.10 * q.flux_ref;
        double d_end = gsl_root(flux_minus_target, &q, d30, 1.0);
        q.target = 0.5 * q.flux_ref;
        double d_half = gsl_root(flux_minus_target, &q, d30, 1.0);
        assert_int_equal(r.end_reason, LW_END_RELATIVE);
        assert_close(r.flux_ref_lm, q.flux_ref, 1e-9);
        assert_close(r.end_depth, d_end, 1e-9);
        assert_close(r.runtime_h, ref_integral(&l, 0, 0, d_end), 1e-6);
        assert_close(r.lumen_hours, ref_integral(&l, 1, 0, d_end), 1e-6);
        assert_close(r.time_to_half_h, ref_integral(&l, 0, 0, d_half), 1e-6);
        lw_light_clear(&l);
    }
}

/* ---- the independent reference with the LEDs' heating ---- */

/* A heated light's per-string current and junction temperature at depth d,
 * written here from docs/model.md ("LED temperature", "Thermal network")
 * without the library's solvers: the junction temperature is GSL's Brent
 * root of g(T_j) = T_j(heat at T_j) - T_j, the current at each T_j GSL's
 * Brent root of Kirchhoff's loop with every LED's voltage shifted by
 * alpha (T_j - T_ref). */
typedef struct tref {
    const lw_light *l;
    double d, i; /* depth; the current at the last T_j tried */
} tref;

static double tj_residual(double tj, void *p)
{
    tref *q = p;
    const lw_light *l = q->l;
    const lw_led *led = &l->led;
    const lw_thermal *th = &l->thermal;
    double ocv = ref_interp(l->pack.cell.ocv, q->d), rc = ref_interp(l->pack.cell.res, q->d);
    double e = l->pack.series * ocv, r_pack = l->pack.series * rc / l->pack.parallel;
    double r = l->drive.resistor_ohm + led->strings * r_pack;
    double shift = led->tc_forward_v_k * (tj - led->junction_c);
    ref_loop lp = {e - led->count * shift, r,
                      led->count * led->ideality * lw_led_thermal_voltage(led->junction_c),
                      led->saturation_a, led->count * led->series_ohm};
    double i = gsl_brent(ref_loop_residual, &lp, 0, e / r, 0, 1e-15);
    q->i = i;
    double v = (e - i * r) / led->count; /* per LED, Kirchhoff */
    double q_led_one = led->heat_fraction * v * i;
    double q_led = led->count * led->strings * q_led_one;
    double ip = led->strings * i;
    double q_other = led->strings * i * i * l->drive.resistor_ohm + ip * ip * r_pack;
    double t_body = l->pack.ambient_c + th->r_ha_k_w * (q_led + q_other);
    double t_board = t_body + th->r_bb_k_w * q_led;
    return t_board + th->r_jb_k_w * q_led_one - tj;
}

static double tref_solve(const lw_light *l, double d, double *i)
{
    tref q = {l, d, 0};
    double tj = gsl_brent(tj_residual, &q, l->pack.ambient_c, l->pack.ambient_c + 400, 1e-12,
                          0);
    tj_residual(tj, &q);
    *i = q.i;
    return tj;
}

static double tref_flux(const lw_light *l, double d)
{
    double i, tj = tref_solve(l, d, &i);
    double k = fmax(0.0, 1.0 + l->led.tc_flux_per_k * (tj - l->led.junction_c));
    return k * ref_flux(l, i);
}

static double tref_integrand(double d, void *p)
{
    const ref *q = p;
    double i;
    double tj = tref_solve(q->l, d, &i);
    double w = ref_dtdd(q->l, i);
    double k = fmax(0.0, 1.0 + q->l->led.tc_flux_per_k * (tj - q->l->led.junction_c));
    return q->what == 0 ? w : k * ref_flux(q->l, i) * w;
}

static double tref_integral(const lw_light *l, int what, double a, double b)
{
    ref q = {l, 0, 0, what, 0};
    gsl_function F = {tref_integrand, &q};
    return integral_over(F, l, a, b, 1e-11);
}

static double tref_t_minus_30s(double d, void *p)
{
    const ref *q = p;
    return tref_integral(q->l, 0, 0, d) - 30.0 / 3600.0;
}

static double tref_flux_minus_target(double d, void *p)
{
    const ref *q = p;
    return tref_flux(q->l, d) - q->target;
}

/* The demo light with its LEDs heating at steady state (a [thermal]
 * network without heat capacities, on the depth quadrature): runtime,
 * lumen-hours and time to 50 % within 1e-6 of the independent solution
 * above (GSL's QAGP over GSL Brent roots), the 30-s output and the end
 * depth within 1e-9, and the hottest junction - at switch-on, where a
 * resistor light draws most - within 1e-9 K. */
static void heated_light_against_gsl_reference(void **state)
{
    (void)state;
    const double r_ha[] = {25.0, 60.0};
    for (size_t k = 0; k < 2; k++) {
        lw_light l;
        shockley_demo_light(&l);
        l.cutoff.cell_v = 0.5;
        l.led.tc_forward_v_k = -2e-3;
        l.led.tc_flux_per_k = -0.3e-2;
        l.led.heat_fraction = 0.65;
        l.thermal = (lw_thermal){.enabled = true, .r_jb_k_w = 40, .r_bb_k_w = 15,
                                 .r_ha_k_w = r_ha[k], .losses_in_body = true,
                                 .max_touch_c = 48};
        lw_light_update_factors(&l, NULL);
        lw_result r = run_ok(&l, false);
        ref q = {&l, 0, 0, 0, 0};
        double d30 = gsl_brent(tref_t_minus_30s, &q, 1e-12, 0.01, 1e-15, 0);
        q.flux_ref = tref_flux(&l, d30);
        q.target = 0.10 * q.flux_ref;
        double d_end = gsl_brent(tref_flux_minus_target, &q, d30, 1.0, 1e-15, 0);
        q.target = 0.5 * q.flux_ref;
        double d_half = gsl_brent(tref_flux_minus_target, &q, d30, 1.0, 1e-15, 0);
        assert_int_equal(r.end_reason, LW_END_RELATIVE);
        assert_close(r.flux_ref_lm, q.flux_ref, 1e-9);
        assert_close(r.end_depth, d_end, 1e-9);
        assert_close(r.runtime_h, tref_integral(&l, 0, 0, d_end), 1e-6);
        assert_close(r.lumen_hours, tref_integral(&l, 1, 0, d_end), 1e-6);
        assert_close(r.time_to_half_h, tref_integral(&l, 0, 0, d_half), 1e-6);
        double i0;
        assert_near(r.peak_junction_c, tref_solve(&l, 0.0, &i0), 1e-9);
        assert_true(r.peak_junction_c > l.pack.ambient_c + 5); /* the heating is real */
        lw_light_clear(&l);
    }
}

/* The 30-s reference solves t(d) = 30 s exactly (Newton on the run's own
 * quadrature), not by a trapezoid estimate: on a light whose first 30 s
 * take a large share of a short run, the depth and the output there agree
 * with GSL's root of the QAGP time integral to 1e-11. */
static void thirty_second_point_is_exact(void **state)
{
    (void)state;
    const double resistors[] = {2.0, 10.0};
    for (size_t k = 0; k < 2; k++) {
        lw_light l;
        shockley_demo_light(&l);
        l.pack.cell.capacity_ah = 0.02; /* a run of minutes */
        l.pack.cell.max_capacity_ah = 0.025;
        l.drive.resistor_ohm = resistors[k];
        l.cutoff.cell_v = 0.5;
        lw_result r = run_ok(&l, false);
        ref q = {&l, 0, 0, 0, 0};
        double d30 = gsl_brent(t_minus_30s, &q, 1e-12, 0.9, 1e-16, 1e-14);
        assert_true(d30 > 0.02); /* a large share of the run */
        assert_close(r.depth_30s, d30, 1e-11);
        assert_close(r.flux_30s_lm, ref_flux(&l, ref_current(&l, d30)), 1e-11);
        assert_close(r.flux_ref_lm, r.flux_30s_lm, 0);
        lw_light_clear(&l);
    }
}

/* Same, ending on the loaded cell voltage: the end depth solves
 * OCV(d) - Ic R(d) = cutoff, found here with GSL. */
static double cellv_minus_cutoff(double d, void *p)
{
    const ref *q = p;
    const lw_light *l = q->l;
    double i = ref_current(l, d);
    double ic = l->led.strings * i / l->pack.parallel;
    return ref_interp(l->pack.cell.ocv, d) - ic * ref_interp(l->pack.cell.res, d) - q->target;
}

static void cell_voltage_end_against_gsl(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    l.drive.resistor_ohm = 10;
    l.cutoff.relative_pct = 1;
    l.cutoff.cell_v = 1.1;
    lw_result r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_CELL_VOLTAGE);
    ref q = {&l, 0, 1.1, 0, 0};
    double d_end = gsl_root(cellv_minus_cutoff, &q, 0.0, 1.0);
    assert_close(r.end_depth, d_end, 1e-9);
    assert_close(r.final.cell_v, 1.1, 1e-9);
    assert_close(r.runtime_h, ref_integral(&l, 0, 0, d_end), 1e-6);
    lw_light_clear(&l);
}

/* The end is located exactly (root finding), not at a step edge. */
static void cutoff_located_exactly(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    l.cutoff.cell_v = 0.5;
    lw_result r = run_ok(&l, false);
    assert_close(r.final.flux_lm, 0.1 * r.flux_ref_lm, 1e-9);
    assert_true(isfinite(r.time_to_half_h));
    assert_true(r.time_to_half_h < r.runtime_h);
    lw_light_clear(&l);
}

static void never_lit(void **state)
{
    (void)state;
    lw_light l;
    base_light(&l);
    flat_cell(&l, 3.0, 0.5, 2.0, 0.4, 1.0, 2.0);
    l.led.model = LW_LED_CONSTANT;
    l.led.forward_v = 3.2; /* above the cell's open-circuit voltage */
    l.drive.resistor_ohm = 10;
    lw_result r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_NEVER_LIT);
    assert_true(r.runtime_h == 0.0);
    assert_true(r.warnings & LW_WARN_NEVER_LIT);
    assert_true(r.solves < 10);
    lw_light_clear(&l);
}

/* A densely measured LED (500 knots of I-V and flux from the demo's
 * Shockley LED) runs, and agrees with the closed-form LED it samples to the
 * interpolation error: the current crosses several knots between nodes, so
 * each crossing must restart from the located knot, not from the node. */
static void dense_led_table_runs(void **state)
{
    (void)state;
    lw_light sh;
    shockley_demo_light(&sh);
    sh.cutoff.cell_v = 0.5;
    lw_result want = run_ok(&sh, false);
    enum { NK = 500 };
    double ia[NK], va[NK], fa[NK];
    for (int k = 0; k < NK; k++) {
        ia[k] = 1e-4 * pow(2000.0, (double)k / (NK - 1)); /* 0.1 to 200 mA */
        va[k] = lw_led_voltage(&sh.led, ia[k], NULL);
        fa[k] = lw_led_flux(&sh.led, ia[k], NULL);
    }
    lw_light l;
    shockley_demo_light(&l);
    l.cutoff.cell_v = 0.5;
    lw_error e;
    lw_error_clear(&e);
    l.led.model = LW_LED_TABLE;
    l.led.iv = lw_interp_new(ia, va, NK, &e);
    l.led.flux = lw_interp_new(ia, fa, NK, &e);
    assert_non_null(l.led.iv);
    assert_non_null(l.led.flux);
    lw_result r = run_ok(&l, false);
    assert_int_equal(r.end_reason, want.end_reason);
    assert_close(r.runtime_h, want.runtime_h, 1e-5);
    assert_close(r.lumen_hours, want.lumen_hours, 1e-5);
    assert_close(r.flux_30s_lm, want.flux_30s_lm, 1e-5);
    lw_light_clear(&l);
    lw_light_clear(&sh);
}

/* No light at switch-on is an end of its own, not a result: cells emptied
 * by storage, and a pack already at its end point under the load. */
static void dark_at_switch_on(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    l.pack.cell.self_discharge_pct_month = 5;
    l.pack.stored_months = 600; /* fifty years on the shelf */
    lw_result r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_EMPTY_AT_START);
    assert_true(lw_run_end_is_dark(r.end_reason));
    assert_true(r.runtime_h == 0.0 && isnan(r.flux_30s_lm) && isnan(r.time_to_half_h));
    l.pack.stored_months = 0;
    l.cutoff.cell_v = 1.57; /* the loaded cell starts below its end point */
    r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_EMPTY_AT_START);
    l.cutoff.cell_v = 0.9;
    l.cutoff.flux_lm = 1000; /* far above the light's output */
    r = run_ok(&l, false);
    assert_int_equal(r.end_reason, LW_END_DIM_AT_START);
    assert_true(lw_run_end_is_dark(r.end_reason));
    lw_light_clear(&l);
}

/* With cutoff.reference = fresh the relative cutoff and the 50 % mark refer
 * to the 30-s output of the same light with fresh cells at 20 C: after
 * storage the light starts dimmer than that reference and so ends sooner
 * than against its own output; fresh and at 20 C both references agree. */
static void fresh_reference_shows_storage(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    l.cutoff.cell_v = 0.5;
    lw_result fresh = run_ok(&l, false);
    l.cutoff.reference = LW_REF_FRESH;
    lw_result same = run_ok(&l, false);
    assert_close(same.flux_ref_lm, fresh.flux_30s_lm, 1e-12);
    assert_close(same.runtime_h, fresh.runtime_h, 1e-12);
    l.pack.cell.self_discharge_pct_month = 2;
    l.cutoff.reference = LW_REF_OWN;
    fresh = run_ok(&l, false); /* the same cells unstored */
    l.cutoff.reference = LW_REF_FRESH;
    l.pack.stored_months = 24;
    lw_result stored_fresh = run_ok(&l, false);
    l.cutoff.reference = LW_REF_OWN;
    lw_result stored_own = run_ok(&l, false);
    assert_close(stored_fresh.flux_ref_lm, fresh.flux_30s_lm, 1e-9);
    assert_true(stored_own.flux_ref_lm < fresh.flux_30s_lm);
    assert_true(stored_fresh.runtime_h < stored_own.runtime_h);
    assert_true(stored_fresh.time_to_half_h < stored_own.time_to_half_h);
    assert_close(stored_fresh.final.flux_lm, 0.1 * fresh.flux_30s_lm, 1e-9);
    lw_light_clear(&l);
}

/* Below the visibility floor (LW_VISIBLE_LM) a light counts as never lit,
 * however long its cells would last. */
static void below_visibility_is_never_lit(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    l.led.count = 3; /* three LEDs in series on 4.7 V: a faint glow */
    lw_result r = run_ok(&l, false);
    assert_true(r.initial.flux_lm > 0 && r.initial.flux_lm < LW_VISIBLE_LM);
    assert_int_equal(r.end_reason, LW_END_NEVER_LIT);
    lw_light_clear(&l);
}

static void trace_is_dense_monotone_and_ends_at_cutoff(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    lw_result r = run_ok(&l, true);
    lw_trace tr;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_trace_build(&l, &r, 200, &tr, &e), LW_OK);
    assert_true(tr.n >= 200);
    for (size_t i = 1; i < tr.n; i++) {
        assert_true(tr.rows[i].t_h > tr.rows[i - 1].t_h);
        assert_true(tr.rows[i].pt.depth > tr.rows[i - 1].pt.depth);
    }
    assert_close(tr.rows[tr.n - 1].t_h, r.runtime_h, 0);
    assert_close(tr.rows[tr.n - 1].pt.depth, r.end_depth, 0);
    /* the second-to-last row's time is an independent sum of pieces */
    assert_true(tr.rows[tr.n - 2].t_h < r.runtime_h);
    lw_trace_clear(&tr);
    lw_run_result_clear(&r);
    lw_light_clear(&l);
}

static void warnings_fire(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    l.led.max_current_a = 0.055; /* nominal ~53 mA, worst case above */
    l.drive.rating_w = 0.125;    /* ~94 mW is above half of it */
    l.drive.tolerance_pct = 5;
    lw_result r = run_ok(&l, false);
    assert_false(r.warnings & LW_WARN_LED_OVER_MAX);
    assert_true(r.warnings & LW_WARN_LED_OVER_MAX_WORST);
    assert_true(r.warnings & LW_WARN_RESISTOR_HOT);
    assert_true(r.worst_led_a > r.initial.led_a);
    /* worst case by hand: OCV at its top, the lowest R on the curve, resistor
     * at -5 %, forward voltage at -5 %: must exceed the nominal current */
    l.pack.cell.chemistry = LW_CHEM_LI_ION;
    l.cutoff.cell_v = 0.8; /* below the cell's 0.9 V end point */
    r = run_ok(&l, false);
    assert_true(r.warnings & LW_WARN_OVER_DISCHARGE);
    lw_light_clear(&l);
}

/* Tolerances and caps come from the caller and are checked. */
static void run_options_are_validated(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    lw_run_options o = lw_run_options_default();
    lw_result r;
    lw_error e;
    o.rtol = 0;
    lw_error_clear(&e);
    assert_int_equal(lw_run(&l, &o, &r, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "rtol"));
    o = lw_run_options_default();
    o.max_halvings = 99;
    lw_error_clear(&e);
    assert_int_equal(lw_run(&l, &o, &r, &e), LW_EINPUT);
    /* a looser tolerance still meets the documented accuracy of the default */
    o = lw_run_options_default();
    lw_result tight = run_ok(&l, false);
    o.rtol = 1e-6;
    lw_error_clear(&e);
    assert_int_equal(lw_run(&l, &o, &r, &e), LW_OK);
    assert_close(r.runtime_h, tight.runtime_h, 1e-6);
    assert_true(r.solves <= tight.solves);
    lw_light_clear(&l);
}

/* Solve count stays within "a few hundred" on a curve of ten points. */
static void solve_budget(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    lw_result r = run_ok(&l, false);
    assert_true(r.solves > 50);
    assert_true(r.solves < 600);
    lw_light_clear(&l);
}

/* The per-run work cap: a run that would need more solves than allowed
 * stops with LW_ENUMERIC at the cap, saying where (never a hang). */
static void work_cap_stops_a_run(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    lw_result full = run_ok(&l, false);
    lw_run_options o = lw_run_options_default();
    o.max_solves = (int)(full.solves / 2);
    lw_result r;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_run(&l, &o, &r, &e), LW_ENUMERIC);
    assert_non_null(strstr(e.msg, "operating-point solves near depth"));
    lw_run_result_clear(&r);
    o.max_solves = (int)full.solves; /* exactly enough */
    lw_error_clear(&e);
    assert_int_equal(lw_run(&l, &o, &r, &e), LW_OK);
    assert_close(r.runtime_h, full.runtime_h, 0);
    lw_run_result_clear(&r);
    lw_run_result_clear(&full);
    lw_light_clear(&l);
}

/* The tolerance steers the error and the cost: against the independent
 * GSL solution above (QAGP at 1e-12 over GSL Brent roots), the runtime and
 * lumen-hours at rtol 1e-4, 1e-6, 1e-8 and 1e-10 lie within that rtol, and
 * each tighter rtol costs more solves than the looser one before it. */
static void tolerance_steers_error_and_cost(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    l.drive.resistor_ohm = 33;
    l.cutoff.cell_v = 0.5;
    ref q = {&l, 0, 0, 0, 0};
    double d30 = gsl_root(t_minus_30s, &q, 1e-12, 0.01);
    q.flux_ref = ref_flux(&l, ref_current(&l, d30));
    q.target = 0.10 * q.flux_ref;
    double d_end = gsl_root(flux_minus_target, &q, d30, 1.0);
    double t_ref = ref_integral(&l, 0, 0, d_end), lmh_ref = ref_integral(&l, 1, 0, d_end);
    const double rtols[] = {1e-4, 1e-6, 1e-8, 1e-10};
    int prev = 0;
    for (size_t k = 0; k < sizeof rtols / sizeof rtols[0]; k++) {
        lw_run_options o = lw_run_options_default();
        o.rtol = rtols[k];
        lw_result r;
        lw_error e;
        lw_error_clear(&e);
        assert_int_equal(lw_run(&l, &o, &r, &e), LW_OK);
        double err = fmax(fabs(r.runtime_h / t_ref - 1.0), fabs(r.lumen_hours / lmh_ref - 1.0));
        if (!(err <= rtols[k]))
            fail_msg("rtol %g: error %.3g", rtols[k], err);
        if (!(r.solves > prev))
            fail_msg("rtol %g: %d solves, no more than %d at the looser one", rtols[k],
                     r.solves, prev);
        prev = r.solves;
        lw_run_result_clear(&r);
    }
    lw_light_clear(&l);
}

/* A cell curve resampled at 5,000 points on its own straight segments is
 * the same model: the same runtime and lumen-hours (to 1e-12, the pieces
 * differing only in where they are cut), at a cost within 1.5x of the
 * coarse curve's solves (the pieces end only at its corners). */
static void dense_straight_curve_costs_as_the_coarse(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    lw_result coarse = run_ok(&l, false);
    const lw_interp *o = l.pack.cell.ocv, *rs = l.pack.cell.res;
    enum { N = 5000 };
    static double x[N + 64], yo[N + 64], yr[N + 64];
    size_t k = 0, j = 0;
    for (size_t i = 0; i < N; i++) {
        double u = o->x[0] + (o->x[o->n - 1] - o->x[0]) * (double)i / (N - 1);
        while (j < o->n && o->x[j] <= u) { /* the coarse points themselves */
            if (k == 0 || o->x[j] > x[k - 1])
                x[k] = o->x[j], yo[k] = o->y[j], yr[k] = rs->y[j], k++;
            j++;
        }
        if (k > 0 && !(u > x[k - 1]))
            continue;
        x[k] = u, yo[k] = lw_interp_linear(o, u), yr[k] = lw_interp_linear(rs, u), k++;
    }
    lw_error e;
    lw_error_clear(&e);
    lw_light d;
    lw_light_copy(&d, &l);
    lw_interp_free(d.pack.cell.ocv);
    lw_interp_free(d.pack.cell.res);
    d.pack.cell.ocv = lw_interp_new(x, yo, k, &e);
    d.pack.cell.res = lw_interp_new(x, yr, k, &e);
    assert_non_null(d.pack.cell.ocv);
    assert_non_null(d.pack.cell.res);
    assert_int_equal(d.pack.cell.ocv->ncorner, o->ncorner);
    lw_result dense = run_ok(&d, false);
    assert_close(dense.runtime_h, coarse.runtime_h, 1e-12);
    assert_close(dense.lumen_hours, coarse.lumen_hours, 1e-12);
    if (!(dense.solves <= 1.5 * coarse.solves))
        fail_msg("%d solves on 5,000 points against %d on %zu", dense.solves, coarse.solves,
                 o->n);
    lw_run_result_clear(&dense);
    lw_run_result_clear(&coarse);
    lw_light_clear(&d);
    lw_light_clear(&l);
}

int main(void)
{
    gsl_set_error_handler_off();
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(coulomb_counting_flat_cell),
        cmocka_unit_test(peukert_constant_current),
        cmocka_unit_test(kirchhoff_and_energy_conservation),
        cmocka_unit_test(runtime_against_gsl_reference),
        cmocka_unit_test(heated_light_against_gsl_reference),
        cmocka_unit_test(cell_voltage_end_against_gsl),
        cmocka_unit_test(thirty_second_point_is_exact),
        cmocka_unit_test(cutoff_located_exactly),
        cmocka_unit_test(never_lit),
        cmocka_unit_test(dense_led_table_runs),
        cmocka_unit_test(dark_at_switch_on),
        cmocka_unit_test(below_visibility_is_never_lit),
        cmocka_unit_test(fresh_reference_shows_storage),
        cmocka_unit_test(trace_is_dense_monotone_and_ends_at_cutoff),
        cmocka_unit_test(warnings_fire),
        cmocka_unit_test(run_options_are_validated),
        cmocka_unit_test(solve_budget),
        cmocka_unit_test(work_cap_stops_a_run),
        cmocka_unit_test(tolerance_steers_error_and_cost),
        cmocka_unit_test(dense_straight_curve_costs_as_the_coarse),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
