/*
 * test_cache.c - parsed files are read once per path per process and shared
 * (cache.h): a 15-case sweep and a run of every mode open each file the
 * profile names once, counted where every input is opened
 * (lw_path_open_regular, lw_path_opens); a file changed on disk is read
 * again and its new content used; a failed load is not kept.
 */
#include "bundled.h"
#include <fcntl.h>
#include <sys/stat.h>
#include <time.h>
#include <lampwick/lampwick.h>
#include "tmpdir.h"

#define HEADLAMP LW_SOURCE_ROOT "/profiles/headlamp-18650.ini"

/* Every file the profile reads was opened exactly once. */
static void assert_each_input_opened_once(const lw_profile *p, const char *what)
{
    char paths[8][LW_PATH_MAX];
    size_t n = lw_profile_inputs(p, paths, 8);
    assert_true(n >= 5); /* profile, cell file, curve, temperature table, I-V, flux */
    for (size_t i = 0; i < n; i++)
        if (lw_path_opens(paths[i]) != 1)
            fail_msg("%s: %s opened %zu times", what, paths[i], lw_path_opens(paths[i]));
}

static void sweep_of_15_cases_reads_each_file_once(void **state)
{
    (void)state;
    lw_cache_clear();
    lw_path_opens_reset();
    lw_profile p = bundled_profile("headlamp-18650");
    lw_vary v;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_vary_parse("drive.set_ma=60..130:5", &p, &v, &e), LW_OK);
    assert_int_equal(v.n, 15);
    lw_sweep sw;
    assert_int_equal(lw_sweep_run(&p, &v, 1, 2, NULL, NULL, &sw, &e), LW_OK);
    assert_int_equal(sw.n, 15);
    for (size_t i = 0; i < sw.n; i++)
        assert_int_equal(sw.cases[i].status, LW_OK);
    assert_each_input_opened_once(&p, "a 15-case sweep on 2 threads");
    lw_sweep_clear(&sw);
    lw_vary_clear(&v);
    lw_profile_clear(&p);
}

static void every_mode_reads_each_file_once(void **state)
{
    (void)state;
    lw_cache_clear();
    lw_path_opens_reset();
    lw_profile p = bundled_profile("headlamp-18650");
    size_t modes = lw_profile_mode_count(&p);
    assert_true(modes >= 3);
    for (size_t m = 0; m < modes; m++) {
        lw_profile_variant v = {.mode = lw_profile_mode_name(&p, m)};
        lw_profile q;
        lw_error e;
        lw_error_clear(&e);
        assert_int_equal(lw_profile_derive(&p, &v, "--mode", &q, &e), LW_OK);
        lw_profile_clear(&q);
    }
    assert_each_input_opened_once(&p, "every mode derived");
    lw_profile_clear(&p);
}

/* A table rewritten on disk is read again, and the new values are the
 * ones used; one that fails to load is not kept. */
/* Date a file's modification a minute back: the cache keeps only files
 * that have aged past its racy window (a file just written may change again
 * within the same clock tick and keep its identity). */
static void age(const char *path)
{
    struct timespec now, t[2];
    clock_gettime(CLOCK_REALTIME, &now);
    t[0] = t[1] = (struct timespec){now.tv_sec - 60, 0};
    assert_int_equal(utimensat(AT_FDCWD, path, t, 0), 0);
}

/* A file written this instant is read afresh every time, not cached: the
 * same path rewritten within one tick of the file system's clock, with a
 * reused inode number and the same size, would otherwise be served stale
 * (found by the writers fuzz target). */
static void fresh_file_is_not_cached(void **state)
{
    (void)state;
    const char *iv = tmp_write("young.csv", "current_ma,forward_v\n1,2.5\n100,3.0\n");
    char iv_path[512];
    lw_text_copy(iv_path, iv, sizeof iv_path);
    const char *profile = tmp_write(
        "y.ini", "[pack]\ncell = LR6-alkaline\n[led]\nmodel = table\niv_file = young.csv\n"
                 "flux_lm = 20\nflux_current_ma = 50\n[drive]\nresistor_ohm = 10\n");
    char prof_path[512];
    lw_text_copy(prof_path, profile, sizeof prof_path);
    lw_search s = bundled_cells();
    lw_profile p;
    lw_error e;
    lw_error_clear(&e);
    lw_path_opens_reset();
    for (int k = 0; k < 2; k++) {
        assert_int_equal(lw_profile_load(prof_path, &s, &p, &e), LW_OK);
        lw_profile_clear(&p);
    }
    assert_int_equal(lw_path_opens(iv_path), 2);
}

static void changed_file_is_read_again(void **state)
{
    (void)state;
    const char *profile = tmp_write(
        "c.ini", "[pack]\ncell = LR6-alkaline\n[led]\nmodel = table\niv_file = iv.csv\n"
                 "flux_lm = 20\nflux_current_ma = 50\n[drive]\nresistor_ohm = 10\n");
    char prof_path[512];
    lw_text_copy(prof_path, profile, sizeof prof_path);
    const char *iv = tmp_write("iv.csv", "current_ma,forward_v\n1,2.5\n100,3.0\n");
    char iv_path[512];
    lw_text_copy(iv_path, iv, sizeof iv_path);
    age(prof_path);
    age(iv_path);
    lw_search s = bundled_cells();
    lw_profile p;
    lw_error e;
    lw_error_clear(&e);
    lw_path_opens_reset();
    assert_int_equal(lw_profile_load(prof_path, &s, &p, &e), LW_OK);
    assert_close(lw_interp_linear(p.light.led.iv, 0.1), 3.0, 0);
    lw_profile_clear(&p);
    assert_int_equal(lw_profile_load(prof_path, &s, &p, &e), LW_OK);
    assert_int_equal(lw_path_opens(iv_path), 1); /* the second load: from the cache */
    lw_profile_clear(&p);
    /* rewrite it (another size, so it differs however coarse the clock) */
    FILE *fp = fopen(iv_path, "w");
    assert_non_null(fp);
    fputs("current_ma,forward_v\n1,2.5\n100,3.25\n", fp);
    fclose(fp);
    assert_int_equal(lw_profile_load(prof_path, &s, &p, &e), LW_OK);
    assert_int_equal(lw_path_opens(iv_path), 2);
    assert_close(lw_interp_linear(p.light.led.iv, 0.1), 3.25, 0);
    lw_profile_clear(&p);
    /* broken: refused every time, never served from the cache */
    fp = fopen(iv_path, "w");
    assert_non_null(fp);
    fputs("current_ma,forward_v\n1,2.5\n100,x\n", fp);
    fclose(fp);
    for (int k = 0; k < 2; k++) {
        lw_error_clear(&e);
        assert_int_equal(lw_profile_load(prof_path, &s, &p, &e), LW_EINPUT);
        assert_non_null(strstr(e.file, "iv.csv"));
        lw_profile_clear(&p);
    }
    assert_int_equal(lw_path_opens(iv_path), 4);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(fresh_file_is_not_cached),
        cmocka_unit_test(sweep_of_15_cases_reads_each_file_once),
        cmocka_unit_test(every_mode_reads_each_file_once),
        cmocka_unit_test(changed_file_is_read_again),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
