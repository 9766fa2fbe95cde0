/*
 * bench_run.c - benchmark: full discharges per second and solves per run for
 * every bundled profile (and each of its modes; runs in time also at a
 * relative tolerance of 1e-6, the figure a thermal design study needs).  Run with
 * `meson test --benchmark -v`.  Prints; asserts nothing (tests do that).
 */
#include <glob.h>
#include <stdio.h>
#include <string.h>
#include <time.h>
#include <lampwick/lampwick.h>

static double now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static void bench(const lw_profile *p, const char *label, double rtol)
{
    lw_run_options opt = lw_run_options_default();
    opt.rtol = rtol;
    lw_result r = {0};
    lw_error e;
    lw_error_clear(&e);
    /* size the loop to about 0.3 s */
    double t0 = now_s();
    long n = 0;
    int solves = 0;
    while (now_s() - t0 < 0.3) {
        for (int k = 0; k < 100; k++) {
            if (lw_run(&p->light, &opt, &r, &e) != LW_OK) {
                fprintf(stderr, "%s: %s\n", label, e.msg);
                return;
            }
            solves = r.solves;
        }
        n += 100;
    }
    double dt = now_s() - t0;
    printf("%-48s %10.0f discharges/s  %5d solves/run  %8.3f us/run  runtime %.4g h\n", label,
           (double)n / dt, solves, 1e6 * dt / (double)n, r.runtime_h);
}

int main(void)
{
    glob_t g;
    if (glob(LW_SOURCE_ROOT "/profiles/*.ini", 0, NULL, &g) != 0)
        return 1;
    lw_search s;
    memset(&s, 0, sizeof s);
    lw_search_add(&s, LW_SOURCE_ROOT "/cells");
    for (size_t i = 0; i < g.gl_pathc; i++) {
        lw_profile p;
        lw_error e;
        lw_error_clear(&e);
        if (lw_profile_load(g.gl_pathv[i], &s, &p, &e) != LW_OK) {
            fprintf(stderr, "%s:%d: %s\n", e.file, e.line, e.msg);
            return 1;
        }
        const char *base = strrchr(g.gl_pathv[i], '/') + 1;
        bench(&p, base, 1e-10);
        for (size_t m = 0; m < lw_profile_mode_count(&p); m++) {
            /* the path `lampwick run --mode` takes (a chain included) */
            lw_profile q;
            char label[128];
            lw_profile_variant v = {.mode = lw_profile_mode_name(&p, m)};
            if (lw_profile_derive(&p, &v, "--mode", &q, &e) != LW_OK)
                return 1;
            snprintf(label, sizeof label, "%s --mode %s", base, v.mode);
            bench(&q, label, 1e-10);
            if (!lw_thermal_quasi_static(&q.light.thermal) || q.light.chain) {
                /* a run in time at the tolerance a design study asks */
                snprintf(label, sizeof label, "%s --mode %s (rtol 1e-6)", base, v.mode);
                bench(&q, label, 1e-6);
            }
            lw_profile_clear(&q);
        }
        lw_profile_clear(&p);
    }
    globfree(&g);
    return 0;
}
