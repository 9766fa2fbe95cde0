/*
 * sweepreport.h - the table of a sweep: the varied keys, then any of the
 * run columns (report.h).
 */
#ifndef LW_SWEEPREPORT_H
#define LW_SWEEPREPORT_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include "rtable.h"
#include "sweep.h"

/* The table of a sweep: the varied keys, then the run columns `columns`
 * (comma-separated names of lw_report_run_columns; NULL: every column for CSV and
 * Markdown, a readable subset for text).  Fails with the unknown column. */
LW_MUST_CHECK lw_status lw_report_sweep(const lw_sweep *sw, lw_rtable_format fmt,
                                        const char *columns, lw_rtable **out, lw_error *err);

/* The most rows a streamed sweep holds formatted and waiting for an
 * earlier row, per worker: enough that a slow row does not stall the
 * others, few enough that the memory stays small. */
#define LW_SWEEP_WINDOW_PER_THREAD 64

/* Run the grid (lw_sweep_stream) and write the same table as
 * lw_report_sweep to fp as the rows complete: each worker formats its own
 * rows, and they are written in row order, a row at most
 * LW_SWEEP_WINDOW_PER_THREAD x threads behind being held.  CSV and Markdown
 * stream; aligned text needs every row for its widths and keeps them packed
 * (some tens of bytes a row).  sw keeps the index and the chart points (for
 * lw_plot_sweep).  On a failed row the rows before it have been written and
 * its error is returned. */
LW_MUST_CHECK lw_status lw_report_sweep_stream(const lw_profile *base, const lw_vary *vary,
                                               size_t nvary, int threads, lw_rtable_format fmt,
                                               bool quiet, const char *columns, FILE *fp,
                                               lw_pool_progress_fn progress, void *progress_ctx,
                                               lw_sweep *sw, lw_error *err);

#endif
