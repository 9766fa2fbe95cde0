/*
 * lights.h - lights built in code for the engine and drive tests: a flat
 * cell (constant OCV and R), a sloping alkaline-like cell (invented test
 * data), and a base light to modify.
 */
#ifndef LW_LIGHTS_H
#define LW_LIGHTS_H

#include <lampwick/lampwick.h>

/* ---- building lights in code ---- */

static inline void set_curve(lw_cell *c, const double *d, const double *ocv, const double *r,
                             size_t n)
{
    lw_error e;
    lw_error_clear(&e);
    c->ocv = lw_interp_new(d, ocv, n, &e);
    c->res = lw_interp_new(d, r, n, &e);
    assert_non_null(c->ocv);
    assert_non_null(c->res);
}

static inline void base_light(lw_light *l)
{
    memset(l, 0, sizeof *l);
    lw_text_copy(l->name, "test", sizeof l->name);
    l->pack.series = 1;
    l->pack.parallel = 1;
    l->pack.ambient_c = 20;
    l->pack.cell.chemistry = LW_CHEM_OTHER;
    l->led.count = 1;
    l->led.strings = 1;
    l->led.v_scale = 1;
    l->led.flux_lm = 10;
    l->led.flux_current_a = 0.02;
    l->led.flux_exponent = 1;
    l->led.max_current_a = 1;
    l->drive.type = LW_DRIVE_RESISTOR;
    l->drive.duty_pct = 100;
    l->cutoff.relative_pct = 10;
    l->cutoff.cell_v = 0.1;
    l->cap_factor = l->res_factor = 1;
}

/* A flat cell: constant OCV and resistance at every depth. */
static inline void flat_cell(lw_light *l, double ocv_v, double r_ohm, double c_ah, double rated_a,
                      double k, double cmax_ah)
{
    const double d[] = {0, 1}, v[] = {ocv_v, ocv_v}, r[] = {r_ohm, r_ohm};
    set_curve(&l->pack.cell, d, v, r, 2);
    l->pack.cell.capacity_ah = c_ah;
    l->pack.cell.rated_a = rated_a;
    l->pack.cell.peukert = k;
    l->pack.cell.max_capacity_ah = cmax_ah;
    l->pack.cell.cutoff_v = 0.1;
}

/* A sloping, alkaline-like cell (invented test data). */
static inline void sloping_cell(lw_light *l)
{
    const double d[] = {0, 0.05, 0.1, 0.2, 0.4, 0.6, 0.8, 0.9, 0.95, 1.0};
    const double v[] = {1.58, 1.50, 1.46, 1.40, 1.30, 1.22, 1.13, 1.06, 1.00, 0.90};
    const double r[] = {0.15, 0.15, 0.16, 0.17, 0.19, 0.24, 0.34, 0.45, 0.60, 0.90};
    set_curve(&l->pack.cell, d, v, r, 10);
    l->pack.cell.capacity_ah = 2.3;
    l->pack.cell.rated_a = 0.1;
    l->pack.cell.peukert = 1.2;
    l->pack.cell.max_capacity_ah = 2.8;
    l->pack.cell.cutoff_v = 0.9;
    l->cutoff.cell_v = 0.9;
}

/* The demo light's electrical model: three sloping cells in series, two
 * strings of one Shockley LED (the demo profile's invented figures), a
 * 33-ohm resistor each. */
static inline void shockley_demo_light(lw_light *l)
{
    base_light(l);
    sloping_cell(l);
    l->pack.series = 3;
    l->led.strings = 2;
    l->led.model = LW_LED_SHOCKLEY;
    l->led.ideality = 3.0;
    l->led.saturation_a = 4.6e-18;
    l->led.series_ohm = 1.5;
    l->led.junction_c = 25;
    l->led.flux_lm = 22;
    l->led.flux_current_a = 0.06;
    l->led.flux_exponent = 0.9;
    l->drive.resistor_ohm = 33;
}

/* Run l at the default options, with a trace and/or forced into the run
 * in time; a failure fails the test with the message. */
static inline lw_result run_with(const lw_light *l, bool trace, bool in_time)
{
    lw_run_options o = lw_run_options_default();
    o.want_trace = trace;
    o.time_domain = in_time;
    lw_result r;
    lw_error e;
    lw_error_clear(&e);
    lw_status st = lw_run(l, &o, &r, &e);
    if (st != LW_OK)
        fail_msg("lw_run: %s", e.msg);
    return r;
}

static inline lw_result run_ok(const lw_light *l, bool trace)
{
    return run_with(l, trace, false);
}

#endif
