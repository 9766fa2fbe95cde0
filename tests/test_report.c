/*
 * test_report.c - report tables: the run columns contract, text alignment,
 * Markdown and CSV rendering, and round tick values for plots.
 */
#include "testutil.h"
#include "tmpdir.h"
#include <lampwick/lampwick.h>

static char *render(const lw_rtable *t, lw_rtable_format fmt)
{
    static char buf[4096];
    const char *p = tmp_write("r.txt", "");
    FILE *fp = fopen(p, "wb");
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_rtable_write(t, fp, fmt, &e), LW_OK);
    fclose(fp);
    fp = fopen(p, "rb");
    size_t n = fread(buf, 1, sizeof buf - 1, fp);
    fclose(fp);
    buf[n] = '\0';
    return buf;
}

/* The CSV columns documented in docs/formats.md must all be present. */
static void run_columns_contract(void **state)
{
    (void)state;
    const char *need[] = {"runtime_h",        "end_reason",        "initial_led_ma",
                          "initial_pack_ma",  "initial_flux_lm",   "time_to_half_h",
                          "lumen_hours",      "energy_led_wh",     "energy_resistor_wh",
                          "energy_internal_wh", "peak_resistor_w", "solves",
                          "regulated_h",      "energy_driver_wh",  "warnings"};
    for (size_t i = 0; i < sizeof need / sizeof need[0]; i++) {
        bool found = false;
        for (size_t k = 0; k < lw_report_run_ncolumns; k++)
            found = found || !strcmp(lw_report_run_columns[k], need[i]);
        if (!found)
            fail_msg("column %s missing", need[i]);
    }
}

static lw_rtable *sample(void)
{
    lw_error e;
    lw_error_clear(&e);
    lw_rtable *t = lw_rtable_new(2, &e);
    assert_int_equal(lw_rtable_head(t, 0, "cell", &e), LW_OK);
    assert_int_equal(lw_rtable_head(t, 1, "runtime_h", &e), LW_OK);
    size_t r;
    assert_int_equal(lw_rtable_add_row(t, &r, &e), LW_OK);
    assert_int_equal(lw_rtable_set(t, r, 0, "LR6|x", &e), LW_OK);
    assert_int_equal(lw_rtable_setf(t, r, 1, &e, "%.1f", 12.5), LW_OK);
    assert_int_equal(lw_rtable_add_row(t, &r, &e), LW_OK);
    assert_int_equal(lw_rtable_set(t, r, 0, "FR6", &e), LW_OK);
    assert_int_equal(lw_rtable_set(t, r, 1, "100", &e), LW_OK);
    assert_int_equal(lw_rtable_note(t, "note one", &e), LW_OK);
    assert_int_equal(e.code, LW_OK);
    return t;
}

static void text_md_csv_rendering(void **state)
{
    (void)state;
    lw_rtable *t = sample();
    assert_string_equal(render(t, LW_FMT_TEXT), "cell   runtime_h\n"
                                                "-----  ---------\n"
                                                "LR6|x       12.5\n"
                                                "FR6          100\n"
                                                "\n"
                                                "note one\n");
    assert_string_equal(render(t, LW_FMT_MD), "| cell | runtime_h |\n"
                                              "| :--- | ---: |\n"
                                              "| LR6\\|x | 12.5 |\n"
                                              "| FR6 | 100 |\n"
                                              "\n"
                                              "note one\n");
    assert_string_equal(render(t, LW_FMT_CSV), "cell,runtime_h\r\nLR6|x,12.5\r\nFR6,100\r\n");
    lw_rtable_free(t);
}

static void nice_ticks_are_round(void **state)
{
    (void)state;
    double t[33];
    size_t n = lw_plot_ticks(0, 59.88, 8, t);
    assert_true(n >= 4 && n <= 8);
    for (size_t i = 0; i < n; i++) {
        double step = t[1] - t[0];
        assert_close(step, 10, 1e-12);
        assert_close(t[i], 10.0 * (double)i, 1e-12);
    }
    n = lw_plot_ticks(0.9, 1.6, 6, t);
    assert_close(t[0], 1.0, 1e-12);
    assert_close(t[1] - t[0], 0.2, 1e-12);
    assert_int_equal(lw_plot_ticks(1, 1, 6, t), 0);
}

/* Whatever bytes a label holds, the SVG is well-formed XML 1.0 (W3C XML
 * 1.0, section 2.2 "Characters" and 2.4 "Character Data"): valid UTF-8, no
 * control character but tab and newline, markup characters escaped. */
static void svg_text_is_always_well_formed(void **state)
{
    (void)state;
    const char *bad = "a\x01" "b\x1b[31m\xff\xc0\xaf" "c <&> \"q\" \xe2\x82\xac";
    double x[2] = {1, 2}, y[2] = {3, 4};
    const char *labels[2] = {bad, "ok"};
    lw_chart c = {0};
    c.title = bad;
    c.subtitle = bad;
    c.npanels = 1;
    c.x = (lw_axis){.label = bad};
    c.panels[0].y = (lw_axis){.label = bad};
    c.panels[0].series[c.panels[0].nseries++] =
        (lw_series){.name = bad, .x = x, .y = y, .n = 2, .points = true, .labels = labels};
    c.panels[0].refs[c.panels[0].nrefs++] = (lw_refline){3.5, bad};
    char *text = NULL;
    size_t len = 0;
    FILE *fp = open_memstream(&text, &len);
    assert_non_null(fp);
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_plot_svg(fp, &c, &e), LW_OK);
    fclose(fp);
    size_t at;
    assert_true(lw_text_utf8_valid(text, len, &at));
    for (size_t i = 0; i < len; i++)
        if ((unsigned char)text[i] < 0x20 && text[i] != '\n' && text[i] != '\t')
            fail_msg("control byte 0x%02x at %zu", (unsigned char)text[i], i);
    assert_non_null(strstr(text, "&lt;&amp;&gt;"));
    assert_non_null(strstr(text, "\xef\xbf\xbd")); /* U+FFFD for what is not a character */
    assert_non_null(strstr(text, "\xe2\x82\xac")); /* a valid character kept as it is */
    assert_null(strstr(text, "<&>"));
    free(text);
}

static void hours_formatting(void **state)
{
    (void)state;
    char b[64];
    lw_report_hours(0.5, b, sizeof b);
    assert_string_equal(b, "30.0 min");
    lw_report_hours(12.345, b, sizeof b);
    assert_string_equal(b, "12.35 h");
    lw_report_hours(NAN, b, sizeof b);
    assert_string_equal(b, "not reached");
    char w[128];
    lw_report_warnings(LW_WARN_LED_OVER_MAX | LW_WARN_RESISTOR_HOT, w, sizeof w);
    assert_string_equal(w, "led-over-max;resistor-hot");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(run_columns_contract),
        cmocka_unit_test(text_md_csv_rendering),
        cmocka_unit_test(nice_ticks_are_round),
        cmocka_unit_test(hours_formatting),
        cmocka_unit_test(svg_text_is_always_well_formed),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
