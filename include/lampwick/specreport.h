/*
 * specreport.h - the runtime table of a product specification, rendered
 * from the runs of lw_spec_compute (spec.h): text, CSV or Markdown, with
 * notes that state the conditions as computed.
 */
#ifndef LW_SPECREPORT_H
#define LW_SPECREPORT_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include "rtable.h"
#include "spec.h"

/* Render the table.  Text and Markdown are rounded as specification tables
 * are (the rule is printed in the notes); CSV carries full precision in fixed
 * units, one column per quantity and cell ("CELL.flux_lm", ...). */
LW_MUST_CHECK lw_status lw_report_spec(const lw_spec *spec, lw_rtable_format fmt, lw_rtable **out,
                         lw_error *err);

/* The corners of every run of the table: per mode and cell the nominal
 * runtime beside the cold corner's ambient, runtime and 30-s output, and
 * the worst hot LED current and resistor power (corner.h). */
LW_MUST_CHECK lw_status lw_report_spec_corners(const lw_spec *spec, lw_rtable_format fmt,
                                               lw_rtable **out, lw_error *err);

/* Compute and render in one call. */
LW_MUST_CHECK lw_status lw_report_spec_table(const lw_profile *prof, const char *const *cells,
                               lw_rtable_format fmt, int threads, lw_rtable **out,
                               lw_error *err);

/* Runtime for a specification table: whole minutes below 1 h ("45 min"),
 * 0.1 h below 10 h ("7.5 h"), whole hours from 10 h ("62 h"). */
void lw_report_spec_hours(double h, char *buf, size_t size);

#endif
