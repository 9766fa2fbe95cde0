/*
 * test_alloc.c - allocation failure, swept: for each command below, every
 * allocation of the whole command line (profile and cell reading, the
 * discharge, the report, every output file) is made to fail in turn, one
 * per run, through lw_alloc_fail_at.  Each run must end cleanly: exit
 * status 0 with the same output as without the failure (the code may fall
 * back, for example to fewer threads) or exit status 1 with "out of memory";
 * no output file half written (each destination is absent or complete) and
 * no temporary file left.  Leaks are found by LeakSanitizer in the
 * sanitizer build and by valgrind in CI: both run this test.
 */
#include "testutil.h"
#include <stdbool.h>
#include <dirent.h>
#include <fcntl.h>
#include <stdlib.h>
#include <sys/stat.h>
#include "cli.h"
#include "tmpdir.h"

/* ROOT "/x" is one path (clang-tidy's missing-comma check is off here) */
#define ROOT LW_SOURCE_ROOT
// NOLINTBEGIN(bugprone-suspicious-missing-comma)

/* Read a whole file into a fresh buffer (NULL when absent); *len set. */
static char *slurp(const char *path, size_t *len)
{
    FILE *fp = fopen(path, "rb");
    if (!fp)
        return NULL;
    fseek(fp, 0, SEEK_END);
    long n = ftell(fp);
    rewind(fp);
    char *buf = malloc((size_t)n + 1);
    assert_non_null(buf);
    assert_int_equal(fread(buf, 1, (size_t)n, fp), (size_t)n);
    buf[n] = '\0';
    fclose(fp);
    *len = (size_t)n;
    return buf;
}

/* The run's folder holds only the expected outputs: no temporary file. */
static void assert_no_temporaries(const char *dir, long n)
{
    DIR *d = opendir(dir);
    assert_non_null(d);
    for (struct dirent *e; (e = readdir(d));)
        if (strstr(e->d_name, ".tmp"))
            fail_msg("allocation %ld: temporary file %s left", n, e->d_name);
    closedir(d);
}

typedef struct {
    const char *name;
    char *argv[16];
    const char *outputs[3]; /* files in the run folder the command writes */
    bool cell_pair;         /* outputs[0] is a cell file naming a fresh curve */
} scenario;

/* How many files in dir begin with prefix. */
static int count_prefix(const char *dir, const char *prefix, bool remove)
{
    DIR *d = opendir(dir);
    assert_non_null(d);
    int n = 0;
    char p[800];
    for (struct dirent *e; (e = readdir(d));)
        if (!strncmp(e->d_name, prefix, strlen(prefix))) {
            n++;
            snprintf(p, sizeof p, "%s/%s", dir, e->d_name);
            if (remove)
                unlink(p);
        }
    closedir(d);
    return n;
}

/* A cell pair is whole: the .ini loads with its curve, and no other curve
 * of that name is left beside it. */
static bool cell_pair_whole(const char *dir, const char *ini)
{
    char path[600], prefix[200];
    snprintf(path, sizeof path, "%s/%s", dir, ini);
    snprintf(prefix, sizeof prefix, "%.*s.curve-", (int)(strlen(ini) - 4), ini);
    struct stat sb;
    if (stat(path, &sb) != 0)
        return count_prefix(dir, prefix, false) == 0;
    lw_cell cell;
    lw_error err;
    if (lw_cellfile_load(path, &cell, &err) != LW_OK)
        return false;
    lw_cell_clear(&cell);
    return count_prefix(dir, prefix, false) == 1;
}

/* Run argv with stdout and stderr sent to files in dir; returns the exit
 * status. */
static int run_captured(const scenario *s, const char *dir)
{
    char out[600], errp[600];
    snprintf(out, sizeof out, "%s/stdout", dir);
    snprintf(errp, sizeof errp, "%s/stderr", dir);
    fflush(stdout);
    fflush(stderr);
    int save_out = dup(STDOUT_FILENO), save_err = dup(STDERR_FILENO);
    int fo = open(out, O_WRONLY | O_CREAT | O_TRUNC, 0644);
    int fe = open(errp, O_WRONLY | O_CREAT | O_TRUNC, 0644);
    assert_true(save_out >= 0 && save_err >= 0 && fo >= 0 && fe >= 0);
    dup2(fo, STDOUT_FILENO);
    dup2(fe, STDERR_FILENO);
    close(fo);
    close(fe);
    char *argv[16];
    int argc = 0;
    for (; s->argv[argc]; argc++)
        argv[argc] = s->argv[argc];
    argv[argc] = NULL;
    char cwd[600];
    assert_non_null(getcwd(cwd, sizeof cwd));
    assert_int_equal(chdir(dir), 0);
    lw_cache_clear(); /* every run loads its files: each allocation is reached */
    int rc = lw_cli_run(argc, argv);
    assert_int_equal(chdir(cwd), 0);
    fflush(stdout);
    fflush(stderr);
    dup2(save_out, STDOUT_FILENO);
    dup2(save_err, STDERR_FILENO);
    close(save_out);
    close(save_err);
    return rc;
}

static void remove_outputs(const scenario *s, const char *dir)
{
    char p[600];
    for (int i = 0; i < 3 && s->outputs[i]; i++) {
        snprintf(p, sizeof p, "%s/%s", dir, s->outputs[i]);
        unlink(p);
    }
    if (s->cell_pair) {
        char prefix[200];
        snprintf(prefix, sizeof prefix, "%.*s.curve-", (int)(strlen(s->outputs[0]) - 4),
                 s->outputs[0]);
        count_prefix(dir, prefix, true);
    }
}

static void sweep(const scenario *s)
{
    char dir[512];
    snprintf(dir, sizeof dir, "%s/%s", tmp_root(), s->name);
    mkdir(dir, 0755);
    char path[600];

    /* the reference: no failure */
    remove_outputs(s, dir);
    lw_alloc_fail_at(0);
    int rc = run_captured(s, dir);
    long total = lw_alloc_fail_at(0);
    assert_int_equal(rc, 0);
    assert_true(total > 0);
    size_t ref_len[4] = {0}, len;
    char *ref[4] = {NULL};
    snprintf(path, sizeof path, "%s/stdout", dir);
    ref[0] = slurp(path, &ref_len[0]);
    for (int i = 0; i < 3 && s->outputs[i]; i++) {
        snprintf(path, sizeof path, "%s/%s", dir, s->outputs[i]);
        ref[i + 1] = slurp(path, &ref_len[i + 1]);
        assert_non_null(ref[i + 1]);
    }

    long failed = 0;
    for (long n = 1; n <= total; n++) {
        remove_outputs(s, dir);
        lw_alloc_fail_at(n);
        rc = run_captured(s, dir);
        long made = lw_alloc_fail_at(0);
        if (made < n) /* a run that allocated less (a path not taken) */
            continue;
        failed++;
        snprintf(path, sizeof path, "%s/stderr", dir);
        char *err = slurp(path, &len);
        assert_non_null(err);
        if (rc == EXIT_NOANSWER) {
            if (!strstr(err, "out of memory"))
                fail_msg("%s, allocation %ld of %ld: exit 1 without 'out of memory': %s",
                         s->name, n, total, err);
        } else if (rc == 0 && s->cell_pair) {
            /* the report names the fresh curve: judged by the pair below */
        } else if (rc == 0) {
            snprintf(path, sizeof path, "%s/stdout", dir);
            char *got = slurp(path, &len);
            if (!got || len != ref_len[0] || memcmp(got, ref[0], len) != 0)
                fail_msg("%s, allocation %ld: exit 0 with other output:\n%s\nstderr: %s\n"
                         "instead of:\n%s",
                         s->name, n, got ? got : "(none)", err, ref[0]);
            free(got);
        } else {
            fail_msg("%s, allocation %ld of %ld: exit %d: %s", s->name, n, total, rc, err);
        }
        free(err);
        /* each output is absent or whole */
        if (s->cell_pair && !cell_pair_whole(dir, s->outputs[0]))
            fail_msg("%s, allocation %ld: the cell file and its curve are not a whole pair",
                     s->name, n);
        for (int i = s->cell_pair ? 1 : 0; i < 3 && s->outputs[i]; i++) {
            snprintf(path, sizeof path, "%s/%s", dir, s->outputs[i]);
            char *got = slurp(path, &len);
            if (got && (len != ref_len[i + 1] || memcmp(got, ref[i + 1], len) != 0))
                fail_msg("%s, allocation %ld: %s is not the whole output", s->name, n,
                         s->outputs[i]);
            if (!got && rc == 0)
                fail_msg("%s, allocation %ld: exit 0 without %s", s->name, n, s->outputs[i]);
            free(got);
        }
        assert_no_temporaries(dir, n);
    }
    print_message("%s: %ld allocations, each failed in turn (%ld reached)\n", s->name, total,
                  failed);
    assert_true(failed > 0);
    for (int i = 0; i < 4; i++)
        free(ref[i]);
}

static void run_with_trace_and_plot(void **state)
{
    (void)state;
    static const scenario s = {
        .name = "run",
        .argv = {"lampwick", "run", ROOT "/profiles/demo.ini", "--trace", "t.csv", "--plot",
                 "p.svg", "--format", "csv"},
        .outputs = {"t.csv", "p.svg"}};
    sweep(&s);
}

static void run_modes_and_spec_table(void **state)
{
    (void)state;
    static const scenario s = {
        .name = "table",
        .argv = {"lampwick", "table", ROOT "/profiles/headlamp-18650.ini", "--format", "md"}};
    sweep(&s);
}

static void sweep_on_two_threads(void **state)
{
    (void)state;
    static const scenario s = {
        .name = "sweep",
        .argv = {"lampwick", "sweep", ROOT "/profiles/demo.ini", "--vary",
                 "drive.resistor_ohm=22,47", "--threads", "2", "--plot", "s.svg"},
        .outputs = {"s.svg"}};
    sweep(&s);
}

static void pick_and_size(void **state)
{
    (void)state;
    static const scenario p = {
        .name = "pick",
        .argv = {"lampwick", "pick", ROOT "/profiles/demo.ini", "--target-ma", "20"}};
    sweep(&p);
    static const scenario z = {
        .name = "size",
        .argv = {"lampwick", "size", ROOT "/profiles/demo.ini", "--runtime-h", "10", "--cells",
                 "LR6-alkaline,HR6-nimh", "--max-series", "3", "--max-parallel", "2"}};
    sweep(&z);
}

static void check_and_cells(void **state)
{
    (void)state;
    static const scenario c = {
        .name = "check", .argv = {"lampwick", "check", ROOT "/profiles/lantern-drives.ini"}};
    sweep(&c);
    static const scenario l = {.name = "cells", .argv = {"lampwick", "cells"}};
    sweep(&l);
}

static void fit_led_and_cell(void **state)
{
    (void)state;
    static const scenario l = {
        .name = "fitled",
        .argv = {"lampwick", "fit", "led", ROOT "/profiles/white-led-iv.csv", "--plot", "f.svg"},
        .outputs = {"f.svg"}};
    sweep(&l);
    /* a discharge log into 10 ohm: an invented falling voltage, only input */
    char dir[512];
    snprintf(dir, sizeof dir, "%s/fitcell", tmp_root());
    mkdir(dir, 0755);
    char path[600];
    snprintf(path, sizeof path, "%s/log.csv", dir);
    FILE *fp = fopen(path, "w");
    assert_non_null(fp);
    fputs("time_s,voltage_v\n", fp);
    for (int i = 0; i <= 60; i++)
        fprintf(fp, "%d,%.4f\n", i * 600, 1.45 - 0.004 * i - (i > 50 ? 0.03 * (i - 50) : 0));
    fclose(fp);
    static const scenario c = {
        .name = "fitcell",
        .argv = {"lampwick", "fit", "cell", "log.csv", "--load-ohm", "10", "--cutoff-v", "1.0",
                 "--resistance-ohm", "0.1", "--name", "bench cell", "--out", "bench.ini"},
        .outputs = {"bench.ini"},
        .cell_pair = true};
    sweep(&c);
}

// NOLINTEND(bugprone-suspicious-missing-comma)

int main(void)
{
    setenv("LAMPWICK_CELLS", ROOT "/cells", 1);
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(run_with_trace_and_plot), cmocka_unit_test(run_modes_and_spec_table),
        cmocka_unit_test(sweep_on_two_threads),    cmocka_unit_test(pick_and_size),
        cmocka_unit_test(check_and_cells),         cmocka_unit_test(fit_led_and_cell),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
