/*
 * bench_run.c - benchmark: full discharges per second and solves per run
 * for every bundled profile (and each of its modes; runs in time also at a
 * relative tolerance of 1e-6, the figure a thermal design study needs), the
 * cost of a dense cell curve, a measured-table LED on the depth path, and a
 * 100,000-row sweep's memory and speed on one and two threads, the spread
 * study of 10^5 and 10^6 units (demo.ini's [spread]); then the
 * targets of docs/benchmark.md against what was measured.  Run with
 * `meson test -C build-rel --benchmark -v discharges`.  Prints; asserts
 * nothing (tests do that).  Timings are medians of BENCH_ROUNDS rounds, one
 * core per run.
 */
#define _DEFAULT_SOURCE /* wait4: the peak memory of one child */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>
#include "bench_each.h"

#define BENCH_ROUNDS 5
#define BENCH_ROUND_S 0.1

typedef struct measure {
    double us, per_s; /* median microseconds per run, runs per second */
    int solves;
    double runtime_h;
    bool ok;
} measure;

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* Median time of lw_run on light l at rtol over BENCH_ROUNDS rounds. */
static measure time_runs(const lw_light *l, double rtol)
{
    lw_run_options opt = lw_run_options_default();
    opt.rtol = rtol;
    measure m = {0};
    lw_error e;
    lw_error_clear(&e);
    double us[BENCH_ROUNDS];
    for (int round = 0; round < BENCH_ROUNDS; round++) {
        double t0 = bench_now_s(), dt;
        long n = 0;
        do {
            for (int k = 0; k < 20; k++) {
                lw_result r;
                if (lw_run(l, &opt, &r, &e) != LW_OK) {
                    fprintf(stderr, "run failed: %s\n", e.msg);
                    return m;
                }
                m.solves = r.solves;
                m.runtime_h = r.runtime_h;
                lw_run_result_clear(&r);
            }
            n += 20;
            dt = bench_now_s() - t0;
        } while (dt < BENCH_ROUND_S);
        us[round] = 1e6 * dt / (double)n;
    }
    qsort(us, BENCH_ROUNDS, sizeof us[0], cmp_double);
    m.us = us[BENCH_ROUNDS / 2];
    m.per_s = 1e6 / m.us;
    m.ok = true;
    return m;
}

/* What the targets read, gathered while the profiles run. */
typedef struct summary {
    int resistor_solves_max;          /* bundled resistor drives, run in depth at rtol 1e-9 */
    double resistor_err_max;          /* their runtime and lumen-hours against rtol 1e-13 */
    double analytic_per_s_min;        /* constant, linear and Shockley LEDs in depth */
    double table_per_s_min;           /* measured-table LEDs in depth */
    int thermal_solves[2];            /* headlamp at rtol 1e-6 and the default */
    double thermal_us[2];
    double dense_ratio[2];            /* straight-segment and curved 5,000 points */
    int dense_solves[3];              /* bundled, straight, curved */
    double sweep_s[2], sweep_ratio;
    long sweep_kb[2];
    double spread_s[3];               /* 10^5 units on 1 and 2 threads, 10^6 on 2 */
    long spread_kb[3];
} summary;

static bool in_depth(const lw_light *l)
{
    return lw_thermal_quasi_static(&l->thermal) && !l->chain && !l->use &&
           !lw_cell_is_kinetic(&l->pack.cell);
}

static void line(const char *label, const char *path, measure m)
{
    if (m.ok)
        printf("%-44s %-5s %10.0f discharges/s %6d solves/run %9.2f us/run  runtime %.4g h\n",
               label, path, m.per_s, m.solves, m.us, m.runtime_h);
}

/* The solves target reads a run whose runtime and lumen-hours are within
 * 1e-9 of the reference: rtol 1e-9, its errors measured against rtol
 * 1e-13. */
static void resistor_target(const lw_light *l, summary *s)
{
    lw_run_options o = lw_run_options_default();
    lw_result r, ref;
    lw_error e;
    o.rtol = 1e-9;
    if (lw_run(l, &o, &r, &e) != LW_OK)
        return;
    o.rtol = 1e-13;
    if (lw_run(l, &o, &ref, &e) == LW_OK) {
        double err = fmax(fabs(r.runtime_h / ref.runtime_h - 1.0),
                          fabs(r.lumen_hours / ref.lumen_hours - 1.0));
        s->resistor_err_max = fmax(s->resistor_err_max, err);
        s->resistor_solves_max = r.solves > s->resistor_solves_max ? r.solves
                                                                     : s->resistor_solves_max;
        lw_run_result_clear(&ref);
    }
    lw_run_result_clear(&r);
}

static void each(const lw_profile *p, const char *label, const char *mode, void *ctx)
{
    summary *s = ctx;
    const lw_light *l = &p->light;
    bool depth = in_depth(l);
    measure m = time_runs(l, 1e-10);
    line(label, depth ? "depth" : "time", m);
    if (!m.ok)
        return;
    if (depth) {
        if (l->drive.type == LW_DRIVE_RESISTOR)
            resistor_target(l, s);
        if (l->led.model == LW_LED_TABLE)
            s->table_per_s_min = fmin(s->table_per_s_min, m.per_s);
        else
            s->analytic_per_s_min = fmin(s->analytic_per_s_min, m.per_s);
    }
    bool headlamp = strstr(label, "headlamp-18650.ini") && !mode;
    if (headlamp)
        s->thermal_solves[1] = m.solves, s->thermal_us[1] = m.us;
    if (!depth) {
        char l6[200];
        snprintf(l6, sizeof l6, "%s (rtol 1e-6)", label);
        measure m6 = time_runs(l, 1e-6);
        line(l6, "time", m6);
        if (headlamp)
            s->thermal_solves[0] = m6.solves, s->thermal_us[0] = m6.us;
    }
}

/* ---- a dense cell curve ---- */

/* Monotone cubic through (x, y) at u (Fritsch and Carlson; lw_interp_cubic
 * is the library's own: the benchmark builds the same from the table). */
static double resample(const lw_interp *t, double u, bool curved)
{
    return curved ? lw_interp_cubic(t, u) : lw_interp_linear(t, u);
}

/* The light with its cell's curves sampled at n points: on their own
 * straight segments (the same model, its knots among the points) or through
 * the monotone cubic (n genuine corners). */
static bool dense_light(const lw_light *base, size_t n, bool curved, lw_light *out)
{
    const lw_cell *c = &base->pack.cell;
    size_t m = n + c->ocv->n;
    double *x = malloc(3 * m * sizeof *x), *yo = x + m, *yr = x + 2 * m;
    if (!x)
        return false;
    size_t k = 0, j = 0;
    for (size_t i = 0; i < n; i++) {
        double u = c->ocv->x[0] + (c->ocv->x[c->ocv->n - 1] - c->ocv->x[0]) * i / (n - 1);
        while (!curved && j < c->ocv->n && c->ocv->x[j] <= u) { /* keep the corners */
            if (k == 0 || c->ocv->x[j] > x[k - 1])
                x[k] = c->ocv->x[j], yo[k] = c->ocv->y[j], yr[k] = c->res->y[j], k++;
            j++;
        }
        if (k > 0 && !(u > x[k - 1]))
            continue;
        x[k] = u, yo[k] = resample(c->ocv, u, curved), yr[k] = resample(c->res, u, curved);
        k++;
    }
    lw_error e;
    lw_interp *o = lw_interp_new(x, yo, k, &e), *r = o ? lw_interp_new(x, yr, k, &e) : NULL;
    free(x);
    if (!r) {
        lw_interp_free(o);
        return false;
    }
    lw_light_copy(out, base);
    lw_interp_free(out->pack.cell.ocv);
    lw_interp_free(out->pack.cell.res);
    out->pack.cell.ocv = o;
    out->pack.cell.res = r;
    return true;
}

static int bench_dense(const lw_profile *p, summary *s)
{
    measure base = time_runs(&p->light, 1e-10);
    line("demo.ini, its 13-point curve", "depth", base);
    const char *what[2] = {"on its straight segments", "through a monotone cubic"};
    for (int curved = 0; curved < 2; curved++) {
        lw_light d;
        if (!dense_light(&p->light, 5000, curved, &d))
            return 1;
        char label[120];
        snprintf(label, sizeof label, "demo.ini, 5,000 points %s", what[curved]);
        measure m = time_runs(&d, 1e-10);
        line(label, "depth", m);
        printf("    %zu corners; cost %.2fx the 13-point curve\n", d.pack.cell.ocv->ncorner,
               m.us / base.us);
        s->dense_ratio[curved] = m.us / base.us;
        s->dense_solves[curved + 1] = m.solves;
        lw_light_clear(&d);
    }
    s->dense_solves[0] = base.solves;
    return 0;
}

/* ---- a measured-table LED in depth ---- */

static int bench_table_depth(const lw_profile *p, summary *s)
{
    lw_light l;
    lw_light_copy(&l, &p->light);
    l.thermal.enabled = false; /* junctions at ambient: the depth quadrature */
    lw_light_update_factors(&l, NULL);
    measure m = time_runs(&l, 1e-10);
    line("headlamp-18650.ini without [thermal]", "depth", m);
    if (m.ok)
        s->table_per_s_min = fmin(s->table_per_s_min, m.per_s);
    lw_light_clear(&l);
    return m.ok ? 0 : 1;
}

/* ---- a 100,000-row sweep ---- */

/* Run job(ctx) in a child process (its peak memory is its own): wall
 * seconds and peak resident kilobytes; false when it failed. */
static bool in_child(int (*job)(const void *ctx), const void *ctx, double *wall_s, long *kb)
{
    double t0 = bench_now_s();
    fflush(stdout);
    pid_t pid = fork();
    if (pid < 0)
        return false;
    if (pid == 0)
        _exit(job(ctx));
    int status;
    struct rusage ru;
    if (wait4(pid, &status, 0, &ru) != pid || !WIFEXITED(status) || WEXITSTATUS(status) != 0)
        return false;
    *wall_s = bench_now_s() - t0;
    *kb = ru.ru_maxrss;
    return true;
}

typedef struct child_args {
    const lw_profile *p;
    int threads;
    size_t n;
} child_args;

/* The 100,000-row sweep, CSV to /dev/null. */
static int sweep_job(const void *ctx)
{
    const child_args *a = ctx;
    FILE *out = fopen("/dev/null", "w");
    lw_vary v[2];
    lw_error e;
    lw_error_clear(&e);
    lw_sweep sw;
    int rc = out && lw_vary_parse("drive.resistor_ohm=10..1009:1", a->p, &v[0], &e) == LW_OK &&
                     lw_vary_parse("pack.ambient_c=-10..39.5:0.5", a->p, &v[1], &e) == LW_OK &&
                     lw_report_sweep_stream(a->p, v, 2, a->threads, LW_FMT_CSV, false, NULL, out,
                                            NULL, NULL, &sw, &e) == LW_OK
                 ? 0
                 : 1;
    if (rc)
        fprintf(stderr, "sweep: %s\n", e.msg);
    return rc;
}

static bool sweep_child(const lw_profile *p, int threads, double *wall_s, long *kb)
{
    child_args a = {p, threads, 0};
    return in_child(sweep_job, &a, wall_s, kb);
}

/* One thread and two, in turn, SWEEP_PAIRS times: the median of each and
 * the median of the pairs' ratios (taken pair by pair, so that a drift of
 * the machine's speed moves both sides of a ratio alike). */
#define SWEEP_PAIRS 3
static int bench_sweep(const lw_profile *p, summary *s)
{
    double wall[2][SWEEP_PAIRS], ratio[SWEEP_PAIRS];
    long kb[2] = {0, 0};
    for (int k = 0; k < SWEEP_PAIRS; k++) {
        for (int t = 0; t < 2; t++) {
            long peak;
            if (!sweep_child(p, t + 1, &wall[t][k], &peak))
                return 1;
            kb[t] = peak > kb[t] ? peak : kb[t];
        }
        ratio[k] = wall[0][k] / wall[1][k];
    }
    for (int t = 0; t < 2; t++) {
        qsort(wall[t], SWEEP_PAIRS, sizeof wall[t][0], cmp_double);
        s->sweep_s[t] = wall[t][SWEEP_PAIRS / 2];
        s->sweep_kb[t] = kb[t];
        printf("sweep of 100,000 rows, CSV, %d thread%s  %8.2f s wall (median of %d)  %8ld KB "
               "peak resident\n",
               t + 1, t ? "s" : " ", s->sweep_s[t], SWEEP_PAIRS, s->sweep_kb[t]);
    }
    qsort(ratio, SWEEP_PAIRS, sizeof ratio[0], cmp_double);
    s->sweep_ratio = ratio[SWEEP_PAIRS / 2];
    printf("    two threads %.2fx as fast as one (median of the pairs' ratios, %.2f-%.2f)\n",
           s->sweep_ratio, ratio[0], ratio[SWEEP_PAIRS - 1]);
    return 0;
}

/* The spread study of demo.ini's [spread], its report to /dev/null. */
static int spread_job(const void *ctx)
{
    const child_args *a = ctx;
    FILE *out = fopen("/dev/null", "w");
    lw_mc_key keys[LW_MC_KEYS_MAX];
    size_t nk = 0;
    lw_error e;
    lw_error_clear(&e);
    lw_mc_options o = {.samples = a->n, .seed = 1, .threads = a->threads};
    lw_mc_result r;
    int rc = 1;
    if (out && lw_mc_keys_of_profile(a->p, keys, &nk, &e) == LW_OK &&
        lw_mc_run(a->p, keys, nk, &o, NULL, NULL, &r, &e) == LW_OK) {
        lw_mc_study st = {a->p, keys, nk, &o, &r, NULL, 0};
        rc = lw_report_mc(out, &st, LW_FMT_TEXT, false, &e) == LW_OK ? 0 : 1;
        lw_mc_result_clear(&r);
    }
    if (rc)
        fprintf(stderr, "spread: %s\n", e.msg);
    return rc;
}

static bool spread_child(const lw_profile *p, size_t n, int threads, double *wall_s, long *kb)
{
    child_args a = {p, threads, n};
    return in_child(spread_job, &a, wall_s, kb);
}

static int bench_spread(const lw_profile *p, summary *s)
{
    const size_t n[3] = {100000, 100000, 1000000};
    const int threads[3] = {1, 2, 2};
    for (int k = 0; k < 3; k++) {
        if (!spread_child(p, n[k], threads[k], &s->spread_s[k], &s->spread_kb[k]))
            return 1;
        printf("spread of demo.ini, %7zu units, %d thread%s  %8.2f s wall  %8ld KB peak "
               "resident\n",
               n[k], threads[k], threads[k] > 1 ? "s" : " ", s->spread_s[k], s->spread_kb[k]);
        fflush(stdout);
    }
    printf("    two threads %.2fx as fast as one (10^5 units, one pair)\n",
           s->spread_s[0] / s->spread_s[1]);
    return 0;
}

static const char *holds(bool ok)
{
    return ok ? "holds" : "DOES NOT HOLD";
}

static void targets(const summary *s)
{
    printf("\nTargets (docs/benchmark.md)\n");
    printf("  resistor drives in depth, within 1e-9 in <= 110 solves: %5d, %.1e  %s\n",
           s->resistor_solves_max, s->resistor_err_max,
           holds(s->resistor_solves_max <= 110 && s->resistor_err_max <= 1e-9));
    printf("  constant/linear/Shockley LEDs in depth >= 100,000/s:  %6.0f  %s\n",
           s->analytic_per_s_min, holds(s->analytic_per_s_min >= 100000));
    printf("  measured-table LEDs in depth >= 50,000/s:             %6.0f  %s\n",
           s->table_per_s_min, holds(s->table_per_s_min >= 50000));
    printf("  5,000-point curve on straight segments <= 5x:         %5.2fx  %s\n",
           s->dense_ratio[0], holds(s->dense_ratio[0] <= 5));
    printf("  5,000-point curve with 5,000 corners <= 5x:           %5.2fx  %s\n",
           s->dense_ratio[1], holds(s->dense_ratio[1] <= 5));
    printf("  100,000-row sweep peak memory < 50 MB:                %5.1f MB  %s\n",
           s->sweep_kb[1] / 1024.0, holds(s->sweep_kb[0] < 50 * 1024 && s->sweep_kb[1] < 50 * 1024));
    printf("  100,000-row sweep, two threads >= 1.8x one:           %5.2fx  %s\n",
           s->sweep_ratio, holds(s->sweep_ratio >= 1.8));
    printf("  spread, 10^5 units on two cores < 3 s:                %5.2f s  %s\n",
           s->spread_s[1], holds(s->spread_s[1] < 3.0));
    printf("  spread, 10^6 units on two cores < 30 s:               %5.2f s  %s\n",
           s->spread_s[2], holds(s->spread_s[2] < 30.0));
    printf("  spread memory independent of the units (10^6 / 10^5): %5.2fx  %s\n",
           (double)s->spread_kb[2] / (double)s->spread_kb[1],
           holds(s->spread_kb[2] < 1.25 * s->spread_kb[1]));
    for (int k = 0; k < 2; k++)
        printf("  thermal profile at rtol %s: <= 3,000 solves, < 2 ms:  %5d, %.2f ms  %s\n",
               k ? "1e-10" : "1e-6 ", s->thermal_solves[k], s->thermal_us[k] / 1000.0,
               holds(s->thermal_solves[k] <= 3000 && s->thermal_us[k] < 2000));
}

static int load(const char *name, lw_profile *p)
{
    lw_search sp;
    memset(&sp, 0, sizeof sp);
    lw_search_add(&sp, LW_SOURCE_ROOT "/cells");
    lw_error e;
    lw_error_clear(&e);
    char path[512];
    snprintf(path, sizeof path, LW_SOURCE_ROOT "/profiles/%s", name);
    if (lw_profile_load(path, &sp, p, &e) != LW_OK) {
        fprintf(stderr, "%s:%d: %s\n", e.file, e.line, e.msg);
        return 1;
    }
    return 0;
}

int main(void)
{
    summary s = {.analytic_per_s_min = INFINITY, .table_per_s_min = INFINITY};
    printf("Full discharges per second (release build, one core; medians of %d rounds)\n\n",
           BENCH_ROUNDS);
    int rc = bench_each(each, &s);
    lw_profile demo, head;
    if (rc == 0 && (rc = load("demo.ini", &demo)) == 0) {
        printf("\nA dense cell curve\n");
        rc = bench_dense(&demo, &s);
        if (rc == 0 && (rc = load("headlamp-18650.ini", &head)) == 0) {
            printf("\nA measured-table LED in depth\n");
            rc = bench_table_depth(&head, &s);
            lw_profile_clear(&head);
        }
        if (rc == 0) {
            printf("\nA sweep that streams\n");
            fflush(stdout);
            rc = bench_sweep(&demo, &s);
        }
        if (rc == 0) {
            printf("\nThe spread over the units shipped\n");
            fflush(stdout);
            rc = bench_spread(&demo, &s);
        }
        lw_profile_clear(&demo);
    }
    if (rc == 0)
        targets(&s);
    return rc;
}
