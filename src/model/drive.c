/*
 * drive.c - operating point of a light at one depth (see drive.h).
 */
#include "lampwick/drive.h"

#include <math.h>

const char *const lw_drive_type_names[LW_DRIVE_TYPE_COUNT + 1] = {"resistor", "linear-cc",
                                                                   "converter", NULL};
const char *const lw_light_reference_names[LW_REF_COUNT + 1] = {"own", "fresh", NULL};

void lw_light_clear(lw_light *light)
{
    if (!light)
        return;
    lw_cell_clear(&light->pack.cell);
    lw_led_clear(&light->led);
    lw_interp_free(light->drive.efficiency);
    light->drive.efficiency = NULL;
}

void lw_light_copy(lw_light *dst, const lw_light *src)
{
    *dst = *src;
    lw_cell_copy(&dst->pack.cell, &src->pack.cell);
    lw_led_copy(&dst->led, &src->led);
    lw_interp_ref(dst->drive.efficiency);
}

void lw_light_update_factors(lw_light *light, bool *temperature_outside)
{
    lw_cell_temperature_factors(&light->pack.cell, light->pack.ambient_c, &light->cap_factor,
                                &light->res_factor, temperature_outside);
}

bool lw_drive_converter_input_current(double e_v, double r_ohm, double iq_a, double p_w, double *ip_a)
{
    double b = e_v + r_ohm * iq_a;
    double c = e_v * iq_a + p_w;
    double disc = b * b - 4.0 * r_ohm * c;
    if (disc < 0.0 || b <= 0.0)
        return false;
    /* Ip = (b - sqrt(disc)) / (2R) = 2c / (b + sqrt(disc)); the second form
     * has no cancellation and holds at R = 0. */
    *ip_a = 2.0 * c / (b + sqrt(disc));
    return true;
}

static double efficiency_at(const lw_drive *drv, double vin)
{
    if (drv->efficiency)
        return lw_interp_linear(drv->efficiency, vin) / 100.0;
    return drv->efficiency_pct / 100.0;
}

/* Fill the string-side quantities common to the passive and linear drives. */
static void fill_string(const lw_light *l, lw_point *pt, double i, double v_led, double e_v,
                        double r_pack)
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
    pt->flux_lm = duty * m * n * lw_led_flux(&l->led, i, &pt->extrapolated);
}

/* ---- a converter whose efficiency depends on its input voltage ----
 *
 * Power balance at the input: V (Ip - Iq) = P / eta(V), V = E - R Ip, so
 * the input voltage V is a root of
 *     F(V) = g(V) - P / eta(V),   g(V) = V (E - V) / R - V Iq,
 * on the upper branch [Vpk, E], Vpk = (E - R Iq) / 2, where g falls from its
 * maximum (E - R Iq)^2 / 4R to -E Iq.  F(E) < 0; the converter runs at the
 * highest root (the one it reaches as it starts and draws more current from
 * the open-circuit voltage), and none means it cannot be fed.  eta is linear
 * between the table's knots (constant beyond its ends), so on each piece
 * between knots G(V) = eta(V) g(V) - P, which has F's sign, is a cubic: its
 * roots are bracketed exactly between its turning points and found by
 * bisection to the last bit.  No iteration whose convergence depends on the
 * table's slopes (a fixed point on eta(V) oscillates where eta is steep). */

typedef struct {
    double e_v, r, iq, p;  /* open-circuit voltage, resistance, quiescent, power */
    double a, b;           /* eta = a + b V on the piece */
} conv_piece;

static double conv_g(const conv_piece *c, double v)
{
    return (c->a + c->b * v) * (v * (c->e_v - v) / c->r - v * c->iq) - c->p;
}

/* The largest root of G in [lo, hi], where G(hi) < 0; false if none. */
static bool conv_piece_root(const conv_piece *c, double lo, double hi, double *root)
{
    /* turning points: G' = -3 b d V^2 + 2 (b k - a d) V + a k = 0, d = 1/R,
     * k = E/R - Iq */
    const double d = 1.0 / c->r, k = c->e_v / c->r - c->iq;
    const double qa = -3.0 * c->b * d, qb = 2.0 * (c->b * k - c->a * d), qc = c->a * k;
    double cuts[4];
    int nc = 0;
    cuts[nc++] = hi;
    if (qa != 0.0) {
        double disc = qb * qb - 4.0 * qa * qc;
        if (disc >= 0.0) {
            double sq = sqrt(disc), q = -0.5 * (qb + copysign(sq, qb));
            double r1 = q != 0.0 ? q / qa : 0.0, r2 = q != 0.0 ? qc / q : 0.0;
            double hiw = fmax(r1, r2), low = fmin(r1, r2);
            if (hiw < hi && hiw > lo)
                cuts[nc++] = hiw;
            if (low < hi && low > lo && low < hiw)
                cuts[nc++] = low;
        }
    } else if (qb != 0.0) {
        double r1 = -qc / qb;
        if (r1 < hi && r1 > lo)
            cuts[nc++] = r1;
    }
    cuts[nc++] = lo;
    for (int i = 0; i + 1 < nc; i++) {
        double x1 = cuts[i], x0 = cuts[i + 1];
        double g1 = conv_g(c, x1), g0 = conv_g(c, x0);
        if (g1 >= 0.0) { /* a root at the cut itself (touching) */
            *root = x1;
            return true;
        }
        if (g0 < 0.0)
            continue;
        /* G(x0) >= 0 > G(x1), monotone between: bisect to adjacent doubles */
        for (int it = 0; it < 200; it++) {
            double mid = 0.5 * (x0 + x1);
            if (mid <= x0 || mid >= x1)
                break;
            if (conv_g(c, mid) >= 0.0)
                x0 = mid;
            else
                x1 = mid;
        }
        *root = x0;
        return true;
    }
    return false;
}

/* The input voltage of a converter with an efficiency table (fractions of
 * 1 in t->y / 100) at open-circuit e_v, resistance r_ohm > 0, quiescent
 * iq_a and output power p_w: the highest root of F, or false.  Work: a
 * binary search for E's piece, then one cubic per piece walked down. */
static bool converter_vin_table(const lw_interp *t, double e_v, double r_ohm, double iq_a,
                                double p_w, double *vin)
{
    const double vpk = 0.5 * (e_v - r_ohm * iq_a);
    if (!(vpk > 0.0))
        return false;
    conv_piece c = {e_v, r_ohm, iq_a, p_w, 0.0, 0.0};
    /* the knots below E, walked from the top */
    size_t i = e_v >= t->x[t->n - 1] ? t->n : (e_v <= t->x[0] ? 0 : lw_interp_find(t, e_v) + 1);
    double hi = e_v;
    while (hi > vpk) {
        double lo = i > 0 ? fmax(t->x[i - 1], vpk) : vpk;
        double eh = lw_interp_linear(t, hi) / 100.0, el = lw_interp_linear(t, lo) / 100.0;
        c.b = hi > lo ? (eh - el) / (hi - lo) : 0.0;
        c.a = el - c.b * lo;
        if (lo < hi && conv_piece_root(&c, lo, hi, vin))
            return true;
        hi = lo;
        if (i > 0)
            i--;
        else
            break;
    }
    return false;
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
    double eta = efficiency_at(drv, e_v), ip = 0.0;
    bool ok;
    if (drv->efficiency && r_pack > 0.0) {
        /* the efficiency depends on the input voltage, which depends on
         * the current drawn: the highest root of the power balance */
        double v;
        ok = converter_vin_table(drv->efficiency, e_v, r_pack, iq, p_out, &v);
        if (ok) {
            eta = efficiency_at(drv, v);
            ip = (e_v - v) / r_pack;
        } else {
            eta = efficiency_at(drv, 0.5 * (e_v - r_pack * iq)); /* at the peak of g */
        }
    } else {
        ok = lw_drive_converter_input_current(e_v, r_pack, iq, p_out / eta, &ip);
    }
    /* the event function of the dropout: (g_max - P/eta) 4R / E^2, with eta
     * at the operating point (>= 0 there), or at the peak of g when there
     * is none (<= 0: F(Vpk) <= 0 when F has no root) */
    double disc_b = e_v + r_pack * iq;
    double disc = disc_b * disc_b - 4.0 * r_pack * (e_v * iq + p_out / eta);
    double g_disc = disc / (e_v * e_v > 0 ? e_v * e_v : 1.0);
    if (ok && g_disc < 0.0)
        g_disc = 0.0; /* rounding at a tangent root */
    double vin = e_v - ip * r_pack;
    /* the event function of the dropout: negative when dark */
    double margin = g_disc;
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
    pt->flux_lm = duty * m * n * lw_led_flux(&l->led, i, &pt->extrapolated);
}

lw_status lw_light_point_at(const lw_light *l, double depth, double ocv_v, double r_cell_ohm,
                            bool fallback, lw_point *pt, lw_error *err)
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
    double i = 0.0, v_led = 0.0;
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
            st = lw_led_solve_v(&l->led, e_v - l->drive.dropout_v, r_loop, &i, &v_led,
                                &pt->extrapolated, err);
        }
        if (st == LW_OK)
            fill_string(l, pt, i, v_led, e_v, r_pack);
        break;
    }
    case LW_DRIVE_RESISTOR:
    default:
        st = lw_led_solve_v(&l->led, e_v, r_loop, &i, &v_led, &pt->extrapolated, err);
        if (st == LW_OK)
            fill_string(l, pt, i, v_led, e_v, r_pack);
        break;
    }
    if (st != LW_OK)
        return st;
    if (pt->regime != LW_REGIME_DROPOUT) {
        double ic_avg = pt->pack_avg_a / p;
        /* discharge by the current plus self-discharge of the charge left */
        double rate = lw_cell_self_discharge_per_h(&l->pack.cell) * (1.0 - depth);
        if (ic_avg > 0.0)
            rate += ic_avg / lw_cell_capacity_ah(&l->pack.cell, ic_avg, l->cap_factor);
        pt->dtdd_h = rate > 0.0 ? 1.0 / rate : INFINITY;
    }
    return LW_OK;
}

lw_status lw_light_point(const lw_light *light, double depth, bool fallback, lw_point *pt,
                         lw_error *err)
{
    const lw_cell *c = &light->pack.cell;
    double ocv = lw_interp_linear(c->ocv, depth);
    double r = lw_interp_linear(c->res, depth) * light->res_factor;
    return lw_light_point_at(light, depth, ocv, r, fallback, pt, err);
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
