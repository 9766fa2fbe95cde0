/*
 * resistor.c - the series resistor as a part (see resistor.h).
 */
#include "lampwick/resistor.h"

#include <math.h>
#include "lampwick/engine.h"
#include "lampwick/eseries.h"
#include "lampwick/roots.h"

const double lw_resistor_ratings_w[] = {0.063, 0.1, 0.125, 0.25, 0.333, 0.5, 0.75,
                                        1.0,   2.0, 3.0,   5.0,  10.0};
const size_t lw_resistor_nratings = sizeof lw_resistor_ratings_w / sizeof lw_resistor_ratings_w[0];

/* The search range of resistances, log10(ohm): 1 mohm to 100 Mohm. */
#define LOG_R_MIN (-3.0)
#define LOG_R_MAX 8.0
/* Brent on log10(R): 1e-10 decades is a relative error of 2.3e-10 in R,
 * far inside any resistor tolerance; 200 iterations bound the work (Brent
 * needs at most a few dozen here). */
#define ROOT_TOL_LOG_R 1e-10
#define ROOT_ITER_MAX 200

double lw_resistor_rating_w(double p_w)
{
    for (size_t i = 0; i < lw_resistor_nratings; i++)
        if (lw_resistor_ratings_w[i] >= LW_RESISTOR_DERATING * p_w)
            return lw_resistor_ratings_w[i];
    return NAN;
}

double lw_resistor_tolerance_pct(const lw_light *light, bool tolerance_given, int eseries)
{
    return tolerance_given ? light->drive.tolerance_pct : lw_eseries_tolerance_pct(eseries);
}

lw_status lw_resistor_point(const lw_light *light, double r_ohm, bool worst, lw_point *pt,
                            lw_error *err)
{
    lw_light w = *light; /* shallow: tables borrowed, never freed here */
    w.drive.resistor_ohm = r_ohm;
    return worst ? lw_run_worst_case(&w, pt, err) : lw_light_point(&w, 0.0, false, pt, err);
}

typedef struct search {
    const lw_light *light;
    bool worst;
    int what; /* 0: LED current, 1: light output, 2: resistor power */
    double target;
    lw_status st;
    lw_error *err;
} search;

/* Quantity minus target as a function of log10(R). */
static double excess(double log_r, void *vctx)
{
    search *c = vctx;
    lw_point pt;
    lw_status st = lw_resistor_point(c->light, pow(10.0, log_r), c->worst, &pt, c->err);
    if (st != LW_OK) {
        c->st = st;
        return NAN;
    }
    double q = c->what == 0 ? pt.led_a : c->what == 1 ? pt.flux_lm : pt.p_res_peak_w;
    return q - c->target;
}

/* Root of excess on [lo, hi] (log10 ohm), given the values at the ends of
 * opposite sign. */
static lw_status root(search *c, double lo, double hi, double flo, double fhi, double *r_ohm)
{
    double x;
    lw_status st =
        lw_root_brent(excess, c, lo, hi, flo, fhi, ROOT_TOL_LOG_R, ROOT_ITER_MAX, &x, c->err);
    if (st == LW_OK && c->st != LW_OK)
        st = c->st;
    if (st == LW_OK)
        *r_ohm = pow(10.0, x);
    return st;
}

lw_status lw_resistor_for(const lw_light *light, lw_target_kind kind, double target, bool worst,
                          double *r_ohm, lw_error *err)
{
    search c = {light, worst, kind == LW_TARGET_CURRENT ? 0 : 1, target, LW_OK, err};
    double flo = excess(LOG_R_MIN, &c), fhi = excess(LOG_R_MAX, &c);
    if (c.st != LW_OK)
        return c.st;
    if (!(flo > 0.0)) {
        *r_ohm = 0.0;
        return LW_OK;
    }
    if (fhi >= 0.0) {
        *r_ohm = INFINITY;
        return LW_OK;
    }
    return root(&c, LOG_R_MIN, LOG_R_MAX, flo, fhi, r_ohm);
}

lw_status lw_resistor_min_safe(const lw_light *light, int eseries, double max_w, double *r_ohm,
                               lw_error *err)
{
    double r_led;
    lw_status st = lw_resistor_for(light, LW_TARGET_CURRENT, light->led.max_current_a, true,
                                   &r_led, err);
    if (st != LW_OK)
        return st;
    if (!isfinite(r_led)) {
        *r_ohm = INFINITY;
        return LW_OK;
    }
    if (!(max_w > 0))
        max_w = lw_resistor_ratings_w[lw_resistor_nratings - 1] / LW_RESISTOR_DERATING;
    double r = lw_eseries_round(eseries, fmax(r_led, pow(10.0, LOG_R_MIN)), true);
    search c = {light, true, 2, max_w, LW_OK, err};
    double f = excess(log10(r), &c);
    if (c.st != LW_OK)
        return c.st;
    if (f > 0.0) {
        /* too hot: beyond the power peak the dissipation falls with R */
        double fhi = excess(LOG_R_MAX, &c);
        if (c.st != LW_OK)
            return c.st;
        if (!(fhi < 0.0)) {
            *r_ohm = INFINITY;
            return LW_OK;
        }
        double r2;
        st = root(&c, log10(r), LOG_R_MAX, f, fhi, &r2);
        if (st != LW_OK)
            return st;
        r = lw_eseries_round(eseries, r2, true);
    }
    *r_ohm = r;
    return LW_OK;
}
