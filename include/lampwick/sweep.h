/*
 * sweep.h - sweeps of a profile over a grid of values.
 *
 * Owns: lw_sweep, the full grid of several varies (vary.h), run through
 * the batch's path for one case (lw_batch_run_case); the last vary changes
 * fastest.  lw_sweep_run keeps every row's case; lw_sweep_stream hands each
 * row to a callback on the worker that ran it and keeps only the row's
 * index and chart point, so that its memory does not grow with the rows'
 * results (sweepreport.h writes the rows in order as they complete).
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

/* The rows of the grid of vary[nvary] (the product of their counts); 0
 * when a vary has no values or the grid has more than LW_SWEEP_ROWS_MAX. */
size_t lw_sweep_rows(const lw_vary *vary, size_t nvary);

/* What a chart of a sweep needs of each row (0 where it did not light). */
typedef struct lw_sweep_point {
    double flux_30s_lm, runtime_h;
} lw_sweep_point;

typedef struct lw_sweep {
    const lw_vary *vary;  /* borrowed */
    size_t nvary;
    size_t n;             /* rows: the product of the vary sizes */
    size_t *index;        /* n * nvary: which value of each vary a row uses */
    lw_case *cases;       /* n (lw_sweep_run), or NULL (lw_sweep_stream) */
    lw_sweep_point *points; /* n */
} lw_sweep;

/* A streamed sweep's row: called on the worker (0 .. threads - 1) that ran
 * row `row`, with its case (c->status LW_OK: its result and light; else
 * why it failed, and the sweep stops there).  The case is freed after.  A
 * status other than LW_OK stops the sweep too.  Rows may arrive in any
 * order and at once from several workers. */
typedef lw_status (*lw_sweep_row_fn)(const lw_sweep *sw, size_t row, int worker,
                                     const lw_case *c, void *ctx, lw_error *err);

/* Build and run the grid (the last vary changes fastest).  Fails with the
 * first case error (bad input) or LW_ENOMEM; a light that never lights is a
 * row, not an error.  Free with lw_sweep_clear. */
LW_MUST_CHECK lw_status lw_sweep_run(const lw_profile *base, const lw_vary *vary, size_t nvary,
                                     int threads, lw_pool_progress_fn progress, void *progress_ctx,
                                     lw_sweep *sw, lw_error *err);
void lw_sweep_clear(lw_sweep *sw);

/* The same grid, each row handed to fn (may be NULL) on the worker that ran
 * it and then freed.  Every row's variant is checked before any row runs.
 * Fails with the error of the lowest failing row (the same for any number
 * of threads; rows after it are not run) or LW_ENOMEM; sw keeps the index
 * and the chart points. */
LW_MUST_CHECK lw_status lw_sweep_stream(const lw_profile *base, const lw_vary *vary, size_t nvary,
                                        int threads, lw_sweep_row_fn fn, void *ctx,
                                        lw_pool_progress_fn progress, void *progress_ctx,
                                        lw_sweep *sw, lw_error *err);

#endif
