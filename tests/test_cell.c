/*
 * test_cell.c - the cell model: Peukert's law with its low-drain cap, and the
 * temperature factors.
 */
#include "testutil.h"
#include "lampwick.h"

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
    c.temp_capacity = lw_table_new(t, cf, 3, &e);
    c.temp_resistance = lw_table_new(t, rf, 3, &e);
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

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(peukert_published_form_h_rate),
        cmocka_unit_test(peukert_published_form_hp),
        cmocka_unit_test(low_drain_cap_and_factor),
        cmocka_unit_test(temperature_factors_interpolate_and_clamp),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
