/*
 * test_locale.c - the library's numbers do not depend on the process
 * locale.  A host program may call setlocale(LC_ALL, "") under a
 * decimal-comma locale (de_DE: "3,5"); lampwick must still read "3.0" in a
 * profile as three and write every number with a point.  Everything the
 * library prints - run reports in the three formats, the trace, charts, the
 * spec, sweep, pick, size and fit reports, a cell file, messages - is made
 * once in the C locale and once under de_DE.UTF-8 (compiled for the test
 * with localedef when the system has not got it) and must be byte for byte
 * the same.  The test checks that the locale really is in force (printf
 * gives "3,5") so that it cannot pass by not switching.
 */
#include "bundled.h"
#include <locale.h>
#include <lampwick/lampwick.h>
#include "tmpdir.h"

#define ROOT LW_SOURCE_ROOT

static void ok(lw_status st, const lw_error *e, const char *what)
{
    if (st != LW_OK)
        fail_msg("%s: %s:%d: %s", what, e->file, e->line, e->msg);
}

static void write_table(FILE *out, lw_rtable *t, lw_error *e)
{
    for (int f = 0; f < 3; f++)
        ok(lw_rtable_write(t, out, (lw_rtable_format)f, e), e, "table");
    lw_rtable_free(t);
}

/* Everything the library prints, into out. */
static void produce(FILE *out)
{
    lw_error e;
    lw_error_clear(&e);
    lw_search s = bundled_cells();
    static const char *const profiles[] = {"demo", "headlamp-18650", "lantern-drives",
                                           "coin-marker"};
    for (size_t k = 0; k < 4; k++) {
        char path[256];
        snprintf(path, sizeof path, ROOT "/profiles/%s.ini", profiles[k]);
        lw_profile p;
        ok(lw_profile_load(path, &s, &p, &e), &e, path);
        lw_run_options o = lw_run_options_default();
        o.want_trace = true;
        lw_result r;
        ok(lw_run(&p.light, &o, &r, &e), &e, "run");
        for (int f = 0; f < 3; f++)
            ok(lw_report_run(out, (lw_rtable_format)f, false, &p, &r, &e), &e, "report");
        lw_trace tr;
        ok(lw_trace_build(&p.light, &r, LW_TRACE_ROWS_MIN, &tr, &e), &e, "trace");
        ok(lw_report_trace_csv(out, &tr, &e), &e, "trace csv");
        ok(lw_plot_run(out, p.light.name, &p.light, &r, &tr, &e), &e, "plot");
        lw_trace_clear(&tr);
        lw_run_result_clear(&r);
        char text[64];
        lw_profile_value_text(&p, "led.flux_lm", text, sizeof text);
        fprintf(out, "value %s\n", text);
        lw_rtable *t;
        ok(lw_report_spec_table(&p, NULL, LW_FMT_TEXT, 1, &t, &e), &e, "spec");
        write_table(out, t, &e);
        lw_profile_clear(&p);
    }
    /* sweep, pick, size on the demo light */
    lw_profile p;
    ok(lw_profile_load(ROOT "/profiles/demo.ini", &s, &p, &e), &e, "demo");
    lw_vary v;
    ok(lw_vary_parse("drive.resistor_ohm=E12:10..100", &p, &v, &e), &e, "vary");
    lw_sweep sw;
    ok(lw_sweep_run(&p, &v, 1, 2, NULL, NULL, &sw, &e), &e, "sweep");
    lw_rtable *t;
    ok(lw_report_sweep(&sw, LW_FMT_CSV, NULL, &t, &e), &e, "sweep table");
    write_table(out, t, &e);
    lw_chart c;
    void *buf = NULL;
    ok(lw_plot_sweep(&p, &sw, &c, &buf, &e), &e, "sweep chart");
    ok(lw_plot_svg(out, &c, &e), &e, "sweep svg");
    free(buf);
    lw_sweep_clear(&sw);
    lw_vary_clear(&v);
    lw_pick pk;
    ok(lw_pick_resistor(&p, LW_TARGET_CURRENT, 0.020, 24, &pk, &e), &e, "pick");
    for (int f = 0; f < 3; f++)
        ok(lw_report_pick(out, &p, &pk, 1, LW_TARGET_CURRENT, 0.020, (lw_rtable_format)f, false,
                          &e),
           &e, "pick report");
    lw_pick_clear(&pk);
    lw_size_options so = {.runtime_h = 10, .max_series = 3, .max_parallel = 2, .eseries = 24,
                          .flux_lm = NAN, .threads = 1};
    lw_size_row *rows;
    size_t nrows;
    ok(lw_size_packs(&p, &so, &rows, &nrows, &e), &e, "size");
    ok(lw_report_size(&p, &so, rows, nrows < 5 ? nrows : 5, true, LW_FMT_TEXT, &t, &e), &e,
       "size table");
    write_table(out, t, &e);
    free(rows);
    lw_profile_clear(&p);
    /* fits */
    lw_fit_data d;
    ok(lw_fit_led_read(ROOT "/docs/examples/white-led-bench.csv", &d, &e), &e, "led data");
    lw_led_fit lin, sh;
    lw_flux_fit fx;
    ok(lw_fit_led_linear(d.i_a, d.v, d.n, &lin, &e), &e, "linear");
    ok(lw_fit_led_shockley(d.i_a, d.v, d.n, 25, &sh, &e), &e, "shockley");
    ok(lw_fit_flux(d.i_a, d.flux, d.n, &fx, &e), &e, "flux");
    for (int f = 0; f < 3; f++)
        ok(lw_report_led_fit(out, (lw_rtable_format)f, &d, &lin, &sh, &fx, 25, &e), &e,
           "led fit");
    ok(lw_report_led_section(out, &d, &lin, &sh, &fx, 25, &e), &e, "section");
    ok(lw_plot_led_fit(out, d.i_a, d.v, d.n, &lin, &sh, &e), &e, "fit plot");
    lw_fit_data_clear(&d);
    lw_cellfit_log logs[2];
    ok(lw_cellfit_log_read(ROOT "/docs/examples/nimh-aa-3r9.csv", 3.9, NAN, &logs[0], &e), &e,
       "log");
    ok(lw_cellfit_log_read(ROOT "/docs/examples/nimh-aa-8r2.csv", 8.2, NAN, &logs[1], &e), &e,
       "log");
    lw_cellfit_options co = {.cutoff_v = 1.0, .resistance_ohm = NAN, .tolerance_v = 0.005,
                             .chemistry = LW_CHEM_NIMH, .nominal_v = NAN, .name = "bench"};
    lw_cellfit fit;
    ok(lw_cellfit_fit(logs, 2, &co, &fit, &e), &e, "cell fit");
    const char *names[2] = {"a", "b"};
    ok(lw_report_cell_fit(out, &fit, names, 1.0, &e), &e, "cell fit report");
    char ini[512];
    snprintf(ini, sizeof ini, "%s/locale-cell.ini", tmp_root());
    ok(lw_cellfile_save(ini, &fit.cell, "a comment 2.5", &e), &e, "save");
    FILE *fp = fopen(ini, "r");
    assert_non_null(fp);
    char line[256];
    while (fgets(line, sizeof line, fp))
        if (strncmp(line, "curve =", 7) != 0) /* the curve's name is new every time */
            fputs(line, out);
    fclose(fp);
    lw_cell_clear(&fit.cell);
    lw_cellfit_log_clear(&logs[0]);
    lw_cellfit_log_clear(&logs[1]);
    /* a message with numbers, a number parsed and printed */
    lw_profile q;
    lw_error_clear(&e);
    const char *bad = tmp_write("bad.ini", "[pack]\ncell = LR6-alkaline\n[led]\nmodel = linear\n"
                                           "threshold_v = 2.5\nslope_ohm = 12.5\n"
                                           "flux_lm = 20\nflux_current_ma = 50\n[drive]\n"
                                           "resistor_ohm = 10\nduty_pct = 100.5\n");
    assert_int_equal(lw_profile_load(bad, &s, &q, &e), LW_EINPUT);
    lw_profile_clear(&q);
    fprintf(out, "message %s\n", e.msg);
    double x;
    assert_true(lw_number_parse("3.5", &x));
    char num[32];
    lw_number_format(num, sizeof num, x);
    fprintf(out, "number %s\n", num);
}

static char *capture(size_t *len)
{
    char *text = NULL;
    FILE *out = open_memstream(&text, len);
    assert_non_null(out);
    produce(out);
    fclose(out);
    return text;
}

/* A decimal-comma locale: the system's, else compiled for the test. */
static bool comma_locale(void)
{
    if (setlocale(LC_ALL, "de_DE.UTF-8"))
        return true;
    char dir[600], cmd[1400];
    snprintf(dir, sizeof dir, "%s/locales", tmp_root());
    snprintf(cmd, sizeof cmd,
             "mkdir -p '%s' && localedef -i de_DE -f UTF-8 '%s/de_DE.UTF-8' 2>/dev/null", dir,
             dir);
    if (system(cmd) != 0)
        return false;
    setenv("LOCPATH", dir, 1);
    return setlocale(LC_ALL, "de_DE.UTF-8") != NULL;
}

static void outputs_do_not_depend_on_the_locale(void **state)
{
    (void)state;
    assert_non_null(setlocale(LC_ALL, "C"));
    size_t n_c, n_de;
    char *in_c = capture(&n_c);
    assert_true(n_c > 100000);
    if (!comma_locale())
        fail_msg("no de_DE.UTF-8 locale: install the locales package (its de_DE source) so "
                 "that localedef can make one");
    char probe[16];
    snprintf(probe, sizeof probe, "%g", 3.5);
    assert_string_equal(probe, "3,5"); /* the host's locale really is in force */
    lw_cache_clear();
    char *in_de = capture(&n_de);
    setlocale(LC_ALL, "C");
    if (n_c != n_de || memcmp(in_c, in_de, n_c) != 0) {
        size_t i = 0;
        while (i < n_c && i < n_de && in_c[i] == in_de[i])
            i++;
        size_t from = i > 80 ? i - 80 : 0;
        fail_msg("output differs under de_DE at byte %zu:\nC:  %.160s\nde: %.160s", i,
                 in_c + from, in_de + from);
    }
    free(in_c);
    free(in_de);
}

/* The reproducer: a profile read by a host program that set the locale. */
static void a_profile_reads_under_a_comma_locale(void **state)
{
    (void)state;
    assert_true(comma_locale());
    lw_search s = bundled_cells();
    lw_profile p;
    lw_error e;
    lw_error_clear(&e);
    lw_status st = lw_profile_load(ROOT "/profiles/demo.ini", &s, &p, &e);
    setlocale(LC_ALL, "C");
    ok(st, &e, "demo.ini under de_DE");
    assert_close(p.light.led.ideality, 3.0, 0); /* demo.ini: ideality = 3.0 */
    lw_profile_clear(&p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(outputs_do_not_depend_on_the_locale),
        cmocka_unit_test(a_profile_reads_under_a_comma_locale),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
