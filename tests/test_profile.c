/*
 * test_profile.c - light profiles and cell files: every accepted form, every
 * refusal with its file:line message, --set overrides, modes, and the whole
 * bundled cell library and profile set.
 */
#include "bundled.h"
#include <glob.h>
#include "tmpdir.h"
#include <lampwick/lampwick.h>

static const char *const good_cell = "; a test cell\n"
                                     "[cell]\n"
                                     "name = test-cell\n"
                                     "chemistry = nimh\n"
                                     "nominal_v = 1.2\n"
                                     "capacity_mah = 2000\n"
                                     "rated_ma = 400\n"
                                     "peukert = 1.05\n"
                                     "cutoff_v = 1.0\n"
                                     "rechargeable = yes\n"
                                     "curve = t.curve.csv\n";
static const char *const good_curve = "depth_pct,open_circuit_v,resistance_ohm\n"
                                      "0,1.40,0.03\n"
                                      "50,1.25,0.03\n"
                                      "100,1.05,0.05\n";
static const char *const good_profile = "[light]\n"
                                        "name = test light\n"
                                        "[pack]\n"
                                        "cell = t\n"
                                        "series = 3\n"
                                        "[led]\n"
                                        "model = linear\n"
                                        "threshold_v = 2.6\n"
                                        "slope_ohm = 3\n"
                                        "flux_lm = 20\n"
                                        "flux_current_ma = 50\n"
                                        "[drive]\n"
                                        "resistor_ohm = 22\n"
                                        "[mode low]\n"
                                        "drive.resistor_ohm = 100\n";

static void write_good(void)
{
    tmp_write("t.ini", good_cell);
    tmp_write("t.curve.csv", good_curve);
}

static lw_status load(const char *name, const char *text, lw_profile *p, lw_error *e)
{
    write_good();
    const char *path = tmp_write(name, text);
    lw_error_clear(e);
    return lw_profile_load(path, NULL, p, e);
}

static void good_profile_loads_with_units_converted(void **state)
{
    (void)state;
    lw_profile p;
    lw_error e;
    assert_int_equal(load("p.ini", good_profile, &p, &e), LW_OK);
    const lw_light *l = &p.light;
    assert_string_equal(l->name, "test light");
    assert_int_equal(l->pack.series, 3);
    assert_int_equal(l->pack.parallel, 1);              /* default */
    assert_close(l->pack.ambient_c, 20, 0);              /* default */
    assert_close(l->led.flux_current_a, 0.050, 1e-15);   /* mA -> A */
    assert_close(l->pack.cell.capacity_ah, 2.0, 1e-15);  /* mAh -> Ah */
    assert_close(l->pack.cell.max_capacity_ah, 2.0, 0);  /* defaults to capacity */
    assert_close(l->cutoff.cell_v, 1.0, 0);              /* from the cell */
    assert_close(l->cutoff.relative_pct, 10, 0);
    /* Common practice, no source: small indicator LEDs are rated 20 mA
     * continuous, lampwick's default ceiling when max_current_ma is absent. */
    assert_close(l->led.max_current_a, 0.020, 1e-15);
    assert_close(l->drive.tolerance_pct, 5, 0);
    assert_int_equal(lw_profile_mode_count(&p), 1);
    assert_string_equal(lw_profile_mode_name(&p, 0), "low");
    lw_profile_clear(&p);
}

static void set_and_mode_override(void **state)
{
    (void)state;
    lw_profile p;
    lw_error e;
    assert_int_equal(load("p.ini", good_profile, &p, &e), LW_OK);
    assert_int_equal(lw_profile_apply_mode(&p, "low", &e), LW_OK);
    assert_close(p.light.drive.resistor_ohm, 100, 0);
    assert_int_equal(lw_profile_set_arg(&p, "drive.resistor_ohm=47", &e), LW_OK);
    assert_int_equal(lw_profile_set_arg(&p, "led.max_current_ma=30", &e), LW_OK);
    assert_int_equal(lw_profile_resolve(&p, &e), LW_OK);
    assert_close(p.light.drive.resistor_ohm, 47, 0);
    assert_close(p.light.led.max_current_a, 0.030, 1e-15);
    char buf[64];
    lw_profile_value_text(&p, "drive.resistor_ohm", buf, sizeof buf);
    assert_string_equal(buf, "47");
    lw_profile_value_text(&p, "led.max_current_ma", buf, sizeof buf);
    assert_string_equal(buf, "30");

    lw_error_clear(&e);
    assert_int_equal(lw_profile_set_arg(&p, "drive.resistr_ohm=47", &e), LW_EINPUT);
    assert_string_equal(e.file, "--set drive.resistr_ohm");
    assert_non_null(strstr(e.msg, "did you mean 'drive.resistor_ohm'?"));
    lw_error_clear(&e);
    assert_int_equal(lw_profile_set_arg(&p, "drive.resistor_ohm=-1", &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "expected a number >= 0"));
    lw_error_clear(&e);
    assert_int_equal(lw_profile_set_arg(&p, "resistor_ohm", &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "section.key=value"));
    lw_error_clear(&e);
    assert_int_equal(lw_profile_apply_mode(&p, "turbo", &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "the modes are: low"));
    /* switching the cell by --set reloads it */
    tmp_write("u.ini", "[cell]\nname = other\nchemistry = alkaline\nnominal_v = 1.5\n"
                       "capacity_mah = 2500\nrated_ma = 100\ncutoff_v = 0.9\n"
                       "rechargeable = no\ncurve = t.curve.csv\n");
    lw_error_clear(&e);
    assert_int_equal(lw_profile_set_arg(&p, "pack.cell=u", &e), LW_OK);
    assert_int_equal(lw_profile_resolve(&p, &e), LW_OK);
    assert_string_equal(p.light.pack.cell.name, "other");
    lw_profile_clear(&p);
}

/* Each refusal: the profile text, the file it must name, line, message. */
static void profile_refusals(void **state)
{
    (void)state;
    struct {
        const char *text;
        const char *file;
        int line;
        const char *msg;
    } cases[] = {
        {"[pack]\ncell = t\n[led]\nmodel = constant\nforward_v = 2\nflux_lm = 1\n"
         "flux_current_ma = 20\n[drive]\nresistr_ohm = 33\n",
         "q.ini", 9, "did you mean 'drive.resistor_ohm'?"},
        {"[pack]\ncell = t\n[led]\nmodel = constant\nforward_v = 2\nflux_lm = 1\n"
         "flux_current_ma = 20\n[drive]\nresistor_ohm = 33\n[bogus]\nx = 1\n",
         "q.ini", 10, "unknown section [bogus]"},
        {"[pack]\ncell = t\n[led]\nmodel = constant\nflux_lm = 1\nflux_current_ma = 20\n"
         "[drive]\nresistor_ohm = 33\n",
         "q.ini", 4, "needs the key 'forward_v'"},
        {"[pack]\nseries = 2\n[led]\nmodel = constant\nforward_v = 2\nflux_lm = 1\n"
         "flux_current_ma = 20\n[drive]\nresistor_ohm = 33\n",
         "q.ini", 1, "missing the key 'cell'"},
        {"[pack]\ncell = t\n[led]\nmodel = constant\nforward_v = 2\nflux_lm = 1\n"
         "flux_current_ma = 20\n[drive]\nresistor_ohm = 33\n[cutoff]\nrelative_pct = 100\n",
         "q.ini", 11, "< 100"},
        {"[pack]\ncell = t\nseries = 0\n", "q.ini", 3, "expected an integer >= 1"},
        {"[pack]\ncell = t\n[led]\nmodel = laser\n", "q.ini", 4,
         "expected one of constant, linear, shockley, table"},
        {"[pack]\ncell = t\n[led]\nmodel = constant\nforward_v = 2\n[drive]\n"
         "resistor_ohm = 33\n",
         "q.ini", 3, "needs the light output"},
        {"[pack]\ncell = t\n[led]\nmodel = constant\nforward_v = 2\nflux_lm = 1\n"
         "flux_current_ma = 20\nflux_file = f.csv\n[drive]\nresistor_ohm = 33\n",
         "q.ini", 8, "either flux_file or flux_lm"},
        {"[pack]\ncell = nosuchcell\n[led]\nmodel = constant\nforward_v = 2\nflux_lm = 1\n"
         "flux_current_ma = 20\n[drive]\nresistor_ohm = 33\n",
         "q.ini", 2, "no cell named 'nosuchcell'"},
        {"[pack]\ncell = t\n[led]\nmodel = table\niv_file = missing.csv\nflux_lm = 1\n"
         "flux_current_ma = 20\n[drive]\nresistor_ohm = 33\n",
         "q.ini", 5, "[led] iv_file: cannot open"},
        {"[pack]\ncell = t\n[led]\nmodel = constant\nforward_v = 2\nflux_lm = 1\n"
         "flux_current_ma = 20\n[drive]\nresistor_ohm = 33\n[mode x]\ndrive.resistor = 5\n",
         "q.ini", 11, "did you mean 'drive.resistor_ohm'?"},
        {"[pack]\ncell = t\n[led]\nmodel = constant\nforward_v = 2\nflux_lm = 1\n"
         "flux_current_ma = 20\n[drive]\nresistor_ohm = 33\n[mode x]\nresistor_ohm = 5\n",
         "q.ini", 11, "expected section.key"},
        {"[pack]\ncell = t\n[led]\nmodel = constant\nforward_v = 2\nflux_lm = 1\n"
         "flux_current_ma = 20\n[drive]\ntype = converter\nset_ma = 100\n",
         "q.ini", 9, "exactly one of efficiency_pct and efficiency_file"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        lw_profile p;
        lw_error e;
        if (load("q.ini", cases[i].text, &p, &e) != LW_EINPUT)
            fail_msg("case %zu accepted", i);
        assert_error_at(e, cases[i].file, cases[i].line, cases[i].msg);
        lw_profile_clear(&p);
    }
}

/* Refusals inside the cell file and its CSV curve. */
static void cell_refusals(void **state)
{
    (void)state;
    struct {
        const char *cell;
        const char *curve;
        const char *file;
        int line;
        const char *msg;
    } cases[] = {
        {"[cell]\nname = c\nchemistry = nimh\nnominal_v = 1.2\ncapacity_mah = 2000\n"
         "rated_ma = 400\ncutoff_v = 1.0\nrechargeable = yes\ncurve = nothere.csv\n",
         NULL, "c.ini", 9, "[cell] curve: cannot open"},
        {NULL, "depth_pct,open_circuit_v,resistance_ohm\n0,1.4,0.03\n60,1.3,0.03\n"
               "50,1.25,0.03\n100,1.05,0.05\n",
         "c.curve.csv", 4, "does not increase"},
        {NULL, "depth_pct,open_circuit_v,resistance_ohm\n0,1.4,0.03\n50,1.45,0.03\n"
               "100,1.05,0.05\n",
         "c.curve.csv", 3, "rises with depth"},
        {NULL, "depth_pct,open_circuit_v,resistance_ohm\n0,1.4,0.03\n50,1.3\n100,1.05,0.05\n",
         "c.curve.csv", 3, "row has 2 fields but the header has 3"},
        {NULL, "depth_pct,open_circuit_v,resistance_ohm\n0,1.4,0.03\n50,abc,0.03\n"
               "100,1.05,0.05\n",
         "c.curve.csv", 3, "column 'open_circuit_v': 'abc' is not a number"},
        {NULL, "depth_pct,open_circuit_v,resistance_ohm\n0,1.4,0.03\n50,1.3,0\n"
               "100,1.05,0.05\n",
         "c.curve.csv", 3, "expected a positive resistance"},
        {NULL, "depth_pct,open_circuit_v,resistance_ohm\n0,1.4,0.03\n90,1.05,0.05\n",
         "c.curve.csv", 3, "must end at 100"},
        {NULL, "depth_pct,ocv_v,resistance_ohm\n0,1.4,0.03\n100,1.05,0.05\n", "c.curve.csv", 1,
         "missing column 'open_circuit_v'"},
        {NULL, "", "c.curve.csv", 1, "empty"},
        {NULL, "depth_pct,open_circuit_v,resistance_ohm\n", "c.curve.csv", 1, "no data rows"},
        {NULL, "depth_pct,open_circuit_v,resistance_ohm\n0,\"1.4,0.03\n", "c.curve.csv", 2,
         "CSV syntax"},
        {"[cell]\nname = c\nchemistry = nimh\nnominal_v = 1.2\ncapacity_mah = 2000\n"
         "max_capacity_mah = 1000\nrated_ma = 400\ncutoff_v = 1.0\nrechargeable = yes\n"
         "curve = c.curve.csv\n",
         NULL, "c.ini", 6, "below capacity_mah"},
        {"[cell]\nname = c\nchemistry = unobtainium\n", NULL, "c.ini", 3, "expected one of"},
        {"[cell]\nname = c\nchemistry = nimh\nnominal_v = 1.2\ncapacity_mah = 2000\n"
         "rated_ma = 400\ncutoff_v = 1.5\nrechargeable = yes\ncurve = c.curve.csv\n",
         NULL, "c.ini", 7, "not below the fresh open-circuit voltage"},
        {"[cell]\nname = c\nchemistry = nimh\nnominal_v = 1.2\ncapacity_mah = 2000\n"
         "rated_ma = 400\nrechargeable = yes\ncurve = c.curve.csv\n",
         NULL, "c.ini", 1, "missing the key 'cutoff_v'"},
        {"[cell]\nname = c\nchemistry = nimh\npeukrt = 1.1\n", NULL, "c.ini", 4,
         "did you mean 'cell.peukert'?"},
    };
    const char *cell_ok = "[cell]\nname = c\nchemistry = nimh\nnominal_v = 1.2\n"
                          "capacity_mah = 2000\nrated_ma = 400\ncutoff_v = 1.0\n"
                          "rechargeable = yes\ncurve = c.curve.csv\n";
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        const char *path = tmp_write("c.ini", cases[i].cell ? cases[i].cell : cell_ok);
        tmp_write("c.curve.csv", cases[i].curve ? cases[i].curve : good_curve);
        lw_cell c;
        lw_error e;
        lw_error_clear(&e);
        if (lw_cellfile_load(path, &c, &e) != LW_EINPUT)
            fail_msg("case %zu accepted", i);
        assert_error_at(e, cases[i].file, cases[i].line, cases[i].msg);
        assert_null(c.ocv);
    }
}

/* Accepted forms: a cell named by a path relative to the profile, every
 * spelling of yes/no, comments of both kinds, units with prefixes. */
static void accepted_forms(void **state)
{
    (void)state;
    write_good();
    const char *path = tmp_write("forms.ini",
                                 "# a comment\n"
                                 "[pack]\n"
                                 "cell = ./t.ini ; inline comment\n"
                                 "[led]\n"
                                 "model = constant\n"
                                 "forward_v = 2.9\n"
                                 "flux_lm = 20\n"
                                 "flux_current_ma = 50\n"
                                 "[drive]\n"
                                 "resistor_ohm = 0\n");
    lw_profile p;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_profile_load(path, NULL, &p, &e), LW_OK);
    assert_string_equal(p.light.pack.cell.name, "test-cell");
    assert_close(p.light.drive.resistor_ohm, 0, 0); /* 0 ohm is allowed */
    lw_profile_clear(&p);
    const char *yes[] = {"yes", "true", "1", "on"}, *no[] = {"no", "false", "0", "off"};
    for (int k = 0; k < 4; k++) {
        for (int v = 0; v < 2; v++) {
            char text[400];
            snprintf(text, sizeof text,
                     "[cell]\nname = b\nchemistry = nimh\nnominal_v = 1.2\ncapacity_mah = 2000\n"
                     "rated_ma = 400\ncutoff_v = 1.0\nrechargeable = %s\ncurve = t.curve.csv\n",
                     v ? yes[k] : no[k]);
            lw_cell c;
            lw_error_clear(&e);
            assert_int_equal(lw_cellfile_load(tmp_write("b.ini", text), &c, &e), LW_OK);
            assert_int_equal(c.rechargeable, v == 1);
            lw_cell_clear(&c);
        }
    }
}

static void search_path_finds_cells(void **state)
{
    (void)state;
    lw_search s;
    memset(&s, 0, sizeof s);
    lw_search_add_list(&s, "/nonexistent:" LW_SOURCE_ROOT "/cells");
    assert_int_equal(s.n, 2);
    char path[512];
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_cellfile_find("LR6-alkaline", "/tmp", &s, path, sizeof path, &e), LW_OK);
    assert_non_null(strstr(path, "cells/LR6-alkaline.ini"));
    lw_error_clear(&e);
    assert_int_equal(lw_cellfile_find("nope", "/tmp", &s, path, sizeof path, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "/nonexistent"));
}

/* Every bundled cell file loads, and its numbers are physically sensible. */
static void cell_library_loads(void **state)
{
    (void)state;
    glob_t g;
    assert_int_equal(glob(LW_SOURCE_ROOT "/cells/*.ini", 0, NULL, &g), 0);
    assert_true(g.gl_pathc >= 7);
    for (size_t i = 0; i < g.gl_pathc; i++) {
        lw_cell c;
        lw_error e;
        lw_error_clear(&e);
        if (lw_cellfile_load(g.gl_pathv[i], &c, &e) != LW_OK)
            fail_msg("%s: %s:%d: %s", g.gl_pathv[i], e.file, e.line, e.msg);
        assert_true(c.capacity_ah > 0 && c.max_capacity_ah >= c.capacity_ah);
        assert_int_equal(lw_interp_direction(c.ocv, 0), -1);
        assert_true(c.cutoff_v < c.ocv->y[0]);
        assert_true(c.nominal_v < c.ocv->y[0] && c.nominal_v > c.cutoff_v);
        assert_true(c.mass_g > 0);
        lw_cell_clear(&c);
    }
    globfree(&g);
}

/* Every bundled profile loads with each of its modes. */
static void bundled_profiles_load(void **state)
{
    (void)state;
    glob_t g;
    assert_int_equal(glob(LW_SOURCE_ROOT "/profiles/*.ini", 0, NULL, &g), 0);
    assert_true(g.gl_pathc >= 1);
    lw_search s = bundled_cells();
    for (size_t i = 0; i < g.gl_pathc; i++) {
        lw_profile p;
        lw_error e;
        lw_error_clear(&e);
        if (lw_profile_load(g.gl_pathv[i], &s, &p, &e) != LW_OK)
            fail_msg("%s:%d: %s", e.file, e.line, e.msg);
        for (size_t m = 0; m < lw_profile_mode_count(&p); m++) {
            lw_profile q;
            assert_int_equal(lw_profile_copy(&q, &p, &e), LW_OK);
            assert_int_equal(lw_profile_apply_mode(&q, lw_profile_mode_name(&p, m), &e), LW_OK);
            assert_int_equal(lw_profile_resolve(&q, &e), LW_OK);
            lw_profile_clear(&q);
        }
        lw_profile_clear(&p);
    }
    globfree(&g);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(good_profile_loads_with_units_converted),
        cmocka_unit_test(set_and_mode_override),
        cmocka_unit_test(profile_refusals),
        cmocka_unit_test(cell_refusals),
        cmocka_unit_test(accepted_forms),
        cmocka_unit_test(search_path_finds_cells),
        cmocka_unit_test(cell_library_loads),
        cmocka_unit_test(bundled_profiles_load),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
