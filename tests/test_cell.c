/*
 * test_cell.c - the cell model: Peukert's law with its low-drain cap, and the
 * temperature factors.
 */
#include "bundled.h"
#include <lampwick/lampwick.h>

static lw_cell peukert_cell(double c_ah, double rated_a, double k, double cmax_ah)
{
    lw_cell c;
    memset(&c, 0, sizeof c);
    c.capacity_ah = c_ah;
    c.rated_a = rated_a;
    c.peukert = k;
    c.max_capacity_ah = cmax_ah;
    return c;
}

/* At constant current I the runtime is C_eff(I)/I.  REFERENCES.md check
 * value 4 [calc from Peukert's law, t = H (C/(I H))^k]: C = 100 Ah at the
 * H = 20 h rate (I_rated = 5 A), k = 1.2: 10 A -> 8.7055 h, 20 A -> 3.7893 h,
 * 5 A -> 20 h. */
static void peukert_published_form_h_rate(void **state)
{
    (void)state;
    lw_cell c = peukert_cell(100, 5, 1.2, 1e9);
    assert_close(lw_cell_capacity_ah(&c, 10, 1) / 10, 8.7055, 1e-4);
    assert_close(lw_cell_capacity_ah(&c, 20, 1) / 20, 3.7893, 1e-4);
    assert_close(lw_cell_capacity_ah(&c, 5, 1) / 5, 20.0, 1e-12);
    /* the closed form itself, for a spread of currents */
    for (double i = 0.5; i < 50; i *= 1.3)
        assert_close(lw_cell_capacity_ah(&c, i, 1) / i, 20 * pow(100 / (i * 20), 1.2), 1e-12);
}

/* REFERENCES.md check value 3 [checked]: t = Hp / I^k with Hp = 100, I = 5 A,
 * k = 1.2 gives 14.4956 h.  With a rating at 1 A, Hp = C. */
static void peukert_published_form_hp(void **state)
{
    (void)state;
    lw_cell c = peukert_cell(100, 1, 1.2, 1e9);
    assert_close(lw_cell_capacity_ah(&c, 5, 1) / 5, 14.4956, 1e-5);
}

static void low_drain_cap_and_factor(void **state)
{
    (void)state;
    lw_cell c = peukert_cell(2.3, 0.1, 1.2, 2.8);
    assert_close(lw_cell_capacity_ah(&c, 0.001, 1), 2.8, 0);   /* capped */
    assert_close(lw_cell_capacity_ah(&c, 0.0, 1), 2.8, 0);
    assert_close(lw_cell_capacity_ah(&c, 0.1, 0.5), 1.15, 1e-15); /* factor scales */
    lw_cell flat = peukert_cell(2.0, 0.4, 1.0, 2.1);
    assert_close(lw_cell_capacity_ah(&flat, 5.0, 1), 2.0, 0);  /* k = 1: no rate effect */
    assert_close(lw_cell_capacity_ah(&flat, 0.0, 1), 2.0, 0);
}

static void temperature_factors_interpolate_and_clamp(void **state)
{
    (void)state;
    const double t[] = {-20, 0, 20}, cf[] = {0.5, 0.8, 1.0}, rf[] = {3.0, 1.5, 1.0};
    lw_error e;
    lw_error_clear(&e);
    lw_cell c;
    memset(&c, 0, sizeof c);
    c.temp_capacity = lw_interp_new(t, cf, 3, &e);
    c.temp_resistance = lw_interp_new(t, rf, 3, &e);
    double kc, kr;
    bool out = true;
    lw_cell_temperature_factors(&c, -10, &kc, &kr, &out);
    assert_close(kc, 0.65, 1e-15);
    assert_close(kr, 2.25, 1e-15);
    assert_false(out);
    lw_cell_temperature_factors(&c, -40, &kc, &kr, &out);
    assert_close(kc, 0.5, 0);
    assert_true(out);
    lw_cell_clear(&c);
    lw_cell_temperature_factors(&c, -40, &kc, &kr, &out);
    assert_close(kc, 1.0, 0);
    assert_close(kr, 1.0, 0);
}

/* Every bundled curve runs past its end point: a resistive load drawing a
 * tenth of the rated current, or the rated current itself, ends on the
 * cell's end-point voltage, never on the table's end (common practice, no
 * source: a run is judged at the maker's end point, not where a table
 * stops). */
static void bundled_curves_reach_their_end_point(void **state)
{
    (void)state;
    lw_search s = bundled_cells();
    lw_cellfile_list list;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_cellfile_list_read(&s, &list, &e), LW_OK);
    assert_true(list.n >= 8);
    for (size_t i = 0; i < list.n; i++) {
        lw_cell cell;
        assert_int_equal(lw_cellfile_load(list.paths[i], &cell, &e), LW_OK);
        assert_true(cell.ocv->y[cell.ocv->n - 1] < cell.cutoff_v);
        for (int k = 0; k < 2; k++) {
            double load_a = cell.rated_a * (k ? 1.0 : 0.1);
            lw_light l;
            memset(&l, 0, sizeof l);
            lw_cell_copy(&l.pack.cell, &cell);
            l.pack.series = l.pack.parallel = 1;
            l.pack.ambient_c = 20;
            l.led = (lw_led){.model = LW_LED_CONSTANT, .count = 1, .strings = 1, .v_scale = 1,
                             .forward_v = 1e-9, .flux_lm = 1, .flux_current_a = load_a,
                             .flux_exponent = 1, .max_current_a = 100};
            l.drive = (lw_drive){.type = LW_DRIVE_RESISTOR, .duty_pct = 100,
                                 .resistor_ohm = cell.nominal_v / load_a};
            l.cutoff = (lw_cutoff){.relative_pct = 1e-6, .cell_v = cell.cutoff_v};
            lw_light_update_factors(&l, NULL);
            lw_run_options o = lw_run_options_default();
            o.visible_lm = 0;
            lw_result r;
            assert_int_equal(lw_run(&l, &o, &r, &e), LW_OK);
            if (r.end_reason != LW_END_CELL_VOLTAGE)
                fail_msg("%s at %g mA ends on %s", cell.name, load_a * 1e3,
                         lw_run_end_names[r.end_reason]);
            lw_light_clear(&l);
        }
        lw_cell_clear(&cell);
    }
    lw_cellfile_list_clear(&list);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(peukert_published_form_h_rate),
        cmocka_unit_test(peukert_published_form_hp),
        cmocka_unit_test(low_drain_cap_and_factor),
        cmocka_unit_test(temperature_factors_interpolate_and_clamp),
        cmocka_unit_test(bundled_curves_reach_their_end_point),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
