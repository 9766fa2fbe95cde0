/*
 * sweepreport.c - the table of a sweep (see sweepreport.h).
 */
#include "lampwick/sweepreport.h"
#include "lampwick/number.h"

#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"
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

/* The header of a sweep table: the varied keys, then the chosen columns. */
static lw_status sweep_head(lw_rtable *t, const lw_vary *vary, size_t nk, const size_t *cols,
                            size_t ncols, lw_error *err)
{
    lw_status st = LW_OK;
    for (size_t k = 0; k < nk && st == LW_OK; k++)
        st = lw_rtable_head(t, k, vary[k].key, err);
    for (size_t c = 0; c < ncols && st == LW_OK; c++)
        st = lw_rtable_head(t, nk + c, lw_report_run_columns[cols[c]], err);
    return st;
}

/* Row `row` of t for the sweep's row r: its varied values, then the chosen
 * columns of row frow of full (every run column of that row's run). */
static lw_status sweep_fill_row(lw_rtable *t, size_t row, const lw_sweep *sw, size_t r,
                                const lw_rtable *full, size_t frow, const size_t *cols,
                                size_t ncols, lw_error *err)
{
    const size_t nk = sw->nvary;
    lw_status st = LW_OK;
    for (size_t k = 0; k < nk && st == LW_OK; k++)
        st = lw_rtable_set(t, row, k, sw->vary[k].values[sw->index[r * nk + k]], err);
    for (size_t c = 0; c < ncols && st == LW_OK; c++)
        st = lw_rtable_copy_cell(t, row, nk + c, full, frow, cols[c], err);
    return st;
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
    st = sweep_head(t, sw->vary, nk, cols, ncols, err);
    size_t frow = 0;
    if (st == LW_OK)
        st = lw_rtable_add_row(full, &frow, err);
    for (size_t r = 0; r < sw->n && st == LW_OK; r++) {
        size_t row = 0;
        st = lw_rtable_add_row(t, &row, err);
        if (st == LW_OK)
            st = lw_report_run_row(full, frow, 0, &sw->cases[r].light, &sw->cases[r].res, err);
        if (st == LW_OK)
            st = sweep_fill_row(t, row, sw, r, full, frow, cols, ncols, err);
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

/* ---- a sweep written as it runs ---- */

typedef struct slot {
    char *text;      /* the row rendered (CSV or Markdown line, or packed cells) */
    size_t len;
    char *packed;    /* row 0 in Markdown: its cells, for the columns' alignment */
    size_t packed_len;
    bool ready;
    bool failed;     /* the row failed: the writing ends before it */
} slot;

struct writer {
    lw_rtable_format fmt;
    FILE *fp;
    const lw_vary *vary;
    size_t nk, ncols;
    const size_t *cols;
    lw_rtable *head;     /* the header; text: every row, packed */
    struct worker_tables {
        lw_rtable *full; /* one row of every run column */
        lw_rtable *row;  /* the row's own cells */
    } *own;              /* per worker */
    pthread_mutex_t lock;
    pthread_cond_t moved;
    slot *win;
    size_t nwin, next;   /* the window of rows; the next row to write */
    bool stopped;        /* a row or a write failed: the rest are dropped */
    lw_status st;        /* a write's own failure */
    lw_error err;
};

/* Format row r (worker w) in the worker's tables. */
static lw_status format_row(struct writer *wr, const lw_sweep *sw, size_t r, int w,
                            const lw_case *c, lw_error *err)
{
    lw_rtable *full = wr->own[w].full;
    lw_status st = lw_report_run_row(full, 0, 0, &c->light, &c->res, err);
    return st == LW_OK ? sweep_fill_row(wr->own[w].row, 0, sw, r, full, 0, wr->cols, wr->ncols, err)
                       : st;
}

/* Write the rows that are ready from wr->next on (the lock held). */
static void flush_ready(struct writer *wr)
{
    for (;;) {
        slot *s = &wr->win[wr->next % wr->nwin];
        if (!s->ready)
            return;
        if (s->failed) { /* the rows before it are written; none after */
            wr->stopped = true;
            return;
        }
        lw_status st = LW_OK;
        if (wr->fmt == LW_FMT_TEXT || wr->fmt == LW_FMT_JSON) { /* written whole */
            st = lw_rtable_add_packed(wr->head, s->text, s->len, &wr->err);
        } else {
            if (s->packed) { /* row 0 of Markdown: the head, aligned by it */
                st = lw_rtable_add_packed(wr->head, s->packed, s->packed_len, &wr->err);
                if (st == LW_OK)
                    st = lw_rtable_write_head(wr->head, wr->fp, wr->fmt, &wr->err);
            }
            if (st == LW_OK && fwrite(s->text, 1, s->len, wr->fp) != s->len)
                st = lw_error_set(&wr->err, LW_EIO, NULL, 0, "write error");
        }
        free(s->text);
        free(s->packed);
        *s = (slot){0};
        if (st != LW_OK) {
            wr->st = st;
            wr->stopped = true;
            return;
        }
        wr->next++;
    }
}

static lw_status write_row(const lw_sweep *sw, size_t r, int w, const lw_case *c, void *vctx,
                           lw_error *err)
{
    struct writer *wr = vctx;
    char *text = NULL, *packed = NULL;
    size_t len = 0, packed_len = 0;
    lw_status st = c->status;
    if (st == LW_OK)
        st = format_row(wr, sw, r, w, c, err);
    if (st == LW_OK)
        st = lw_rtable_render_row(wr->own[w].row, 0, wr->fmt, &text, &len, err);
    if (st == LW_OK && r == 0 && wr->fmt == LW_FMT_MD)
        st = lw_rtable_render_row(wr->own[w].row, 0, LW_FMT_TEXT, &packed, &packed_len, err);
    pthread_mutex_lock(&wr->lock);
    while (!wr->stopped && r >= wr->next + wr->nwin)
        pthread_cond_wait(&wr->moved, &wr->lock);
    if (wr->stopped) { /* past a failed row or a failed write: dropped */
        pthread_mutex_unlock(&wr->lock);
        free(text);
        free(packed);
        return st != LW_OK ? st : (wr->st != LW_OK ? wr->st : LW_OK);
    }
    /* a failed row takes its place too: the rows before it are still written,
     * whatever order they finish in, and the sweep reports its error */
    if (st != LW_OK) {
        free(text);
        free(packed);
        text = packed = NULL;
        len = packed_len = 0;
    }
    wr->win[r % wr->nwin] = (slot){text, len, packed, packed_len, true, st != LW_OK};
    flush_ready(wr);
    pthread_cond_broadcast(&wr->moved);
    pthread_mutex_unlock(&wr->lock);
    return st;
}

static void writer_free(struct writer *wr, int workers)
{
    for (int w = 0; wr->own && w < workers; w++) {
        lw_rtable_free(wr->own[w].full);
        lw_rtable_free(wr->own[w].row);
    }
    for (size_t i = 0; wr->win && i < wr->nwin; i++) {
        free(wr->win[i].text);
        free(wr->win[i].packed);
    }
    free(wr->win);
    free(wr->own);
    lw_rtable_free(wr->head);
}

/* The writer's tables: the header, and per worker its two one-row tables. */
static lw_status writer_init(struct writer *wr, int workers, lw_error *err)
{
    size_t nk = wr->nk, ncols = wr->ncols, row;
    wr->head = lw_rtable_new(nk + ncols, err);
    wr->own = lw_calloc((size_t)workers, sizeof *wr->own);
    wr->nwin = (size_t)workers * LW_SWEEP_WINDOW_PER_THREAD;
    wr->win = lw_calloc(wr->nwin, sizeof *wr->win);
    if (!wr->head || !wr->own || !wr->win)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the sweep");
    lw_status st = sweep_head(wr->head, wr->vary, nk, wr->cols, ncols, err);
    for (int w = 0; w < workers && st == LW_OK; w++) {
        struct worker_tables *t = &wr->own[w];
        t->full = lw_rtable_new(lw_report_run_ncolumns, err);
        t->row = t->full ? lw_rtable_new(nk + ncols, err) : NULL;
        if (!t->row)
            return err->code ? err->code : LW_ENOMEM;
        st = lw_rtable_add_row(t->full, &row, err);
        if (st == LW_OK)
            st = lw_rtable_add_row(t->row, &row, err);
    }
    return st;
}

static lw_status sweep_stream_in_c_locale(const lw_profile *base, const lw_vary *vary,
                                          size_t nvary, int threads, lw_rtable_format fmt,
                                          bool quiet, const char *columns, FILE *fp,
                                          lw_pool_progress_fn progress, void *progress_ctx,
                                          lw_sweep *sw, lw_error *err)
{
    size_t cols[SWEEP_COLUMNS_MAX], ncols;
    memset(sw, 0, sizeof *sw);
    lw_status st = sweep_columns(columns, fmt, cols, &ncols, err);
    if (st != LW_OK)
        return st;
    /* an empty or oversized grid is refused by lw_sweep_stream */
    int workers = lw_batch_workers(lw_sweep_rows(vary, nvary), threads);
    struct writer wr = {.fmt = fmt, .fp = fp, .vary = vary, .nk = nvary, .ncols = ncols,
                        .cols = cols, .st = LW_OK};
    lw_error_clear(&wr.err);
    st = writer_init(&wr, workers, err);
    if (wr.head)
        wr.head->quiet = quiet;
    if (st == LW_OK && fmt == LW_FMT_CSV)
        st = lw_rtable_write_head(wr.head, fp, fmt, err);
    if (st != LW_OK) {
        writer_free(&wr, workers);
        return st;
    }
    pthread_mutex_init(&wr.lock, NULL);
    pthread_cond_init(&wr.moved, NULL);
    st = lw_sweep_stream(base, vary, nvary, workers, write_row, &wr, progress, progress_ctx, sw,
                         err);
    pthread_cond_destroy(&wr.moved);
    pthread_mutex_destroy(&wr.lock);
    if (wr.st != LW_OK) { /* a write failed: its error, not the rows' */
        lw_error_clear(err);
        if (err)
            *err = wr.err;
        st = wr.st;
    }
    if (st == LW_OK && fmt != LW_FMT_CSV)
        st = lw_rtable_note(wr.head, lw_report_caution, err);
    if (st == LW_OK)
        st = fmt == LW_FMT_TEXT || fmt == LW_FMT_JSON
                 ? lw_rtable_write(wr.head, fp, fmt, err)
                 : lw_rtable_write_notes(wr.head, fp, fmt, err);
    if (st == LW_OK && fflush(fp) != 0)
        st = lw_error_set(err, LW_EIO, NULL, 0, "write error");
    writer_free(&wr, workers);
    return st;
}

lw_status lw_report_sweep_stream(const lw_profile *base, const lw_vary *vary, size_t nvary,
                                 int threads, lw_rtable_format fmt, bool quiet, const char *columns,
                                 FILE *fp,
                                 lw_pool_progress_fn progress, void *progress_ctx, lw_sweep *sw,
                                 lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = sweep_stream_in_c_locale(base, vary, nvary, threads, fmt, quiet, columns, fp,
                                                progress, progress_ctx, sw, err);
    lw_number_locale_end(saved);
    return result;
}
