/*
 * mcreport.h - the report of a spread study (montecarlo.h): what the
 * units reach, how many break a rating or miss a target, and which key
 * drives the spread; its histogram and its ranking chart.
 *
 * Owns: lw_report_mc (text and Markdown: every table; CSV: one row per
 * quantity with the columns quantity, nominal, mean, sd, p1, p5, p50, p95,
 * p99), lw_report_mc_samples (the CSV of the units), and the charts
 * lw_plot_mc_histogram and lw_plot_mc_ranking (standalone SVG).
 */
#ifndef LW_MCREPORT_H
#define LW_MCREPORT_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include <stdio.h>
#include "montecarlo.h"
#include "rtable.h"

typedef struct lw_mc_study {
    const lw_profile *prof;
    const lw_mc_key *keys;
    size_t nkeys;
    const lw_mc_options *opt;
    const lw_mc_result *res;
    const lw_mc_target *targets;
    size_t ntargets;
} lw_mc_study;

/* The spread study's report: the headline, then its tables.  quiet:
 * without the caution and the notes. */
LW_MUST_CHECK lw_status lw_report_mc(FILE *fp, const lw_mc_study *s, lw_rtable_format fmt,
                                     bool quiet, lw_error *err);

/* The report's headline into buf: "95 % of units run at least X h (95 %
 * interval A to B h); the nominal unit runs Y h." */
LW_MUST_CHECK lw_status lw_report_mc_headline(const lw_mc_study *s, char *buf, size_t size,
                                              lw_error *err);

/* One row per unit: sample, the drawn values, the quantities, warnings. */
LW_MUST_CHECK lw_status lw_report_mc_samples(FILE *fp, const lw_mc_study *s,
                                                 lw_error *err);

/* A histogram of quantity q with its 5th, 50th and 95th percentiles and the
 * targets on q marked. */
LW_MUST_CHECK lw_status lw_plot_mc_histogram(FILE *fp, const lw_mc_study *s,
                                                 lw_mc_quantity q, lw_error *err);

/* The keys ranked by their standardized rank regression coefficient for
 * runtime and for the 30-s output, as bars either side of zero with their
 * standard errors. */
LW_MUST_CHECK lw_status lw_plot_mc_ranking(FILE *fp, const lw_mc_study *s,
                                               lw_error *err);

#endif
