/*
 * fitreport.h - the reports of the fits: an LED's I-V and output fits
 * (text with a section ready to paste into a profile, or a CSV/Markdown
 * table in full precision) and a cell's fit from discharge logs.
 */
#ifndef LW_FITREPORT_H
#define LW_FITREPORT_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include <stdio.h>
#include "cellfit.h"
#include "fit.h"
#include "rtable.h"

/* The LED fits (lin, sh, fx may each be NULL when not fitted). */
LW_MUST_CHECK lw_status lw_report_led_fit(FILE *fp, lw_rtable_format fmt, const lw_fit_data *data,
                           const lw_led_fit *lin, const lw_led_fit *sh, const lw_flux_fit *fx,
                           double junction_c, lw_error *err);

/* Only the [led] section of the recommended model (lw_fit_led_best), which
 * records the junction temperature of the bench data. */
LW_MUST_CHECK lw_status lw_report_led_section(FILE *fp, const lw_fit_data *data,
                                              const lw_led_fit *lin, const lw_led_fit *sh,
                                              const lw_flux_fit *fx, double junction_c,
                                              lw_error *err);

/* The summary of a cell fit: each log's charge, the rated capacity,
 * Peukert's exponent, the internal resistance and the curve kept. */
LW_MUST_CHECK lw_status lw_report_cell_fit(FILE *fp, const lw_cellfit *fit,
                                           const char *const *log_names, double cutoff_v,
                                           lw_error *err);

#endif
