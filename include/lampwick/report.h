/*
 * report.h - the report of a run, for people and documents.
 *
 * Owns: the report of one run (lw_report_run), whose CSV/Markdown columns
 * are the contract documented in docs/formats.md, the trace CSV, and the
 * words for drives, warnings, references and durations that every report
 * uses.  Numbers are formatted here, at the
 * edge, from SI into the units in the column names.
 */
#ifndef LW_REPORT_H
#define LW_REPORT_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include <stdio.h>
#include "corner.h"
#include "profile.h"
#include "rtable.h"
#include "trace.h"

/* Number of the run columns, and their names in order (NULL-terminated). */
extern const char *const lw_report_run_columns[];
extern const size_t lw_report_run_ncolumns;

/* Fill columns [first, first + lw_report_run_ncolumns) of `row` from a result. */
LW_MUST_CHECK lw_status lw_report_run_row(lw_rtable *t, size_t row, size_t first,
                                          const lw_light *light, const lw_result *res,
                                          lw_error *err);

/* The whole report of one run in the chosen format.  quiet: without the
 * caution and the notes (text and Markdown; `-q` on the command line, for
 * scripts; CSV has none, JSON keeps them as data). */
LW_MUST_CHECK lw_status lw_report_run(FILE *fp, lw_rtable_format fmt, bool quiet,
                                      const lw_profile *prof, const lw_result *res,
                                      lw_error *err);

/* The energy drawn from the cells over a run and where it went (LEDs,
 * resistors, the cells' internal resistance, the driver), Wh and %. */
LW_MUST_CHECK lw_status lw_report_energy(const lw_light *l, const lw_result *r,
                                         lw_rtable_format fmt, lw_rtable **out, lw_error *err);

/* What `lampwick run` prints: lw_report_run, then, unless CSV (one row)
 * or the light never lit, its corner table (lw_corner_compute). */
LW_MUST_CHECK lw_status lw_report_run_with_corners(FILE *fp, lw_rtable_format fmt, bool quiet,
                                                   const lw_profile *prof, const lw_result *res,
                                                   lw_error *err);

/* The corner table of a light (corner.h): per corner its ambient, LED
 * current, output, resistor power, and for the nominal and cold corners the
 * runtime and the output 30 s after switch-on.  `title` may be NULL. */
LW_MUST_CHECK lw_status lw_report_corners(const lw_corner c[LW_CORNER_COUNT], const char *title,
                                          lw_rtable_format fmt, lw_rtable **out, lw_error *err);

/* The trace of a run as CSV (columns in docs/formats.md), full precision. */
LW_MUST_CHECK lw_status lw_report_trace_csv(FILE *fp, const lw_trace *trace, lw_error *err);

/* Warning names joined by ';' ("" for none). */
void lw_report_warnings(unsigned warnings, char *buf, size_t size);

/* The drive in words: "resistor, 33 ohm per string", "converter, set 50 mA
 * at 85 %, fallback 5 mA, PWM 30 %". */
void lw_report_drive(const lw_light *light, char *buf, size_t size);

/* A warning in words, by bit index (LW_WARN_* = 1u << bit). */
const char *lw_report_warning(int bit);

/* What the relative cutoff refers to, in words ("the 30-s output", "the
 * 30-s output of fresh cells at 20 C"). */
void lw_report_reference(const lw_light *light, char *buf, size_t size);

/* The weakest cell the pack assumes, in words ("the weakest cell in series:
 * 3 % less charge, 0 % more resistance"); false (and "") without a
 * spread. */
bool lw_report_spread(const lw_light *light, char *buf, size_t size);

/* How the light is used, in words ("1 h on, 23 h off", "12 planned
 * sessions", "on from switch-on to the end"). */
void lw_report_schedule(const lw_light *light, char *buf, size_t size);

/* Human duration: "41.3 h", "52 min", "3.2 d" style. */
void lw_report_hours(double h, char *buf, size_t size);

/* The one-line caution printed with every result. */
extern const char *const lw_report_caution;
/* The safety paragraph: lithium cells, hot parts, bright LEDs, and whose
 * limits and standards rule. */
extern const char *const lw_report_safety;

/* The letter that marks warning bit `bit` in a table ('a' for bit 0). */
char lw_report_warning_marker(int bit);

/* One note per warning bit set in `used`: "(a) <the warning in words>.". */
LW_MUST_CHECK lw_status lw_report_warning_notes(lw_rtable *t, unsigned used, lw_error *err);

/* The end of every study table, given the status of building it (st).
 * lw_report_table_write: on success the caution goes under a Markdown
 * table and the table is written to fp; lw_report_table_keep: the caution
 * goes under a text or Markdown table and *out takes the table.  Both free
 * the table on any failure (and _write always), and return the first
 * failure. */
LW_MUST_CHECK lw_status lw_report_table_write(lw_rtable *t, lw_status st, FILE *fp,
                                              lw_rtable_format fmt, lw_error *err);
LW_MUST_CHECK lw_status lw_report_table_keep(lw_rtable *t, lw_status st, lw_rtable_format fmt,
                                             lw_rtable **out, lw_error *err);

#endif
