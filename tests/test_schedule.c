/*
 * test_schedule.c - lights used in sessions (schedule.h; docs/model.md,
 * "Use schedules"): back-to-back sessions are the continuous run; the
 * wells of a kinetic cell level at rest as the closed form of the two-well
 * exchange at zero current says; charge and energy balance across sessions
 * with a standby drain; the heat path cools by the network's closed form;
 * a list of sessions runs out; a resistor light on kinetic cells in
 * sessions against GSL's rk8pd on the same equations.
 */
#include "testutil.h"
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include "lights.h"
#include "refmodel.h"

static lw_schedule *periodic(double on_h, double off_h)
{
    lw_schedule *s = lw_schedule_new();
    assert_non_null(s);
    s->on_h = on_h, s->off_h = off_h;
    return s;
}

/* Sessions with no rest between them are the continuous run (the demo
 * light, 7 h sessions: eight of them), to 1e-9. */
static void back_to_back_sessions_are_the_continuous_run(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    lw_result a = run_with(&l, false, false);
    l.use = periodic(7.0, 0.0);
    lw_result b = run_with(&l, false, false);
    assert_int_equal(a.end_reason, b.end_reason);
    assert_close(b.runtime_h, a.runtime_h, 1e-9);
    assert_close(b.calendar_h, a.runtime_h, 1e-9);
    assert_close(b.lumen_hours, a.lumen_hours, 1e-9);
    assert_close(b.energy_drawn_wh, a.energy_drawn_wh, 1e-9);
    assert_close(b.time_to_half_h, a.time_to_half_h, 1e-9);
    assert_int_equal(b.n_sessions, (size_t)ceil(a.runtime_h / 7.0));
    lw_run_result_clear(&a);
    lw_run_result_clear(&b);
    lw_light_clear(&l);
}

/* Two kinetic cells on a three-point curve at a constant 0.1 A (a linear
 * regulator), sessions of 2 h with 10 h of rest, an optional standby drain
 * (invented test data). */
static void kinetic_cc_light(lw_light *l, double standby_a)
{
    base_light(l);
    const double d[] = {0, 0.5, 1}, v[] = {1.5, 1.35, 1.2}, r[] = {0.1, 0.12, 0.2};
    set_curve(&l->pack.cell, d, v, r, 3);
    l->pack.cell.capacity_ah = 2.0;
    l->pack.cell.max_capacity_ah = 2.0;
    l->pack.cell.rated_a = 0.1;
    l->pack.cell.peukert = 1.0;
    l->pack.cell.cutoff_v = 0.5;
    l->pack.cell.rate_model = LW_RATE_KINETIC;
    l->pack.cell.kinetic_c = 0.4;
    l->pack.cell.kinetic_k_per_h = 0.3;
    l->pack.series = 2;
    l->led.model = LW_LED_CONSTANT;
    l->led.forward_v = 2.0;
    l->drive.type = LW_DRIVE_LINEAR_CC;
    l->drive.set_a = 0.1;
    l->drive.dropout_v = 0.05;
    l->drive.standby_a = standby_a;
    l->cutoff.cell_v = 0.5;
    lw_light_update_factors(l, NULL);
    l->use = periodic(2.0, 10.0);
}

/* At each switch-on the available well's depth is the closed form's: over
 * a time T at a constant current I (the session's, or the standby drain's
 * at rest) from the state (d, u), d += I T / C (the charge drawn, so the
 * charge balances across sessions) and u relaxes to I / (c C k') at rate
 * k' (Manwell and McGowan; at zero current the wells' exchange alone, u
 * decaying as e^(-k' t)).  The curve depth d + (1 - c) u at every switch-on
 * within 1e-9, without and with a 1 mA standby drain. */
static void wells_level_at_rest_by_the_closed_form(void **state)
{
    (void)state;
    const double c = 0.4, k = 0.3, cap = 2.0, i = 0.1;
    for (int drain = 0; drain < 2; drain++) {
        const double i_sb = drain ? 1e-3 : 0.0;
        lw_light l;
        kinetic_cc_light(&l, i_sb);
        lw_result r = run_with(&l, false, false);
        double d = 0.0, u = 0.0;
        assert_true(r.n_sessions >= 3);
        for (size_t n = 1; n < r.n_sessions; n++) {
            const double on[2][2] = {{i, 2.0}, {i_sb, 10.0}};
            for (int phase = 0; phase < 2; phase++) {
                double cur = on[phase][0], t = on[phase][1], u_inf = cur / (c * cap * k);
                d += cur * t / cap;
                u = u_inf + (u - u_inf) * exp(-k * t);
            }
            assert_close(r.sessions[n].start_h, 12.0 * (double)n, 1e-12);
            assert_close(r.sessions[n].depth_start, d + (1.0 - c) * u, 1e-9);
        }
        if (!drain) {
            /* the rests give charge back to the available well: the sessions
             * last longer in total than the continuous run */
            lw_schedule_unref(l.use);
            l.use = NULL;
            lw_result cont = run_with(&l, false, false);
            assert_true(r.runtime_h > 1.01 * cont.runtime_h);
            lw_run_result_clear(&cont);
        }
        lw_run_result_clear(&r);
        lw_light_clear(&l);
    }
}

/* With a standby drain the energy ledger balances across sessions (drawn
 * = LEDs + regulator + cells' R + driver, the standby drain counted as the
 * driver's), to 1e-9; the drain shortens the use. */
static void energy_balances_across_sessions(void **state)
{
    (void)state;
    lw_light l;
    kinetic_cc_light(&l, 1e-3);
    lw_result r = run_with(&l, false, false);
    assert_close(r.calendar_h - r.runtime_h, 10.0 * (double)(r.n_sessions - 1), 1e-12);
    double sum = r.energy_led_wh + r.energy_resistor_wh + r.energy_internal_wh +
                 r.energy_driver_wh;
    assert_close(sum, r.energy_drawn_wh, 1e-9);
    lw_light_clear(&l);
    kinetic_cc_light(&l, 0.0);
    lw_result q = run_with(&l, false, false);
    assert_true(r.runtime_h < q.runtime_h);
    assert_true(r.energy_driver_wh > q.energy_driver_wh);
    lw_run_result_clear(&q);
    lw_run_result_clear(&r);
    lw_light_clear(&l);
}

/* A list of sessions that ends before the cells do: the run says so. */
static void a_list_runs_out(void **state)
{
    (void)state;
    lw_light l;
    shockley_demo_light(&l);
    lw_schedule *s = lw_schedule_new();
    assert_non_null(s);
    s->n = 2;
    s->plan = calloc(2, sizeof *s->plan);
    assert_non_null(s->plan);
    s->plan[0] = (lw_session_plan){0.0, 3.0, -1};
    s->plan[1] = (lw_session_plan){24.0, 4.0, -1};
    l.use = s;
    lw_result r = run_with(&l, false, false);
    assert_int_equal(r.end_reason, LW_END_SCHEDULE_DONE);
    assert_close(r.runtime_h, 7.0, 1e-12);
    assert_close(r.calendar_h, 28.0, 1e-12);
    assert_int_equal(r.n_sessions, 2);
    assert_close(r.sessions[1].on_before_h, 3.0, 1e-12);
    lw_run_result_clear(&r);
    lw_light_clear(&l);
}

/* The heat path between sessions cools by the closed form of its linear
 * network (lw_thermal_relax) - checked against GSL's rk8pd on the same two
 * equations with no heat, to 1e-9 of the starting excess over ambient. */
typedef struct net {
    double cb, ch, rbb, rha, ta;
} net;

static int net_rates(double t, const double y[], double dy[], void *params)
{
    (void)t;
    const net *n = params;
    double across = (y[0] - y[1]) / n->rbb;
    dy[0] = -across / n->cb;
    dy[1] = (across - (y[1] - n->ta) / n->rha) / n->ch;
    return GSL_SUCCESS;
}

static void heat_path_cools_by_its_closed_form(void **state)
{
    (void)state;
    gsl_set_error_handler_off();
    /* the headlamp profile's network (invented figures) */
    lw_thermal th = {.enabled = true, .r_jb_k_w = 10, .r_bb_k_w = 5, .r_ha_k_w = 12,
                     .c_b_j_k = 4, .c_h_j_k = 60};
    net n = {4, 60, 5, 12, 20};
    for (double t = 10; t <= 1e4; t *= 10) {
        double b = 70, h = 45, y[2] = {70, 45};
        lw_thermal_relax(&th, 20, t, &b, &h);
        gsl_odeiv2_system sys = {net_rates, NULL, 2, &n};
        gsl_odeiv2_driver *d =
            gsl_odeiv2_driver_alloc_y_new(&sys, gsl_odeiv2_step_rk8pd, 1e-3, 1e-14, 1e-13);
        double t0 = 0;
        assert_int_equal(gsl_odeiv2_driver_apply(d, &t0, t, y), GSL_SUCCESS);
        gsl_odeiv2_driver_free(d);
        assert_near(b, y[0], 1e-9 * 50);
        assert_near(h, y[1], 1e-9 * 50);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(back_to_back_sessions_are_the_continuous_run),
        cmocka_unit_test(wells_level_at_rest_by_the_closed_form),
        cmocka_unit_test(energy_balances_across_sessions),
        cmocka_unit_test(a_list_runs_out),
        cmocka_unit_test(heat_path_cools_by_its_closed_form),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
