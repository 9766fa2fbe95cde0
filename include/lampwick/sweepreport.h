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

#endif
