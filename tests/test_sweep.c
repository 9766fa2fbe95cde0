/*
 * test_sweep.c - --vary parsing and sweeps: every row equals the single run
 * with the same --set values, and threads do not change results or order.
 */
#include "testutil.h"
#include "fixture.h"

static void vary_forms(void **state)
{
    (void)state;
    lw_vary v;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_vary_parse("drive.resistor_ohm=22,4k7,1M", NULL, &v, &e), LW_OK);
    assert_int_equal(v.n, 3);
    assert_string_equal(v.values[1], "4700");
    assert_string_equal(v.values[2], "1000000");
    lw_vary_clear(&v);
    assert_int_equal(lw_vary_parse("pack.series=1..4", NULL, &v, &e), LW_OK);
    assert_int_equal(v.n, 4);
    assert_string_equal(v.values[3], "4");
    lw_vary_clear(&v);
    assert_int_equal(lw_vary_parse("pack.ambient_c=-20..20:10", NULL, &v, &e), LW_OK);
    assert_int_equal(v.n, 5);
    assert_string_equal(v.values[0], "-20");
    lw_vary_clear(&v);
    /* IEC 60063 E12 from 100 to 1k: 12 values and 1000 */
    assert_int_equal(lw_vary_parse("drive.resistor_ohm=E12:100..1k", NULL, &v, &e), LW_OK);
    assert_int_equal(v.n, 13);
    assert_string_equal(v.values[5], "270");
    lw_vary_clear(&v);
    assert_int_equal(lw_vary_parse("pack.cell=LR6-alkaline,HR6-nimh", NULL, &v, &e), LW_OK);
    assert_string_equal(v.values[1], "HR6-nimh");
    lw_vary_clear(&v);
    lw_profile p;
    load_fixture("[mode a]\ndrive.resistor_ohm = 33\n[mode b]\ndrive.resistor_ohm = 68\n", &p);
    lw_search_add(&p.search, LW_SOURCE_ROOT "/cells");
    assert_int_equal(lw_vary_parse("pack.cell=all", &p, &v, &e), LW_OK);
    assert_true(v.n >= 7);
    lw_vary_clear(&v);
    assert_int_equal(lw_vary_parse("mode=all", &p, &v, &e), LW_OK);
    assert_int_equal(v.n, 2);
    assert_string_equal(v.values[1], "b");
    lw_vary_clear(&v);
    lw_error_clear(&e);
    assert_int_equal(lw_vary_parse("mode=a,zz", &p, &v, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "no [mode zz]"));
    lw_profile_clear(&p);
}

static void vary_refusals_show_the_forms(void **state)
{
    (void)state;
    const char *bad[] = {"drive.resistor_ohm",      "drive.resistor_ohm=",
                         "drive.resistor_ohm=1..",  "drive.resistor_ohm=5..1",
                         "drive.resistor_ohm=E24:1k..10", "drive.resistor_ohm=1..4:0",
                         "drive.resistor_ohm=22,,33", "drive.resistor_ohm=22,abc",
                         "led.model=1..3",          "drive.type=all"};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        lw_vary v;
        lw_error e;
        lw_error_clear(&e);
        if (lw_vary_parse(bad[i], NULL, &v, &e) != LW_EINPUT)
            fail_msg("accepted '%s'", bad[i]);
        assert_string_equal(e.file, "--vary");
        assert_non_null(strstr(e.msg, "E24:10..1k"));
    }
    lw_vary v;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_vary_parse("drive.resistr_ohm=1,2", NULL, &v, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "did you mean 'drive.resistor_ohm'"));
}

/* Each row of a 2-key grid equals a single run with the same --set values,
 * bit for bit; and the grid order is the nested order of the --vary options. */
/* The fixture profile and two varied keys, the cell first. */
static void fixture_with_varies(lw_profile *p, lw_vary v[2], const char *resistors)
{
    load_fixture(NULL, p);
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_vary_parse("pack.cell=flat,slope", NULL, &v[0], &e), LW_OK);
    assert_int_equal(lw_vary_parse(resistors, NULL, &v[1], &e), LW_OK);
}

static void sweep_rows_equal_individual_runs(void **state)
{
    (void)state;
    lw_profile p;
    lw_vary v[2];
    lw_error e;
    lw_error_clear(&e);
    fixture_with_varies(&p, v, "drive.resistor_ohm=E12:10..100");
    lw_sweep sw;
    assert_int_equal(lw_sweep_run(&p, v, 2, 2, NULL, NULL, &sw, &e), LW_OK);
    assert_int_equal(sw.n, 2 * 13);
    for (size_t r = 0; r < sw.n; r++) {
        assert_int_equal(sw.index[r * 2], r / 13);
        assert_int_equal(sw.index[r * 2 + 1], r % 13);
        lw_profile q;
        assert_int_equal(lw_profile_copy(&q, &p, &e), LW_OK);
        char arg[128];
        snprintf(arg, sizeof arg, "pack.cell=%s", v[0].values[r / 13]);
        assert_int_equal(lw_profile_set_arg(&q, arg, &e), LW_OK);
        snprintf(arg, sizeof arg, "drive.resistor_ohm=%s", v[1].values[r % 13]);
        assert_int_equal(lw_profile_set_arg(&q, arg, &e), LW_OK);
        assert_int_equal(lw_profile_resolve(&q, &e), LW_OK);
        lw_result res;
        lw_run_options o = lw_run_options_default();
        assert_int_equal(lw_run(&q.light, &o, &res, &e), LW_OK);
        assert_true(res.runtime_h == sw.cases[r].res.runtime_h);
        assert_true(res.lumen_hours == sw.cases[r].res.lumen_hours);
        assert_int_equal(res.solves, sw.cases[r].res.solves);
        lw_profile_clear(&q);
    }
    /* one thread gives the same rows in the same order */
    lw_sweep one;
    assert_int_equal(lw_sweep_run(&p, v, 2, 1, NULL, NULL, &one, &e), LW_OK);
    for (size_t r = 0; r < sw.n; r++)
        assert_true(one.cases[r].res.runtime_h == sw.cases[r].res.runtime_h);
    lw_sweep_clear(&one);
    lw_sweep_clear(&sw);
    lw_vary_clear(&v[0]);
    lw_vary_clear(&v[1]);
    lw_profile_clear(&p);
}

static void sweep_reports_a_bad_row(void **state)
{
    (void)state;
    lw_profile p;
    load_fixture(NULL, &p);
    lw_vary v;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_vary_parse("pack.cell=flat,nosuch", NULL, &v, &e), LW_OK);
    lw_sweep sw;
    assert_int_equal(lw_sweep_run(&p, &v, 1, 2, NULL, NULL, &sw, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "no cell named 'nosuch'"));
    lw_vary_clear(&v);
    lw_profile_clear(&p);
}

/* The table of a sweep written as its rows complete (each worker formats
 * its own) is byte for byte the table of the whole sweep, in every format
 * and on one, two or three threads; a row that cannot be built stops the
 * sweep with its error, and no row names it. */
static char *stream_text(const lw_profile *p, const lw_vary *v, size_t nv, int threads,
                         lw_rtable_format fmt, lw_status *st, lw_error *e)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *fp = open_memstream(&buf, &len);
    assert_non_null(fp);
    lw_sweep sw;
    *st = lw_report_sweep_stream(p, v, nv, threads, fmt, false, NULL, fp, NULL, NULL, &sw, e);
    if (*st == LW_OK)
        lw_sweep_clear(&sw);
    fclose(fp);
    return buf;
}

static void streamed_table_equals_the_whole(void **state)
{
    (void)state;
    lw_profile p;
    lw_vary v[2];
    lw_error e;
    lw_error_clear(&e);
    fixture_with_varies(&p, v, "drive.resistor_ohm=5..400:5");
    lw_sweep sw;
    assert_int_equal(lw_sweep_run(&p, v, 2, 2, NULL, NULL, &sw, &e), LW_OK);
    assert_true(sw.n > 2 * LW_SWEEP_WINDOW_PER_THREAD); /* past the window */
    const lw_rtable_format fmts[] = {LW_FMT_CSV, LW_FMT_MD, LW_FMT_TEXT};
    for (size_t f = 0; f < 3; f++) {
        lw_rtable *t = NULL;
        assert_int_equal(lw_report_sweep(&sw, fmts[f], NULL, &t, &e), LW_OK);
        char *whole = NULL;
        size_t len = 0;
        FILE *fp = open_memstream(&whole, &len);
        assert_non_null(fp);
        assert_int_equal(lw_rtable_write(t, fp, fmts[f], &e), LW_OK);
        fclose(fp);
        lw_rtable_free(t);
        for (int threads = 1; threads <= 3; threads++) {
            lw_status st;
            char *streamed = stream_text(&p, v, 2, threads, fmts[f], &st, &e);
            assert_int_equal(st, LW_OK);
            assert_string_equal(streamed, whole);
            free(streamed);
        }
        free(whole);
    }
    lw_sweep_clear(&sw);
    lw_vary_clear(&v[0]);
    lw_vary_clear(&v[1]);
    /* a bad row: its error */
    lw_vary bad;
    assert_int_equal(lw_vary_parse("pack.cell=flat,slope,nosuch", NULL, &bad, &e), LW_OK);
    for (int threads = 1; threads <= 2; threads++) {
        lw_status st;
        char *out = stream_text(&p, &bad, 1, threads, LW_FMT_CSV, &st, &e);
        assert_int_equal(st, LW_EINPUT);
        assert_non_null(strstr(e.msg, "no cell named 'nosuch'"));
        assert_null(strstr(out, "nosuch"));
        free(out);
    }
    lw_vary_clear(&bad);
    lw_profile_clear(&p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(vary_forms),
        cmocka_unit_test(vary_refusals_show_the_forms),
        cmocka_unit_test(sweep_rows_equal_individual_runs),
        cmocka_unit_test(sweep_reports_a_bad_row),
        cmocka_unit_test(streamed_table_equals_the_whole),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
