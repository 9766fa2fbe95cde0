/*
 * pickreport.h - the report of a resistor pick: for each cell the part, its
 * corner table (current, output, dissipation and the margin to each rating
 * at every corner) and the recommendation, or one CSV/Markdown row per cell.
 */
#ifndef LW_PICKREPORT_H
#define LW_PICKREPORT_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include <stdio.h>
#include "pick.h"
#include "rtable.h"

/* The report of n picks (one per cell): text with each part's corner table
 * and recommendation, or one CSV/Markdown row per cell.  quiet: without the
 * caution and the notes (what the corners mean). */
LW_MUST_CHECK lw_status lw_report_pick(FILE *fp, const lw_profile *prof, const lw_pick *picks,
                                       size_t n, lw_target_kind kind, double target,
                                       lw_rtable_format fmt, bool quiet, lw_error *err);

#endif
