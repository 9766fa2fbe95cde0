/*
 * trace.h - the trace of a run: time, operating point and share of the
 * reference output, in rows dense where the output bends.
 *
 * Owns: lw_trace (rows of time and lw_point) and lw_trace_build, which
 * rebuilds the run's accepted pieces (lw_run_options.want_trace) row by row:
 * each piece gets its share of min_rows plus a row per 1 % of the reference
 * output the light moves across it (LW_TRACE_PIECE_ROWS_MAX at most), and
 * the time of each row is the run's own quadrature between the rows.
 */
#ifndef LW_TRACE_H
#define LW_TRACE_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

#include "engine.h"

/* Most rows one piece of the run gets in a trace. */
#define LW_TRACE_PIECE_ROWS_MAX 200

/* Rows a trace has at least (lampwick run --trace). */
#define LW_TRACE_ROWS_MIN 200

/* One row of a trace. */
typedef struct lw_trace_row {
    double t_h;
    lw_point pt;
    double pct_of_ref;     /* light output in % of the 30-s output */
    int mode;              /* the mode of a step-down chain (0 without one) */
    int session;           /* the session of a use schedule, from 0 (0 without one) */
} lw_trace_row;

typedef struct lw_trace {
    lw_trace_row *rows;
    size_t n;
    char modes[LW_CHAIN_MAX][LW_NAME_MAX]; /* names of the chain's modes by row.mode
                                               ("" without a chain) */
} lw_trace;

/* Build a trace from a result run with want_trace: points dense where the
 * output bends, at least min_rows, ending exactly at the end of the run.
 * Free with lw_trace_clear. */
LW_MUST_CHECK lw_status lw_trace_build(const lw_light *light, const lw_result *res, size_t min_rows,
                         lw_trace *trace, lw_error *err);
void lw_trace_clear(lw_trace *trace);

#endif
