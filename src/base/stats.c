/*
 * stats.c - moments, percentiles, order-statistic intervals, Wilson's
 * interval and rank regression (sources in stats.h).  Unitless.
 */
#include "lampwick/stats.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"

void lw_stats_moments(const double *x, size_t n, double *mean, double *sd)
{
    double s = 0.0, ss = 0.0;
    for (size_t i = 0; i < n; i++)
        s += x[i];
    double m = n ? s / (double)n : NAN;
    for (size_t i = 0; i < n; i++)
        ss += (x[i] - m) * (x[i] - m);
    *mean = m;
    *sd = n > 1 ? sqrt(ss / (double)(n - 1)) : 0.0;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

void lw_stats_sort(double *x, size_t n)
{
    if (n > 1)
        qsort(x, n, sizeof *x, cmp_double);
}

double lw_stats_percentile(const double *sorted, size_t n, double p)
{
    if (n == 0)
        return NAN;
    double h = (double)(n - 1) * p;
    size_t lo = (size_t)floor(h);
    if (lo + 1 >= n)
        return sorted[n - 1];
    return sorted[lo] + (h - (double)lo) * (sorted[lo + 1] - sorted[lo]);
}

/* The largest m with P(B <= m) <= a for B ~ Binomial(n, p), 0 < p < 1;
 * -1 when even P(B = 0) exceeds a.  The probabilities come from the mode
 * outwards by the ratio of neighbouring terms, the mode's term from lgamma. */
static long binom_lower(size_t n, double p, double a)
{
    const double dn = (double)n, odds = p / (1.0 - p);
    size_t mode = (size_t)floor((dn + 1.0) * p);
    if (mode > n)
        mode = n;
    const double dm = (double)mode;
    const double pm = exp(lgamma(dn + 1.0) - lgamma(dm + 1.0) - lgamma(dn - dm + 1.0) +
                          dm * log(p) + (dn - dm) * log1p(-p));
    /* below the mode: the whole mass, then taken off from the top down */
    double below = 0.0, t = pm;
    for (size_t j = mode; j-- > 0;) {
        t *= (double)(j + 1) / ((dn - (double)j) * odds); /* pmf(j) from pmf(j + 1) */
        below += t;
        if (t < 1e-18 * below)
            break;
    }
    if (below <= a) { /* walk up from the mode */
        double cdf = below, u = pm;
        for (size_t j = mode;; j++) {
            cdf += u;
            if (cdf > a || j == n)
                return cdf > a ? (long)j - 1 : (long)n;
            u *= (dn - (double)j) / ((double)(j + 1)) * odds;
        }
    }
    double cdf = below;  /* P(B <= mode - 1) */
    t = pm;
    for (size_t j = mode; j-- > 0;) {
        if (cdf <= a)
            return (long)j;
        t *= (double)(j + 1) / ((dn - (double)j) * odds); /* pmf(j) */
        cdf -= t;                                          /* P(B <= j - 1) */
    }
    return -1;
}

void lw_stats_order_ranks(size_t n, double p, double conf, size_t *r, size_t *s)
{
    const double a = 0.5 * (1.0 - conf);
    long lo = n ? binom_lower(n, p, a) : -1;      /* r - 1 */
    long hi = n ? binom_lower(n, 1.0 - p, a) : -1; /* n - s, by B' = n - B */
    *r = (size_t)(lo + 1);
    *s = hi < 0 ? n + 1 : n - (size_t)hi;
}

void lw_stats_wilson(size_t k, size_t n, double z, double *lo, double *hi)
{
    if (n == 0) {
        *lo = 0.0, *hi = 1.0;
        return;
    }
    const double dn = (double)n, ph = (double)k / dn, z2 = z * z;
    const double centre = (ph + z2 / (2.0 * dn)) / (1.0 + z2 / dn);
    const double half = z / (1.0 + z2 / dn) * sqrt(ph * (1.0 - ph) / dn + z2 / (4.0 * dn * dn));
    /* at k = 0 and k = n the ends are 0 and 1 exactly (the formula's, without
     * the rounding of centre - half) */
    *lo = k == 0 ? 0.0 : fmax(0.0, centre - half);
    *hi = k == n ? 1.0 : fmin(1.0, centre + half);
}

typedef struct ranked {
    double v;
    size_t i;
} ranked;

static int cmp_ranked(const void *a, const void *b)
{
    const ranked *x = a, *y = b;
    if (x->v != y->v)
        return (x->v > y->v) - (x->v < y->v);
    return (x->i > y->i) - (x->i < y->i);
}

bool lw_stats_ranks(const double *x, size_t n, double *rank)
{
    ranked *w = lw_malloc((n ? n : 1) * sizeof *w);
    if (!w)
        return false;
    for (size_t i = 0; i < n; i++)
        w[i] = (ranked){x[i], i};
    qsort(w, n, sizeof *w, cmp_ranked);
    for (size_t i = 0; i < n;) {
        size_t j = i + 1;
        while (j < n && w[j].v == w[i].v)
            j++;
        double mid = 0.5 * (double)(i + 1 + j); /* the mean of ranks i + 1 .. j */
        for (size_t t = i; t < j; t++)
            rank[w[t].i] = mid;
        i = j;
    }
    free(w);
    return true;
}

/* Solve the symmetric positive definite a[k][k] x = b by Cholesky in place
 * (a's lower triangle becomes the factor); inv_diag[j] = (a^-1)_jj.  false
 * when a is not positive definite. */
static bool cholesky_solve(double a[LW_STATS_SRRC_MAX][LW_STATS_SRRC_MAX], size_t k, double *b,
                           double *inv_diag)
{
    for (size_t j = 0; j < k; j++) {
        double d = a[j][j];
        for (size_t t = 0; t < j; t++)
            d -= a[j][t] * a[j][t];
        if (!(d > 1e-12))
            return false;
        a[j][j] = sqrt(d);
        for (size_t i = j + 1; i < k; i++) {
            double v = a[i][j];
            for (size_t t = 0; t < j; t++)
                v -= a[i][t] * a[j][t];
            a[i][j] = v / a[j][j];
        }
    }
    for (size_t i = 0; i < k; i++) { /* L y = b */
        for (size_t t = 0; t < i; t++)
            b[i] -= a[i][t] * b[t];
        b[i] /= a[i][i];
    }
    for (size_t i = k; i-- > 0;) { /* L^T x = y */
        for (size_t t = i + 1; t < k; t++)
            b[i] -= a[t][i] * b[t];
        b[i] /= a[i][i];
    }
    for (size_t j = 0; j < k; j++) { /* (A^-1)_jj = |L^-1 e_j|^2 */
        double col[LW_STATS_SRRC_MAX] = {0};
        col[j] = 1.0;
        double s = 0.0;
        for (size_t i = j; i < k; i++) {
            for (size_t t = j; t < i; t++)
                col[i] -= a[i][t] * col[t];
            col[i] /= a[i][i];
            s += col[i] * col[i];
        }
        inv_diag[j] = s;
    }
    return true;
}

lw_status lw_stats_srrc(const double *const *x, size_t k, const double *y, size_t n,
                        double *beta, double *se, double *r2, lw_error *err)
{
    if (k > LW_STATS_SRRC_MAX || n <= k + 1)
        return lw_error_set(err, LW_EINPUT, NULL, 0,
                            "rank regression needs more samples (%zu) than keys (%zu) + 1", n, k);
    double *rk = lw_malloc((k + 1) * n * sizeof *rk);
    if (!rk)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the rank regression");
    /* ranks, centred and scaled to unit root mean square */
    double scale[LW_STATS_SRRC_MAX + 1];
    for (size_t j = 0; j <= k; j++) {
        double *col = rk + j * n;
        if (!lw_stats_ranks(j < k ? x[j] : y, n, col)) {
            free(rk);
            return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the rank regression");
        }
        double m = 0.0, ss = 0.0;
        for (size_t i = 0; i < n; i++)
            m += col[i];
        m /= (double)n;
        for (size_t i = 0; i < n; i++) {
            col[i] -= m;
            ss += col[i] * col[i];
        }
        scale[j] = sqrt(ss);
        for (size_t i = 0; ss > 0.0 && i < n; i++)
            col[i] /= scale[j];
    }
    if (!(scale[k] > 0.0)) {
        free(rk);
        return lw_error_set(err, LW_EINPUT, NULL, 0, "the quantity does not vary");
    }
    /* the correlation matrix of the columns that vary, and with y */
    size_t use[LW_STATS_SRRC_MAX], m = 0;
    for (size_t j = 0; j < k; j++) {
        beta[j] = se[j] = 0.0;
        if (scale[j] > 0.0)
            use[m++] = j;
    }
    double a[LW_STATS_SRRC_MAX][LW_STATS_SRRC_MAX], b[LW_STATS_SRRC_MAX] = {0},
        inv[LW_STATS_SRRC_MAX];
    for (size_t p = 0; p < m; p++) {
        const double *cp = rk + use[p] * n, *cy = rk + k * n;
        double s = 0.0;
        for (size_t i = 0; i < n; i++)
            s += cp[i] * cy[i];
        b[p] = s;
        for (size_t q = 0; q <= p; q++) {
            const double *cq = rk + use[q] * n;
            double t = 0.0;
            for (size_t i = 0; i < n; i++)
                t += cp[i] * cq[i];
            a[p][q] = a[q][p] = t;
        }
    }
    double rxy[LW_STATS_SRRC_MAX];
    memcpy(rxy, b, m * sizeof *b);
    free(rk);
    *r2 = 0.0;
    if (m == 0)
        return LW_OK;
    if (!cholesky_solve(a, m, b, inv))
        return lw_error_set(err, LW_EINPUT, NULL, 0,
                            "the spread keys' values are collinear: their shares cannot be told "
                            "apart");
    for (size_t p = 0; p < m; p++)
        *r2 += b[p] * rxy[p];
    const double resid = fmax(0.0, 1.0 - *r2) / (double)(n - m - 1);
    for (size_t p = 0; p < m; p++) {
        beta[use[p]] = b[p];
        se[use[p]] = sqrt(resid * inv[p]);
    }
    return LW_OK;
}
