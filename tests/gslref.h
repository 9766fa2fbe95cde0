/*
 * gslref.h - GSL as the independent reference of the tests: a root of f on
 * [a, b] by GSL's own Brent solver (gsl_root_fsolver_brent), to the given
 * absolute and relative tolerances.
 */
#ifndef LW_GSLREF_H
#define LW_GSLREF_H

#include <gsl/gsl_errno.h>
#include <gsl/gsl_roots.h>

static inline double gsl_brent(double (*f)(double, void *), void *params, double a, double b,
                               double epsabs, double epsrel)
{
    gsl_function F = {f, params};
    gsl_root_fsolver *s = gsl_root_fsolver_alloc(gsl_root_fsolver_brent);
    gsl_root_fsolver_set(s, &F, a, b);
    int st = GSL_CONTINUE;
    for (int it = 0; it < 300 && st == GSL_CONTINUE; it++) {
        gsl_root_fsolver_iterate(s);
        st = gsl_root_test_interval(gsl_root_fsolver_x_lower(s), gsl_root_fsolver_x_upper(s),
                                    epsabs, epsrel);
    }
    double x = gsl_root_fsolver_root(s);
    gsl_root_fsolver_free(s);
    return x;
}

#endif
