/*
 * led.h - LED current-voltage models and light output.
 *
 * Owns: lw_led (one LED type and how many are wired: `count` in series per
 * string, `strings` in parallel) and the per-string loop solution
 * E - I*R = N*V(I) for each I-V model.  No I/O.
 *
 * Models (per LED, I in A, V in V; docs/model.md):
 *   constant  V = Vf
 *   linear    V = Vth + Rd*I
 *   shockley  V = n*Vt*ln(1 + I/Is) + Rs*I, Vt = k*T/q at junction_c.  The loop
 *             is solved in closed form (S. Banwell and A. Jayakumar,
 *             "Exact analytical solution for current flow through diode with
 *             series resistance", Electronics Letters 36(4):291-292, 2000) via
 *             the Wright omega function, so it cannot overflow.
 *   table     monotone-cubic interpolation of measured (I, V); below the first
 *             point V is held at the first voltage (no current below it);
 *             above the last point V continues on the last interval's slope
 *             and the solution is flagged as extrapolated.
 * Flux per LED: flux_lm * (I/flux_current_a)^flux_exponent, or monotone-cubic
 * interpolation of a measured (I, flux) table through (0, 0), continued on its
 * last slope above the table.
 *
 * Every voltage is multiplied by v_scale (1 nominal): the worst-case check
 * sets it to 1 - forward_spread_pct/100.
 *
 * Junction temperature (docs/model.md, "LED temperature"): the data hold at
 * junction_c; at the junction temperature t_junction_c the model is
 *   V(I, Tj) = v_scale * V_data(I) + tc_forward_v_k * (Tj - junction_c),
 *   flux(I, Tj) = flux_data(I) * max(0, 1 + tc_flux_per_k * (Tj - junction_c)),
 * the Shockley thermal voltage staying at junction_c.  The loop current is 0
 * when the loop's EMF is not positive, whatever the shift.
 */
#ifndef LW_LED_H
#define LW_LED_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include "interp.h"
#include "number.h"

typedef enum lw_led_model {
    LW_LED_CONSTANT, LW_LED_LINEAR, LW_LED_SHOCKLEY, LW_LED_TABLE, LW_LED_MODEL_COUNT
} lw_led_model;

extern const char *const lw_led_model_names[LW_LED_MODEL_COUNT + 1];

/* Boltzmann constant and elementary charge, exact since the 2019 SI. */
#define LW_BOLTZMANN_J_K 1.380649e-23
#define LW_ELEMENTARY_C 1.602176634e-19

typedef struct lw_led {
    lw_led_model model;
    int count;              /* LEDs in series per string, >= 1 */
    int strings;            /* parallel strings, each with its own resistor, >= 1 */
    double forward_v;       /* constant: V */
    double threshold_v;     /* linear: V at zero current */
    double slope_ohm;       /* linear: dynamic resistance, ohm */
    double ideality;        /* shockley: n */
    double saturation_a;    /* shockley: Is, A */
    double series_ohm;      /* shockley: Rs, ohm */
    double junction_c;      /* shockley: junction temperature, deg C */
    lw_interp *iv;           /* table: A -> V, or NULL */
    double flux_lm;         /* lm per LED at flux_current_a */
    double flux_current_a;  /* A */
    double flux_exponent;   /* dimensionless, > 0 */
    lw_interp *flux;         /* A -> lm per LED (through (0,0)), or NULL */
    double max_current_a;   /* absolute maximum continuous current, A */
    double forward_spread_pct; /* +- spread of forward voltage between parts, % */
    double v_scale;         /* multiplier on every forward voltage, 1 nominal */
    double tc_forward_v_k;  /* forward-voltage temperature coefficient per LED, V/K */
    double tc_flux_per_k;   /* light-output temperature coefficient, 1/K of the data */
    double heat_fraction;   /* share of the electrical power that becomes heat, 0..1 */
    double max_junction_c;  /* maximum junction temperature, deg C; NAN: not given */
    double t_junction_c;    /* junction temperature the model is evaluated at, deg C
                               (set by the light: lw_light_update_factors) */
    lw_number_memo memo_is, memo_flux_i; /* ln saturation_a, ln flux_current_a
                               (made by lw_led_prepare; a stale one costs time only) */
} lw_led;

void lw_led_clear(lw_led *led);            /* drop the tables */
void lw_led_copy(lw_led *dst, const lw_led *src); /* tables shared by reference */

/* Keep the logarithms of the LED's constants that every solve needs. */
void lw_led_prepare(lw_led *led);

/* The forward-voltage shift per LED at the junction temperature, V:
 * tc_forward_v_k * (t_junction_c - junction_c). */
double lw_led_thermal_shift_v(const lw_led *led);

/* The light-output factor at the junction temperature:
 * max(0, 1 + tc_flux_per_k * (t_junction_c - junction_c)). */
double lw_led_thermal_flux_factor(const lw_led *led);

/* Thermal voltage k*T/q in V at temp_c. */
double lw_led_thermal_voltage(double temp_c);

/* Forward voltage of one LED at current i_a >= 0. *extrapolated (may be
 * NULL) is set when a table model is read beyond its last point. */
double lw_led_voltage(const lw_led *led, double i_a, bool *extrapolated);

/* Light output of one LED at i_a >= 0, lm. */
double lw_led_flux(const lw_led *led, double i_a, bool *extrapolated);

/* The same with ln(i_a) given (NAN: not known), for the power law. */
double lw_led_flux_at(const lw_led *led, double i_a, double log_i, bool *extrapolated);

/* Current per string I >= 0 solving e_v - I*r_ohm = count*V(I), with r_ohm
 * the total series resistance of the string's loop (>= 0).  Returns 0 when
 * e_v cannot exceed the string's voltage at zero current.  Fails (LW_ENUMERIC
 * / LW_EINPUT) only when the loop has no finite solution (no resistance with
 * a constant-voltage model) or the table solver does not converge. */
LW_MUST_CHECK lw_status lw_led_solve(const lw_led *led, double e_v, double r_ohm, double *i_a,
                       bool *extrapolated, lw_error *err);

/* Same, also giving the forward voltage of one LED at the solution (from
 * Kirchhoff's law when current flows, so that the loop balances exactly). */
LW_MUST_CHECK lw_status lw_led_solve_v(const lw_led *led, double e_v, double r_ohm, double *i_a,
                         double *v_led, bool *extrapolated, lw_error *err);

/* Same, also giving ln(I) in *log_i where the model has it without a
 * logarithm of its own (the Shockley closed form), NAN otherwise: the
 * power laws of light output and capacity share it. */
LW_MUST_CHECK lw_status lw_led_solve_vl(const lw_led *led, double e_v, double r_ohm,
                                        double *i_a, double *v_led, double *log_i,
                                        bool *extrapolated, lw_error *err);

#endif
