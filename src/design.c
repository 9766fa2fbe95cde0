/*
 * design.c - pick, size and photometry on top of the engine (see design.h).
 */
#include "design.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "eseries.h"
#include "roots.h"

const double lw_power_ratings_w[] = {0.063, 0.1, 0.125, 0.25, 0.333, 0.5, 0.75,
                                     1.0,   2.0, 3.0,   5.0,  10.0};
const size_t lw_power_nratings = sizeof lw_power_ratings_w / sizeof lw_power_ratings_w[0];

double lw_recommended_rating_w(double p_w)
{
    for (size_t i = 0; i < lw_power_nratings; i++)
        if (lw_power_ratings_w[i] >= 2.0 * p_w)
            return lw_power_ratings_w[i];
    return NAN;
}

double lw_cone_intensity_cd(double flux_lm, double beam_deg)
{
    const double pi = 3.14159265358979323846;
    double half = 0.5 * beam_deg * pi / 180.0;
    return flux_lm / (2.0 * pi * (1.0 - cos(half)));
}

double lw_beam_distance_m(double i_cd)
{
    return i_cd > 0 ? sqrt(i_cd / 0.25) : 0.0;
}

/* ---- fresh operating points with a given resistor ---- */

typedef struct fresh_ctx {
    lw_light light;      /* shallow copy: tables borrowed */
    lw_target_kind kind;
    double target;
    bool worst;          /* worst case instead of nominal */
    lw_status st;
    lw_error *err;
} fresh_ctx;

static lw_status fresh_point(fresh_ctx *c, double r_ohm, lw_point *pt)
{
    c->light.drive.resistor_ohm = r_ohm;
    if (c->worst)
        return lw_worst_case(&c->light, pt, c->err);
    return lw_light_point(&c->light, 0.0, false, pt, c->err);
}

/* Quantity minus target, as a function of log10(R): decreasing in R. */
static double excess(double log_r, void *vctx)
{
    fresh_ctx *c = vctx;
    lw_point pt;
    lw_status st = fresh_point(c, pow(10.0, log_r), &pt);
    if (st != LW_OK) {
        c->st = st;
        return NAN;
    }
    double q = c->kind == LW_TARGET_CURRENT ? pt.led_a : pt.flux_lm;
    return q - c->target;
}

/* The resistance at which the fresh current or flux equals the target, on
 * 1 mohm .. 100 Mohm; 0 when even 1 mohm falls short, INFINITY when even
 * 100 Mohm exceeds it. */
static lw_status ideal_resistance(fresh_ctx *c, double *r_ohm)
{
    double lo = -3.0, hi = 8.0;
    double flo = excess(lo, c), fhi = excess(hi, c);
    if (c->st != LW_OK)
        return c->st;
    if (!(flo > 0.0)) {
        *r_ohm = 0.0;
        return LW_OK;
    }
    if (fhi >= 0.0) {
        *r_ohm = INFINITY;
        return LW_OK;
    }
    double x;
    lw_status st = lw_root_brent(excess, c, lo, hi, flo, fhi, 1e-10, 200, &x, c->err);
    if (st == LW_OK && c->st != LW_OK)
        st = c->st;
    if (st == LW_OK)
        *r_ohm = pow(10.0, x);
    return st;
}

static double tolerance_for(const lw_profile *prof, int series)
{
    return lw_profile_given(prof, "drive.tolerance_pct") ? prof->light.drive.tolerance_pct
                                                          : lw_eseries_tolerance_pct(series);
}

/* Next value of the series strictly above r. */
static double next_up(int series, double r)
{
    return lw_eseries_round(series, r * (1.0 + 1e-6), true);
}

lw_status lw_pick_resistor(const lw_profile *prof, lw_target_kind kind, double target,
                           int series, lw_pick *out, lw_error *err)
{
    memset(out, 0, sizeof *out);
    out->recommended_rating_w = NAN;
    if (prof->light.drive.type != LW_DRIVE_RESISTOR)
        return lw_error_set(err, LW_EINPUT, prof->path, 0,
                            "pick chooses a series resistor: the profile's drive.type must be "
                            "resistor");
    fresh_ctx c = {.kind = kind, .target = target, .err = err};
    c.light = prof->light;
    c.light.drive.tolerance_pct = tolerance_for(prof, series);
    lw_status st = ideal_resistance(&c, &out->ideal_ohm);
    if (st != LW_OK)
        return st;
    out->tolerance_pct = c.light.drive.tolerance_pct;
    out->max_led_a = prof->light.led.max_current_a;
    if (out->ideal_ohm == 0.0)
        return lw_error_set(err, LW_ENOANSWER, prof->path, 0,
                            "no resistor reaches the target: even without one the LEDs stay "
                            "below it with these cells");
    if (!isfinite(out->ideal_ohm))
        return lw_error_set(err, LW_ENOANSWER, prof->path, 0,
                            "the target is reached with any resistor up to 100 Mohm");
    double r = kind == LW_TARGET_CURRENT ? lw_eseries_round(series, out->ideal_ohm, true)
                                         : lw_eseries_round(series, out->ideal_ohm, false);
    if (!isfinite(r))
        r = lw_eseries_round(series, out->ideal_ohm, true);
    out->meets_target = true;
    /* step up until the worst case respects the LED's maximum */
    lw_point nom, worst;
    for (int k = 0; k < 400; k++) {
        c.worst = true;
        st = fresh_point(&c, r, &worst);
        if (st != LW_OK)
            return st;
        if (worst.led_a <= out->max_led_a)
            break;
        r = next_up(series, r);
        out->meets_target = false; /* the safe part falls short of the target */
    }
    c.worst = false;
    st = fresh_point(&c, r, &nom);
    if (st != LW_OK)
        return st;
    out->resistor_ohm = r;
    out->nominal_led_a = nom.led_a;
    out->worst_led_a = worst.led_a;
    out->nominal_flux_lm = nom.flux_lm;
    out->nominal_resistor_w = nom.p_res_peak_w;
    out->worst_resistor_w = worst.p_res_peak_w;
    out->worst = worst;
    out->recommended_rating_w = lw_recommended_rating_w(worst.p_res_peak_w);
    out->within_ratings = worst.led_a <= out->max_led_a && isfinite(out->recommended_rating_w);
    if (kind == LW_TARGET_FLUX && nom.flux_lm < target * (1 - 1e-12))
        out->meets_target = false;
    /* the full run with the chosen part */
    lw_light run_light = c.light;
    run_light.drive.resistor_ohm = r;
    if (isfinite(out->recommended_rating_w))
        run_light.drive.rating_w = out->recommended_rating_w;
    lw_run_options opt = lw_run_options_default();
    st = lw_run(&run_light, &opt, &out->run, err);
    if (st != LW_OK)
        return st;
    if (!out->within_ratings)
        return lw_error_set(err, LW_ENOANSWER, prof->path, 0,
                            "no E%d value keeps the LED within %.4g mA and the resistor within a "
                            "standard power rating in the worst case",
                            series, out->max_led_a * 1e3);
    if (!out->meets_target)
        return lw_error_set(err, LW_ENOANSWER, prof->path, 0,
                            "the target needs more current than the LED's max_current_ma allows "
                            "in the worst case; the nearest safe part is %g ohm",
                            r);
    return LW_OK;
}

/* ---- size ---- */

typedef struct size_job {
    const lw_profile *prof;
    const lw_size_options *opt;
    const char *const *cells;
    size_t ncells;
    lw_size_row *rows;
    lw_status *status;
    lw_error *errs;
    double design_a;      /* nominal fresh LED current of the profile as written */
} size_job;

/* Runtime of a pack with resistor r (0 when the run ends at once). */
static lw_status runtime_with(const lw_light *l, double r, lw_result *res, lw_error *err)
{
    lw_light x = *l;
    x.drive.resistor_ohm = r;
    lw_run_options opt = lw_run_options_default();
    return lw_run(&x, &opt, res, err);
}

static lw_status size_one(const size_job *j, size_t idx, lw_size_row *row, lw_error *err)
{
    const lw_size_options *opt = j->opt;
    size_t per_cell = (size_t)opt->max_series * (size_t)opt->max_parallel;
    const char *cell = j->cells[idx / per_cell];
    int s = 1 + (int)(idx % per_cell) / opt->max_parallel;
    int p = 1 + (int)(idx % per_cell) % opt->max_parallel;
    memset(row, 0, sizeof *row);
    lw_strlcpy(row->cell, cell, sizeof row->cell);
    row->series = s;
    row->parallel = p;
    lw_case variant = {0};
    char buf[32];
    lw_case_set(&variant, "pack.cell", cell);
    snprintf(buf, sizeof buf, "%d", s);
    lw_case_set(&variant, "pack.series", buf);
    snprintf(buf, sizeof buf, "%d", p);
    lw_case_set(&variant, "pack.parallel", buf);
    if (!isnan(opt->flux_lm)) {
        snprintf(buf, sizeof buf, "%.10g", opt->flux_lm);
        lw_case_set(&variant, "cutoff.flux_lm", buf);
    }
    lw_profile prof;
    lw_status st = lw_case_profile(j->prof, &variant, "size", &prof, err);
    if (st != LW_OK) {
        lw_profile_clear(&prof);
        return st;
    }
    row->mass_g = prof.light.pack.cell.mass_g * s * p;
    fresh_ctx c = {.err = err, .kind = LW_TARGET_CURRENT};
    c.light = prof.light;
    c.light.drive.tolerance_pct = tolerance_for(&prof, opt->eseries);
    /* smallest safe resistor: worst-case current at the LED's maximum */
    c.worst = true;
    c.target = prof.light.led.max_current_a;
    double r_safe;
    st = ideal_resistance(&c, &r_safe);
    double r_lo = st == LW_OK && r_safe > 0 ? lw_eseries_round(opt->eseries, r_safe, true)
                                            : lw_eseries_round(opt->eseries, 0.1, true);
    lw_result res = {0};
    if (st == LW_OK && isnan(opt->flux_lm)) {
        /* keep the design's current */
        c.worst = false;
        c.target = j->design_a;
        double r_ideal;
        st = ideal_resistance(&c, &r_ideal);
        if (st == LW_OK && r_ideal > 0 && isfinite(r_ideal)) {
            double r = fmax(lw_eseries_round(opt->eseries, r_ideal, true), r_lo);
            st = runtime_with(&c.light, r, &res, err);
            row->resistor_ohm = r;
        }
    } else if (st == LW_OK) {
        /* the brightest safe resistor down to the one that just makes the
         * floor at switch-on; the runtime over the floor peaks in between */
        c.worst = false;
        c.kind = LW_TARGET_FLUX;
        c.target = opt->flux_lm;
        double r_hi;
        st = ideal_resistance(&c, &r_hi);
        double cand[600];
        size_t n = 0;
        if (st == LW_OK && r_hi > 0 && isfinite(r_hi) && r_hi >= r_lo)
            n = lw_eseries_range(opt->eseries, r_lo, r_hi, cand, 600);
        if (n > 600)
            n = 600;
        /* golden-section search over the index (runtime is unimodal in R) */
        size_t lo = 0, hi = n ? n - 1 : 0;
        double best_t = -1.0;
        while (st == LW_OK && n > 0 && hi - lo > 2) {
            size_t m1 = lo + (hi - lo) * 382 / 1000, m2 = lo + (hi - lo) * 618 / 1000;
            if (m2 <= m1)
                m2 = m1 + 1;
            lw_result r1, r2;
            st = runtime_with(&c.light, cand[m1], &r1, err);
            if (st == LW_OK)
                st = runtime_with(&c.light, cand[m2], &r2, err);
            if (st != LW_OK)
                break;
            if (r1.runtime_h >= r2.runtime_h)
                hi = m2;
            else
                lo = m1;
        }
        for (size_t i = lo; st == LW_OK && n > 0 && i <= hi; i++) {
            lw_result ri;
            st = runtime_with(&c.light, cand[i], &ri, err);
            if (st == LW_OK && ri.runtime_h > best_t) {
                best_t = ri.runtime_h;
                res = ri;
                row->resistor_ohm = cand[i];
            }
        }
    }
    lw_profile_clear(&prof);
    if (st != LW_OK)
        return st;
    if (row->resistor_ohm > 0 && res.end_reason != LW_END_NEVER_LIT) {
        row->runtime_h = res.runtime_h;
        row->initial_flux_lm = res.flux_ref_lm;
    }
    row->margin_pct = 100.0 * (row->runtime_h / opt->runtime_h - 1.0);
    row->fits = row->resistor_ohm > 0 && row->runtime_h >= opt->runtime_h;
    return LW_OK;
}

static void size_task(size_t i, void *vctx)
{
    size_job *j = vctx;
    lw_error_clear(&j->errs[i]);
    j->status[i] = size_one(j, i, &j->rows[i], &j->errs[i]);
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
    return strcmp(x->cell, y->cell);
}

lw_status lw_size_packs(const lw_profile *prof, const lw_size_options *opt, lw_size_row **rows,
                        size_t *n_rows, lw_error *err)
{
    *rows = NULL;
    *n_rows = 0;
    if (prof->light.drive.type != LW_DRIVE_RESISTOR)
        return lw_error_set(err, LW_EINPUT, prof->path, 0,
                            "size chooses a series resistor for each pack: the profile's "
                            "drive.type must be resistor");
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
    size_job j = {.prof = prof, .opt = opt, .cells = cells, .ncells = ncells,
                  .design_a = p0.led_a};
    j.rows = calloc(n ? n : 1, sizeof *j.rows);
    j.status = calloc(n ? n : 1, sizeof *j.status);
    j.errs = calloc(n ? n : 1, sizeof *j.errs);
    if (!j.rows || !j.status || !j.errs) {
        free(j.rows);
        free(j.status);
        free(j.errs);
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    }
    lw_parallel_for(n, opt->threads, size_task, &j, NULL, NULL);
    st = LW_OK;
    size_t kept = 0;
    for (size_t i = 0; i < n; i++) {
        if (j.status[i] != LW_OK && st == LW_OK) {
            st = j.status[i];
            if (err && err->code == LW_OK)
                *err = j.errs[i];
        }
        if (j.status[i] == LW_OK && j.rows[i].resistor_ohm > 0)
            j.rows[kept++] = j.rows[i];
    }
    free(j.status);
    free(j.errs);
    if (st != LW_OK) {
        free(j.rows);
        return st;
    }
    qsort(j.rows, kept, sizeof *j.rows, cmp_rows);
    *rows = j.rows;
    *n_rows = kept;
    return LW_OK;
}

/* ---- specification table ---- */

double lw_spec_round(double v)
{
    if (!isfinite(v) || v == 0.0)
        return v;
    if (fabs(v) >= 100.0)
        return round(v);
    double mag = pow(10.0, floor(log10(fabs(v))) - 1.0);
    return round(v / mag) * mag;
}

void lw_spec_hours(double h, char *buf, size_t size)
{
    if (!isfinite(h))
        snprintf(buf, size, "-");
    else if (h < 1.0)
        snprintf(buf, size, "%.0f min", h * 60.0);
    else if (h < 10.0)
        snprintf(buf, size, "%.1f h", h);
    else
        snprintf(buf, size, "%.0f h", h);
}

static double peak_cd(const lw_profile *p, double flux_lm)
{
    if (p->peak_cd_per_lm > 0)
        return flux_lm * p->peak_cd_per_lm;
    if (p->beam_angle_deg > 0)
        return lw_cone_intensity_cd(flux_lm, p->beam_angle_deg);
    return NAN;
}

static lw_status spec_notes(const lw_profile *p, const lw_case *cases, size_t ncells,
                            lw_rtable *t, lw_error *err)
{
    char buf[512];
    const lw_light *l = &p->light;
    snprintf(buf, sizeof buf,
             "Test conditions: fresh cells (unless a mode sets pack.stored_months) at %g C; "
             "light output 30 s after switch-on; runtime until the output falls to %g %% of "
             "that value (ANSI/PLATO FL 1 definition) or a cell's loaded voltage reaches its "
             "end point; 'at full': hours in regulation.",
             l->pack.ambient_c, l->cutoff.relative_pct);
    lw_status st = lw_rtable_note(t, buf, err);
    for (size_t c = 0; c < ncells && st == LW_OK; c++) {
        const lw_light *cl = &cases[c].light;
        snprintf(buf, sizeof buf,
                 "%s: %d cells (%d in series, %d in parallel), %s, typical data; end point "
                 "%.3g V per cell.",
                 cl->pack.cell.name, cl->pack.series * cl->pack.parallel, cl->pack.series,
                 cl->pack.parallel, lw_chemistry_names[cl->pack.cell.chemistry],
                 cl->cutoff.cell_v);
        st = lw_rtable_note(t, buf, err);
    }
    if (st == LW_OK && (p->beam_angle_deg > 0 || p->peak_cd_per_lm > 0)) {
        if (p->beam_angle_deg > 0)
            snprintf(buf, sizeof buf,
                     "Peak intensity modelled as a uniform %g-degree cone (I = flux / solid "
                     "angle); beam distance where the illuminance falls to 0.25 lx.",
                     p->beam_angle_deg);
        else
            snprintf(buf, sizeof buf,
                     "Peak intensity %g cd per lm of output; beam distance where the "
                     "illuminance falls to 0.25 lx.",
                     p->peak_cd_per_lm);
        st = lw_rtable_note(t, buf, err);
    }
    if (st == LW_OK)
        st = lw_rtable_note(t,
                            "Rounding: lm and cd to 2 significant figures (whole numbers from "
                            "100 up); runtime in whole minutes below 1 h, to 0.1 h below 10 h, "
                            "whole hours above; distance in whole metres.",
                            err);
    if (st == LW_OK)
        st = lw_rtable_note(t, lw_caution_line, err);
    return st;
}

lw_status lw_spec_table(const lw_profile *prof, const char *const *cells, lw_format fmt,
                        int threads, lw_rtable **out, lw_error *err)
{
    *out = NULL;
    const char *own[2] = {prof->cell_ref, NULL};
    if (!cells)
        cells = own;
    size_t ncells = 0;
    while (cells[ncells])
        ncells++;
    if (ncells == 0)
        return lw_error_set(err, LW_EINPUT, prof->path, 0, "the table needs at least one cell");
    size_t nmodes = lw_profile_mode_count(prof);
    size_t nrows = nmodes ? nmodes : 1;
    bool optics = prof->beam_angle_deg > 0 || prof->peak_cd_per_lm > 0;
    lw_case *cases = calloc(nrows * ncells, sizeof *cases);
    if (!cases)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    for (size_t r = 0; r < nrows; r++)
        for (size_t c = 0; c < ncells; c++) {
            lw_case *k = &cases[r * ncells + c];
            k->mode = nmodes ? lw_profile_mode_name(prof, r) : NULL;
            lw_case_set(k, "pack.cell", cells[c]);
        }
    lw_batch_run(prof, cases, nrows * ncells, threads, NULL, NULL);
    lw_status st = LW_OK;
    for (size_t i = 0; i < nrows * ncells && st == LW_OK; i++)
        if (cases[i].status != LW_OK) {
            st = cases[i].status;
            if (err && err->code == LW_OK)
                *err = cases[i].err;
        }
    /* the columns of each cell group: hours at full output only when a mode
     * regulates, intensity and beam distance only with [optics] */
    enum { SC_FLUX, SC_RUNTIME, SC_HALF, SC_REGULATED, SC_CD, SC_BEAM };
    static const char *const csv_names[] = {"flux_lm", "runtime_h", "half_h",
                                            "regulated_h", "peak_cd", "beam_m"};
    static const char *const txt_names[] = {"lm", "runtime", "to 50 %",
                                            "at full", "cd", "beam m"};
    int kinds[6];
    size_t per = 0;
    kinds[per++] = SC_FLUX;
    kinds[per++] = SC_RUNTIME;
    kinds[per++] = SC_HALF;
    bool regulated = false;
    for (size_t i = 0; st == LW_OK && i < nrows * ncells; i++)
        regulated = regulated || isfinite(cases[i].res.regulated_h);
    if (regulated)
        kinds[per++] = SC_REGULATED;
    if (optics) {
        kinds[per++] = SC_CD;
        kinds[per++] = SC_BEAM;
    }
    size_t ncol = 1 + per * ncells;
    lw_rtable *t = st == LW_OK ? lw_rtable_new(ncol, err) : NULL;
    if (st == LW_OK && !t)
        st = LW_ENOMEM;
    char buf[160];
    if (st == LW_OK) {
        st = lw_rtable_head(t, 0, "mode", err);
        for (size_t c = 0; c < ncells && st == LW_OK; c++)
            for (size_t k = 0; k < per && st == LW_OK; k++) {
                const char *cname = cases[c].light.pack.cell.name;
                if (fmt == LW_FMT_CSV) {
                    snprintf(buf, sizeof buf, "%s.%s", cname, csv_names[kinds[k]]);
                    st = lw_rtable_head(t, 1 + c * per + k, buf, err);
                } else {
                    st = lw_rtable_head(t, 1 + c * per + k, txt_names[kinds[k]], err);
                    if (st == LW_OK)
                        st = lw_rtable_group(t, 1 + c * per + k, cname, err);
                }
            }
    }
    for (size_t r = 0; r < nrows && st == LW_OK; r++) {
        size_t row;
        st = lw_rtable_add_row(t, &row, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 0, nmodes ? lw_profile_mode_name(prof, r) : "(as written)",
                               err);
        for (size_t c = 0; c < ncells && st == LW_OK; c++) {
            const lw_result *res = &cases[r * ncells + c].res;
            double flux = res->flux_ref_lm, cd = peak_cd(prof, flux);
            const double vals[6] = {flux,
                                    res->runtime_h,
                                    res->time_to_half_h,
                                    res->regulated_h,
                                    cd,
                                    lw_beam_distance_m(cd)};
            for (size_t k = 0; k < per && st == LW_OK; k++) {
                size_t col = 1 + c * per + k;
                double v = vals[kinds[k]];
                if (fmt == LW_FMT_CSV) {
                    if (isfinite(v))
                        snprintf(buf, sizeof buf, "%.6g", v);
                    else
                        buf[0] = '\0';
                } else if (kinds[k] == SC_RUNTIME || kinds[k] == SC_HALF ||
                           kinds[k] == SC_REGULATED) {
                    lw_spec_hours(v, buf, sizeof buf);
                } else if (kinds[k] == SC_BEAM) {
                    snprintf(buf, sizeof buf, "%.0f", v);
                } else {
                    snprintf(buf, sizeof buf, "%.10g", lw_spec_round(v));
                }
                st = lw_rtable_set(t, row, col, buf, err);
            }
        }
    }
    if (st == LW_OK && fmt != LW_FMT_CSV) {
        snprintf(buf, sizeof buf, "Runtime table: %s", prof->light.name);
        st = lw_rtable_set_title(t, buf, err);
        if (st == LW_OK)
            st = spec_notes(prof, cases, ncells, t, err);
    }
    lw_batch_clear(cases, nrows * ncells);
    free(cases);
    if (st != LW_OK) {
        lw_rtable_free(t);
        return st;
    }
    *out = t;
    return LW_OK;
}
