/*
 * test_thermal.c - the heat path (thermal.h) and the operating point with
 * the LEDs' own heating (lw_light_point_state): thermal Ohm's law at steady
 * state, the heat balance of every node, the rates against the derivative
 * of the first-order closed form, the self-consistent junction temperature
 * of a heated light, thermal runaway refused, and [thermal] in profiles.
 */
#include "testutil.h"
#include "tmpdir.h"
#include "lights.h"
#include "bundled.h"

static lw_thermal network(double r_jb, double r_bb, double r_ha, double c_b, double c_h)
{
    return (lw_thermal){.enabled = true, .r_jb_k_w = r_jb, .r_bb_k_w = r_bb, .r_ha_k_w = r_ha,
                        .c_b_j_k = c_b, .c_h_j_k = c_h, .losses_in_body = true,
                        .max_touch_c = LW_THERMAL_TOUCH_C_DEFAULT};
}

/* Steady state through resistances in series (thermal Ohm's law, common
 * practice; ../shared/REFERENCES.md, first-order thermal system): T_h =
 * T_a + R_ha (Q_led + Q_other), T_b = T_h + R_bb Q_led, T_j = T_b + R_jb q. */
static void steady_state_is_thermal_ohms_law(void **state)
{
    (void)state;
    lw_thermal th = network(9.0, 3.0, 22.0, 0, 0);
    assert_true(lw_thermal_quasi_static(&th));
    lw_temps t = {0};
    lw_thermal_nodes(&th, 25.0, 2.4, 0.8, 0.6, &t); /* 3 LEDs of 0.8 W heat, 0.6 W other */
    assert_close(t.body_c, 25.0 + 22.0 * 3.0, 1e-15);
    assert_close(t.board_c, 25.0 + 22.0 * 3.0 + 3.0 * 2.4, 1e-15);
    assert_close(t.junction_c, 25.0 + 22.0 * 3.0 + 3.0 * 2.4 + 9.0 * 0.8, 1e-15);
    /* one node (R_bb = 0) */
    th.r_bb_k_w = 0;
    lw_thermal_nodes(&th, -10.0, 2.4, 0.8, 0.6, &t);
    assert_close(t.board_c, t.body_c, 0);
    assert_close(t.body_c, -10.0 + 22.0 * 3.0, 1e-15);
    /* no network: everything at ambient */
    lw_thermal off = {0};
    lw_thermal_nodes(&off, 31.0, 2.4, 0.8, 0.6, &t);
    assert_true(t.junction_c == 31.0 && t.board_c == 31.0 && t.body_c == 31.0);
}

/* Heat balance of the network (conservation of energy): heat generated =
 * heat stored + heat to ambient, C_b dT_b/dt + C_h dT_h/dt = Q_led +
 * Q_other - (T_h - T_a)/R_ha, at any state, for every combination of
 * capacities; a quasi-static node's own balance holds exactly. */
static void every_node_balances_its_heat(void **state)
{
    (void)state;
    const double caps[][2] = {{4.0, 60.0}, {4.0, 0.0}, {0.0, 60.0}, {0.0, 0.0}};
    for (int r_bb = 0; r_bb < 2; r_bb++)
        for (size_t k = 0; k < 4; k++) {
            lw_thermal th = network(7.0, r_bb ? 2.5 : 0.0, 18.0, caps[k][0], caps[k][1]);
            lw_temps t = {.board_c = 61.0, .body_c = 47.0};
            const double ta = 21.0, q_led = 3.1, q_other = 0.9;
            lw_thermal_nodes(&th, ta, q_led, q_led / 2, q_other, &t);
            double db, dh;
            lw_thermal_rates(&th, ta, q_led, q_other, &t, &db, &dh);
            double to_amb = (t.body_c - ta) / th.r_ha_k_w;
            double stored = r_bb ? caps[k][0] * db + caps[k][1] * dh
                                 : (caps[k][0] + caps[k][1]) * dh;
            assert_near(stored, q_led + q_other - to_amb, 1e-12);
            if (r_bb && caps[k][0] > 0 && caps[k][1] == 0) /* quasi-static body */
                assert_near((t.board_c - t.body_c) / th.r_bb_k_w + q_other, to_amb, 1e-12);
            if (r_bb && caps[k][0] == 0) /* quasi-static board */
                assert_near((t.board_c - t.body_c) / th.r_bb_k_w, q_led, 1e-12);
            if (caps[k][0] + caps[k][1] == 0)
                assert_near(to_amb, q_led + q_other, 1e-12);
            assert_close(t.junction_c, t.board_c + th.r_jb_k_w * q_led / 2, 1e-15);
        }
}

/* A one-node body with constant heat P from T_a: the first-order system
 * T(t) = T_a + P R (1 - e^(-t/(R C))) (lumped capacitance, any heat-transfer
 * textbook, e.g. Incropera and DeWitt ch. 5; ../shared/REFERENCES.md).  The
 * rate at T(t) is the closed form's derivative P/C e^(-t/(R C)). */
static void rates_follow_the_first_order_closed_form(void **state)
{
    (void)state;
    const double r = 15.0, c = 80.0, p = 2.0, ta = 20.0;
    lw_thermal th = network(5.0, 0.0, r, 0.0, c);
    for (int k = 0; k <= 24; k++) {
        double t_s = 250.0 * k;
        lw_temps t = {.body_c = ta + p * r * (1 - exp(-t_s / (r * c)))};
        t.board_c = t.body_c;
        lw_thermal_nodes(&th, ta, p, p, 0.0, &t);
        double db, dh;
        lw_thermal_rates(&th, ta, p, 0.0, &t, &db, &dh);
        assert_close(dh, p / c * exp(-t_s / (r * c)), 1e-12);
    }
}

/* The foldback factor as docs/model.md defines it: 1 up to the first
 * corner, the floor from the second on, linear between (the definition;
 * no source needed). */
static void foldback_factor_is_piecewise_linear(void **state)
{
    (void)state;
    lw_thermal th = network(5, 2, 10, 1, 50);
    assert_false(lw_thermal_has_foldback(&th)); /* zeroed: none */
    assert_true(lw_thermal_foldback(&th, 500) == 1.0);
    th.foldback_from_c = NAN, th.foldback_to_c = NAN;
    assert_true(lw_thermal_foldback(&th, 500) == 1.0); /* none given in a profile */
    th.foldback_from_c = 50, th.foldback_to_c = 60, th.foldback_min = 0.3;
    assert_true(lw_thermal_foldback(&th, 20) == 1.0);
    assert_true(lw_thermal_foldback(&th, 50) == 1.0);
    assert_close(lw_thermal_foldback(&th, 52.5), 1.0 - 0.7 * 0.25, 1e-15);
    assert_close(lw_thermal_foldback(&th, 55), 0.65, 1e-15);
    assert_true(lw_thermal_foldback(&th, 60) == 0.3);
    assert_true(lw_thermal_foldback(&th, 90) == 0.3);
    th.enabled = false;
    assert_true(lw_thermal_foldback(&th, 90) == 1.0);
}

/* A heated light's point: the junction temperature it reports is the one
 * its own heat gives (the fixed point, to 1e-9 K), and the point equals the
 * electrical point solved at that junction temperature. */
static void junction_temperature_is_self_consistent(void **state)
{
    (void)state;
    for (int drive = 0; drive < 2; drive++) {
        lw_light l;
        base_light(&l);
        flat_cell(&l, 4.1, 0.08, 3.0, 0.6, 1.0, 3.0);
        l.led.model = LW_LED_LINEAR;
        l.led.threshold_v = 2.65, l.led.slope_ohm = 0.35;
        l.led.junction_c = 25, l.led.tc_forward_v_k = -2e-3, l.led.tc_flux_per_k = -0.3e-2;
        l.led.heat_fraction = 0.65;
        l.led.flux_lm = 300, l.led.flux_current_a = 1.0;
        l.drive.resistor_ohm = 0.5;
        if (drive) {
            l.drive.type = LW_DRIVE_LINEAR_CC;
            l.drive.set_a = 0.8;
            l.drive.dropout_v = 0.1;
        }
        l.pack.ambient_c = 25;
        l.thermal = network(8.0, 3.0, 20.0, 0, 0);
        lw_error e;
        lw_error_clear(&e);
        lw_point pt, cold;
        assert_int_equal(lw_light_point(&l, 0.2, false, &pt, &e), LW_OK);
        double q_led = 0.65 * pt.p_led_w;
        double q_other = pt.p_res_w + pt.p_int_w + pt.p_drv_w;
        double tj = 25 + 20.0 * (q_led + q_other) + 3.0 * q_led + 8.0 * q_led;
        assert_near(pt.temps.junction_c, tj, 1e-9);
        assert_true(pt.temps.junction_c > 60); /* a real heating */
        /* the same point as the plain electrical one at that junction */
        lw_light w = l;
        w.thermal.enabled = false;
        w.led.t_junction_c = pt.temps.junction_c;
        assert_int_equal(lw_light_point(&w, 0.2, false, &cold, &e), LW_OK);
        assert_close(pt.led_a, cold.led_a, 1e-12);
        assert_close(pt.flux_lm, cold.flux_lm, 1e-12);
        /* heat leaving the light instead of the body: cooler */
        l.thermal.losses_in_body = false;
        lw_point out;
        assert_int_equal(lw_light_point(&l, 0.2, false, &out, &e), LW_OK);
        assert_true(out.temps.body_c < pt.temps.body_c);
        lw_light_clear(&l);
    }
}

/* A stiff supply, a steep negative coefficient and a poor heat path: the
 * hotter LED draws more, which heats it more, without bound.  Refused. */
static void thermal_runaway_is_refused(void **state)
{
    (void)state;
    lw_light l;
    base_light(&l);
    flat_cell(&l, 4.1, 0.01, 3.0, 0.6, 1.0, 3.0);
    l.led.model = LW_LED_LINEAR;
    l.led.threshold_v = 2.65, l.led.slope_ohm = 0.05;
    l.led.junction_c = 25, l.led.tc_forward_v_k = -4e-3, l.led.heat_fraction = 0.7;
    l.drive.resistor_ohm = 0.05;
    l.pack.ambient_c = 25;
    l.thermal = network(30.0, 0.0, 400.0, 0, 0);
    lw_error e;
    lw_error_clear(&e);
    lw_point pt;
    assert_int_equal(lw_light_point(&l, 0.2, false, &pt, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "thermal runaway"));
    assert_non_null(strstr(e.msg, "junction_board_k_w"));
    lw_light_clear(&l);
}

/* A foldback on a body at steady state (no heat capacity): the point's
 * body temperature is T_a + R_ha (Q_led + Q_other) of the powers it reports
 * (thermal Ohm's law, common practice), and those powers are the drive at
 * the factor that body temperature gives (the definition in docs/model.md):
 * a regulated drive's current is factor x set_ma.  Between the corners the
 * factor is strictly inside (min, 1). */
static void foldback_on_a_body_at_steady_state(void **state)
{
    (void)state;
    lw_profile p = bundled_profile("torch-18650");
    lw_error e;
    lw_error_clear(&e);
    lw_thermal *th = &p.light.thermal;
    th->c_b_j_k = th->c_h_j_k = 0.0; /* at steady state throughout */
    const double set[] = {0.3, 1.5, 3.5, 5.0}; /* A: below, between, between, at the floor */
    int inside = 0;
    for (size_t k = 0; k < sizeof set / sizeof set[0]; k++) {
        p.light.drive.set_a = set[k];
        lw_point pt;
        assert_int_equal(lw_light_point(&p.light, 0.1, false, &pt, &e), LW_OK);
        double q = p.light.led.heat_fraction * pt.p_led_w + pt.p_res_w + pt.p_int_w + pt.p_drv_w;
        assert_close(pt.temps.body_c, p.light.pack.ambient_c + th->r_ha_k_w * q, 1e-12);
        double f = lw_thermal_foldback(th, pt.temps.body_c);
        assert_close(pt.led_a, f * set[k], 1e-12);
        inside += f > th->foldback_min && f < 1.0;
    }
    assert_true(inside >= 2);
    /* a run: in depth and in time alike */
    p.light.drive.set_a = 1.5;
    lw_result a, b;
    lw_run_options o = lw_run_options_default();
    assert_int_equal(lw_run(&p.light, &o, &a, &e), LW_OK);
    o.time_domain = true;
    assert_int_equal(lw_run(&p.light, &o, &b, &e), LW_OK);
    assert_close(a.runtime_h, b.runtime_h, 1e-8);
    assert_close(a.lumen_hours, b.lumen_hours, 1e-8);
    lw_run_result_clear(&a);
    lw_run_result_clear(&b);
    lw_profile_clear(&p);
}

/* The resistor derating: full rating to 70 C, none at 155 C, linear
 * between (common practice, no source).  A run keeps the rating its
 * resistor needs at the body's temperature: the peak power itself while
 * the body stays below 70 C, more when it is hotter, and warns when the
 * profile's rating is below that. */
static void resistor_rating_follows_the_body(void **state)
{
    (void)state;
    assert_near(lw_thermal_resistor_derating(20), 1, 0);
    assert_near(lw_thermal_resistor_derating(70), 1, 0);
    assert_near(lw_thermal_resistor_derating(112.5), 0.5, 1e-15);
    assert_near(lw_thermal_resistor_derating(155), 0, 0);
    assert_near(lw_thermal_resistor_derating(200), 0, 0);
    lw_profile p = bundled_profile("headlamp-18650");
    lw_error e;
    lw_error_clear(&e);
    lw_result r;
    assert_int_equal(lw_run(&p.light, NULL, &r, &e), LW_OK);
    assert_true(r.peak_body_c < LW_RESISTOR_FULL_C);
    assert_close(r.peak_resistor_derated_w, r.peak_resistor_w, 1e-15);
    assert_false(r.warnings & LW_WARN_RESISTOR_DERATED);
    lw_run_result_clear(&r);
    /* a hot ambient: the body above 70 C, the rating set between the peak
     * power and what the body's temperature asks */
    p.light.pack.ambient_c = 75;
    lw_light_update_factors(&p.light, NULL);
    assert_int_equal(lw_run(&p.light, NULL, &r, &e), LW_OK);
    assert_true(r.peak_body_c > LW_RESISTOR_FULL_C);
    /* above the peak power (the body hot at some point), at most the peak
     * power at the hottest body */
    assert_true(r.peak_resistor_derated_w > r.peak_resistor_w * 1.001);
    assert_true(r.peak_resistor_derated_w <=
                r.peak_resistor_w / lw_thermal_resistor_derating(r.peak_body_c) * (1 + 1e-12));
    double need = r.peak_resistor_derated_w;
    lw_run_result_clear(&r);
    p.light.drive.rating_w = 0.99 * need;
    assert_int_equal(lw_run(&p.light, NULL, &r, &e), LW_OK);
    assert_true(r.warnings & LW_WARN_RESISTOR_DERATED);
    lw_run_result_clear(&r);
    p.light.drive.rating_w = 1.01 * need;
    assert_int_equal(lw_run(&p.light, NULL, &r, &e), LW_OK);
    assert_false(r.warnings & LW_WARN_RESISTOR_DERATED);
    lw_run_result_clear(&r);
    lw_profile_clear(&p);
}

/* [thermal] in a profile: its required keys named at the section's line; a
 * negative heat capacity refused at its line; a valid section runs. */
static void thermal_section_in_profiles(void **state)
{
    (void)state;
    const char *cells = LW_SOURCE_ROOT "/cells";
    lw_search s;
    memset(&s, 0, sizeof s);
    lw_search_add(&s, cells);
    lw_profile p;
    lw_error e;
    lw_error_clear(&e);
    const char *base = "[pack]\ncell = LR6-alkaline\nseries = 3\n[led]\nmodel = constant\n"
                       "forward_v = 2.9\nflux_lm = 20\nflux_current_ma = 20\n"
                       "[drive]\nresistor_ohm = 33\n";
    char text[1024];
    snprintf(text, sizeof text, "%s[thermal]\nbody_ambient_k_w = 30\n", base);
    const char *path = tmp_write("t1.ini", text);
    assert_int_equal(lw_profile_load(path, &s, &p, &e), LW_EINPUT);
    assert_error_at(e, "t1.ini", 11, "junction_board_k_w");
    snprintf(text, sizeof text, "%s[thermal]\njunction_board_k_w = 12\nbody_ambient_k_w = 30\n"
                                "body_j_k = -40\n", base);
    path = tmp_write("t2.ini", text);
    lw_error_clear(&e);
    assert_int_equal(lw_profile_load(path, &s, &p, &e), LW_EINPUT);
    assert_error_at(e, "t2.ini", 14, "body_j_k = -40");
    snprintf(text, sizeof text, "%s[thermal]\njunction_board_k_w = 12\nbody_ambient_k_w = 30\n",
             base);
    path = tmp_write("t3.ini", text);
    lw_error_clear(&e);
    assert_int_equal(lw_profile_load(path, &s, &p, &e), LW_OK);
    assert_true(p.light.thermal.enabled && p.light.thermal.losses_in_body);
    assert_close(p.light.thermal.max_touch_c, LW_THERMAL_TOUCH_C_DEFAULT, 0);
    lw_result r;
    assert_int_equal(lw_run(&p.light, NULL, &r, &e), LW_OK);
    assert_true(r.peak_junction_c > p.light.pack.ambient_c);
    assert_true(r.peak_body_c > p.light.pack.ambient_c);
    lw_run_result_clear(&r);
    lw_profile_clear(&p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(steady_state_is_thermal_ohms_law),
        cmocka_unit_test(every_node_balances_its_heat),
        cmocka_unit_test(rates_follow_the_first_order_closed_form),
        cmocka_unit_test(foldback_factor_is_piecewise_linear),
        cmocka_unit_test(junction_temperature_is_self_consistent),
        cmocka_unit_test(thermal_runaway_is_refused),
        cmocka_unit_test(thermal_section_in_profiles),
        cmocka_unit_test(resistor_rating_follows_the_body),
        cmocka_unit_test(foldback_on_a_body_at_steady_state),
    };
    int rc = cmocka_run_group_tests(tests, NULL, NULL);
    tmp_cleanup();
    return rc;
}
