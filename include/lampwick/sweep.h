/*
 * sweep.h - sweeps of a profile over a grid of values.
 *
 * Owns: lw_vary (one --vary KEY=VALUES: the key and the list of texts it
 * takes) with its parser, and lw_sweep (the full grid of several varies,
 * run through lw_batch_run).
 *
 * VALUES forms:
 *   22,33,47          a list (SI prefixes and resistor codes allowed for
 *                     numbers: 2.2k, 4k7, 1M, 4R7)
 *   1..4  1..4:0.5    a numeric range, step 1 or the step after ':'
 *   E24:10..1k        the values of a preferred series in a range
 *   all               for pack.cell: every cell file in the profile's folder
 *                     and on the search path (INI files without a [cell]
 *                     section are skipped, with a note);
 *                     for mode: every mode of the profile
 */
#ifndef LW_SWEEP_H
#define LW_SWEEP_H

#include "batch.h"
#include "cellfile.h"
#include "plot.h"
#include "report.h"

#define LW_VARY_MAX_VALUES 100000

typedef struct lw_vary {
    char key[2 * LW_INI_NAME_MAX];
    size_t n;
    char (*values)[LW_CASE_VALUE_MAX]; /* n texts, as set into the profile */
    char note[512];       /* "" or a note for the user (files skipped by 'all') */
} lw_vary;

/* The accepted forms, for messages and help. */
extern const char *const lw_vary_forms;

/* Parse "KEY=VALUES".  The key is a profile key, or `mode` for the
 * profile's modes (a list of mode names, or all).  `prof` gives the modes
 * and the cell search path (pack.cell=all); it may be NULL when neither is
 * used.  Free with lw_vary_clear. */
lw_status lw_vary_parse(const char *arg, const lw_profile *prof, lw_vary *v, lw_error *err);
void lw_vary_clear(lw_vary *v);

typedef struct lw_sweep {
    const lw_vary *vary;  /* borrowed */
    size_t nvary;
    size_t n;             /* rows: the product of the vary sizes */
    size_t *index;        /* n * nvary: which value of each vary a row uses */
    lw_case *cases;       /* n */
} lw_sweep;

/* Build and run the grid (the last vary changes fastest).  Fails with the
 * first case error (bad input) or LW_ENOMEM; a light that never lights is a
 * row, not an error.  Free with lw_sweep_clear. */
/* The table of a sweep: the varied keys, then the run columns `columns`
 * (comma-separated names of lw_report_run_columns; NULL: every column for CSV and
 * Markdown, a readable subset for text).  Fails with the unknown column. */
lw_status lw_sweep_table(const lw_sweep *sw, lw_rtable_format fmt, const char *columns, lw_rtable **out,
                         lw_error *err);

/* The trade-off chart of a sweep: runtime against the 30-s light output, one
 * series per value of the first varied key other than the resistor, points
 * labelled with the resistor (or the last varied key).  Fill *chart; the
 * arrays it points to are malloc'd into *buf (free it after writing). */
lw_status lw_sweep_chart(const lw_profile *prof, const lw_sweep *sw, lw_chart *chart,
                         void **buf, lw_error *err);

lw_status lw_sweep_run(const lw_profile *base, const lw_vary *vary, size_t nvary, int threads,
                       lw_pool_progress_fn progress, void *progress_ctx, lw_sweep *sw, lw_error *err);
void lw_sweep_clear(lw_sweep *sw);

#endif
