/*
 * light.h - a whole light and its operating point at one depth of discharge.
 *
 * Owns: lw_pack (S x P cells at an ambient temperature), lw_cutoff (when
 * the light counts as finished), lw_light (pack + LEDs + drive + cutoff, the
 * complete physical description the engine runs) and lw_point (everything
 * about the light at one depth of discharge), solved by lw_light_point.
 * No I/O.
 *
 * Circuit (docs/model.md): S cells in series, P strings of cells in
 * parallel; M LED strings of N LEDs each, every string with its own drive
 * element.  Per string, with E = S*OCV(d) and the pack's share of the loop
 * resistance S*M*R(d)/P (all strings draw through the same pack):
 *   resistor   E - I*(Rs + S*M*R/P) = N*V(I)                 (Kirchhoff's voltage law)
 *   linear-cc  I = set while E - I*(Rs + S*M*R/P) - N*V(I) >= dropout;
 *              otherwise E - dropout - I*(Rs + S*M*R/P) = N*V(I)
 *   converter  LEDs held at I = set (or fallback); input power
 *              P_in = P_out/eta + V_in*I_q drawn from E through S*R/P:
 *              (E - Ip*R)*(Ip - I_q) = P_out/eta, smaller root.  Below
 *              min_input_v at its input it cannot hold the set level: it
 *              drops to the fallback level (which has no lockout) or goes
 *              dark; so does it when the pack cannot deliver P_in at all.
 * PWM at duty D: the on-state values above are peak values; the LED and
 * resistor averages (current, power, flux) are D times them.  A converter's
 * controller stays on between pulses: its quiescent current I_q is drawn all
 * the time, so the pack's average current is D*Ip + (1 - D)*I_q.  The cells'
 * depth advances at the average current; the loaded cell voltage is the
 * on-state (peak) one.
 */
#ifndef LW_LIGHT_H
#define LW_LIGHT_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include "cell.h"
#include "chain.h"
#include "schedule.h"
#include "drive.h"
#include "led.h"
#include "thermal.h"

typedef struct lw_pack {
    lw_cell cell;        /* the cell type (tables shared by reference) */
    int series;          /* S >= 1 */
    int parallel;        /* P >= 1 */
    double ambient_c;    /* deg C; with a range, 20 C held inside it */
    bool ambient_range;  /* pack.ambient_c was given as LOW..HIGH: the corners' */
    double ambient_lo_c, ambient_hi_c; /* the range (deg C), when ambient_range */
    double stored_months; /* months on the shelf before switch-on, >= 0 */
    double capacity_spread; /* the weakest of the S cells in series holds this share
                               less charge, 0 <= x < 1 (the others nominal) */
    double resistance_spread; /* and has this share more internal resistance, >= 0 */
    double capacity_scale;   /* every cell's capacity over the cell file's (a unit's
                                cells off their rating): 1 or 0 as rated */
    double resistance_scale; /* every cell's internal resistance over the file's: 1 or 0
                                as rated */
} lw_pack;

typedef enum lw_reference { LW_REF_OWN, LW_REF_FRESH, LW_REF_COUNT } lw_reference;

/* Names as written in profiles ("own", "fresh"). */
extern const char *const lw_light_reference_names[LW_REF_COUNT + 1];

/* Ambient temperature of the fresh reference, deg C. */
#define LW_FRESH_REFERENCE_C 20.0

typedef struct lw_cutoff {
    double relative_pct;  /* end at this % of the reference output, 0 < x < 100 */
    lw_reference reference; /* own: this run's 30-s output; fresh: the 30-s output of
                               the same light with fresh cells at 20 C */
    double flux_lm;       /* end at this absolute output; 0: no floor */
    double cell_v;        /* end at this loaded cell voltage, V */
} lw_cutoff;

typedef struct lw_light {
    char name[LW_NAME_MAX];
    lw_pack pack;
    lw_led led;
    lw_drive drive;
    lw_cutoff cutoff;
    lw_thermal thermal;   /* the heat path; thermal.enabled false: junctions at ambient */
    lw_chain *chain;      /* step-down chain starting at its mode 0 (this light);
                             NULL: none.  Shared by copies (reference counted) */
    lw_schedule *use;     /* how the light is used (schedule.h); NULL: on from
                             switch-on to the end.  Shared by copies */
    double cap_factor;    /* capacity factor at ambient (derived) */
    double res_factor;    /* resistance factor at ambient (derived) */
    lw_number_memo memo_share; /* ln of a cell's share of an LED string's current
                             averaged over PWM, duty * strings / parallel (derived) */
} lw_light;

/* Drop every table the light holds. */
void lw_light_clear(lw_light *light);
/* Copy with the tables shared by reference; free both with lw_light_clear. */
void lw_light_copy(lw_light *dst, const lw_light *src);
/* Recompute cap_factor and res_factor from the pack's cell and ambient,
 * put the LED junctions at ambient (no thermal network), and keep the
 * logarithms of the constants every solve needs (lw_led_prepare,
 * lw_cell_prepare, memo_share). */
void lw_light_update_factors(lw_light *light, bool *temperature_outside);

/* Regime of the drive at a point. */
typedef enum lw_regime {
    LW_REGIME_PASSIVE,     /* resistor: no regulation */
    LW_REGIME_REGULATED,   /* linear-cc or converter holding set_a */
    LW_REGIME_SATURATED,   /* linear-cc out of headroom */
    LW_REGIME_FALLBACK,    /* converter at fallback_a */
    LW_REGIME_DROPOUT      /* converter cannot draw its input power: dark */
} lw_regime;

typedef struct lw_point {
    double depth;         /* d, fraction of effective capacity */
    double ocv_v;         /* per cell open-circuit V */
    double r_cell_ohm;    /* per cell internal ohm at ambient */
    double led_a;         /* per string, peak (on-state) */
    double led_v;         /* per LED at led_a */
    double cell_a;        /* per cell, peak (on-state) */
    double cell_v;        /* per cell loaded V at peak current (the pack's mean) */
    double weak_cell_v;   /* the weakest cell's loaded V at peak current (cell_v
                             without a spread) */
    double pack_v;        /* loaded pack terminal V at peak current */
    double pack_a;        /* pack current, peak (on-state) */
    double pack_avg_a;    /* pack current averaged over the PWM period */
    double p_led_w;       /* average power into all LEDs */
    double p_res_w;       /* average power in all series resistors */
    double p_res_peak_w;  /* peak power in one series resistor */
    double p_int_w;       /* average power in the cells' internal resistance */
    double p_drv_w;       /* average loss in the regulator or converter */
    double p_drawn_w;     /* average power drawn from the cells' EMF */
    double flux_lm;       /* average light output of the whole light */
    double dtdd_h;        /* hours per unit depth: 1 / (dd/dt) at the average current
                             (inf if dark) */
    double regulation_margin; /* linear-cc: headroom - dropout (V); converter: event
                                 function for dropout; resistor: 1 */
    lw_regime regime;
    bool extrapolated;    /* an LED table was read beyond its last point */
    lw_temps temps;       /* junction, board and body temperatures, deg C */
} lw_point;

/* Solve the light at depth d (0..1).  `fallback` selects the converter's
 * fallback level.  Fails only when the loop has no finite solution. */
LW_MUST_CHECK lw_status lw_light_point(const lw_light *light, double depth, bool fallback,
                                       lw_point *pt, lw_error *err);

/* Same, with the cell's OCV and internal resistance given directly.  With a
 * thermal network every node is taken at its steady state for this point
 * (the quasi-static light; lw_light_point_state gives the state). */
LW_MUST_CHECK lw_status lw_light_point_at(const lw_light *light, double depth, double ocv_v,
                                          double r_cell_ohm, bool fallback, lw_point *pt,
                                          lw_error *err);

/* The most fixed-point steps of one thermal operating point: the junction
 * temperature T_j = F(T_j) is solved by the secant method inside a bracket;
 * the map's slope is a few per cent for real LEDs, so it converges in 3 to 6
 * steps, and a slope near 1 means runaway. */
#define LW_THERMAL_ITER_MAX 60
/* The most secant steps from a hinted junction temperature before the
 * bracketing search takes over (lw_light_point_state). */
#define LW_THERMAL_HINT_STEPS 6
/* The junction temperature is solved to this share of its absolute value
 * (a few hundred ulps), so that the depth quadrature's integrands carry no
 * noise from it. */
#define LW_THERMAL_TOL 1e-14
/* A junction this far above ambient has no stable operating point worth
 * the name: the light is in thermal runaway, or its heat path is hopeless
 * for its power (LW_EINPUT, naming the keys); no LED survives it. */
#define LW_THERMAL_RUNAWAY_K 1000.0

/* The operating point with the board and body temperatures of *state for
 * the nodes that have a heat capacity (the others at their balance), the
 * junction solved with the LEDs' own heat.  state NULL: every node at
 * steady state.  A finite state->junction_c is a hint where to start the
 * junction's search (a neighbouring point's).  Where the junction's map
 * has one fixed point, the point is the same to the search's tolerance
 * with or without it; where it has two stable ones (a light at the edge
 * of runaway), the search from the hint settles on the one it starts
 * near, so a light followed
 * along its discharge stays on the branch it is on. */
LW_MUST_CHECK lw_status lw_light_point_state(const lw_light *light, double depth, double ocv_v,
                                             double r_cell_ohm, bool fallback,
                                             const lw_temps *state, lw_point *pt, lw_error *err);

/* The weakest cell of a series pack (docs/model.md, "The weakest cell"):
 * it holds (1 - capacity_spread) of the nominal charge, so at the nominal
 * cells' depth d its own depth is d / (1 - capacity_spread) (the same
 * charge drawn from every cell in series), and its resistance is
 * (1 + resistance_spread) times the nominal at that depth.  The pack's
 * EMF and resistance are the sums over its cells; per cell, the means. */
typedef struct lw_cells {
    double ocv_v, r_ohm;           /* per-cell means over the S cells in series */
    double weak_ocv_v, weak_r_ohm; /* the weakest cell */
    double weak_depth;             /* its depth, fraction */
} lw_cells;

/* Does the pack have a weakest cell that differs (S > 1 and a spread)? */
bool lw_light_has_spread(const lw_light *light);

/* The nominal cells' depth at which the weakest cell is empty (1 without
 * a spread): the run's capacity end. */
double lw_light_depth_end(const lw_light *light);

/* The cells at the nominal cells' depth d. */
void lw_light_cells(const lw_light *light, double depth, lw_cells *cells);

/* The first knot of the pack's curves above depth d - the corners of the
 * cell's curves (lw_interp_corner_above: the points where the straight
 * pieces bend; a point on the line through its neighbours is none) for the
 * nominal cells and, with a spread, the same for the weakest cell - or
 * lw_light_depth_end when there is none: the rates have kinks there. */
double lw_light_knot_above(const lw_light *light, double depth);

/* lw_light_point_state at the nominal cells' depth d, the cells' values
 * taken from their curves (with the weakest cell's). */
LW_MUST_CHECK lw_status lw_light_point_depth(const lw_light *light, double depth, bool fallback,
                                             const lw_temps *state, lw_point *pt,
                                             lw_error *err);

/* The light in mode `mode` of its step-down chain (the light itself
 * without a chain). */
const lw_light *lw_light_mode(const lw_light *light, int mode);

/* Hours in an average month (365.25 x 24 / 12). */
#define LW_HOURS_PER_MONTH 730.5

/* Depth of discharge at switch-on after pack.stored_months on the shelf:
 * the cell keeps (1 - s/100)^M of its charge after M months of
 * self-discharge at s % a month (compounded on the charge left, the same
 * rate as during a run), less the standby drain I_sb over those months
 * shared by the P parallel strings of cells:
 * d0 = 1 - (1 - s/100)^M + I_sb * M * 730.5 h / (P * C), with C the rated
 * capacity at ambient.  Clamped to [0, 1]. */
double lw_light_stored_depth(const lw_light *light);

#endif
