/*
 * engine.h - the discharge engine: integrate a light's run in depth of
 * discharge, locate its end exactly, and keep the energy ledger (and the
 * pieces a trace is built from, trace.h).
 *
 * Owns: lw_run_options, lw_result and lw_run().
 *
 * Method (docs/model.md): with d the depth of discharge of each cell,
 * dd/dt = Ic/C_eff(Ic) + lambda (1 - d) (cell.h), so t(d) is the integral of
 * 1/(dd/dt) over depth, and every other
 * total (lumen-hours, energies) is the integral of its rate times dt/dd.
 * Between the corners of the cell curve the integrands are smooth, so each
 * stretch is integrated piece by piece with Gauss-Lobatto rules sized from
 * the smoothness the last piece showed, each piece's error estimated from
 * the fall of the Legendre coefficients of the polynomial through its
 * nodes (quadrature.h) and the piece given more nodes or halved until the
 * estimate is within the relative tolerance.  Events -- the end conditions,
 * 50 % output, and kinks of the model (the Peukert low-drain cap, a
 * regulator leaving regulation, table knots) -- are watched at every node;
 * where one changes sign it is located on the polynomial through the
 * nodes, polished by Newton steps (Brent's method on what remains), and
 * the integration breaks there, so each end is found exactly, not at a
 * step edge.  docs/model.md gives the details and the measured honesty of
 * the tolerance.
 *
 * End of run, the first of: output <= relative_pct % of the output 30 s after
 * switch-on (ANSI/PLATO FL 1 runtime definition), output <= flux floor,
 * loaded cell voltage <= cell end point, converter dropout without fallback,
 * or d = 1.
 */
#ifndef LW_ENGINE_H
#define LW_ENGINE_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

#include <stddef.h>
#include "light.h"

typedef enum lw_end_reason {
    LW_END_RELATIVE, LW_END_FLUX_FLOOR, LW_END_CELL_VOLTAGE, LW_END_CAPACITY, LW_END_NEVER_LIT,
    LW_END_DRIVER_DROPOUT,
    LW_END_EMPTY_AT_START, /* no light: the cells are empty or at their end point at switch-on */
    LW_END_DIM_AT_START,   /* no light: the output at switch-on is already at a cutoff */
    LW_END_SWITCHED_OFF,   /* a step-down chain's `next = off` */
    LW_END_SCHEDULE_DONE,  /* the last session of a use schedule's list ended first */
    LW_END_COUNT
} lw_end_reason;

/* True for the end reasons that mean the light gave no light at all (the
 * run's figures are not those of a lit light). */
bool lw_run_end_is_dark(lw_end_reason why);

/* The visibility floor, lm: a light whose output at switch-on and 30 s
 * later is below it counts as never lit, and a run ends when its output
 * falls below it even if the cutoff allows less.  A millilumen is the order
 * of the dimmest locator glows; below it a light serves no lighting or
 * indicating purpose (common practice, no source). */
#define LW_VISIBLE_LM 1e-3

/* Default cap on the solves of one run: a thousand times what the bundled
 * profiles need, about a second of work; a run that needs more has met a
 * model it cannot integrate to its tolerance and fails (LW_ENUMERIC). */
#define LW_MAX_SOLVES_DEFAULT 1000000

/* The narrowest piece, relative to its depth, that the integration halves:
 * below it the quadrature nodes are a few thousand ulps apart and rounding
 * in the integrand, not the rule, limits the accuracy (such pieces are
 * accepted as they are and flagged when they miss the tolerance). */
#define LW_PIECE_MIN_REL 1e-12

/* Cap on the events within one piece of the cell curve: a model has a
 * handful (its end, 50 %, kinks, a few hundred LED-table knots at most);
 * more means an event that keeps firing, and the run fails. */
#define LW_EVENTS_PER_INTERVAL_MAX 10000

/* Cap on the Newton steps that solve t(d) = 30 s (it converges in three or
 * four; bisection safeguards the rest). */
#define LW_T30_ITER_MAX 100

extern const char *const lw_run_end_names[LW_END_COUNT + 1];

/* Warning flags of a run. */
enum {
    LW_WARN_LED_OVER_MAX = 1u << 0,      /* nominal LED current above max at fresh cells */
    LW_WARN_LED_OVER_MAX_WORST = 1u << 1,/* worst case (tolerances) above max */
    LW_WARN_RESISTOR_HOT = 1u << 2,      /* resistor power above half its rating */
    LW_WARN_OVER_DISCHARGE = 1u << 3,    /* lithium cell taken below its end-point voltage */
    LW_WARN_NEVER_LIT = 1u << 4,
    LW_WARN_NO_CUTOFF = 1u << 5,         /* ran to full depth without reaching its cutoff */
    LW_WARN_EXTRAPOLATED = 1u << 6,      /* an LED table was read beyond its last point */
    LW_WARN_TEMPERATURE = 1u << 7,       /* ambient outside the cell's temperature table */
    LW_WARN_TOLERANCE = 1u << 8,         /* integration tolerance not met somewhere */
    LW_WARN_RESISTOR_OVER_RATING = 1u << 9, /* resistor power above its rating */
    LW_WARN_JUNCTION_HOT = 1u << 10,     /* LED junction above its max_junction_c */
    LW_WARN_BODY_HOT = 1u << 11,         /* body above [thermal] max_touch_c */
    LW_WARN_RESISTOR_DERATED = 1u << 12, /* resistor power above its rating derated to
                                            the body temperature */
    LW_WARN_CELL_REVERSAL = 1u << 13,    /* the weakest cell's loaded voltage below 0 V
                                            while the light runs */
    LW_WARN_REGULATOR_HOT = 1u << 14,    /* a linear regulator's power above its rating
                                            (derated to the body temperature) */
    LW_WARN_COUNT_ = 15
};

/* Short machine names of the warning flags, by bit index. */
extern const char *const lw_run_warning_names[LW_WARN_COUNT_];

typedef struct lw_run_options {
    double rtol;          /* relative tolerance of each integral, default 1e-10 */
    int max_halvings;     /* cap on interval halving, default 40 */
    double visible_lm;    /* visibility floor, default LW_VISIBLE_LM */
    double event_tol;     /* events are located to event_tol * (depth + 1e-3) in depth,
                             default 1e-13 (a few ulps of the depth scale) */
    int event_iter_max;   /* cap on Brent iterations per event, default 200 (it
                             converges in under 50 from any bracket) */
    int max_solves;       /* cap on the operating-point solves of one run: the
                             bound on its total work, default LW_MAX_SOLVES_DEFAULT */
    double start_depth;   /* depth at switch-on, 0..1, default 0; the light's own
                             storage (pack.stored_months) is applied when deeper */
    bool want_trace;      /* record the pieces for lw_trace_build */
    bool time_domain;     /* integrate in time (transient.h) even when the depth
                             quadrature applies; lights with heat capacities always
                             are */
} lw_run_options;

/* Defaults as documented above. */
lw_run_options lw_run_options_default(void);

/* One state of a run integrated in time, kept for the trace. */
typedef struct lw_state {
    double t_h;           /* time since switch-on */
    double depth;
    double board_c, body_c; /* the heat path's state (ambient for quasi-static nodes) */
    bool fallback;
    int mode;             /* the mode of a step-down chain (0 without one) */
    int session;          /* the session of a use schedule (0 without one) */
} lw_state;

/* One accepted integration piece, kept for the trace. */
typedef struct lw_piece {
    double d0, d1;        /* depth interval */
    double t0_h;          /* time at d0 */
    bool fallback;        /* drive level in this piece */
} lw_piece;

typedef struct lw_result {
    lw_end_reason end_reason;
    double runtime_h;       /* switch-on to the end */
    double end_depth;
    double start_depth;     /* depth at switch-on (after storage) */
    double time_to_half_h;  /* first time the output is at or below 50 % of the
                               reference while lit (a jump included); NAN if never */
    double regulated_h;     /* hours in regulation (NAN for a resistor drive) */
    double flux_30s_lm;     /* the light's own output 30 s after switch-on */
    double depth_30s;       /* its depth of discharge then */
    double flux_ref_lm;     /* the output the relative cutoff and 50 % refer to: the
                               own 30-s output, or with cutoff.reference = fresh
                               that of fresh cells at 20 C */
    lw_point initial;       /* at switch-on */
    lw_point final;         /* at the end */
    double lumen_hours;
    double energy_led_wh, energy_resistor_wh, energy_internal_wh, energy_driver_wh;
    double energy_drawn_wh;
    double peak_resistor_w; /* largest power in one series resistor, nominal */
    double worst_led_a;     /* fresh cells, worst-case tolerances, per string peak */
    double worst_resistor_w;/* same, power in one resistor */
    double junction_30s_c;  /* LED junction temperature 30 s after switch-on */
    double peak_junction_c; /* highest junction temperature at the points solved (the
                               quadrature nodes and events: a lower bound of the true
                               peak, exact where it is at switch-on or an event) */
    double peak_body_c;     /* the same for the body */
    double peak_body_h;     /* when, in a run in time (NAN in the depth quadrature) */
    double min_weak_cell_v; /* the weakest cell's lowest loaded voltage while lit, V */
    double peak_regulator_w; /* linear-cc: the largest power in one string's regulator */
    double peak_regulator_derated_w; /* the rating it needs: the largest of that power
                                        over the derating at the body's temperature
                                        (the power itself without [thermal]) */
    double peak_resistor_derated_w; /* the largest p_res_peak_w / derating(T_body): the
                                       rating one resistor needs at the body's temperature
                                       (thermal.h; 0 without [thermal] or resistor) */
    int solves;             /* operating-point solves */
    lw_switch switches[LW_CHAIN_MAX]; /* a step-down chain's switches, in order (the
                                         first LW_CHAIN_MAX) */
    size_t n_switches;      /* kept in switches[] */
    size_t switches_total;  /* all of them (a chain starts over at every session) */
    lw_session *sessions;   /* a run with a use schedule: its sessions, owned */
    size_t n_sessions;
    double calendar_h;      /* with a schedule: calendar hours from the first
                               switch-on to the end (runtime_h is the use) */
    unsigned warnings;      /* LW_WARN_* */
    lw_piece *pieces;       /* with want_trace: accepted pieces, owned */
    lw_state *states;       /* with want_trace, a run in time: its states, owned */
    size_t n_states;
    size_t n_pieces;
} lw_result;

/* Run the light from its start depth to its end.  A light that never
 * lights returns LW_OK with end_reason LW_END_NEVER_LIT.  Fails only on
 * options out of range or a loop without finite solution (LW_EINPUT), a
 * numerical failure (LW_ENUMERIC) or memory (LW_ENOMEM).  opt may be NULL
 * for the defaults.  Free with lw_run_result_clear. */
LW_MUST_CHECK lw_status lw_run(const lw_light *light, const lw_run_options *opt, lw_result *res,
                 lw_error *err);

void lw_run_result_clear(lw_result *res);

/* Take point pt into res->peak_resistor_derated_w (both run paths call it
 * at every point they solve). */
void lw_run_note_resistor(const lw_light *light, const lw_point *pt, lw_result *res);

/* Worst case at fresh cells: highest OCV (the curve's first point), lowest
 * internal resistance (the curve's minimum), resistor at minus its tolerance,
 * LED forward voltage at minus its spread.  Fills *pt. */
LW_MUST_CHECK lw_status lw_run_worst_case(const lw_light *light, lw_point *pt, lw_error *err);

/* Hours to discharge from depth d0 to d1 (d0 < d1 within one interval of
 * the cell curve) at the light's operating points, by the run's own
 * quadrature; `fallback` selects the converter's fallback level. */
LW_MUST_CHECK lw_status lw_run_hours_between(const lw_light *light, bool fallback, double d0,
                                             double d1, double *hours, lw_error *err);

#endif
