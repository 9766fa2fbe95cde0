/*
 * stats.h - summaries of samples: moments, percentiles with their
 * distribution-free intervals, binomial proportions, rank regression.
 *
 * Owns:
 *   lw_stats_moments     mean and standard deviation (two passes, n - 1);
 *   lw_stats_percentile  the sample quantile of R. J. Hyndman and Y. Fan,
 *                        "Sample quantiles in statistical packages", The
 *                        American Statistician 50(4), 1996, definition 7
 *                        (linear between order statistics);
 *   lw_stats_order_ranks the order statistics X(r) <= xi_p <= X(s) that
 *                        cover the p-quantile with at least the asked
 *                        confidence, from the exact binomial distribution
 *                        of the count below it (H. A. David and H. N.
 *                        Nagaraja, "Order Statistics", 3rd ed., Wiley 2003,
 *                        section 7.1);
 *   lw_stats_wilson      the score interval of a proportion (E. B. Wilson,
 *                        "Probable inference, the law of succession, and
 *                        statistical inference", JASA 22, 1927, 209-212);
 *   lw_stats_srrc        standardized rank regression coefficients (R. L.
 *                        Iman and W. J. Conover, "The use of the rank
 *                        transform in regression", Technometrics 21(4),
 *                        1979; A. Saltelli et al., "Global Sensitivity
 *                        Analysis: The Primer", Wiley 2008, section 1.2.5)
 *                        with their ordinary least-squares standard errors.
 * Unitless: values keep whatever unit the caller's have.
 */
#ifndef LW_STATS_H
#define LW_STATS_H

/* layer 1, base (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 1
#error "base-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include <stddef.h>
#include "error.h"

/* Mean and sample standard deviation (divisor n - 1; 0 for one value). */
void lw_stats_moments(const double *x, size_t n, double *mean, double *sd);

/* Sort x[n] ascending (NaN never given). */
void lw_stats_sort(double *x, size_t n);

/* The p-quantile (0 <= p <= 1) of ascending sorted[n], Hyndman-Fan 7. */
double lw_stats_percentile(const double *sorted, size_t n, double p);

/* 1-based ranks r < s of the order statistics bounding the p-quantile with
 * confidence at least `conf` (0 < conf < 1): P(B <= r - 1) <= (1 - conf)/2
 * and P(B >= s) <= (1 - conf)/2 for B ~ Binomial(n, p), each as tight as
 * that allows.  r = 0: no lower bound exists at this n; s = n + 1: no upper. */
void lw_stats_order_ranks(size_t n, double p, double conf, size_t *r, size_t *s);

/* Wilson's score interval for k successes in n trials at the normal
 * deviate z (1.959964 for 95 %). */
void lw_stats_wilson(size_t k, size_t n, double z, double *lo, double *hi);

/* Mid-ranks (1 .. n, ties share their mean rank) of x[n] into rank[n].
 * false: out of memory. */
bool lw_stats_ranks(const double *x, size_t n, double *rank);

#define LW_STATS_SRRC_MAX 32

/* Standardized rank regression of y[n] on the k columns x[j][n] (k at most
 * LW_STATS_SRRC_MAX): beta[j] and its standard error se[j], the share
 * beta[j]^2 of the ranks' variance, and the regression's r2.  A column
 * without spread gets beta 0 and se 0.  LW_EINPUT when n <= k + 1 or y has
 * no spread; LW_ENOMEM. */
LW_MUST_CHECK lw_status lw_stats_srrc(const double *const *x, size_t k, const double *y, size_t n,
                                      double *beta, double *se, double *r2, lw_error *err);

#endif
