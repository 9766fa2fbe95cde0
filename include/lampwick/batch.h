/*
 * batch.h - running many variants of one profile, on all cores.
 *
 * Owns: lw_case (one variant: an optional mode and up to LW_CASE_SETS
 * "section.key" overrides, and after the run its status, error, result and
 * resolved light) and lw_batch_run, which runs every case through the same
 * path as `lampwick run` (copy profile -> mode -> overrides -> resolve ->
 * lw_run) with lw_pool_for.  Results are identical to running the cases
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

#define LW_CASE_SETS 8
#define LW_CASE_VALUE_MAX 128

typedef struct lw_override {
    char key[2 * LW_INI_NAME_MAX];
    char value[LW_CASE_VALUE_MAX];
} lw_override;

typedef struct lw_case {
    const char *mode;              /* borrowed; NULL for the profile as written */
    lw_override set[LW_CASE_SETS];
    size_t nset;
    /* filled by lw_batch_run: */
    lw_status status;              /* LW_OK, or why this case could not run */
    lw_error err;
    lw_result res;
    lw_light light;                /* the resolved light (tables shared) */
    bool has_light;
} lw_case;

/* Add an override to a case; false if the case is full or a text too long. */
bool lw_case_set(lw_case *c, const char *key, const char *value);

/* The profile of one case: a copy of base with the case's mode and
 * overrides applied and resolved.  Errors about an override name
 * "ORIGIN KEY" (e.g. "--vary drive.resistor_ohm").  Free with
 * lw_profile_clear (also after a failure). */
lw_status lw_case_profile(const lw_profile *base, const lw_case *c, const char *origin,
                          lw_profile *out, lw_error *err);

/* Run every case.  threads <= 0: all cores.  Returns LW_OK even when cases
 * failed (see each case's status). */
void lw_batch_run(const lw_profile *base, lw_case *cases, size_t n, int threads,
                  lw_pool_progress_fn progress, void *progress_ctx);

/* Free what the cases hold (not the array). */
void lw_batch_clear(lw_case *cases, size_t n);

#endif
