/*
 * resistor.h - the series resistor as a part: standard power ratings, the
 * resistance that meets a target, and the smallest value that is safe in the
 * worst case.
 *
 * Owns: the standard power ratings, the recommended rating (at least twice
 * the worst-case dissipation: derating to 50 % of rated power, common
 * practice, no source), and searches over the resistance of a light's drive
 * at fresh cells (nominal, or the worst case of lw_run_worst_case).  All values
 * come from the operating-point solution of drive.c; nothing here uses a
 * second, simpler model.
 */
#ifndef LW_RESISTOR_H
#define LW_RESISTOR_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include "light.h"

/* Standard resistor power ratings, W, ascending, and their count. */
extern const double lw_resistor_ratings_w[];
extern const size_t lw_resistor_nratings;

/* Derating: a part's rating must be at least this times its dissipation. */
#define LW_RESISTOR_DERATING 2.0

/* Smallest standard rating >= 2 * p_w, or NAN when none is large enough. */
double lw_resistor_rating_w(double p_w);

/* Tolerance of the part: the profile's drive.tolerance_pct when it sets
 * one, else the usual tolerance of E-series `eseries`. */
double lw_resistor_tolerance_pct(const lw_light *light, bool tolerance_given, int eseries);

/* The fresh operating point of `light` with resistor r_ohm: nominal, or the
 * worst case (lw_run_worst_case) when `worst`. */
LW_MUST_CHECK lw_status lw_resistor_point(const lw_light *light, double r_ohm, bool worst,
                                          lw_point *pt, lw_error *err);

typedef enum lw_target_kind { LW_TARGET_CURRENT, LW_TARGET_FLUX } lw_target_kind;

/* The resistance at which the fresh current (A, per string) or light output
 * (lm) equals `target`, nominal or worst case, on 1 mohm .. 100 Mohm: 0 when
 * even 1 mohm falls short, INFINITY when even 100 Mohm exceeds it. */
LW_MUST_CHECK lw_status lw_resistor_for(const lw_light *light, lw_target_kind kind, double target,
                                        bool worst, double *r_ohm, lw_error *err);

/* Smallest value of E-series `eseries` that keeps the worst case within the
 * LED's max_current_a and the resistor's dissipation within max_w (the
 * part's rating; <= 0: within the largest standard rating with derating).
 * INFINITY when none does. */
LW_MUST_CHECK lw_status lw_resistor_min_safe(const lw_light *light, int eseries, double max_w,
                                             double *r_ohm, lw_error *err);

#endif
