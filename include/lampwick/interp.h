/*
 * interp.h - monotone x -> y tables: linear and monotone-cubic interpolation.
 *
 * Owns: lw_interp, an immutable, reference-counted pair of arrays with x
 * strictly increasing.  Shared by the cell curve (depth -> OCV, R), the cell
 * temperature factors, and the LED I-V and flux tables.
 *
 * Interpolation: piecewise linear, or the monotone piecewise cubic Hermite
 * interpolant of F. N. Fritsch and R. E. Carlson, "Monotone piecewise cubic
 * interpolation", SIAM J. Numer. Anal. 17(2):238-246, 1980, with the slope
 * choice of F. N. Fritsch and J. Butland (1984) (weighted harmonic mean) and
 * shape-preserving one-sided end slopes.  It never overshoots monotone data.
 *
 * Outside [x0, xn-1] both evaluators clamp to the end value; they never
 * extrapolate.  Callers that need an extension (the LED tables) say so and
 * build it from lw_interp_end_slope().
 */
#ifndef LW_INTERP_H
#define LW_INTERP_H

/* layer 1, base (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 1
#error "base-layer header included from a lower layer"
#endif

#include <stdatomic.h>
#include <stddef.h>
#include "error.h"

typedef struct lw_interp {
    size_t n;     /* number of points, >= 2 */
    double *x;    /* strictly increasing, finite */
    double *y;    /* finite */
    double *m;    /* monotone-cubic slopes dy/dx at the points */
    size_t *corner; /* the interior points where the piecewise-linear interpolant
                       bends (not on the line through their neighbours, to within
                       LW_INTERP_CORNER_ULPS), ascending */
    size_t ncorner;
    _Atomic int refs; /* reference count (atomic: copies may be dropped on any thread) */
} lw_interp;

/* A point counts as on the straight line through its neighbours when it is
 * off it by at most this many ulps of the three values: the rounding of a
 * dense table sampled from a coarser one's straight segments (a point off
 * by more is a corner, however slight). */
#define LW_INTERP_CORNER_ULPS 16.0

/* Copy n points into a new table (refs = 1).  Fails with LW_EINPUT if n < 2,
 * a value is not finite or x is not strictly increasing (the message names the
 * 0-based index; callers add file:line), LW_ENOMEM if allocation fails. */
lw_interp *lw_interp_new(const double *x, const double *y, size_t n, lw_error *err);

/* Take another reference; returns t.  NULL-safe. */
lw_interp *lw_interp_ref(lw_interp *t);

/* Drop a reference; frees on the last.  NULL-safe. */
void lw_interp_free(lw_interp *t);

/* Index i of the interval with x[i] <= x < x[i+1], clamped to [0, n-2]. */
size_t lw_interp_find(const lw_interp *t, double x);

/* Piecewise-linear value, clamped outside the table. */
double lw_interp_linear(const lw_interp *t, double x);

/* Monotone-cubic value, clamped outside the table. */
double lw_interp_cubic(const lw_interp *t, double x);

/* The x of the first corner above x (the linear interpolant's first bend;
 * +INFINITY when none is left), by bisection over the corners. */
double lw_interp_corner_above(const lw_interp *t, double x);

/* Slope (y[n-1]-y[n-2])/(x[n-1]-x[n-2]) of the last interval. */
double lw_interp_end_slope(const lw_interp *t);

/* 1 if y is non-decreasing, -1 if non-increasing, 0 if neither (a constant
 * table counts as non-decreasing).  With `strict`, equal neighbours fail. */
int lw_interp_direction(const lw_interp *t, int strict);

#endif
