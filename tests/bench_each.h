/*
 * bench_each.h - what the benchmarks share: a monotonic clock, and every
 * bundled profile (as written, then each of its modes) derived the way
 * `lampwick run [--mode M]` derives it, handed to a function.
 */
#ifndef LW_BENCH_EACH_H
#define LW_BENCH_EACH_H

#include <glob.h>
#include <stdbool.h>
#include <stdio.h>
#include <string.h>
#include <time.h>
#include <lampwick/lampwick.h>

static inline double bench_now_s(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* fn(profile, label, mode, ctx) for every bundled profile as written (mode
 * NULL) and each of its modes; label "NAME.ini" or "NAME.ini --mode M".
 * Returns 1 (after saying why) when a profile does not load. */
typedef void (*bench_each_fn)(const lw_profile *p, const char *label, const char *mode,
                              void *ctx);

static inline int bench_each(bench_each_fn fn, void *ctx)
{
    glob_t g;
    if (glob(LW_SOURCE_ROOT "/profiles/*.ini", 0, NULL, &g) != 0)
        return 1;
    lw_search s;
    memset(&s, 0, sizeof s);
    lw_search_add(&s, LW_SOURCE_ROOT "/cells");
    int rc = 0;
    for (size_t i = 0; i < g.gl_pathc && rc == 0; i++) {
        lw_profile p;
        lw_error e;
        lw_error_clear(&e);
        if (lw_profile_load(g.gl_pathv[i], &s, &p, &e) != LW_OK) {
            fprintf(stderr, "%s:%d: %s\n", e.file, e.line, e.msg);
            rc = 1;
            break;
        }
        const char *base = strrchr(g.gl_pathv[i], '/');
        base = base ? base + 1 : g.gl_pathv[i];
        size_t modes = lw_profile_mode_count(&p);
        for (size_t m = 0; m <= modes; m++) {
            lw_profile_variant v = {.mode = m < modes ? lw_profile_mode_name(&p, m) : NULL};
            lw_profile q;
            if (lw_profile_derive(&p, &v, "--mode", &q, &e) != LW_OK) {
                fprintf(stderr, "%s: %s\n", base, e.msg);
                rc = 1;
                break;
            }
            char label[160];
            snprintf(label, sizeof label, "%s%s%s", base, v.mode ? " --mode " : "",
                     v.mode ? v.mode : "");
            fn(&q, label, v.mode, ctx);
            lw_profile_clear(&q);
        }
        lw_profile_clear(&p);
    }
    globfree(&g);
    return rc;
}

#endif
