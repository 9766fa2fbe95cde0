/*
 * test_csvio.c - CSV reading (strict), writing (RFC 4180 quoting), and
 * atomic output files.
 */
#include "testutil.h"
#include <sys/stat.h>
#include "tmpdir.h"
#include <lampwick/lampwick.h>

static void reads_numbers_with_lines_and_quotes(void **state)
{
    (void)state;
    const char *p = tmp_write("a.csv", "Current_mA , \"forward_v\"\r\n"
                                       "10,2.6\r\n"
                                       "\n"
                                       "\"20\", 2.7\n");
    lw_csv c;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_csv_read(p, NULL, &c, &e), LW_OK);
    assert_int_equal(c.ncol, 2);
    assert_int_equal(c.nrow, 2);
    assert_int_equal(lw_csv_column(&c, "current_ma"), 0); /* case-insensitive */
    assert_int_equal(lw_csv_column(&c, "forward_v"), 1);
    assert_int_equal(lw_csv_column(&c, "nope"), -1);
    assert_close(lw_csv_at(&c, 1, 0), 20, 0);
    assert_int_equal(c.line[0], 2);
    assert_int_equal(c.line[1], 4);
    const char *req[] = {"current_ma", NULL}, *opt[] = {"forward_v", NULL};
    assert_int_equal(lw_csv_expect(&c, req, opt, &e), LW_OK);
    const char *req2[] = {"current_ma", "flux_lm", NULL};
    assert_int_equal(lw_csv_expect(&c, req2, NULL, &e), LW_EINPUT);
    assert_error_at(e, "a.csv", 1, "missing column 'flux_lm'");
    lw_csv_clear(&c);
}

/* Spreadsheet exports: a UTF-8 byte-order mark is skipped; semicolons as
 * separators get a hint. */
static void spreadsheet_exports(void **state)
{
    (void)state;
    const char *p = tmp_write("bom.csv", "\xEF\xBB\xBF" "current_ma,forward_v\r\n10,2.6\r\n");
    lw_csv c;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_csv_read(p, NULL, &c, &e), LW_OK);
    assert_int_equal(lw_csv_column(&c, "current_ma"), 0);
    lw_csv_clear(&c);
    p = tmp_write("semi.csv", "current_ma;forward_v\n10;2.6\n");
    assert_int_equal(lw_csv_read(p, NULL, &c, &e), LW_EINPUT);
    assert_error_at(e, "semi.csv", 1, "separated by commas");
}

static void refuses_unknown_and_duplicate_columns(void **state)
{
    (void)state;
    const char *p = tmp_write("b.csv", "x,y,x\n1,2,3\n");
    lw_csv c;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_csv_read(p, NULL, &c, &e), LW_OK);
    const char *req[] = {"x", "y", NULL};
    assert_int_equal(lw_csv_expect(&c, req, NULL, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "appears twice"));
    lw_csv_clear(&c);
    p = tmp_write("b.csv", "x,y,z\n1,2,3\n");
    assert_int_equal(lw_csv_read(p, NULL, &c, &e), LW_OK);
    lw_error_clear(&e);
    assert_int_equal(lw_csv_expect(&c, req, NULL, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "unknown column 'z'; expected columns: x, y"));
    lw_csv_clear(&c);
}

static void refuses_nonfinite_and_blank_fields(void **state)
{
    (void)state;
    const char *texts[] = {"x\nnan\n", "x\ninf\n", "x,y\n1,\n", "x\n1e999\n"};
    for (size_t i = 0; i < 4; i++) {
        const char *p = tmp_write("c.csv", texts[i]);
        lw_csv c;
        lw_error e;
        lw_error_clear(&e);
        assert_int_equal(lw_csv_read(p, NULL, &c, &e), LW_EINPUT);
        assert_error_at(e, "c.csv", 2, "is not a number");
        assert_null(c.v);
    }
}

static void writer_quotes_per_rfc4180(void **state)
{
    (void)state;
    const char *p = tmp_write("w.csv", "");
    FILE *fp = fopen(p, "wb");
    lw_csvw w;
    lw_csvw_init(&w, fp);
    lw_csvw_text(&w, "plain");
    lw_csvw_text(&w, "a,b");
    lw_csvw_text(&w, "say \"hi\"");
    lw_csvw_num(&w, 1.0 / 3.0);
    lw_csvw_num(&w, NAN);
    lw_csvw_end_row(&w);
    fclose(fp);
    assert_false(w.failed);
    fp = fopen(p, "rb");
    char buf[128] = "";
    size_t n = fread(buf, 1, sizeof buf - 1, fp);
    fclose(fp);
    buf[n] = '\0';
    /* RFC 4180 section 2: fields with commas or quotes are quoted, quotes
     * doubled; records end in CRLF. */
    assert_string_equal(buf,
                        "plain,\"a,b\",\"say \"\"hi\"\"\",0.3333333333333333,\r\n");
}

/* Numbers in CSV carry full precision: the shortest decimal that reads back
 * as exactly the same double (IEEE 754 binary64; 17 significant digits
 * always suffice, common practice, no source). */
static void numbers_round_trip(void **state)
{
    (void)state;
    const double vals[] = {0.1, 1.0 / 3.0, 2.0 / 3.0, 59.878917329, 1e-300, 123456789012345678.0,
                           0.30000000000000004, 4.6e-18, -2.5, 1e22};
    const char *const want[] = {"0.1", NULL, NULL, "59.878917329", "1e-300", NULL,
                                "0.30000000000000004", "4.6e-18", "-2.5", "1e+22"};
    for (size_t i = 0; i < sizeof vals / sizeof vals[0]; i++) {
        char buf[32];
        lw_number_format(buf, sizeof buf, vals[i]);
        assert_true(strtod(buf, NULL) == vals[i]);
        if (want[i])
            assert_string_equal(buf, want[i]);
    }
    char buf[32];
    lw_number_format(buf, sizeof buf, NAN);
    assert_string_equal(buf, "");
}

static void outfile_is_atomic(void **state)
{
    (void)state;
    char path[512];
    snprintf(path, sizeof path, "%s/out.txt", tmp_root());
    lw_outfile o;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_outfile_open(&o, path, &e), LW_OK);
    fputs("partial", o.fp);
    struct stat sb;
    assert_int_not_equal(stat(path, &sb), 0); /* nothing under the real name yet */
    lw_outfile_abort(&o);
    assert_int_not_equal(stat(path, &sb), 0);
    assert_int_not_equal(stat(o.tmp[0] ? o.tmp : "/nonexistent", &sb), 0);
    assert_int_equal(lw_outfile_open(&o, path, &e), LW_OK);
    fputs("whole", o.fp);
    assert_int_equal(lw_outfile_commit(&o, &e), LW_OK);
    assert_int_equal(stat(path, &sb), 0);
    assert_int_equal(sb.st_size, 5);
    lw_error_clear(&e);
    assert_int_equal(lw_outfile_open(&o, "/nonexistent-dir/x.csv", &e), LW_EIO);
}

/* The memory writer writes the same bytes as the file writer (the rows a
 * streaming sweep's workers format), growing past its first block. */
static void memory_writer_equals_file_writer(void **state)
{
    (void)state;
    const char *p = tmp_write("m.csv", "");
    FILE *fp = fopen(p, "wb");
    assert_non_null(fp);
    lw_csvw f, m;
    lw_csvw_init(&f, fp);
    lw_csvw_init_mem(&m);
    for (int row = 0; row < 500; row++) {
        lw_csvw *ws[2] = {&f, &m};
        for (int k = 0; k < 2; k++) {
            lw_csvw_text(ws[k], row % 7 ? "cell, \"hot\"" : "plain");
            lw_csvw_num(ws[k], row / 7.0);
            lw_csvw_num(ws[k], row % 5 ? 1e-300 * row : NAN);
            lw_csvw_end_row(ws[k]);
        }
    }
    fclose(fp);
    assert_false(f.failed);
    assert_false(m.failed);
    fp = fopen(p, "rb");
    assert_non_null(fp);
    char *buf = malloc(m.len + 2);
    assert_non_null(buf);
    size_t n = fread(buf, 1, m.len + 1, fp);
    fclose(fp);
    assert_int_equal(n, m.len);
    assert_int_equal(strlen(m.buf), m.len);
    assert_memory_equal(buf, m.buf, m.len);
    free(buf);
    free(m.buf);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(reads_numbers_with_lines_and_quotes),
        cmocka_unit_test(spreadsheet_exports),
        cmocka_unit_test(refuses_unknown_and_duplicate_columns),
        cmocka_unit_test(refuses_nonfinite_and_blank_fields),
        cmocka_unit_test(writer_quotes_per_rfc4180),
        cmocka_unit_test(numbers_round_trip),
        cmocka_unit_test(outfile_is_atomic),
        cmocka_unit_test(memory_writer_equals_file_writer),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
