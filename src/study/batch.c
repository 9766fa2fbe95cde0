/*
 * batch.c - running many variants of a profile (see batch.h).
 */
#include "lampwick/batch.h"
#include "lampwick/text.h"

#include <stdio.h>
#include <string.h>

bool lw_case_set(lw_case *c, const char *key, const char *value)
{
    if (c->nset == LW_CASE_SETS)
        return false;
    lw_override *o = &c->set[c->nset];
    if (!lw_text_copy(o->key, key, sizeof o->key) || !lw_text_copy(o->value, value, sizeof o->value))
        return false;
    c->nset++;
    return true;
}

struct batch {
    const lw_profile *base;
    lw_case *cases;
};

lw_status lw_case_profile(const lw_profile *base, const lw_case *c, const char *origin,
                          lw_profile *out, lw_error *err)
{
    lw_status st = lw_profile_copy(out, base, err);
    if (st == LW_OK && c->mode)
        st = lw_profile_apply_mode(out, c->mode, err);
    for (size_t k = 0; k < c->nset && st == LW_OK; k++) {
        char where[sizeof c->set[k].key + 32];
        snprintf(where, sizeof where, "%s %s", origin, c->set[k].key);
        st = lw_profile_set(out, c->set[k].key, c->set[k].value, LW_FROM_OPTION, where, 0, err);
    }
    if (st == LW_OK)
        st = lw_profile_resolve(out, err);
    return st;
}

static void run_case(size_t i, void *vctx)
{
    struct batch *b = vctx;
    lw_case *c = &b->cases[i];
    lw_error_clear(&c->err);
    lw_profile p;
    c->status = lw_case_profile(b->base, c, "--vary", &p, &c->err);
    if (c->status == LW_OK) {
        lw_run_options opt = lw_run_options_default();
        c->status = lw_run(&p.light, &opt, &c->res, &c->err);
        if (c->status != LW_OK && !c->err.file[0])
            lw_text_copy(c->err.file, b->base->path, sizeof c->err.file);
    }
    if (c->status == LW_OK) {
        lw_light_copy(&c->light, &p.light);
        c->has_light = true;
    }
    lw_profile_clear(&p);
}

void lw_batch_run(const lw_profile *base, lw_case *cases, size_t n, int threads,
                  lw_pool_progress_fn progress, void *progress_ctx)
{
    struct batch b = {base, cases};
    /* small batches are not worth a thread start */
    if (n < 16)
        threads = 1;
    lw_pool_for(n, threads, run_case, &b, progress, progress_ctx);
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
