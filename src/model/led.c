/*
 * led.c - LED I-V models, flux, and the series-loop solution (see led.h).
 */
#include "lampwick/led.h"

#include <math.h>
#include "lampwick/roots.h"

const char *const lw_led_model_names[LW_LED_MODEL_COUNT + 1] = {"constant", "linear", "shockley",
                                                                 "table", NULL};

void lw_led_clear(lw_led *led)
{
    if (!led)
        return;
    lw_interp_free(led->iv);
    lw_interp_free(led->flux);
    led->iv = led->flux = NULL;
}

void lw_led_prepare(lw_led *led)
{
    led->memo_is = lw_number_memo_of(led->saturation_a);
    led->memo_flux_i = lw_number_memo_of(led->flux_current_a);
}

void lw_led_copy(lw_led *dst, const lw_led *src)
{
    *dst = *src;
    lw_interp_ref(dst->iv);
    lw_interp_ref(dst->flux);
}

double lw_led_thermal_shift_v(const lw_led *led)
{
    return led->tc_forward_v_k * (led->t_junction_c - led->junction_c);
}

double lw_led_thermal_flux_factor(const lw_led *led)
{
    return fmax(0.0, 1.0 + led->tc_flux_per_k * (led->t_junction_c - led->junction_c));
}

double lw_led_thermal_voltage(double temp_c)
{
    return LW_BOLTZMANN_J_K * (temp_c + 273.15) / LW_ELEMENTARY_C;
}

/* Table read with the documented ends: clamp below, continue on the last
 * slope above. */
static double table_extended(const lw_interp *t, double x, bool *extrapolated)
{
    double xe = t->x[t->n - 1];
    if (x > xe) {
        if (extrapolated)
            *extrapolated = true;
        return t->y[t->n - 1] + (x - xe) * lw_interp_end_slope(t);
    }
    return lw_interp_cubic(t, x);
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
        v = led->ideality * lw_led_thermal_voltage(led->junction_c) *
                log1p(i_a / led->saturation_a) +
            led->series_ohm * i_a;
        break;
    case LW_LED_TABLE:
    default:
        v = table_extended(led->iv, i_a, extrapolated);
        break;
    }
    return led->v_scale * v + lw_led_thermal_shift_v(led);
}

double lw_led_flux(const lw_led *led, double i_a, bool *extrapolated)
{
    return lw_led_flux_at(led, i_a, NAN, extrapolated);
}

double lw_led_flux_at(const lw_led *led, double i_a, double log_i, bool *extrapolated)
{
    if (i_a <= 0.0)
        return 0.0;
    double k = lw_led_thermal_flux_factor(led);
    if (led->flux)
        return k * table_extended(led->flux, i_a, extrapolated);
    if (led->flux_exponent == 1.0)
        return k * led->flux_lm * (i_a / led->flux_current_a);
    if (!isfinite(log_i))
        log_i = log(i_a);
    double log_u = log_i - lw_number_memo_log(&led->memo_flux_i, led->flux_current_a);
    return k * led->flux_lm * exp(led->flux_exponent * log_u);
}

/* Closed form for the diode with series resistance (Banwell & Jayakumar):
 * with a = N*n*Vt and R the whole loop resistance,
 *   I = (a/R) * omega(ln(Is*R/a) + (E + Is*R)/a) - Is,
 * and for R = 0 the limit I = Is*(exp(E/a) - 1).  ln I comes with it:
 * ln(a/R) + ln omega + ln(1 - Is*R/(a*omega)), the last term -Is*R/(a*omega)
 * to rounding wherever the LED conducts (Is*R/a is below 1e-8 of omega). */
static lw_status solve_shockley(const lw_led *led, double e_v, double r_ohm, double *i_a,
                                double *log_i, lw_error *err)
{
    double a = led->count * led->v_scale * led->ideality * lw_led_thermal_voltage(led->junction_c);
    double is = led->saturation_a;
    double r = r_ohm + led->count * led->v_scale * led->series_ohm;
    double i;
    *log_i = NAN;
    if (r > 0.0) {
        double log_ar = log(a / r), eps = is * r / a;
        double x = lw_number_memo_log(&led->memo_is, is) - log_ar + (e_v + is * r) / a;
        double log_w, w = lw_root_wright_omega_log(x, &log_w);
        i = (a / r) * w - is;
        if (i > 0.0 && eps < 1e-8 * w)
            *log_i = log_ar + log_w - eps / w;
    } else {
        i = is * expm1(e_v / a);
        if (!isfinite(i))
            return lw_error_set(err, LW_EINPUT, NULL, 0,
                                "the LED loop has no series resistance: the current is unbounded");
    }
    *i_a = i > 0.0 ? i : 0.0;
    return LW_OK;
}

/* Table model: the residual f(I) = E - I*R - N*s*V(I) falls monotonically in
 * I (V is a non-decreasing monotone cubic).  At the knots it needs no
 * interpolation, so the knot interval holding the root is found by
 * bisection over the knots; inside it f is one cubic, solved by Newton's
 * method safeguarded by bisection.  Below the first knot V is held constant
 * and above the last it continues on the last slope: f is linear there. */
static double knot_residual(const lw_led *led, double e_v, double r_ohm, size_t k)
{
    const lw_interp *t = led->iv;
    return e_v - t->x[k] * r_ohm - led->count * led->v_scale * t->y[k];
}

static lw_status solve_table(const lw_led *led, double e_v, double r_ohm, double *i_a,
                             bool *extrapolated, lw_error *err)
{
    const lw_interp *t = led->iv;
    const double nv = led->count * led->v_scale;
    const size_t n = t->n;
    if (e_v - nv * t->y[0] <= 0.0) {
        *i_a = 0.0;
        return LW_OK;
    }
    if (knot_residual(led, e_v, r_ohm, 0) <= 0.0) {
        /* root below the first point, where V = y[0]; r_ohm > 0 here */
        *i_a = (e_v - nv * t->y[0]) / r_ohm;
        return LW_OK;
    }
    if (knot_residual(led, e_v, r_ohm, n - 1) > 0.0) {
        double slope = lw_interp_end_slope(t);
        double denom = r_ohm + nv * slope;
        if (!(denom > 0.0))
            return lw_error_set(err, LW_EINPUT, NULL, 0,
                                "the LED table never reaches the supply voltage: the current is "
                                "unbounded");
        *i_a = t->x[n - 1] + knot_residual(led, e_v, r_ohm, n - 1) / denom;
        if (extrapolated)
            *extrapolated = true;
        return LW_OK;
    }
    size_t lo = 0, hi = n - 1; /* f(x[lo]) > 0 >= f(x[hi]) */
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (knot_residual(led, e_v, r_ohm, mid) > 0.0)
            lo = mid;
        else
            hi = mid;
    }
    double a = t->x[lo], b = t->x[hi], h = b - a;
    double y0 = t->y[lo], dy = t->y[hi] - t->y[lo], m0 = h * t->m[lo], m1 = h * t->m[hi];
    double x = a + h * knot_residual(led, e_v, r_ohm, lo) /
                       (knot_residual(led, e_v, r_ohm, lo) - knot_residual(led, e_v, r_ohm, hi));
    double xa = a, xb = b;
    for (int it = 0; it < 60; it++) {
        double s = (x - a) / h, s2 = s * s, s3 = s2 * s;
        double v = y0 + dy * (3 * s2 - 2 * s3) + m0 * (s3 - 2 * s2 + s) + m1 * (s3 - s2);
        double dv = (dy * (6 * s - 6 * s2) + m0 * (3 * s2 - 4 * s + 1) + m1 * (3 * s2 - 2 * s)) / h;
        double f = e_v - x * r_ohm - nv * v, df = -r_ohm - nv * dv;
        if (f > 0.0)
            xa = x;
        else
            xb = x;
        double step = df < 0.0 ? -f / df : 0.0;
        double xn = x + step;
        bool inside = xn > xa && xn < xb && df < 0.0;
        if (!inside)
            xn = 0.5 * (xa + xb); /* Newton left the bracket: bisect */
        /* the error after a Newton step is |f''/(2 f')| step^2 on this cubic:
         * below 1e-15 of the current, the step is the last */
        double d2v = (dy * (6 - 12 * s) + m0 * (6 * s - 4) + m1 * (6 * s - 2)) / (h * h);
        bool last = inside && fabs(nv * d2v / (2.0 * df)) * step * step <= 1e-15 * fabs(xn);
        if (last || fabs(xn - x) <= 1e-14 * fabs(xn) || xb - xa <= 1e-14 * fabs(xb)) {
            *i_a = xn;
            return LW_OK;
        }
        x = xn;
    }
    return lw_error_set(err, LW_ENUMERIC, NULL, 0,
                        "the LED table solution did not converge in 60 steps");
}

static lw_status solve_logged(const lw_led *led, double e_v, double r_ohm, double *i_a,
                              double *log_i, bool *extrapolated, lw_error *err)
{
    *log_i = NAN;
    if (!(e_v > 0.0)) {
        *i_a = 0.0;
        return LW_OK;
    }
    /* the junction's shift of every LED's voltage moves the loop's EMF */
    e_v -= led->count * lw_led_thermal_shift_v(led);
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
        return solve_shockley(led, e_v, r_ohm, i_a, log_i, err);
    case LW_LED_TABLE:
    default:
        return solve_table(led, e_v, r_ohm, i_a, extrapolated, err);
    }
    *i_a = i;
    return LW_OK;
}

lw_status lw_led_solve(const lw_led *led, double e_v, double r_ohm, double *i_a,
                       bool *extrapolated, lw_error *err)
{
    double log_i;
    return solve_logged(led, e_v, r_ohm, i_a, &log_i, extrapolated, err);
}

lw_status lw_led_solve_v(const lw_led *led, double e_v, double r_ohm, double *i_a,
                         double *v_led, bool *extrapolated, lw_error *err)
{
    double log_i;
    return lw_led_solve_vl(led, e_v, r_ohm, i_a, v_led, &log_i, extrapolated, err);
}

lw_status lw_led_solve_vl(const lw_led *led, double e_v, double r_ohm, double *i_a,
                          double *v_led, double *log_i, bool *extrapolated, lw_error *err)
{
    lw_status st = solve_logged(led, e_v, r_ohm, i_a, log_i, extrapolated, err);
    if (st != LW_OK)
        return st;
    if (*i_a > 0.0 && led->model != LW_LED_CONSTANT && led->model != LW_LED_LINEAR)
        *v_led = (e_v - *i_a * r_ohm) / led->count;
    else
        *v_led = lw_led_voltage(led, *i_a, NULL);
    return LW_OK;
}
