/*
 * transient.c - a light's run integrated in time (see transient.h).
 *
 * Units: time in s inside (h in the result), depth as a fraction,
 * temperatures in deg C, energies in J inside (Wh in the result).
 * Method: 3-stage Radau IIA (Hairer and Wanner, Solving ODEs II, IV.5) with
 * simplified Newton on a forward-difference Jacobian, step doubling for the
 * error (Hairer, Norsett and Wanner, Solving ODEs I, II.4), events by the
 * Illinois variant of regula falsi on the step size (M. Dowell and
 * P. Jarratt, BIT 11, 1971).
 *
 * Invariant: (t, x, q) is an accepted state - the integrals q from switch-on
 * to t - and no active event has fired before t.
 */
#include "lampwick/transient.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"

#define NX 3 /* depth, board, body */
#define NQ 6 /* lm s; J into LEDs, resistors, cells' R, driver; J drawn */
#define NS 3 /* Radau stages */
#define NZ (NX * NS)

/* The error of two half steps is (small - big) / (2^5 - 1) for a method of
 * order 5 (Richardson). */
#define DOUBLING_DIVISOR 31.0
/* Newton has converged when its last correction is below this share of the
 * tolerance (so it adds nothing to the step's error). */
#define NEWTON_TOL 1e-3
/* Event times are located to this share of the time since switch-on. */
#define EVENT_RTOL 1e-12
#define EVENT_ITER_MAX 200

/* Events: the ends of the run, 50 %, the regulator's state, and the knots of
 * the cell's curves, where the rates have a kink (the step restarts there,
 * so that no step straddles one and loses its order). */
enum {
    EV_REL, EV_FLOOR, EV_CELL_V, EV_CAPACITY, EV_HALF, EV_REGIME, EV_KNOT,
    EV_FOLD_FROM, EV_FOLD_TO, /* the body crossing the foldback's corners (kinks) */
    EV_NEXT_V, EV_NEXT_HOT,   /* a chain's triggers on cell voltage and body (the timer
                                 is hit exactly by the step, as 30 s is) */
    EV_COUNT
};

typedef struct tr {
    const lw_light *l;      /* the light in its current mode */
    const lw_light *l0;     /* the light as started: its cutoff is the run's */
    int mode;               /* the current mode of a step-down chain (0 without) */
    double mode_t0;         /* when it began, s */
    const lw_run_options *opt;
    lw_result *res;
    lw_error *err;
    bool fallback;
    double a[NS][NS], c[NS]; /* the Radau IIA tableau */
} tr;

/* The Radau IIA tableau of order 5 (Hairer and Wanner, Table IV.5.6). */
static void radau_tableau(double a[NS][NS], double c[NS])
{
    const double s6 = sqrt(6.0);
    c[0] = (4.0 - s6) / 10.0, c[1] = (4.0 + s6) / 10.0, c[2] = 1.0;
    a[0][0] = (88.0 - 7.0 * s6) / 360.0;
    a[0][1] = (296.0 - 169.0 * s6) / 1800.0;
    a[0][2] = (-2.0 + 3.0 * s6) / 225.0;
    a[1][0] = (296.0 + 169.0 * s6) / 1800.0;
    a[1][1] = (88.0 + 7.0 * s6) / 360.0;
    a[1][2] = (-2.0 - 3.0 * s6) / 225.0;
    a[2][0] = (16.0 - s6) / 36.0;
    a[2][1] = (16.0 + s6) / 36.0;
    a[2][2] = 1.0 / 9.0;
}

void lw_transient_tableau(double a[3][3], double c[3])
{
    radau_tableau(a, c);
}

/* The rates of the operating point pt: dx/dt in f, integrands in g (may be
 * NULL).  No solve. */
static void rates_of(const tr *e, const lw_point *pt, double f[NX], double g[NQ])
{
    const lw_light *l = e->l;
    f[0] = isfinite(pt->dtdd_h) && pt->dtdd_h > 0.0 ? 1.0 / (3600.0 * pt->dtdd_h) : 0.0;
    double q_led = l->led.heat_fraction * pt->p_led_w;
    double q_other = l->thermal.losses_in_body ? pt->p_res_w + pt->p_int_w + pt->p_drv_w : 0.0;
    lw_thermal_rates(&l->thermal, l->pack.ambient_c, q_led, q_other, &pt->temps, &f[1], &f[2]);
    if (g) {
        g[0] = pt->flux_lm, g[1] = pt->p_led_w, g[2] = pt->p_res_w;
        g[3] = pt->p_int_w, g[4] = pt->p_drv_w, g[5] = pt->p_drawn_w;
    }
}

/* The operating point at state x and its rates: dx/dt in f, integrands in g. */
static lw_status eval(tr *e, const double x[NX], lw_point *pt, double f[NX], double g[NQ])
{
    if (++e->res->solves > e->opt->max_solves)
        return lw_error_set(e->err, LW_ENUMERIC, NULL, 0,
                            "the run in time stopped after %d operating-point solves near "
                            "depth %.6g (max_solves)",
                            e->opt->max_solves, x[0]);
    const lw_light *l = e->l;
    const lw_cell *c = &l->pack.cell;
    double d = x[0] < 0.0 ? 0.0 : (x[0] > 1.0 ? 1.0 : x[0]);
    double ocv = lw_interp_linear(c->ocv, d);
    double r = lw_interp_linear(c->res, d) * l->res_factor;
    lw_temps s = {NAN, x[1], x[2]};
    lw_status st = lw_light_point_state(l, d, ocv, r, e->fallback, &s, pt, e->err);
    if (st == LW_OK)
        rates_of(e, pt, f, g);
    return st;
}

/* Scale of each state component for the error norm. */
static double scale(int k, double v)
{
    return k == 0 ? fabs(v) + 1e-3 : fabs(v) + 273.15;
}

/* Solve m z = r in place (Gaussian elimination, partial pivoting); false
 * when singular. */
static bool lu_solve(double m[NZ][NZ], double r[NZ])
{
    for (int k = 0; k < NZ; k++) {
        int p = k;
        for (int i = k + 1; i < NZ; i++)
            if (fabs(m[i][k]) > fabs(m[p][k]))
                p = i;
        if (!(fabs(m[p][k]) > 0.0))
            return false;
        if (p != k) {
            for (int j = 0; j < NZ; j++) {
                double t = m[k][j];
                m[k][j] = m[p][j];
                m[p][j] = t;
            }
            double t = r[k];
            r[k] = r[p];
            r[p] = t;
        }
        for (int i = k + 1; i < NZ; i++) {
            double f = m[i][k] / m[k][k];
            for (int j = k; j < NZ; j++)
                m[i][j] -= f * m[k][j];
            r[i] -= f * r[k];
        }
    }
    for (int k = NZ - 1; k >= 0; k--) {
        double s = r[k];
        for (int j = k + 1; j < NZ; j++)
            s -= m[k][j] * r[j];
        r[k] = s / m[k][k];
    }
    return true;
}

/* The Jacobian df/dx at x0 by forward differences (f0 = f(x0)). */
static lw_status jacobian(tr *e, const double x0[NX], const double f0[NX], double jac[NX][NX])
{
    for (int b = 0; b < NX; b++) {
        double x[NX] = {x0[0], x0[1], x0[2]};
        double dx = 1.5e-8 * scale(b, x0[b]);
        x[b] += dx;
        lw_point pt;
        double f[NX] = {0};
        lw_status st = eval(e, x, &pt, f, NULL);
        if (st != LW_OK)
            return st;
        for (int a = 0; a < NX; a++)
            jac[a][b] = (f[a] - f0[a]) / dx;
    }
    return LW_OK;
}

/* One Radau IIA step of size h from x0 (jac at x0): x1, the integrals'
 * increments dq and the point at x1.  *ok false when Newton does not
 * converge (the caller shrinks the step). */
static lw_status radau_step(tr *e, const double x0[NX], const lw_point *p0,
                            double jac[NX][NX], double h, double x1[NX], double dq[NQ],
                            lw_point *p1, bool *ok)
{
    double m[NZ][NZ];
    for (int i = 0; i < NS; i++)
        for (int a = 0; a < NX; a++)
            for (int j = 0; j < NS; j++)
                for (int b = 0; b < NX; b++)
                    m[i * NX + a][j * NX + b] =
                        (i == j && a == b ? 1.0 : 0.0) - h * e->a[i][j] * jac[a][b];
    double z[NZ] = {0}, f[NS][NX], g[NS][NQ];
    lw_point pts[NS];
    double prev = INFINITY;
    *ok = false;
    for (int it = 0; it < LW_TRANSIENT_NEWTON_MAX; it++) {
        for (int i = 0; i < NS; i++) {
            if (it == 0) { /* z = 0: every stage at x0, whose point is known */
                pts[i] = *p0;
                rates_of(e, p0, f[i], g[i]);
                continue;
            }
            double y[NX];
            for (int a = 0; a < NX; a++)
                y[a] = x0[a] + z[i * NX + a];
            lw_status st = eval(e, y, &pts[i], f[i], g[i]);
            if (st != LW_OK)
                return st;
        }
        if (it > 0 && prev <= NEWTON_TOL) {
            *ok = true;
            break;
        }
        double r[NZ], mm[NZ][NZ];
        for (int i = 0; i < NS; i++)
            for (int a = 0; a < NX; a++) {
                double s = 0.0;
                for (int j = 0; j < NS; j++)
                    s += e->a[i][j] * f[j][a];
                r[i * NX + a] = -z[i * NX + a] + h * s;
            }
        memcpy(mm, m, sizeof mm);
        if (!lu_solve(mm, r))
            return LW_OK;
        double norm = 0.0;
        for (int i = 0; i < NS; i++)
            for (int a = 0; a < NX; a++) {
                z[i * NX + a] += r[i * NX + a];
                norm = fmax(norm, fabs(r[i * NX + a]) / (e->opt->rtol * scale(a, x0[a])));
            }
        if (!isfinite(norm) || (it >= 2 && norm > prev))
            return LW_OK; /* diverging */
        prev = norm;
    }
    if (!*ok)
        return LW_OK;
    for (int a = 0; a < NX; a++)
        x1[a] = x0[a] + z[(NS - 1) * NX + a];
    for (int k = 0; k < NQ; k++) {
        double s = 0.0;
        for (int j = 0; j < NS; j++)
            s += e->a[NS - 1][j] * g[j][k]; /* b = the last row (stiffly accurate) */
        dq[k] = h * s;
    }
    *p1 = pts[NS - 1]; /* c3 = 1: the last stage is the step's end */
    return LW_OK;
}

/* A step of size h from (x0, q0) as two half steps, with the error norm
 * of the pair against one whole step (1 or less: within tolerance). */
typedef struct step {
    double x[NX], dq[NQ];
    lw_point p;
    double err;
    bool ok;
} step;

static lw_status doubled(tr *e, const double x0[NX], const lw_point *p0, const double q0[NQ],
                         double h, step *out)
{
    double f0[NX] = {0}, jac[NX][NX] = {{0}};
    rates_of(e, p0, f0, NULL);
    lw_status st = jacobian(e, x0, f0, jac);
    double xb[NX], qb[NQ], xm[NX], qm[NQ], q2[NQ];
    lw_point pb, pm;
    bool ok1 = false, ok2 = false, ok3 = false;
    if (st == LW_OK)
        st = radau_step(e, x0, p0, jac, h, xb, qb, &pb, &ok1);
    if (st == LW_OK && ok1)
        st = radau_step(e, x0, p0, jac, 0.5 * h, xm, qm, &pm, &ok2);
    double fm[NX], jm[NX][NX];
    if (st == LW_OK && ok1 && ok2) {
        rates_of(e, &pm, fm, NULL); /* pm: the point at xm, its last stage */
        st = jacobian(e, xm, fm, jm);
        if (st == LW_OK)
            st = radau_step(e, xm, &pm, jm, 0.5 * h, out->x, q2, &out->p, &ok3);
    }
    out->ok = ok1 && ok2 && ok3;
    if (st != LW_OK || !out->ok)
        return st;
    /* the error of the two half steps, and the step taken as their
     * Richardson extrapolation (local extrapolation: order 6) */
    double err = 0.0;
    for (int a = 0; a < NX; a++) {
        double w = e->opt->rtol * fmax(scale(a, x0[a]), scale(a, out->x[a]));
        double est = (out->x[a] - xb[a]) / DOUBLING_DIVISOR;
        err = fmax(err, fabs(est) / w);
        out->x[a] += est;
    }
    for (int k = 0; k < NQ; k++) {
        double small = qm[k] + q2[k];
        out->dq[k] = small + (small - qb[k]) / DOUBLING_DIVISOR;
    }
    /* the integrals against their totals: light against light, every energy
     * against the energy drawn (of which each is a share, so that a share
     * near zero - a driver's rounding-level loss - asks no more than that) */
    for (int k = 0; k < NQ; k++) {
        double est = (qm[k] + q2[k] - qb[k]) / DOUBLING_DIVISOR;
        int ref_k = k == 0 ? 0 : NQ - 1;
        double w = e->opt->rtol * fabs(q0[ref_k] + out->dq[ref_k]) + 1e-300;
        err = fmax(err, fabs(est) / w);
    }
    out->err = isfinite(err) ? err : INFINITY;
    /* the point at the extrapolated state */
    double f[NX] = {0};
    return eval(e, out->x, &out->p, f, NULL);
}

/* ---- events ---- */

typedef struct run {
    tr e;
    double t, x[NX], q[NQ];
    lw_point p;             /* the point at (t, x) */
    double ref, floor_lm, frac;
    bool ref_known, half_armed, regime_pos, done;
    bool fold_above[2];     /* the body above foldback_from_c, foldback_to_c */
    double regulated_s;
    double knot_next;       /* the first knot of the cell's curves above the depth */
    size_t cap_states;
} run;

/* The first knot of the cell's OCV and resistance curves above depth d
 * (2 when there is none). */
static double knot_above(const lw_cell *c, double d)
{
    double k = 2.0;
    const lw_interp *t[2] = {c->ocv, c->res};
    for (int j = 0; j < 2; j++)
        for (size_t i = 0; i < t[j]->n; i++)
            if (t[j]->x[i] > d) {
                k = fmin(k, t[j]->x[i]);
                break;
            }
    return k;
}

/* The current mode of the chain, NULL without one. */
static const lw_chain_mode *chain_mode(const run *r)
{
    const lw_chain *c = r->e.l0->chain;
    return c ? &c->modes[r->e.mode] : NULL;
}

/* The time the current mode's timer fires, s (infinite without one). */
static double timer_at(const run *r)
{
    const lw_chain_mode *m = chain_mode(r);
    return m && m->next != LW_CHAIN_NONE && isfinite(m->after_s) ? r->e.mode_t0 + m->after_s
                                                                  : INFINITY;
}

static double event_g(const run *r, int k, const lw_point *p, double depth)
{
    switch (k) {
    case EV_REL: return p->flux_lm - r->frac * r->ref;
    case EV_FLOOR: return p->flux_lm - r->floor_lm;
    case EV_CELL_V: return p->cell_v - r->e.l0->cutoff.cell_v;
    case EV_NEXT_V: return p->cell_v - chain_mode(r)->below_cell_v;
    case EV_NEXT_HOT: return chain_mode(r)->above_c - p->temps.body_c;
    case EV_CAPACITY: return 1.0 - depth;
    case EV_HALF: return p->flux_lm - 0.5 * r->ref;
    case EV_KNOT: return r->knot_next - depth;
    case EV_FOLD_FROM:
    case EV_FOLD_TO: {
        const lw_thermal *th = &r->e.l->thermal;
        double corner = k == EV_FOLD_FROM ? th->foldback_from_c : th->foldback_to_c;
        double g = p->temps.body_c - corner;
        return r->fold_above[k - EV_FOLD_FROM] ? g : -g;
    }
    case EV_REGIME:
    default: return r->regime_pos ? p->regulation_margin : -p->regulation_margin;
    }
}

static bool active(const run *r, int k)
{
    if (k == EV_REL)
        return r->ref_known;
    if (k == EV_HALF)
        return r->ref_known && r->half_armed;
    if (k == EV_REGIME)
        return r->e.l->drive.type != LW_DRIVE_RESISTOR;
    if (k == EV_FOLD_FROM || k == EV_FOLD_TO)
        return lw_thermal_has_foldback(&r->e.l->thermal);
    if (k == EV_NEXT_V || k == EV_NEXT_HOT) {
        const lw_chain_mode *m = chain_mode(r);
        return m && m->next != LW_CHAIN_NONE &&
               isfinite(k == EV_NEXT_V ? m->below_cell_v : m->above_c);
    }
    return true;
}

/* Fired over the step to point p (depth d): the event function was
 * positive at the step's start and is not at its end. */
static bool fired(const run *r, int k, const lw_point *p, double d)
{
    return active(r, k) && event_g(r, k, &r->p, r->x[0]) > 0.0 && !(event_g(r, k, p, d) > 0.0);
}

/* An explicit Euler step of dt from step `from` (NULL: the accepted state):
 * only ever taken over the last 1e-12 of a located event, where its error
 * is far below the tolerance. */
static lw_status euler(run *r, const step *from, double dt, step *out)
{
    double x[NX], dq[NQ] = {0}, f[NX] = {0}, g[NQ] = {0};
    lw_point p;
    memcpy(x, from ? from->x : r->x, sizeof x);
    if (from)
        memcpy(dq, from->dq, sizeof dq);
    lw_status st = eval(&r->e, x, &p, f, g);
    if (st != LW_OK)
        return st;
    for (int a = 0; a < NX; a++)
        out->x[a] = x[a] + dt * f[a];
    for (int k = 0; k < NQ; k++)
        out->dq[k] = dq[k] + dt * g[k];
    out->ok = true;
    out->err = 0.0;
    return eval(&r->e, out->x, &out->p, f, NULL);
}

/* The earliest time tau in (0, h] at which event k fires: Illinois regula
 * falsi on the step size, every trial a doubled step from the accepted
 * state; a trial whose Newton iteration fails is taken to lie past the
 * event (it straddles the switch that the event marks).  *after (given:
 * a step to h whose point has fired) becomes the step at the located time,
 * *before the step just short of it (before->ok false: none, the event is
 * at the accepted state); *h_at the located step size. */
static lw_status locate(run *r, int k, double h, step *before, step *after, double *h_at)
{
    double a = 0.0, b = h, ga = event_g(r, k, &r->p, r->x[0]);
    double gb = event_g(r, k, &after->p, after->x[0]);
    before->ok = false;
    bool after_valid = after->ok;
    int side = 0;
    for (int it = 0; it < EVENT_ITER_MAX && b - a > EVENT_RTOL * (r->t + b); it++) {
        double tau = (ga * b - gb * a) / (ga - gb);
        if (!(tau > a && tau < b) || !isfinite(tau))
            tau = 0.5 * (a + b);
        step s;
        lw_status st = doubled(&r->e, r->x, &r->p, r->q, tau, &s);
        if (st != LW_OK)
            return st;
        double g = s.ok ? event_g(r, k, &s.p, s.x[0]) : -INFINITY;
        if (g > 0.0) {
            a = tau, ga = g, *before = s;
            if (side == -1)
                gb *= 0.5; /* Illinois: the stale end's value halved */
            side = -1;
        } else {
            b = tau;
            if (s.ok)
                gb = g, *after = s;
            else
                gb *= 0.5;
            after_valid = s.ok;
            if (side == 1)
                ga *= 0.5;
            side = 1;
        }
    }
    if (!after_valid) {
        /* the far side of the switch, from the near side */
        lw_status st = euler(r, before->ok ? before : NULL, b - a, after);
        if (st != LW_OK)
            return st;
    }
    *h_at = b;
    return LW_OK;
}

/* Keep (t, x) for the trace. */
static lw_status keep_state(run *r)
{
    lw_result *res = r->e.res;
    if (!r->e.opt->want_trace)
        return LW_OK;
    if (res->n_states == r->cap_states) {
        size_t cap = r->cap_states ? 2 * r->cap_states : 256;
        lw_state *s = lw_realloc(res->states, cap * sizeof *s);
        if (!s)
            return lw_error_set(r->e.err, LW_ENOMEM, NULL, 0, "out of memory for the trace");
        res->states = s;
        r->cap_states = cap;
    }
    res->states[res->n_states++] =
        (lw_state){r->t / 3600.0, r->x[0], r->x[1], r->x[2], r->e.fallback, r->e.mode};
    return LW_OK;
}

/* The peaks with the current point. */
static void peaks(run *r)
{
    lw_result *res = r->e.res;
    res->peak_junction_c = fmax(res->peak_junction_c, r->p.temps.junction_c);
    if (!(res->peak_body_c >= r->p.temps.body_c)) {
        res->peak_body_c = r->p.temps.body_c;
        res->peak_body_h = r->t / 3600.0;
    }
    res->peak_resistor_w = fmax(res->peak_resistor_w, r->p.p_res_peak_w);
    lw_run_note_resistor(r->e.l, &r->p, res);
}

/* Move to the end of step s of size h. */
static lw_status accept(run *r, const step *s, double h)
{
    if (r->p.regime == LW_REGIME_REGULATED)
        r->regulated_s += h;
    r->t += h;
    memcpy(r->x, s->x, sizeof r->x);
    for (int k = 0; k < NQ; k++)
        r->q[k] += s->dq[k];
    r->p = s->p;
    peaks(r);
    return keep_state(r);
}

static void finish(run *r, lw_end_reason why, const lw_point *p)
{
    r->e.res->end_reason = why;
    r->e.res->final = *p;
    r->done = true;
}

/* The 30-s point reached: the reference, and a light already at a cutoff. */
static void at_30s(run *r, const lw_point *p0)
{
    lw_result *res = r->e.res;
    const lw_light *l = r->e.l0;
    res->flux_30s_lm = r->p.flux_lm > 0.0 ? r->p.flux_lm : p0->flux_lm;
    res->junction_30s_c = r->p.temps.junction_c;
    res->depth_30s = r->x[0];
    r->ref = l->cutoff.reference == LW_REF_FRESH ? r->ref : res->flux_30s_lm;
    r->ref_known = true;
    r->half_armed = true;
    res->flux_ref_lm = r->ref;
    if (p0->flux_lm <= r->floor_lm || p0->flux_lm <= r->frac * r->ref) {
        finish(r, LW_END_DIM_AT_START, p0);
        r->t = 0.0;
        memcpy(r->x, (double[NX]){res->start_depth, l->pack.ambient_c, l->pack.ambient_c},
               sizeof r->x);
        memset(r->q, 0, sizeof r->q);
        r->regulated_s = 0.0;
    }
}

/* The drive at the current point cannot go on: a converter's dropout (its
 * margin reaching zero is the dropout). */
static bool dark(const run *r)
{
    return r->p.regime == LW_REGIME_DROPOUT ||
           (r->e.l->drive.type == LW_DRIVE_CONVERTER && !(r->p.regulation_margin > 0.0));
}

/* The point at the current state in the current mode, from its set level
 * (its fallback when the set level cannot start), and the event states
 * that depend on the mode. */
static lw_status mode_point(run *r)
{
    const lw_light *l = r->e.l;
    double f[NX];
    r->e.fallback = false;
    lw_status st = eval(&r->e, r->x, &r->p, f, NULL);
    if (st == LW_OK && r->p.regime == LW_REGIME_DROPOUT && l->drive.fallback_a > 0.0) {
        r->e.fallback = true;
        st = eval(&r->e, r->x, &r->p, f, NULL);
    }
    r->regime_pos = r->p.regulation_margin > 0.0;
    r->fold_above[0] = r->p.temps.body_c > l->thermal.foldback_from_c;
    r->fold_above[1] = r->p.temps.body_c > l->thermal.foldback_to_c;
    return st;
}

/* The trigger of the current mode that fires at the current state (the
 * timer, then the cell voltage, then the body), -1 for none. */
static int trigger_now(const run *r)
{
    const lw_chain_mode *m = chain_mode(r);
    if (!m || m->next == LW_CHAIN_NONE)
        return -1;
    if (r->t >= timer_at(r))
        return LW_SWITCH_TIMER;
    if (isfinite(m->below_cell_v) && !(r->p.cell_v > m->below_cell_v))
        return LW_SWITCH_CELL_V;
    if (isfinite(m->above_c) && !(r->p.temps.body_c < m->above_c))
        return LW_SWITCH_HOT;
    return -1;
}

static lw_status act(run *r, int k, const step *before);

/* Switch to the current mode's next (or off), keeping depth and
 * temperatures; the new mode's 50 % applies at once, a dropout that
 * darkens the light ends it without counting as 50 %. */
static lw_status switch_mode(run *r, lw_switch_cause cause)
{
    const lw_chain_mode *m = chain_mode(r);
    lw_result *res = r->e.res;
    if (res->n_switches >= LW_CHAIN_MAX) /* only a cyclic chain could get here */
        return lw_error_set(r->e.err, LW_ENUMERIC, NULL, 0,
                            "more than %d mode switches in one run", LW_CHAIN_MAX);
    lw_switch *sw = &res->switches[res->n_switches++];
    *sw = (lw_switch){r->t / 3600.0, r->e.mode, m->next, cause, r->p.flux_lm, 0.0};
    if (m->next == LW_CHAIN_OFF) {
        finish(r, LW_END_SWITCHED_OFF, &r->p);
        return LW_OK;
    }
    const lw_point before = r->p;
    r->e.mode = m->next;
    r->e.l = r->e.l0->chain->modes[m->next].light;
    r->e.mode_t0 = r->t;
    lw_status st = mode_point(r);
    if (st != LW_OK)
        return st;
    sw->flux_after_lm = r->p.flux_lm;
    if (dark(r)) {
        finish(r, LW_END_DRIVER_DROPOUT, &before);
        return LW_OK;
    }
    peaks(r);
    if (active(r, EV_HALF) && !(event_g(r, EV_HALF, &r->p, r->x[0]) > 0.0))
        st = act(r, EV_HALF, NULL);
    return st == LW_OK ? keep_state(r) : st;
}

/* The chain's triggers at the current instant, cascading. */
static lw_status cascade(run *r)
{
    lw_status st = LW_OK;
    for (int n = 0; st == LW_OK && !r->done && n <= LW_CHAIN_MAX; n++) {
        int cause = trigger_now(r);
        if (cause < 0)
            break;
        st = switch_mode(r, (lw_switch_cause)cause);
    }
    return st;
}

/* Everything that happens at the current instant once event `first` (-1:
 * none) has fired: 50 % first, then the event itself unless it is an end,
 * then the chain's triggers (cascading), then the ends (a light steps down
 * rather than ends). */
static lw_status at_instant(run *r, int first, const step *before)
{
    lw_status st = LW_OK;
    if (first >= 0 && first != EV_HALF && active(r, EV_HALF) &&
        !(event_g(r, EV_HALF, &r->p, r->x[0]) > 0.0))
        st = act(r, EV_HALF, before);
    bool end = first >= EV_REL && first <= EV_CAPACITY;
    size_t switches = r->e.res->n_switches;
    if (st == LW_OK && first >= 0 && !end)
        st = act(r, first, before);
    if (st == LW_OK)
        st = cascade(r);
    if (st == LW_OK && end && !r->done && r->e.res->n_switches == switches)
        st = act(r, first, before); /* no switch: the end located stands */
    /* an end already reached at this instant ends the run now */
    for (int k = EV_REL; k <= EV_CAPACITY && st == LW_OK && !r->done; k++)
        if (active(r, k) && !(event_g(r, k, &r->p, r->x[0]) > 0.0))
            st = act(r, k, before);
    return st;
}

/* Act on the event k that fired at the current state. */
static lw_status act(run *r, int k, const step *before)
{
    static const lw_end_reason why[] = {LW_END_RELATIVE, LW_END_FLUX_FLOOR,
                                        LW_END_CELL_VOLTAGE, LW_END_CAPACITY};
    if (k == EV_FOLD_FROM || k == EV_FOLD_TO) {
        /* a corner of the foldback crossed, either way: a kink */
        r->fold_above[k - EV_FOLD_FROM] = !r->fold_above[k - EV_FOLD_FROM];
        return LW_OK;
    }
    if (k == EV_NEXT_V || k == EV_NEXT_HOT)
        return LW_OK; /* the chain switches in at_instant */
    if (k == EV_KNOT) {
        /* at (or within 1e-12 past) the knot: the next one */
        r->knot_next = knot_above(&r->e.l->pack.cell, r->x[0] + 1e-12);
        return LW_OK;
    }
    if (k == EV_HALF) {
        r->e.res->time_to_half_h = r->t / 3600.0;
        r->half_armed = false;
        return LW_OK;
    }
    if (k != EV_REGIME) {
        finish(r, why[k], &r->p);
        return LW_OK;
    }
    /* the regulator's state changed: a kink, or a converter's dropout */
    if (!dark(r)) {
        r->regime_pos = r->p.regulation_margin > 0.0;
        return LW_OK;
    }
    if (!r->e.fallback && r->e.l->drive.fallback_a > 0.0) {
        r->e.fallback = true;
        double f[NX];
        lw_status st = eval(&r->e, r->x, &r->p, f, NULL);
        if (st != LW_OK)
            return st;
        r->regime_pos = r->p.regulation_margin > 0.0;
        if (r->p.regime != LW_REGIME_DROPOUT && r->p.regulation_margin > 0.0)
            return LW_OK;
    }
    finish(r, LW_END_DRIVER_DROPOUT, before->ok ? &before->p : &r->p);
    return LW_OK;
}

/* Integrate from the current state to the end (or to 30 s with
 * stop_at_30s). */
static lw_status integrate(run *r, bool stop_at_30s)
{
    const lw_point p0 = r->p;
    double t_est = (1.0 - r->x[0]) * 3600.0 * p0.dtdd_h;
    double h_max = isfinite(t_est) && t_est > 0.0 ? t_est / LW_TRANSIENT_STEPS_MIN : 3600.0;
    double h = fmin(h_max, 1.0);
    while (!r->done) {
        /* 30 s and a chain's timer are hit exactly by the step */
        double target = fmin(r->ref_known ? INFINITY : 30.0, timer_at(r));
        bool to_target = r->t + h >= target;
        if (to_target)
            h = target - r->t;
        step s;
        lw_status st = doubled(&r->e, r->x, &r->p, r->q, h, &s);
        if (st != LW_OK)
            return st;
        /* a step across a switch of the regulator (regulation to saturation,
         * a converter's dropout) fails its error test however short it is:
         * find the switch and step to it */
        bool regime_jump = s.ok && s.err > 1.0 && fired(r, EV_REGIME, &s.p, s.x[0]);
        step probe = s;
        if (!s.ok && active(r, EV_REGIME)) {
            /* Newton failed: does the regulator switch within the step? */
            st = euler(r, NULL, h, &probe);
            if (st != LW_OK)
                return st;
            regime_jump = fired(r, EV_REGIME, &probe.p, probe.x[0]);
        }
        if (regime_jump) {
            step b = {0}, a = probe;
            double h_event = h;
            st = locate(r, EV_REGIME, h, &b, &a, &h_event);
            if (st != LW_OK)
                return st;
            st = accept(r, &a, h_event);
            if (st == LW_OK)
                st = act(r, EV_REGIME, &b);
            if (st != LW_OK)
                return st;
            h = fmin(h_max, fmax(h_event, 1e-6 * (r->t + 1.0)));
            continue;
        }
        if (!s.ok || s.err > 1.0) {
            double f = s.ok ? fmax(0.2, 0.9 * pow(s.err, -1.0 / 6.0)) : 0.25;
            h *= f;
            if (h < 1e-9 * (r->t + 1.0))
                return lw_error_set(r->e.err, LW_ENUMERIC, NULL, 0,
                                    "the run in time could not keep its tolerance near "
                                    "%.6g h (the step shrank to nothing)",
                                    r->t / 3600.0);
            continue;
        }
        /* the earliest event over the step, if any */
        int first = -1;
        double h_event = h;
        step at = s, before = {0};
        for (int k = 0; k < EV_COUNT; k++) {
            if (!fired(r, k, &s.p, s.x[0]))
                continue;
            step b = {0}, a = s;
            double h_k = h;
            st = locate(r, k, h, &b, &a, &h_k);
            if (st != LW_OK)
                return st;
            if (first < 0 || h_k < h_event) {
                first = k, h_event = h_k, at = a, before = b;
            }
        }
        double grow = fmin(4.0, fmax(0.2, 0.9 * pow(fmax(s.err, 1e-30), -1.0 / 6.0)));
        size_t switches = r->e.res->n_switches;
        if (first >= 0) {
            st = accept(r, &at, h_event);
            if (st == LW_OK)
                st = at_instant(r, first, &before);
        } else {
            st = accept(r, &s, h);
            if (to_target)
                r->t = target; /* exactly, not by the rounding of the sum */
            if (st == LW_OK && !r->ref_known && r->t >= 30.0) {
                if (stop_at_30s)
                    return LW_OK;
                at_30s(r, &p0);
            }
            if (st == LW_OK && !r->done)
                st = at_instant(r, -1, &before);
        }
        if (st != LW_OK)
            return st;
        h = fmin(h_max, (first >= 0 ? h_event : h) * grow);
        if (r->e.res->n_switches != switches)
            h = fmin(h_max, 1.0); /* the rates jumped: start small again */
        if (!(h > 0.0))
            h = fmin(h_max, 1.0);
    }
    return LW_OK;
}

/* Start a run at depth d0 with the heat path at ambient. */
static lw_status start(run *r, double d0)
{
    const lw_light *l = r->e.l;
    r->t = 0.0;
    r->x[0] = d0, r->x[1] = r->x[2] = l->pack.ambient_c;
    memset(r->q, 0, sizeof r->q);
    r->knot_next = knot_above(&l->pack.cell, d0);
    return mode_point(r);
}

static void init_run(run *r, const lw_light *l, const lw_run_options *opt, lw_result *res,
                     lw_error *err)
{
    memset(r, 0, sizeof *r);
    r->e = (tr){.l = l, .l0 = l, .opt = opt, .res = res, .err = err};
    if (l->chain)
        r->e.l = l->chain->modes[0].light;
    radau_tableau(r->e.a, r->e.c);
    r->floor_lm = fmax(l->cutoff.flux_lm, opt->visible_lm);
    r->frac = l->cutoff.relative_pct / 100.0;
}

/* The light with fresh cells at 20 C (shallow: tables borrowed). */
static void freshen(lw_light *w)
{
    w->pack.stored_months = 0.0;
    w->pack.ambient_c = LW_FRESH_REFERENCE_C;
    lw_light_update_factors(w, NULL);
}

/* The 30-s output of the same light with fresh cells at 20 C (a chain's
 * every mode so). */
static lw_status fresh_reference(const run *from, double *flux_lm)
{
    lw_light w = *from->e.l0; /* shallow: tables borrowed, never freed here */
    freshen(&w);
    lw_chain *ch = NULL;
    if (w.chain) {
        ch = lw_malloc(sizeof *ch + w.chain->n * sizeof(lw_light));
        if (!ch)
            return lw_error_set(from->e.err, LW_ENOMEM, NULL, 0, "out of memory");
        memcpy(ch, w.chain, sizeof *ch);
        lw_light *modes = (lw_light *)(void *)(ch + 1);
        for (size_t i = 0; i < ch->n; i++) {
            modes[i] = *ch->modes[i].light;
            freshen(&modes[i]);
            ch->modes[i].light = &modes[i];
        }
        w.chain = ch;
    }
    lw_run_options o = *from->e.opt;
    o.want_trace = false;
    lw_result scratch;
    memset(&scratch, 0, sizeof scratch);
    run r;
    init_run(&r, &w, &o, &scratch, from->e.err);
    lw_status st = start(&r, 0.0);
    if (st == LW_OK)
        st = cascade(&r);
    if (st == LW_OK && !r.done && r.p.flux_lm > 0.0)
        st = integrate(&r, true);
    from->e.res->solves += scratch.solves;
    *flux_lm = r.p.flux_lm;
    free(ch);
    return st;
}

lw_status lw_transient_run(const lw_light *light, const lw_run_options *opt, lw_result *res,
                           lw_error *err)
{
    run r;
    init_run(&r, light, opt, res, err);
    lw_status st = start(&r, res->start_depth);
    if (st != LW_OK)
        return st;
    res->initial = r.p;
    res->peak_resistor_w = r.p.p_res_peak_w;
    lw_run_note_resistor(light, &r.p, res);
    res->peak_junction_c = r.p.temps.junction_c;
    res->peak_body_c = r.p.temps.body_c;
    res->peak_body_h = 0.0;
    if (light->cutoff.reference == LW_REF_FRESH && (st = fresh_reference(&r, &r.ref)) != LW_OK)
        return st;
    if (res->start_depth >= 1.0 || r.p.cell_v <= light->cutoff.cell_v)
        finish(&r, LW_END_EMPTY_AT_START, &r.p);
    else if (!(r.p.flux_lm >= opt->visible_lm) || !isfinite(r.p.dtdd_h))
        finish(&r, LW_END_NEVER_LIT, &r.p);
    if (!r.done)
        st = keep_state(&r);
    if (st == LW_OK && !r.done)
        st = cascade(&r); /* a chain's triggers apply from switch-on */
    if (st == LW_OK && !r.done)
        st = integrate(&r, false);
    if (st != LW_OK)
        return st;
    if (!r.ref_known && !lw_run_end_is_dark(res->end_reason)) {
        /* ended before 30 s: the output at switch-on stands for the reference */
        res->flux_30s_lm = res->flux_ref_lm = res->initial.flux_lm;
        res->junction_30s_c = res->initial.temps.junction_c;
    }
    res->runtime_h = r.t / 3600.0;
    res->end_depth = res->final.depth;
    res->lumen_hours = r.q[0] / 3600.0;
    res->energy_led_wh = r.q[1] / 3600.0;
    res->energy_resistor_wh = r.q[2] / 3600.0;
    res->energy_internal_wh = r.q[3] / 3600.0;
    res->energy_driver_wh = r.q[4] / 3600.0;
    res->energy_drawn_wh = r.q[5] / 3600.0;
    res->regulated_h = r.regulated_s / 3600.0;
    return LW_OK;
}
