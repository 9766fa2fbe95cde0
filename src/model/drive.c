/*
 * drive.c - the laws of the drive elements (see drive.h).
 */
#include "lampwick/drive.h"

#include <math.h>

const char *const lw_drive_type_names[LW_DRIVE_TYPE_COUNT + 1] = {"resistor", "linear-cc",
                                                                   "converter", NULL};

bool lw_drive_converter_input_current(double e_v, double r_ohm, double iq_a, double p_w,
                                      double *ip_a)
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

double lw_drive_efficiency(const lw_drive *drv, double vin)
{
    if (drv->efficiency)
        return lw_interp_linear(drv->efficiency, vin) / 100.0;
    return drv->efficiency_pct / 100.0;
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

lw_drive_input lw_drive_converter_input(const lw_drive *drv, double e_v, double r_pack,
                                        double p_out)
{
    const double iq = drv->quiescent_a;
    lw_drive_input in = {0};
    double eta = lw_drive_efficiency(drv, e_v), ip = 0.0;
    bool ok;
    if (drv->efficiency && r_pack > 0.0) {
        /* the efficiency depends on the input voltage, which depends on
         * the current drawn: the highest root of the power balance */
        double v;
        ok = converter_vin_table(drv->efficiency, e_v, r_pack, iq, p_out, &v);
        if (ok) {
            eta = lw_drive_efficiency(drv, v);
            ip = (e_v - v) / r_pack;
        } else {
            eta = lw_drive_efficiency(drv, 0.5 * (e_v - r_pack * iq)); /* at the peak of g */
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
    in.ok = ok;
    in.eta = eta;
    in.ip_a = ip;
    in.vin_v = vin;
    in.supply_margin = g_disc;
    return in;
}
