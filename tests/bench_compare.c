/*
 * bench_compare.c - benchmark: lampwick side by side with other ways of
 * computing the same discharge, for every bundled profile and mode, in one
 * process (so the ratios hold on a noisy machine).  Run with
 * `meson test -C build-rel --benchmark -v compare`.  Prints; asserts
 * nothing (tests do that).
 *
 * The model is lampwick's own operating point (lw_light_point_depth: the
 * same light, cells, drive and heat path), integrated in time as
 *   dd/dt = 1 / (3600 dtdd_h), dT/dt = the heat path's rates, d(lm s)/dt = flux,
 * until the output falls to the relative cutoff of the 30-s output, the
 * (weakest) cell reaches its end point, or the cells are empty.  Methods:
 *   lampwick   lw_run at its default tolerance (1e-10)
 *   fixed-60s  explicit Euler with a 60-s step, the end by linear
 *              interpolation over the last step (what a spreadsheet does)
 *   rkf45      GSL gsl_odeiv2 Runge-Kutta-Fehlberg 4(5) at 1e-8 relative
 *   rk8pd      GSL gsl_odeiv2 Runge-Kutta Prince-Dormand 8(9) at 1e-8
 * against a reference: GSL rk8pd at 1e-12, or lampwick at rtol 1e-13 when
 * the two disagree by more than 1e-9 (said in the output).  The GSL methods
 * find the end by bisection on the step in which it falls, to 1e-10 of the
 * runtime.  Lights with a step-down chain, a use schedule or kinetic cells
 * are run by lampwick only (their switching and rests have no counterpart
 * here).
 */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include "bench_each.h"

typedef struct model {
    const lw_light *l;
    long solves;
    double ref_lm;      /* the 30-s output (0 until known) */
    bool failed;
} model;

typedef struct outcome {
    double runtime_h, lumen_hours;
    long solves;
    bool ok;
} outcome;

/* The point at state y = (d, T_b, T_h, lm s). */
static bool point(model *m, const double y[], lw_point *pt)
{
    lw_error e;
    lw_error_clear(&e);
    double d = y[0] < 0 ? 0 : (y[0] > 1 ? 1 : y[0]);
    lw_temps s = {NAN, y[1], y[2]};
    m->solves++;
    if (lw_light_point_depth(m->l, d, false, &s, pt, &e) != LW_OK) {
        m->failed = true;
        return false;
    }
    return true;
}

static int rates(double t, const double y[], double dy[], void *params)
{
    (void)t;
    model *m = params;
    const lw_light *l = m->l;
    lw_point pt;
    if (!point(m, y, &pt))
        return GSL_EBADFUNC;
    dy[0] = isfinite(pt.dtdd_h) && pt.dtdd_h > 0 ? 1.0 / (3600.0 * pt.dtdd_h) : 0.0;
    double q_led = l->led.heat_fraction * pt.p_led_w;
    double q_other = l->thermal.losses_in_body ? pt.p_res_w + pt.p_int_w + pt.p_drv_w : 0.0;
    lw_thermal_rates(&l->thermal, l->pack.ambient_c, q_led, q_other, &pt.temps, &dy[1], &dy[2]);
    dy[3] = pt.flux_lm;
    return GSL_SUCCESS;
}

/* The end function: positive while the light runs. */
static double end_g(model *m, const double y[])
{
    lw_point pt;
    if (!point(m, y, &pt))
        return -1.0;
    const lw_light *l = m->l;
    double g = fmin(pt.weak_cell_v - l->cutoff.cell_v, lw_light_depth_end(l) - y[0]);
    if (m->ref_lm > 0)
        g = fmin(g, pt.flux_lm / m->ref_lm - l->cutoff.relative_pct / 100.0);
    if (!isfinite(pt.dtdd_h))
        g = -1.0; /* dark */
    return g;
}

static void start(const lw_light *l, double y[4])
{
    y[0] = 0.0, y[1] = y[2] = l->pack.ambient_c, y[3] = 0.0;
}

/* Explicit Euler at 60 s. */
static outcome fixed_step(const lw_light *l)
{
    model m = {.l = l};
    double y[4], dy[4], t = 0.0;
    start(l, y);
    const double dt = 60.0;
    double g_prev = INFINITY;
    for (long k = 0; k < 10000000; k++) {
        if (rates(t, y, dy, &m) != GSL_SUCCESS)
            break;
        double y1[4];
        for (int i = 0; i < 4; i++)
            y1[i] = y[i] + dt * dy[i];
        t += dt;
        if (m.ref_lm == 0.0 && t >= 30.0) {
            lw_point pt;
            if (!point(&m, y1, &pt))
                break;
            m.ref_lm = pt.flux_lm; /* the output at the first step, 60 s */
        }
        double g = end_g(&m, y1);
        if (!(g > 0.0)) {
            double f = isfinite(g_prev) && g_prev > g ? g_prev / (g_prev - g) : 1.0;
            outcome o = {(t - dt + f * dt) / 3600.0, (y[3] + f * (y1[3] - y[3])) / 3600.0,
                         m.solves, !m.failed};
            return o;
        }
        g_prev = g;
        memcpy(y, y1, sizeof y);
    }
    return (outcome){NAN, NAN, m.solves, false};
}

/* Integrate y from t over dt with a fresh driver of type T at rtol. */
static bool advance(model *m, const gsl_odeiv2_step_type *type, double rtol, double t, double dt,
                    double y[4])
{
    gsl_odeiv2_system sys = {rates, NULL, 4, m};
    gsl_odeiv2_driver *d = gsl_odeiv2_driver_alloc_y_new(&sys, type, fmin(dt, 10.0), 0.0, rtol);
    double t0 = t;
    int st = gsl_odeiv2_driver_apply(d, &t0, t + dt, y);
    gsl_odeiv2_driver_free(d);
    return st == GSL_SUCCESS;
}

/* An adaptive GSL method at rtol: the 30-s point, then step by step until
 * the end function changes sign, then bisection inside that step. */
static outcome adaptive(const lw_light *l, const gsl_odeiv2_step_type *type, double rtol)
{
    model m = {.l = l};
    double y[4];
    start(l, y);
    if (!advance(&m, type, rtol, 0.0, 30.0, y))
        return (outcome){NAN, NAN, m.solves, false};
    lw_point pt;
    if (!point(&m, y, &pt))
        return (outcome){NAN, NAN, m.solves, false};
    m.ref_lm = pt.flux_lm;
    gsl_odeiv2_system sys = {rates, NULL, 4, &m};
    gsl_odeiv2_step *s = gsl_odeiv2_step_alloc(type, 4);
    gsl_odeiv2_control *c = gsl_odeiv2_control_y_new(0.0, rtol);
    gsl_odeiv2_evolve *ev = gsl_odeiv2_evolve_alloc(4);
    double t = 30.0, h = 10.0;
    outcome o = {NAN, NAN, 0, false};
    for (long k = 0; k < 1000000; k++) {
        double y0[4], t0 = t;
        memcpy(y0, y, sizeof y0);
        if (gsl_odeiv2_evolve_apply(ev, c, s, &sys, &t, 1e12, &h, y) != GSL_SUCCESS)
            break;
        if (end_g(&m, y) > 0.0)
            continue;
        /* the end inside [t0, t]: bisection on fresh integrations from t0 */
        double a = 0.0, b = t - t0, yb[4];
        memcpy(yb, y, sizeof yb);
        while (b - a > 1e-10 * t) {
            double mid = 0.5 * (a + b), ym[4];
            memcpy(ym, y0, sizeof ym);
            if (!advance(&m, type, rtol, t0, mid, ym))
                break;
            if (end_g(&m, ym) > 0.0) {
                a = mid;
            } else {
                b = mid;
                memcpy(yb, ym, sizeof yb);
            }
        }
        o = (outcome){(t0 + b) / 3600.0, yb[3] / 3600.0, 0, !m.failed};
        break;
    }
    gsl_odeiv2_evolve_free(ev);
    gsl_odeiv2_control_free(c);
    gsl_odeiv2_step_free(s);
    o.solves = m.solves;
    return o;
}

static outcome lampwick(const lw_light *l, double rtol)
{
    lw_run_options o = lw_run_options_default();
    o.rtol = rtol;
    lw_result r;
    lw_error e;
    lw_error_clear(&e);
    outcome out = {NAN, NAN, 0, false};
    if (lw_run(l, &o, &r, &e) == LW_OK)
        out = (outcome){r.runtime_h, r.lumen_hours, r.solves, true};
    lw_run_result_clear(&r);
    return out;
}

typedef enum { M_LAMPWICK, M_FIXED, M_RKF45, M_RK8PD, M_COUNT } method;
static const char *const method_names[M_COUNT] = {"lampwick", "fixed-60s", "rkf45 1e-8",
                                                  "rk8pd 1e-8"};

static outcome run_method(method k, const lw_light *l)
{
    switch (k) {
    case M_LAMPWICK: return lampwick(l, 1e-10);
    case M_FIXED: return fixed_step(l);
    case M_RKF45: return adaptive(l, gsl_odeiv2_step_rkf45, 1e-8);
    case M_RK8PD:
    default: return adaptive(l, gsl_odeiv2_step_rk8pd, 1e-8);
    }
}

/* Median of 5 timings of as many runs as fill about 40 ms, microseconds per run. */
static double time_method(method k, const lw_light *l)
{
    double samples[5];
    long n = 1;
    double t0 = bench_now_s();
    run_method(k, l);
    double one = bench_now_s() - t0;
    n = one > 0 ? (long)(0.04 / one) : 1000;
    if (n < 1)
        n = 1;
    for (int s = 0; s < 5; s++) {
        t0 = bench_now_s();
        for (long i = 0; i < n; i++)
            run_method(k, l);
        samples[s] = 1e6 * (bench_now_s() - t0) / (double)n;
    }
    for (int i = 1; i < 5; i++)
        for (int j = i; j > 0 && samples[j] < samples[j - 1]; j--) {
            double x = samples[j];
            samples[j] = samples[j - 1];
            samples[j - 1] = x;
        }
    return samples[2];
}

static double rel(double got, double want)
{
    return fabs(got - want) / fabs(want);
}

static void compare(const lw_light *l, const char *label)
{
    printf("\n%s\n", label);
    bool own_only = l->chain || l->use || lw_cell_is_kinetic(&l->pack.cell);
    outcome ref_gsl = own_only ? (outcome){0} : adaptive(l, gsl_odeiv2_step_rk8pd, 1e-12);
    outcome ref_lw = lampwick(l, 1e-13);
    outcome ref = ref_lw;
    const char *which = "lampwick at 1e-13";
    if (!own_only && ref_gsl.ok) {
        if (rel(ref_gsl.runtime_h, ref_lw.runtime_h) <= 1e-9 &&
            rel(ref_gsl.lumen_hours, ref_lw.lumen_hours) <= 1e-9) {
            ref = ref_gsl;
            which = "GSL rk8pd at 1e-12 (lampwick at 1e-13 agrees to 1e-9)";
        } else {
            which = "lampwick at 1e-13 (GSL rk8pd at 1e-12 differs by more than 1e-9: its end "
                    "search)";
        }
    }
    printf("  reference: %s: runtime %.10g h, %.10g lm h%s\n", which, ref.runtime_h,
           ref.lumen_hours, own_only ? " (chain, schedule or kinetic cells: lampwick only)" : "");
    printf("  %-12s %12s %12s %10s %12s %10s\n", "method", "err runtime", "err lm h", "solves",
           "us/run", "x lampwick");
    double base_us = NAN;
    for (int k = 0; k < M_COUNT; k++) {
        if (own_only && k != M_LAMPWICK)
            continue;
        outcome o = run_method((method)k, l);
        double us = time_method((method)k, l);
        if (k == M_LAMPWICK)
            base_us = us;
        if (!o.ok) {
            /* explicit Euler at 60 s on a heat path with time constants of
             * seconds is unstable: the temperatures run away */
            printf("  %-12s %12s %12s %10ld %12s %10s\n", method_names[k], "failed", "failed",
                   o.solves, "-", "-");
            continue;
        }
        printf("  %-12s %12.2e %12.2e %10ld %12.1f %10.2f\n", method_names[k],
               rel(o.runtime_h, ref.runtime_h), rel(o.lumen_hours, ref.lumen_hours), o.solves,
               us, us / base_us);
    }
}

static void each(const lw_profile *p, const char *label, const char *mode, void *ctx)
{
    (void)mode, (void)ctx;
    compare(&p->light, label);
}

int main(void)
{
    gsl_set_error_handler_off();
    printf("lampwick against other methods on the same model (release build, one core; "
           "medians of 5)\n");
    return bench_each(each, NULL);
}
