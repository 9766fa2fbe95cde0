/*
 * led.c - LED I-V models, flux, and the series-loop solution (see led.h).
 */
#include "led.h"

#include <math.h>
#include "roots.h"

const char *const lw_led_model_names[LW_LED_MODEL_COUNT + 1] = {"constant", "linear", "shockley",
                                                                 "table", NULL};

void lw_led_clear(lw_led *led)
{
    if (!led)
        return;
    lw_table_free(led->iv);
    lw_table_free(led->flux);
    led->iv = led->flux = NULL;
}

void lw_led_copy(lw_led *dst, const lw_led *src)
{
    *dst = *src;
    lw_table_ref(dst->iv);
    lw_table_ref(dst->flux);
}

double lw_thermal_voltage(double temp_c)
{
    return LW_BOLTZMANN_J_K * (temp_c + 273.15) / LW_ELEMENTARY_C;
}

/* Table read with the documented ends: clamp below, continue on the last
 * slope above. */
static double table_extended(const lw_table *t, double x, bool *extrapolated)
{
    double xe = t->x[t->n - 1];
    if (x > xe) {
        if (extrapolated)
            *extrapolated = true;
        return t->y[t->n - 1] + (x - xe) * lw_table_end_slope(t);
    }
    return lw_table_cubic(t, x);
}

double lw_led_voltage(const lw_led *led, double i_a, bool *extrapolated)
{
    double v;
    switch (led->model) {
    case LW_LED_CONSTANT:
        v = led->forward_v;
        break;
    case LW_LED_LINEAR:
        v = led->threshold_v + led->slope_ohm * i_a;
        break;
    case LW_LED_SHOCKLEY:
        v = led->ideality * lw_thermal_voltage(led->junction_c) * log1p(i_a / led->saturation_a) +
            led->series_ohm * i_a;
        break;
    case LW_LED_TABLE:
    default:
        v = table_extended(led->iv, i_a, extrapolated);
        break;
    }
    return led->v_scale * v;
}

double lw_led_flux(const lw_led *led, double i_a, bool *extrapolated)
{
    if (i_a <= 0.0)
        return 0.0;
    if (led->flux)
        return table_extended(led->flux, i_a, extrapolated);
    double u = i_a / led->flux_current_a;
    if (led->flux_exponent == 1.0)
        return led->flux_lm * u;
    return led->flux_lm * exp(led->flux_exponent * log(u));
}

/* Closed form for the diode with series resistance (Banwell & Jayakumar):
 * with a = N*n*Vt and R the whole loop resistance,
 *   I = (a/R) * omega(ln(Is*R/a) + (E + Is*R)/a) - Is,
 * and for R = 0 the limit I = Is*(exp(E/a) - 1). */
static lw_status solve_shockley(const lw_led *led, double e_v, double r_ohm, double *i_a,
                                lw_error *err)
{
    double a = led->count * led->v_scale * led->ideality * lw_thermal_voltage(led->junction_c);
    double is = led->saturation_a;
    double r = r_ohm + led->count * led->v_scale * led->series_ohm;
    double i;
    if (r > 0.0) {
        double x = log(is * r / a) + (e_v + is * r) / a;
        i = (a / r) * lw_wright_omega(x) - is;
    } else {
        i = is * expm1(e_v / a);
        if (!isfinite(i))
            return lw_error_set(err, LW_EINPUT, NULL, 0,
                                "the LED loop has no series resistance: the current is unbounded");
    }
    *i_a = i > 0.0 ? i : 0.0;
    return LW_OK;
}

struct table_loop {
    const lw_led *led;
    double e_v, r_ohm;
    bool *extrapolated;
};

static double table_residual(double i, void *ctx)
{
    const struct table_loop *c = ctx;
    return c->e_v - i * c->r_ohm - c->led->count * lw_led_voltage(c->led, i, c->extrapolated);
}

static lw_status solve_table(const lw_led *led, double e_v, double r_ohm, double *i_a,
                             bool *extrapolated, lw_error *err)
{
    bool ext = false;
    struct table_loop c = {led, e_v, r_ohm, &ext};
    double f0 = table_residual(0.0, &c);
    if (f0 <= 0.0) {
        *i_a = 0.0;
        return LW_OK;
    }
    /* Upper bracket: the residual falls at least as fast as -I*R, and beyond
     * the table V rises on the last slope; double until the sign changes. */
    double hi = r_ohm > 0.0 ? e_v / r_ohm : led->iv->x[led->iv->n - 1];
    double fhi = table_residual(hi, &c);
    for (int k = 0; fhi > 0.0 && k < 200; k++) {
        hi *= 2.0;
        fhi = table_residual(hi, &c);
    }
    if (fhi > 0.0)
        return lw_error_set(err, LW_EINPUT, NULL, 0,
                            "the LED table never reaches the supply voltage: the current is "
                            "unbounded");
    double root;
    lw_status st = lw_root_brent(table_residual, &c, 0.0, hi, f0, fhi, 1e-12 * hi + 1e-15, 200,
                                 &root, err);
    if (st != LW_OK)
        return st;
    ext = false;
    (void)table_residual(root, &c); /* flag extrapolation at the answer only */
    if (extrapolated && ext)
        *extrapolated = true;
    *i_a = root;
    return LW_OK;
}

lw_status lw_led_solve(const lw_led *led, double e_v, double r_ohm, double *i_a,
                       bool *extrapolated, lw_error *err)
{
    double n = led->count * led->v_scale;
    double i;
    switch (led->model) {
    case LW_LED_CONSTANT:
        if (e_v <= n * led->forward_v) {
            i = 0.0;
        } else if (r_ohm > 0.0) {
            i = (e_v - n * led->forward_v) / r_ohm;
        } else {
            return lw_error_set(err, LW_EINPUT, NULL, 0,
                                "a constant-voltage LED with no series resistance draws "
                                "unbounded current");
        }
        break;
    case LW_LED_LINEAR: {
        double rt = r_ohm + n * led->slope_ohm;
        if (e_v <= n * led->threshold_v)
            i = 0.0;
        else if (rt > 0.0)
            i = (e_v - n * led->threshold_v) / rt;
        else
            return lw_error_set(err, LW_EINPUT, NULL, 0,
                                "a linear LED with no slope and no series resistance draws "
                                "unbounded current");
        break;
    }
    case LW_LED_SHOCKLEY:
        return solve_shockley(led, e_v, r_ohm, i_a, err);
    case LW_LED_TABLE:
    default:
        return solve_table(led, e_v, r_ohm, i_a, extrapolated, err);
    }
    *i_a = i;
    return LW_OK;
}
