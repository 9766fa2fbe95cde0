/*
 * sweep.c - grids of runs (see sweep.h).
 *
 * Invariant: a row's case is built from its index alone (the last vary
 * changes fastest), so the rows are the same whichever worker runs them and
 * in whatever order; a streamed sweep keeps of each row only its index and
 * its chart point, and stops at its lowest failing row.
 */
#include "lampwick/sweep.h"
#include "lampwick/text.h"
#include "lampwick/number.h"

#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/eseries.h"
#include "lampwick/alloc.h"

size_t lw_sweep_rows(const lw_vary *vary, size_t nvary)
{
    size_t n = 1;
    for (size_t k = 0; k < nvary; k++) {
        if (vary[k].n == 0 || n > LW_SWEEP_ROWS_MAX / vary[k].n)
            return 0;
        n *= vary[k].n;
    }
    return n;
}

/* Size the grid and its index; the case variants are made per row. */
static lw_status sweep_init(const lw_vary *vary, size_t nvary, bool keep_cases, lw_sweep *sw,
                            lw_error *err)
{
    memset(sw, 0, sizeof *sw);
    sw->vary = vary;
    sw->nvary = nvary;
    size_t n = lw_sweep_rows(vary, nvary);
    if (n == 0)
        return lw_error_set(err, LW_EINPUT, "--vary", 0,
                            "the grid is empty or has more than %d rows", LW_SWEEP_ROWS_MAX);
    if (nvary > LW_SWEEP_VARY_MAX)
        return lw_error_set(err, LW_EINPUT, "--vary", 0, "at most %d --vary options",
                            LW_SWEEP_VARY_MAX);
    sw->index = lw_calloc(n * (nvary ? nvary : 1), sizeof *sw->index);
    sw->points = lw_calloc(n, sizeof *sw->points);
    sw->cases = keep_cases ? lw_calloc(n, sizeof *sw->cases) : NULL;
    if (!sw->index || !sw->points || (keep_cases && !sw->cases)) {
        lw_sweep_clear(sw);
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for %zu rows", n);
    }
    sw->n = n;
    for (size_t r = 0; r < n; r++) {
        size_t rem = r;
        for (size_t k = nvary; k-- > 0;) {
            sw->index[r * nvary + k] = rem % vary[k].n;
            rem /= vary[k].n;
        }
    }
    return LW_OK;
}

/* The variant of row r. */
static lw_status row_variant(const lw_sweep *sw, size_t r, lw_profile_variant *v, lw_error *err)
{
    memset(v, 0, sizeof *v);
    for (size_t k = 0; k < sw->nvary; k++) {
        const char *val = sw->vary[k].values[sw->index[r * sw->nvary + k]];
        if (!strcmp(sw->vary[k].key, "mode"))
            v->mode = val;
        else if (lw_profile_variant_text(v, sw->vary[k].key, val, err) != LW_OK)
            return err && err->code ? err->code : LW_EINPUT;
    }
    return LW_OK;
}

struct stream {
    const lw_profile *base;
    lw_sweep *sw;
    lw_sweep_row_fn fn;
    void *ctx;
    atomic_size_t stop;  /* the lowest failing row so far (n: none) */
    pthread_mutex_t lock;
    lw_status status;    /* of that row */
    lw_error err;
};

/* Note that row r failed: the lowest such row wins, so that the error is
 * the same for any number of threads. */
static void fail_row(struct stream *s, size_t r, lw_status st, const lw_error *err)
{
    pthread_mutex_lock(&s->lock);
    if (r < atomic_load(&s->stop)) {
        atomic_store(&s->stop, r);
        s->status = st;
        s->err = *err;
    }
    pthread_mutex_unlock(&s->lock);
}

static void stream_row(size_t r, int worker, void *vctx)
{
    struct stream *s = vctx;
    if (r > atomic_load(&s->stop))
        return; /* past a failed row: not run */
    lw_case c;
    memset(&c, 0, sizeof c);
    lw_error_clear(&c.err);
    c.status = row_variant(s->sw, r, &c.variant, &c.err);
    if (c.status == LW_OK)
        lw_batch_run_case(s->base, &c, "--vary");
    if (c.status == LW_OK)
        s->sw->points[r] = (lw_sweep_point){c.res.flux_30s_lm, c.res.runtime_h};
    lw_error ferr;
    lw_error_clear(&ferr);
    lw_status fst = s->fn ? s->fn(s->sw, r, worker, &c, s->ctx, &ferr) : LW_OK;
    if (c.status != LW_OK)
        fail_row(s, r, c.status, &c.err);
    else if (fst != LW_OK)
        fail_row(s, r, fst, &ferr);
    lw_batch_clear(&c, 1);
}

lw_status lw_sweep_stream(const lw_profile *base, const lw_vary *vary, size_t nvary, int threads,
                          lw_sweep_row_fn fn, void *ctx, lw_pool_progress_fn progress,
                          void *progress_ctx, lw_sweep *sw, lw_error *err)
{
    lw_status st = sweep_init(vary, nvary, false, sw, err);
    if (st != LW_OK)
        return st;
    /* every row's variant is checked before any runs: a typing slip in a
     * value is refused whole, not after half the rows */
    for (size_t r = 0; r < sw->n && st == LW_OK; r++) {
        lw_profile_variant v;
        st = row_variant(sw, r, &v, err);
    }
    if (st != LW_OK) {
        lw_sweep_clear(sw);
        return st;
    }
    struct stream s = {.base = base, .sw = sw, .fn = fn, .ctx = ctx, .status = LW_OK};
    atomic_init(&s.stop, sw->n);
    lw_error_clear(&s.err);
    pthread_mutex_init(&s.lock, NULL);
    lw_pool_for_workers(sw->n, lw_batch_workers(sw->n, threads), stream_row, &s,
                        progress, progress_ctx);
    pthread_mutex_destroy(&s.lock);
    if (s.status != LW_OK) {
        if (err && err->code == LW_OK)
            *err = s.err;
        lw_sweep_clear(sw);
        return s.status;
    }
    return LW_OK;
}

lw_status lw_sweep_run(const lw_profile *base, const lw_vary *vary, size_t nvary, int threads,
                       lw_pool_progress_fn progress, void *progress_ctx, lw_sweep *sw,
                       lw_error *err)
{
    lw_status st = sweep_init(vary, nvary, true, sw, err);
    if (st != LW_OK)
        return st;
    for (size_t r = 0; r < sw->n && st == LW_OK; r++)
        st = row_variant(sw, r, &sw->cases[r].variant, err);
    if (st != LW_OK) {
        lw_sweep_clear(sw);
        return st;
    }
    lw_batch_run(base, sw->cases, sw->n, threads, "--vary", progress, progress_ctx);
    for (size_t r = 0; r < sw->n; r++) {
        const lw_case *c = &sw->cases[r];
        if (c->status == LW_OK) {
            sw->points[r] = (lw_sweep_point){c->res.flux_30s_lm, c->res.runtime_h};
            continue;
        }
        if (err && err->code == LW_OK)
            *err = c->err;
        st = c->status;
        lw_sweep_clear(sw);
        return st;
    }
    return LW_OK;
}

void lw_sweep_clear(lw_sweep *sw)
{
    if (!sw)
        return;
    lw_batch_clear(sw->cases, sw->cases ? sw->n : 0);
    free(sw->cases);
    free(sw->index);
    free(sw->points);
    sw->cases = NULL;
    sw->index = NULL;
    sw->points = NULL;
    sw->n = 0;
}
