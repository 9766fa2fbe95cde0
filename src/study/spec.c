/*
 * spec.c - the runtime table of a product specification (see spec.h).
 */
#include "lampwick/spec.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/photometry.h"
#include "lampwick/alloc.h"

/* ---- the runs ---- */

lw_status lw_spec_compute(const lw_profile *prof, const char *const *cells, int threads,
                          lw_spec *spec, lw_error *err)
{
    memset(spec, 0, sizeof *spec);
    spec->prof = prof;
    const char *own[2] = {prof->cell_ref, NULL};
    if (!cells)
        cells = own;
    size_t ncells = 0;
    while (cells[ncells])
        ncells++;
    spec->ncells = ncells;
    if (ncells == 0)
        return lw_error_set(err, LW_EINPUT, prof->path, 0, "the table needs at least one cell");
    size_t nmodes = lw_profile_mode_count(prof);
    spec->has_modes = nmodes > 0;
    spec->nrows = nmodes ? nmodes : 1;
    spec->optics = prof->beam_angle_deg > 0 || prof->peak_cd_per_lm > 0;
    size_t n = spec->nrows * spec->ncells;
    spec->cases = lw_calloc(n, sizeof *spec->cases);
    if (!spec->cases)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    for (size_t r = 0; r < spec->nrows; r++)
        for (size_t c = 0; c < spec->ncells; c++) {
            lw_case *k = &spec->cases[r * spec->ncells + c];
            k->variant.mode = nmodes ? lw_profile_mode_name(prof, r) : NULL;
            lw_status st = lw_profile_variant_text(&k->variant, "pack.cell", cells[c], err);
            if (st != LW_OK) {
                lw_spec_clear(spec);
                return st;
            }
        }
    lw_batch_run(prof, spec->cases, n, threads, "--cells", NULL, NULL);
    for (size_t i = 0; i < n; i++) {
        if (spec->cases[i].status != LW_OK) {
            lw_status st = spec->cases[i].status;
            if (err && err->code == LW_OK)
                *err = spec->cases[i].err;
            lw_spec_clear(spec);
            return st;
        }
        spec->regulated = spec->regulated || isfinite(spec->cases[i].res.regulated_h);
    }
    spec->corners = lw_calloc(n * LW_CORNER_COUNT, sizeof *spec->corners);
    if (!spec->corners) {
        lw_spec_clear(spec);
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    }
    for (size_t i = 0; i < n; i++) {
        lw_corner *c = spec->corners + i * LW_CORNER_COUNT;
        const lw_case *k = &spec->cases[i];
        for (int j = 0; j < LW_CORNER_COUNT; j++)
            c[j] = (lw_corner){.kind = (lw_corner_kind)j, .ambient_c = NAN, .runtime_h = NAN,
                               .flux_30s_lm = NAN};
        if (lw_run_end_is_dark(k->res.end_reason))
            continue;
        lw_status st = lw_corner_compute(&k->light, &k->res, c, err);
        if (st != LW_OK) {
            lw_spec_clear(spec);
            return st;
        }
    }
    return LW_OK;
}

void lw_spec_clear(lw_spec *spec)
{
    if (!spec)
        return;
    lw_batch_clear(spec->cases, spec->nrows * spec->ncells);
    free(spec->cases);
    free(spec->corners);
    spec->cases = NULL;
    spec->corners = NULL;
    spec->nrows = spec->ncells = 0;
}

/* ---- rounding ---- */

double lw_spec_round(double v)
{
    if (!isfinite(v) || v == 0.0)
        return v;
    if (fabs(v) >= 100.0)
        return round(v);
    double mag = pow(10.0, floor(log10(fabs(v))) - 1.0);
    return round(v / mag) * mag;
}

lw_status lw_spec_trace(const lw_spec *spec, size_t r, size_t c, lw_result *res,
                        lw_trace *trace, lw_error *err)
{
    memset(res, 0, sizeof *res);
    memset(trace, 0, sizeof *trace);
    const lw_case *k = &spec->cases[r * spec->ncells + c];
    if (k->status != LW_OK || !k->has_light || lw_run_end_is_dark(k->res.end_reason))
        return lw_error_set(err, LW_EINPUT, spec->prof->path, 0,
                            "mode %s gave no light: no trace to draw",
                            k->variant.mode ? k->variant.mode : "(as written)");
    lw_run_options opt = lw_run_options_default();
    opt.want_trace = true;
    lw_status st = lw_run(&k->light, &opt, res, err);
    if (st == LW_OK)
        st = lw_trace_build(&k->light, res, LW_TRACE_ROWS_MIN, trace, err);
    return st;
}
