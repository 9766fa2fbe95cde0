/*
 * corner.h - the corners of a design: the operating points a design review
 * checks against the ratings and the runtime claims.
 *
 * Owns: lw_corner and lw_corner_compute().  With fresh cells unless said:
 *   nominal    nominal parts at the profile's ambient;
 *   worst hot  the ratings case: the cells at the top of their open-circuit
 *              curve and the bottom of their resistance curve, the resistor
 *              at minus its tolerance, the LED forward voltage at minus its
 *              spread (lw_run_worst_case), at the hottest ambient of the
 *              profile's range (pack.ambient_c = LOW..HIGH) or its ambient;
 *   cold       nominal parts at the range's lowest ambient, or without a
 *              range the lowest temperature of the cell's temperature table
 *              (the cells' resistance and capacity there), or without a
 *              table the profile's ambient; its runtime and 30-s output come
 *              from a full run there;
 *   end        the last operating point of the nominal run.
 */
#ifndef LW_CORNER_H
#define LW_CORNER_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include "engine.h"

typedef enum lw_corner_kind {
    LW_CORNER_NOMINAL, LW_CORNER_HOT, LW_CORNER_COLD, LW_CORNER_END, LW_CORNER_COUNT
} lw_corner_kind;

/* "nominal", "worst hot", "cold", "end of run". */
extern const char *const lw_corner_names[LW_CORNER_COUNT + 1];

typedef struct lw_corner {
    lw_corner_kind kind;
    double ambient_c;     /* deg C */
    bool from_table;      /* cold: the ambient is the cell table's lowest */
    bool from_range;      /* hot or cold: the ambient is the profile range's end */
    lw_point pt;
    double runtime_h;     /* nominal and cold: the run's; NAN for the others */
    double flux_30s_lm;   /* the same for the output 30 s after switch-on */
} lw_corner;

/* The four corners of `light`; `run` is its nominal run (for the end). */
LW_MUST_CHECK lw_status lw_corner_compute(const lw_light *light, const lw_result *run,
                     lw_corner out[LW_CORNER_COUNT], lw_error *err);

#endif
