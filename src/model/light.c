/*
 * light.c - the operating point of a whole light at one depth (see light.h).
 */
#include "lampwick/light.h"

#include <math.h>

const char *const lw_light_reference_names[LW_REF_COUNT + 1] = {"own", "fresh", NULL};

void lw_light_clear(lw_light *light)
{
    if (!light)
        return;
    lw_cell_clear(&light->pack.cell);
    lw_led_clear(&light->led);
    lw_interp_free(light->drive.efficiency);
    light->drive.efficiency = NULL;
    lw_chain_unref(light->chain);
    light->chain = NULL;
    lw_schedule_unref(light->use);
    light->use = NULL;
}

void lw_light_copy(lw_light *dst, const lw_light *src)
{
    *dst = *src;
    lw_cell_copy(&dst->pack.cell, &src->pack.cell);
    lw_led_copy(&dst->led, &src->led);
    lw_interp_ref(dst->drive.efficiency);
    lw_chain_ref(dst->chain);
    lw_schedule_ref(dst->use);
}

const lw_light *lw_light_mode(const lw_light *light, int mode)
{
    const lw_chain *c = light->chain;
    return c && mode >= 0 && (size_t)mode < c->n ? c->modes[mode].light : light;
}

/* A cell's share of one LED string's on-state current, averaged over PWM. */
static double cell_share(const lw_light *l)
{
    return l->drive.duty_pct / 100.0 * l->led.strings / l->pack.parallel;
}

void lw_light_update_factors(lw_light *light, bool *temperature_outside)
{
    lw_cell_temperature_factors(&light->pack.cell, light->pack.ambient_c, &light->cap_factor,
                                &light->res_factor, temperature_outside);
    /* 0 (a light built in code, zero-initialised): as rated */
    if (light->pack.capacity_scale > 0.0)
        light->cap_factor *= light->pack.capacity_scale;
    if (light->pack.resistance_scale > 0.0)
        light->res_factor *= light->pack.resistance_scale;
    /* without a thermal network the junctions are at ambient */
    light->led.t_junction_c = light->pack.ambient_c;
    lw_led_prepare(&light->led);
    lw_cell_prepare(&light->pack.cell);
    light->memo_share = lw_number_memo_of(cell_share(light));
}

/* Fill the string-side quantities common to the passive and linear drives. */
static void fill_string(const lw_light *l, lw_point *pt, double i, double log_i, double v_led,
                        double e_v, double r_pack)
{
    const int m = l->led.strings, n = l->led.count;
    const double duty = l->drive.duty_pct / 100.0;
    pt->led_a = i;
    pt->led_v = v_led;
    pt->pack_a = m * i;
    pt->pack_avg_a = duty * pt->pack_a;
    pt->cell_a = pt->pack_a / l->pack.parallel;
    pt->pack_v = e_v - pt->pack_a * r_pack;
    pt->cell_v = pt->ocv_v - pt->cell_a * pt->r_cell_ohm;
    pt->p_led_w = duty * m * n * pt->led_v * i;
    pt->p_res_peak_w = i * i * l->drive.resistor_ohm;
    pt->p_res_w = duty * m * pt->p_res_peak_w;
    pt->p_int_w = duty * pt->pack_a * pt->pack_a * r_pack;
    pt->p_drawn_w = duty * e_v * pt->pack_a;
    pt->p_drv_w = pt->p_drawn_w - pt->p_led_w - pt->p_res_w - pt->p_int_w;
    if (l->drive.type == LW_DRIVE_RESISTOR)
        pt->p_drv_w = 0.0; /* by Kirchhoff's law; avoids reporting rounding as a loss */
    pt->flux_lm = duty * m * n * lw_led_flux_at(&l->led, i, log_i, &pt->extrapolated);
}

/* The converter at one point: the LEDs at the set (or fallback) current,
 * the on-state input current from the quadratic, the quiescent draw between
 * PWM pulses.  Dark (LW_REGIME_DROPOUT) when the pack cannot deliver the
 * input power, or, at the set level, when the input is below min_input_v. */
static void point_converter(const lw_light *l, double e_v, double r_pack, bool fallback,
                            lw_point *pt)
{
    const lw_drive *drv = &l->drive;
    const int m = l->led.strings, n = l->led.count;
    const double duty = drv->duty_pct / 100.0, iq = drv->quiescent_a;
    double i = fallback ? drv->fallback_a : drv->set_a;
    double vled = lw_led_voltage(&l->led, i, &pt->extrapolated);
    double p_out = m * n * vled * i; /* on-state output power */
    lw_drive_input in = lw_drive_converter_input(drv, e_v, r_pack, p_out);
    const bool ok = in.ok;
    const double ip = in.ip_a, vin = in.vin_v;
    /* the event function of the dropout: negative when dark */
    double margin = in.supply_margin;
    if (ok && !fallback)
        margin = fmin(margin, (vin - drv->min_input_v) / e_v);
    if (!ok || margin < 0.0) {
        pt->regime = LW_REGIME_DROPOUT;
        pt->regulation_margin = margin < 0.0 ? margin : -1e-300;
        pt->pack_v = e_v; /* dark: no current flows */
        pt->cell_v = pt->ocv_v;
        pt->dtdd_h = INFINITY;
        return;
    }
    pt->regime = fallback ? LW_REGIME_FALLBACK : LW_REGIME_REGULATED;
    pt->regulation_margin = margin;
    pt->led_a = i;
    pt->led_v = vled;
    pt->pack_a = ip;
    pt->pack_avg_a = duty * ip + (1.0 - duty) * iq;
    pt->cell_a = ip / l->pack.parallel;
    pt->pack_v = vin;
    pt->cell_v = pt->ocv_v - pt->cell_a * pt->r_cell_ohm;
    pt->p_led_w = duty * p_out;
    pt->p_res_w = pt->p_res_peak_w = 0.0;
    /* on-state and off-state (quiescent only) loss in the cells */
    pt->p_int_w = (duty * ip * ip + (1.0 - duty) * iq * iq) * r_pack;
    pt->p_drawn_w = e_v * pt->pack_avg_a;
    pt->p_drv_w = pt->p_drawn_w - pt->p_led_w - pt->p_int_w;
    pt->flux_lm = duty * m * n * lw_led_flux_at(&l->led, i, NAN, &pt->extrapolated);
}

/* The electrical operating point with the junctions at l->led.t_junction_c. */
static lw_status point_electrical(const lw_light *l, double depth, double ocv_v,
                                  double r_cell_ohm, bool fallback, lw_point *pt, lw_error *err)
{
    const int s = l->pack.series, p = l->pack.parallel, m = l->led.strings;
    *pt = (lw_point){0};
    pt->depth = depth;
    pt->ocv_v = ocv_v;
    pt->r_cell_ohm = r_cell_ohm;
    double e_v = s * ocv_v;
    double r_pack = s * r_cell_ohm / p;         /* whole pack, as seen by its current */
    double r_share = r_pack * m;                /* pack resistance as seen by one string */
    double r_loop = l->drive.resistor_ohm + r_share;
    lw_status st = LW_OK;
    double i = 0.0, v_led = 0.0, log_i = NAN;
    pt->regulation_margin = 1.0;
    pt->regime = LW_REGIME_PASSIVE;
    switch (l->drive.type) {
    case LW_DRIVE_CONVERTER:
        point_converter(l, e_v, r_pack, fallback, pt);
        break;
    case LW_DRIVE_LINEAR_CC: {
        double set = l->drive.set_a;
        double v_set = lw_led_voltage(&l->led, set, &pt->extrapolated);
        double head = e_v - set * r_loop - l->led.count * v_set;
        pt->regulation_margin = head - l->drive.dropout_v;
        if (pt->regulation_margin >= 0.0) {
            pt->regime = LW_REGIME_REGULATED;
            i = set;
            v_led = v_set;
        } else {
            pt->regime = LW_REGIME_SATURATED;
            pt->extrapolated = false;
            st = lw_led_solve_vl(&l->led, e_v - l->drive.dropout_v, r_loop, &i, &v_led, &log_i,
                                 &pt->extrapolated, err);
        }
        if (st == LW_OK)
            fill_string(l, pt, i, log_i, v_led, e_v, r_pack);
        break;
    }
    case LW_DRIVE_RESISTOR:
    default:
        st = lw_led_solve_vl(&l->led, e_v, r_loop, &i, &v_led, &log_i, &pt->extrapolated, err);
        if (st == LW_OK)
            fill_string(l, pt, i, log_i, v_led, e_v, r_pack);
        break;
    }
    if (st != LW_OK)
        return st;
    if (pt->regime != LW_REGIME_DROPOUT) {
        double ic_avg = pt->pack_avg_a / p;
        /* ln ic from the LED's ln I where the cells carry the strings alone */
        double log_ic = l->drive.type != LW_DRIVE_CONVERTER && isfinite(log_i)
                            ? log_i + lw_number_memo_log(&l->memo_share, cell_share(l))
                            : NAN;
        /* discharge by the current plus self-discharge of the charge left */
        double rate = lw_cell_self_discharge_per_h(&l->pack.cell) * (1.0 - depth);
        if (ic_avg > 0.0)
            rate += ic_avg / lw_cell_capacity_ah_at(&l->pack.cell, ic_avg, log_ic, l->cap_factor);
        pt->dtdd_h = rate > 0.0 ? 1.0 / rate : INFINITY;
    }
    return LW_OK;
}

/* The node temperatures the point's heat gives, from the state *s. */
static void point_temps(const lw_light *l, const lw_point *pt, const lw_temps *s, lw_temps *t)
{
    const lw_thermal *th = &l->thermal;
    double q_led = l->led.heat_fraction * pt->p_led_w;
    double q_per = q_led / (l->led.count * l->led.strings);
    double q_other = th->losses_in_body ? pt->p_res_w + pt->p_int_w + pt->p_drv_w : 0.0;
    *t = *s;
    lw_thermal_nodes(th, l->pack.ambient_c, q_led, q_per, q_other, t);
}

/* The point with the junctions at x (w: the light with the foldback
 * applied), the node temperatures its heat gives in *t, and the map's
 * residual g = T_j(heat at x) - x in *g. */
static lw_status junction_residual(const lw_light *l, lw_light *w, double depth, double ocv_v,
                                   double r_cell_ohm, bool fallback, const lw_temps *s, double x,
                                   lw_point *pt, lw_temps *t, double *g, lw_error *err)
{
    w->led.t_junction_c = x;
    lw_status st = point_electrical(w, depth, ocv_v, r_cell_ohm, fallback, pt, err);
    if (st != LW_OK)
        return st;
    point_temps(l, pt, s, t);
    *g = t->junction_c - x;
    return LW_OK;
}

/* The point at the board and body state *s with the driver's foldback
 * factor `fold`, the junction solved with the LEDs' own heat. */
static lw_status point_folded(const lw_light *l, double depth, double ocv_v, double r_cell_ohm,
                              bool fallback, lw_temps s, double fold, lw_point *pt,
                              lw_error *err)
{
    const double ta = l->pack.ambient_c;
    lw_light w = *l; /* shallow: tables borrowed, never freed here */
    if (fold < 1.0) {
        if (l->drive.type == LW_DRIVE_RESISTOR)
            w.drive.duty_pct *= fold;
        else
            w.drive.set_a *= fold;
    }
    /* g(T) = F(T) - T, F the junction temperature the point at T gives.  The
     * heat is never negative, so g >= 0 at the coldest node: the lower end
     * of a bracket.  Upwards by fixed-point and secant steps (doubling when
     * they stall) until g < 0 closes the bracket, then the Illinois variant
     * of regula falsi inside it (Dowell and Jarratt, BIT 11, 1971).  With a
     * hint (s.junction_c, a neighbouring point's), secant steps from it
     * first: the map's slope is a few per cent, so two or three reach the
     * tolerance; the bracket from scratch when they do not. */
    double a = fmin(ta, fmin(s.board_c, s.body_c)), ga = NAN, b = NAN, gb = NAN;
    double x = a;
    int side = 0;
    lw_temps t;
    if (isfinite(s.junction_c) && s.junction_c >= a && s.junction_c < ta + LW_THERMAL_RUNAWAY_K) {
        double x0 = s.junction_c, g0 = NAN;
        for (int it = 0; it < LW_THERMAL_HINT_STEPS; it++) {
            double g;
            lw_status st = junction_residual(l, &w, depth, ocv_v, r_cell_ohm, fallback, &s, x0,
                                             pt, &t, &g, err);
            if (st != LW_OK)
                return st;
            if (fabs(g) <= LW_THERMAL_TOL * (273.15 + fabs(x0))) {
                pt->temps = t;
                pt->temps.junction_c = x0;
                return LW_OK;
            }
            /* the fixed-point step first, then secants */
            double next = isnan(g0) || g == g0 ? x0 + g : x0 - g * (x0 - x) / (g - g0);
            if (!(next >= a && next < ta + LW_THERMAL_RUNAWAY_K))
                break;
            x = x0, g0 = g, x0 = next;
        }
        x = a; /* the bracket from the coldest node */
    }
    for (int it = 0; it < LW_THERMAL_ITER_MAX; it++) {
        double g;
        lw_status st = junction_residual(l, &w, depth, ocv_v, r_cell_ohm, fallback, &s, x, pt, &t,
                                         &g, err);
        if (st != LW_OK)
            return st;
        /* converged: the map returns x to a few hundred ulps of the absolute
         * temperature, or the bracket pins it that closely (a kink of the
         * drive where the map jumps) - so the quadrature sees no noise */
        double tol = LW_THERMAL_TOL * (273.15 + fabs(x));
        if (fabs(g) <= tol || (isfinite(b) && b - a <= tol)) {
            pt->temps = t;
            pt->temps.junction_c = x; /* the temperature the point was solved at */
            return LW_OK;
        }
        double next;
        if (isnan(ga) || (g > 0.0 && isnan(b))) {
            /* still below the root: climb */
            double xa = a, gx = ga;
            a = x, ga = g;
            next = x + g; /* the fixed-point step */
            if (!isnan(gx) && x > xa) {
                /* towards the root by the secant when g falls, never further
                 * than a stride of twice the last step; striding out when g
                 * does not fall (the map's slope is 1 or more there) */
                double stride = x + fmax(g, 2.0 * (x - xa));
                double secant = gx > g ? x - g * (x - xa) / (g - gx) : stride;
                next = fmax(next, fmin(secant, stride));
            }
        } else {
            if (g > 0.0) {
                a = x, ga = g;
                if (side == -1)
                    gb *= 0.5;
                side = -1;
            } else {
                if (!isnan(b) && side == 1)
                    ga *= 0.5;
                b = x, gb = g;
                side = 1;
            }
            next = (ga * b - gb * a) / (ga - gb);
            if (!(next > a && next < b))
                next = 0.5 * (a + b);
        }
        if (next > ta + LW_THERMAL_RUNAWAY_K)
            break;
        x = next;
        if (it == LW_THERMAL_ITER_MAX - 1)
            return lw_error_set(err, LW_ENUMERIC, NULL, 0,
                                "the LED temperature did not converge in %d steps at depth %.4g",
                                LW_THERMAL_ITER_MAX, depth);
    }
    return lw_error_set(err, LW_EINPUT, NULL, 0,
                        "no stable LED temperature within %g K of ambient at depth %.4g: the "
                        "LEDs' heating raises their power faster than the heat path sheds it "
                        "(thermal runaway), or the path is far too poor for the power; check "
                        "[thermal] junction_board_k_w, body_ambient_k_w and [led] "
                        "tc_forward_mv_k, heat_pct",
                        LW_THERMAL_RUNAWAY_K, depth);
}

/* The body without heat capacity: it follows its balance at every instant. */
static bool body_static(const lw_thermal *th)
{
    return th->r_bb_k_w > 0.0 ? th->c_h_j_k == 0.0 : th->c_b_j_k + th->c_h_j_k == 0.0;
}

/* A foldback on a body at its balance: the body temperature T is a fixed
 * point of B(fold(T)), B(f) the body's balance with the driver at factor f.
 * B rises with f and fold falls with T, so G(T) = B(fold(T)) - T falls: one
 * root, between B(f_min) (G >= 0) and B(1) (G <= 0), found by the Illinois
 * variant of regula falsi (Dowell and Jarratt, BIT 11, 1971). */
static lw_status point_static_foldback(const lw_light *l, double depth, double ocv_v,
                                       double r_cell_ohm, bool fallback, lw_temps s,
                                       lw_point *pt, lw_error *err)
{
    const lw_thermal *th = &l->thermal;
    lw_status st = point_folded(l, depth, ocv_v, r_cell_ohm, fallback, s, 1.0, pt, err);
    double b = pt->temps.body_c;
    if (st != LW_OK || !(lw_thermal_foldback(th, b) < 1.0))
        return st; /* below the first corner at full output: no foldback */
    st = point_folded(l, depth, ocv_v, r_cell_ohm, fallback, s, th->foldback_min, pt, err);
    double a = pt->temps.body_c;
    if (st != LW_OK || lw_thermal_foldback(th, a) <= th->foldback_min)
        return st; /* above the last corner even at the floor: the floor */
    /* G at the two ends (the first two trials), then regula falsi */
    double ga = NAN, gb = NAN;
    int side = 0;
    for (int it = 0; it < LW_THERMAL_ITER_MAX; it++) {
        double x = isnan(ga) ? a : (isnan(gb) ? b : (ga * b - gb * a) / (ga - gb));
        if (!isnan(ga) && !isnan(gb) && !(x > a && x < b))
            x = 0.5 * (a + b);
        st = point_folded(l, depth, ocv_v, r_cell_ohm, fallback, s, lw_thermal_foldback(th, x),
                          pt, err);
        if (st != LW_OK)
            return st;
        double g = pt->temps.body_c - x;
        double tol = LW_THERMAL_TOL * (273.15 + fabs(x));
        if (fabs(g) <= tol || (!isnan(ga) && !isnan(gb) && b - a <= tol))
            return LW_OK;
        if (isnan(ga)) {
            ga = g;
        } else if (isnan(gb)) {
            gb = g;
        } else if (g > 0.0) {
            a = x, ga = g;
            if (side == -1)
                gb *= 0.5;
            side = -1;
        } else {
            b = x, gb = g;
            if (side == 1)
                ga *= 0.5;
            side = 1;
        }
    }
    return lw_error_set(err, LW_ENUMERIC, NULL, 0,
                        "the body temperature under thermal foldback did not converge in %d "
                        "steps at depth %.4g",
                        LW_THERMAL_ITER_MAX, depth);
}

static lw_status point_state(const lw_light *l, double depth, double ocv_v, double r_cell_ohm,
                             bool fallback, const lw_temps *state, lw_point *pt, lw_error *err)
{
    const double ta = l->pack.ambient_c;
    if (!l->thermal.enabled) {
        lw_status st = point_electrical(l, depth, ocv_v, r_cell_ohm, fallback, pt, err);
        pt->temps = (lw_temps){l->led.t_junction_c, ta, ta};
        return st;
    }
    lw_temps s = state ? *state : (lw_temps){ta, ta, ta};
    if (lw_thermal_has_foldback(&l->thermal) && body_static(&l->thermal))
        return point_static_foldback(l, depth, ocv_v, r_cell_ohm, fallback, s, pt, err);
    return point_folded(l, depth, ocv_v, r_cell_ohm, fallback, s,
                        lw_thermal_foldback(&l->thermal, s.body_c), pt, err);
}

lw_status lw_light_point_state(const lw_light *l, double depth, double ocv_v, double r_cell_ohm,
                               bool fallback, const lw_temps *state, lw_point *pt, lw_error *err)
{
    lw_status st = point_state(l, depth, ocv_v, r_cell_ohm, fallback, state, pt, err);
    pt->weak_cell_v = pt->cell_v; /* every cell alike; lw_light_point_depth knows better */
    return st;
}

lw_status lw_light_point_at(const lw_light *l, double depth, double ocv_v, double r_cell_ohm,
                            bool fallback, lw_point *pt, lw_error *err)
{
    return lw_light_point_state(l, depth, ocv_v, r_cell_ohm, fallback, NULL, pt, err);
}

bool lw_light_has_spread(const lw_light *l)
{
    return l->pack.series > 1 && (l->pack.capacity_spread > 0.0 || l->pack.resistance_spread > 0.0);
}

double lw_light_depth_end(const lw_light *l)
{
    return lw_light_has_spread(l) ? 1.0 - l->pack.capacity_spread : 1.0;
}

void lw_light_cells(const lw_light *l, double depth, lw_cells *out)
{
    const lw_cell *c = &l->pack.cell;
    double ocv = lw_interp_linear(c->ocv, depth);
    double r = lw_interp_linear(c->res, depth) * l->res_factor;
    if (!lw_light_has_spread(l)) {
        *out = (lw_cells){ocv, r, ocv, r, depth};
        return;
    }
    const double s = l->pack.series;
    double dw = fmin(1.0, depth / (1.0 - l->pack.capacity_spread));
    double ow = lw_interp_linear(c->ocv, dw);
    double rw = lw_interp_linear(c->res, dw) * l->res_factor * (1.0 + l->pack.resistance_spread);
    *out = (lw_cells){((s - 1.0) * ocv + ow) / s, ((s - 1.0) * r + rw) / s, ow, rw, dw};
}

double lw_light_knot_above(const lw_light *l, double d)
{
    const double end = lw_light_depth_end(l);
    const double scale[2] = {1.0, end};
    double k = end;
    const lw_interp *t[2] = {l->pack.cell.ocv, l->pack.cell.res};
    for (int w = 0; w < (end < 1.0 ? 2 : 1); w++)
        for (int j = 0; j < 2; j++) {
            double x = lw_interp_corner_above(t[j], d / scale[w]);
            while (scale[w] * x <= d) /* the division's rounding */
                x = lw_interp_corner_above(t[j], x);
            k = fmin(k, scale[w] * x);
        }
    return k;
}

lw_status lw_light_point_depth(const lw_light *light, double depth, bool fallback,
                               const lw_temps *state, lw_point *pt, lw_error *err)
{
    lw_cells c;
    lw_light_cells(light, depth, &c);
    lw_status st = lw_light_point_state(light, depth, c.ocv_v, c.r_ohm, fallback, state, pt, err);
    if (st == LW_OK && lw_light_has_spread(light))
        pt->weak_cell_v = c.weak_ocv_v - pt->cell_a * c.weak_r_ohm;
    return st;
}

lw_status lw_light_point(const lw_light *light, double depth, bool fallback, lw_point *pt,
                         lw_error *err)
{
    return lw_light_point_depth(light, depth, fallback, NULL, pt, err);
}

double lw_light_stored_depth(const lw_light *l)
{
    double m = l->pack.stored_months;
    if (!(m > 0))
        return 0.0;
    const lw_cell *c = &l->pack.cell;
    double kept = exp(-lw_cell_self_discharge_per_h(c) * m * LW_HOURS_PER_MONTH);
    double cap_ah = c->capacity_ah * l->cap_factor * l->pack.parallel;
    double drained = cap_ah > 0 ? l->drive.standby_a * m * LW_HOURS_PER_MONTH / cap_ah : 0.0;
    double d = 1.0 - kept + drained;
    return d < 0.0 ? 0.0 : (d > 1.0 ? 1.0 : d);
}
