/*
 * design.h - design workflows on top of the engine: choosing the series
 * resistor with worst-case checks (pick), sizing the pack (size), the runtime
 * table of a product specification (table), and beam photometry.
 *
 * Owns: lw_pick, lw_size, lw_spec_table and the photometry helpers.  Every
 * runtime here comes from lw_run through lw_batch_run; nothing uses a second,
 * simpler model.
 *
 * Worst case (docs/model.md): fresh cells at the top of their open-circuit
 * curve and the bottom of their resistance curve, the resistor at minus its
 * tolerance, the LED forward voltage at minus its spread.
 * Resistor power: the part's rating must be at least twice the worst-case
 * dissipation (derating to 50 % of rated power; common practice, no source).
 * Photometry (ANSI/PLATO FL 1 definitions): peak intensity of a uniform cone
 * of full angle theta, I = flux / (2 pi (1 - cos(theta/2))); beam distance,
 * where illuminance falls to 0.25 lx, d = sqrt(I / 0.25).
 */
#ifndef LW_DESIGN_H
#define LW_DESIGN_H

#include "batch.h"
#include "cellfile.h"
#include "report.h"

/* Standard resistor power ratings, W, ascending, and their count. */
extern const double lw_power_ratings_w[];
extern const size_t lw_power_nratings;

/* Smallest standard rating >= 2 * p_w, or NAN when none is large enough. */
double lw_recommended_rating_w(double p_w);

/* Peak beam intensity (cd) of a uniform cone of full angle beam_deg. */
double lw_cone_intensity_cd(double flux_lm, double beam_deg);
/* Distance (m) at which intensity i_cd gives 0.25 lx (FL 1 beam distance). */
double lw_beam_distance_m(double i_cd);

typedef enum lw_target_kind { LW_TARGET_CURRENT, LW_TARGET_FLUX } lw_target_kind;

typedef struct lw_pick {
    double ideal_ohm;          /* resistor giving the target exactly, nominal, fresh */
    double resistor_ohm;       /* the chosen preferred value */
    double tolerance_pct;      /* of the chosen part */
    double nominal_led_a, worst_led_a, max_led_a;
    double nominal_flux_lm;
    double nominal_resistor_w, worst_resistor_w;
    double recommended_rating_w; /* NAN when no standard rating suffices */
    bool meets_target;         /* the chosen part meets the target */
    bool within_ratings;       /* LED and resistor within ratings in the worst case */
    lw_point worst;            /* the worst-case operating point of the chosen part */
    lw_result run;             /* the full run with the chosen part */
} lw_pick;

/* Choose the series resistor.  For a current target: the smallest value of
 * the series whose nominal fresh current does not exceed the target; for a
 * flux target: the largest value whose nominal fresh output reaches it.  If
 * that part takes the LED past max_current_ma in the worst case, larger
 * values are tried.  Returns LW_ENOANSWER (with a message) when no part
 * meets the target within the ratings; *out is still filled with the
 * nearest safe part when there is one. */
lw_status lw_pick_resistor(const lw_profile *prof, lw_target_kind kind, double target,
                           int series, lw_pick *out, lw_error *err);

typedef struct lw_size_row {
    char cell[LW_NAME_MAX];
    int series, parallel;
    double resistor_ohm;
    double runtime_h;
    double initial_flux_lm;
    double mass_g;
    double margin_pct;        /* runtime above the requirement, % */
    bool fits;
} lw_size_row;

typedef struct lw_size_options {
    double runtime_h;         /* required hours, > 0 */
    double flux_lm;           /* keep output >= this; NAN: keep the design current */
    const char *const *cells; /* NULL-terminated names; NULL: the profile's cell */
    int max_series, max_parallel;
    int eseries;              /* preferred series for the resistor */
    int threads;
} lw_size_options;

/* Evaluate every pack (cell x series x parallel).  *rows (malloc'd, n_rows)
 * holds every pack that lights, fitting ones first ranked by cell count,
 * then mass, then runtime; then the rest by runtime, longest first. */
lw_status lw_size_packs(const lw_profile *prof, const lw_size_options *opt, lw_size_row **rows,
                        size_t *n_rows, lw_error *err);

/* The runtime table of a product specification: one row per mode (the
 * profile as written when it has none), one column group per cell (the
 * profile's own cell when `cells` is NULL): light output 30 s after
 * switch-on, runtime to the cutoff, time to 50 %, hours at full output when
 * a mode regulates, and with an [optics] section peak intensity and beam
 * distance.  Text and Markdown are rounded
 * as specification tables are (the rule is printed in the notes with the
 * test conditions); CSV carries plain numbers in fixed units. */
lw_status lw_spec_table(const lw_profile *prof, const char *const *cells, lw_format fmt,
                        int threads, lw_rtable **out, lw_error *err);

/* Round for a specification table: 2 significant figures below 100, whole
 * numbers from 100 up. */
double lw_spec_round(double v);
/* Runtime for a specification table: whole minutes below 1 h ("45 min"),
 * 0.1 h below 10 h ("7.5 h"), whole hours from 10 h ("62 h"). */
void lw_spec_hours(double h, char *buf, size_t size);

#endif
