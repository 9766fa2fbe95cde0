/*
 * test_error.c - the error record and strict number parsing.
 */
#include "testutil.h"
#include <lampwick/lampwick.h>

static void parse_double_accepts_plain_numbers(void **state)
{
    (void)state;
    double v = 0;
    assert_true(lw_number_parse_double("4.7", &v));
    assert_close(v, 4.7, 0);
    assert_true(lw_number_parse_double("  -1e-3 ", &v));
    assert_close(v, -1e-3, 0);
    assert_true(lw_number_parse_double(".5", &v));
    assert_close(v, 0.5, 0);
    assert_true(lw_number_parse_double("+20", &v));
    assert_close(v, 20, 0);
}

static void parse_double_refuses_garbage(void **state)
{
    (void)state;
    const char *bad[] = {"", " ", "4.7x", "1,2", "nan", "NaN", "inf", "-inf", "0x10", "1e999",
                         "abc", "4.7 5", "--1", "e5"};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        double v = 123.0;
        if (lw_number_parse_double(bad[i], &v))
            fail_msg("accepted '%s'", bad[i]);
        assert_close(v, 123.0, 0); /* untouched on failure */
    }
}

static void parse_int_is_strict(void **state)
{
    (void)state;
    int v = 0;
    assert_true(lw_number_parse_int("12", &v));
    assert_int_equal(v, 12);
    assert_true(lw_number_parse_int(" -3 ", &v));
    assert_int_equal(v, -3);
    assert_false(lw_number_parse_int("1.5", &v));
    assert_false(lw_number_parse_int("", &v));
    assert_false(lw_number_parse_int("99999999999", &v));
    assert_false(lw_number_parse_int("3x", &v));
}

static void first_error_wins_and_formats(void **state)
{
    (void)state;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_error_set(&e, LW_EINPUT, "a.ini", 7, "bad %s", "thing"), LW_EINPUT);
    lw_error_set(&e, LW_EIO, "b.ini", 9, "later");
    assert_int_equal(e.code, LW_EINPUT);
    char buf[256];
    lw_error_format(&e, buf, sizeof buf);
    assert_string_equal(buf, "a.ini:7: bad thing");
    lw_error_clear(&e);
    lw_error_set(&e, LW_EINPUT, "--set x.y", 0, "nope");
    lw_error_format(&e, buf, sizeof buf);
    assert_string_equal(buf, "--set x.y: nope");
    assert_int_equal(lw_error_set(NULL, LW_EIO, NULL, 0, "ignored"), LW_EIO);
}

static void strlcpy_truncates_safely(void **state)
{
    (void)state;
    char b[4];
    assert_false(lw_text_copy(b, "abcdef", sizeof b));
    assert_string_equal(b, "abc");
    assert_true(lw_text_copy(b, "ab", sizeof b));
    assert_string_equal(b, "ab");
}

/* No byte of an input reaches a terminal raw: control characters (C0, DEL)
 * and invalid UTF-8 become \xNN; valid UTF-8 stays (RFC 3629 for the
 * encoding: overlong forms and surrogates are invalid). */
static void messages_escape_terminal_bytes(void **state)
{
    (void)state;
    char out[128];
    lw_text_escape(out, sizeof out, "a\x1b[31mb\x7f\x07");
    assert_string_equal(out, "a\\x1B[31mb\\x7F\\x07");
    lw_text_escape(out, sizeof out, "\xc0\xaf \xed\xa0\x80 \xe2\x82\xac");
    assert_string_equal(out, "\\xC0\\xAF \\xED\\xA0\\x80 \xe2\x82\xac");
    size_t at;
    assert_false(lw_text_utf8_valid("ok\xf4\x90\x80\x80", 6, &at)); /* above U+10FFFF */
    assert_int_equal(at, 2);
    assert_true(lw_text_utf8_valid("\xf4\x8f\xbf\xbf", 4, &at)); /* U+10FFFF itself */
    lw_error e;
    lw_error_clear(&e);
    lw_error_set(&e, LW_EINPUT, "p\x1b.ini", 3, "name = \x9b" "2J");
    char buf[LW_ERR_FILE_MAX + LW_ERR_MSG_MAX + 32];
    lw_error_format(&e, buf, sizeof buf);
    assert_string_equal(buf, "p\\x1B.ini:3: name = \\x9B2J");
    /* a long escape never overruns, and ends on a whole \xNN */
    char small[7];
    lw_text_escape(small, sizeof small, "ab\x01\x02");
    assert_string_equal(small, "ab\\x01");
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(parse_double_accepts_plain_numbers),
        cmocka_unit_test(parse_double_refuses_garbage),
        cmocka_unit_test(parse_int_is_strict),
        cmocka_unit_test(first_error_wins_and_formats),
        cmocka_unit_test(strlcpy_truncates_safely),
        cmocka_unit_test(messages_escape_terminal_bytes),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
