/*
 * pick.h - choosing the series resistor of a profile from a preferred
 * series, with its corners checked against every rating.
 *
 * Owns: lw_pick (the chosen part, its corners and its full run) and
 * lw_pick_resistor / lw_pick_cells.  Every figure comes from the operating
 * point of drive.c and the run of engine.c.
 *
 * Choice: for a current target the smallest value of the series whose
 * nominal current at fresh cells does not exceed it; for a light-output
 * target the largest value that still reaches it.  If that part takes the
 * LED past max_current_ma in the worst case, or its worst-case dissipation
 * past the largest standard rating (with 2x derating), the smallest safe
 * value is taken instead and the target is reported as not met.
 * The recommended power rating is the smallest standard rating of at least
 * twice the worst-case dissipation (derating to 50 %; common practice).
 */
#ifndef LW_PICK_H
#define LW_PICK_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include <stdio.h>
#include "corner.h"
#include "profile.h"
#include "resistor.h"

typedef struct lw_pick {
    char cell[LW_NAME_MAX];    /* the cell the part was chosen for */
    int eseries;               /* the preferred series (E24: 24) */
    double ideal_ohm;          /* resistor giving the target exactly, nominal, fresh */
    double resistor_ohm;       /* the chosen preferred value */
    double tolerance_pct;      /* of the chosen part */
    double max_led_a;          /* the LED's max_current_a */
    double recommended_rating_w; /* NAN when no standard rating suffices */
    double profile_rating_w;   /* the profile's drive.rating_w (0: not given) */
    bool meets_target;         /* the chosen part meets the target */
    bool within_ratings;       /* LED and resistor within ratings in the worst case */
    lw_corner corners[LW_CORNER_COUNT]; /* of the chosen part */
    lw_result run;             /* the full run with the chosen part */
} lw_pick;

/* Choose the resistor for the profile as it is.  Returns LW_ENOANSWER (with
 * a message) when no part meets the target within the ratings; *out is
 * still filled with the nearest safe part when there is one (resistor_ohm
 * > 0 and within_ratings).  Free with lw_pick_clear. */
LW_MUST_CHECK lw_status lw_pick_resistor(const lw_profile *prof, lw_target_kind kind, double target,
                           int eseries, lw_pick *out, lw_error *err);

/* The same for each cell of `cells` (NULL-terminated names): out[i],
 * status[i] and errs[i] for cell i.  Fails only on bad input (a cell that
 * cannot be loaded). */
LW_MUST_CHECK lw_status lw_pick_cells(const lw_profile *prof, const char *const *cells,
                                      lw_target_kind kind, double target, int eseries, lw_pick *out,
                                      lw_status *status, lw_error *errs, lw_error *err);

void lw_pick_clear(lw_pick *pick);

#endif
