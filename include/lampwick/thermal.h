/*
 * thermal.h - the heat path of a light: LED junctions, LED board, body,
 * ambient.
 *
 * Owns: lw_thermal (the network's resistances, heat capacities and limits,
 * from a profile's [thermal] section) and the node temperatures it gives.
 * Units: K/W, J/K, deg C, W.  No I/O.
 *
 * Network (docs/model.md, "Thermal network"): the junctions (no heat
 * capacity) sit R_jb above the board, each LED carrying its own heat q;
 * the board (C_b) is R_bb from the body (C_h), which is R_ha from ambient
 * T_a.  With Q_led the heat of all LEDs and Q_other the other losses (when
 * they heat the body):
 *   C_b dT_b/dt = Q_led - (T_b - T_h)/R_bb
 *   C_h dT_h/dt = (T_b - T_h)/R_bb + Q_other - (T_h - T_a)/R_ha
 *   T_j = T_b + R_jb q
 * R_bb = 0 makes board and body one node of capacity C_b + C_h.  A node
 * without heat capacity follows its balance at every instant (quasi-static);
 * with none at all the light is at thermal steady state throughout:
 * T_h = T_a + R_ha (Q_led + Q_other), T_b = T_h + R_bb Q_led (thermal
 * Ohm's law; lumped-capacitance model, e.g. F. P. Incropera and D. P.
 * DeWitt, Fundamentals of Heat and Mass Transfer, ch. 3 and 5).
 */
#ifndef LW_THERMAL_H
#define LW_THERMAL_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

#include <stdbool.h>

/* Body temperature above which a warning is given when max_touch_c is not
 * set: the lower end of the limits product safety standards set for
 * continuously held metal surfaces (common practice, no source; the
 * applicable standard, e.g. IEC 62368-1 or IEC 60598-1, decides). */
#define LW_THERMAL_TOUCH_C_DEFAULT 48.0

typedef struct lw_thermal {
    bool enabled;          /* a [thermal] section was given */
    double r_jb_k_w;       /* junction to board, per LED, K/W (> 0) */
    double r_bb_k_w;       /* board to body, K/W; 0: board and body one node */
    double r_ha_k_w;       /* body to ambient, K/W (> 0) */
    double c_b_j_k;        /* board heat capacity, J/K; 0: quasi-static */
    double c_h_j_k;        /* body heat capacity, J/K; 0: quasi-static */
    bool losses_in_body;   /* resistor, driver and cell losses heat the body */
    double max_touch_c;    /* body temperature for the touch warning, deg C */
    /* thermal foldback on the body temperature: factor 1 at or below from,
     * min at or above to, linear between; none unless to > from (so a
     * zeroed struct has none) */
    double foldback_from_c, foldback_to_c, foldback_min;
} lw_thermal;

/* The temperatures of a light's heat path at one instant. */
typedef struct lw_temps {
    double junction_c, board_c, body_c;
} lw_temps;

/* True when no node has a heat capacity: the light is at steady state at
 * every instant and the depth quadrature applies. */
bool lw_thermal_quasi_static(const lw_thermal *th);

/* Node temperatures given the heat: q_led_w of all LEDs together, q_per_led_w
 * of one LED, q_other_w into the body (already 0 when the losses leave the
 * light), and the state of the nodes that have a heat capacity in *t
 * (board_c, body_c; ignored for quasi-static nodes).  Fills every field of
 * *t. */
void lw_thermal_nodes(const lw_thermal *th, double ambient_c, double q_led_w, double q_per_led_w,
                      double q_other_w, lw_temps *t);

/* Whether the network folds the drive back (foldback_to_c > foldback_from_c). */
bool lw_thermal_has_foldback(const lw_thermal *th);

/* The foldback factor at body temperature body_c (1 without foldback):
 * 1 at or below foldback_from_c, foldback_min at or above foldback_to_c,
 * linear between.  It scales a regulated drive's set current and a
 * resistor drive's duty. */
double lw_thermal_foldback(const lw_thermal *th, double body_c);

/* A resistor's power rating holds up to this temperature of its
 * surroundings and falls linearly to zero at LW_RESISTOR_ZERO_C: the usual
 * derating curve of film and chip resistors (common practice, no source;
 * the part's own data decide). */
#define LW_RESISTOR_FULL_C 70.0
#define LW_RESISTOR_ZERO_C 155.0

/* The share of a resistor's rating it may carry at body temperature
 * body_c: 1 up to LW_RESISTOR_FULL_C, 0 from LW_RESISTOR_ZERO_C, linear
 * between. */
double lw_thermal_resistor_derating(double body_c);

/* Time derivatives of the board and body temperatures, K/s, at the node
 * temperatures *t (from lw_thermal_nodes) and the same heat; 0 for a node
 * without heat capacity (and for the board when it is one node with the
 * body, whose rate then holds the pair). */
/* The heat path left to cool for dt_s with no heat in it (the light off):
 * the closed-form solution of the network's linear equations (for two
 * nodes with heat capacity, e^(A t) of its 2 x 2 system by its two real
 * eigenvalues; one node, the exponential), applied to the nodes with a heat
 * capacity in *board_c and *body_c (the others follow at switch-on). */
void lw_thermal_relax(const lw_thermal *th, double ambient_c, double dt_s, double *board_c,
                      double *body_c);

void lw_thermal_rates(const lw_thermal *th, double ambient_c, double q_led_w, double q_other_w,
                      const lw_temps *t, double *dboard_k_s, double *dbody_k_s);

#endif
