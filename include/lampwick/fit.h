/*
 * fit.h - least-squares fits of LED measurements: the linear and Shockley
 * I-V models and the light-output power law.
 *
 * Owns: lw_lsq (linear least squares by Householder QR on column-normalised
 * data, with R^2, residual standard error and parameter standard errors;
 * G. H. Golub and C. F. Van Loan, Matrix Computations, 4th ed., 5.3), and
 * the LED fits built on it:
 *   linear    V = Vth + Rd*I                          basis (1, I)
 *   shockley  V = n*Vt*ln(I/Is) + Rs*I                basis (1, ln I, I):
 *             n*Vt = c1, Is = exp(-c0/c1), Rs = c2 (valid for I >> Is, where
 *             ln(1 + I/Is) = ln(I/Is) to far below measurement resolution)
 *   flux      ln(flux) = ln(flux_ref) + e*ln(I/I_ref)  basis (1, ln(I/I_ref))
 * Currents in A, voltages in V, flux in lm.
 */
#ifndef LW_FIT_H
#define LW_FIT_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include <stddef.h>
#include "error.h"

#define LW_LSQ_MAX_P 4

typedef struct lw_lsq {
    size_t n, p;
    double coef[LW_LSQ_MAX_P];
    double stderr_[LW_LSQ_MAX_P]; /* standard error of each coefficient */
    double ssr;                   /* sum of squared residuals */
    double r_squared;             /* 1 - SSR/SST (SST about the mean of y) */
    double rse;                   /* residual standard error sqrt(SSR/(n-p)) */
} lw_lsq;

/* Solve min |X c - y| for X given column-wise: x[j][i] is column j, row i.
 * Needs n > p.  Fails with LW_EINPUT when the columns are (numerically)
 * dependent, e.g. all currents equal. */
LW_MUST_CHECK lw_status lw_fit_lsq_solve(const double *const *x, size_t p, const double *y,
                                         size_t n, lw_lsq *out, lw_error *err);

typedef struct lw_led_fit {
    lw_lsq lsq;
    /* linear */
    double threshold_v, slope_ohm;
    /* shockley */
    double ideality, saturation_a, series_ohm, junction_c;
    /* range of the data, A */
    double i_min_a, i_max_a;
    bool weak;       /* too few points or too narrow a current range */
} lw_led_fit;

/* Linear model through the points. */
LW_MUST_CHECK lw_status lw_fit_led_linear(const double *i_a, const double *v, size_t n,
                                          lw_led_fit *out, lw_error *err);

/* Shockley model with series resistance at junction_c. */
LW_MUST_CHECK lw_status lw_fit_led_shockley(const double *i_a, const double *v, size_t n,
                                            double junction_c, lw_led_fit *out, lw_error *err);

typedef struct lw_flux_fit {
    lw_lsq lsq;           /* in log space */
    double ref_current_a; /* reference current: the data's geometric mean to 2 figures */
    double flux_lm;       /* at the reference current */
    double exponent;
} lw_flux_fit;

LW_MUST_CHECK lw_status lw_fit_flux(const double *i_a, const double *flux, size_t n,
                                    lw_flux_fit *out, lw_error *err);

/* Bench measurements of one LED: current_ma, forward_v and optionally
 * flux_lm or relative_pct (docs/formats.md), in SI. */
typedef struct lw_fit_data {
    size_t n;
    double *i_a, *v, *flux;  /* flux NULL when not measured */
    bool relative;           /* the output column was relative_pct */
} lw_fit_data;

/* Read measurements (at least 3 rows, positive currents, voltages and
 * outputs).  Free with lw_fit_data_clear. */
LW_MUST_CHECK lw_status lw_fit_led_read(const char *path, lw_fit_data *data, lw_error *err);
void lw_fit_data_clear(lw_fit_data *data);

/* The I-V model to recommend of the two fitted (either may be NULL): the
 * Shockley fit when it is not weak and fits better, else the linear one. */
const lw_led_fit *lw_fit_led_best(const lw_led_fit *linear, const lw_led_fit *shockley);

#endif
