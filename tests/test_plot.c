/*
 * test_plot.c - the SVG charts (plot.h): round ticks by the 1-2-5 rule on
 * any range, well-formed standalone SVG for every chart the library draws
 * (checked by an independent XML parser: Python's xml.dom.minidom over
 * expat, the W3C XML 1.0 rules, in tests/svgcheck.py), no non-finite number ever written, labels
 * escaped, and the data drawn inside the plot frame.
 */
#include "bundled.h"
#include "tmpdir.h"
#include <stdlib.h>
#include <lampwick/lampwick.h>

#define ROOT LW_SOURCE_ROOT

static void nice_ticks_are_round(void **state)
{
    (void)state;
    double t[LW_PLOT_TICKS_MAX];
    size_t n = lw_plot_ticks(0, 59.88, 8, t);
    assert_true(n >= 4 && n <= 8);
    for (size_t i = 0; i < n; i++) {
        double step = t[1] - t[0];
        assert_close(step, 10, 1e-12);
        assert_close(t[i], 10.0 * (double)i, 1e-12);
    }
    n = lw_plot_ticks(0.9, 1.6, 6, t);
    assert_int_equal(n, 4); /* 1.0, 1.2, 1.4, 1.6 */
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

/* The 1-2-5 rule on ranges over 24 decades, of either sign, with 2 to 12
 * ticks asked: steps are 1, 2 or 5 x 10^k, evenly spaced, inside the range
 * and less than a step from each end, never more than one beyond the count
 * asked.  (The rule: P. S. Heckbert, "Nice numbers for graph labels",
 * Graphics Gems, 1990, from memory; the checks are its definition.) */
static void ticks_follow_the_125_rule_everywhere(void **state)
{
    (void)state;
    unsigned long long x = 88172645463325252ULL; /* xorshift64 (Marsaglia 2003) */
    for (int trial = 0; trial < 20000; trial++) {
        x ^= x << 13, x ^= x >> 7, x ^= x << 17;
        double u1 = (double)(x >> 11) * 0x1p-53;
        x ^= x << 13, x ^= x >> 7, x ^= x << 17;
        double u2 = (double)(x >> 11) * 0x1p-53;
        double scale = pow(10.0, 24.0 * u1 - 12.0);
        double lo = (u2 - 0.5) * 4.0 * scale;
        double hi = lo + scale * (0.01 + 3.0 * u1 * u2);
        size_t max_ticks = 2 + (size_t)(trial % 11);
        double t[LW_PLOT_TICKS_MAX];
        size_t n = lw_plot_ticks(lo, hi, max_ticks, t);
        /* the round step is under 2.5 times the plain one, range / (max - 1),
         * so 6 ticks asked always give two or more, 4 at least one */
        size_t least = max_ticks >= 6 ? 2 : max_ticks >= 4 ? 1 : 0;
        if (n < least || n > max_ticks + 1 || n > LW_PLOT_TICKS_MAX)
            fail_msg("[%g, %g] asking %zu: %zu ticks", lo, hi, max_ticks, n);
        if (n == 0)
            continue;
        if (n == 1) {
            assert_true(t[0] >= lo && t[0] <= hi);
            continue;
        }
        double step = t[1] - t[0];
        double mant = step / pow(10.0, floor(log10(step) + 1e-9));
        if (!(fabs(mant - 1) < 1e-6 || fabs(mant - 2) < 1e-6 || fabs(mant - 5) < 1e-6))
            fail_msg("[%g, %g]: step %g is not 1, 2 or 5 x 10^k", lo, hi, step);
        for (size_t i = 1; i < n; i++)
            assert_close(t[i] - t[i - 1], step, 1e-6);
        assert_true(t[0] >= lo - 1e-6 * step && t[0] - step < lo);
        assert_true(t[n - 1] <= hi + 1e-6 * step && t[n - 1] + step > hi);
    }
    /* no ticks for what has no range */
    double t[LW_PLOT_TICKS_MAX];
    assert_int_equal(lw_plot_ticks(2, 1, 6, t), 0);
    assert_int_equal(lw_plot_ticks(0, INFINITY, 6, t), 0);
    assert_int_equal(lw_plot_ticks(NAN, 1, 6, t), 0);
    assert_int_equal(lw_plot_ticks(0, 1, 1, t), 0);
}

/* tests/svgcheck.py: parse with Python's XML parser (an independent,
 * conforming XML 1.0 parser), root <svg> in the SVG namespace, every data
 * mark inside its plot area, at least min_marks of them. */
static void assert_svg_parses(const char *path, int min_marks)
{
    char cmd[1024];
    snprintf(cmd, sizeof cmd, "python3 '%s/tests/svgcheck.py' '%s' %d", ROOT, path, min_marks);
    int rc = system(cmd);
    if (rc != 0)
        fail_msg("%s fails the SVG check (status %d)", path, rc);
}

static char *slurp(const char *path, size_t *len)
{
    FILE *fp = fopen(path, "rb");
    assert_non_null(fp);
    fseek(fp, 0, SEEK_END);
    long n = ftell(fp);
    fseek(fp, 0, SEEK_SET);
    char *b = malloc((size_t)n + 1);
    assert_non_null(b);
    *len = fread(b, 1, (size_t)n, fp);
    b[*len] = '\0';
    fclose(fp);
    return b;
}

/* No number written as nan or inf (an SVG viewer drops the element or the
 * whole drawing). */
static void assert_no_nonfinite(const char *text, const char *what)
{
    static const char *const bad[] = {"nan", "NaN", "inf'", "inf ", "inf,", "inf\""};
    for (size_t k = 0; k < sizeof bad / sizeof *bad; k++)
        if (strstr(text, bad[k]))
            fail_msg("%s writes '%s'", what, bad[k]);
}

static void check_svg_file(const char *path, const char *what, int min_marks)
{
    assert_svg_parses(path, min_marks);
    size_t len;
    char *text = slurp(path, &len);
    assert_no_nonfinite(text, what);
    free(text);
}

static FILE *open_out(const char *name, char *path)
{
    snprintf(path, 512, "%s/%s", tmp_root(), name);
    FILE *fp = fopen(path, "wb");
    assert_non_null(fp);
    return fp;
}

/* Every bundled profile's run chart, the sweep chart and the LED fit chart. */
static void every_chart_is_a_valid_svg_document(void **state)
{
    (void)state;
    static const char *const profiles[] = {"demo", "headlamp-18650", "lantern-drives",
                                           "coin-marker"};
    lw_search s = bundled_cells();
    lw_error e;
    char path[512];
    for (size_t k = 0; k < sizeof profiles / sizeof *profiles; k++) {
        char ini[256];
        snprintf(ini, sizeof ini, ROOT "/profiles/%s.ini", profiles[k]);
        lw_profile p;
        lw_error_clear(&e);
        if (lw_profile_load(ini, &s, &p, &e) != LW_OK)
            fail_msg("%s: %s", ini, e.msg);
        lw_run_options o = lw_run_options_default();
        o.want_trace = true;
        lw_result r;
        assert_int_equal(lw_run(&p.light, &o, &r, &e), LW_OK);
        lw_trace tr;
        assert_int_equal(lw_trace_build(&p.light, &r, LW_TRACE_ROWS_MIN, &tr, &e), LW_OK);
        FILE *fp = open_out("run.svg", path);
        assert_int_equal(lw_plot_run(fp, p.light.name, &p.light, &r, &tr, &e), LW_OK);
        fclose(fp);
        check_svg_file(path, ini, 100);
        size_t len;
        char *svg = slurp(path, &len);
        /* a light with a heat path gets its temperature panel, the others not */
        assert_int_equal(strstr(svg, "temperature (°C)") != NULL, p.light.thermal.enabled);
        free(svg);
        lw_trace_clear(&tr);
        lw_run_result_clear(&r);
        lw_profile_clear(&p);
    }
    /* a sweep over two keys: series per LED count, points labelled */
    lw_profile p;
    assert_int_equal(lw_profile_load(ROOT "/profiles/demo.ini", &s, &p, &e), LW_OK);
    lw_vary v[2];
    assert_int_equal(lw_vary_parse("drive.resistor_ohm=E12:10..100", &p, &v[0], &e), LW_OK);
    assert_int_equal(lw_vary_parse("pack.ambient_c=-10,20,40", &p, &v[1], &e), LW_OK);
    lw_sweep sw;
    assert_int_equal(lw_sweep_run(&p, v, 2, 2, NULL, NULL, &sw, &e), LW_OK);
    lw_chart c;
    void *buf = NULL;
    assert_int_equal(lw_plot_sweep(&p, &sw, &c, &buf, &e), LW_OK);
    assert_int_equal(c.npanels, 1);
    assert_int_equal(c.panels[0].nseries, 3); /* one per ambient temperature */
    FILE *fp = open_out("sweep.svg", path);
    assert_int_equal(lw_plot_svg(fp, &c, &e), LW_OK);
    fclose(fp);
    check_svg_file(path, "sweep chart", 3 * 10);
    free(buf);
    lw_sweep_clear(&sw);
    lw_vary_clear(&v[0]);
    lw_vary_clear(&v[1]);
    lw_profile_clear(&p);
    /* the LED fit */
    lw_fit_data d;
    assert_int_equal(lw_fit_led_read(ROOT "/docs/examples/white-led-bench.csv", &d, &e), LW_OK);
    lw_led_fit lin, sh;
    assert_int_equal(lw_fit_led_linear(d.i_a, d.v, d.n, &lin, &e), LW_OK);
    assert_int_equal(lw_fit_led_shockley(d.i_a, d.v, d.n, 25, &sh, &e), LW_OK);
    fp = open_out("fit.svg", path);
    assert_int_equal(lw_plot_led_fit(fp, d.i_a, d.v, d.n, &lin, &sh, &e), LW_OK);
    fclose(fp);
    check_svg_file(path, "LED fit chart", 200);
    fp = open_out("fit1.svg", path);
    assert_int_equal(lw_plot_led_fit(fp, d.i_a, d.v, d.n, NULL, &sh, &e), LW_OK);
    fclose(fp);
    check_svg_file(path, "LED fit chart, one model", 200);
    lw_fit_data_clear(&d);
}

/* Data a chart cannot show: a series of NaN and infinite values
 * among ordinary ones, on a log axis with zero and negative values, draws
 * the finite positive points only, all within the frame of the default
 * 900 x 560 canvas, and writes no non-finite number. */
static void nonfinite_and_nonpositive_data_are_left_out(void **state)
{
    (void)state;
    double x[8] = {1, 2, 3, 4, 5, 6, 7, 8};
    double y[8] = {10, NAN, 100, INFINITY, 0, -5, 1000, 1e4};
    lw_chart c = {0};
    c.title = "log axis";
    c.npanels = 1;
    c.x = (lw_axis){.label = "x"};
    c.panels[0].y = (lw_axis){.label = "y", .log = true};
    c.panels[0].series[c.panels[0].nseries++] = (lw_series){.name = "s", .x = x, .y = y, .n = 8};
    c.panels[0].series[c.panels[0].nseries++] =
        (lw_series){.name = "p", .x = x, .y = y, .n = 8, .points = true};
    char path[512];
    FILE *fp = open_out("log.svg", path);
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_plot_svg(fp, &c, &e), LW_OK);
    fclose(fp);
    check_svg_file(path, "log chart", 4 + 4);
    size_t len;
    char *text = slurp(path, &len);
    assert_non_null(strstr(text, "width='900'"));
    assert_non_null(strstr(text, "height='560'"));
    /* decade ticks of the log axis */
    assert_non_null(strstr(text, ">100<"));
    assert_non_null(strstr(text, ">1000<"));
    free(text);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(nice_ticks_are_round),
        cmocka_unit_test(ticks_follow_the_125_rule_everywhere),
        cmocka_unit_test(svg_text_is_always_well_formed),
        cmocka_unit_test(every_chart_is_a_valid_svg_document),
        cmocka_unit_test(nonfinite_and_nonpositive_data_are_left_out),
    };
    int rc = cmocka_run_group_tests(tests, NULL, NULL);
    tmp_cleanup();
    return rc;
}
