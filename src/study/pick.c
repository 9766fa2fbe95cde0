/*
 * pick.c - choosing the series resistor (see pick.h).
 */
#include "lampwick/pick.h"
#include "lampwick/text.h"

#include <math.h>
#include <string.h>
#include "lampwick/batch.h"
#include "lampwick/eseries.h"

void lw_pick_clear(lw_pick *pick)
{
    if (pick)
        lw_run_result_clear(&pick->run);
}

lw_status lw_pick_resistor(const lw_profile *prof, lw_target_kind kind, double target,
                           int eseries, lw_pick *out, lw_error *err)
{
    memset(out, 0, sizeof *out);
    out->recommended_rating_w = NAN;
    out->eseries = eseries;
    lw_text_copy(out->cell, prof->light.pack.cell.name, sizeof out->cell);
    if (prof->light.drive.type != LW_DRIVE_RESISTOR)
        return lw_error_set(err, LW_EINPUT, prof->path, 0,
                            "pick chooses a series resistor: the profile's drive.type must be "
                            "resistor");
    lw_light light = prof->light; /* shallow: tables borrowed */
    light.drive.tolerance_pct = lw_resistor_tolerance_pct(
        &prof->light, lw_profile_given(prof, "drive.tolerance_pct"), eseries);
    out->tolerance_pct = light.drive.tolerance_pct;
    out->max_led_a = light.led.max_current_a;
    out->profile_rating_w = prof->light.drive.rating_w;
    lw_status st = lw_resistor_for(&light, kind, target, false, &out->ideal_ohm, err);
    if (st != LW_OK)
        return st;
    if (out->ideal_ohm == 0.0)
        return lw_error_set(err, LW_ENOANSWER, prof->path, 0,
                            "no resistor reaches the target: even without one the LEDs stay "
                            "below it with these cells");
    if (!isfinite(out->ideal_ohm))
        return lw_error_set(err, LW_ENOANSWER, prof->path, 0,
                            "the target is reached with any resistor up to 100 Mohm");
    double r = lw_eseries_round(eseries, out->ideal_ohm, kind == LW_TARGET_CURRENT);
    if (!isfinite(r))
        r = lw_eseries_round(eseries, out->ideal_ohm, true);
    double r_safe;
    st = lw_resistor_min_safe(&light, eseries, 0.0, &r_safe, err);
    if (st != LW_OK)
        return st;
    out->meets_target = true;
    if (r < r_safe) {
        r = r_safe; /* the safe part falls short of the target */
        out->meets_target = false;
    }
    if (!isfinite(r))
        return lw_error_set(err, LW_ENOANSWER, prof->path, 0,
                            "no E%d value keeps the LED within %.4g mA and the resistor within a "
                            "standard power rating in the worst case",
                            eseries, out->max_led_a * 1e3);
    out->resistor_ohm = r;
    light.drive.resistor_ohm = r;
    lw_point worst;
    st = lw_run_worst_case(&light, &worst, err);
    if (st != LW_OK)
        return st;
    out->recommended_rating_w = lw_resistor_rating_w(worst.p_res_peak_w);
    out->within_ratings = worst.led_a <= out->max_led_a && isfinite(out->recommended_rating_w);
    if (isfinite(out->recommended_rating_w))
        light.drive.rating_w = out->recommended_rating_w;
    lw_run_options opt = lw_run_options_default();
    st = lw_run(&light, &opt, &out->run, err);
    if (st == LW_OK)
        st = lw_corner_compute(&light, &out->run, out->corners, err);
    if (st != LW_OK)
        return st;
    const lw_point *nom = &out->corners[LW_CORNER_NOMINAL].pt;
    if (kind == LW_TARGET_FLUX && nom->flux_lm < target * (1 - 1e-12))
        out->meets_target = false;
    if (!out->within_ratings)
        return lw_error_set(err, LW_ENOANSWER, prof->path, 0,
                            "no E%d value keeps the LED within %.4g mA and the resistor within a "
                            "standard power rating in the worst case",
                            eseries, out->max_led_a * 1e3);
    if (!out->meets_target)
        return lw_error_set(err, LW_ENOANSWER, prof->path, 0,
                            "the target needs more current than the ratings allow in the worst "
                            "case; the nearest safe part is %g ohm",
                            r);
    return LW_OK;
}

lw_status lw_pick_cells(const lw_profile *prof, const char *const *cells, lw_target_kind kind,
                        double target, int eseries, lw_pick *out, lw_status *status,
                        lw_error *errs, lw_error *err)
{
    for (size_t i = 0; cells[i]; i++) {
        lw_profile_variant v = {0};
        memset(&out[i], 0, sizeof out[i]);
        lw_error_clear(&errs[i]);
        lw_status st = lw_profile_variant_text(&v, "pack.cell", cells[i], err);
        if (st != LW_OK)
            return st;
        lw_profile p;
        st = lw_profile_derive(prof, &v, "--cells", &p, err);
        if (st != LW_OK) {
            lw_profile_clear(&p);
            return st;
        }
        status[i] = lw_pick_resistor(&p, kind, target, eseries, &out[i], &errs[i]);
        lw_text_copy(out[i].cell, cells[i], sizeof out[i].cell);
        lw_profile_clear(&p);
        if (status[i] != LW_OK && status[i] != LW_ENOANSWER) {
            if (err && err->code == LW_OK)
                *err = errs[i];
            return status[i];
        }
    }
    return LW_OK;
}
