/*
 * refmodel.h - pieces of the independent reference solutions that the
 * engine tests write from docs/model.md without the library's solvers:
 * linear interpolation of a cell curve, and the residual of a Shockley
 * LED string's loop (Kirchhoff's voltage law) for GSL's Brent solver.
 */
#ifndef LW_REFMODEL_H
#define LW_REFMODEL_H

#include <math.h>
#include <lampwick/lampwick.h>

/* Linear interpolation of a table, held at its ends. */
static inline double ref_interp(const lw_interp *t, double x)
{
    if (x <= t->x[0])
        return t->y[0];
    for (size_t i = 0; i + 1 < t->n; i++)
        if (x <= t->x[i + 1])
            return t->y[i] + (x - t->x[i]) / (t->x[i + 1] - t->x[i]) * (t->y[i + 1] - t->y[i]);
    return t->y[t->n - 1];
}

/* E - I R = a ln(1 + I/Is) + Rs I: the loop of a string of Shockley LEDs
 * (a = N n V_T, Rs = N R_s) through resistance R. */
typedef struct ref_loop {
    double e, r, a, is, rs;
} ref_loop;

static inline double ref_loop_residual(double i, void *p)
{
    const ref_loop *q = p;
    return q->e - i * q->r - q->a * log1p(i / q->is) - q->rs * i;
}

#endif
