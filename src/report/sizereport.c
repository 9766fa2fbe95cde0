/*
 * sizereport.c - the table of a pack sizing (see sizereport.h).
 */
#include "lampwick/sizereport.h"
#include "lampwick/number.h"

#include <math.h>
#include <stdio.h>
#include <string.h>
#include "lampwick/report.h"
#include "lampwick/text.h"

enum {
    ZC_CELL, ZC_S, ZC_P, ZC_R, ZC_WORST_W, ZC_RATING, ZC_RUNTIME, ZC_MARGIN, ZC_FLUX, ZC_MASS,
    ZC_END, ZC_WARN, ZC_COUNT
};

static lw_status lw_report_size_in_c_locale(const lw_profile *prof, const lw_size_options *opt,
                        const lw_size_row *rows, size_t show, bool fits, lw_rtable_format fmt,
                        lw_rtable **out, lw_error *err)
{
    static const char *const head[ZC_COUNT] = {
        "cell",      "series",     "parallel",    "resistor_ohm", "worst_resistor_w",
        "rating_w",  "runtime_h",  "margin_pct",  "flux_30s_lm",  "mass_g",
        "end_reason", "warnings"};
    *out = NULL;
    bool regulated = prof->light.drive.type != LW_DRIVE_RESISTOR;
    lw_rtable *t = lw_rtable_new(ZC_COUNT, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = LW_OK;
    unsigned used = 0;
    for (size_t k = 0; k < ZC_COUNT && st == LW_OK; k++)
        st = lw_rtable_head(t, k, head[k], err);
    for (size_t i = 0; i < show && st == LW_OK; i++) {
        const lw_size_row *w = &rows[i];
        size_t r;
        st = lw_rtable_add_row(t, &r, err);
        if (st != LW_OK)
            break;
        const double v[ZC_COUNT] = {NAN,           w->series,      w->parallel,
                                    w->resistor_ohm, w->worst_resistor_w, w->rating_w,
                                    w->runtime_h,  w->margin_pct, w->flux_30s_lm,
                                    w->mass_g,     NAN,           NAN};
        const int sig[ZC_COUNT] = {0, 6, 6, 6, 3, 6, 4, 3, 4, 6, 0, 0};
        for (size_t k = ZC_S; k <= ZC_MASS && st == LW_OK; k++)
            st = lw_rtable_num(t, r, k, v[k], sig[k], err);
        char warn[512] = "";
        if (fmt == LW_FMT_CSV) {
            lw_report_warnings(w->warnings, warn, sizeof warn);
        } else {
            for (int b = 0; b < LW_WARN_COUNT_; b++)
                if (w->warnings & (1u << b)) {
                    size_t m = strlen(warn);
                    snprintf(warn + m, sizeof warn - m, "%s%c", m ? "," : "",
                             lw_report_warning_marker(b));
                    used |= 1u << b;
                }
        }
        if (st == LW_OK)
            st = lw_rtable_set(t, r, ZC_CELL, w->cell, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, r, ZC_END, lw_run_end_names[w->end_reason], err);
        if (st == LW_OK)
            st = lw_rtable_set(t, r, ZC_WARN, warn, err);
    }
    char note[512];
    if (st == LW_OK && fmt != LW_FMT_CSV) {
        if (!isnan(opt->flux_lm))
            snprintf(note, sizeof note,
                     "Requirement: at least %g lm for %g h. Ranked by cell count, then mass.",
                     opt->flux_lm, opt->runtime_h);
        else
            snprintf(note, sizeof note,
                     "Requirement: %g h to the cutoff at the profile's LED current. Ranked by "
                     "cell count, then mass.",
                     opt->runtime_h);
        st = lw_rtable_note(t, note, err);
        if (st == LW_OK && prof->light.use) {
            char use[96];
            lw_report_schedule(&prof->light, use, sizeof use);
            snprintf(note, sizeof note,
                     "Use: in sessions, %s; runtime_h is hours of use to the cutoff.", use);
            st = lw_rtable_note(t, note, err);
        }
        char spread[160];
        if (st == LW_OK && prof->light.pack.capacity_spread + prof->light.pack.resistance_spread > 0) {
            /* a pack of one cell in series has no weakest cell: the spread
             * applies from two in series */
            lw_light two = prof->light;
            two.pack.series = 2;
            lw_report_spread(&two, spread, sizeof spread);
            snprintf(note, sizeof note,
                     "Cells: in every pack of two or more in series, %s; the end point is "
                     "the weakest cell's.",
                     spread);
            st = lw_rtable_note(t, note, err);
        }
        if (st == LW_OK && regulated)
            st = lw_rtable_note(t, "The drive regulates: no resistor to choose; each pack runs "
                                   "with the drive as it is, its dropout included.",
                                err);
        else if (st == LW_OK) {
            snprintf(note, sizeof note,
                     "Resistor: E%d values, worst case (fresh cells, resistor at -tolerance, "
                     "low forward voltage) within the LED's max_current_ma and %s; rating_w: "
                     "the smallest standard rating of at least twice the worst-case power.",
                     opt->eseries,
                     prof->light.drive.rating_w > 0 ? "the profile's rating_w"
                                                    : "a standard rating with 2x derating");
            st = lw_rtable_note(t, note, err);
        }
        if (st == LW_OK)
            st = lw_report_warning_notes(t, used, err);
        if (st == LW_OK && !fits)
            st = lw_rtable_note(t, "Nothing fits; the row above is what came closest.", err);
    }
    return lw_report_table_keep(t, st, fmt, out, err);
}

lw_status lw_report_size(const lw_profile *prof, const lw_size_options *opt,
                        const lw_size_row *rows, size_t show, bool fits, lw_rtable_format fmt,
                        lw_rtable **out, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_report_size_in_c_locale(prof, opt, rows, show, fits, fmt, out, err);
    lw_number_locale_end(saved);
    return result;
}
