/*
 * size.c - sizing the pack (see size.h).
 */
#include "lampwick/size.h"
#include "lampwick/text.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/batch.h"
#include "lampwick/eseries.h"
#include "lampwick/pool.h"
#include "lampwick/resistor.h"
#include "lampwick/alloc.h"

/* Golden section: each probe splits the bracket at 1/phi = (sqrt(5) - 1) / 2,
 * so one probe is reused per step (Kiefer 1953; any numerical text). */
#define GOLDEN_RATIO_INV 0.6180339887498949

typedef struct size_job {
    const lw_profile *prof;
    const lw_size_options *opt;
    const char *const *cells;
    lw_size_row *rows;
    lw_status *status;
    lw_error *errs;
    double design_a;      /* nominal fresh LED current of the profile as written */
} size_job;

static lw_status run_with(const lw_light *l, double r, lw_result *res, lw_error *err)
{
    lw_light x = *l; /* shallow: tables borrowed */
    x.drive.resistor_ohm = r;
    lw_run_options opt = lw_run_options_default();
    return lw_run(&x, &opt, res, err);
}

/* Worst-case dissipation of resistor r within max_w? */
static lw_status power_ok(const lw_light *l, double r, double max_w, bool *ok, lw_error *err)
{
    lw_point w;
    lw_status st = lw_resistor_point(l, r, true, &w, err);
    *ok = st == LW_OK && w.p_res_peak_w <= max_w;
    return st;
}

/* The resistor keeping the profile's design current, safe: the smallest
 * series value at or above both the current's value and the safe minimum
 * whose worst-case dissipation is within max_w. */
static lw_status keep_current(const size_job *j, const lw_light *l, double r_safe, double max_w,
                              double *r_out, lw_error *err)
{
    double r_ideal;
    lw_status st = lw_resistor_for(l, LW_TARGET_CURRENT, j->design_a, false, &r_ideal, err);
    *r_out = NAN;
    if (st != LW_OK || !(r_ideal > 0) || !isfinite(r_ideal))
        return st;
    double r = fmax(lw_eseries_round(j->opt->eseries, r_ideal, true), r_safe);
    for (int k = 0; k < LW_SIZE_CANDIDATES_MAX && isfinite(r); k++) {
        bool ok;
        if ((st = power_ok(l, r, max_w, &ok, err)) != LW_OK)
            return st;
        if (ok) {
            *r_out = r;
            return LW_OK;
        }
        r = lw_eseries_round(j->opt->eseries, r * (1.0 + 1e-6), true);
    }
    return LW_OK;
}

/* Runtime over the floor of resistor cand[i] (-1 when it is not safe). */
static lw_status floor_runtime(const lw_light *l, const double *cand, size_t i, double max_w,
                               lw_result *res, double *t_h, lw_error *err)
{
    bool ok;
    lw_status st = power_ok(l, cand[i], max_w, &ok, err);
    *t_h = -1.0;
    if (st != LW_OK || !ok)
        return st;
    st = run_with(l, cand[i], res, err);
    if (st == LW_OK)
        *t_h = lw_run_end_is_dark(res->end_reason) ? 0.0 : res->runtime_h;
    return st;
}

/* The brightest safe resistor down to the one that just makes the floor at
 * switch-on: the runtime over the floor peaks in between, and is searched
 * by golden section over the candidates' index (it is unimodal in R). */
static lw_status best_for_floor(const size_job *j, const lw_light *l, double r_safe,
                                double max_w, double *r_out, lw_result *res, lw_error *err)
{
    double r_hi;
    lw_status st = lw_resistor_for(l, LW_TARGET_FLUX, j->opt->flux_lm, false, &r_hi, err);
    *r_out = NAN;
    if (st != LW_OK || !(r_hi > 0) || !isfinite(r_hi) || r_hi < r_safe)
        return st;
    double *cand = lw_malloc(LW_SIZE_CANDIDATES_MAX * sizeof *cand);
    if (!cand)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    size_t n = lw_eseries_range(j->opt->eseries, r_safe, r_hi, cand, LW_SIZE_CANDIDATES_MAX);
    if (n > LW_SIZE_CANDIDATES_MAX)
        n = LW_SIZE_CANDIDATES_MAX;
    size_t lo = 0, hi = n ? n - 1 : 0;
    while (st == LW_OK && n > 0 && hi - lo > 2) {
        lw_result r1 = {0}, r2 = {0};
        size_t m1 = lo + (size_t)((double)(hi - lo) * (1.0 - GOLDEN_RATIO_INV));
        size_t m2 = lo + (size_t)((double)(hi - lo) * GOLDEN_RATIO_INV);
        if (m2 <= m1)
            m2 = m1 + 1; /* hi - lo > 2: both stay inside and the bracket shrinks */
        double t1, t2;
        st = floor_runtime(l, cand, m1, max_w, &r1, &t1, err);
        if (st == LW_OK)
            st = floor_runtime(l, cand, m2, max_w, &r2, &t2, err);
        lw_run_result_clear(&r1);
        lw_run_result_clear(&r2);
        if (st != LW_OK)
            break;
        if (t1 >= t2)
            hi = m2;
        else
            lo = m1;
    }
    double best = -1.0;
    for (size_t i = lo; st == LW_OK && n > 0 && i <= hi; i++) {
        double t;
        lw_result ri = {0};
        st = floor_runtime(l, cand, i, max_w, &ri, &t, err);
        if (st == LW_OK && t > best) {
            best = t;
            *res = ri;
            *r_out = cand[i];
        }
    }
    free(cand);
    return st;
}

static void fill_from_run(lw_size_row *row, const lw_result *res, const lw_size_options *opt)
{
    bool dark = lw_run_end_is_dark(res->end_reason);
    row->end_reason = res->end_reason;
    row->warnings = res->warnings;
    row->runtime_h = dark ? 0.0 : res->runtime_h;
    row->flux_30s_lm = dark ? NAN : res->flux_30s_lm;
    row->margin_pct = 100.0 * (row->runtime_h / opt->runtime_h - 1.0);
    row->fits = !dark && row->runtime_h >= opt->runtime_h;
}

static lw_status size_one(const size_job *j, size_t idx, lw_size_row *row, bool *keep,
                          lw_error *err)
{
    const lw_size_options *opt = j->opt;
    size_t per_cell = (size_t)opt->max_series * (size_t)opt->max_parallel;
    const char *cell = j->cells[idx / per_cell];
    int s = 1 + (int)(idx % per_cell) / opt->max_parallel;
    int p = 1 + (int)(idx % per_cell) % opt->max_parallel;
    memset(row, 0, sizeof *row);
    row->resistor_ohm = row->worst_resistor_w = row->rating_w = row->flux_30s_lm = NAN;
    *keep = false;
    lw_text_copy(row->cell, cell, sizeof row->cell);
    row->series = s;
    row->parallel = p;
    lw_profile_variant variant = {0};
    lw_status st = lw_profile_variant_text(&variant, "pack.cell", cell, err);
    if (st == LW_OK)
        st = lw_profile_variant_number(&variant, "pack.series", s, err);
    if (st == LW_OK)
        st = lw_profile_variant_number(&variant, "pack.parallel", p, err);
    if (st == LW_OK && !isnan(opt->flux_lm))
        st = lw_profile_variant_number(&variant, "cutoff.flux_lm", opt->flux_lm, err);
    if (st != LW_OK)
        return st;
    lw_profile prof;
    st = lw_profile_derive(j->prof, &variant, "size", &prof, err);
    if (st != LW_OK) {
        lw_profile_clear(&prof);
        return st;
    }
    row->mass_g = prof.light.pack.cell.mass_g * s * p;
    lw_light l = prof.light; /* shallow: tables borrowed from prof */
    lw_result res = {0};
    if (l.drive.type != LW_DRIVE_RESISTOR) {
        st = run_with(&l, l.drive.resistor_ohm, &res, err);
        if (st == LW_OK) {
            fill_from_run(row, &res, opt);
            *keep = true;
        }
    } else {
        l.drive.tolerance_pct = lw_resistor_tolerance_pct(
            &prof.light, lw_profile_given(&prof, "drive.tolerance_pct"), opt->eseries);
        double max_w = l.drive.rating_w > 0
                           ? l.drive.rating_w
                           : lw_resistor_ratings_w[lw_resistor_nratings - 1] /
                                 LW_RESISTOR_DERATING;
        double r_safe, r = NAN;
        st = lw_resistor_min_safe(&l, opt->eseries, max_w, &r_safe, err);
        if (st == LW_OK && isfinite(r_safe)) {
            if (isnan(opt->flux_lm)) {
                st = keep_current(j, &l, r_safe, max_w, &r, err);
                if (st == LW_OK && isfinite(r))
                    st = run_with(&l, r, &res, err);
            } else {
                st = best_for_floor(j, &l, r_safe, max_w, &r, &res, err);
            }
        }
        lw_point w;
        if (st == LW_OK && isfinite(r) && (st = lw_resistor_point(&l, r, true, &w, err)) == LW_OK) {
            row->resistor_ohm = r;
            row->worst_resistor_w = w.p_res_peak_w;
            row->rating_w = lw_resistor_rating_w(w.p_res_peak_w);
            fill_from_run(row, &res, opt);
            *keep = true;
        }
    }
    lw_run_result_clear(&res);
    lw_profile_clear(&prof);
    return st;
}

struct size_task_ctx {
    size_job *j;
    bool *keep;
};

static void size_task(size_t i, void *vctx)
{
    struct size_task_ctx *c = vctx;
    lw_error_clear(&c->j->errs[i]);
    c->j->status[i] = size_one(c->j, i, &c->j->rows[i], &c->keep[i], &c->j->errs[i]);
}

static int cmp_rows(const void *a, const void *b)
{
    const lw_size_row *x = a, *y = b;
    if (x->fits != y->fits)
        return x->fits ? -1 : 1;
    if (x->fits) {
        int cx = x->series * x->parallel, cy = y->series * y->parallel;
        if (cx != cy)
            return cx < cy ? -1 : 1;
        if (x->mass_g != y->mass_g)
            return x->mass_g < y->mass_g ? -1 : 1;
    }
    if (x->runtime_h != y->runtime_h)
        return x->runtime_h > y->runtime_h ? -1 : 1;
    int c = strcmp(x->cell, y->cell);
    if (c)
        return c;
    if (x->series != y->series)
        return x->series < y->series ? -1 : 1;
    return (x->parallel > y->parallel) - (x->parallel < y->parallel);
}

lw_status lw_size_packs(const lw_profile *prof, const lw_size_options *opt, lw_size_row **rows,
                        size_t *n_rows, lw_error *err)
{
    *rows = NULL;
    *n_rows = 0;
    const char *own[2] = {prof->cell_ref, NULL};
    const char *const *cells = opt->cells ? opt->cells : own;
    size_t ncells = 0;
    while (cells[ncells])
        ncells++;
    lw_point p0;
    lw_status st = lw_light_point(&prof->light, 0.0, false, &p0, err);
    if (st != LW_OK)
        return st;
    size_t n = ncells * (size_t)opt->max_series * (size_t)opt->max_parallel;
    size_job j = {.prof = prof, .opt = opt, .cells = cells, .design_a = p0.led_a};
    j.rows = lw_calloc(n ? n : 1, sizeof *j.rows);
    j.status = lw_calloc(n ? n : 1, sizeof *j.status);
    j.errs = lw_calloc(n ? n : 1, sizeof *j.errs);
    bool *keep = lw_calloc(n ? n : 1, sizeof *keep);
    if (!j.rows || !j.status || !j.errs || !keep) {
        free(j.rows);
        free(j.status);
        free(j.errs);
        free(keep);
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    }
    struct size_task_ctx ctx = {&j, keep};
    lw_pool_for(n, opt->threads, size_task, &ctx, NULL, NULL);
    size_t kept = 0;
    for (size_t i = 0; i < n; i++) {
        if (j.status[i] != LW_OK && st == LW_OK) {
            st = j.status[i];
            if (err && err->code == LW_OK)
                *err = j.errs[i];
        }
        if (j.status[i] == LW_OK && keep[i])
            j.rows[kept++] = j.rows[i];
    }
    free(j.status);
    free(j.errs);
    free(keep);
    if (st != LW_OK) {
        free(j.rows);
        return st;
    }
    qsort(j.rows, kept, sizeof *j.rows, cmp_rows);
    *rows = j.rows;
    *n_rows = kept;
    return LW_OK;
}
