/*
 * test_cellfile.c - cell files written and read back: every value reads
 * back as written (hostile names refused, never altered), the pair of files
 * is replaced whole or not at all, and the cell list skips what is not a
 * cell file.
 */
#include "testutil.h"
#include <sys/stat.h>
#include <unistd.h>
#include "tmpdir.h"
#include <lampwick/lampwick.h>

static lw_cell small_cell(const char *name)
{
    lw_cell c;
    memset(&c, 0, sizeof c);
    lw_text_copy(c.name, name, sizeof c.name);
    c.chemistry = LW_CHEM_NIMH;
    c.nominal_v = 1.2;
    c.capacity_ah = 2.0;
    c.rated_a = 0.4;
    c.peukert = 1.05;
    c.max_capacity_ah = 2.1;
    c.cutoff_v = 1.0;
    c.rechargeable = true;
    const double d[] = {0, 0.5, 1}, v[] = {1.4, 1.25, 0.9}, r[] = {0.03, 0.033, 0.12};
    lw_error e;
    lw_error_clear(&e);
    c.ocv = lw_interp_new(d, v, 3, &e);
    c.res = lw_interp_new(d, r, 3, &e);
    return c;
}

/* Names that read back as written are kept exactly; names that could not
 * (a newline that would start a new section, an inline comment, a blank at
 * an end, a control character, invalid UTF-8) are refused with a message. */
static void names_round_trip_or_are_refused(void **state)
{
    (void)state;
    const char *good[] = {"AA", "AA sample 7", "café-cell", "x-1_2.3 (batch)"};
    const char *bad[] = {"AA\n[mode evil]", "AA ; batch 7", "AA # x", " AA", "AA ",
                         "A\x01" "B", "A\xff", "a=b", "[cell]", ""};
    char path[600];
    snprintf(path, sizeof path, "%s/rt.ini", tmp_root());
    for (size_t i = 0; i < sizeof good / sizeof good[0]; i++) {
        lw_cell c = small_cell(good[i]);
        lw_error e;
        lw_error_clear(&e);
        assert_int_equal(lw_cellfile_save(path, &c, "a comment\nwith\x1b[31m escapes", &e), LW_OK);
        lw_cell back;
        assert_int_equal(lw_cellfile_load(path, &back, &e), LW_OK);
        assert_string_equal(back.name, good[i]);
        assert_close(back.capacity_ah, c.capacity_ah, 1e-15); /* full precision */
        assert_close(lw_interp_linear(back.res, 1.0), 0.12, 1e-15);
        lw_cell_clear(&back);
        lw_cell_clear(&c);
    }
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        lw_cell c = small_cell("ok");
        lw_text_copy(c.name, bad[i], sizeof c.name);
        lw_error e;
        lw_error_clear(&e);
        if (lw_cellfile_save(path, &c, NULL, &e) != LW_EINPUT)
            fail_msg("name %zu was written", i);
        assert_non_null(strstr(e.msg, "cell name"));
        lw_cell_clear(&c);
    }
}

static int count_curves(const char *base)
{
    char cmd[700];
    snprintf(cmd, sizeof cmd, "ls %s/%s.curve-*.csv 2>/dev/null | wc -l", tmp_root(), base);
    FILE *fp = popen(cmd, "r");
    int n = -1;
    if (fp) {
        if (fscanf(fp, "%d", &n) != 1)
            n = -1;
        pclose(fp);
    }
    return n;
}

/* The pair is replaced whole: a second save leaves one curve (the new one,
 * named by the new cell file); a save whose cell file cannot be written
 * leaves the old pair as it was and no new curve. */
static void pair_replaced_whole_or_not_at_all(void **state)
{
    (void)state;
    char path[600];
    snprintf(path, sizeof path, "%s/pair.ini", tmp_root());
    lw_cell c = small_cell("first");
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_cellfile_save(path, &c, NULL, &e), LW_OK);
    assert_int_equal(count_curves("pair"), 1);
    lw_text_copy(c.name, "second", sizeof c.name);
    assert_int_equal(lw_cellfile_save(path, &c, NULL, &e), LW_OK);
    assert_int_equal(count_curves("pair"), 1);
    lw_cell back;
    assert_int_equal(lw_cellfile_load(path, &back, &e), LW_OK);
    assert_string_equal(back.name, "second");
    lw_cell_clear(&back);
    /* the cell file's place taken by a folder: its write fails */
    char blocked[600];
    snprintf(blocked, sizeof blocked, "%s/blocked.ini", tmp_root());
    assert_int_equal(mkdir(blocked, 0755), 0);
    lw_text_copy(c.name, "third", sizeof c.name);
    lw_error_clear(&e);
    assert_int_not_equal(lw_cellfile_save(blocked, &c, NULL, &e), LW_OK);
    assert_int_equal(count_curves("blocked"), 0);
    rmdir(blocked);
    lw_cell_clear(&c);
}

/* A folder holding a light profile beside its cells: the list names the
 * cells and sets the profile aside. */
static void cell_list_skips_profiles(void **state)
{
    (void)state;
    char dir[600];
    snprintf(dir, sizeof dir, "%s/lib", tmp_root());
    mkdir(dir, 0755);
    char p[700];
    snprintf(p, sizeof p, "%s/lib/mycell.ini", tmp_root());
    lw_cell c = small_cell("mycell");
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_cellfile_save(p, &c, NULL, &e), LW_OK);
    lw_cell_clear(&c);
    tmp_write("lib/light.ini", "[light]\nname = x\n[pack]\ncell = mycell\n");
    lw_search s;
    memset(&s, 0, sizeof s);
    lw_search_add(&s, dir);
    lw_cellfile_list list;
    assert_int_equal(lw_cellfile_list_read(&s, &list, &e), LW_OK);
    assert_int_equal(list.n, 1);
    assert_string_equal(list.names[0], "mycell");
    assert_int_equal(list.nskipped, 1);
    assert_non_null(strstr(list.skipped[0], "light.ini"));
    lw_cellfile_list_clear(&list);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(names_round_trip_or_are_refused),
        cmocka_unit_test(pair_replaced_whole_or_not_at_all),
        cmocka_unit_test(cell_list_skips_profiles),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
