/*
 * thermal.c - the heat path of a light (see thermal.h).  Units: K/W, J/K,
 * deg C, W, s.  Source: the lumped-capacitance network of thermal.h
 * (Incropera and DeWitt, ch. 3 and 5).
 */
#include "lampwick/thermal.h"

#include <math.h>

bool lw_thermal_quasi_static(const lw_thermal *th)
{
    return !th->enabled || (th->c_b_j_k == 0.0 && th->c_h_j_k == 0.0);
}

void lw_thermal_nodes(const lw_thermal *th, double ambient_c, double q_led_w, double q_per_led_w,
                      double q_other_w, lw_temps *t)
{
    if (!th->enabled) {
        t->board_c = t->body_c = t->junction_c = ambient_c;
        return;
    }
    const double ta = ambient_c, q = q_led_w + q_other_w;
    if (th->r_bb_k_w == 0.0) {
        /* one node: board and body together */
        if (th->c_b_j_k + th->c_h_j_k == 0.0)
            t->body_c = ta + th->r_ha_k_w * q;
        t->board_c = t->body_c;
    } else if (th->c_b_j_k == 0.0) {
        /* quasi-static board: all of Q_led crosses R_bb */
        if (th->c_h_j_k == 0.0)
            t->body_c = ta + th->r_ha_k_w * q;
        t->board_c = t->body_c + th->r_bb_k_w * q_led_w;
    } else if (th->c_h_j_k == 0.0) {
        /* board with a capacity, quasi-static body between it and ambient */
        const double gb = 1.0 / th->r_bb_k_w, ga = 1.0 / th->r_ha_k_w;
        t->body_c = (gb * t->board_c + q_other_w + ga * ta) / (gb + ga);
    }
    t->junction_c = t->board_c + th->r_jb_k_w * q_per_led_w;
}

bool lw_thermal_has_foldback(const lw_thermal *th)
{
    return th->enabled && th->foldback_to_c > th->foldback_from_c;
}

double lw_thermal_resistor_derating(double body_c)
{
    if (!(body_c > LW_RESISTOR_FULL_C))
        return 1.0;
    if (body_c >= LW_RESISTOR_ZERO_C)
        return 0.0;
    return (LW_RESISTOR_ZERO_C - body_c) / (LW_RESISTOR_ZERO_C - LW_RESISTOR_FULL_C);
}

double lw_thermal_foldback(const lw_thermal *th, double body_c)
{
    if (!lw_thermal_has_foldback(th) || body_c <= th->foldback_from_c)
        return 1.0;
    if (body_c >= th->foldback_to_c)
        return th->foldback_min;
    double u = (body_c - th->foldback_from_c) / (th->foldback_to_c - th->foldback_from_c);
    return 1.0 + u * (th->foldback_min - 1.0);
}

void lw_thermal_rates(const lw_thermal *th, double ambient_c, double q_led_w, double q_other_w,
                      const lw_temps *t, double *dboard_k_s, double *dbody_k_s)
{
    *dboard_k_s = *dbody_k_s = 0.0;
    if (!th->enabled)
        return;
    const double to_amb = (t->body_c - ambient_c) / th->r_ha_k_w;
    if (th->r_bb_k_w == 0.0) {
        double c = th->c_b_j_k + th->c_h_j_k;
        if (c > 0.0)
            *dbody_k_s = *dboard_k_s = (q_led_w + q_other_w - to_amb) / c;
        return;
    }
    const double across = (t->board_c - t->body_c) / th->r_bb_k_w;
    if (th->c_b_j_k > 0.0)
        *dboard_k_s = (q_led_w - across) / th->c_b_j_k;
    if (th->c_h_j_k > 0.0) {
        /* with a quasi-static board all of Q_led crosses to the body */
        double in = th->c_b_j_k > 0.0 ? across : q_led_w;
        *dbody_k_s = (in + q_other_w - to_amb) / th->c_h_j_k;
    }
}

void lw_thermal_relax(const lw_thermal *th, double ambient_c, double dt_s, double *board_c,
                      double *body_c)
{
    if (!th->enabled || !(dt_s > 0.0))
        return;
    double yb = *board_c - ambient_c, yh = *body_c - ambient_c;
    if (th->r_bb_k_w == 0.0) {
        /* one node of capacity C_b + C_h */
        double c = th->c_b_j_k + th->c_h_j_k;
        if (c > 0.0)
            yb = yh = yh * exp(-dt_s / (th->r_ha_k_w * c));
    } else if (th->c_b_j_k > 0.0 && th->c_h_j_k > 0.0) {
        /* y' = A y, A = [[-a, a], [b, -(b + g)]]; its eigenvalues are real
         * and negative ((a + b + g)^2 - 4 a g > 0), and
         * e^(A t) = (e^(l1 t) (A - l2 I) - e^(l2 t) (A - l1 I)) / (l1 - l2) */
        double a = 1.0 / (th->c_b_j_k * th->r_bb_k_w), b = 1.0 / (th->c_h_j_k * th->r_bb_k_w);
        double g = 1.0 / (th->c_h_j_k * th->r_ha_k_w);
        double tr = -(a + b + g), disc = sqrt((a + b + g) * (a + b + g) - 4.0 * a * g);
        double l1 = 0.5 * (tr + disc), l2 = 0.5 * (tr - disc);
        double e1 = exp(l1 * dt_s), e2 = exp(l2 * dt_s), d = l1 - l2;
        double m11 = -a, m12 = a, m21 = b, m22 = -(b + g);
        double p11 = (e1 * (m11 - l2) - e2 * (m11 - l1)) / d, p12 = (e1 - e2) * m12 / d;
        double p21 = (e1 - e2) * m21 / d, p22 = (e1 * (m22 - l2) - e2 * (m22 - l1)) / d;
        double nb = p11 * yb + p12 * yh, nh = p21 * yb + p22 * yh;
        yb = nb, yh = nh;
    } else if (th->c_b_j_k > 0.0) {
        /* the body at its balance with no heat: the board cools through
         * R_bb + R_ha */
        yb *= exp(-dt_s / (th->c_b_j_k * (th->r_bb_k_w + th->r_ha_k_w)));
    } else if (th->c_h_j_k > 0.0) {
        /* the board at its balance with no heat: at the body's temperature */
        yh *= exp(-dt_s / (th->c_h_j_k * th->r_ha_k_w));
        yb = yh;
    }
    *board_c = ambient_c + yb;
    *body_c = ambient_c + yh;
}
