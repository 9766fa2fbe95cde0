/*
 * sizereport.h - the table of a pack sizing: cell, series and parallel
 * count, resistor, its worst-case power and rating, runtime and margin,
 * output, mass and end reason, with the requirement and the markers
 * explained in the notes.
 */
#ifndef LW_SIZEREPORT_H
#define LW_SIZEREPORT_H

#include "rtable.h"
#include "size.h"

/* The table of the first `show` rows, with the requirement and the marker
 * legend in the notes (text, Markdown; CSV carries the warnings column). */
lw_status lw_report_size(const lw_profile *prof, const lw_size_options *opt,
                         const lw_size_row *rows, size_t show, bool fits, lw_rtable_format fmt,
                         lw_rtable **out, lw_error *err);

#endif
