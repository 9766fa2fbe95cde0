/*
 * roots.c - Brent's root finder and the real Wright omega function
 * (sources in roots.h).
 */
#include "lampwick/roots.h"

#include <float.h>
#include <math.h>
#include <stdbool.h>
#include <stdint.h>
#include <string.h>

lw_status lw_root_brent(lw_root_fn f, void *ctx, double a, double b, double fa, double fb,
                        double xtol, int max_iter, double *root, lw_error *err)
{
    if (fa == 0.0) {
        *root = a;
        return LW_OK;
    }
    if (fb == 0.0) {
        *root = b;
        return LW_OK;
    }
    if ((fa > 0) == (fb > 0) || isnan(fa) || isnan(fb))
        return lw_error_set(err, LW_EINPUT, NULL, 0,
                            "root finder: f(%g) = %g and f(%g) = %g do not bracket a root", a, fa,
                            b, fb);
    double c = a, fc = fa, d = b - a, e = d;
    for (int it = 0; it < max_iter; it++) {
        if ((fb > 0) == (fc > 0)) {
            c = a;
            fc = fa;
            d = e = b - a;
        }
        if (fabs(fc) < fabs(fb)) {
            a = b;
            b = c;
            c = a;
            fa = fb;
            fb = fc;
            fc = fa;
        }
        double tol = 2.0 * DBL_EPSILON * fabs(b) + 0.5 * xtol;
        double m = 0.5 * (c - b);
        if (fabs(m) <= tol || fb == 0.0) {
            *root = b;
            return LW_OK;
        }
        if (fabs(e) >= tol && fabs(fa) > fabs(fb)) {
            double p, q, r, s = fb / fa;
            if (a == c) { /* secant */
                p = 2.0 * m * s;
                q = 1.0 - s;
            } else { /* inverse quadratic interpolation */
                q = fa / fc;
                r = fb / fc;
                p = s * (2.0 * m * q * (q - r) - (b - a) * (r - 1.0));
                q = (q - 1.0) * (r - 1.0) * (s - 1.0);
            }
            if (p > 0)
                q = -q;
            else
                p = -p;
            if (2.0 * p < fmin(3.0 * m * q - fabs(tol * q), fabs(e * q))) {
                e = d;
                d = p / q;
            } else {
                d = m;
                e = m;
            }
        } else {
            d = m;
            e = m;
        }
        a = b;
        fa = fb;
        b += fabs(d) > tol ? d : (m > 0 ? tol : -tol);
        fb = f(b, ctx);
        if (isnan(fb))
            return lw_error_set(err, LW_ENUMERIC, NULL, 0, "root finder: f(%g) is not a number",
                                b);
    }
    return lw_error_set(err, LW_ENUMERIC, NULL, 0,
                        "root finder: no convergence in %d evaluations", max_iter);
}

double lw_root_rough_log(double x)
{
    uint64_t bits;
    memcpy(&bits, &x, sizeof bits);
    int e = (int)((bits >> 52) & 0x7ff) - 1023;
    bits = (bits & 0x000fffffffffffffull) | 0x3ff0000000000000ull; /* m in [1, 2) */
    double m;
    memcpy(&m, &bits, sizeof m);
    double t = (m - 1.0) / (m + 1.0), t2 = t * t;
    return e * 0.693147180559945309417 +
           2.0 * t * (1.0 + t2 * (1.0 / 3.0 + t2 * (0.2 + t2 * (1.0 / 7.0))));
}

double lw_root_wright_omega(double x)
{
    double log_w;
    return lw_root_wright_omega_log(x, &log_w);
}

double lw_root_wright_omega_log(double x, double *log_w)
{
    if (x < -745.0) {
        *log_w = -INFINITY;
        return 0.0;
    }
    if (x < -40.0) {
        *log_w = x; /* omega = e^x (1 - e^x + ...); the correction is below 1e-17 */
        return exp(x);
    }
    double w;
    if (x <= 1.0) {
        /* Winitzki's approximation of W0(y), y = e^x: within about 2 % here. */
        double l = log1p(exp(x));
        w = l * (1.0 - log1p(l) / (2.0 + l));
    } else {
        /* asymptotic series of W0(e^x) (Corless et al., "On the Lambert W
         * function", Adv. Comput. Math. 5, 1996, eq. 4.19) to the fourth
         * power of 1/ln z: within 1e-4 from x = 5, 3e-8 at x = 27 */
        double l1 = x, l2 = lw_root_rough_log(x), u = 1.0 / l1, q = l2 * u;
        w = l1 - l2 +
            q * (1.0 + u * (0.5 * (l2 - 2.0) +
                            u * ((6.0 + l2 * (-9.0 + 2.0 * l2)) / 6.0 +
                                 u * (-12.0 + l2 * (36.0 + l2 * (-22.0 + 3.0 * l2))) / 12.0)));
    }
    /* Fritsch-Shafer-Crowley iteration, fourth order: the error after a
     * step is about the fourth power of the step itself, so once a step moves
     * w by less than 2e-4 relative, w is exact to rounding.  Guesses within
     * 2 % need two steps, the series for large x usually one; the cap is a
     * safeguard.  The logarithm of the last step's start gives ln w through
     * ln(w + dw) = ln w + ln(1 + dw/w), the series to its fifth power exact
     * to rounding for the steps that end the iteration. */
    double lw = 0.0;
    for (int it = 0; it < 6; it++) {
        lw = log(w);
        double r = x - w - lw;
        double a = (1.0 + w) * (1.0 + w + (2.0 / 3.0) * r);
        /* the relative step, one division: w_new = w (1 + d) */
        double d = r * (a - 0.5 * r) / ((1.0 + w) * (a - r));
        double wn = w * (1.0 + d);
        bool done = fabs(d) <= 2e-4 * (1.0 + d);
        lw += d * (1.0 + d * (-0.5 + d * (1.0 / 3.0 + d * (-0.25 + d * 0.2))));
        w = wn;
        if (done)
            break;
    }
    *log_w = lw;
    return w;
}
