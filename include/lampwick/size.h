/*
 * size.h - sizing the pack: which cell type, how many in series and in
 * parallel, and (for a resistor drive) which series resistor, meet a
 * runtime at a light output.
 *
 * Owns: lw_size_options, lw_size_row, lw_size_packs and the size table.
 * Every runtime comes from lw_run through the same case path as `run`.
 *
 * For each pack (cell x S x P): with a resistor drive, the resistor is
 * chosen from a preferred series within the worst-case limits of `pick` --
 * the LED within max_current_ma, and the resistor's worst-case dissipation
 * within the profile's rating_w (or, without one, within the largest
 * standard rating with 2x derating) -- either keeping the profile's LED
 * current or, with a light-output floor, giving the longest time above it.
 * A regulated drive (linear-cc, converter) has no resistor to choose: the
 * pack is run with the drive as it is, its dropout included.
 */
#ifndef LW_SIZE_H
#define LW_SIZE_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include "engine.h"
#include "profile.h"

/* At most this many preferred values are searched per pack (E192 from
 * 0.1 ohm to 1 Mohm is 1,344). */
#define LW_SIZE_CANDIDATES_MAX 2048

typedef struct lw_size_row {
    char cell[LW_NAME_MAX];
    int series, parallel;
    double resistor_ohm;      /* the chosen part; NAN for a regulated drive */
    double worst_resistor_w;  /* its worst-case dissipation */
    double rating_w;          /* recommended standard rating (2x derating); NAN if none */
    double runtime_h;
    double flux_30s_lm;
    double mass_g;
    double margin_pct;        /* runtime above the requirement, % */
    bool fits;
    lw_end_reason end_reason;
    unsigned warnings;        /* LW_WARN_* of the run */
} lw_size_row;

typedef struct lw_size_options {
    double runtime_h;         /* required hours, > 0 */
    double flux_lm;           /* keep output >= this; NAN: keep the design current */
    const char *const *cells; /* NULL-terminated names; NULL: the profile's cell */
    int max_series, max_parallel;
    int eseries;              /* preferred series for the resistor */
    int threads;
} lw_size_options;

/* Evaluate every pack.  *rows (malloc'd, n_rows) holds every pack for which
 * a part can be chosen, fitting ones first ranked by cell count, then mass,
 * then runtime; then the rest by runtime, longest first. */
LW_MUST_CHECK lw_status lw_size_packs(const lw_profile *prof, const lw_size_options *opt,
                                      lw_size_row **rows, size_t *n_rows, lw_error *err);

#endif
