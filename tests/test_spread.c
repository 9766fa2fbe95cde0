/*
 * test_spread.c - the weakest cell of a series pack (pack.capacity_spread,
 * pack.resistance_spread; docs/model.md, "The weakest cell"): no spread, or
 * one cell in series, gives today's results bit for bit; a constant-current
 * light ends at the weakest cell's capacity by Coulomb counting; the
 * cell-voltage end is the weakest cell's, against a root found by GSL's
 * Brent solver on the model written here; both paths (depth and time)
 * agree; a cell driven below 0 V is flagged.
 */
#include "testutil.h"
#include "gslref.h"
#include "lights.h"
#include "refmodel.h"

/* Three sloping cells in series, one constant-voltage LED held at 50 mA by
 * a linear regulator with 0.1 V of dropout: the current is the set current
 * to the end (the headroom stays above 0.5 V), and Peukert's exponent is 1,
 * so the charge drawn is I t (Coulomb counting, common practice).  The cell
 * is the invented test cell of lights.h. */
static void cc_light(lw_light *l, double capacity_spread, double resistance_spread)
{
    base_light(l);
    sloping_cell(l);
    l->pack.cell.peukert = 1.0;
    l->pack.cell.max_capacity_ah = l->pack.cell.capacity_ah;
    l->pack.series = 3;
    l->pack.capacity_spread = capacity_spread;
    l->pack.resistance_spread = resistance_spread;
    l->led.model = LW_LED_CONSTANT;
    l->led.forward_v = 2.0;
    l->drive.type = LW_DRIVE_LINEAR_CC;
    l->drive.set_a = 0.05;
    l->drive.dropout_v = 0.1;
    lw_light_update_factors(l, NULL);
}

/* No spread, or a spread on a single cell, changes nothing: the same
 * figures bit for bit (the demo light, both paths). */
static void no_spread_is_todays_result(void **state)
{
    (void)state;
    for (int in_time = 0; in_time < 2; in_time++) {
        lw_light l;
        shockley_demo_light(&l);
        lw_result a = run_with(&l, false, in_time);
        l.pack.series = 1;
        lw_result one = run_with(&l, false, in_time);
        l.pack.capacity_spread = 0.1, l.pack.resistance_spread = 0.5;
        lw_result one_spread = run_with(&l, false, in_time);
        assert_true(one.runtime_h == one_spread.runtime_h);
        assert_true(one.lumen_hours == one_spread.lumen_hours);
        assert_true(one.energy_drawn_wh == one_spread.energy_drawn_wh);
        l.pack.series = 3;
        l.pack.capacity_spread = 0, l.pack.resistance_spread = 0;
        lw_result b = run_with(&l, false, in_time);
        assert_true(a.runtime_h == b.runtime_h && a.lumen_hours == b.lumen_hours);
        assert_true(a.final.weak_cell_v == a.final.cell_v);
        assert_int_equal(a.solves, b.solves);
        lw_run_result_clear(&a);
        lw_run_result_clear(&b);
        lw_run_result_clear(&one);
        lw_run_result_clear(&one_spread);
        lw_light_clear(&l);
    }
}

/* With no cell-voltage end in reach, the constant-current light runs until
 * the weakest cell is empty: (1 - spread) C / I (Coulomb counting). */
static void weakest_cell_empties_first(void **state)
{
    (void)state;
    for (int in_time = 0; in_time < 2; in_time++) {
        lw_light l;
        cc_light(&l, 0.1, 0.0);
        l.cutoff.cell_v = 0.05;
        lw_result r = run_with(&l, false, in_time);
        assert_int_equal(r.end_reason, LW_END_CAPACITY);
        assert_close(r.runtime_h, 0.9 * 2.3 / 0.05, 1e-9);
        assert_close(r.end_depth, 0.9, 1e-9);
        lw_run_result_clear(&r);
        lw_light_clear(&l);
    }
}

/* The weakest cell's loaded voltage v(d_w) = OCV(d_w) - I R(d_w)(1 + s_R)
 * less the cutoff, at its depth d_w. */
typedef struct weak_ref {
    const lw_light *l;
    double i_a;
} weak_ref;

static double weak_residual(double dw, void *p)
{
    const weak_ref *w = p;
    const lw_cell *c = &w->l->pack.cell;
    return ref_interp(c->ocv, dw) -
           w->i_a * ref_interp(c->res, dw) * (1.0 + w->l->pack.resistance_spread) -
           w->l->cutoff.cell_v;
}

/* The cell-voltage end is the weakest cell's: its depth d_w where its
 * loaded voltage meets the cutoff (GSL Brent on the model above), so the
 * nominal cells are at (1 - s_C) d_w and the runtime is that charge over I;
 * the mean loaded cell voltage at the end is above the cutoff.  Both paths,
 * 1e-9. */
static void the_end_point_is_the_weakest_cells(void **state)
{
    (void)state;
    const double spreads[][2] = {{0.03, 0.0}, {0.10, 0.0}, {0.05, 0.5}, {0.0, 1.0}};
    for (size_t k = 0; k < sizeof spreads / sizeof spreads[0]; k++)
        for (int in_time = 0; in_time < 2; in_time++) {
            lw_light l;
            cc_light(&l, spreads[k][0], spreads[k][1]);
            l.cutoff.cell_v = 1.1;
            weak_ref w = {&l, 0.05};
            double dw = gsl_brent(weak_residual, &w, 0.0, 1.0, 0.0, 1e-15);
            double d = (1.0 - spreads[k][0]) * dw;
            lw_result r = run_with(&l, false, in_time);
            assert_int_equal(r.end_reason, LW_END_CELL_VOLTAGE);
            assert_close(r.end_depth, d, 1e-9);
            assert_close(r.runtime_h, d * 2.3 / 0.05, 1e-9);
            assert_close(r.final.weak_cell_v, 1.1, 1e-9);
            assert_true(r.final.cell_v > 1.1 + 1e-3);
            assert_int_equal(r.warnings & LW_WARN_CELL_REVERSAL, 0);
            lw_run_result_clear(&r);
            lw_light_clear(&l);
        }
}

/* A spread shortens the run of the demo light (a resistor drive), and more
 * spread shortens it more; the depth path and the run in time agree to
 * 1e-9 with the weakest cell's extra knots. */
static void spread_costs_runtime(void **state)
{
    (void)state;
    double last = INFINITY;
    for (int k = 0; k <= 3; k++) {
        lw_light l;
        shockley_demo_light(&l);
        l.pack.capacity_spread = 0.05 * k;
        lw_light_update_factors(&l, NULL);
        lw_result a = run_with(&l, false, false), b = run_with(&l, false, true);
        assert_true(a.runtime_h < last);
        last = a.runtime_h;
        assert_int_equal(a.end_reason, b.end_reason);
        assert_close(b.runtime_h, a.runtime_h, 1e-9);
        assert_close(b.lumen_hours, a.lumen_hours, 1e-9);
        assert_close(b.energy_drawn_wh, a.energy_drawn_wh, 1e-9);
        lw_run_result_clear(&a);
        lw_run_result_clear(&b);
        lw_light_clear(&l);
    }
}

/* A weakest cell whose resistance is far above the others' (31 times) is
 * driven below 0 V while the pack still lights the LED (no end point to stop it: the
 * cutoff is set below 0 V here, which a profile cannot do): flagged. */
static void reversal_is_flagged(void **state)
{
    (void)state;
    lw_light l;
    cc_light(&l, 0.0, 30.0);
    l.pack.series = 6; /* five cells to push 50 mA through the sixth */
    l.cutoff.cell_v = -10.0;
    lw_result r = run_with(&l, false, false);
    assert_true(r.min_weak_cell_v < 0.0);
    assert_true(r.warnings & LW_WARN_CELL_REVERSAL);
    lw_run_result_clear(&r);
    l.pack.resistance_spread = 0.0;
    r = run_with(&l, false, false);
    assert_true(r.min_weak_cell_v > 0.0);
    assert_int_equal(r.warnings & LW_WARN_CELL_REVERSAL, 0);
    lw_run_result_clear(&r);
    lw_light_clear(&l);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(no_spread_is_todays_result),
        cmocka_unit_test(weakest_cell_empties_first),
        cmocka_unit_test(the_end_point_is_the_weakest_cells),
        cmocka_unit_test(spread_costs_runtime),
        cmocka_unit_test(reversal_is_flagged),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
