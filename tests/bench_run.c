/*
 * bench_run.c - benchmark: full discharges per second and solves per run for
 * every bundled profile (and each of its modes; runs in time also at a
 * relative tolerance of 1e-6, the figure a thermal design study needs).  Run with
 * `meson test --benchmark -v`.  Prints; asserts nothing (tests do that).
 */
#include <stdio.h>
#include "bench_each.h"

static void bench(const lw_profile *p, const char *label, double rtol)
{
    lw_run_options opt = lw_run_options_default();
    opt.rtol = rtol;
    lw_result r = {0};
    lw_error e;
    lw_error_clear(&e);
    /* size the loop to about 0.3 s */
    double t0 = bench_now_s();
    long n = 0;
    int solves = 0;
    while (bench_now_s() - t0 < 0.3) {
        for (int k = 0; k < 100; k++) {
            if (lw_run(&p->light, &opt, &r, &e) != LW_OK) {
                fprintf(stderr, "%s: %s\n", label, e.msg);
                return;
            }
            solves = r.solves;
        }
        n += 100;
    }
    double dt = bench_now_s() - t0;
    printf("%-48s %10.0f discharges/s  %5d solves/run  %8.3f us/run  runtime %.4g h\n", label,
           (double)n / dt, solves, 1e6 * dt / (double)n, r.runtime_h);
}

/* Every profile and mode; a run in time also at the tolerance a design
 * study asks. */
static void each(const lw_profile *p, const char *label, const char *mode, void *ctx)
{
    (void)ctx;
    bench(p, label, 1e-10);
    if (mode && (!lw_thermal_quasi_static(&p->light.thermal) || p->light.chain)) {
        char l6[200];
        snprintf(l6, sizeof l6, "%s (rtol 1e-6)", label);
        bench(p, l6, 1e-6);
    }
}

int main(void)
{
    return bench_each(each, NULL);
}
