/*
 * roots.h - safeguarded scalar root finding and the Wright omega function.
 *
 * Owns: lw_root_brent (Brent's method: R. P. Brent, "Algorithms for
 * Minimization without Derivatives", Prentice-Hall 1973, ch. 4), used by the
 * LED table model and by the engine to locate cutoff crossings; and
 * lw_root_wright_omega, the solution w of w + ln w = x, which is W0(e^x) without
 * overflow (R. M. Corless and D. J. Jeffrey, "The Wright omega function",
 * 2002; P. W. Lawrence, R. M. Corless, D. J. Jeffrey, "Algorithm 917: Complex
 * double-precision evaluation of the Wright omega function", ACM TOMS 38(3),
 * 2012, whose fourth-order iteration of F. N. Fritsch, R. E. Shafer and
 * W. P. Crowley (CACM 16(2), 1973) is used here for real x).
 */
#ifndef LW_ROOTS_H
#define LW_ROOTS_H

/* layer 1, base (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 1
#error "base-layer header included from a lower layer"
#endif

#include "error.h"

typedef double (*lw_root_fn)(double x, void *ctx);

/* Find x in [a, b] with f(x) = 0, given fa = f(a) and fb = f(b) of opposite
 * sign (or one of them zero).  Stops when the bracket is narrower than
 * xtol (absolute, > 0) or f is exactly 0; fails with LW_ENUMERIC after
 * max_iter evaluations and LW_EINPUT when the ends do not bracket a root.
 * Writes *root only on success. */
LW_MUST_CHECK lw_status lw_root_brent(lw_root_fn f, void *ctx, double a, double b, double fa,
                                      double fb, double xtol, int max_iter, double *root,
                                      lw_error *err);

/* Wright omega function for real x: the real w > 0 with w + ln(w) = x.
 * Accurate to a few ulps while the result is a normal double (x > -708);
 * never overflows for finite x; 0 for x < -745. */
double lw_root_wright_omega(double x);

/* The same, with ln(w) in *log_w (from the iteration's own logarithm, no
 * further one). */
double lw_root_wright_omega_log(double x, double *log_w);

/* ln x for finite x > 0 to about 1e-5 absolute, without libm: the binary
 * exponent and four terms of the series 2 atanh(t), t = (m - 1)/(m + 1), of
 * the mantissa m in [1, 2) (t <= 1/3).  For starting values and counts,
 * where a rough logarithm serves as well as an exact one. */
double lw_root_rough_log(double x);

#endif
