/*
 * batch.c - running many variants of a profile (see batch.h).
 */
#include "lampwick/batch.h"
#include "lampwick/text.h"

#include <stdio.h>
#include <string.h>

struct batch {
    const lw_profile *base;
    lw_case *cases;
    const char *origin;
};

static void run_case(size_t i, void *vctx)
{
    struct batch *b = vctx;
    lw_batch_run_case(b->base, &b->cases[i], b->origin);
}

void lw_batch_run_case(const lw_profile *base, lw_case *c, const char *origin)
{
    lw_error_clear(&c->err);
    lw_profile p;
    c->status = lw_profile_derive(base, &c->variant, origin, &p, &c->err);
    if (c->status == LW_OK) {
        lw_run_options opt = lw_run_options_default();
        c->status = lw_run(&p.light, &opt, &c->res, &c->err);
        if (c->status != LW_OK && !c->err.file[0])
            lw_text_copy(c->err.file, base->path, sizeof c->err.file);
    }
    if (c->status == LW_OK) {
        lw_light_copy(&c->light, &p.light);
        c->has_light = true;
    }
    lw_profile_clear(&p);
}

void lw_batch_run(const lw_profile *base, lw_case *cases, size_t n, int threads,
                  const char *origin, lw_pool_progress_fn progress, void *progress_ctx)
{
    struct batch b = {base, cases, origin};
    lw_pool_for(n, lw_batch_workers(n, threads), run_case, &b, progress, progress_ctx);
}

int lw_batch_workers(size_t n, int threads)
{
    return lw_pool_threads(n, n < LW_BATCH_THREADED_MIN ? 1 : threads);
}

void lw_batch_clear(lw_case *cases, size_t n)
{
    for (size_t i = 0; cases && i < n; i++) {
        lw_run_result_clear(&cases[i].res);
        if (cases[i].has_light)
            lw_light_clear(&cases[i].light);
        cases[i].has_light = false;
    }
}
