/*
 * roots.c - Brent's root finder and the real Wright omega function
 * (sources in roots.h).
 */
#include "lampwick/roots.h"

#include <float.h>
#include <math.h>
#include <stdbool.h>

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

double lw_root_wright_omega(double x)
{
    if (x < -745.0)
        return 0.0;
    if (x < -40.0)
        return exp(x); /* omega = e^x (1 - e^x + ...); the correction is below 1e-17 */
    double w;
    if (x <= 1.0) {
        /* Winitzki's approximation of W0(y), y = e^x: within about 2 % here. */
        double l = log1p(exp(x));
        w = l * (1.0 - log1p(l) / (2.0 + l));
    } else {
        /* asymptotic series of W0(e^x) (Corless et al., "On the Lambert W
         * function", Adv. Comput. Math. 5, 1996, eq. 4.19) to third order */
        double l1 = x, l2 = log(x), q = l2 / l1;
        w = l1 - l2 + q + q * (l2 - 2.0) / (2.0 * l1);
    }
    /* Fritsch-Shafer-Crowley iteration, fourth order: the error after a
     * step is about the fourth power of the step itself, so once a step moves
     * w by less than 2e-4 relative, w is exact to rounding.  Guesses within
     * 2 % need two steps, the series for large x usually one; the cap is a
     * safeguard. */
    for (int it = 0; it < 6; it++) {
        double r = x - w - log(w);
        double a = (1.0 + w) * (1.0 + w + 2.0 * r / 3.0);
        double wn = w * (1.0 + r / (1.0 + w) * (a - 0.5 * r) / (a - r));
        bool done = fabs(wn - w) <= 2e-4 * wn;
        w = wn;
        if (done)
            break;
    }
    return w;
}
