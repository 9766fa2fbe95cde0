/*
 * sweep.c - grids of runs (see sweep.h).
 */
#include "lampwick/sweep.h"
#include "lampwick/text.h"
#include "lampwick/number.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/eseries.h"
#include "lampwick/alloc.h"

lw_status lw_sweep_run(const lw_profile *base, const lw_vary *vary, size_t nvary, int threads,
                       lw_pool_progress_fn progress, void *progress_ctx, lw_sweep *sw,
                       lw_error *err)
{
    memset(sw, 0, sizeof *sw);
    sw->vary = vary;
    sw->nvary = nvary;
    size_t n = 1;
    for (size_t k = 0; k < nvary; k++) {
        if (vary[k].n == 0 || n > LW_SWEEP_ROWS_MAX / vary[k].n)
            return lw_error_set(err, LW_EINPUT, "--vary", 0,
                                "the grid is empty or has more than %d rows",
                                LW_SWEEP_ROWS_MAX);
        n *= vary[k].n;
    }
    if (nvary > LW_SWEEP_VARY_MAX)
        return lw_error_set(err, LW_EINPUT, "--vary", 0, "at most %d --vary options",
                            LW_SWEEP_VARY_MAX);
    sw->index = lw_calloc(n * (nvary ? nvary : 1), sizeof *sw->index);
    sw->cases = lw_calloc(n, sizeof *sw->cases);
    if (!sw->index || !sw->cases) {
        lw_sweep_clear(sw);
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for %zu rows", n);
    }
    sw->n = n;
    for (size_t r = 0; r < n; r++) {
        size_t rem = r;
        for (size_t k = nvary; k-- > 0;) {
            size_t i = rem % vary[k].n;
            rem /= vary[k].n;
            sw->index[r * nvary + k] = i;
        }
        lw_profile_variant *v = &sw->cases[r].variant;
        for (size_t k = 0; k < nvary; k++) {
            const char *val = vary[k].values[sw->index[r * nvary + k]];
            if (!strcmp(vary[k].key, "mode"))
                v->mode = val;
            else if (lw_profile_variant_text(v, vary[k].key, val, err) != LW_OK) {
                lw_sweep_clear(sw);
                return err ? err->code : LW_EINPUT;
            }
        }
    }
    lw_batch_run(base, sw->cases, n, threads, "--vary", progress, progress_ctx);
    for (size_t r = 0; r < n; r++) {
        if (sw->cases[r].status == LW_OK)
            continue;
        if (err && err->code == LW_OK)
            *err = sw->cases[r].err;
        lw_status st = sw->cases[r].status;
        lw_sweep_clear(sw);
        return st;
    }
    return LW_OK;
}

void lw_sweep_clear(lw_sweep *sw)
{
    if (!sw)
        return;
    lw_batch_clear(sw->cases, sw->n);
    free(sw->cases);
    free(sw->index);
    sw->cases = NULL;
    sw->index = NULL;
    sw->n = 0;
}
