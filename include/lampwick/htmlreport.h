/*
 * htmlreport.h - the design review in one file.
 *
 * Owns: lw_report_html, which runs a light every way a design review asks
 * (its run, every mode, the corners, the spread study of its [spread]
 * section) and writes one self-contained HTML5 document: inline CSS and
 * SVG, no script, no external reference, print CSS for A4 or Letter (a
 * page break before each major section, tables and charts never split).
 * Units as elsewhere in the reports: h, lm, mA, W, °C.
 */
#ifndef LW_HTMLREPORT_H
#define LW_HTMLREPORT_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include <stdint.h>
#include <stdio.h>
#include "error.h"
#include "profile.h"

typedef struct lw_html_options {
    const char *date;       /* the date the report shows ("2026-12-02"); the caller's
                               clock, so that a report can be made again byte for byte */
    size_t spread_samples;  /* units of the spread study; 0: LW_MC_SAMPLES_DEFAULT */
    uint64_t seed;          /* of the spread study */
    int threads;            /* <= 0: all cores */
} lw_html_options;

/* The sections, in order, by their HTML id: summary, inputs, provenance,
 * specification, discharge, energy, corners, spread (only with spread
 * keys), warnings, caution (tests/browser_check.py checks each). */

/* Write the review of prof (as loaded, its mode and overrides applied).
 * LW_ENOANSWER when the light gives no light at switch-on (nothing to
 * review); bad input and numerical failures as the runs give them. */
LW_MUST_CHECK lw_status lw_report_html(FILE *fp, const lw_profile *prof,
                                       const lw_html_options *opt, lw_error *err);

#endif
