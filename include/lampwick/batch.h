/*
 * batch.h - running many variants of one profile, on all cores.
 *
 * Owns: lw_case (one variant of the profile, profile.h, and after the run
 * its status, error, result and resolved light) and lw_batch_run, which runs
 * every case through the same path as `lampwick run` (lw_profile_derive,
 * then lw_run) with lw_pool_for.  Results are identical to running the cases
 * one by one, and stay in input order.  Sweeps, pick, size and table are all
 * built on it, so one code path computes every number.
 */
#ifndef LW_BATCH_H
#define LW_BATCH_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include "engine.h"
#include "pool.h"
#include "profile.h"

typedef struct lw_case {
    lw_profile_variant variant;    /* the mode and overrides of this case */
    /* filled by lw_batch_run: */
    lw_status status;              /* LW_OK, or why this case could not run */
    lw_error err;
    lw_result res;
    lw_light light;                /* the resolved light (tables shared) */
    bool has_light;
} lw_case;

/* Fewer cases than this run on the calling thread alone: a run takes some
 * tens of microseconds, a thread start and join a similar time, so a small
 * batch gains nothing from threads (a judgement, no measurement). */
#define LW_BATCH_THREADED_MIN 16

/* The workers a batch of n cases runs on, asked for threads (<= 0: all
 * cores): one below LW_BATCH_THREADED_MIN, else lw_pool_threads(n, threads). */
int lw_batch_workers(size_t n, int threads);

/* Run one case as lw_batch_run runs each (on the calling thread). */
void lw_batch_run_case(const lw_profile *base, lw_case *c, const char *origin);

/* Run every case: its profile by lw_profile_derive (messages about an
 * override name "ORIGIN KEY"), then lw_run.  threads <= 0: all cores.  Each
 * case's status says whether it ran. */
void lw_batch_run(const lw_profile *base, lw_case *cases, size_t n, int threads,
                  const char *origin, lw_pool_progress_fn progress, void *progress_ctx);

/* Free what the cases hold (not the array). */
void lw_batch_clear(lw_case *cases, size_t n);

#endif
