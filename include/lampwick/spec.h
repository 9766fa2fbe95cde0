/*
 * spec.h - the runtime table of a product specification: the runs behind
 * it (lw_spec) and its rendering as a text, CSV or Markdown table.
 *
 * Owns: lw_spec (one run per mode and cell, through lw_batch_run, so every
 * figure is the figure `lampwick run` gives for that mode and cell),
 * lw_spec_compute, lw_report_spec and the rounding rules of a specification
 * table.
 *
 * Table (docs/formats.md): one row per mode (the profile as written when it
 * has none), one column group per cell: light output 30 s after switch-on,
 * runtime to the cutoff, time to 50 %, hours at full output when a mode
 * regulates, peak intensity and beam distance with an [optics] section
 * (ANSI/PLATO FL 1 definitions), the steps of a mode that steps down, and
 * the markers of that run's warnings.
 * The notes under the table state the conditions actually computed --
 * storage, ambient, the cutoff rule and its reference, the drive -- once when
 * every run shares them, per mode or cell where they differ.
 */
#ifndef LW_SPEC_H
#define LW_SPEC_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include "batch.h"
#include "corner.h"
#include "trace.h"

typedef struct lw_spec {
    const lw_profile *prof;  /* borrowed */
    size_t nrows, ncells;    /* modes (1 for a profile without modes), cells */
    bool has_modes;
    lw_case *cases;          /* nrows * ncells, row-major: the run of mode r, cell c */
    lw_corner *corners;      /* nrows * ncells * LW_CORNER_COUNT: each run's corners
                                (a light that gives no light: none, all NAN) */
    bool regulated;          /* some run regulates: the "at full" column */
    bool optics;             /* the profile has an [optics] section */
} lw_spec;

/* Run every mode with every cell (`cells` NULL-terminated names; NULL: the
 * profile's own cell).  A light that gives no light is a row, not an error;
 * bad input fails with the first case's error.  Free with lw_spec_clear. */
LW_MUST_CHECK lw_status lw_spec_compute(const lw_profile *prof, const char *const *cells,
                                        int threads, lw_spec *spec, lw_error *err);
void lw_spec_clear(lw_spec *spec);

/* The trace of the run of mode row r with cell c (run again with its
 * trace kept, the same run as the table's): *res and *trace filled; free
 * with lw_run_result_clear and lw_trace_clear.  A case that failed or gave
 * no light has no trace: LW_EINPUT saying so. */
LW_MUST_CHECK lw_status lw_spec_trace(const lw_spec *spec, size_t r, size_t c, lw_result *res,
                                      lw_trace *trace, lw_error *err);

/* Round for a specification table: 2 significant figures below 100, whole
 * numbers from 100 up. */
double lw_spec_round(double v);
#endif
