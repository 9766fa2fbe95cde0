/*
 * sizereport.h - the table of a pack sizing: cell, series and parallel
 * count, resistor, its worst-case power and rating, runtime and margin,
 * output, mass and end reason, with the requirement and the markers
 * explained in the notes.
 */
#ifndef LW_SIZEREPORT_H
#define LW_SIZEREPORT_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include "rtable.h"
#include "size.h"

/* The table of the first `show` rows, with the requirement and the marker
 * legend in the notes (text, Markdown; CSV carries the warnings column). */
LW_MUST_CHECK lw_status lw_report_size(const lw_profile *prof, const lw_size_options *opt,
                         const lw_size_row *rows, size_t show, bool fits, lw_rtable_format fmt,
                         lw_rtable **out, lw_error *err);

#endif
