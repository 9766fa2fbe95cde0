/*
 * corner.h - the corners of a design: the operating points a design review
 * checks against the ratings and the runtime claims.
 *
 * Owns: lw_corner and lw_corner_compute().  With fresh cells unless said:
 *   nominal    nominal parts at the profile's ambient;
 *   worst hot  the ratings case: the cells at the top of their open-circuit
 *              curve and the bottom of their resistance curve, the resistor
 *              at minus its tolerance, the LED forward voltage at minus its
 *              spread (lw_run_worst_case);
 *   cold       nominal parts at the lowest temperature of the cell's
 *              temperature table (the cells' resistance and capacity there);
 *              without a table the profile's ambient;
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
    lw_point pt;
} lw_corner;

/* The four corners of `light`; `run` is its nominal run (for the end). */
LW_MUST_CHECK lw_status lw_corner_compute(const lw_light *light, const lw_result *run,
                     lw_corner out[LW_CORNER_COUNT], lw_error *err);

#endif
