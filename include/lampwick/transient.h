/*
 * transient.h - a light's run integrated in time: the depth of discharge
 * and the heat path's temperatures together.
 *
 * Owns: lw_transient_run, which lw_run calls for a light whose heat path has
 * a heat capacity (or when lw_run_options.time_domain asks).  Units: s
 * inside, h and Wh in the result, deg C.  No I/O.
 *
 * State x(t) = (d, T_b, T_h): dd/dt = 1 / (3600 dtdd_h) of the operating
 * point at (d, T_b, T_h) (the same rate as the depth quadrature), and the
 * network's dT/dt (thermal.h).  Integrated by the 3-stage Radau IIA method
 * (order 5, L-stable, stiffly accurate; E. Hairer and G. Wanner, Solving
 * Ordinary Differential Equations II, 2nd ed., Springer 1996, section IV.5)
 * with simplified Newton iterations on finite-difference Jacobians kept
 * across steps, and the embedded error estimate of order 3 (the same book,
 * section IV.8, as in the authors' code RADAU5).  The output, energies and
 * lumen-hours are quadratures over the same stages (order 5).  Events - the
 * ends of the run, 50 % of the reference, the regulator's kinks and dropout,
 * the cell curves' knots, the foldback's corners, a chain's triggers - are
 * located on the step's collocation polynomial, then polished on real steps
 * from the last accepted state, to 1e-12 relative in time; t = 30 s and a
 * chain's timer are hit exactly by the step.  Peaks inside two steps are
 * found on the collocation polynomial too.  docs/model.md, "Runs in time".
 */
#ifndef LW_TRANSIENT_H
#define LW_TRANSIENT_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

#include "engine.h"

/* Steps per estimated run at the least: the step is at most the runtime
 * the switch-on point predicts divided by this, so that no step jumps over
 * a whole feature of the output (an event whose function turns back within
 * one step would go unseen). */
#define LW_TRANSIENT_STEPS_MIN 40
/* With a trace, its states are at most the estimated runtime divided by
 * this apart: states inside a longer step come from the step's collocation
 * polynomial. */
#define LW_TRANSIENT_TRACE_GAPS 400
/* Newton iterations per Radau step before the step is halved. */
#define LW_TRANSIENT_NEWTON_MAX 10

/* The Radau IIA tableau of order 5 the method uses (A and c; b is A's last
 * row), for tests of its order conditions. */
void lw_transient_tableau(double a[3][3], double c[3]);

/* Run light from its start to its end in time, filling *res as lw_run
 * does (res is zeroed and the worst case already set by the caller).
 * LW_ENUMERIC when the steps shrink to nothing or the solve budget ends. */
LW_MUST_CHECK lw_status lw_transient_run(const lw_light *light, const lw_run_options *opt,
                                         lw_result *res, lw_error *err);

#endif
