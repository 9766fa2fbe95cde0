/*
 * report.h - tables and summaries for people and documents.
 *
 * Owns: lw_rtable (a table of text cells with a header and notes, rendered
 * as aligned text, RFC 4180 CSV through csvio, or a Markdown table) and the
 * report of one run (lw_report_run), whose CSV/Markdown columns are the
 * contract documented in docs/formats.md.  Numbers are formatted here, at the
 * edge, from SI into the units in the column names.
 */
#ifndef LW_REPORT_H
#define LW_REPORT_H

#include <stdio.h>
#include "trace.h"
#include "profile.h"

typedef enum lw_rtable_format { LW_FMT_TEXT, LW_FMT_CSV, LW_FMT_MD } lw_rtable_format;

/* Parse "text", "csv" or "md"; false if none. */
bool lw_rtable_format_parse(const char *s, lw_rtable_format *fmt);

typedef struct lw_rtable {
    size_t ncol, nrow, cap;
    char **head;         /* ncol names */
    char **group;        /* ncol group labels (text: a line above spanning equal
                            neighbours; md and csv: prefixed to the name), or NULL */
    char **cell;         /* nrow * ncol texts (NULL = empty) */
    char **full;         /* nrow * ncol full-precision texts of numbers for CSV
                            (NULL: the same as cell) */
    char **notes;        /* lines printed under the table (text and md) */
    size_t nnotes;
    char *title;         /* printed above (text and md), may be NULL */
} lw_rtable;

lw_rtable *lw_rtable_new(size_t ncol, lw_error *err);
void lw_rtable_free(lw_rtable *t);
lw_status lw_rtable_head(lw_rtable *t, size_t col, const char *name, lw_error *err);
/* Set the group label of a column (neighbours with the same label form one
 * group: a spanning line above the header in text). */
lw_status lw_rtable_group(lw_rtable *t, size_t col, const char *group, lw_error *err);
/* Append an empty row; returns its index via *row. */
lw_status lw_rtable_add_row(lw_rtable *t, size_t *row, lw_error *err);
lw_status lw_rtable_set(lw_rtable *t, size_t row, size_t col, const char *text, lw_error *err);
/* Copy cell (sr, sc) of src, full precision included, into (row, col). */
lw_status lw_rtable_copy_cell(lw_rtable *t, size_t row, size_t col, const lw_rtable *src,
                              size_t sr, size_t sc, lw_error *err);
lw_status lw_rtable_setf(lw_rtable *t, size_t row, size_t col, lw_error *err, const char *fmt,
                         ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 6)))
#endif
    ;
/* A number: `sig` significant digits in text and Markdown, full precision
 * (the shortest text that reads back exactly) in CSV; NaN is empty. */
lw_status lw_rtable_num(lw_rtable *t, size_t row, size_t col, double v, int sig,
                        lw_error *err);
lw_status lw_rtable_note(lw_rtable *t, const char *text, lw_error *err);
lw_status lw_rtable_set_title(lw_rtable *t, const char *text, lw_error *err);
/* Render; returns LW_EIO if a write failed. */
lw_status lw_rtable_write(const lw_rtable *t, FILE *fp, lw_rtable_format fmt, lw_error *err);

/* Number of the run columns, and their names in order (NULL-terminated). */
extern const char *const lw_report_run_columns[];
extern const size_t lw_report_run_ncolumns;

/* Fill columns [first, first + lw_report_run_ncolumns) of `row` from a result. */
lw_status lw_report_run_row(lw_rtable *t, size_t row, size_t first, const lw_light *light,
                            const lw_result *res, lw_error *err);

/* The whole report of one run in the chosen format. */
lw_status lw_report_run(FILE *fp, lw_rtable_format fmt, const lw_profile *prof, const lw_result *res,
                        lw_error *err);

/* The trace of a run as CSV (columns in docs/formats.md), full precision. */
lw_status lw_report_trace_csv(FILE *fp, const lw_trace *trace, lw_error *err);

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

/* Human duration: "41.3 h", "52 min", "3.2 d" style. */
void lw_report_hours(double h, char *buf, size_t size);

/* The one-line caution printed with every result. */
extern const char *const lw_report_caution;

#endif
