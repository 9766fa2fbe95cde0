/*
 * sweepreport.c - the table of a sweep (see sweepreport.h).
 */
#include "lampwick/sweepreport.h"
#include "lampwick/number.h"

#include <stdio.h>
#include <string.h>
#include "lampwick/report.h"

static const char *const sweep_text_cols[] = {
    "initial_led_ma", "flux_30s_lm", "runtime_h",     "end_reason",     "regulated_h",
    "time_to_half_h", "lumen_hours", "efficiency_pct", "lm_per_w",       "peak_resistor_w",
    "warnings"};

/* At most this many --columns entries. */
#define SWEEP_COLUMNS_MAX 64

static lw_status sweep_columns(const char *list, lw_rtable_format fmt, size_t *cols, size_t *n,
                               lw_error *err)
{
    *n = 0;
    if (!list) {
        size_t k = fmt == LW_FMT_TEXT ? sizeof sweep_text_cols / sizeof sweep_text_cols[0]
                                      : lw_report_run_ncolumns;
        for (size_t i = 0; i < k; i++) {
            size_t c = i;
            if (fmt == LW_FMT_TEXT)
                for (c = 0; strcmp(lw_report_run_columns[c], sweep_text_cols[i]) != 0; c++)
                    ;
            cols[(*n)++] = c;
        }
        return LW_OK;
    }
    for (const char *p = list; *p;) {
        const char *comma = strchr(p, ',');
        size_t len = comma ? (size_t)(comma - p) : strlen(p);
        size_t i = 0;
        while (i < lw_report_run_ncolumns && (strlen(lw_report_run_columns[i]) != len ||
                                              strncmp(lw_report_run_columns[i], p, len) != 0))
            i++;
        if (i == lw_report_run_ncolumns) {
            char known[1024] = "";
            for (size_t k = 0; k < lw_report_run_ncolumns; k++) {
                strncat(known, k ? ", " : "", sizeof known - strlen(known) - 1);
                strncat(known, lw_report_run_columns[k], sizeof known - strlen(known) - 1);
            }
            return lw_error_set(err, LW_EINPUT, "--columns", 0,
                                "unknown column '%.*s'; the columns are: %s", (int)len, p,
                                known);
        }
        if (*n == SWEEP_COLUMNS_MAX)
            return lw_error_set(err, LW_EINPUT, "--columns", 0, "more than %d columns",
                                SWEEP_COLUMNS_MAX);
        cols[(*n)++] = i;
        p += len + (comma ? 1 : 0);
    }
    return LW_OK;
}

static lw_status lw_report_sweep_in_c_locale(const lw_sweep *sw, lw_rtable_format fmt,
                                             const char *columns, lw_rtable **out, lw_error *err)
{
    size_t cols[SWEEP_COLUMNS_MAX];
    size_t ncols;
    *out = NULL;
    lw_status st = sweep_columns(columns, fmt, cols, &ncols, err);
    if (st != LW_OK)
        return st;
    size_t nk = sw->nvary;
    lw_rtable *t = lw_rtable_new(nk + ncols, err);
    lw_rtable *full = t ? lw_rtable_new(lw_report_run_ncolumns, err) : NULL;
    if (!t || !full) {
        lw_rtable_free(t);
        return LW_ENOMEM;
    }
    for (size_t k = 0; k < nk && st == LW_OK; k++)
        st = lw_rtable_head(t, k, sw->vary[k].key, err);
    for (size_t c = 0; c < ncols && st == LW_OK; c++)
        st = lw_rtable_head(t, nk + c, lw_report_run_columns[cols[c]], err);
    size_t frow = 0;
    if (st == LW_OK)
        st = lw_rtable_add_row(full, &frow, err);
    for (size_t r = 0; r < sw->n && st == LW_OK; r++) {
        size_t row = 0;
        st = lw_rtable_add_row(t, &row, err);
        for (size_t k = 0; k < nk && st == LW_OK; k++)
            st = lw_rtable_set(t, row, k, sw->vary[k].values[sw->index[r * nk + k]], err);
        if (st == LW_OK)
            st = lw_report_run_row(full, frow, 0, &sw->cases[r].light, &sw->cases[r].res, err);
        for (size_t c = 0; c < ncols && st == LW_OK; c++)
            st = lw_rtable_copy_cell(t, row, nk + c, full, frow, cols[c], err);
    }
    lw_rtable_free(full);
    return lw_report_table_keep(t, st, fmt, out, err);
}

lw_status lw_report_sweep(const lw_sweep *sw, lw_rtable_format fmt, const char *columns,
                          lw_rtable **out, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_report_sweep_in_c_locale(sw, fmt, columns, out, err);
    lw_number_locale_end(saved);
    return result;
}
