/*
 * specreport.c - the runtime table of a product specification, rendered
 * (see specreport.h).
 */
#include "lampwick/specreport.h"
#include "lampwick/number.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"
#include "lampwick/photometry.h"
#include "lampwick/report.h"

static void lw_report_spec_hours_in_c_locale(double h, char *buf, size_t size)
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

/* CSV and JSON take the table for programs: a column per cell and
 * quantity, numbers in full precision, the end reason and warnings in
 * words (text and Markdown: rounded, grouped by cell, notes as marks). */
static bool machine_layout(lw_rtable_format fmt)
{
    return fmt == LW_FMT_CSV || fmt == LW_FMT_JSON;
}

/* ---- the notes: conditions as computed ---- */

static const lw_case *case_at(const lw_spec *s, size_t r, size_t c)
{
    return &s->cases[r * s->ncells + c];
}

static const char *row_name(const lw_spec *s, size_t r)
{
    return s->has_modes ? s->cases[r * s->ncells].variant.mode : "(as written)";
}

typedef void (*aspect_fn)(const lw_case *k, char *buf, size_t size);

static void storage_of(const lw_case *k, char *buf, size_t size)
{
    const lw_light *l = &k->light;
    if (l->pack.stored_months > 0)
        snprintf(buf, size, "after %g month%s' storage (%.1f %% discharged)",
                 l->pack.stored_months, l->pack.stored_months == 1 ? "" : "s",
                 100.0 * k->res.start_depth);
    else
        snprintf(buf, size, "fresh cells");
}

static void use_of(const lw_case *k, char *buf, size_t size)
{
    char u[96];
    lw_report_schedule(&k->light, u, sizeof u);
    if (k->light.use)
        snprintf(buf, size, "used in sessions, %s (runtime: hours of use; days: calendar days "
                 "to the cutoff)", u);
    else
        snprintf(buf, size, "%s", u);
}

static void spread_of(const lw_case *k, char *buf, size_t size)
{
    if (!lw_report_spread(&k->light, buf, size))
        snprintf(buf, size, "matched cells");
    else
        strncat(buf, " (the end point is the weakest cell's)", size - strlen(buf) - 1);
}

static void ambient_of(const lw_case *k, char *buf, size_t size)
{
    snprintf(buf, size, "%g C ambient", k->light.pack.ambient_c);
}

static void cutoff_of(const lw_case *k, char *buf, size_t size)
{
    const lw_light *l = &k->light;
    char ref[96];
    lw_report_reference(l, ref, sizeof ref);
    int n = snprintf(buf, size, "runtime until the output falls to %g %% of %s%s",
                     l->cutoff.relative_pct, ref,
                     l->cutoff.reference == LW_REF_OWN && l->cutoff.relative_pct == 10.0
                         ? " (ANSI/PLATO FL 1 definition)"
                         : "");
    if (n > 0 && (size_t)n < size && l->cutoff.flux_lm > 0)
        n += snprintf(buf + n, size - (size_t)n, " or to %g lm", l->cutoff.flux_lm);
    if (n > 0 && (size_t)n < size)
        snprintf(buf + n, size - (size_t)n, ", or a cell's loaded voltage reaches %s",
                 k->light.cutoff.cell_v == k->light.pack.cell.cutoff_v ? "its end point"
                                                                       : "the set cutoff_v");
}

static void drive_of(const lw_case *k, char *buf, size_t size)
{
    lw_report_drive(&k->light, buf, size);
}

/* Which runs share a value, in words: modes, cells, or mode/cell pairs. */
static void who(const lw_spec *s, const bool *sel, char *buf, size_t size)
{
    bool whole_rows = true, whole_cols = true;
    for (size_t r = 0; r < s->nrows; r++)
        for (size_t c = 0; c < s->ncells; c++) {
            if (sel[r * s->ncells + c] != sel[r * s->ncells])
                whole_rows = false;
            if (sel[r * s->ncells + c] != sel[c])
                whole_cols = false;
        }
    buf[0] = '\0';
    const char *sep = "";
    if (whole_rows && s->has_modes) {
        strncat(buf, "mode ", size - strlen(buf) - 1);
        for (size_t r = 0; r < s->nrows; r++)
            if (sel[r * s->ncells]) {
                strncat(buf, sep, size - strlen(buf) - 1);
                strncat(buf, row_name(s, r), size - strlen(buf) - 1);
                sep = ", ";
            }
        return;
    }
    if (whole_cols) {
        for (size_t c = 0; c < s->ncells; c++)
            if (sel[c]) {
                strncat(buf, sep, size - strlen(buf) - 1);
                strncat(buf, case_at(s, 0, c)->light.pack.cell.name, size - strlen(buf) - 1);
                sep = ", ";
            }
        return;
    }
    for (size_t i = 0; i < s->nrows * s->ncells; i++)
        if (sel[i]) {
            char pair[2 * LW_NAME_MAX + 8];
            snprintf(pair, sizeof pair, "%s/%s", row_name(s, i / s->ncells),
                     s->cases[i].light.pack.cell.name);
            strncat(buf, sep, size - strlen(buf) - 1);
            strncat(buf, pair, size - strlen(buf) - 1);
            sep = ", ";
        }
}

/* One aspect of the conditions: appended to `common` when every run shares
 * it, else a note of its own listing each value and the runs it holds for. */
static lw_status aspect(const lw_spec *s, const char *label, aspect_fn f, char *common,
                        size_t csize, lw_rtable *t, lw_error *err)
{
    size_t n = s->nrows * s->ncells;
    if (n == 0)
        return LW_OK; /* no runs: nothing to say */
    bool *done = lw_calloc(2 * n, sizeof *done);
    if (!done)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    bool *sel = done + n;
    char first[256], v[256], line[2048], whom[1024];
    f(&s->cases[0], first, sizeof first);
    bool same = true;
    for (size_t i = 1; i < n && same; i++) {
        f(&s->cases[i], v, sizeof v);
        same = !strcmp(v, first);
    }
    lw_status st = LW_OK;
    if (same) {
        strncat(common, "; ", csize - strlen(common) - 1);
        strncat(common, first, csize - strlen(common) - 1);
    } else {
        snprintf(line, sizeof line, "%s: ", label);
        const char *sep = "";
        for (size_t i = 0; i < n; i++) {
            if (done[i])
                continue;
            char val[256];
            f(&s->cases[i], val, sizeof val);
            for (size_t j = 0; j < n; j++) {
                f(&s->cases[j], v, sizeof v);
                sel[j] = !done[j] && !strcmp(v, val);
                done[j] = done[j] || sel[j];
            }
            who(s, sel, whom, sizeof whom);
            strncat(line, sep, sizeof line - strlen(line) - 1);
            strncat(line, val, sizeof line - strlen(line) - 1);
            strncat(line, " (", sizeof line - strlen(line) - 1);
            strncat(line, whom, sizeof line - strlen(line) - 1);
            strncat(line, ")", sizeof line - strlen(line) - 1);
            sep = "; ";
        }
        strncat(line, ".", sizeof line - strlen(line) - 1);
        st = lw_rtable_note(t, line, err);
    }
    free(done);
    return st;
}


static lw_status spec_notes(const lw_spec *s, unsigned used, lw_rtable *t, lw_error *err)
{
    const lw_profile *p = s->prof;
    char common[1024] = "Test conditions: light output 30 s after switch-on";
    lw_status st = aspect(s, "Storage", storage_of, common, sizeof common, t, err);
    bool spread = false, use = false;
    for (size_t i = 0; i < s->nrows * s->ncells; i++) {
        spread = spread || lw_light_has_spread(&s->cases[i].light);
        use = use || s->cases[i].light.use;
    }
    if (st == LW_OK && use)
        st = aspect(s, "Use", use_of, common, sizeof common, t, err);
    if (st == LW_OK && spread)
        st = aspect(s, "Cells", spread_of, common, sizeof common, t, err);
    if (st == LW_OK)
        st = aspect(s, "Ambient", ambient_of, common, sizeof common, t, err);
    if (st == LW_OK)
        st = aspect(s, "Cutoff", cutoff_of, common, sizeof common, t, err);
    if (st == LW_OK)
        st = aspect(s, "Drive", drive_of, common, sizeof common, t, err);
    if (st == LW_OK && s->regulated)
        strncat(common, "; 'at full': hours in regulation", sizeof common - strlen(common) - 1);
    bool chains = false;
    for (size_t i = 0; i < s->nrows * s->ncells; i++)
        chains = chains || s->cases[i].light.chain;
    if (st == LW_OK && chains)
        strncat(common,
                "; a mode that steps down is run through its steps (runtime to the cutoff of "
                "its first mode), 'steps' gives the 30-s output and each step's output and "
                "trigger",
                sizeof common - strlen(common) - 1);
    strncat(common, ".", sizeof common - strlen(common) - 1);
    /* the common sentence goes first */
    if (st == LW_OK)
        st = lw_rtable_note(t, common, err);
    if (st == LW_OK && t->nnotes > 1) {
        char *c = t->notes[t->nnotes - 1];
        memmove(t->notes + 1, t->notes, (t->nnotes - 1) * sizeof *t->notes);
        t->notes[0] = c;
    }
    char buf[512];
    for (size_t c = 0; c < s->ncells && st == LW_OK; c++) {
        const lw_light *cl = &case_at(s, 0, c)->light;
        int cells = cl->pack.series * cl->pack.parallel;
        snprintf(buf, sizeof buf,
                 "%s: %d cell%s (%d in series, %d in parallel), %s, typical data; end point "
                 "%.3g V per cell.",
                 cl->pack.cell.name, cells, cells == 1 ? "" : "s", cl->pack.series,
                 cl->pack.parallel, lw_cell_chemistry_names[cl->pack.cell.chemistry],
                 cl->cutoff.cell_v);
        st = lw_rtable_note(t, buf, err);
    }
    if (st == LW_OK && s->optics) {
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
        st = lw_report_warning_notes(t, used, err);
    if (st == LW_OK && (used & (1u << LW_WARN_COUNT_)))
        st = lw_rtable_note(t,
                            "no light: the run gave no light at all; the notes column names "
                            "why (never-lit, empty-at-start, dim-at-start).",
                            err);
    if (st == LW_OK)
        st = lw_rtable_note(t,
                            "Rounding: lm and cd to 2 significant figures (whole numbers from "
                            "100 up); runtime in whole minutes below 1 h, to 0.1 h below 10 h, "
                            "whole hours above; distance in whole metres.",
                            err);
    if (st == LW_OK)
        st = lw_rtable_note(t, lw_report_caution, err);
    return st;
}

/* ---- the table ---- */

enum {
    SC_FLUX, SC_RUNTIME, SC_HALF, SC_REGULATED, SC_CD, SC_BEAM, SC_DAYS, SC_STEPS, SC_END, SC_NOTES,
    SC_COUNT
};

/* A time in a mode in words: "90 s", "3 min", "1.5 h". */
static void duration_words(double s, char *buf, size_t size)
{
    if (s < 120.0)
        snprintf(buf, size, "%g s", s);
    else if (s < 7200.0)
        snprintf(buf, size, "%g min", s / 60.0);
    else
        snprintf(buf, size, "%g h", s / 3600.0);
}

/* The steps of a run of a chain in words: "670 lm, after 3 min 330 lm, at
 * 3.2 V 100 lm" (outputs rounded as the lm column); "" without a chain. */
static void steps_words(const lw_case *k, char *buf, size_t size)
{
    const lw_light *l = &k->light;
    const lw_result *r = &k->res;
    if (!l->chain) {
        snprintf(buf, size, "steady");
        return;
    }
    int n = snprintf(buf, size, "%.10g lm", lw_spec_round(r->flux_30s_lm));
    for (size_t i = 0; i < r->n_switches && n > 0 && (size_t)n < size; i++) {
        const lw_switch *sw = &r->switches[i];
        const lw_chain_mode *m = &l->chain->modes[sw->from];
        char when[64], what[64];
        if (sw->cause == LW_SWITCH_TIMER) {
            char d[32];
            duration_words(m->after_s, d, sizeof d);
            snprintf(when, sizeof when, "after %s", d);
        } else if (sw->cause == LW_SWITCH_CELL_V) {
            snprintf(when, sizeof when, "at %g V", m->below_cell_v);
        } else {
            snprintf(when, sizeof when, "at %g C body", m->above_c);
        }
        if (sw->to == LW_CHAIN_OFF)
            snprintf(what, sizeof what, "off");
        else
            snprintf(what, sizeof what, "%.10g lm", lw_spec_round(sw->flux_after_lm));
        n += snprintf(buf + n, size - (size_t)n, ", %s %s", when, what);
    }
}

static double peak_cd(const lw_profile *p, double flux_lm)
{
    if (p->peak_cd_per_lm > 0)
        return flux_lm * p->peak_cd_per_lm;
    if (p->beam_angle_deg > 0)
        return lw_photometry_cone_cd(flux_lm, p->beam_angle_deg);
    return NAN;
}

/* The text of one table cell of quantity `kind` for run k. */
static lw_status spec_cell(const lw_spec *s, const lw_case *k, int kind, lw_rtable_format fmt,
                           lw_rtable *t, size_t row, size_t col, lw_error *err)
{
    const lw_result *res = &k->res;
    bool dark = lw_run_end_is_dark(res->end_reason);
    char buf[512];
    if (kind == SC_END)
        return lw_rtable_set(t, row, col, lw_run_end_names[res->end_reason], err);
    if (kind == SC_STEPS) {
        steps_words(k, buf, sizeof buf);
        return lw_rtable_set(t, row, col, dark ? "-" : buf, err);
    }
    if (kind == SC_NOTES) {
        if (machine_layout(fmt)) {
            lw_report_warnings(res->warnings, buf, sizeof buf);
        } else {
            /* "empty-at-start", "(a,c)", or both */
            char marks[2 * LW_WARN_COUNT_ + 1] = "";
            for (int i = 0; i < LW_WARN_COUNT_; i++)
                if ((res->warnings & (1u << i)) && (1u << i) != LW_WARN_NEVER_LIT) {
                    size_t m = strlen(marks);
                    marks[m] = m ? ',' : lw_report_warning_marker(i);
                    if (m)
                        marks[++m] = lw_report_warning_marker(i);
                    marks[m + 1] = '\0';
                }
            snprintf(buf, sizeof buf, "%s%s%s%s%s", dark ? lw_run_end_names[res->end_reason] : "",
                     dark && marks[0] ? " " : "", marks[0] ? "(" : "", marks,
                     marks[0] ? ")" : "");
        }
        return lw_rtable_set(t, row, col, buf, err);
    }
    double flux = res->flux_30s_lm, cd = peak_cd(s->prof, flux);
    const double vals[] = {flux, res->runtime_h, res->time_to_half_h, res->regulated_h, cd,
                           lw_photometry_beam_m(cd), res->calendar_h / 24.0};
    double v = dark ? NAN : vals[kind];
    if (machine_layout(fmt))
        return lw_rtable_num(t, row, col, v, 6, err);
    if (dark)
        return lw_rtable_set(t, row, col, kind == SC_FLUX ? "no light" : "-", err);
    if (kind == SC_RUNTIME || kind == SC_HALF || kind == SC_REGULATED)
        lw_report_spec_hours(v, buf, sizeof buf);
    else if (kind == SC_DAYS)
        snprintf(buf, sizeof buf, "%.1f", v);
    else if (kind == SC_BEAM)
        snprintf(buf, sizeof buf, "%.0f", v);
    else
        snprintf(buf, sizeof buf, "%.10g", lw_spec_round(v));
    return lw_rtable_set(t, row, col, buf, err);
}

static lw_status lw_report_spec_in_c_locale(const lw_spec *s, lw_rtable_format fmt, lw_rtable **out,
                                            lw_error *err)
{
    static const char *const csv_names[SC_COUNT] = {
        "flux_lm", "runtime_h", "half_h", "regulated_h", "peak_cd", "beam_m", "calendar_days",
        "steps", "end_reason", "warnings"};
    static const char *const txt_names[SC_COUNT] = {"lm",      "runtime", "to 50 %", "at full",
                                                    "cd",      "beam m",  "days",    "steps",
                                                    "",        "notes"};
    *out = NULL;
    /* which warnings appear (bit LW_WARN_COUNT_: some run gave no light) */
    unsigned used = 0;
    for (size_t i = 0; i < s->nrows * s->ncells; i++) {
        used |= s->cases[i].res.warnings & ~(unsigned)LW_WARN_NEVER_LIT;
        if (lw_run_end_is_dark(s->cases[i].res.end_reason))
            used |= 1u << LW_WARN_COUNT_;
    }
    bool chains = false, used_in_sessions = false; /* the steps and days columns */
    for (size_t i = 0; i < s->nrows * s->ncells; i++) {
        chains = chains || s->cases[i].light.chain;
        used_in_sessions = used_in_sessions || s->cases[i].light.use;
    }
    int kinds[SC_COUNT];
    size_t per = 0;
    kinds[per++] = SC_FLUX;
    kinds[per++] = SC_RUNTIME;
    kinds[per++] = SC_HALF;
    if (s->regulated)
        kinds[per++] = SC_REGULATED;
    if (s->optics) {
        kinds[per++] = SC_CD;
        kinds[per++] = SC_BEAM;
    }
    if (used_in_sessions)
        kinds[per++] = SC_DAYS;
    if (chains)
        kinds[per++] = SC_STEPS;
    if (machine_layout(fmt))
        kinds[per++] = SC_END;
    if (machine_layout(fmt) || used)
        kinds[per++] = SC_NOTES;
    lw_rtable *t = lw_rtable_new(1 + per * s->ncells, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = lw_rtable_head(t, 0, "mode", err);
    char buf[160];
    for (size_t c = 0; c < s->ncells && st == LW_OK; c++)
        for (size_t k = 0; k < per && st == LW_OK; k++) {
            const char *cname = case_at(s, 0, c)->light.pack.cell.name;
            size_t col = 1 + c * per + k;
            if (machine_layout(fmt)) {
                snprintf(buf, sizeof buf, "%s.%s", cname, csv_names[kinds[k]]);
                st = lw_rtable_head(t, col, buf, err);
            } else {
                st = lw_rtable_head(t, col, txt_names[kinds[k]], err);
                if (st == LW_OK)
                    st = lw_rtable_group(t, col, cname, err);
            }
        }
    for (size_t r = 0; r < s->nrows && st == LW_OK; r++) {
        size_t row;
        st = lw_rtable_add_row(t, &row, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 0, row_name(s, r), err);
        for (size_t c = 0; c < s->ncells && st == LW_OK; c++)
            for (size_t k = 0; k < per && st == LW_OK; k++)
                st = spec_cell(s, case_at(s, r, c), kinds[k], fmt, t, row, 1 + c * per + k, err);
    }
    if (st == LW_OK && fmt != LW_FMT_CSV) {
        snprintf(buf, sizeof buf, "Runtime table: %s", s->prof->light.name);
        st = lw_rtable_set_title(t, buf, err);
        if (st == LW_OK)
            st = spec_notes(s, used, t, err);
    }
    if (st != LW_OK) {
        lw_rtable_free(t);
        return st;
    }
    *out = t;
    return LW_OK;
}

static lw_status lw_report_spec_table_in_c_locale(const lw_profile *prof, const char *const *cells,
                                                  lw_rtable_format fmt, int threads,
                                                  lw_rtable **out, lw_error *err)
{
    lw_spec s;
    *out = NULL;
    lw_status st = lw_spec_compute(prof, cells, threads, &s, err);
    if (st == LW_OK)
        st = lw_report_spec(&s, fmt, out, err);
    lw_spec_clear(&s);
    return st;
}

void lw_report_spec_hours(double h, char *buf, size_t size)
{
    locale_t saved = lw_number_locale_begin();
    lw_report_spec_hours_in_c_locale(h, buf, size);
    lw_number_locale_end(saved);
}

lw_status lw_report_spec(const lw_spec *s, lw_rtable_format fmt, lw_rtable **out, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_report_spec_in_c_locale(s, fmt, out, err);
    lw_number_locale_end(saved);
    return result;
}

lw_status lw_report_spec_table(const lw_profile *prof, const char *const *cells,
                               lw_rtable_format fmt, int threads, lw_rtable **out, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_report_spec_table_in_c_locale(prof, cells, fmt, threads, out, err);
    lw_number_locale_end(saved);
    return result;
}

static lw_status spec_corners_in_c_locale(const lw_spec *s, lw_rtable_format fmt,
                                          lw_rtable **out, lw_error *err)
{
    static const char *const head[] = {"mode",          "cell",           "runtime_h",
                                       "cold_c",        "cold_runtime_h", "cold_flux_30s_lm",
                                       "worst_led_ma",  "worst_resistor_w"};
    static const char *const text_head[] = {"mode",       "cell",     "runtime h",
                                            "cold C",     "cold h",   "cold lm at 30 s",
                                            "hot LED mA", "hot resistor W"};
    enum { NC = sizeof head / sizeof head[0] };
    *out = NULL;
    lw_rtable *t = lw_rtable_new(NC, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = fmt == LW_FMT_CSV ? LW_OK
                                     : lw_rtable_set_title(t, "Corners: the runtime cold beside "
                                                              "the nominal, the ratings case hot",
                                                           err);
    for (size_t k = 0; k < NC && st == LW_OK; k++)
        st = lw_rtable_head(t, k, lw_rtable_for_people(fmt) ? text_head[k] : head[k], err);
    for (size_t r = 0; r < s->nrows; r++)
        for (size_t c = 0; c < s->ncells && st == LW_OK; c++) {
            const lw_case *k = &s->cases[r * s->ncells + c];
            const lw_corner *cn = s->corners + (r * s->ncells + c) * LW_CORNER_COUNT;
            size_t row;
            st = lw_rtable_add_row(t, &row, err);
            if (st == LW_OK)
                st = lw_rtable_set(t, row, 0, k->variant.mode ? k->variant.mode : "", err);
            if (st == LW_OK)
                st = lw_rtable_set(t, row, 1, k->light.pack.cell.name, err);
            const double v[] = {cn[LW_CORNER_NOMINAL].runtime_h, cn[LW_CORNER_COLD].ambient_c,
                                cn[LW_CORNER_COLD].runtime_h,    cn[LW_CORNER_COLD].flux_30s_lm,
                                1e3 * cn[LW_CORNER_HOT].pt.led_a,
                                cn[LW_CORNER_HOT].pt.p_res_peak_w};
            for (size_t q = 0; q < NC - 2 && st == LW_OK; q++)
                st = isfinite(v[q]) ? lw_rtable_num(t, row, 2 + q, v[q], 4, err)
                                    : lw_rtable_set(t, row, 2 + q, "", err);
        }
    if (st == LW_OK && fmt != LW_FMT_CSV)
        st = lw_rtable_note(t,
                            "cold: nominal parts at pack.ambient_c's lowest (a range LOW..HIGH) "
                            "or the cell table's lowest temperature; hot: fresh cells, resistor "
                            "at minus its tolerance, LED forward voltage at minus its spread, "
                            "the range's hottest ambient",
                            err);
    if (st != LW_OK) {
        lw_rtable_free(t);
        return st;
    }
    *out = t;
    return LW_OK;
}

lw_status lw_report_spec_corners(const lw_spec *s, lw_rtable_format fmt, lw_rtable **out,
                                 lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status st = spec_corners_in_c_locale(s, fmt, out, err);
    lw_number_locale_end(saved);
    return st;
}
