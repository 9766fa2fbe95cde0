/*
 * csvio.h - every CSV read and write of lampwick, through libcsv.
 *
 * Owns: lw_csv (a numeric table read from a CSV file: a header row of
 * column names, then rows of numbers, each row with its line number) and
 * lw_csvw (a CSV writer: RFC 4180 quoting by libcsv, CRLF line ends).
 *
 * Reading is strict (libcsv's CSV_STRICT): a path that is not a regular file,
 * a file over LW_CSV_BYTES_MAX or LW_CSV_ROWS_MAX rows, a NUL byte, a bad
 * quote, an empty file, a header without names, a row with a different
 * number of fields than the header (ragged), a field longer than
 * LW_CSV_FIELD_MAX - 1 or that is not a finite number are refused with
 * file:line and the column name; nothing is cut silently.
 */
#ifndef LW_CSVIO_H
#define LW_CSVIO_H

/* layer 3, io (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 3
#error "io-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include <stdio.h>
#include "error.h"
#include "outfile.h"
#include "path.h"

#define LW_CSV_NAME_MAX 64
#define LW_CSV_COLS_MAX 64
/* Limits of one CSV file (a 1 Hz discharge log of 100 days is 8.6 M rows
 * of about 20 bytes: 170 MB; logs are kept at a sample a minute or slower). */
#define LW_CSV_FIELD_MAX 128
#define LW_CSV_BYTES_MAX (64L * 1024 * 1024)
#define LW_CSV_ROWS_MAX 1000000

typedef struct lw_csv {
    char path[512];
    size_t ncol;
    char names[LW_CSV_COLS_MAX][LW_CSV_NAME_MAX]; /* as written, trimmed */
    int header_line;
    size_t nrow;
    double *v;      /* nrow * ncol, row-major (NAN in the text column) */
    int *line;      /* line of each row */
    int text_col;   /* the one column read as text (lw_csv_read_text), or -1 */
    char (*text)[LW_CSV_NAME_MAX]; /* its field in each row, trimmed */
} lw_csv;

/* Read a numeric CSV file; `ref` (may be NULL) is the key that named it,
 * for the message when it cannot be opened.  Free with lw_csv_clear. */
LW_MUST_CHECK lw_status lw_csv_read(const char *path, const lw_path_ref *ref, lw_csv *csv,
                                    lw_error *err);
/* The same, with the column named text_column (case-insensitive; it may
 * be absent) read as text: valid UTF-8 without control characters, at most
 * LW_CSV_NAME_MAX - 1 bytes, empty allowed. */
LW_MUST_CHECK lw_status lw_csv_read_text(const char *path, const lw_path_ref *ref,
                                         const char *text_column, lw_csv *csv, lw_error *err);
/* The text column's field in row i ("" without a text column). */
const char *lw_csv_text(const lw_csv *csv, size_t i);
void lw_csv_clear(lw_csv *csv);

/* Index of a column by name (case-insensitive), or -1. */
int lw_csv_column(const lw_csv *csv, const char *name);

/* Check that the columns are exactly `required` plus any of `optional`
 * (NULL-terminated lists); the error names the file, header line, the
 * unknown or missing column and the expected ones. */
LW_MUST_CHECK lw_status lw_csv_expect(const lw_csv *csv, const char *const *required,
                        const char *const *optional, lw_error *err);

static inline double lw_csv_at(const lw_csv *csv, size_t row, int col)
{
    return csv->v[row * csv->ncol + (size_t)col];
}

/* ---- writing ---- */

typedef struct lw_csvw {
    FILE *fp;     /* the file written, or NULL: the memory below */
    char *buf;    /* lw_csvw_init_mem: what was written, NUL-terminated (free()) */
    size_t len, cap;
    int fields;   /* fields written on the current row */
    bool failed;  /* a write failed (or memory ran out) */
} lw_csvw;

void lw_csvw_init(lw_csvw *w, FILE *fp);
/* Write into memory (w->buf, w->len) instead of a file. */
void lw_csvw_init_mem(lw_csvw *w);
void lw_csvw_text(lw_csvw *w, const char *s);
/* A number in full precision (the shortest text that reads back exactly);
 * NaN and infinities are written as an empty field. */
void lw_csvw_num(lw_csvw *w, double v);
void lw_csvw_end_row(lw_csvw *w);

#endif
