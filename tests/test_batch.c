/*
 * test_batch.c - many variants of one profile (batch.h): each case gives
 * exactly what deriving its profile and running it by hand gives (the same
 * bits), on one thread or two, in input order; a case that cannot be made
 * says why, names the override and its origin, and leaves the others run.
 * These are identities of the design (one path computes every number); no
 * outside source is needed.
 */
#include "bundled.h"
#include <stdlib.h>
#include <lampwick/lampwick.h>

#define NCASES 24

/* Case i: a mode in turn (its series resistor), a linear regulator and a
 * set current of 40 + 5 i mA, except case 7, whose current is out of
 * range. */
static void make_cases(const lw_profile *p, lw_case *c)
{
    size_t modes = lw_profile_mode_count(p);
    memset(c, 0, NCASES * sizeof *c);
    for (size_t i = 0; i < NCASES; i++) {
        lw_error e;
        lw_error_clear(&e);
        c[i].variant.mode = i % 3 == 0 ? NULL : lw_profile_mode_name(p, i % modes);
        double ma = i == 7 ? -5.0 : 40.0 + 5.0 * (double)i;
        assert_int_equal(lw_profile_variant_text(&c[i].variant, "drive.type", "linear-cc", &e),
                         LW_OK);
        assert_int_equal(lw_profile_variant_number(&c[i].variant, "drive.dropout_v", 0.2, &e),
                         LW_OK);
        assert_int_equal(lw_profile_variant_number(&c[i].variant, "drive.set_ma", ma, &e), LW_OK);
    }
}

/* The same bits: identical computations, not merely close results. */
static bool same_bits(double a, double b)
{
    uint64_t ua, ub;
    memcpy(&ua, &a, sizeof ua);
    memcpy(&ub, &b, sizeof ub);
    return ua == ub;
}

static void assert_same_result(const lw_result *a, const lw_result *b, size_t i)
{
    if (a->end_reason != b->end_reason || !same_bits(a->runtime_h, b->runtime_h) ||
        !same_bits(a->lumen_hours, b->lumen_hours) ||
        !same_bits(a->time_to_half_h, b->time_to_half_h) ||
        !same_bits(a->energy_drawn_wh, b->energy_drawn_wh) ||
        !same_bits(a->flux_30s_lm, b->flux_30s_lm) || a->solves != b->solves ||
        a->warnings != b->warnings)
        fail_msg("case %zu: %.17g h / %.17g lmh vs %.17g h / %.17g lmh", i, a->runtime_h,
                 a->lumen_hours, b->runtime_h, b->lumen_hours);
}

static void cases_match_runs_by_hand_on_any_thread_count(void **state)
{
    (void)state;
    lw_profile p = bundled_profile("headlamp-18650");
    assert_true(lw_profile_mode_count(&p) >= 2);
    lw_case *one = calloc(NCASES, sizeof *one), *two = calloc(NCASES, sizeof *two);
    assert_non_null(one);
    assert_non_null(two);
    make_cases(&p, one);
    make_cases(&p, two);
    lw_batch_run(&p, one, NCASES, 1, "--vary", NULL, NULL);
    lw_batch_run(&p, two, NCASES, 2, "--vary", NULL, NULL);
    for (size_t i = 0; i < NCASES; i++) {
        if (i == 7) {
            /* the bad case: refused, naming where the value came from */
            assert_int_equal(one[i].status, LW_EINPUT);
            assert_int_equal(two[i].status, LW_EINPUT);
            assert_false(one[i].has_light);
            if (!strstr(one[i].err.msg, "drive.set_ma") && !strstr(one[i].err.file, "drive.set_ma"))
                fail_msg("case 7's error names no key: %s: %s", one[i].err.file, one[i].err.msg);
            assert_non_null(strstr(one[i].err.file, "--vary"));
            assert_string_equal(one[i].err.msg, two[i].err.msg);
            continue;
        }
        if (one[i].status != LW_OK)
            fail_msg("case %zu: %s: %s", i, one[i].err.file, one[i].err.msg);
        assert_int_equal(two[i].status, LW_OK);
        assert_true(one[i].has_light && two[i].has_light);
        /* by hand: derive and run */
        lw_profile q;
        lw_error e;
        lw_error_clear(&e);
        assert_int_equal(lw_profile_derive(&p, &one[i].variant, "--vary", &q, &e), LW_OK);
        lw_result r;
        assert_int_equal(lw_run(&q.light, NULL, &r, &e), LW_OK);
        assert_same_result(&one[i].res, &r, i);
        assert_same_result(&two[i].res, &r, i);
        /* the light kept is the resolved one */
        assert_true(same_bits(one[i].light.drive.set_a, q.light.drive.set_a));
        assert_close(one[i].light.drive.set_a, (40.0 + 5.0 * (double)i) * 1e-3, 1e-15);
        lw_run_result_clear(&r);
        lw_profile_clear(&q);
    }
    /* the cases differ (so the comparison above also checks their order): a
     * larger current runs shorter in the same mode */
    for (size_t i = 0; i + 3 < NCASES; i += 3)
        if (one[i].status == LW_OK && one[i + 3].status == LW_OK)
            assert_true(one[i + 3].res.runtime_h < one[i].res.runtime_h);
    lw_batch_clear(one, NCASES);
    lw_batch_clear(two, NCASES);
    lw_batch_clear(one, NCASES); /* clearing twice is harmless */
    free(one);
    free(two);
    lw_profile_clear(&p);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(cases_match_runs_by_hand_on_any_thread_count),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
