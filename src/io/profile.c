/*
 * profile.c - light profiles (see profile.h).
 *
 * Invariant: prof->light holds what the values say only after
 * lw_profile_resolve; a failed resolve leaves the previous tables in place
 * but returns the error, and callers stop there.
 */
#include "lampwick/profile.h"
#include "profchain.h"
#include "profschedule.h"
#include "lampwick/number.h"
#include "lampwick/path.h"
#include "lampwick/cache.h"
#include "lampwick/text.h"

#include <math.h>
#include <stdatomic.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/csvio.h"
#include "lampwick/alloc.h"

#define PK(sec, name_, type_, field_, scale_, min_, max_, flags_, def_, help_)                \
    {sec, name_, type_, offsetof(lw_profile, field_), 0, scale_, min_, max_, flags_, NULL,    \
     def_, help_}
#define PT(sec, name_, field_, flags_, help_)                                                  \
    {sec, name_, LW_K_TEXT, offsetof(lw_profile, field_), sizeof(((lw_profile *)0)->field_), 1, \
     NAN, NAN, flags_, NULL, "", help_}
#define OPEN LW_KF_MIN_OPEN
#define INF INFINITY

static const char *const pack_rate_names[] = {"cell", "peukert", "kinetic", NULL};

const lw_keydef lw_profile_keys[] = {
    PT("light", "name", light.name, 0, "name of the light, free text"),
    PT("pack", "cell", cell_ref, LW_KF_REQUIRED, "cell name from the cell library, or a path"),
    PK("pack", "series", LW_K_INT, light.pack.series, 1, 1, 1000, 0, "1", "cells in series"),
    PK("pack", "parallel", LW_K_INT, light.pack.parallel, 1, 1, 1000, 0, "1",
       "cells in parallel"),
    PK("pack", "ambient_c", LW_K_NUM, light.pack.ambient_c, 1, -60, 100, 0, "20",
       "ambient temperature, deg C; or a range LOW..HIGH: the corners' coldest and hottest "
       "ambient, the runs at 20 C held inside it"),
    PK("pack", "stored_months", LW_K_NUM, light.pack.stored_months, 1, 0, 600, 0, "0",
       "months on the shelf before switch-on (self-discharge and standby drain)"),
    {"pack", "rate_model", LW_K_CHOICE, offsetof(lw_profile, rate_model), 0, 1, NAN, NAN, 0,
     pack_rate_names, "cell",
     "rate model of the cells: cell (the cell file's), peukert, or kinetic (the cell file "
     "must give available_pct and recovery_per_h)"},
    PK("pack", "capacity_spread_pct", LW_K_NUM, light.pack.capacity_spread, 1e-2, 0, 100,
       LW_KF_MAX_OPEN, "0",
       "the weakest of the cells in series holds this % less charge than the others "
       "(mixed, aged or unmatched cells), %"),
    PK("pack", "resistance_spread_pct", LW_K_NUM, light.pack.resistance_spread, 1e-2, 0, 1000,
       0, "0", "the weakest cell's internal resistance is this % above the others', %"),
    PK("pack", "capacity_pct", LW_K_NUM, light.pack.capacity_scale, 1e-2, 0, 1000, OPEN, "100",
       "every cell's capacity as % of the cell file's (a unit's cells off their rating: "
       "the key to spread for cell-to-cell capacity), %"),
    PK("pack", "resistance_pct", LW_K_NUM, light.pack.resistance_scale, 1e-2, 0, 10000, OPEN,
       "100", "every cell's internal resistance as % of the cell file's, %"),
    {"led", "model", LW_K_CHOICE, offsetof(lw_profile, light.led.model), 0, 1, NAN, NAN,
     LW_KF_REQUIRED, lw_led_model_names, "", "I-V model: constant, linear, shockley or table"},
    PK("led", "count", LW_K_INT, light.led.count, 1, 1, 1000, 0, "1", "LEDs in series per string"),
    PK("led", "strings", LW_K_INT, light.led.strings, 1, 1, 1000, 0, "1",
       "parallel strings, each with its own drive element"),
    PK("led", "forward_v", LW_K_NUM, light.led.forward_v, 1, 0, 100, OPEN, "",
       "constant model: forward voltage, V"),
    PK("led", "threshold_v", LW_K_NUM, light.led.threshold_v, 1, 0, 100, 0, "",
       "linear model: voltage at zero current, V"),
    PK("led", "slope_ohm", LW_K_NUM, light.led.slope_ohm, 1, 0, 1e6, 0, "",
       "linear model: dynamic resistance, ohm"),
    PK("led", "ideality", LW_K_NUM, light.led.ideality, 1, 0, 50, OPEN, "",
       "shockley model: ideality factor n"),
    PK("led", "saturation_a", LW_K_NUM, light.led.saturation_a, 1, 0, 1, OPEN, "",
       "shockley model: saturation current, A"),
    PK("led", "series_ohm", LW_K_NUM, light.led.series_ohm, 1, 0, 1e6, 0, "0",
       "shockley model: series resistance, ohm"),
    PK("led", "junction_c", LW_K_NUM, light.led.junction_c, 1, -60, 250, 0, "25",
       "junction temperature at which the LED data (n, saturation_a, series_ohm, or the "
       "tables) were taken, deg C; the Shockley thermal voltage goes with it; not a heating "
       "setting"),
    PK("led", "tc_forward_mv_k", LW_K_NUM, light.led.tc_forward_v_k, 1e-3, -50, 50, 0, "-2",
       "forward-voltage temperature coefficient per LED, mV/K (typical white LEDs -1.5 to -4)"),
    PK("led", "tc_flux_pct_k", LW_K_NUM, light.led.tc_flux_per_k, 1e-2, -10, 10, 0, "-0.3",
       "light-output temperature coefficient, % per K of the output at junction_c (white "
       "about -0.3, red and amber far steeper)"),
    PK("led", "heat_pct", LW_K_NUM, light.led.heat_fraction, 1e-2, 0, 100, 0, "65",
       "share of the LED's electrical power that becomes heat, %"),
    PK("led", "max_junction_c", LW_K_NUM, light.led.max_junction_c, 1, -60, 300, 0, "",
       "maximum junction temperature, deg C (a warning above it)"),
    PT("led", "iv_file", iv_file, 0, "table model: CSV current_ma,forward_v"),
    PK("led", "flux_lm", LW_K_NUM, light.led.flux_lm, 1, 0, 1e7, OPEN, "",
       "light output of one LED at flux_current_ma, lm"),
    PK("led", "flux_current_ma", LW_K_NUM, light.led.flux_current_a, 1e-3, 0, 1e7, OPEN, "",
       "current of the flux_lm rating, mA"),
    PK("led", "flux_exponent", LW_K_NUM, light.led.flux_exponent, 1, 0, 3, OPEN, "1",
       "exponent of flux against current"),
    PT("led", "flux_file", flux_file, 0, "CSV current_ma,flux_lm (instead of flux_lm)"),
    PK("led", "max_current_ma", LW_K_NUM, light.led.max_current_a, 1e-3, 0, 1e7, OPEN, "20",
       "absolute maximum continuous current, mA"),
    PK("led", "forward_spread_pct", LW_K_NUM, light.led.forward_spread_pct, 1, 0, 50,
       LW_KF_MAX_OPEN, "5", "part-to-part spread of forward voltage, +- %"),
    {"drive", "type", LW_K_CHOICE, offsetof(lw_profile, light.drive.type), 0, 1, NAN, NAN, 0,
     lw_drive_type_names, "resistor", "resistor, linear-cc or converter"},
    PK("drive", "resistor_ohm", LW_K_NUM, light.drive.resistor_ohm, 1, 0, 1e9, 0, "",
       "series resistor per string, ohm (0 allowed)"),
    PK("drive", "tolerance_pct", LW_K_NUM, light.drive.tolerance_pct, 1, 0, 50, LW_KF_MAX_OPEN,
       "5", "resistor tolerance, +- %"),
    PK("drive", "rating_w", LW_K_NUM, light.drive.rating_w, 1, 0, 1e4, OPEN, "",
       "resistor power rating, W"),
    PK("drive", "set_ma", LW_K_NUM, light.drive.set_a, 1e-3, 0, 1e7, OPEN, "",
       "regulated current per string, mA"),
    PK("drive", "regulator_rating_w", LW_K_NUM, light.drive.regulator_rating_w, 1, 0, 1e4, OPEN,
       "", "linear-cc: power rating of one string's regulator, W (a warning above it, derated "
       "to the body's temperature with [thermal])"),
    PK("drive", "dropout_v", LW_K_NUM, light.drive.dropout_v, 1, 0, 100, 0, "",
       "linear-cc: minimum headroom, V"),
    PK("drive", "efficiency_pct", LW_K_NUM, light.drive.efficiency_pct, 1, 0, 100, OPEN, "",
       "converter: efficiency, %"),
    PT("drive", "efficiency_file", efficiency_file, 0, "converter: CSV input_v,efficiency_pct"),
    PK("drive", "quiescent_ua", LW_K_NUM, light.drive.quiescent_a, 1e-6, 0, 1e7, 0, "0",
       "converter: quiescent input current, uA"),
    PK("drive", "min_input_v", LW_K_NUM, light.drive.min_input_v, 1, 0, 1000, 0, "0",
       "converter: undervoltage lockout, V"),
    PK("drive", "fallback_ma", LW_K_NUM, light.drive.fallback_a, 1e-3, 0, 1e7, 0, "0",
       "converter: current after dropout, mA (0: off)"),
    PK("drive", "duty_pct", LW_K_NUM, light.drive.duty_pct, 1, 0, 100, OPEN, "100",
       "PWM duty cycle, %"),
    PK("drive", "standby_ua", LW_K_NUM, light.drive.standby_a, 1e-6, 0, 1e7, 0, "0",
       "drain while switched off, uA"),
    PK("cutoff", "relative_pct", LW_K_NUM, light.cutoff.relative_pct, 1, 0, 100,
       OPEN | LW_KF_MAX_OPEN, "10", "end at this % of the output 30 s after switch-on"),
    {"cutoff", "reference", LW_K_CHOICE, offsetof(lw_profile, light.cutoff.reference), 0, 1, NAN,
     NAN, 0, lw_light_reference_names, "own",
     "what relative_pct refers to: own (this run's 30-s output) or fresh (the 30-s output of "
     "fresh cells at 20 C, so storage and cold show in the runtime)"},
    PK("cutoff", "flux_lm", LW_K_NUM, light.cutoff.flux_lm, 1, 0, 1e7, 0, "0",
       "end at this light output, lm (0: no floor)"),
    PK("cutoff", "cell_v", LW_K_NUM, cutoff_cell_v, 1, 0, 100, OPEN, "",
       "end at this loaded cell voltage, V; default the cell's cutoff_v"),
    PK("thermal", "junction_board_k_w", LW_K_NUM, light.thermal.r_jb_k_w, 1, 0, 1e4, OPEN, "",
       "thermal resistance from each LED's junction to the board, K/W (required in [thermal])"),
    PK("thermal", "board_body_k_w", LW_K_NUM, light.thermal.r_bb_k_w, 1, 0, 1e4, 0, "0",
       "board to body, K/W (0: board and body are one node)"),
    PK("thermal", "body_ambient_k_w", LW_K_NUM, light.thermal.r_ha_k_w, 1, 0, 1e4, OPEN, "",
       "body to ambient air, K/W (required in [thermal])"),
    PK("thermal", "board_j_k", LW_K_NUM, light.thermal.c_b_j_k, 1, 0, 1e7, 0, "0",
       "heat capacity of the LED board, J/K (0: quasi-static)"),
    PK("thermal", "body_j_k", LW_K_NUM, light.thermal.c_h_j_k, 1, 0, 1e7, 0, "0",
       "heat capacity of the body, J/K (0: quasi-static)"),
    {"thermal", "losses_in_body", LW_K_BOOL, offsetof(lw_profile, light.thermal.losses_in_body),
     0, 1, NAN, NAN, 0, NULL, "yes",
     "whether the resistors', driver's and cells' losses heat the body (yes or no)"},
    PK("thermal", "max_touch_c", LW_K_NUM, light.thermal.max_touch_c, 1, -60, 300, 0, "48",
       "body temperature above which a warning is given, deg C (48: the lower end of touch "
       "limits for held metal, common practice; the applicable safety standard decides)"),
    PK("thermal", "foldback_from_c", LW_K_NUM, light.thermal.foldback_from_c, 1, -60, 300, 0, "",
       "body temperature at which the driver starts to reduce its output, deg C"),
    PK("thermal", "foldback_to_c", LW_K_NUM, light.thermal.foldback_to_c, 1, -60, 300, 0, "",
       "body temperature at which the reduction reaches its floor, deg C"),
    PK("thermal", "foldback_min_pct", LW_K_NUM, light.thermal.foldback_min, 1e-2, 0, 100,
       OPEN, "", "the floor of the foldback, % of the set current (or of the duty)"),
    PK("optics", "beam_angle_deg", LW_K_NUM, beam_angle_deg, 1, 0, 180, OPEN | LW_KF_MAX_OPEN,
       "", "full beam angle of a uniform cone, degrees"),
    PK("optics", "peak_cd_per_lm", LW_K_NUM, peak_cd_per_lm, 1, 0, 1e6, OPEN, "",
       "peak beam intensity per lumen of output, cd/lm"),
    PK("use", "on_h", LW_K_NUM, use_on_h, 1, 0, 1e6, OPEN, "",
       "hours of use per session (a session of on_h every on_h + off_h)"),
    PK("use", "off_h", LW_K_NUM, use_off_h, 1, 0, 1e6, 0, "",
       "hours off between sessions (default 0: back to back)"),
    PT("use", "sessions_file", use_file, 0,
       "CSV start_h,duration_h[,mode]: planned or measured sessions (instead of on_h)"),
};
const size_t lw_profile_nkeys = sizeof lw_profile_keys / sizeof lw_profile_keys[0];

_Static_assert(sizeof lw_profile_keys / sizeof lw_profile_keys[0] <= LW_PROFILE_KEYS_MAX,
               "raise LW_PROFILE_KEYS_MAX");

static size_t key_index(const lw_keydef *d) { return (size_t)(d - lw_profile_keys); }

static bool given(const lw_profile *p, const char *section, const char *name)
{
    const lw_keydef *d = lw_key_find(lw_profile_keys, lw_profile_nkeys, section, name);
    return d && p->key_origin[key_index(d)] != LW_FROM_DEFAULT;
}

/* Where to point a message about a key's value: the option that set it, or
 * the file and its line. */
static void where_of(const lw_profile *p, const char *section, const char *name,
                     const char **file, int *line);

/* Where to point a message about a key: its own line, else its section's
 * (name NULL: the section's). */
static int line_of(const lw_profile *p, const char *section, const char *name)
{
    const lw_keydef *d = name ? lw_key_find(lw_profile_keys, lw_profile_nkeys, section, name)
                              : NULL;
    if (d && p->key_line[key_index(d)] > 0)
        return p->key_line[key_index(d)];
    int l = lw_ini_section_line(p->ini, section);
    return l > 0 ? l : 1;
}

static void where_of(const lw_profile *p, const char *section, const char *name,
                     const char **file, int *line)
{
    const lw_keydef *d = lw_key_find(lw_profile_keys, lw_profile_nkeys, section, name);
    if (d && p->key_origin[key_index(d)] == LW_FROM_OPTION && p->key_option[key_index(d)][0]) {
        *file = p->key_option[key_index(d)];
        *line = 0;
        return;
    }
    *file = p->path;
    *line = line_of(p, section, name);
}

static bool split_dotted(const char *dotted, char *section, size_t ss, char *key, size_t ks)
{
    const char *dot = strchr(dotted, '.');
    if (!dot || dot == dotted || !dot[1] || (size_t)(dot - dotted) >= ss)
        return false;
    memcpy(section, dotted, (size_t)(dot - dotted));
    section[dot - dotted] = '\0';
    return lw_text_copy(key, dot + 1, ks);
}

/* Find the definition of "section.key", or say why there is none. */
static lw_status find_key(const char *dotted_key, const char *file, int line,
                          const lw_keydef **def, lw_error *err)
{
    char section[LW_INI_NAME_MAX], key[LW_INI_NAME_MAX];
    if (!split_dotted(dotted_key, section, sizeof section, key, sizeof key))
        return lw_error_set(err, LW_EINPUT, file, line,
                            "'%s': expected section.key (for example drive.resistor_ohm)",
                            dotted_key);
    *def = lw_key_find(lw_profile_keys, lw_profile_nkeys, section, key);
    if (!*def)
        return lw_key_unknown(lw_profile_keys, lw_profile_nkeys, section, key, file, line, err);
    return LW_OK;
}

/* Record where a key's value came from. */
static void note_origin(lw_profile *prof, const lw_keydef *d, lw_origin origin, const char *file,
                        int line)
{
    prof->key_origin[key_index(d)] = (unsigned char)origin;
    prof->key_line[key_index(d)] = origin == LW_FROM_OPTION ? 0 : line;
    if (origin == LW_FROM_OPTION)
        lw_text_copy(prof->key_option[key_index(d)], file ? file : "", 48);
}

/* Apply a value as text.  pack.ambient_c also takes a range LOW..HIGH, for
 * the corners (corner.h): each end checked as the key's value, the runs at
 * 20 C held inside the range (common practice for a rating condition, no
 * source). */
static lw_status apply_text(lw_profile *p, const lw_keydef *d, const char *value,
                            const char *file, int line, lw_error *err)
{
    const bool ambient = d->offset == offsetof(lw_profile, light.pack.ambient_c);
    const char *dots = ambient ? strstr(value, "..") : NULL;
    if (!dots) {
        if (ambient)
            p->light.pack.ambient_range = false;
        return lw_key_apply(d, p, value, file, line, err);
    }
    char lo[LW_INI_LINE_MAX];
    size_t n = (size_t)(dots - value);
    if (n >= sizeof lo)
        n = sizeof lo - 1;
    memcpy(lo, value, n);
    lo[n] = '\0';
    lw_status st = lw_key_apply(d, p, lo, file, line, err);
    double a = p->light.pack.ambient_c;
    if (st == LW_OK)
        st = lw_key_apply(d, p, dots + 2, file, line, err);
    double b = p->light.pack.ambient_c;
    if (st == LW_OK && !(a <= b))
        st = lw_error_set(err, LW_EINPUT, file, line,
                          "[pack] ambient_c = %s: a range is written LOW..HIGH", value);
    if (st != LW_OK)
        return st;
    p->light.pack.ambient_range = true;
    p->light.pack.ambient_lo_c = a;
    p->light.pack.ambient_hi_c = b;
    p->light.pack.ambient_c = fmin(fmax(LW_FRESH_REFERENCE_C, a), b);
    return LW_OK;
}

lw_status lw_profile_set(lw_profile *prof, const char *dotted_key, const char *value,
                         lw_origin origin, const char *file, int line, lw_error *err)
{
    const lw_keydef *d = NULL;
    lw_status st = find_key(dotted_key, file, line, &d, err);
    if (st == LW_OK && d)
        st = apply_text(prof, d, value, file, line, err);
    if (st == LW_OK)
        note_origin(prof, d, origin, file, line);
    return st;
}

lw_status lw_profile_set_number(lw_profile *prof, const char *dotted_key, double value,
                                const char *option, lw_error *err)
{
    const lw_keydef *d = NULL;
    lw_status st = find_key(dotted_key, option, 0, &d, err);
    if (st == LW_OK)
        st = lw_key_apply_number(d, prof, value, option, 0, err);
    if (st == LW_OK)
        note_origin(prof, d, LW_FROM_OPTION, option, 0);
    return st;
}

/* Split "section.key=value" into key (copied) and value (in arg). */
static lw_status split_arg(const char *arg, char *key, size_t size, const char **value,
                           lw_error *err)
{
    const char *eq = strchr(arg, '=');
    if (!eq || eq == arg || (size_t)(eq - arg) >= size)
        return lw_error_set(err, LW_EINPUT, "--set", 0,
                            "'%s': expected section.key=value (for example "
                            "drive.resistor_ohm=220)",
                            arg);
    memcpy(key, arg, (size_t)(eq - arg));
    key[eq - arg] = '\0';
    *value = eq + 1;
    return LW_OK;
}

lw_status lw_profile_set_arg(lw_profile *prof, const char *arg, lw_error *err)
{
    char key[2 * LW_INI_NAME_MAX], where[2 * LW_INI_NAME_MAX + 8];
    const char *value = NULL;
    lw_status st = split_arg(arg, key, sizeof key, &value, err);
    if (st != LW_OK)
        return st;
    snprintf(where, sizeof where, "--set %s", key);
    return lw_profile_set(prof, key, value, LW_FROM_OPTION, where, 0, err);
}

/* ---- variants: one path from a profile to the profile of a case ---- */

static lw_status variant_slot(lw_profile_variant *v, const char *key, lw_error *err)
{
    if (v->nset == LW_PROFILE_OVERRIDES_MAX)
        return lw_error_set(err, LW_EINPUT, key, 0, "more than %d overrides of one run",
                            LW_PROFILE_OVERRIDES_MAX);
    return LW_OK;
}

lw_status lw_profile_variant_text(lw_profile_variant *v, const char *key, const char *text,
                                  lw_error *err)
{
    lw_status st = variant_slot(v, key, err);
    if (st == LW_OK)
        v->set[v->nset++] = (lw_profile_override){.key = key, .text = text};
    return st;
}

lw_status lw_profile_variant_number(lw_profile_variant *v, const char *key, double value,
                                    lw_error *err)
{
    lw_status st = variant_slot(v, key, err);
    if (st == LW_OK)
        v->set[v->nset++] = (lw_profile_override){.key = key, .number = value};
    return st;
}

lw_status lw_profile_variant_arg(lw_profile_variant *v, const char *arg, char *key, size_t size,
                                 lw_error *err)
{
    const char *value = NULL;
    lw_status st = split_arg(arg, key, size, &value, err);
    if (st == LW_OK)
        st = lw_profile_variant_text(v, key, value, err);
    return st;
}

lw_status lw_profile_derive(const lw_profile *base, const lw_profile_variant *v,
                            const char *origin, lw_profile *out, lw_error *err)
{
    lw_status st = lw_profile_copy(out, base, err);
    if (st == LW_OK && v->mode)
        st = lw_profile_apply_mode(out, v->mode, err);
    for (size_t k = 0; k < v->nset && st == LW_OK; k++) {
        const lw_profile_override *o = &v->set[k];
        char where[2 * LW_INI_NAME_MAX + 32];
        snprintf(where, sizeof where, "%s %s", origin, o->key);
        st = o->text ? lw_profile_set(out, o->key, o->text, LW_FROM_OPTION, where, 0, err)
                     : lw_profile_set_number(out, o->key, o->number, where, err);
    }
    if (st == LW_OK)
        st = lw_profile_resolve(out, err);
    if (st == LW_OK)
        st = lw_profchain_build(base, v, origin, out, err);
    if (st == LW_OK)
        st = lw_profschedule_build(base, v, origin, out, err);
    return st;
}

static bool is_mode_section(const char *section, const char **name)
{
    if (strncmp(section, "mode", 4) != 0 || (section[4] != ' ' && section[4] != '\t'))
        return false;
    const char *n = section + 4;
    while (*n == ' ' || *n == '\t')
        n++;
    *name = n;
    return true;
}

const char *lw_profile_section_mode(const char *section)
{
    const char *name;
    return is_mode_section(section, &name) ? name : NULL;
}

size_t lw_profile_mode_count(const lw_profile *prof)
{
    size_t n = 0;
    const char *name;
    for (size_t i = 0; prof->ini->sections && i < prof->ini->n_sections; i++)
        if (is_mode_section(prof->ini->sections[i].name, &name))
            n++;
    return n;
}

const char *lw_profile_mode_name(const lw_profile *prof, size_t k)
{
    const char *name;
    for (size_t i = 0; prof->ini->sections && i < prof->ini->n_sections; i++)
        if (is_mode_section(prof->ini->sections[i].name, &name) && k-- == 0)
            return name;
    return NULL;
}

lw_status lw_profile_apply_mode(lw_profile *prof, const char *name, lw_error *err)
{
    bool found = false;
    const char *mname;
    for (size_t i = 0; prof->ini->sections && i < prof->ini->n_sections && !found; i++)
        found = is_mode_section(prof->ini->sections[i].name, &mname) && !strcmp(mname, name);
    if (!found) {
        char list[512] = "";
        for (size_t i = 0; i < lw_profile_mode_count(prof); i++) {
            strncat(list, i ? ", " : "", sizeof list - strlen(list) - 1);
            strncat(list, lw_profile_mode_name(prof, i), sizeof list - strlen(list) - 1);
        }
        return lw_error_set(err, LW_EINPUT, prof->path, 0, "no [mode %s]; the modes are: %s",
                            name, list[0] ? list : "(none)");
    }
    for (size_t i = 0; i < prof->ini->n; i++) {
        const lw_ini_entry *e = &prof->ini->entries[i];
        if (!is_mode_section(e->section, &mname) || strcmp(mname, name) != 0 ||
            lw_profchain_is_key(e->key))
            continue;
        lw_status st = lw_profile_set(prof, e->key, e->value, LW_FROM_MODE, prof->path, e->line,
                                      err);
        if (st != LW_OK)
            return st;
    }
    lw_text_copy(prof->mode, name, sizeof prof->mode);
    return LW_OK;
}

/* ---- resolving: files the profile names ---- */

enum { XY_Y_POSITIVE = 1, XY_Y_NONDECREASING = 2, XY_THROUGH_ORIGIN = 4 };

/* How a two-column table is read: x in file units * xscale. */
typedef struct xy_spec {
    const char *xcol, *ycol;
    double xscale, yscale;
    unsigned flags;
    lw_path_ref ref;   /* the key that names the file */
} xy_spec;

/* Read and check a two-column CSV into a table (lw_cache_table_fn). */
static lw_status read_xy(const char *path, const void *ctx, lw_interp **out, lw_error *err)
{
    const xy_spec *sp = ctx;
    const char *xcol = sp->xcol, *ycol = sp->ycol;
    const double xscale = sp->xscale, yscale = sp->yscale;
    const unsigned flags = sp->flags;
    lw_csv csv;
    lw_status st = lw_csv_read(path, &sp->ref, &csv, err);
    if (st != LW_OK)
        return st;
    const char *cols[] = {xcol, ycol, NULL};
    st = lw_csv_expect(&csv, cols, NULL, err);
    size_t n = csv.nrow, off = 0;
    double *x = st == LW_OK ? lw_malloc(2 * (n + 1) * sizeof *x) : NULL;
    if (!x) {
        lw_csv_clear(&csv);
        return st != LW_OK ? st : lw_error_set(err, LW_ENOMEM, path, 0, "out of memory");
    }
    double *y = x + n + 1;
    int cx = lw_csv_column(&csv, xcol), cy = lw_csv_column(&csv, ycol);
    if (st == LW_OK && (flags & XY_THROUGH_ORIGIN) && lw_csv_at(&csv, 0, cx) > 0.0) {
        x[0] = y[0] = 0.0;
        off = 1;
    }
    for (size_t i = 0; st == LW_OK && i < n; i++) {
        double xv = lw_csv_at(&csv, i, cx), yv = lw_csv_at(&csv, i, cy);
        int line = csv.line[i];
        if (xv < 0.0)
            st = lw_error_set(err, LW_EINPUT, path, line, "%s = %g: expected >= 0", xcol, xv);
        else if (i > 0 && !(xv * xscale > x[off + i - 1]))
            st = lw_error_set(err, LW_EINPUT, path, line,
                              "%s = %g does not increase on the previous row", xcol, xv);
        else if ((flags & XY_Y_POSITIVE) && !(yv > 0.0))
            st = lw_error_set(err, LW_EINPUT, path, line, "%s = %g: expected > 0", ycol, yv);
        else if (yv < 0.0)
            st = lw_error_set(err, LW_EINPUT, path, line, "%s = %g: expected >= 0", ycol, yv);
        else if ((flags & XY_Y_NONDECREASING) && i > 0 && yv * yscale < y[off + i - 1])
            st = lw_error_set(err, LW_EINPUT, path, line,
                              "%s = %g falls on the previous row: expected a non-decreasing "
                              "curve",
                              ycol, yv);
        if (st == LW_OK) {
            x[off + i] = xv * xscale;
            y[off + i] = yv * yscale;
        }
    }
    if (st == LW_OK && n + off < 2)
        st = lw_error_set(err, LW_EINPUT, path, csv.line[0], "at least 2 rows are needed");
    if (st == LW_OK) {
        lw_interp *t = lw_interp_new(x, y, n + off, err);
        if (!t)
            st = err && err->code ? err->code : LW_ENOMEM;
        else
            *out = t;
    }
    free(x);
    lw_csv_clear(&csv);
    return st;
}


/* The table named by [section] key = rel: read once per process (cache.h),
 * then shared. */
static lw_status load_xy(const lw_profile *p, const char *section, const char *key,
                         const char *rel, const char *xcol, const char *ycol, double xscale,
                         double yscale, unsigned flags, lw_interp **out, lw_error *err)
{
    char path[LW_PATH_MAX];
    char what[2 * LW_INI_NAME_MAX + 4], kind[2 * LW_INI_NAME_MAX + 2];
    snprintf(what, sizeof what, "[%s] %s", section, key);
    snprintf(kind, sizeof kind, "%s.%s", section, key);
    if (!lw_path_join(path, sizeof path, p->dir, rel))
        return lw_error_set(err, LW_EINPUT, p->path, line_of(p, section, key),
                            "%s: the path is too long (at most %d bytes)", what,
                            LW_PATH_MAX - 1);
    xy_spec spec = {xcol, ycol, xscale, yscale, flags, {p->path, line_of(p, section, key), what}};
    lw_interp *t;
    lw_status st = lw_cache_table(path, kind, read_xy, &spec, &t, err);
    if (st == LW_OK) {
        lw_interp_free(*out);
        *out = t;
    }
    return st;
}

static lw_status need(const lw_profile *p, const char *section, const char *key,
                      const char *because, lw_error *err)
{
    if (given(p, section, key))
        return LW_OK;
    const lw_keydef *d = lw_key_find(lw_profile_keys, lw_profile_nkeys, section, key);
    return lw_error_set(err, LW_EINPUT, p->path, line_of(p, section, because),
                        "[%s] %s needs the key '%s' (%s)", section, because, key,
                        d ? d->help : "");
}

static lw_status check_led(lw_profile *p, lw_error *err)
{
    lw_led *led = &p->light.led;
    lw_status st = LW_OK;
    switch (led->model) {
    case LW_LED_CONSTANT:
        st = need(p, "led", "forward_v", "model", err);
        break;
    case LW_LED_LINEAR:
        st = need(p, "led", "threshold_v", "model", err);
        if (st == LW_OK)
            st = need(p, "led", "slope_ohm", "model", err);
        break;
    case LW_LED_SHOCKLEY:
        st = need(p, "led", "ideality", "model", err);
        if (st == LW_OK)
            st = need(p, "led", "saturation_a", "model", err);
        break;
    case LW_LED_TABLE:
    default:
        st = need(p, "led", "iv_file", "model", err);
        if (st == LW_OK)
            st = load_xy(p, "led", "iv_file", p->iv_file, "current_ma", "forward_v", 1e-3, 1.0,
                         XY_Y_POSITIVE | XY_Y_NONDECREASING, &led->iv, err);
        break;
    }
    if (st != LW_OK)
        return st;
    bool by_file = given(p, "led", "flux_file");
    bool by_rating = given(p, "led", "flux_lm") || given(p, "led", "flux_current_ma");
    if (by_file && by_rating)
        return lw_error_set(err, LW_EINPUT, p->path, line_of(p, "led", "flux_file"),
                            "[led] give either flux_file or flux_lm with flux_current_ma, not "
                            "both");
    if (by_file)
        return load_xy(p, "led", "flux_file", p->flux_file, "current_ma", "flux_lm", 1e-3, 1.0,
                       XY_THROUGH_ORIGIN, &led->flux, err);
    lw_interp_free(led->flux);
    led->flux = NULL;
    if (!by_rating)
        return lw_error_set(err, LW_EINPUT, p->path, line_of(p, "led", NULL),
                            "[led] needs the light output: flux_lm with flux_current_ma, or "
                            "flux_file");
    st = need(p, "led", "flux_lm", "flux_current_ma", err);
    if (st == LW_OK)
        st = need(p, "led", "flux_current_ma", "flux_lm", err);
    return st;
}

/* [thermal]: present when any of its keys is given; then the two
 * resistances that carry the heat away are required. */
static lw_status check_thermal(lw_profile *p, lw_error *err)
{
    lw_thermal *th = &p->light.thermal;
    th->enabled = false;
    for (size_t k = 0; k < lw_profile_nkeys; k++)
        if (!strcmp(lw_profile_keys[k].section, "thermal") &&
            p->key_origin[k] != LW_FROM_DEFAULT)
            th->enabled = true;
    if (!th->enabled)
        return LW_OK;
    static const char *const needed[] = {"junction_board_k_w", "body_ambient_k_w"};
    for (size_t k = 0; k < 2; k++)
        if (!given(p, "thermal", needed[k])) {
            const lw_keydef *d = lw_key_find(lw_profile_keys, lw_profile_nkeys, "thermal",
                                             needed[k]);
            return lw_error_set(err, LW_EINPUT, p->path, line_of(p, "thermal", NULL),
                                "[thermal] is missing the key '%s' (%s)", needed[k],
                                d ? d->help : "");
        }
    /* foldback: all three keys, from below to, on a body with a heat capacity */
    static const char *const fold[] = {"foldback_from_c", "foldback_to_c", "foldback_min_pct"};
    int nfold = 0;
    for (size_t k = 0; k < 3; k++)
        nfold += given(p, "thermal", fold[k]);
    if (nfold == 0)
        return LW_OK;
    const char *file;
    int line;
    size_t first = 0;
    while (!given(p, "thermal", fold[first]))
        first++;
    for (size_t k = 0; k < 3; k++)
        if (!given(p, "thermal", fold[k])) {
            where_of(p, "thermal", fold[first], &file, &line);
            return lw_error_set(err, LW_EINPUT, file, line,
                                "[thermal] foldback needs foldback_from_c, foldback_to_c and "
                                "foldback_min_pct together; '%s' is missing",
                                fold[k]);
        }
    if (!(th->foldback_to_c > th->foldback_from_c)) {
        where_of(p, "thermal", "foldback_to_c", &file, &line);
        return lw_error_set(err, LW_EINPUT, file, line,
                            "[thermal] foldback_to_c = %g must be above foldback_from_c = %g",
                            th->foldback_to_c, th->foldback_from_c);
    }
    return LW_OK;
}

static lw_status check_drive(lw_profile *p, lw_error *err)
{
    lw_drive *drv = &p->light.drive;
    lw_status st = LW_OK;
    if (!given(p, "drive", "resistor_ohm"))
        drv->resistor_ohm = 0.0;
    switch (drv->type) {
    case LW_DRIVE_RESISTOR:
        st = need(p, "drive", "resistor_ohm", "type", err);
        break;
    case LW_DRIVE_LINEAR_CC:
        st = need(p, "drive", "set_ma", "type", err);
        if (st == LW_OK)
            st = need(p, "drive", "dropout_v", "type", err);
        break;
    case LW_DRIVE_CONVERTER:
    default:
        st = need(p, "drive", "set_ma", "type", err);
        if (st != LW_OK)
            break;
        if (given(p, "drive", "efficiency_file") == given(p, "drive", "efficiency_pct"))
            return lw_error_set(err, LW_EINPUT, p->path, line_of(p, "drive", "type"),
                                "[drive] type = converter needs exactly one of efficiency_pct "
                                "and efficiency_file");
        if (given(p, "drive", "efficiency_file"))
            st = load_xy(p, "drive", "efficiency_file", p->efficiency_file, "input_v",
                         "efficiency_pct", 1.0, 1.0, XY_Y_POSITIVE, &drv->efficiency, err);
        if (st == LW_OK && drv->efficiency) {
            for (size_t i = 0; i < drv->efficiency->n; i++)
                if (drv->efficiency->y[i] > 100.0)
                    return lw_error_set(err, LW_EINPUT, p->path,
                                        line_of(p, "drive", "efficiency_file"),
                                        "[drive] efficiency_file: efficiency above 100 %%");
        }
        if (st == LW_OK && drv->fallback_a >= drv->set_a)
            st = lw_error_set(err, LW_EINPUT, p->path, line_of(p, "drive", "fallback_ma"),
                              "[drive] fallback_ma must be below set_ma");
        break;
    }
    if (st == LW_OK && drv->type != LW_DRIVE_CONVERTER) {
        lw_interp_free(drv->efficiency);
        drv->efficiency = NULL;
    }
    return st;
}

static lw_status load_cell_file(const char *path, const void *ctx, lw_cell *out, lw_error *err)
{
    return lw_cellfile_load_named(path, ctx, out, err);
}

static lw_status load_cell(lw_profile *p, lw_error *err)
{
    char path[LW_PATH_MAX];
    lw_error local;
    lw_error_clear(&local);
    const char *file;
    int line;
    where_of(p, "pack", "cell", &file, &line);
    if (lw_cellfile_find(p->cell_ref, p->dir, &p->search, path, sizeof path, &local) != LW_OK)
        return lw_error_set(err, LW_EINPUT, file, line, "[pack] cell: %s", local.msg);
    if (!strcmp(path, p->cell_path) && p->light.pack.cell.ocv)
        return LW_OK;
    lw_path_ref ref = {file, line, "[pack] cell"};
    lw_cell cell;
    lw_status st = lw_cache_cell(path, load_cell_file, &ref, &cell, err);
    if (st != LW_OK)
        return st;
    lw_cell_clear(&p->light.pack.cell);
    p->light.pack.cell = cell;
    p->cell_rate_model = (int)cell.rate_model;
    lw_text_copy(p->cell_path, path, sizeof p->cell_path);
    return LW_OK;
}

/* [pack] rate_model over the cell file's own. */
static lw_status apply_rate_model(lw_profile *p, lw_error *err)
{
    lw_cell *c = &p->light.pack.cell;
    c->rate_model = p->rate_model ? (lw_rate_model)(p->rate_model - 1)
                                  : (lw_rate_model)p->cell_rate_model;
    if (c->rate_model == LW_RATE_KINETIC &&
        !(c->kinetic_c > 0.0 && c->kinetic_k_per_h > 0.0)) {
        const char *file;
        int line;
        where_of(p, "pack", "rate_model", &file, &line);
        return lw_error_set(err, LW_EINPUT, file, line,
                            "[pack] rate_model = kinetic: the cell %s has no kinetic "
                            "parameters (available_pct and recovery_per_h in its cell file)",
                            c->name);
    }
    return LW_OK;
}

lw_status lw_profile_resolve(lw_profile *p, lw_error *err)
{
    for (size_t k = 0; k < lw_profile_nkeys; k++)
        if ((lw_profile_keys[k].flags & LW_KF_REQUIRED) && p->key_origin[k] == LW_FROM_DEFAULT)
            return lw_error_set(err, LW_EINPUT, p->path,
                                line_of(p, lw_profile_keys[k].section, lw_profile_keys[k].name),
                                "[%s] is missing the key '%s' (%s)", lw_profile_keys[k].section,
                                lw_profile_keys[k].name, lw_profile_keys[k].help);
    lw_status st = load_cell(p, err);
    if (st == LW_OK)
        st = apply_rate_model(p, err);
    if (st == LW_OK)
        st = check_led(p, err);
    if (st == LW_OK)
        st = check_drive(p, err);
    if (st != LW_OK)
        return st;
    lw_light *l = &p->light;
    l->led.v_scale = 1.0;
    l->cutoff.cell_v = isnan(p->cutoff_cell_v) ? l->pack.cell.cutoff_v : p->cutoff_cell_v;
    if (!(l->cutoff.cell_v < l->pack.cell.ocv->y[0])) {
        /* the same rule as a cell file's cutoff_v */
        const char *file;
        int line;
        where_of(p, "cutoff", "cell_v", &file, &line);
        return lw_error_set(err, LW_EINPUT, file, line,
                            "[cutoff] cell_v = %g is not below the fresh open-circuit voltage "
                            "%g V of %s",
                            l->cutoff.cell_v, l->pack.cell.ocv->y[0], l->pack.cell.name);
    }
    st = check_thermal(p, err);
    if (st != LW_OK)
        return st;
    if (given(p, "optics", "beam_angle_deg") && given(p, "optics", "peak_cd_per_lm"))
        return lw_error_set(err, LW_EINPUT, p->path, line_of(p, "optics", "peak_cd_per_lm"),
                            "[optics] give beam_angle_deg or peak_cd_per_lm, not both");
    if (!l->name[0]) {
        const char *base = strrchr(p->path, '/');
        lw_text_copy(l->name, base ? base + 1 : p->path, sizeof l->name);
    }
    lw_light_update_factors(l, NULL);
    return LW_OK;
}

static lw_status apply_file(lw_profile *p, lw_error *err)
{
    const char *mname;
    for (size_t i = 0; i < p->ini->n; i++) {
        const lw_ini_entry *e = &p->ini->entries[i];
        if (is_mode_section(e->section, &mname) || !strcmp(e->section, "spread"))
            continue; /* [spread] is the spread study's (montecarlo.h) */
        const lw_keydef *d = lw_key_find(lw_profile_keys, lw_profile_nkeys, e->section, e->key);
        if (!d)
            return lw_key_unknown(lw_profile_keys, lw_profile_nkeys, e->section, e->key, p->path,
                                  e->line, err);
        lw_status st = apply_text(p, d, e->value, p->path, e->line, err);
        if (st != LW_OK)
            return st;
        p->key_origin[key_index(d)] = LW_FROM_FILE;
        p->key_line[key_index(d)] = e->line;
    }
    return LW_OK;
}

/* Each mode must apply and resolve on its own: checked at load, so that a bad
 * mode is reported with its line even when it is not used. */
static lw_status check_modes(const lw_profile *p, lw_error *err)
{
    for (size_t i = 0; p->ini->sections && i < p->ini->n_sections; i++) {
        const char *mname;
        const char *sec = p->ini->sections[i].name;
        if (!is_mode_section(sec, &mname))
            continue; /* names and repeats were judged as the file was read */
        lw_profile copy;
        lw_status st = lw_profile_copy(&copy, p, err);
        if (st == LW_OK)
            st = lw_profile_apply_mode(&copy, mname, err);
        if (st == LW_OK)
            st = lw_profile_resolve(&copy, err);
        lw_profile_clear(&copy);
        if (st != LW_OK)
            return st;
    }
    return LW_OK;
}

/* Each key as the file is read: a known key of a known section, or in a
 * [mode NAME] section a known "section.key"; the first unknown one stops
 * the reading at its line. */
static lw_status profile_check(const void *ctx, const char *section, const char *key,
                               const char *file, int line, lw_error *err)
{
    (void)ctx;
    const char *mname;
    char sec[LW_INI_NAME_MAX], k[LW_INI_NAME_MAX];
    if (!key && !strcmp(section, "mode"))
        return lw_error_set(err, LW_EINPUT, file, line, "a mode section needs a name: [mode NAME]");
    if (!key && is_mode_section(section, &mname))
        return LW_OK;
    if (!key && !strcmp(section, "cell"))
        return lw_error_set(err, LW_EINPUT, file, line,
                            "[cell] opens a cell file, not a light profile: name the cell in a "
                            "profile's [pack] cell");
    bool spread = !strcmp(section, "spread"); /* the spread study's (montecarlo.h) */
    if (!key && spread)
        return LW_OK;
    if (!key)
        return lw_key_unknown(lw_profile_keys, lw_profile_nkeys, section, NULL, file, line, err);
    if (is_mode_section(section, &mname) && lw_profchain_is_key(key))
        return LW_OK; /* checked with the whole chain, lw_profchain_check */
    if (is_mode_section(section, &mname) || spread) {
        if (!split_dotted(key, sec, sizeof sec, k, sizeof k))
            return lw_error_set(err, LW_EINPUT, file, line,
                                "[%s] '%s': expected section.key (for example "
                                "drive.resistor_ohm): a %s",
                                section, key,
                                spread ? "[spread] names the keys it spreads"
                                       : "mode holds overrides");
        section = sec;
        key = k;
    }
    if (lw_key_find(lw_profile_keys, lw_profile_nkeys, section, key))
        return LW_OK;
    return lw_key_unknown(lw_profile_keys, lw_profile_nkeys, section, key, file, line, err);
}

lw_status lw_profile_load(const char *path, const lw_search *search, lw_profile *p,
                          lw_error *err)
{
    memset(p, 0, sizeof *p);
    if (!lw_text_copy(p->path, lw_path_display(path), sizeof p->path))
        return lw_error_set(err, LW_EINPUT, NULL, 0, "the profile path is too long (at most %d "
                                                     "bytes)",
                            LW_PATH_MAX - 1);
    lw_path_dir(p->dir, sizeof p->dir, path); /* "-": the current folder */
    if (search)
        p->search = *search;
    p->cutoff_cell_v = NAN;
    p->use_on_h = p->use_off_h = NAN;
    p->light.led.max_junction_c = NAN;
    p->light.thermal.foldback_from_c = p->light.thermal.foldback_to_c = NAN;
    p->light.thermal.foldback_min = 1.0;
    p->ini = lw_calloc(1, sizeof *p->ini);
    if (!p->ini)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    lw_status st = lw_key_defaults(lw_profile_keys, lw_profile_nkeys, p, err);
    if (st == LW_OK)
        st = lw_ini_read(path, p->ini, profile_check, NULL, err);
    atomic_store(&p->ini->refs, 1);
    if (st == LW_OK && lw_profile_mode_count(p) > LW_PROFILE_MODES_MAX)
        st = lw_error_set(err, LW_EINPUT, p->path, 0, "more than %d [mode] sections",
                          LW_PROFILE_MODES_MAX);
    if (st == LW_OK)
        st = apply_file(p, err);
    if (st == LW_OK)
        st = lw_profile_resolve(p, err);
    if (st == LW_OK)
        st = check_modes(p, err);
    if (st == LW_OK)
        st = lw_profchain_check(p, err);
    if (st != LW_OK)
        lw_profile_clear(p);
    return st;
}

void lw_profile_clear(lw_profile *p)
{
    if (!p)
        return;
    lw_light_clear(&p->light);
    if (p->ini && atomic_fetch_sub(&p->ini->refs, 1) == 1) {
        lw_ini_clear(p->ini);
        free(p->ini);
    }
    p->ini = NULL;
    p->cell_path[0] = '\0';
}

lw_status lw_profile_copy(lw_profile *dst, const lw_profile *src, lw_error *err)
{
    (void)err;
    *dst = *src;
    lw_light_copy(&dst->light, &src->light);
    if (dst->ini)
        atomic_fetch_add(&dst->ini->refs, 1); /* the file's entries: read-only, shared */
    return LW_OK;
}

size_t lw_profile_inputs(const lw_profile *p, char (*paths)[LW_PATH_MAX], size_t max)
{
    const char *direct[] = {p->path, p->cell_path, p->light.pack.cell.curve_path,
                            p->light.pack.cell.temperature_path};
    const char *rel[] = {p->iv_file, p->flux_file, p->efficiency_file, p->use_file};
    size_t n = 0;
    for (size_t i = 0; i < sizeof direct / sizeof direct[0] && n < max; i++)
        if (direct[i][0])
            lw_text_copy(paths[n++], direct[i], LW_PATH_MAX);
    for (size_t i = 0; i < sizeof rel / sizeof rel[0] && n < max; i++)
        if (rel[i][0] && lw_path_join(paths[n], LW_PATH_MAX, p->dir, rel[i]))
            n++;
    return n;
}

void lw_profile_key_where(const lw_profile *p, const char *section, const char *name,
                          const char **file, int *line)
{
    where_of(p, section, name, file, line);
}

bool lw_profile_given(const lw_profile *p, const char *dotted_key)
{
    char section[LW_INI_NAME_MAX], key[LW_INI_NAME_MAX];
    return split_dotted(dotted_key, section, sizeof section, key, sizeof key) &&
           given(p, section, key);
}

static void lw_profile_value_text_in_c_locale(const lw_profile *p, const char *dotted_key,
                                              char *buf, size_t size)
{
    char section[LW_INI_NAME_MAX], key[LW_INI_NAME_MAX];
    buf[0] = '\0';
    if (!split_dotted(dotted_key, section, sizeof section, key, sizeof key))
        return;
    const lw_keydef *d = lw_key_find(lw_profile_keys, lw_profile_nkeys, section, key);
    if (!d)
        return;
    const char *at = (const char *)p + d->offset;
    switch (d->type) {
    case LW_K_NUM: {
        double v;
        memcpy(&v, at, sizeof v);
        snprintf(buf, size, "%.6g", v / d->scale);
        break;
    }
    case LW_K_INT: {
        int v;
        memcpy(&v, at, sizeof v);
        snprintf(buf, size, "%d", v);
        break;
    }
    case LW_K_BOOL: {
        bool v;
        memcpy(&v, at, sizeof v);
        snprintf(buf, size, "%s", v ? "yes" : "no");
        break;
    }
    case LW_K_CHOICE: {
        int v;
        memcpy(&v, at, sizeof v);
        snprintf(buf, size, "%s", d->choices[v]);
        break;
    }
    case LW_K_TEXT:
    default:
        snprintf(buf, size, "%s", at);
        break;
    }
}

void lw_profile_value_text(const lw_profile *p, const char *dotted_key, char *buf, size_t size)
{
    locale_t saved = lw_number_locale_begin();
    lw_profile_value_text_in_c_locale(p, dotted_key, buf, size);
    lw_number_locale_end(saved);
}

lw_status lw_profile_load_variant(const char *path, const lw_search *search, const char *mode,
                                  const char *const *sets, size_t nsets, lw_profile *prof,
                                  lw_error *err)
{
    lw_profile file;
    lw_status st = lw_profile_load(path, search, &file, err);
    if (st != LW_OK) {
        memset(prof, 0, sizeof *prof);
        lw_profile_clear(&file);
        return st;
    }
    lw_profile_variant v = {.mode = mode};
    char keys[LW_PROFILE_OVERRIDES_MAX][2 * LW_INI_NAME_MAX];
    if (nsets > LW_PROFILE_OVERRIDES_MAX)
        st = lw_error_set(err, LW_EINPUT, NULL, 0, "too many overrides (at most %d)",
                          LW_PROFILE_OVERRIDES_MAX);
    for (size_t i = 0; st == LW_OK && i < nsets; i++)
        st = lw_profile_variant_arg(&v, sets[i], keys[i], sizeof keys[i], err);
    if (st == LW_OK)
        st = lw_profile_derive(&file, &v, "--set", prof, err);
    else
        memset(prof, 0, sizeof *prof);
    lw_profile_clear(&file); /* the derived profile keeps what it shares */
    return st;
}
