/*
 * sweep.h - sweeps of a profile over a grid of values.
 *
 * Owns: lw_sweep, the full grid of several varies (vary.h), run through
 * lw_batch_run; the last vary changes fastest.
 */
#ifndef LW_SWEEP_H
#define LW_SWEEP_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include "batch.h"
#include "vary.h"

/* At most this many --vary options in one sweep. */
#define LW_SWEEP_VARY_MAX 8
/* The largest grid: the product of the --vary counts.  A million rows is
 * minutes of work and some hundreds of megabytes held; beyond it a sweep is
 * almost surely a typing slip. */
#define LW_SWEEP_ROWS_MAX 1000000

typedef struct lw_sweep {
    const lw_vary *vary;  /* borrowed */
    size_t nvary;
    size_t n;             /* rows: the product of the vary sizes */
    size_t *index;        /* n * nvary: which value of each vary a row uses */
    lw_case *cases;       /* n */
} lw_sweep;

/* Build and run the grid (the last vary changes fastest).  Fails with the
 * first case error (bad input) or LW_ENOMEM; a light that never lights is a
 * row, not an error.  Free with lw_sweep_clear. */
LW_MUST_CHECK lw_status lw_sweep_run(const lw_profile *base, const lw_vary *vary, size_t nvary,
                                     int threads, lw_pool_progress_fn progress, void *progress_ctx,
                                     lw_sweep *sw, lw_error *err);
void lw_sweep_clear(lw_sweep *sw);

#endif
