/*
 * test_design.c - pick (worst case by hand), size (every pack it returns
 * passes its own run), the specification table (consistent with run), and
 * beam photometry (ANSI/PLATO FL 1 definitions).
 */
#include "testutil.h"
#include "fixture.h"

/* pick on the fixture: flat cell E = 3.0 V, r = 0.5 ohm; LED 2.0 V; target
 * 20 mA; E24 (5 % parts, the profile sets no tolerance).
 *   ideal      R = (3.0 - 2.0)/0.020 - 0.5 = 49.5 ohm  -> next E24 up: 51 ohm
 *   nominal    I = 1.0/(51 + 0.5) = 19.417 mA
 *   worst case R = 51 * 0.95 = 48.45 ohm, Vf = 2.0 * 0.95 = 1.90 V,
 *              I = (3.0 - 1.90)/(48.45 + 0.5) = 22.472 mA,
 *              P = I^2 R = 0.022472^2 * 48.45 = 24.466 mW
 *   rating     >= 2 x 24.466 mW -> 0.063 W, the smallest standard rating.
 * Ohm's and Kirchhoff's laws; the 2x power derating is common practice, no
 * source. */
static void pick_worst_case_by_hand(void **state)
{
    (void)state;
    lw_profile p;
    load_fixture(NULL, &p);
    lw_pick pk;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_pick_resistor(&p, LW_TARGET_CURRENT, 0.020, 24, &pk, &e), LW_OK);
    assert_close(pk.ideal_ohm, 49.5, 1e-9);
    assert_close(pk.resistor_ohm, 51, 0);
    assert_close(pk.tolerance_pct, 5, 0);
    assert_close(pk.corners[LW_CORNER_NOMINAL].pt.led_a, 1.0 / 51.5, 1e-12);
    assert_close(pk.corners[LW_CORNER_HOT].pt.led_a, 1.10 / 48.95, 1e-12);
    double i = 1.10 / 48.95;
    assert_close(pk.corners[LW_CORNER_HOT].pt.p_res_peak_w, i * i * 48.45, 1e-12);
    assert_close(pk.recommended_rating_w, 0.063, 0);
    assert_true(pk.meets_target && pk.within_ratings);
    /* the full run confirms the part: Coulomb counting on the flat cell */
    assert_close(pk.run.runtime_h, 2.0 / (1.0 / 51.5), 1e-9);
    /* the flat cell has no temperature table: the cold corner is nominal;
     * the end of the run is the run's own last point */
    assert_false(pk.corners[LW_CORNER_COLD].from_table);
    assert_close(pk.corners[LW_CORNER_COLD].pt.led_a, 1.0 / 51.5, 1e-12);
    assert_close(pk.corners[LW_CORNER_END].pt.depth, pk.run.end_depth, 0);
    lw_run_result_clear(&pk.run);
    lw_profile_clear(&p);
}

/* With max_current_ma = 22 the 51-ohm part fails the worst case (22.47 mA),
 * so pick steps up: 56 ohm gives (3.0 - 1.9)/(53.2 + 0.5) = 20.484 mA worst
 * case -- but then the nominal 17.70 mA no longer meets a 20 mA target
 * exactly as asked, which pick reports (exit 1) while naming the safe part. */
static void pick_never_proposes_an_unsafe_part(void **state)
{
    (void)state;
    lw_profile p;
    load_fixture(NULL, &p);
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_profile_set_arg(&p, "led.max_current_ma=22", &e), LW_OK);
    assert_int_equal(lw_profile_resolve(&p, &e), LW_OK);
    lw_pick pk;
    assert_int_equal(lw_pick_resistor(&p, LW_TARGET_CURRENT, 0.020, 24, &pk, &e), LW_ENOANSWER);
    assert_close(pk.resistor_ohm, 56, 0);
    assert_close(pk.corners[LW_CORNER_HOT].pt.led_a, 1.10 / 53.7, 1e-12);
    assert_true(pk.corners[LW_CORNER_HOT].pt.led_a <= 0.022);
    assert_non_null(strstr(e.msg, "nearest safe part is 56 ohm"));
    lw_run_result_clear(&pk.run);
    /* a flux target the LED cannot reach within its rating at all */
    lw_error_clear(&e);
    assert_int_equal(lw_pick_resistor(&p, LW_TARGET_FLUX, 50.0, 24, &pk, &e), LW_ENOANSWER);
    lw_run_result_clear(&pk.run);
    lw_profile_clear(&p);
}

/* A flux target: the largest value whose output reaches it.  10 lm at
 * 20 mA, linear: 8 lm needs 16 mA: R = 1/0.016 - 0.5 = 62.0 ohm -> 62. */
static void pick_flux_target(void **state)
{
    (void)state;
    lw_profile p;
    load_fixture(NULL, &p);
    lw_pick pk;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_pick_resistor(&p, LW_TARGET_FLUX, 8.0, 24, &pk, &e), LW_OK);
    assert_close(pk.ideal_ohm, 62.0, 1e-9);
    assert_close(pk.resistor_ohm, 62, 0);
    assert_true(pk.corners[LW_CORNER_NOMINAL].pt.flux_lm >= 8.0 * (1 - 1e-12));
    lw_run_result_clear(&pk.run);
    lw_profile_clear(&p);
}

/* size: every pack it returns as fitting passes its own run. */
static void size_results_pass_their_own_runs(void **state)
{
    (void)state;
    lw_profile p;
    load_fixture(NULL, &p);
    const char *cells[] = {"flat", "slope", NULL};
    lw_size_options opt = {.runtime_h = 60, .flux_lm = 5.0, .cells = cells, .max_series = 3,
                           .max_parallel = 2, .eseries = 24, .threads = 2};
    lw_size_row *rows;
    size_t n;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_size_packs(&p, &opt, &rows, &n, &e), LW_OK);
    assert_true(n > 0);
    size_t fits = 0;
    for (size_t i = 0; i < n; i++) {
        if (!rows[i].fits)
            continue;
        fits++;
        if (i > 0 && rows[i - 1].fits) /* ranked by cell count */
            assert_true(rows[i - 1].series * rows[i - 1].parallel <=
                        rows[i].series * rows[i].parallel);
        lw_profile q;
        assert_int_equal(lw_profile_copy(&q, &p, &e), LW_OK);
        char buf[64];
        assert_int_equal(lw_profile_set(&q, "pack.cell", rows[i].cell, LW_FROM_OPTION, "t", 0, &e),
                         LW_OK);
        snprintf(buf, sizeof buf, "%d", rows[i].series);
        assert_int_equal(lw_profile_set(&q, "pack.series", buf, LW_FROM_OPTION, "t", 0, &e), LW_OK);
        snprintf(buf, sizeof buf, "%d", rows[i].parallel);
        assert_int_equal(lw_profile_set(&q, "pack.parallel", buf, LW_FROM_OPTION, "t", 0, &e),
                         LW_OK);
        snprintf(buf, sizeof buf, "%.10g", rows[i].resistor_ohm);
        assert_int_equal(lw_profile_set(&q, "drive.resistor_ohm", buf, LW_FROM_OPTION, "t", 0, &e),
                         LW_OK);
        assert_int_equal(lw_profile_set(&q, "cutoff.flux_lm", "5", LW_FROM_OPTION, "t", 0, &e),
                         LW_OK);
        assert_int_equal(lw_profile_resolve(&q, &e), LW_OK);
        lw_result r;
        lw_run_options o = lw_run_options_default();
        assert_int_equal(lw_run(&q.light, &o, &r, &e), LW_OK);
        assert_true(r.runtime_h >= 60.0);
        assert_close(r.runtime_h, rows[i].runtime_h, 1e-12);
        lw_point w;
        assert_int_equal(lw_run_worst_case(&q.light, &w, &e), LW_OK);
        assert_true(w.led_a <= q.light.led.max_current_a);
        lw_profile_clear(&q);
    }
    assert_true(fits > 0);
    free(rows);
    /* nothing fits: an impossible runtime still returns the closest packs */
    opt.runtime_h = 1e6;
    assert_int_equal(lw_size_packs(&p, &opt, &rows, &n, &e), LW_OK);
    assert_true(n > 0);
    assert_false(rows[0].fits);
    for (size_t i = 1; i < n; i++)
        assert_true(rows[i - 1].runtime_h >= rows[i].runtime_h);
    free(rows);
    lw_profile_clear(&p);
}

/* size never proposes a resistor beyond its rating: with rating_w = 0.0625
 * W every chosen part's worst-case dissipation is within it, and each row
 * states that dissipation and the recommended rating (at least twice it). */
static void size_respects_the_resistor_rating(void **state)
{
    (void)state;
    lw_profile p;
    load_fixture("rating_w = 0.02\n", &p);
    const char *cells[] = {"flat", NULL};
    lw_size_options opt = {.runtime_h = 10, .flux_lm = NAN, .cells = cells, .max_series = 3,
                           .max_parallel = 1, .eseries = 24, .threads = 1};
    lw_size_row *rows;
    size_t n;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_size_packs(&p, &opt, &rows, &n, &e), LW_OK);
    assert_true(n >= 2);
    for (size_t i = 0; i < n; i++) {
        assert_true(rows[i].worst_resistor_w <= 0.02);
        assert_true(rows[i].rating_w >= 2 * rows[i].worst_resistor_w);
        /* a part just below would break the rating or the LED's maximum */
        lw_profile q;
        assert_int_equal(lw_profile_copy(&q, &p, &e), LW_OK);
        char buf[32];
        snprintf(buf, sizeof buf, "%d", rows[i].series);
        assert_int_equal(lw_profile_set(&q, "pack.series", buf, LW_FROM_OPTION, "t", 0, &e), LW_OK);
        assert_int_equal(lw_profile_resolve(&q, &e), LW_OK);
        lw_point w;
        double below = lw_eseries_round(24, rows[i].resistor_ohm * (1 - 1e-6), false);
        lw_light l = q.light;
        l.drive.resistor_ohm = below;
        assert_int_equal(lw_run_worst_case(&l, &w, &e), LW_OK);
        if (rows[i].resistor_ohm > 49.5 * 1.06) /* above the design current's value */
            assert_true(w.p_res_peak_w > 0.02 || w.led_a > l.led.max_current_a);
        lw_profile_clear(&q);
    }
    free(rows);
    lw_profile_clear(&p);
}

/* size with a regulated drive: no resistor to choose, each pack is run with
 * the drive as it is (here a linear regulator at the design current). */
static void size_regulated_drive(void **state)
{
    (void)state;
    lw_profile p;
    load_fixture("type = linear-cc\nset_ma = 20\ndropout_v = 0.2\n", &p);
    const char *cells[] = {"flat", NULL};
    lw_size_options opt = {.runtime_h = 150, .flux_lm = NAN, .cells = cells, .max_series = 2,
                           .max_parallel = 2, .eseries = 24, .threads = 1};
    lw_size_row *rows;
    size_t n;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_size_packs(&p, &opt, &rows, &n, &e), LW_OK);
    assert_int_equal(n, 4);
    /* two cells in series hold the regulator at 20 mA to the end: Coulomb
     * counting, P x 2 Ah at 20 mA; one cell saturates it at
     * (3.0 - 0.2 - 2.0)/(49.5 + 0.5/P) */
    for (size_t i = 0; i < n; i++) {
        assert_true(isnan(rows[i].resistor_ohm));
        assert_int_equal(rows[i].end_reason, LW_END_CAPACITY);
        double ia = rows[i].series == 2 ? 0.020 : 0.8 / (49.5 + 0.5 / rows[i].parallel);
        assert_close(rows[i].runtime_h, rows[i].parallel * 2.0 / ia, 1e-9);
    }
    assert_true(rows[0].fits && rows[0].parallel == 2 && rows[0].series == 1);
    free(rows);
    lw_profile_clear(&p);
}

/* The table's notes state the conditions actually computed: storage and
 * the flux floor set by --set appear, and a warning is marked on its row. */
static void table_notes_follow_the_conditions(void **state)
{
    (void)state;
    lw_profile p;
    load_fixture("[mode hi]\ndrive.resistor_ohm = 33\n[mode lo]\ndrive.resistor_ohm = 100\n"
                 "pack.stored_months = 24\n",
                 &p);
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_profile_set_arg(&p, "cutoff.flux_lm=2", &e), LW_OK);
    assert_int_equal(lw_profile_set_arg(&p, "pack.ambient_c=5", &e), LW_OK);
    assert_int_equal(lw_profile_resolve(&p, &e), LW_OK);
    lw_rtable *t;
    assert_int_equal(lw_report_spec_table(&p, NULL, LW_FMT_TEXT, 1, &t, &e), LW_OK);
    char all[8192] = "";
    for (size_t i = 0; i < t->nnotes; i++) {
        strncat(all, t->notes[i], sizeof all - strlen(all) - 1);
        strncat(all, "\n", sizeof all - strlen(all) - 1);
    }
    assert_non_null(strstr(all, "5 C ambient"));
    assert_non_null(strstr(all, "or to 2 lm"));
    assert_non_null(strstr(all, "Storage: fresh cells (mode hi); after 24 months' storage"));
    assert_null(strstr(all, "unless a mode sets"));
    /* 33 ohm: (3 - 2)/33.5 = 29.9 mA against max 30 mA, worst case over it */
    assert_non_null(strstr(all, "(b) worst case"));
    assert_non_null(strstr(t->cell[t->ncol - 1], "b"));
    lw_rtable_free(t);
    lw_profile_clear(&p);
}

/* The table's CSV numbers are the runs of each mode and cell. */
static void table_consistent_with_run(void **state)
{
    (void)state;
    lw_profile p;
    load_fixture("[optics]\nbeam_angle_deg = 60\n[mode hi]\ndrive.resistor_ohm = 33\n"
                 "[mode lo]\ndrive.resistor_ohm = 100\n",
                 &p);
    const char *cells[] = {"flat", "slope", NULL};
    lw_rtable *t;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_report_spec_table(&p, cells, LW_FMT_CSV, 2, &t, &e), LW_OK);
    assert_int_equal(t->nrow, 2);
    assert_int_equal(t->ncol, 15); /* mode + 7 per cell: 5 figures, end reason, warnings */
    assert_string_equal(t->head[1], "flat.flux_lm");
    assert_string_equal(t->head[9], "slope.runtime_h");
    for (size_t r = 0; r < 2; r++) {
        const char *mode = r == 0 ? "hi" : "lo";
        assert_string_equal(t->cell[r * t->ncol], mode);
        for (size_t c = 0; c < 2; c++) {
            lw_profile q;
            assert_int_equal(lw_profile_copy(&q, &p, &e), LW_OK);
            assert_int_equal(lw_profile_apply_mode(&q, mode, &e), LW_OK);
            assert_int_equal(lw_profile_set(&q, "pack.cell", cells[c], LW_FROM_OPTION, "t", 0, &e),
                             LW_OK);
            assert_int_equal(lw_profile_resolve(&q, &e), LW_OK);
            lw_result res;
            lw_run_options o = lw_run_options_default();
            assert_int_equal(lw_run(&q.light, &o, &res, &e), LW_OK);
            double v;
            if (lw_run_end_is_dark(res.end_reason)) {
                /* a light that gives no light: no figures at all */
                for (size_t k = 0; k < 5; k++)
                    assert_string_equal(t->cell[r * t->ncol + 1 + c * 7 + k], "");
                lw_profile_clear(&q);
                continue;
            }
            assert_true(lw_number_parse_double(t->cell[r * t->ncol + 1 + c * 7 + 1], &v));
            assert_close(v, res.runtime_h, 1e-5);
            assert_true(lw_number_parse_double(t->cell[r * t->ncol + 1 + c * 7 + 0], &v));
            assert_close(v, res.flux_30s_lm, 1e-5);
            assert_true(lw_number_parse_double(t->cell[r * t->ncol + 1 + c * 7 + 3], &v));
            assert_close(v, lw_photometry_cone_cd(res.flux_30s_lm, 60), 1e-5);
            lw_profile_clear(&q);
        }
    }
    lw_rtable_free(t);
    lw_profile_clear(&p);
}

/* REFERENCES.md check values 5 and 7 [calc from the FL 1 definitions and
 * the solid angle of a cone]: beam distance 2 sqrt(I): 4,000 cd -> 126.49 m,
 * 10,000 cd -> 200.0 m; uniform cone 100 lm, 60 deg -> 118.79 cd, 120 deg
 * -> 31.831 cd.  Check value 6: I = E d^2, 2,000 lx at 2 m -> 8,000 cd, whose
 * beam distance is 2 sqrt(8000) = 178.885 m. */
static void photometry_check_values(void **state)
{
    (void)state;
    assert_close(lw_photometry_beam_m(4000), 126.49, 5e-5);
    assert_close(lw_photometry_beam_m(10000), 200.0, 1e-12);
    assert_close(lw_photometry_cone_cd(100, 60), 118.79, 5e-5);
    assert_close(lw_photometry_cone_cd(100, 120), 31.831, 5e-5);
    assert_close(lw_photometry_beam_m(2000 * 2 * 2), 178.885, 5e-6);
    assert_true(lw_photometry_beam_m(0) == 0);
}

/* Rounding rule of the specification table. */
static void spec_rounding(void **state)
{
    (void)state;
    assert_close(lw_spec_round(55.27), 55, 1e-12);
    assert_close(lw_spec_round(9.649), 9.6, 1e-12);
    assert_close(lw_spec_round(123.4), 123, 0);
    char b[32];
    lw_report_spec_hours(0.75, b, sizeof b);
    assert_string_equal(b, "45 min");
    lw_report_spec_hours(7.46, b, sizeof b);
    assert_string_equal(b, "7.5 h");
    lw_report_spec_hours(62.4, b, sizeof b);
    assert_string_equal(b, "62 h");
    /* standard power ratings with 2x margin (common practice, no source) */
    assert_close(lw_resistor_rating_w(0.1), 0.25, 0);
    assert_close(lw_resistor_rating_w(0.126), 0.333, 0);
    assert_true(isnan(lw_resistor_rating_w(6.0)));
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(pick_worst_case_by_hand),
        cmocka_unit_test(pick_never_proposes_an_unsafe_part),
        cmocka_unit_test(pick_flux_target),
        cmocka_unit_test(size_results_pass_their_own_runs),
        cmocka_unit_test(table_consistent_with_run),
        cmocka_unit_test(size_respects_the_resistor_rating),
        cmocka_unit_test(size_regulated_drive),
        cmocka_unit_test(table_notes_follow_the_conditions),
        cmocka_unit_test(photometry_check_values),
        cmocka_unit_test(spec_rounding),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
