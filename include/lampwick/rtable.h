/*
 * rtable.h - tables for people and documents.
 *
 * Owns: lw_rtable, a table of text cells with a header, optional column
 * groups, notes and a title, rendered as aligned text (numbers right-
 * aligned), RFC 4180 CSV through csvio (numbers in full precision), a
 * Markdown table, one JSON object (numbers in full precision, see
 * jsondoc.h) or an HTML table; and lw_rtable_format, the choice.
 */
#ifndef LW_RTABLE_H
#define LW_RTABLE_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>
#include "error.h"

/* JSON: lw_rtable_write writes each table as one JSON object on one line
 * (title, columns, rows as objects keyed by the CSV column names, notes);
 * lw_jdoc (jsondoc.h) gathers a command's tables into one document. */
/* HTML: an HTML table (caption, a header row per column group, numbers
 * right-aligned) and its notes, for the design review (htmlreport.h); like
 * text, it takes the column names and rounding written for people. */
typedef enum lw_rtable_format {
    LW_FMT_TEXT, LW_FMT_CSV, LW_FMT_MD, LW_FMT_JSON, LW_FMT_HTML
} lw_rtable_format;

/* Parse "text", "csv", "md" or "json" (the command-line formats); false if
 * none. */
bool lw_rtable_format_parse(const char *s, lw_rtable_format *fmt);

/* Whether a report in fmt takes the names and rounding written for people
 * (text and HTML) rather than those for programs and documents. */
bool lw_rtable_for_people(lw_rtable_format fmt);

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
    bool quiet;          /* written without its notes in text, Markdown and HTML
                            (`-q`: for scripts reading standard output) */
    /* packed rows (lw_rtable_add_packed): every cell in one arena, no
     * full-precision text; a table holds packed rows or the others, not both */
    char *arena;
    size_t arena_len, arena_cap;
    size_t *off;         /* nrow * ncol offsets into the arena */
} lw_rtable;

lw_rtable *lw_rtable_new(size_t ncol, lw_error *err);
void lw_rtable_free(lw_rtable *t);
LW_MUST_CHECK lw_status lw_rtable_head(lw_rtable *t, size_t col, const char *name, lw_error *err);
/* Set the group label of a column (neighbours with the same label form one
 * group: a spanning line above the header in text). */
LW_MUST_CHECK lw_status lw_rtable_group(lw_rtable *t, size_t col, const char *group, lw_error *err);
/* Append an empty row; returns its index via *row. */
LW_MUST_CHECK lw_status lw_rtable_add_row(lw_rtable *t, size_t *row, lw_error *err);
LW_MUST_CHECK lw_status lw_rtable_set(lw_rtable *t, size_t row, size_t col, const char *text,
                                      lw_error *err);
/* Copy cell (sr, sc) of src, full precision included, into (row, col). */
LW_MUST_CHECK lw_status lw_rtable_copy_cell(lw_rtable *t, size_t row, size_t col,
                                            const lw_rtable *src, size_t sr, size_t sc,
                                            lw_error *err);
LW_MUST_CHECK lw_status lw_rtable_setf(lw_rtable *t, size_t row, size_t col, lw_error *err,
                                       const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 6)))
#endif
    ;
/* A number: `sig` significant digits in text and Markdown, full precision
 * (the shortest text that reads back exactly) in CSV; NaN is empty. */
LW_MUST_CHECK lw_status lw_rtable_num(lw_rtable *t, size_t row, size_t col, double v, int sig,
                        lw_error *err);
LW_MUST_CHECK lw_status lw_rtable_note(lw_rtable *t, const char *text, lw_error *err);
LW_MUST_CHECK lw_status lw_rtable_set_title(lw_rtable *t, const char *text, lw_error *err);
/* Render; returns LW_EIO if a write failed. */
LW_MUST_CHECK lw_status lw_rtable_write(const lw_rtable *t, FILE *fp, lw_rtable_format fmt,
                                        lw_error *err);

/* ---- tables written a row at a time (a long sweep in flat memory) ---- */

/* Append a row whose cells are the ncol NUL-terminated texts laid end to
 * end in packed[0 .. len-1], kept in the table's arena (no allocation per
 * cell: the aligned text of a hundred thousand rows in some megabytes). */
LW_MUST_CHECK lw_status lw_rtable_add_packed(lw_rtable *t, const char *packed, size_t len,
                                             lw_error *err);

/* Row `row` of t rendered alone into *out (allocated; free() it), *len
 * bytes: a CSV record with CRLF (full precision), a Markdown table row with
 * its newline, or for text the cells laid end to end NUL-terminated, as
 * lw_rtable_add_packed takes them (for JSON the same, of the full-precision
 * texts: a JSON table is written whole, by lw_rtable_write). */
LW_MUST_CHECK lw_status lw_rtable_render_row(const lw_rtable *t, size_t row,
                                             lw_rtable_format fmt, char **out, size_t *len,
                                             lw_error *err);

/* The head of a CSV or Markdown table (title, header; Markdown's column
 * alignment read from the rows t holds, numbers right), to be followed by
 * rendered rows; lw_rtable_write_notes ends it.  LW_EIO if a write failed. */
LW_MUST_CHECK lw_status lw_rtable_write_head(const lw_rtable *t, FILE *fp, lw_rtable_format fmt,
                                             lw_error *err);
LW_MUST_CHECK lw_status lw_rtable_write_notes(const lw_rtable *t, FILE *fp,
                                              lw_rtable_format fmt, lw_error *err);

#endif
