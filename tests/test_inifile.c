/*
 * test_inifile.c - INI reading with line numbers and the key schema.
 */
#include "testutil.h"
#include "tmpdir.h"
#include <lampwick/lampwick.h>

static void reads_entries_with_lines(void **state)
{
    (void)state;
    const char *p = tmp_write("a.ini", "; comment\n"
                                       "[one]\n"
                                       "x = 1\n"
                                       "\n"
                                       "# another comment\n"
                                       "[two]\n"
                                       "y = hello world ; inline comment\n");
    lw_ini ini;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_ini_read(p, &ini, NULL, NULL, &e), LW_OK);
    assert_int_equal(ini.n, 2);
    assert_string_equal(ini.entries[0].section, "one");
    assert_int_equal(ini.entries[0].line, 3);
    assert_string_equal(ini.entries[1].value, "hello world");
    assert_int_equal(ini.entries[1].line, 7);
    assert_int_equal(lw_ini_section_line(&ini, "two"), 6);
    assert_int_equal(lw_ini_key_line(&ini, "two", "y"), 7);
    lw_ini_clear(&ini);
}

static void refuses_bad_lines(void **state)
{
    (void)state;
    struct {
        const char *text;
        int line;
        const char *msg;
    } cases[] = {
        {"[a]\nx = 1\njust words\n", 3, "expected '[section]' or 'key = value'"},
        {"[a]\nx = 1\nx = 2\n", 3, "given twice"},
        {"[a]\nx = 1\n  y = 2\n", 3, "given twice"}, /* indented: continues x */
        {"x = 1\n", 1, "before any [section]"},
        {"[a\nx = 1\n", 1, "expected"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        const char *p = tmp_write("bad.ini", cases[i].text);
        lw_ini ini;
        lw_error e;
        lw_error_clear(&e);
        assert_int_equal(lw_ini_read(p, &ini, NULL, NULL, &e), LW_EINPUT);
        assert_error_at(e, "bad.ini", cases[i].line, cases[i].msg);
        assert_int_equal(ini.n, 0);
    }
}

/* inih splits lines of 200 bytes or more silently; we refuse them. */
static void refuses_overlong_lines(void **state)
{
    (void)state;
    char text[600];
    char value[400];
    memset(value, 'a', 300);
    value[300] = '\0';
    snprintf(text, sizeof text, "[a]\nx = 1\ny = %s\n", value);
    const char *p = tmp_write("long.ini", text);
    lw_ini ini;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_ini_read(p, &ini, NULL, NULL, &e), LW_EINPUT);
    assert_error_at(e, "long.ini", 3, "too long");
}

static void missing_file(void **state)
{
    (void)state;
    lw_ini ini;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_ini_read("/nonexistent/x.ini", &ini, NULL, NULL, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "cannot open"));
}

struct target {
    double v;
    int n;
    int choice;
    bool flag;
    char text[8];
};

static const char *const colours[] = {"red", "green", NULL};
static const lw_keydef defs[] = {
    {"s", "volts_v", LW_K_NUM, offsetof(struct target, v), 0, 1, 0, 10, LW_KF_MIN_OPEN, NULL,
     "5", "a voltage, V"},
    {"s", "current_ma", LW_K_NUM, offsetof(struct target, v), 0, 1e-3, 0, INFINITY, 0, NULL,
     "", "a current, mA"},
    {"s", "count", LW_K_INT, offsetof(struct target, n), 0, 1, 1, 4, 0, NULL, "1", "a count"},
    {"s", "colour", LW_K_CHOICE, offsetof(struct target, choice), 0, 1, NAN, NAN, 0, colours, "",
     "a colour"},
    {"s", "flag", LW_K_BOOL, offsetof(struct target, flag), 0, 1, NAN, NAN, 0, NULL, "", "y/n"},
    {"t", "text", LW_K_TEXT, offsetof(struct target, text), 8, 1, NAN, NAN, 0, NULL, "", "text"},
};
#define NDEFS (sizeof defs / sizeof defs[0])

static void schema_applies_and_converts(void **state)
{
    (void)state;
    struct target t;
    memset(&t, 0, sizeof t);
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_key_defaults(defs, NDEFS, &t, &e), LW_OK);
    assert_close(t.v, 5, 0);
    assert_int_equal(t.n, 1);
    assert_int_equal(lw_key_apply(&defs[1], &t, "250", "f", 1, &e), LW_OK);
    assert_close(t.v, 0.25, 1e-15); /* mA -> A at the edge */
    assert_int_equal(lw_key_apply(&defs[3], &t, "green", "f", 1, &e), LW_OK);
    assert_int_equal(t.choice, 1);
    assert_int_equal(lw_key_apply(&defs[4], &t, "yes", "f", 1, &e), LW_OK);
    assert_true(t.flag);
    assert_int_equal(lw_key_apply(&defs[5], &t, "abc", "f", 1, &e), LW_OK);
    assert_string_equal(t.text, "abc");
}

static void schema_refusals_name_key_and_range(void **state)
{
    (void)state;
    struct target t;
    memset(&t, 0, sizeof t);
    struct {
        size_t def;
        const char *value;
        const char *msg;
    } cases[] = {
        {0, "0", "expected a number > 0 and <= 10"},
        {0, "11", "<= 10"},
        {0, "nan", "expected a number"},
        {0, "inf", "expected a number"},
        {0, "4.7x", "volts_v = 4.7x"},
        {2, "2.5", "expected an integer >= 1 and <= 4"},
        {3, "blue", "expected one of red, green"},
        {4, "maybe", "expected yes or no"},
        {5, "too long text", "too long"},
        {5, "", "is empty"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        lw_error e;
        lw_error_clear(&e);
        assert_int_equal(lw_key_apply(&defs[cases[i].def], &t, cases[i].value, "x.ini", 9, &e),
                         LW_EINPUT);
        assert_error_at(e, "x.ini", 9, cases[i].msg);
    }
}

static void suggestions_for_misspellings(void **state)
{
    (void)state;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_key_unknown(defs, NDEFS, "s", "volt_v", "p.ini", 4, &e), LW_EINPUT);
    assert_error_at(e, "p.ini", 4, "did you mean 's.volts_v'?");
    lw_error_clear(&e);
    assert_int_equal(lw_key_unknown(defs, NDEFS, "q", "count", "p.ini", 5, &e), LW_EINPUT);
    assert_error_at(e, "p.ini", 5, "unknown section [q]");
    lw_error_clear(&e);
    assert_int_equal(lw_key_unknown(defs, NDEFS, "s", "zzzzzzzz", "p.ini", 6, &e), LW_EINPUT);
    assert_error_at(e, "p.ini", 6, "unknown key 'zzzzzzzz' in [s]");
    assert_null(strstr(e.msg, "did you mean"));
    assert_int_equal(lw_text_edit_distance("kitten", "sitting"), 3);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(reads_entries_with_lines),
        cmocka_unit_test(refuses_bad_lines),
        cmocka_unit_test(refuses_overlong_lines),
        cmocka_unit_test(missing_file),
        cmocka_unit_test(schema_applies_and_converts),
        cmocka_unit_test(schema_refusals_name_key_and_range),
        cmocka_unit_test(suggestions_for_misspellings),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
