/*
 * pickreport.c - the report of a resistor pick (see pickreport.h).
 */
#include "lampwick/pickreport.h"
#include "lampwick/number.h"

#include <math.h>
#include <stdio.h>
#include <string.h>
#include "lampwick/report.h"
#include "lampwick/text.h"

/* The corner table of one pick: current, output, dissipation and the
 * margin to each rating at every corner. */
static lw_status corner_table(const lw_pick *pk, lw_rtable_format fmt, lw_rtable **out,
                              lw_error *err)
{
    static const char *const head[] = {"corner",     "led_ma",         "flux_lm",
                                       "resistor_w", "led_margin_pct", "resistor_margin_pct"};
    static const char *const text_head[] = {"corner",     "LED mA",     "lm",
                                            "resistor W", "LED margin", "resistor margin"};
    lw_rtable *t = lw_rtable_new(6, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = LW_OK;
    for (size_t k = 0; k < 6 && st == LW_OK; k++)
        st = lw_rtable_head(t, k, lw_rtable_for_people(fmt) ? text_head[k] : head[k], err);
    for (int k = 0; k < LW_CORNER_COUNT && st == LW_OK; k++) {
        const lw_corner *c = &pk->corners[k];
        size_t r;
        st = lw_rtable_add_row(t, &r, err);
        char name[64];
        if (k == LW_CORNER_COLD)
            snprintf(name, sizeof name, "cold (%g C)", c->ambient_c);
        else
            snprintf(name, sizeof name, "%s", lw_corner_names[k]);
        if (st == LW_OK)
            st = lw_rtable_set(t, r, 0, name, err);
        const double v[] = {c->pt.led_a * 1e3, c->pt.flux_lm, c->pt.p_res_peak_w,
                            100.0 * (1.0 - c->pt.led_a / pk->max_led_a),
                            100.0 * (1.0 - c->pt.p_res_peak_w / pk->recommended_rating_w)};
        const int sig[] = {4, 4, 3, 3, 3};
        for (size_t q = 0; q < 5 && st == LW_OK; q++) {
            if (fmt == LW_FMT_TEXT && q >= 3 && isfinite(v[q]))
                st = lw_rtable_setf(t, r, 1 + q, err, "%.0f %%", v[q]);
            else
                st = lw_rtable_num(t, r, 1 + q, v[q], sig[q], err);
        }
    }
    if (st != LW_OK) {
        lw_rtable_free(t);
        return st;
    }
    *out = t;
    return LW_OK;
}

static lw_status pick_text(FILE *fp, const lw_profile *prof, const lw_pick *pk,
                           lw_target_kind kind, double target, bool quiet, lw_error *err)
{
    char rt[64];
    lw_report_hours(pk->run.runtime_h, rt, sizeof rt);
    fprintf(fp, "%s, %s: series resistor for %g %s, E%d parts +-%g %%\n", prof->light.name,
            pk->cell, kind == LW_TARGET_CURRENT ? target * 1e3 : target,
            kind == LW_TARGET_CURRENT ? "mA per string" : "lm", pk->eseries, pk->tolerance_pct);
    fprintf(fp, "  ideal resistance     %.4g ohm (nominal parts, fresh cells)\n", pk->ideal_ohm);
    fprintf(fp, "  chosen               %g ohm%s\n\n", pk->resistor_ohm,
            pk->meets_target ? "" : " (the nearest safe part: the target is not met)");
    lw_rtable *t;
    lw_status st = corner_table(pk, LW_FMT_TEXT, &t, err);
    if (st != LW_OK)
        return st;
    st = lw_rtable_write(t, fp, LW_FMT_TEXT, err);
    lw_rtable_free(t);
    if (st != LW_OK)
        return st;
    const lw_corner *hot = &pk->corners[LW_CORNER_HOT], *cold = &pk->corners[LW_CORNER_COLD];
    fprintf(fp, "\n  margins to the LED's max_current_ma %.4g mA and to the recommended rating\n",
            pk->max_led_a * 1e3);
    fprintf(fp, "  runtime to cutoff    %s (%s)\n", rt, lw_run_end_names[pk->run.end_reason]);
    if (isfinite(pk->recommended_rating_w))
        fprintf(fp, "\nRecommendation: %g ohm, E%d +-%g %%, rated %g W (at least twice the "
                    "worst-case %.3g W)\n",
                pk->resistor_ohm, pk->eseries, pk->tolerance_pct, pk->recommended_rating_w,
                hot->pt.p_res_peak_w);
    else
        fprintf(fp, "\nNo standard power rating is enough for the worst-case %.3g W.\n",
                hot->pt.p_res_peak_w);
    if (pk->profile_rating_w > 0 && pk->profile_rating_w < pk->recommended_rating_w)
        fprintf(fp, "Note: the profile's %g W part is below the recommended rating.\n",
                pk->profile_rating_w);
    if (quiet) /* what the corners mean: notes */
        return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
    fprintf(fp, "Worst case hot: fresh cells at %.3g V open circuit and %.3g ohm each, resistor "
                "-%g %%, LED forward voltage -%g %%.\n",
            hot->pt.ocv_v, hot->pt.r_cell_ohm, pk->tolerance_pct,
            prof->light.led.forward_spread_pct);
    if (cold->from_table)
        fprintf(fp, "Cold: nominal parts and fresh cells at %g C, the lowest temperature of the "
                    "cell's table.\n",
                cold->ambient_c);
    else
        fputs("Cold: the cell has no temperature table; the cold corner is at the profile's "
              "ambient.\n",
              fp);
    fprintf(fp, "Power rating: at least twice the worst-case dissipation (derating to 50 %% "
                "of rated power; common practice).\n");
    return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
}

static lw_status lw_report_pick_in_c_locale(FILE *fp, const lw_profile *prof, const lw_pick *picks,
                                            size_t n, lw_target_kind kind, double target,
                                            lw_rtable_format fmt, bool quiet, lw_error *err)
{
    lw_status st = LW_OK;
    if (fmt == LW_FMT_TEXT) {
        for (size_t i = 0; i < n && st == LW_OK; i++) {
            if (i)
                fputc('\n', fp);
            st = pick_text(fp, prof, &picks[i], kind, target, quiet, err);
        }
        if (st == LW_OK && !quiet)
            fprintf(fp, "%s\n", lw_report_caution);
        return st == LW_OK && ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error")
                                         : st;
    }
    static const char *const head[] = {
        "cell",           "resistor_ohm",       "eseries",        "tolerance_pct",
        "ideal_ohm",      "nominal_led_ma",     "nominal_flux_lm", "nominal_resistor_w",
        "worst_led_ma",   "worst_flux_lm",      "worst_resistor_w", "cold_c",
        "cold_led_ma",    "cold_flux_lm",       "cold_resistor_w", "end_led_ma",
        "end_flux_lm",    "end_resistor_w",     "max_led_ma",     "recommended_rating_w",
        "runtime_h",      "end_reason",         "meets_target",   "within_ratings"};
    size_t nh = sizeof head / sizeof head[0];
    lw_rtable *t = lw_rtable_new(nh, err);
    if (!t)
        return LW_ENOMEM;
    for (size_t i = 0; i < nh && st == LW_OK; i++)
        st = lw_rtable_head(t, i, head[i], err);
    for (size_t i = 0; i < n && st == LW_OK; i++) {
        const lw_pick *pk = &picks[i];
        const lw_point *c[4] = {&pk->corners[0].pt, &pk->corners[1].pt, &pk->corners[2].pt,
                                &pk->corners[3].pt};
        size_t row;
        char es[8];
        snprintf(es, sizeof es, "E%d", pk->eseries);
        st = lw_rtable_add_row(t, &row, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 0, pk->cell, err);
        if (st == LW_OK)
            st = lw_rtable_num(t, row, 1, pk->resistor_ohm, 6, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 2, es, err);
        const double v[] = {pk->tolerance_pct, pk->ideal_ohm,
                            c[0]->led_a * 1e3,  c[0]->flux_lm, c[0]->p_res_peak_w,
                            c[1]->led_a * 1e3,  c[1]->flux_lm, c[1]->p_res_peak_w,
                            pk->corners[LW_CORNER_COLD].ambient_c,
                            c[2]->led_a * 1e3,  c[2]->flux_lm, c[2]->p_res_peak_w,
                            c[3]->led_a * 1e3,  c[3]->flux_lm, c[3]->p_res_peak_w,
                            pk->max_led_a * 1e3, pk->recommended_rating_w, pk->run.runtime_h};
        for (size_t k = 0; k < sizeof v / sizeof v[0] && st == LW_OK; k++)
            st = lw_rtable_num(t, row, 3 + k, v[k], 6, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, nh - 3, lw_run_end_names[pk->run.end_reason], err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, nh - 2, pk->meets_target ? "yes" : "no", err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, nh - 1, pk->within_ratings ? "yes" : "no", err);
    }
    t->quiet = quiet;
    return lw_report_table_write(t, st, fp, fmt, err);
}

lw_status lw_report_pick(FILE *fp, const lw_profile *prof, const lw_pick *picks, size_t n,
                         lw_target_kind kind, double target, lw_rtable_format fmt, bool quiet,
                         lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result =
        lw_report_pick_in_c_locale(fp, prof, picks, n, kind, target, fmt, quiet, err);
    lw_number_locale_end(saved);
    return result;
}
