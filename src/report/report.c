/*
 * report.c - the run report and the trace CSV (see report.h).
 */
#include "lampwick/report.h"
#include "lampwick/number.h"

#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/csvio.h"
#include "lampwick/alloc.h"

const char *const lw_report_caution =
    "Caution: estimates from typical data. Follow the cell maker's limits and the applicable "
    "safety standards; have a product checked by qualified people.";

const char *const lw_report_safety =
    "Lithium cells can overheat, vent and burn when shorted, over-discharged, charged wrongly "
    "or mixed with cells of another type, age or charge. Resistors and drivers get hot: check "
    "their power and temperature in the real enclosure. Bright LEDs can harm eyes (see IEC "
    "62471). lampwick's figures are estimates from typical data: follow the cell maker's "
    "limits, the applicable safety standards (for example IEC 62133-2 for lithium-ion cells) "
    "and local codes, and have a product checked by qualified people.";

char lw_report_warning_marker(int bit)
{
    return (char)('a' + bit);
}

lw_status lw_report_warning_notes(lw_rtable *t, unsigned used, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status st = LW_OK;
    for (int b = 0; b < LW_WARN_COUNT_ && st == LW_OK; b++)
        if (used & (1u << b)) {
            char note[512];
            snprintf(note, sizeof note, "(%c) %s.", lw_report_warning_marker(b),
                     lw_report_warning(b));
            st = lw_rtable_note(t, note, err);
        }
    lw_number_locale_end(saved);
    return st;
}

lw_status lw_report_table_write(lw_rtable *t, lw_status st, FILE *fp, lw_rtable_format fmt,
                                lw_error *err)
{
    if (st == LW_OK && fmt == LW_FMT_MD)
        st = lw_rtable_note(t, lw_report_caution, err);
    if (st == LW_OK)
        st = lw_rtable_write(t, fp, fmt, err);
    lw_rtable_free(t);
    return st;
}

lw_status lw_report_table_keep(lw_rtable *t, lw_status st, lw_rtable_format fmt, lw_rtable **out,
                               lw_error *err)
{
    if (st == LW_OK && fmt != LW_FMT_CSV)
        st = lw_rtable_note(t, lw_report_caution, err);
    if (st != LW_OK) {
        lw_rtable_free(t);
        return st;
    }
    *out = t;
    return LW_OK;
}

/* ---- the run report ---- */

/* The run columns, in the order of lw_report_run_columns. */
enum run_col {
    RC_RUNTIME, RC_END, RC_LED_MA, RC_PACK_MA, RC_FLUX0, RC_FLUX30, RC_REF_LM, RC_REFERENCE,
    RC_HALF, RC_REGULATED, RC_LMH, RC_E_DRAWN, RC_E_LED, RC_E_RES, RC_E_INT, RC_E_DRV,
    RC_EFFICIENCY, RC_LM_PER_W, RC_PEAK_RES, RC_WORST_LED, RC_WORST_RES, RC_FINAL_V, RC_TJ30,
    RC_TJ_PEAK, RC_TH_PEAK, RC_SWITCHES, RC_WEAK_V_END, RC_REVERSAL, RC_ON_TIME, RC_SESSIONS,
    RC_CAL_DAYS, RC_SOLVES, RC_WARNINGS, RC_COUNT
};

/* Columns that only mean something for a light that lit (empty otherwise). */
static bool lit_only(enum run_col c)
{
    return !(c == RC_RUNTIME || c == RC_END || c == RC_REFERENCE || c == RC_WORST_LED ||
             c == RC_WORST_RES || c == RC_FINAL_V || c == RC_SOLVES || c == RC_WARNINGS ||
             c == RC_SWITCHES || c == RC_WEAK_V_END || c == RC_REVERSAL);
}

const char *const lw_report_run_columns[RC_COUNT + 1] = {
    "runtime_h",          "end_reason",       "initial_led_ma", "initial_pack_ma",
    "initial_flux_lm",    "flux_30s_lm",      "reference_lm",   "cutoff_reference",
    "time_to_half_h",     "regulated_h",      "lumen_hours",    "energy_drawn_wh",
    "energy_led_wh",      "energy_resistor_wh", "energy_internal_wh", "energy_driver_wh",
    "efficiency_pct",     "lm_per_w",         "peak_resistor_w", "worst_led_ma",
    "worst_resistor_w",   "final_cell_v",     "junction_30s_c", "peak_junction_c",
    "peak_body_c",        "switches",         "weakest_cell_v_end", "reversal",
    "on_time_h",          "sessions",         "calendar_days",  "solves",
    "warnings",           NULL};
const size_t lw_report_run_ncolumns = RC_COUNT;

void lw_report_warnings(unsigned warnings, char *buf, size_t size)
{
    buf[0] = '\0';
    for (int i = 0; i < LW_WARN_COUNT_; i++) {
        if (!(warnings & (1u << i)))
            continue;
        if (buf[0])
            strncat(buf, ";", size - strlen(buf) - 1);
        strncat(buf, lw_run_warning_names[i], size - strlen(buf) - 1);
    }
}

static double efficiency_pct(const lw_result *r)
{
    return r->energy_drawn_wh > 0 ? 100.0 * r->energy_led_wh / r->energy_drawn_wh : NAN;
}

static double run_value(enum run_col c, const lw_result *r)
{
    switch (c) {
    case RC_RUNTIME: return r->runtime_h;
    case RC_LED_MA: return r->initial.led_a * 1e3;
    case RC_PACK_MA: return r->initial.pack_avg_a * 1e3;
    case RC_FLUX0: return r->initial.flux_lm;
    case RC_FLUX30: return r->flux_30s_lm;
    case RC_REF_LM: return r->flux_ref_lm;
    case RC_HALF: return r->time_to_half_h;
    case RC_REGULATED: return r->regulated_h;
    case RC_LMH: return r->lumen_hours;
    case RC_E_DRAWN: return r->energy_drawn_wh;
    case RC_E_LED: return r->energy_led_wh;
    case RC_E_RES: return r->energy_resistor_wh;
    case RC_E_INT: return r->energy_internal_wh;
    case RC_E_DRV: return r->energy_driver_wh;
    case RC_EFFICIENCY: return efficiency_pct(r);
    case RC_LM_PER_W: return r->energy_drawn_wh > 0 ? r->lumen_hours / r->energy_drawn_wh : NAN;
    case RC_PEAK_RES: return r->peak_resistor_w;
    case RC_WORST_LED: return r->worst_led_a * 1e3;
    case RC_WORST_RES: return r->worst_resistor_w;
    case RC_FINAL_V: return r->final.cell_v;
    case RC_TJ30: return r->junction_30s_c;
    case RC_TJ_PEAK: return r->peak_junction_c;
    case RC_TH_PEAK: return r->peak_body_c;
    case RC_SWITCHES: return (double)r->switches_total;
    case RC_WEAK_V_END: return r->final.weak_cell_v;
    case RC_REVERSAL: return (r->warnings & LW_WARN_CELL_REVERSAL) ? 1.0 : 0.0;
    /* a use schedule's figures (empty without one) */
    case RC_ON_TIME: return r->n_sessions ? r->runtime_h : NAN;
    case RC_SESSIONS: return r->n_sessions ? (double)r->n_sessions : NAN;
    case RC_CAL_DAYS: return r->n_sessions ? r->calendar_h / 24.0 : NAN;
    case RC_SOLVES: return r->solves;
    default: return NAN;
    }
}

static lw_status lw_report_run_row_in_c_locale(lw_rtable *t, size_t row, size_t c,
                                               const lw_light *light, const lw_result *r,
                                               lw_error *err)
{
    char warn[512];
    lw_report_warnings(r->warnings, warn, sizeof warn);
    bool dark = lw_run_end_is_dark(r->end_reason);
    lw_status st = LW_OK;
    for (int i = 0; i < RC_COUNT && st == LW_OK; i++) {
        if (i == RC_END)
            st = lw_rtable_set(t, row, c + i, lw_run_end_names[r->end_reason], err);
        else if (i == RC_REFERENCE)
            st = lw_rtable_set(t, row, c + i, lw_light_reference_names[light->cutoff.reference],
                               err);
        else if (i == RC_WARNINGS)
            st = lw_rtable_set(t, row, c + i, warn, err);
        else
            st = lw_rtable_num(t, row, c + i, dark && lit_only(i) ? NAN : run_value(i, r), 6, err);
    }
    return st;
}

static void lw_report_hours_in_c_locale(double h, char *buf, size_t size)
{
    if (!isfinite(h))
        snprintf(buf, size, "not reached");
    else if (h < 1.0)
        snprintf(buf, size, "%.1f min", h * 60.0);
    else if (h < 100.0)
        snprintf(buf, size, "%.2f h", h);
    else
        snprintf(buf, size, "%.0f h (%.1f days)", h, h / 24.0);
}

static const char *end_text(lw_end_reason why)
{
    switch (why) {
    case LW_END_RELATIVE:
        return "output fell to the relative cutoff";
    case LW_END_FLUX_FLOOR:
        return "output fell to the flux floor";
    case LW_END_CELL_VOLTAGE:
        return "loaded cell voltage reached the end point";
    case LW_END_CAPACITY:
        return "cells fully discharged before any cutoff";
    case LW_END_NEVER_LIT:
        return "the LEDs never light";
    case LW_END_EMPTY_AT_START:
        return "the cells are empty or at their end point at switch-on";
    case LW_END_DIM_AT_START:
        return "the output at switch-on is already at a cutoff";
    case LW_END_SWITCHED_OFF:
        return "the mode chain switched the light off";
    case LW_END_SCHEDULE_DONE:
        return "the last session of the use schedule ended before any cutoff";
    case LW_END_DRIVER_DROPOUT:
    default:
        return "the converter can no longer hold its output";
    }
}

const char *lw_report_warning(int bit)
{
    /* long texts are split across lines on purpose */
    // NOLINTBEGIN(bugprone-suspicious-missing-comma)
    static const char *const text[LW_WARN_COUNT_] = {
        "LED current at fresh cells is above the LED's max_current_ma",
        "worst case (resistor at -tolerance, low forward voltage, fresh cells) exceeds the "
        "LED's max_current_ma",
        "resistor power is above half its rating (common derating practice)",
        "the cutoff lets a lithium cell fall below the maker's end-point voltage: "
        "over-discharge risk",
        "the LEDs never light",
        "the run reached full depth of discharge without reaching its cutoff",
        "an LED table was read beyond its last measured point",
        "ambient temperature is outside the cell's temperature table (end values used)",
        "the integration tolerance was not met everywhere",
        "resistor power exceeds its rating",
        "an LED junction is above the LED's max_junction_c",
        "the body is hotter than [thermal] max_touch_c: a burn risk where it is held",
        "resistor power exceeds its rating derated to the body temperature (full to 70 C, "
        "zero at 155 C: common practice; the part's data decide)",
        "the weakest cell is driven below 0 V while the light runs (cell reversal): it can "
        "vent or leak; never mix cells of different age, make or charge in series, and never "
        "series-mix or over-discharge lithium cells",
        "a linear regulator's power is above its regulator_rating_w (derated to the body "
        "temperature like a resistor with [thermal]: common practice; the part's data "
        "decide)"};
    // NOLINTEND(bugprone-suspicious-missing-comma)
    return text[bit];
}

/* "fresh cells", or "after 24 months' storage (12.3 % discharged)". */
static void start_condition(const lw_light *l, const lw_result *r, char *buf, size_t size)
{
    if (l->pack.stored_months > 0)
        snprintf(buf, size, "after %g month%s' storage, %.1f %% discharged",
                 l->pack.stored_months, l->pack.stored_months == 1 ? "" : "s",
                 100.0 * r->start_depth);
    else if (r->start_depth > 0)
        snprintf(buf, size, "from %.1f %% depth of discharge", 100.0 * r->start_depth);
    else
        snprintf(buf, size, "fresh cells");
}

static void lw_report_reference_in_c_locale(const lw_light *l, char *buf, size_t size)
{
    if (l->cutoff.reference == LW_REF_FRESH)
        snprintf(buf, size, "the 30-s output of fresh cells at %g C", LW_FRESH_REFERENCE_C);
    else
        snprintf(buf, size, "the 30-s output");
}

static void lw_report_drive_in_c_locale(const lw_light *l, char *buf, size_t size)
{
    const lw_drive *d = &l->drive;
    int n = snprintf(buf, size, "%s", lw_drive_type_names[d->type]);
    if (n > 0 && (size_t)n < size && (d->type == LW_DRIVE_RESISTOR || d->resistor_ohm > 0))
        n += snprintf(buf + n, size - (size_t)n, ", %g ohm per string", d->resistor_ohm);
    if (n > 0 && (size_t)n < size && d->type != LW_DRIVE_RESISTOR)
        n += snprintf(buf + n, size - (size_t)n, ", set %g mA", d->set_a * 1e3);
    if (n > 0 && (size_t)n < size && d->type == LW_DRIVE_CONVERTER) {
        if (d->efficiency)
            n += snprintf(buf + n, size - (size_t)n, ", efficiency table");
        else
            n += snprintf(buf + n, size - (size_t)n, " at %g %%", d->efficiency_pct);
        if (d->fallback_a > 0 && n > 0 && (size_t)n < size)
            n += snprintf(buf + n, size - (size_t)n, ", fallback %g mA", d->fallback_a * 1e3);
    }
    if (n > 0 && (size_t)n < size && d->duty_pct < 100.0)
        snprintf(buf + n, size - (size_t)n, ", PWM %g %%", d->duty_pct);
}

static void text_header(FILE *fp, const lw_profile *p)
{
    const lw_light *l = &p->light;
    fprintf(fp, "%s%s%s\n", l->name, p->mode[0] ? ", mode " : "", p->mode);
    fprintf(fp, "  pack    %d x %s (%d in series, %d in parallel) at %g C\n",
            l->pack.series * l->pack.parallel, l->pack.cell.name, l->pack.series,
            l->pack.parallel, l->pack.ambient_c);
    char spread[160];
    if (lw_report_spread(l, spread, sizeof spread))
        fprintf(fp, "          %s\n", spread);
    fprintf(fp, "  LEDs    %d string%s of %d, %s model\n", l->led.strings,
            l->led.strings == 1 ? "" : "s", l->led.count, lw_led_model_names[l->led.model]);
    char drive[160];
    lw_report_drive(l, drive, sizeof drive);
    fprintf(fp, "  drive   %s\n", drive);
}

bool lw_report_spread(const lw_light *l, char *buf, size_t size)
{
    buf[0] = '\0';
    if (!lw_light_has_spread(l))
        return false;
    snprintf(buf, size, "the weakest cell in series: %g %% less charge, %g %% more resistance",
             100.0 * l->pack.capacity_spread, 100.0 * l->pack.resistance_spread);
    return true;
}

/* Why a light gave no light, with the figures that show it. */
static void text_dark(FILE *fp, const lw_light *l, const lw_result *r)
{
    const lw_point *i0 = &r->initial;
    fprintf(fp, "  %s: %s\n", lw_run_end_names[r->end_reason], end_text(r->end_reason));
    switch (r->end_reason) {
    case LW_END_NEVER_LIT:
        fprintf(fp, "  output at switch-on %.3g lm, below the visibility floor of %g lm\n",
                i0->flux_lm, LW_VISIBLE_LM);
        if (i0->regime == LW_REGIME_DROPOUT)
            fputs("  the converter cannot start: the pack cannot supply it or is below its "
                  "min_input_v\n",
                  fp);
        break;
    case LW_END_EMPTY_AT_START:
        if (r->start_depth >= 1.0)
            fputs("  the cells hold no charge at switch-on\n", fp);
        else
            fprintf(fp, "  loaded cell voltage %.3f V at switch-on, at or below the end point "
                        "%.3g V\n",
                    i0->cell_v, l->cutoff.cell_v);
        break;
    case LW_END_DIM_AT_START:
    default:
        fprintf(fp, "  output at switch-on %.4g lm; the cutoff is %g %% of %.4g lm", i0->flux_lm,
                l->cutoff.relative_pct, r->flux_ref_lm);
        if (l->cutoff.flux_lm > 0)
            fprintf(fp, " or %g lm", l->cutoff.flux_lm);
        fputc('\n', fp);
        break;
    }
}

static void text_switch_on(FILE *fp, const lw_light *l, const lw_result *r)
{
    const lw_point *i0 = &r->initial;
    const double duty = l->drive.duty_pct / 100.0;
    fprintf(fp, "  pack voltage        %.3f V open circuit, %.3f V loaded\n",
            l->pack.series * i0->ocv_v, i0->pack_v);
    fprintf(fp, "  LED current         %.2f mA per string%s (pack %.2f mA)\n", i0->led_a * 1e3,
            duty < 1.0 ? " peak" : "", i0->pack_avg_a * 1e3);
    fprintf(fp, "  LED voltage         %.3f V per LED\n", i0->led_v);
    if (l->drive.resistor_ohm > 0)
        fprintf(fp, "  resistor            %.3f V, %.1f mW each%s\n",
                i0->led_a * l->drive.resistor_ohm, i0->p_res_peak_w * 1e3,
                duty < 1.0 ? " at peak" : "");
    if (i0->p_drv_w > 0)
        fprintf(fp, "  driver loss         %.1f mW\n", i0->p_drv_w * 1e3);
    fprintf(fp, "  LED power           %.1f mW\n", i0->p_led_w * 1e3);
    fprintf(fp, "  light output        %.4g lm (%.4g lm after 30 s)\n", i0->flux_lm,
            r->flux_30s_lm);
    if (i0->p_drawn_w > 0)
        fprintf(fp, "  efficiency          %.1f %% of the power drawn reaches the LEDs\n",
                100.0 * i0->p_led_w / i0->p_drawn_w);
    if (l->thermal.enabled)
        fprintf(fp, "  temperatures        junction %.1f C, board %.1f C, body %.1f C%s\n",
                i0->temps.junction_c, i0->temps.board_c, i0->temps.body_c,
                lw_thermal_quasi_static(&l->thermal) ? " (steady state)" : "");
}

static void text_run(FILE *fp, const lw_light *l, const lw_result *r)
{
    char buf[96];
    lw_report_hours(r->runtime_h, buf, sizeof buf);
    fprintf(fp, "  runtime to cutoff   %s  [%s: %s]\n", buf, lw_run_end_names[r->end_reason],
            r->end_reason == LW_END_CELL_VOLTAGE && lw_light_has_spread(l)
                ? "the weakest cell's loaded voltage reached the end point"
                : end_text(r->end_reason));
    lw_report_hours(r->time_to_half_h, buf, sizeof buf);
    fprintf(fp, "  time to 50 %%        %s\n", buf);
    if (isfinite(r->regulated_h)) {
        lw_report_hours(r->regulated_h, buf, sizeof buf);
        fprintf(fp, "  in regulation       %s\n", buf);
    }
    fprintf(fp, "  lumen-hours         %.4g lm h (%.3g lm per W drawn from the cells)\n",
            r->lumen_hours, r->energy_drawn_wh > 0 ? r->lumen_hours / r->energy_drawn_wh : 0.0);
    lw_report_reference(l, buf, sizeof buf);
    fprintf(fp, "  cutoff              %g %% of %s (%.4g lm)", l->cutoff.relative_pct, buf,
            r->flux_ref_lm);
    if (l->cutoff.flux_lm > 0)
        fprintf(fp, ", or %g lm", l->cutoff.flux_lm);
    fprintf(fp, ", or %.3g V per cell loaded\n", l->cutoff.cell_v);
    fprintf(fp, "  at the end          %.3f V per cell loaded, depth %.1f %%\n", r->final.cell_v,
            100.0 * r->end_depth);
    if (lw_light_has_spread(l)) {
        fprintf(fp, "  weakest cell        %.3f V loaded at the end, depth %.1f %%",
                r->final.weak_cell_v,
                100.0 * fmin(1.0, r->end_depth / (1.0 - l->pack.capacity_spread)));
        if (r->warnings & LW_WARN_CELL_REVERSAL)
            fprintf(fp, "; driven below 0 V (reversed, lowest %.3f V)", r->min_weak_cell_v);
        fputc('\n', fp);
    }
    if (l->thermal.enabled && isfinite(r->peak_junction_c)) {
        fprintf(fp, "  hottest             junction %.1f C (%.1f C at 30 s), body %.1f C",
                r->peak_junction_c, r->junction_30s_c, r->peak_body_c);
        if (isfinite(r->peak_body_h)) {
            lw_report_hours(r->peak_body_h, buf, sizeof buf);
            fprintf(fp, " at %s", buf);
        }
        fputc('\n', fp);
    }
}

/* The switches of a step-down chain, one line each. */
static void text_switches(FILE *fp, const lw_light *l, const lw_result *r)
{
    if (!l->chain)
        return;
    fputs("\nMode switches\n", fp);
    if (r->n_switches == 0)
        fputs("  none: the run ended in its first mode\n", fp);
    for (size_t i = 0; i < r->n_switches; i++) {
        const lw_switch *sw = &r->switches[i];
        const lw_chain_mode *m = &l->chain->modes[sw->from];
        char when[96], why[96];
        lw_report_hours(sw->t_h, when, sizeof when);
        switch (sw->cause) {
        case LW_SWITCH_TIMER:
            snprintf(why, sizeof why, "after %g s", m->after_s);
            break;
        case LW_SWITCH_CELL_V:
            snprintf(why, sizeof why, "cell down to %g V", m->below_cell_v);
            break;
        case LW_SWITCH_HOT:
        default:
            snprintf(why, sizeof why, "body up to %g C", m->above_c);
            break;
        }
        const char *to = sw->to >= 0 && (size_t)sw->to < l->chain->n
                             ? l->chain->modes[sw->to].name
                             : "off";
        fprintf(fp, "  %-12s %s -> %s (%s), %.4g lm -> %.4g lm\n", when, m->name, to, why,
                sw->flux_before_lm, sw->flux_after_lm);
    }
    if (r->switches_total > r->n_switches)
        fprintf(fp, "  ... and %zu more (the chain starts over at every session)\n",
                r->switches_total - r->n_switches);
}

void lw_report_schedule(const lw_light *l, char *buf, size_t size)
{
    const lw_schedule *u = l->use;
    if (!u)
        snprintf(buf, size, "on from switch-on to the end");
    else if (u->n > 0)
        snprintf(buf, size, "%zu planned session%s", u->n, u->n == 1 ? "" : "s");
    else
        snprintf(buf, size, "%g h on, %g h off", u->on_h, u->off_h);
}

/* The sessions of a run with a use schedule: how many, the use and the
 * calendar time, and the output at each switch-on (the first 24 and the
 * last 6 of a long run). */
static void text_use(FILE *fp, const lw_light *l, const lw_result *r)
{
    if (!l->use || r->n_sessions == 0)
        return;
    char buf[96], cal[96];
    lw_report_schedule(l, buf, sizeof buf);
    fprintf(fp, "\nUse (%s)\n", buf);
    lw_report_hours(r->runtime_h, buf, sizeof buf);
    lw_report_hours(r->calendar_h, cal, sizeof cal);
    fprintf(fp, "  sessions            %zu, the run ending in the last\n", r->n_sessions);
    fprintf(fp, "  time of use         %s\n", buf);
    fprintf(fp, "  calendar time       %s\n", cal);
    fputs("  output at each switch-on\n", fp);
    fputs("    session      day     lm  cell V  hours of use\n", fp);
    for (size_t i = 0; i < r->n_sessions; i++) {
        if (r->n_sessions > 30 && i == 24)
            fprintf(fp, "    ... %zu sessions ...\n", r->n_sessions - 30);
        if (r->n_sessions > 30 && i >= 24 && i < r->n_sessions - 6)
            continue;
        const lw_session *s = &r->sessions[i];
        fprintf(fp, "    %7zu %8.2f %6.3g %7.3f  %.4g\n", i + 1, s->start_h / 24.0,
                s->flux_start_lm, s->cell_v_start, s->on_h);
    }
}

/* Where the energy drawn from the cells went (the driver row only for a
 * light with a driver). */
typedef struct energy_item {
    const char *name;
    double wh;
} energy_item;

static size_t energy_items(const lw_light *l, const lw_result *r, energy_item e[4])
{
    const energy_item all[] = {{"into the LEDs", r->energy_led_wh},
                               {"series resistors", r->energy_resistor_wh},
                               {"cells' internal R", r->energy_internal_wh},
                               {"driver", r->energy_driver_wh}};
    size_t n = l->drive.type == LW_DRIVE_RESISTOR ? 3 : 4;
    memcpy(e, all, n * sizeof *e);
    return n;
}

static void text_energy(FILE *fp, const lw_light *l, const lw_result *r)
{
    double drawn = r->energy_drawn_wh;
    energy_item e[4];
    size_t n = energy_items(l, r, e);
    fprintf(fp, "  drawn from cells    %.4g Wh\n", drawn);
    for (size_t k = 0; k < n; k++)
        fprintf(fp, "  %-19s %.4g Wh  %.1f %%\n", e[k].name, e[k].wh,
                drawn > 0 ? 100.0 * e[k].wh / drawn : 0.0);
}

static void text_warnings(FILE *fp, const lw_light *l, const lw_result *r)
{
    unsigned w = r->warnings & ~(unsigned)LW_WARN_NEVER_LIT; /* said above */
    if (!w)
        return;
    fputs("\nWarnings\n", fp);
    for (int i = 0; i < LW_WARN_COUNT_; i++)
        if (w & (1u << i))
            fprintf(fp, "  ! %s\n", lw_report_warning(i));
    if (w & (LW_WARN_LED_OVER_MAX | LW_WARN_LED_OVER_MAX_WORST))
        fprintf(fp, "    nominal %.1f mA, worst case %.1f mA, max %.1f mA\n",
                r->initial.led_a * 1e3, r->worst_led_a * 1e3, l->led.max_current_a * 1e3);
    if (w & (LW_WARN_RESISTOR_HOT | LW_WARN_RESISTOR_OVER_RATING))
        fprintf(fp, "    peak %.3g W nominal, %.3g W worst case, rating %.3g W\n",
                r->peak_resistor_w, r->worst_resistor_w, l->drive.rating_w);
    if (w & LW_WARN_RESISTOR_DERATED)
        fprintf(fp, "    a %.3g W rating is needed at the body's temperature (rating %.3g W)\n",
                r->peak_resistor_derated_w, l->drive.rating_w);
    if (w & LW_WARN_REGULATOR_HOT)
        fprintf(fp, "    regulator peak %.3g W per string; a %.3g W rating is needed%s (rating "
                    "%.3g W)\n",
                r->peak_regulator_w, r->peak_regulator_derated_w,
                l->thermal.enabled ? " at the body's temperature" : "",
                l->drive.regulator_rating_w);
}

static void text_report(FILE *fp, const lw_profile *p, const lw_result *r, bool quiet)
{
    const lw_light *l = &p->light;
    char cond[96];
    start_condition(l, r, cond, sizeof cond);
    text_header(fp, p);
    if (lw_run_end_is_dark(r->end_reason)) {
        fprintf(fp, "\nNo light at switch-on (%s)\n", cond);
        text_dark(fp, l, r);
    } else {
        fprintf(fp, "\nAt switch-on (%s)\n", cond);
        text_switch_on(fp, l, r);
        fputs("\nRun\n", fp);
        text_run(fp, l, r);
        text_switches(fp, l, r);
        text_use(fp, l, r);
        fputs("\nEnergy\n", fp);
        text_energy(fp, l, r);
    }
    fprintf(fp, "\n  (%d operating-point solves)\n", r->solves);
    text_warnings(fp, l, r);
    if (!quiet)
        fprintf(fp, "\n%s\n", lw_report_caution);
}

static lw_status lw_report_run_in_c_locale(FILE *fp, lw_rtable_format fmt, bool quiet,
                                           const lw_profile *prof, const lw_result *res,
                                           lw_error *err)
{
    if (fmt == LW_FMT_TEXT) {
        text_report(fp, prof, res, quiet);
        return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
    }
    lw_rtable *t = lw_rtable_new(lw_report_run_ncolumns, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = LW_OK;
    size_t row;
    for (size_t c = 0; c < lw_report_run_ncolumns && st == LW_OK; c++)
        st = lw_rtable_head(t, c, lw_report_run_columns[c], err);
    if (st == LW_OK)
        st = lw_rtable_add_row(t, &row, err);
    if (st == LW_OK)
        st = lw_report_run_row(t, row, 0, &prof->light, res, err);
    t->quiet = quiet;
    return lw_report_table_write(t, st, fp, fmt, err);
}

/* ---- the trace ---- */

static lw_status lw_report_trace_csv_in_c_locale(FILE *fp, const lw_trace *tr, lw_error *err)
{
    static const char *const head[] = {"time_h",  "depth_pct", "pack_v",     "cell_v",
                                       "weakest_cell_v", "ocv_cell_v", "led_ma", "led_v",
                                       "resistor_w",
                                       "led_w",   "driver_w",  "flux_lm",    "flux_pct",
                                       "t_j_c",   "t_board_c", "t_body_c",   "session",
                                       "mode"};
    lw_csvw w;
    lw_csvw_init(&w, fp);
    for (size_t k = 0; k < sizeof head / sizeof head[0]; k++)
        lw_csvw_text(&w, head[k]);
    lw_csvw_end_row(&w);
    for (size_t i = 0; i < tr->n; i++) {
        const lw_point *p = &tr->rows[i].pt;
        const double v[] = {tr->rows[i].t_h, 100.0 * p->depth, p->pack_v,   p->cell_v,
                            p->weak_cell_v,  p->ocv_v,         p->led_a * 1e3, p->led_v,
                            p->p_res_w,
                            p->p_led_w,      p->p_drv_w,       p->flux_lm,  tr->rows[i].pct_of_ref,
                            p->temps.junction_c, p->temps.board_c, p->temps.body_c,
                            tr->rows[i].session + 1.0};
        for (size_t k = 0; k < sizeof v / sizeof v[0]; k++)
            lw_csvw_num(&w, v[k]);
        int m = tr->rows[i].mode;
        lw_csvw_text(&w, m >= 0 && m < LW_CHAIN_MAX ? tr->modes[m] : "");
        lw_csvw_end_row(&w);
    }
    if (w.failed || ferror(fp))
        return lw_error_set(err, LW_EIO, NULL, 0, "write error");
    return LW_OK;
}

lw_status lw_report_run_row(lw_rtable *t, size_t row, size_t c, const lw_light *light,
                            const lw_result *r, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_report_run_row_in_c_locale(t, row, c, light, r, err);
    lw_number_locale_end(saved);
    return result;
}

void lw_report_hours(double h, char *buf, size_t size)
{
    locale_t saved = lw_number_locale_begin();
    lw_report_hours_in_c_locale(h, buf, size);
    lw_number_locale_end(saved);
}

void lw_report_reference(const lw_light *l, char *buf, size_t size)
{
    locale_t saved = lw_number_locale_begin();
    lw_report_reference_in_c_locale(l, buf, size);
    lw_number_locale_end(saved);
}

void lw_report_drive(const lw_light *l, char *buf, size_t size)
{
    locale_t saved = lw_number_locale_begin();
    lw_report_drive_in_c_locale(l, buf, size);
    lw_number_locale_end(saved);
}

lw_status lw_report_run(FILE *fp, lw_rtable_format fmt, bool quiet, const lw_profile *prof,
                        const lw_result *res, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_report_run_in_c_locale(fp, fmt, quiet, prof, res, err);
    lw_number_locale_end(saved);
    return result;
}

lw_status lw_report_trace_csv(FILE *fp, const lw_trace *tr, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_report_trace_csv_in_c_locale(fp, tr, err);
    lw_number_locale_end(saved);
    return result;
}

/* ---- corners ---- */

static lw_status corners_in_c_locale(const lw_corner c[LW_CORNER_COUNT], const char *title,
                                     lw_rtable_format fmt, lw_rtable **out, lw_error *err)
{
    static const char *const head[] = {"corner",     "ambient_c", "led_ma",     "flux_lm",
                                       "resistor_w", "runtime_h", "flux_30s_lm"};
    static const char *const text_head[] = {"corner",     "ambient C", "LED mA",  "lm",
                                            "resistor W", "runtime h", "lm at 30 s"};
    enum { NC = sizeof head / sizeof head[0] };
    *out = NULL;
    lw_rtable *t = lw_rtable_new(NC, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = title ? lw_rtable_set_title(t, title, err) : LW_OK;
    for (size_t k = 0; k < NC && st == LW_OK; k++)
        st = lw_rtable_head(t, k, lw_rtable_for_people(fmt) ? text_head[k] : head[k], err);
    for (int k = 0; k < LW_CORNER_COUNT && st == LW_OK; k++) {
        size_t r;
        st = lw_rtable_add_row(t, &r, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, r, 0, lw_corner_names[k], err);
        const double v[] = {c[k].ambient_c, 1e3 * c[k].pt.led_a, c[k].pt.flux_lm,
                            c[k].pt.p_res_peak_w, c[k].runtime_h, c[k].flux_30s_lm};
        for (size_t q = 0; q < NC - 1 && st == LW_OK; q++)
            st = isnan(v[q]) ? lw_rtable_set(t, r, 1 + q, "", err)
                             : lw_rtable_num(t, r, 1 + q, v[q], 4, err);
    }
    if (st == LW_OK && fmt != LW_FMT_CSV) {
        char note[240];
        snprintf(note, sizeof note,
                 "worst hot: fresh cells, resistor at minus its tolerance, LED forward voltage "
                 "at minus its spread%s; cold: nominal parts%s",
                 c[LW_CORNER_HOT].from_range ? ", the range's hottest ambient" : "",
                 c[LW_CORNER_COLD].from_range   ? ", the range's coldest ambient"
                 : c[LW_CORNER_COLD].from_table ? ", the cell table's lowest temperature"
                                                : " (no cell temperature table: the profile's "
                                                  "ambient)");
        st = lw_rtable_note(t, note, err);
    }
    if (st != LW_OK) {
        lw_rtable_free(t);
        return st;
    }
    *out = t;
    return LW_OK;
}

lw_status lw_report_corners(const lw_corner c[LW_CORNER_COUNT], const char *title,
                            lw_rtable_format fmt, lw_rtable **out, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status st = corners_in_c_locale(c, title, fmt, out, err);
    lw_number_locale_end(saved);
    return st;
}

lw_status lw_report_run_with_corners(FILE *fp, lw_rtable_format fmt, bool quiet,
                                     const lw_profile *prof, const lw_result *res, lw_error *err)
{
    lw_status st = lw_report_run(fp, fmt, quiet, prof, res, err);
    if (st != LW_OK || fmt == LW_FMT_CSV || lw_run_end_is_dark(res->end_reason))
        return st;
    lw_corner corners[LW_CORNER_COUNT];
    lw_rtable *t = NULL;
    st = lw_corner_compute(&prof->light, res, corners, err);
    if (st == LW_OK)
        st = lw_report_corners(corners, "Corners (fresh cells unless said)", fmt, &t, err);
    if (st == LW_OK)
        t->quiet = quiet;
    if (st == LW_OK && fmt != LW_FMT_JSON)
        fputc('\n', fp);
    if (st == LW_OK)
        st = lw_rtable_write(t, fp, fmt, err);
    lw_rtable_free(t);
    return st;
}

static lw_status energy_in_c_locale(const lw_light *l, const lw_result *r, lw_rtable_format fmt,
                                    lw_rtable **out, lw_error *err)
{
    static const char *const head[] = {"where", "energy_wh", "share_pct"};
    static const char *const text_head[] = {"where", "Wh", "%"};
    *out = NULL;
    lw_rtable *t = lw_rtable_new(3, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = LW_OK;
    for (size_t k = 0; k < 3 && st == LW_OK; k++)
        st = lw_rtable_head(t, k, lw_rtable_for_people(fmt) ? text_head[k] : head[k], err);
    energy_item e[5] = {{"drawn from the cells", r->energy_drawn_wh}};
    size_t n = 1 + energy_items(l, r, e + 1);
    for (size_t k = 0; k < n && st == LW_OK; k++) {
        size_t row;
        st = lw_rtable_add_row(t, &row, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 0, e[k].name, err);
        if (st == LW_OK)
            st = lw_rtable_num(t, row, 1, e[k].wh, 4, err);
        if (st == LW_OK)
            st = lw_rtable_num(t, row, 2,
                               r->energy_drawn_wh > 0 ? 100.0 * e[k].wh / r->energy_drawn_wh
                                                      : NAN,
                               3, err);
    }
    if (st == LW_OK && fmt != LW_FMT_CSV)
        st = lw_rtable_set_title(t, "Energy over the run", err);
    if (st != LW_OK) {
        lw_rtable_free(t);
        return st;
    }
    *out = t;
    return LW_OK;
}

lw_status lw_report_energy(const lw_light *l, const lw_result *r, lw_rtable_format fmt,
                           lw_rtable **out, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status st = energy_in_c_locale(l, r, fmt, out, err);
    lw_number_locale_end(saved);
    return st;
}
