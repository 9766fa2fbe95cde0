/*
 * interp.c - monotone interpolation tables (see interp.h).
 *
 * Invariant: n >= 2, x strictly increasing, every value finite, m[] holds the
 * Fritsch-Carlson slopes, which keep each cubic piece inside the range of its
 * two end values whenever the data are monotone there.
 */
#include "lampwick/interp.h"
#include "lampwick/alloc.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

static double sign_of(double v) { return (v > 0) - (v < 0); }

/* Shape-preserving three-point end slope (as in Moler, "Numerical Computing
 * with MATLAB", section 3.4, pchip). */
static double end_slope(double h0, double h1, double d0, double d1)
{
    double s = ((2.0 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
    if (sign_of(s) != sign_of(d0))
        s = 0.0;
    else if (sign_of(d0) != sign_of(d1) && fabs(s) > fabs(3.0 * d0))
        s = 3.0 * d0;
    return s;
}

static void compute_slopes(lw_interp *t)
{
    size_t n = t->n;
    if (n == 2) {
        double d = (t->y[1] - t->y[0]) / (t->x[1] - t->x[0]);
        t->m[0] = t->m[1] = d;
        return;
    }
    for (size_t k = 1; k + 1 < n; k++) {
        double h0 = t->x[k] - t->x[k - 1], h1 = t->x[k + 1] - t->x[k];
        double d0 = (t->y[k] - t->y[k - 1]) / h0, d1 = (t->y[k + 1] - t->y[k]) / h1;
        if (d0 == 0.0 || d1 == 0.0 || sign_of(d0) != sign_of(d1)) {
            t->m[k] = 0.0;
        } else {
            double w1 = 2.0 * h1 + h0, w2 = h1 + 2.0 * h0;
            t->m[k] = (w1 + w2) / (w1 / d0 + w2 / d1);
        }
    }
    double h0 = t->x[1] - t->x[0], h1 = t->x[2] - t->x[1];
    double d0 = (t->y[1] - t->y[0]) / h0, d1 = (t->y[2] - t->y[1]) / h1;
    t->m[0] = end_slope(h0, h1, d0, d1);
    h0 = t->x[n - 1] - t->x[n - 2];
    h1 = t->x[n - 2] - t->x[n - 3];
    d0 = (t->y[n - 1] - t->y[n - 2]) / h0;
    d1 = (t->y[n - 2] - t->y[n - 3]) / h1;
    t->m[n - 1] = end_slope(h0, h1, d0, d1);
}

/* The interior points off the straight line through their neighbours. */
static void find_corners(lw_interp *t)
{
    t->ncorner = 0;
    for (size_t k = 1; k + 1 < t->n; k++) {
        const double *x = t->x, *y = t->y;
        double u = (x[k] - x[k - 1]) / (x[k + 1] - x[k - 1]);
        double on_line = y[k - 1] + u * (y[k + 1] - y[k - 1]);
        double size = fabs(y[k - 1]) + fabs(y[k]) + fabs(y[k + 1]);
        if (fabs(y[k] - on_line) > LW_INTERP_CORNER_ULPS * DBL_EPSILON * size)
            t->corner[t->ncorner++] = k;
    }
}

lw_interp *lw_interp_new(const double *x, const double *y, size_t n, lw_error *err)
{
    if (n < 2) {
        lw_error_set(err, LW_EINPUT, NULL, 0, "a table needs at least 2 points, got %zu", n);
        return NULL;
    }
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(x[i]) || !isfinite(y[i])) {
            lw_error_set(err, LW_EINPUT, NULL, 0, "point %zu is not a finite number", i + 1);
            return NULL;
        }
        if (i > 0 && !(x[i] > x[i - 1])) {
            lw_error_set(err, LW_EINPUT, NULL, 0,
                         "point %zu: x = %g does not increase on the previous %g", i + 1,
                         x[i], x[i - 1]);
            return NULL;
        }
    }
    lw_interp *t = lw_calloc(1, sizeof *t);
    /* x, y, m and the corners in one block */
    double *buf = lw_malloc(3 * n * sizeof *buf + n * sizeof(size_t));
    if (!t || !buf) {
        free(t);
        free(buf);
        lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a %zu-point table", n);
        return NULL;
    }
    t->n = n;
    t->x = buf;
    t->y = buf + n;
    t->m = buf + 2 * n;
    memcpy(t->x, x, n * sizeof *x);
    memcpy(t->y, y, n * sizeof *y);
    atomic_init(&t->refs, 1);
    compute_slopes(t);
    t->corner = (size_t *)(void *)(buf + 3 * n);
    find_corners(t);
    return t;
}

double lw_interp_corner_above(const lw_interp *t, double x)
{
    size_t lo = 0, hi = t->ncorner; /* the first corner with x[corner] > x */
    while (lo < hi) {
        size_t mid = lo + (hi - lo) / 2;
        if (t->x[t->corner[mid]] > x)
            hi = mid;
        else
            lo = mid + 1;
    }
    return lo < t->ncorner ? t->x[t->corner[lo]] : INFINITY;
}

lw_interp *lw_interp_ref(lw_interp *t)
{
    if (t)
        atomic_fetch_add(&t->refs, 1);
    return t;
}

void lw_interp_free(lw_interp *t)
{
    if (!t || atomic_fetch_sub(&t->refs, 1) > 1)
        return;
    free(t->x); /* x, y and m share one block */
    free(t);
}

size_t lw_interp_find(const lw_interp *t, double x)
{
    size_t lo = 0, hi = t->n - 1;
    if (x <= t->x[0])
        return 0;
    if (x >= t->x[hi])
        return hi - 1;
    while (hi - lo > 1) {
        size_t mid = lo + (hi - lo) / 2;
        if (t->x[mid] <= x)
            lo = mid;
        else
            hi = mid;
    }
    return lo;
}

double lw_interp_linear(const lw_interp *t, double x)
{
    if (x <= t->x[0])
        return t->y[0];
    if (x >= t->x[t->n - 1])
        return t->y[t->n - 1];
    size_t i = lw_interp_find(t, x);
    double u = (x - t->x[i]) / (t->x[i + 1] - t->x[i]);
    return t->y[i] + u * (t->y[i + 1] - t->y[i]);
}

double lw_interp_cubic(const lw_interp *t, double x)
{
    if (x <= t->x[0])
        return t->y[0];
    if (x >= t->x[t->n - 1])
        return t->y[t->n - 1];
    size_t i = lw_interp_find(t, x);
    double h = t->x[i + 1] - t->x[i];
    double s = (x - t->x[i]) / h;
    double s2 = s * s, s3 = s2 * s;
    double h10 = s3 - 2 * s2 + s, h01 = -2 * s3 + 3 * s2, h11 = s3 - s2;
    /* y0 + (y1 - y0) h01 + ... is the Hermite form with h00 = 1 - h01; it
     * is exact on flat intervals, where the textbook sum can round below. */
    return t->y[i] + (t->y[i + 1] - t->y[i]) * h01 + h * (h10 * t->m[i] + h11 * t->m[i + 1]);
}

double lw_interp_end_slope(const lw_interp *t)
{
    size_t n = t->n;
    return (t->y[n - 1] - t->y[n - 2]) / (t->x[n - 1] - t->x[n - 2]);
}

int lw_interp_direction(const lw_interp *t, int strict)
{
    int up = 1, down = 1;
    for (size_t i = 1; i < t->n; i++) {
        double d = t->y[i] - t->y[i - 1];
        if (d < 0 || (strict && d == 0))
            up = 0;
        if (d > 0 || (strict && d == 0))
            down = 0;
    }
    return up ? 1 : (down ? -1 : 0);
}
