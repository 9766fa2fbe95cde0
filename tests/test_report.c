/*
 * test_report.c - report tables: the run columns contract, text alignment,
 * Markdown and CSV rendering, hours and warnings as printed.
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
        cmocka_unit_test(hours_formatting),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
