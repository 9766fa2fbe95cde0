/*
 * test_kinetic.c - cells under the kinetic battery model (J. F. Manwell and
 * J. G. McGowan, Solar Energy 50(5):399-405, 1993; docs/model.md, "The
 * kinetic battery model"): the capacity at constant current against the
 * published closed form; the limit k' -> infinity is Coulomb counting; a
 * resistor light against GSL's rk8pd on the two-well equations written
 * here.
 */
#include "testutil.h"
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include "gslref.h"
#include "lights.h"
#include "refmodel.h"

/* The available well at time t (h) of a constant current I from full, as
 * M. R. Jongerden and B. R. Haverkort restate Manwell and McGowan ("Which
 * battery model to use?", IET Software 3(6), 2009; the form recalled from
 * memory of that paper): y1 = y1,0 e^-k't + (y0 k' c - I)(1 - e^-k't) / k'
 * - I c (k' t - 1 + e^-k't) / k', with y1,0 = c y0 and y0 = C. */
typedef struct well {
    double cap_ah, c, k, i_a;
} well;

static double y1_closed_form(double t, void *p)
{
    const well *w = p;
    double e = exp(-w->k * t), y0 = w->cap_ah, y10 = w->c * y0;
    return y10 * e + (y0 * w->k * w->c - w->i_a) * (1.0 - e) / w->k -
           w->i_a * w->c * (w->k * t - 1.0 + e) / w->k;
}

/* One sloping cell under the kinetic model (invented test data), a
 * constant-voltage LED held at 0.2 A by a linear regulator: the current is
 * constant to the end. */
static void kinetic_cc_light(lw_light *l, double c, double k_per_h)
{
    base_light(l);
    sloping_cell(l);
    l->pack.series = 2;
    l->pack.cell.rate_model = LW_RATE_KINETIC;
    l->pack.cell.kinetic_c = c;
    l->pack.cell.kinetic_k_per_h = k_per_h;
    l->led.model = LW_LED_CONSTANT;
    l->led.forward_v = 1.2; /* 0.24 V of headroom left at empty: regulated to the end */
    l->drive.type = LW_DRIVE_LINEAR_CC;
    l->drive.set_a = 0.2;
    l->drive.dropout_v = 0.05;
    l->cutoff.cell_v = 0.05; /* the available well empties first */
    lw_light_update_factors(l, NULL);
}

/* Constant current until the available well is empty: the time where the
 * closed form's y1 reaches 0 (GSL Brent), both through the run and through
 * lw_cell_kinetic_capacity_ah; 1e-8. */
static void constant_current_capacity_is_the_closed_form(void **state)
{
    (void)state;
    const double cases[][2] = {{0.6, 0.5}, {0.3, 2.0}, {0.8, 0.05}};
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        lw_light l;
        kinetic_cc_light(&l, cases[k][0], cases[k][1]);
        well w = {l.pack.cell.max_capacity_ah, cases[k][0], cases[k][1], 0.2};
        double t = gsl_brent(y1_closed_form, &w, 0.0, w.cap_ah / w.i_a, 0.0, 1e-15);
        assert_close(lw_cell_kinetic_capacity_ah(w.cap_ah, w.c, w.k, w.i_a), w.i_a * t, 1e-12);
        lw_result r = run_ok(&l, false);
        assert_int_equal(r.end_reason, LW_END_CAPACITY);
        assert_close(r.runtime_h, t, 1e-8);
        /* less than the whole charge at this current: the bound well keeps some */
        assert_true(w.i_a * t < 0.999 * w.cap_ah);
        lw_run_result_clear(&r);
        lw_light_clear(&l);
    }
}

/* k' -> infinity: the wells level at once and the model counts coulombs;
 * at k' = 1e7 /h the run agrees with a Peukert cell of exponent 1 holding
 * the same charge to 1e-6. */
static void fast_exchange_is_coulomb_counting(void **state)
{
    (void)state;
    lw_light k, p;
    kinetic_cc_light(&k, 0.4, 1e7);
    kinetic_cc_light(&p, 0.4, 1e7);
    p.pack.cell.rate_model = LW_RATE_PEUKERT;
    p.pack.cell.peukert = 1.0;
    p.pack.cell.capacity_ah = p.pack.cell.max_capacity_ah;
    lw_result a = run_ok(&k, false), b = run_ok(&p, false);
    assert_int_equal(a.end_reason, b.end_reason);
    assert_close(a.runtime_h, b.runtime_h, 1e-6);
    assert_close(a.runtime_h, p.pack.cell.max_capacity_ah / 0.2, 1e-6);
    lw_run_result_clear(&a);
    lw_run_result_clear(&b);
    lw_light_clear(&k);
    lw_light_clear(&p);
}

/* ---- a resistor light against GSL ---- */

/* y = (d, u, lm h): d the charge drawn per unit of C, u the wells' height
 * difference per unit of C, the curves read at d + (1 - c) u; the LED a
 * constant V_f, so I = (E - V_f) / (R + R_pack) explicitly; flux in
 * proportion to the current. */
static double ref_current(const lw_light *l, const double y[])
{
    const lw_cell *c = &l->pack.cell;
    double dc = fmin(1.0, y[0] + (1.0 - c->kinetic_c) * y[1]);
    double e = l->pack.series * ref_interp(c->ocv, dc);
    double rp = l->pack.series * ref_interp(c->res, dc) / l->pack.parallel;
    double i = (e - l->led.forward_v) / (l->drive.resistor_ohm + rp);
    return i > 0.0 ? i : 0.0;
}

/* The light off (between sessions): no current. */
static bool ref_off;

static int ref_rates(double t, const double y[], double dy[], void *params)
{
    (void)t;
    const lw_light *l = params;
    const lw_cell *c = &l->pack.cell;
    double i = ref_off ? 0.0 : ref_current(l, y), ic = i / l->pack.parallel;
    double cap = c->max_capacity_ah;
    dy[0] = ic / cap;
    dy[1] = ic / (c->kinetic_c * cap) - c->kinetic_k_per_h * y[1];
    dy[2] = l->led.flux_lm * i / l->led.flux_current_a;
    return GSL_SUCCESS;
}

static void ref_advance(lw_light *l, double t0, double t1, double y[3])
{
    gsl_odeiv2_system sys = {ref_rates, NULL, 3, l};
    gsl_odeiv2_driver *d =
        gsl_odeiv2_driver_alloc_y_new(&sys, gsl_odeiv2_step_rk8pd, 1e-4, 1e-14, 1e-12);
    double t = t0;
    assert_int_equal(gsl_odeiv2_driver_apply(d, &t, t1, y), GSL_SUCCESS);
    gsl_odeiv2_driver_free(d);
}

/* Two sloping kinetic cells (c = 0.5, k' = 0.8 /h; invented test data)
 * and a 2-V constant LED through 3.3 ohm: above the pack's EMF near empty,
 * so the light dims out. */
static void kinetic_resistor_light(lw_light *l)
{
    base_light(l);
    sloping_cell(l);
    l->pack.series = 2;
    l->pack.cell.rate_model = LW_RATE_KINETIC;
    l->pack.cell.kinetic_c = 0.5;
    l->pack.cell.kinetic_k_per_h = 0.8;
    l->led.model = LW_LED_CONSTANT;
    l->led.forward_v = 2.0;
    l->drive.resistor_ohm = 3.3;
    l->cutoff.cell_v = 0.05;
    lw_light_update_factors(l, NULL);
}

/* The runtime to 10 % of the 30-s output of a resistor light on kinetic
 * cells, and its lumen-hours and time to half, within 1e-6 of the GSL
 * solution (events by bisection to 1e-10 h). */
static void resistor_light_against_gsl(void **state)
{
    (void)state;
    gsl_set_error_handler_off();
    lw_light l;
    kinetic_resistor_light(&l);
    lw_result r = run_ok(&l, false);
    double y[3] = {0, 0, 0};
    ref_advance(&l, 0, 30.0 / 3600.0, y);
    double ref = l.led.flux_lm * ref_current(&l, y) / l.led.flux_current_a;
    double t_found[2];
    const double frac[2] = {0.5, 0.1};
    double t = 30.0 / 3600.0;
    for (int k = 0; k < 2; k++) {
        /* march by 0.5 h, then bisect */
        for (;;) {
            assert_true(t < 1000.0);
            double y1[3] = {y[0], y[1], y[2]};
            ref_advance(&l, t, t + 0.5, y1);
            if (l.led.flux_lm * ref_current(&l, y1) / l.led.flux_current_a <= frac[k] * ref)
                break;
            t += 0.5;
            memcpy(y, y1, sizeof y);
        }
        double a = 0, b = 0.5;
        while (b - a > 1e-10) {
            double m = 0.5 * (a + b), ym[3] = {y[0], y[1], y[2]};
            ref_advance(&l, t, t + m, ym);
            if (l.led.flux_lm * ref_current(&l, ym) / l.led.flux_current_a > frac[k] * ref)
                a = m;
            else
                b = m;
        }
        t_found[k] = t + b;
        if (k == 1)
            ref_advance(&l, t, t + b, y);
    }
    assert_int_equal(r.end_reason, LW_END_RELATIVE);
    assert_close(r.flux_30s_lm, ref, 1e-9);
    assert_close(r.time_to_half_h, t_found[0], 1e-6);
    assert_close(r.runtime_h, t_found[1], 1e-6);
    assert_close(r.lumen_hours, y[2], 1e-6);
    lw_run_result_clear(&r);
    lw_light_clear(&l);
}

/* The same light used in sessions of 3 h with 5 h off: the time of use to
 * the relative cutoff, the lumen-hours, the calendar time and the output
 * at each switch-on within 1e-6 of GSL's rk8pd on the same equations (off:
 * no current, the wells' exchange alone), the end found by bisection. */
static void sessions_against_gsl(void **state)
{
    (void)state;
    gsl_set_error_handler_off();
    lw_light l;
    kinetic_resistor_light(&l);
    l.use = lw_schedule_new();
    assert_non_null(l.use);
    l.use->on_h = 3.0, l.use->off_h = 5.0;
    lw_result r = run_ok(&l, false);
    double y[3] = {0, 0, 0};
    ref_off = false;
    ref_advance(&l, 0, 30.0 / 3600.0, y);
    double flux_of_y = l.led.flux_lm / l.led.flux_current_a;
    double ref = flux_of_y * ref_current(&l, y);
    double on = 30.0 / 3600.0, cal = on, end_on = NAN, end_cal = NAN;
    size_t session = 0;
    for (; session < 200 && isnan(end_on); session++) {
        double left = 3.0 * (double)(session + 1) - on; /* of this session */
        double y1[3] = {y[0], y[1], y[2]};
        ref_advance(&l, 0, left, y1);
        if (flux_of_y * ref_current(&l, y1) > 0.1 * ref) {
            if (session + 1 < r.n_sessions)
                assert_close(r.sessions[session + 1].flux_start_lm,
                             flux_of_y * ref_current(&l, (double[3]){y1[0], y1[1] * exp(-0.8 * 5.0), 0}),
                             1e-6);
            memcpy(y, y1, sizeof y);
            on += left, cal += left;
            ref_off = true;
            ref_advance(&l, 0, 5.0, y);
            ref_off = false;
            cal += 5.0;
            continue;
        }
        double a = 0, b = left;
        while (b - a > 1e-10) {
            double m = 0.5 * (a + b), ym[3] = {y[0], y[1], y[2]};
            ref_advance(&l, 0, m, ym);
            if (flux_of_y * ref_current(&l, ym) > 0.1 * ref)
                a = m;
            else
                b = m;
        }
        ref_advance(&l, 0, b, y);
        end_on = on + b, end_cal = cal + b;
    }
    assert_int_equal(r.end_reason, LW_END_RELATIVE);
    assert_int_equal(r.n_sessions, session);
    assert_close(r.runtime_h, end_on, 1e-6);
    assert_close(r.calendar_h, end_cal, 1e-6);
    assert_close(r.lumen_hours, y[2], 1e-6);
    lw_run_result_clear(&r);
    lw_light_clear(&l);
}

/* lw_cellfit_kinetic recovers c and k' from the two capacities the model
 * itself gives (round trip through the closed form, 1e-9), and refuses
 * capacities that do not fall with the current. */
static void kinetic_fit_round_trip(void **state)
{
    (void)state;
    const double cases[][2] = {{0.55, 0.2}, {0.3, 3.0}, {0.8, 0.01}};
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        double total = 2.5, i1 = 0.1, i2 = 0.6;
        double q1 = lw_cell_kinetic_capacity_ah(total, cases[k][0], cases[k][1], i1);
        double q2 = lw_cell_kinetic_capacity_ah(total, cases[k][0], cases[k][1], i2);
        double c, kk;
        lw_error e;
        lw_error_clear(&e);
        assert_int_equal(lw_cellfit_kinetic(total, i2, q2, i1, q1, &c, &kk, &e), LW_OK);
        assert_close(c, cases[k][0], 1e-9);
        assert_close(kk, cases[k][1], 1e-9);
    }
    double c, kk;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_cellfit_kinetic(2.5, 0.1, 1.0, 0.6, 1.5, &c, &kk, &e), LW_EINPUT);
    assert_int_equal(lw_cellfit_kinetic(2.5, 0.1, 2.6, 0.6, 1.5, &c, &kk, &e), LW_EINPUT);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(constant_current_capacity_is_the_closed_form),
        cmocka_unit_test(fast_exchange_is_coulomb_counting),
        cmocka_unit_test(resistor_light_against_gsl),
        cmocka_unit_test(sessions_against_gsl),
        cmocka_unit_test(kinetic_fit_round_trip),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
