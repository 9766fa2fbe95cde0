/*
 * cellfit.h - a cell model from discharge logs.
 *
 * Owns: lw_cellfit_log (a discharge log: time, terminal voltage and current, as
 * read from CSV and checked) and lw_cellfit_fit (one or two logs -> lw_cell
 * with a thinned curve).
 *
 * Method (docs/model.md):
 *   charge removed    Q(t) = integral of I dt, trapezoid rule;
 *   capacity          Q at the first crossing of the end-point voltage
 *                     (located by linear interpolation between samples);
 *   depth             d = Q / capacity of that log;
 *   two logs (loads 1 and 2) at equal depth: R(d) = (V1 - V2)/(I2 - I1),
 *                     OCV(d) = V1 + I1 R(d)  (Ohm's law, Kirchhoff's law),
 *                     while the heavier log is well above the end point;
 *                     beyond, R on its trend, never falling (cellfit.c);
 *   one log           OCV(d) = V + I R with R given by the user;
 *   rate exponent     Peukert's law from the two capacities at the mean
 *                     currents: k = 1 + ln(C1/C2)/ln(I2/I1);
 *   thinning          Ramer-Douglas-Peucker on (d, OCV): the kept points
 *                     reproduce the dense curve within the tolerance.
 */
#ifndef LW_CELLFIT_H
#define LW_CELLFIT_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include "cell.h"

typedef struct lw_cellfit_log {
    char path[LW_PATH_MAX];
    size_t n;
    double *t_h;     /* hours since the start */
    double *v;       /* terminal voltage, V */
    double *i_a;     /* current, A */
    int *line;       /* CSV line of each sample */
    double load_ohm, load_a; /* the load as given (NAN: not that kind) */
} lw_cellfit_log;

/* Read a log: columns time_s, voltage_v and optionally current_ma.  Without
 * current_ma the current is voltage/load_ohm (load_ohm > 0) or load_a.
 * Refuses, with file:line: missing columns, fewer than 10 samples, time not
 * strictly increasing, gaps (a step over 10 times the median step),
 * non-positive voltage or current. */
LW_MUST_CHECK lw_status lw_cellfit_log_read(const char *path, double load_ohm, double load_a,
                                            lw_cellfit_log *log, lw_error *err);
void lw_cellfit_log_clear(lw_cellfit_log *log);

typedef struct lw_cellfit_options {
    double cutoff_v;          /* end-point voltage, V */
    double resistance_ohm;    /* with one log: the cell's internal resistance */
    double tolerance_v;       /* curve thinning tolerance, default 0.005 V */
    const char *name;         /* cell name */
    lw_chemistry chemistry;
    bool rechargeable;
    double nominal_v;         /* NAN: the curve's voltage at 50 % depth */
    double total_ah;          /* two logs: the total charge (at a very low drain) for the
                                 kinetic model's fit; NAN: Peukert's law only */
} lw_cellfit_options;

typedef struct lw_cellfit {
    lw_cell cell;             /* tables owned: free with lw_cell_clear */
    double capacity_ah[2];    /* per log */
    double mean_a[2];         /* mean current per log */
    double hours[2];          /* to the end point, per log */
    size_t nlogs;
    bool peukert_estimated;
    bool peukert_clamped;     /* the estimate fell outside 1..2 */
    double max_dev_v;         /* thinned curve against the dense one */
    bool kinetic_fitted;      /* two logs and total_ah: the kinetic model's c and k' */
    double model_hours[2][2]; /* each log's load run through the fitted cell: [0] under
                                 Peukert's law, [1] under the kinetic model (NAN: not run) */
    double reliable_depth;    /* two logs: R and OCV from both up to this depth,
                                 extended beyond it by the stated rule */
    size_t dense_points;
} lw_cellfit;

/* The kinetic model's parameters from two constant-current capacities:
 * the available share c and the rate constant k' (1/h) with which a cell
 * of total charge total_ah delivers q1_ah at i1_a and q2_ah at i2_a to
 * empty (lw_cell_kinetic_capacity_ah).  For a trial k' each capacity gives
 * c = A / (C - Q + A), A = (I / k')(1 - e^(-k' Q / I)) (the closed form
 * solved for c); k' is the root of c1(k') - c2(k') on a log scan from 1e-6
 * to 1e6 /h, then Brent.  LW_EINPUT when the capacities do not fall with
 * the current below the total, LW_ENUMERIC when no k' fits. */
LW_MUST_CHECK lw_status lw_cellfit_kinetic(double total_ah, double i1_a, double q1_ah,
                                           double i2_a, double q2_ah, double *c,
                                           double *k_per_h, lw_error *err);

/* Fit from one or two logs (two: at different loads). */
LW_MUST_CHECK lw_status lw_cellfit_fit(const lw_cellfit_log *logs, size_t nlogs,
                                       const lw_cellfit_options *opt, lw_cellfit *out,
                                       lw_error *err);

#endif
