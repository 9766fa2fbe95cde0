/*
 * transient.c - a light's run integrated in time (see transient.h).
 *
 * Units: time in s inside (h in the result), depth as a fraction,
 * temperatures in deg C, energies in J inside (Wh in the result).
 * Method: 3-stage Radau IIA (Hairer and Wanner, Solving ODEs II, IV.5) with
 * simplified Newton on forward-difference Jacobians kept while Newton
 * contracts fast, the embedded error estimate of order 3 (IV.8, RADAU5's),
 * events by the Illinois variant of regula falsi (M. Dowell and P. Jarratt,
 * BIT 11, 1971) on the collocation polynomial, then a safeguarded secant on
 * real steps; peaks by golden-section search (J. Kiefer, 1953).
 *
 * Invariant: (t, x, q) is an accepted state - the integrals q from switch-on
 * to t - and no active event has fired before t.
 */
#include "lampwick/transient.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"
#include "lampwick/quadrature.h"

#define NX 4 /* depth, board, body, and the kinetic wells' height difference */
#define NQ 6 /* lm s; J into LEDs, resistors, cells' R, driver; J drawn */
#define NS 3 /* Radau stages */
#define NZ (NX * NS)

/* Event times are located to this share of the time since switch-on. */
#define EVENT_RTOL 1e-12
#define EVENT_ITER_MAX 200
/* Quantities whose peaks are reported, and golden-section iterations for a
 * peak inside two steps (0.618^24: 1e-5 of the window in time, so 1e-10 of
 * its curvature in value). */
#define NPEAK 4
#define PEAK_ITER 24

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
    double tj_hint;         /* the last point's junction temperature: where the next
                               point's search starts (NAN: none yet) */
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

/* The depth at which the cell's curves are read at state x: the depth d
 * itself, or for a kinetic cell the available well's, d + (1 - c) u
 * (docs/model.md, "The kinetic battery model"). */
static double curve_depth(const tr *e, const double x[NX])
{
    const lw_cell *c = &e->l->pack.cell;
    double d = lw_cell_is_kinetic(c) ? x[0] + (1.0 - c->kinetic_c) * x[3] : x[0];
    return d < 0.0 ? 0.0 : (d > 1.0 ? 1.0 : d);
}

/* The rates at state x with operating point pt: dx/dt in f, integrands in
 * g (may be NULL).  No solve. */
static void rates_of(const tr *e, const double x[NX], const lw_point *pt, double f[NX],
                     double g[NQ])
{
    const lw_light *l = e->l;
    const lw_cell *c = &l->pack.cell;
    if (lw_cell_is_kinetic(c)) {
        /* the charge drawn, d, and the wells' height difference, u, both
         * per unit of the total capacity C; self-discharge takes the same
         * share of both wells */
        double cap = lw_cell_capacity_ah(c, 0.0, l->cap_factor);
        double ic = pt->pack_avg_a / l->pack.parallel;
        double lambda = lw_cell_self_discharge_per_h(c);
        bool lit = isfinite(pt->dtdd_h);
        f[0] = ((lit ? ic / cap : 0.0) + lambda * (1.0 - x[0])) / 3600.0;
        f[3] = ((lit ? ic / (c->kinetic_c * cap) : 0.0) - (c->kinetic_k_per_h + lambda) * x[3]) /
               3600.0;
    } else {
        f[0] = isfinite(pt->dtdd_h) && pt->dtdd_h > 0.0 ? 1.0 / (3600.0 * pt->dtdd_h) : 0.0;
        f[3] = 0.0;
    }
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
    lw_temps s = {e->tj_hint, x[1], x[2]};
    lw_status st = lw_light_point_depth(e->l, curve_depth(e, x), e->fallback, &s, pt, e->err);
    if (st == LW_OK) {
        rates_of(e, x, pt, f, g);
        e->tj_hint = pt->temps.junction_c; /* where the next point's search starts */
    }
    return st;
}

/* Scale of each state component for the error norm. */
static double scale(int k, double v)
{
    return k == 0 || k == 3 ? fabs(v) + 1e-3 : fabs(v) + 273.15;
}

/* LU factors of the leading nz x nz block of m in place (partial pivoting,
 * row swaps in piv); false when singular. */
static bool lu_factor(double m[NZ][NZ], int piv[NZ], int nz)
{
    for (int k = 0; k < nz; k++) {
        int p = k;
        for (int i = k + 1; i < nz; i++)
            if (fabs(m[i][k]) > fabs(m[p][k]))
                p = i;
        piv[k] = p;
        if (!(fabs(m[p][k]) > 0.0))
            return false;
        if (p != k)
            for (int j = 0; j < nz; j++) {
                double t = m[k][j];
                m[k][j] = m[p][j];
                m[p][j] = t;
            }
        for (int i = k + 1; i < nz; i++) {
            m[i][k] /= m[k][k];
            for (int j = k + 1; j < nz; j++)
                m[i][j] -= m[i][k] * m[k][j];
        }
    }
    return true;
}

/* Solve with the factors of lu_factor: r becomes m^-1 r. */
static void lu_apply(double m[NZ][NZ], const int piv[NZ], double r[NZ], int nz)
{
    /* the row swaps first: the factors' rows were swapped whole */
    for (int k = 0; k < nz; k++)
        if (piv[k] != k) {
            double t = r[k];
            r[k] = r[piv[k]];
            r[piv[k]] = t;
        }
    for (int k = 0; k < nz; k++)
        for (int i = k + 1; i < nz; i++)
            r[i] -= m[i][k] * r[k];
    for (int k = nz - 1; k >= 0; k--) {
        double s = r[k];
        for (int j = k + 1; j < nz; j++)
            s -= m[k][j] * r[j];
        r[k] = s / m[k][k];
    }
}

/* Solve the NX x NX system m v = r in place (Gaussian elimination with
 * partial pivoting; m is overwritten); false when singular. */
static bool solve_nx(double m[NX][NX], double r[NX])
{
    for (int k = 0; k < NX; k++) {
        int p = k;
        for (int i = k + 1; i < NX; i++)
            if (fabs(m[i][k]) > fabs(m[p][k]))
                p = i;
        if (!(fabs(m[p][k]) > 0.0) || !isfinite(m[p][k]))
            return false;
        for (int j = 0; j < NX; j++) {
            double t = m[k][j];
            m[k][j] = m[p][j];
            m[p][j] = t;
        }
        double t = r[k];
        r[k] = r[p];
        r[p] = t;
        for (int i = k + 1; i < NX; i++) {
            double f = m[i][k] / m[k][k];
            for (int j = k; j < NX; j++)
                m[i][j] -= f * m[k][j];
            r[i] -= f * r[k];
        }
    }
    for (int k = NX - 1; k >= 0; k--) {
        double sum = r[k];
        for (int j = k + 1; j < NX; j++)
            sum -= m[k][j] * r[j];
        r[k] = sum / m[k][k];
    }
    return true;
}

/* The Jacobians of the rates at an accepted state, by forward
 * differences: df/dx and dg/dx (the integrands'). */
typedef struct jac {
    double fx[NX][NX], gx[NQ][NX];
    bool valid;
} jac;

static lw_status jacobian(tr *e, const double x0[NX], const lw_point *p0, jac *j)
{
    double f0[NX], g0[NQ];
    rates_of(e, x0, p0, f0, g0);
    for (int b = 0; b < NX; b++) {
        if (b == 3 && !lw_cell_is_kinetic(&e->l->pack.cell)) {
            /* the wells do not exist: nothing depends on u (no solve spent) */
            for (int a = 0; a < NX; a++)
                j->fx[a][b] = 0.0;
            for (int k = 0; k < NQ; k++)
                j->gx[k][b] = 0.0;
            continue;
        }
        double x[NX];
        memcpy(x, x0, sizeof x);
        double dx = 1.5e-8 * scale(b, x0[b]);
        x[b] += dx;
        dx = x[b] - x0[b]; /* exactly representable */
        lw_point pt;
        double f[NX] = {0}, g[NQ] = {0};
        lw_status st = eval(e, x, &pt, f, g);
        if (st != LW_OK)
            return st;
        for (int a = 0; a < NX; a++)
            j->fx[a][b] = (f[a] - f0[a]) / dx;
        for (int k = 0; k < NQ; k++)
            j->gx[k][b] = (g[k] - g0[k]) / dx;
    }
    j->valid = true;
    return LW_OK;
}

/* A step of size h from an accepted state: the new state and the
 * integrals' increments, the stage increments z and zq (the collocation
 * polynomial, for dense output), the point at the end, the error norm of
 * the embedded estimate (1 or less: within tolerance) and the Newton
 * iteration's contraction. ok false when Newton does not converge. */
typedef struct step {
    double h;
    double x[NX], dq[NQ];
    double z[NS][NX], zq[NS][NQ];
    lw_point p;
    lw_point ps[NS - 1];    /* the points at the inner stages (c1, c2 of the step),
                               as Newton last solved them (ps_ok) */
    bool ps_ok;
    double err, theta;
    bool ok;
} step;

/* The error estimate of the embedded method of order 3 (Hairer and Wanner,
 * Solving ODEs II, IV.8, (8.19)-(8.20), as in their code RADAU5): its
 * weights on the stage increments, and gamma_0 = 1 / U1 of the real
 * eigenvalue of A^-1. */
#define EST_DD1 (-(13.0 + 7.0 * 2.449489742783178098) / 3.0)
#define EST_DD2 ((-13.0 + 7.0 * 2.449489742783178098) / 3.0)
#define EST_DD3 (-1.0 / 3.0)

static double radau_u1(void)
{
    return 30.0 / (6.0 + cbrt(81.0) - cbrt(9.0));
}

/* Newton is stopped when its estimated remaining error is below this share
 * of the tolerance: min(0.03, sqrt(rtol)) (RADAU5's default, Hairer and
 * Wanner IV.8). */
static double newton_kappa(double rtol)
{
    return fmin(0.03, sqrt(rtol));
}

/* The embedded error estimate of step s from (x0, p0): the error norm of
 * the state against rtol, and of the integrals against their totals (light
 * against light, every energy against the energy drawn, of which each is a
 * share). improve: the stiffly filtered second estimate (one solve), for
 * the first step and after a rejection (RADAU5). */
static lw_status estimate(tr *e, const double x0[NX], const lw_point *p0, const jac *j,
                          const double q0[NQ], bool improve, step *s)
{
    const double h = s->h, u = radau_u1() / h;
    const double dd[NS] = {EST_DD1, EST_DD2, EST_DD3};
    double f0[NX], g0[NQ], ex[NX], eq[NQ], m[NX][NX];
    rates_of(e, x0, p0, f0, g0);
    for (int a = 0; a < NX; a++) {
        double f2 = 0.0;
        for (int i = 0; i < NS; i++)
            f2 += dd[i] * s->z[i][a];
        ex[a] = f0[a] + f2 / h;
        for (int b = 0; b < NX; b++)
            m[a][b] = (a == b ? u : 0.0) - j->fx[a][b];
    }
    double rx[NX], mm[NX][NX];
    memcpy(rx, ex, sizeof rx);
    memcpy(mm, m, sizeof mm);
    if (!solve_nx(mm, ex)) {
        s->err = INFINITY;
        return LW_OK;
    }
    if (improve) {
        double y[NX], f[NX];
        lw_point pt;
        for (int a = 0; a < NX; a++)
            y[a] = x0[a] + ex[a];
        lw_status st = eval(e, y, &pt, f, NULL);
        if (st != LW_OK)
            return st;
        for (int a = 0; a < NX; a++)
            ex[a] = f[a] + (rx[a] - f0[a]);
        memcpy(mm, m, sizeof mm);
        if (!solve_nx(mm, ex)) {
            s->err = INFINITY;
            return LW_OK;
        }
    }
    double err = 0.0;
    for (int a = 0; a < NX; a++)
        err = fmax(err, fabs(ex[a]) / (e->opt->rtol * fmax(scale(a, x0[a]), scale(a, s->x[a]))));
    for (int k = 0; k < NQ; k++) {
        /* the integrals do not feed back: their block of the estimate is
         * (h / U1) (g0 + dd.zq / h + dg/dx ex) */
        double f2 = 0.0, gx = 0.0;
        for (int i = 0; i < NS; i++)
            f2 += dd[i] * s->zq[i][k];
        for (int b = 0; b < NX; b++)
            gx += j->gx[k][b] * ex[b];
        eq[k] = (g0[k] + f2 / h + gx) / u;
        int ref_k = k == 0 ? 0 : NQ - 1;
        double w = e->opt->rtol * fabs(q0[ref_k] + s->dq[ref_k]) + 1e-300;
        err = fmax(err, fabs(eq[k]) / w);
    }
    s->err = isfinite(err) ? err : INFINITY;
    return LW_OK;
}

/* One Radau IIA step of size h from the accepted state (x0, p0, integrals
 * q0) by simplified Newton on the Jacobians j; s->ok false when Newton does
 * not converge (the caller shrinks the step or renews the Jacobian). The
 * integrals' stage values are corrected to first order by dg/dx for
 * Newton's last correction, so they are as accurate as the state. */
static lw_status radau_step(tr *e, const double x0[NX], const lw_point *p0, const jac *j,
                            const double q0[NQ], double h, bool improve, step *s)
{
    /* the state's components in the Newton system: the wells' height
     * difference only for a kinetic cell (it stays 0 otherwise) */
    const int n = lw_cell_is_kinetic(&e->l->pack.cell) ? NX : NX - 1, nz = n * NS;
    double m[NZ][NZ];
    int piv[NZ];
    for (int i = 0; i < NS; i++)
        for (int a = 0; a < n; a++)
            for (int k = 0; k < NS; k++)
                for (int b = 0; b < n; b++)
                    m[i * n + a][k * n + b] =
                        (i == k && a == b ? 1.0 : 0.0) - h * e->a[i][k] * j->fx[a][b];
    s->h = h;
    s->ok = false;
    s->ps_ok = false;
    s->err = INFINITY;
    s->theta = 0.0;
    if (!lu_factor(m, piv, nz))
        return LW_OK;
    const double kappa = newton_kappa(e->opt->rtol);
    double z[NZ] = {0}, dz[NZ] = {0}, f[NS][NX], g[NS][NQ];
    double prev = INFINITY;
    bool converged = false;
    for (int it = 0; it < LW_TRANSIENT_NEWTON_MAX && !converged; it++) {
        for (int i = 0; i < NS; i++) {
            if (it == 0) { /* z = 0: every stage at x0, whose point is known */
                rates_of(e, x0, p0, f[i], g[i]);
                continue;
            }
            double y[NX] = {x0[0], x0[1], x0[2], x0[3]};
            lw_point pt;
            for (int a = 0; a < n; a++)
                y[a] = x0[a] + z[i * n + a];
            lw_status st = eval(e, y, &pt, f[i], g[i]);
            if (st != LW_OK)
                return st;
            if (i < NS - 1)
                s->ps[i] = pt;
            s->ps_ok = true;
        }
        for (int i = 0; i < NS; i++)
            for (int a = 0; a < n; a++) {
                double sum = 0.0;
                for (int k = 0; k < NS; k++)
                    sum += e->a[i][k] * f[k][a];
                dz[i * n + a] = -z[i * n + a] + h * sum;
            }
        lu_apply(m, piv, dz, nz);
        double norm = 0.0;
        for (int i = 0; i < NS; i++)
            for (int a = 0; a < n; a++) {
                z[i * n + a] += dz[i * n + a];
                norm = fmax(norm, fabs(dz[i * n + a]) / (e->opt->rtol * scale(a, x0[a])));
            }
        if (!isfinite(norm))
            return LW_OK;
        if (it == 0) {
            converged = norm <= kappa; /* the state does not move */
        } else {
            double theta = norm / prev;
            s->theta = fmax(s->theta, theta);
            if (theta >= 0.99)
                return LW_OK; /* diverging */
            converged = theta / (1.0 - theta) * norm <= kappa;
        }
        prev = norm;
    }
    if (!converged)
        return LW_OK;
    /* the integrands at the final stages, to first order from the last
     * evaluated ones */
    for (int i = 0; i < NS; i++)
        for (int k = 0; k < NQ; k++)
            for (int b = 0; b < n; b++)
                g[i][k] += j->gx[k][b] * dz[i * n + b];
    for (int i = 0; i < NS; i++) {
        for (int a = 0; a < NX; a++)
            s->z[i][a] = a < n ? z[i * n + a] : 0.0;
        for (int k = 0; k < NQ; k++) {
            double sum = 0.0;
            for (int c = 0; c < NS; c++)
                sum += e->a[i][c] * g[c][k];
            s->zq[i][k] = h * sum;
        }
    }
    for (int a = 0; a < NX; a++)
        s->x[a] = x0[a] + s->z[NS - 1][a];
    memcpy(s->dq, s->zq[NS - 1], sizeof s->dq); /* b = A's last row (stiffly accurate) */
    double fe[NX];
    lw_status st = eval(e, s->x, &s->p, fe, NULL);
    if (st != LW_OK)
        return st;
    s->ok = true;
    return estimate(e, x0, p0, j, q0, improve, s);
}

/* The collocation polynomial of step s at the fraction u of the step: the
 * state (x0 + sum z_i L_i(u), L_i the Lagrange basis on 0, c1, c2, c3 that
 * vanishes at 0) and, when dq is not NULL, the integrals' increments. */
static void dense(const tr *e, const double x0[NX], const step *s, double u, double x[NX],
                  double dq[NQ])
{
    double w[NS];
    for (int i = 0; i < NS; i++) {
        w[i] = u / e->c[i];
        for (int k = 0; k < NS; k++)
            if (k != i)
                w[i] *= (u - e->c[k]) / (e->c[i] - e->c[k]);
    }
    for (int a = 0; a < NX; a++) {
        x[a] = x0[a];
        for (int i = 0; i < NS; i++)
            x[a] += w[i] * s->z[i][a];
    }
    for (int k = 0; dq && k < NQ; k++) {
        dq[k] = 0.0;
        for (int i = 0; i < NS; i++)
            dq[k] += w[i] * s->zq[i][k];
    }
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
    double trace_dt;        /* with a trace, the longest gap between its states, s */
    jac j;                  /* the Jacobians, from the accepted state or an earlier one */
    bool j_fresh;           /* j is from the accepted state */
    /* the peak window: the last accepted step (from win_x at win_t), the
     * peak quantities at its start and end, and the step being accepted */
    step win;
    double win_x[NX], win_t, win_v[2][NPEAK];
    int win_steps;          /* 0: empty (at the start and after each event) */
    const step *win_next;
    /* a use schedule (NULL: on to the end) */
    const lw_schedule *use;
    const lw_light *first;  /* the light of the first session: its cutoff is the run's */
    size_t session;         /* the current session */
    double session_end;     /* the time of use at which it ends, s (infinite: none) */
    double cal_offset;      /* calendar time less time of use, s */
    bool session_over;      /* integrate() stopped at the session's end */
    size_t cap_sessions;
} run;

/* The first kink of the pack's curves above depth d (2: none before the
 * capacity end, which is an event of its own). */
static double knot_after(const lw_light *l, double d)
{
    double k = lw_light_knot_above(l, d);
    return k < lw_light_depth_end(l) ? k : 2.0;
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
    case EV_CELL_V: return p->weak_cell_v - r->first->cutoff.cell_v;
    case EV_NEXT_V: return p->cell_v - chain_mode(r)->below_cell_v;
    case EV_NEXT_HOT: return chain_mode(r)->above_c - p->temps.body_c;
    case EV_CAPACITY: return lw_light_depth_end(r->e.l) - depth;
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
    default: {
        /* a margin of exactly zero is still on the old side (a linear
         * regulator regulates at zero margin), so the located point is
         * past the switch */
        double g = r->regime_pos ? p->regulation_margin : -p->regulation_margin;
        return g == 0.0 ? DBL_MIN : g;
    }
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
    return active(r, k) && event_g(r, k, &r->p, curve_depth(&r->e, r->x)) > 0.0 && !(event_g(r, k, p, d) > 0.0);
}

/* An explicit Euler step of dt from step `from` (NULL: the accepted state):
 * only ever taken over the last 1e-12 of a located event, where its error
 * is far below the tolerance.  Its dense output is the straight line. */
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
    out->h = (from ? from->h : 0.0) + dt;
    for (int i = 0; i < NS; i++) {
        for (int a = 0; a < NX; a++)
            out->z[i][a] = r->e.c[i] * (out->x[a] - r->x[a]);
        for (int k = 0; k < NQ; k++)
            out->zq[i][k] = r->e.c[i] * out->dq[k];
    }
    out->ok = true;
    out->err = from ? from->err : 0.0;
    out->theta = 0.0;
    return eval(&r->e, out->x, &out->p, f, NULL);
}

/* Event k's function at the fraction u of the accepted step s on its
 * collocation polynomial (a solve, unless the event is on the depth
 * alone). */
static lw_status dense_g(run *r, int k, const step *s, double u, double *g)
{
    double x[NX];
    dense(&r->e, r->x, s, u, x, NULL);
    if (k == EV_KNOT || k == EV_CAPACITY) {
        *g = event_g(r, k, &r->p, curve_depth(&r->e, x));
        return LW_OK;
    }
    lw_point p;
    double f[NX];
    lw_status st = eval(&r->e, x, &p, f, NULL);
    *g = st == LW_OK ? event_g(r, k, &p, curve_depth(&r->e, x)) : NAN;
    return st;
}

/* The root of event k on the collocation polynomial of the accepted step
 * s (Illinois), as a time in the step, and the event function's slope
 * there (per s). */
static lw_status dense_root(run *r, int k, const step *s, double ga, double gb, double *tau,
                            double *slope)
{
    double ua = 0.0, ub = 1.0, fa = ga, fb = gb, ra = ga, rb = gb;
    int side = 0;
    const double tol_u = EVENT_RTOL * (r->t + s->h) / s->h;
    for (int it = 0; it < EVENT_ITER_MAX && ub - ua > tol_u; it++) {
        double u = (fa * ub - fb * ua) / (fa - fb);
        if (!(u > ua && u < ub) || !isfinite(u))
            u = 0.5 * (ua + ub);
        double g;
        lw_status st = dense_g(r, k, s, u, &g);
        if (st != LW_OK)
            return st;
        if (g > 0.0) {
            ua = u, fa = ra = g;
            if (side == -1)
                fb *= 0.5;
            side = -1;
        } else {
            ub = u, fb = rb = g;
            if (side == 1)
                fa *= 0.5;
            side = 1;
        }
    }
    double u = ra != rb ? (ra * ub - rb * ua) / (ra - rb) : 0.5 * (ua + ub);
    *tau = s->h * (u > ua && u < ub ? u : 0.5 * (ua + ub));
    *slope = (rb - ra) / ((ub - ua) * s->h);
    return LW_OK;
}

/* The earliest time tau in (0, h] at which event k fires.  With the
 * accepted step `big` whose end has fired, the root on its collocation
 * polynomial is the first guess; then a safeguarded secant on real steps
 * from the accepted state (each trial a Radau step of size tau, nudged a
 * little past the root so that the bracket closes), Illinois regula falsi
 * whenever the secant leaves the bracket.  A trial whose Newton iteration
 * fails is taken to lie past the event (it straddles the switch that the
 * event marks).  *after (given: a step to h whose point has fired) becomes
 * the step at the located time, *before the step just short of it
 * (before->ok false: none, the event is at the accepted state); *h_at the
 * located step size. */
static lw_status locate(run *r, int k, double h, const step *big, step *before, step *after,
                        double *h_at)
{
    double a = 0.0, b = h, ga = event_g(r, k, &r->p, curve_depth(&r->e, r->x));
    double gb = event_g(r, k, &after->p, curve_depth(&r->e, after->x));
    before->ok = false;
    bool after_valid = after->ok;
    double pred = NAN, slope = NAN, last_t = NAN, last_g = NAN;
    if (big) {
        lw_status st = dense_root(r, k, big, ga, gb, &pred, &slope);
        if (st != LW_OK)
            return st;
    }
    int side = 0;
    double width_before = INFINITY, width_now = INFINITY;
    for (int it = 0; it < EVENT_ITER_MAX; it++) {
        const double tol_t = EVENT_RTOL * (r->t + b);
        if (!(b - a > tol_t))
            break;
        /* the secant has not halved the bracket in two trials: Illinois */
        if (b - a > 0.5 * width_before)
            pred = NAN;
        width_before = width_now, width_now = b - a;
        double tau = pred;
        if (!(tau > a && tau < b) || !isfinite(tau)) {
            tau = (ga * b - gb * a) / (ga - gb); /* Illinois */
            if (!(tau > a && tau < b) || !isfinite(tau))
                tau = 0.5 * (a + b);
        }
        step s;
        lw_status st = radau_step(&r->e, r->x, &r->p, &r->j, r->q, tau, false, &s);
        if (st != LW_OK)
            return st;
        double g = s.ok ? event_g(r, k, &s.p, curve_depth(&r->e, s.x)) : -INFINITY;
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
        /* the secant's next guess, nudged past the root by a quarter of the
         * tolerance so that the bracket closes around it */
        if (s.ok && isfinite(last_g) && last_g != g && tau != last_t)
            slope = (g - last_g) / (tau - last_t);
        pred = s.ok && isfinite(slope) && slope != 0.0
                   ? tau - g / slope + (g > 0.0 ? 0.25 : -0.25) * tol_t
                   : NAN;
        if (s.ok)
            last_t = tau, last_g = g;
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

/* Keep state (t_s, x) for the trace. */
static lw_status keep(run *r, double t_s, const double x[NX])
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
        (lw_state){t_s / 3600.0,    curve_depth(&r->e, x), x[1], x[2], r->e.fallback,
                   r->e.mode,       (int)r->session};
    return LW_OK;
}

static lw_status keep_state(run *r)
{
    return keep(r, r->t, r->x);
}

/* With a trace, the states inside the step s of size h from the accepted
 * state, on its collocation polynomial, so that no gap between the
 * trace's states is longer than trace_dt. */
static lw_status keep_inside(run *r, const step *s, double h)
{
    if (!r->e.opt->want_trace || !(h > r->trace_dt))
        return LW_OK;
    double parts = ceil(h / r->trace_dt);
    lw_status st = LW_OK;
    for (double j = 1.0; j < parts && st == LW_OK; j += 1.0) {
        double x[NX], u = j / parts;
        dense(&r->e, r->x, s, u * h / s->h, x, NULL);
        st = keep(r, r->t + u * h, x);
    }
    return st;
}

/* The peaks with point p at time t_s. */
static void peaks_at(run *r, const lw_point *p, double t_s)
{
    lw_result *res = r->e.res;
    res->peak_junction_c = fmax(res->peak_junction_c, p->temps.junction_c);
    if (!(res->peak_body_c >= p->temps.body_c)) {
        res->peak_body_c = p->temps.body_c;
        res->peak_body_h = t_s / 3600.0;
    }
    res->peak_resistor_w = fmax(res->peak_resistor_w, p->p_res_peak_w);
    if (p->regime != LW_REGIME_DROPOUT)
        res->min_weak_cell_v = fmin(res->min_weak_cell_v, p->weak_cell_v);
    lw_run_note_resistor(r->e.l, p, res);
}

/* The peaks with the current point. */
static void peaks(run *r)
{
    peaks_at(r, &r->p, r->t);
}

/* The quantities whose peaks a run reports, at point p: junction, body,
 * resistor power, and the resistor's rating needed at the body's
 * temperature. */
static void peak_values(const run *r, const lw_point *p, double v[NPEAK])
{
    double k = lw_thermal_resistor_derating(p->temps.body_c);
    v[0] = p->temps.junction_c;
    v[1] = p->temps.body_c;
    v[2] = p->p_res_peak_w;
    v[3] = r->e.l->thermal.enabled && p->p_res_peak_w > 0.0 && k > 0.0 ? p->p_res_peak_w / k : 0.0;
}

/* The point at time t inside the two steps of the peak window (the earlier
 * one from x_a at t_a, the later one from the accepted state). */
static lw_status window_point(run *r, double t, lw_point *p)
{
    double x[NX], f[NX];
    if (t < r->t)
        dense(&r->e, r->win_x, &r->win, (t - r->win_t) / r->win.h, x, NULL);
    else
        dense(&r->e, r->x, r->win_next, (t - r->t) / r->win_next->h, x, NULL);
    return eval(&r->e, x, p, f, NULL);
}

/* Quantity i peaks inside the window (it rose over the earlier step and
 * fell over the later one): its maximum by golden-section search on the
 * steps' collocation polynomials (J. Kiefer, Proc. AMS 4, 1953), folded
 * into the peaks. */
static lw_status peak_inside(run *r, int i, double t_end)
{
    const double gr = 0.5 * (sqrt(5.0) - 1.0);
    double a = r->win_t, b = t_end;
    double c = b - gr * (b - a), d = a + gr * (b - a);
    lw_point pc = {0}, pd = {0}; /* zeroed for the analyzer: read only when solved */
    double vc[NPEAK], vd[NPEAK];
    lw_status st = window_point(r, c, &pc);
    if (st == LW_OK)
        st = window_point(r, d, &pd);
    if (st != LW_OK)
        return st;
    peak_values(r, &pc, vc);
    peak_values(r, &pd, vd);
    for (int it = 0; it < PEAK_ITER && st == LW_OK; it++) {
        if (vc[i] >= vd[i]) {
            b = d, d = c, pd = pc, vd[i] = vc[i];
            c = b - gr * (b - a);
            if ((st = window_point(r, c, &pc)) == LW_OK)
                peak_values(r, &pc, vc);
        } else {
            a = c, c = d, pc = pd, vc[i] = vd[i];
            d = a + gr * (b - a);
            if ((st = window_point(r, d, &pd)) == LW_OK)
                peak_values(r, &pd, vd);
        }
    }
    if (st == LW_OK) {
        bool at_c = vc[i] >= vd[i];
        peaks_at(r, at_c ? &pc : &pd, at_c ? c : d);
    }
    return st;
}

/* The peak window after step s of size h from the accepted state: a
 * quantity that rose over the window's earlier step and falls over this
 * one peaks inside the two (the steps are within one smooth stretch: the
 * window is emptied at every event). */
static lw_status peak_window(run *r, const step *s, double h)
{
    double v[NPEAK];
    peak_values(r, &s->p, v);
    lw_status st = LW_OK;
    if (r->win_steps == 0) {
        peak_values(r, &r->p, r->win_v[0]);
    } else {
        r->win_next = s;
        for (int i = 0; i < NPEAK && st == LW_OK; i++) {
            double top = r->win_v[1][i], tol = r->e.opt->rtol * fabs(top);
            if (top > r->win_v[0][i] && top >= v[i] &&
                fmax(top - r->win_v[0][i], top - v[i]) > tol)
                st = peak_inside(r, i, r->t + h);
        }
        r->win_next = NULL;
        memcpy(r->win_v[0], r->win_v[1], sizeof r->win_v[0]);
    }
    memcpy(r->win_v[1], v, sizeof v);
    r->win = *s;
    r->win.h = h;
    memcpy(r->win_x, r->x, sizeof r->win_x);
    r->win_t = r->t;
    r->win_steps = 1;
    return st;
}

/* Move to the end of step s of size h. */
static lw_status accept(run *r, const step *s, double h)
{
    lw_status st = keep_inside(r, s, h);
    if (st == LW_OK)
        st = peak_window(r, s, h);
    if (st != LW_OK)
        return st;
    r->j_fresh = false;
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
    res->depth_30s = curve_depth(&r->e, r->x);
    r->ref = l->cutoff.reference == LW_REF_FRESH ? r->ref : res->flux_30s_lm;
    r->ref_known = true;
    r->half_armed = true;
    res->flux_ref_lm = r->ref;
    if (p0->flux_lm <= r->floor_lm || p0->flux_lm <= r->frac * r->ref) {
        finish(r, LW_END_DIM_AT_START, p0);
        r->t = 0.0;
        memcpy(r->x, (double[NX]){res->start_depth, l->pack.ambient_c, l->pack.ambient_c, 0.0},
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
    /* every switch counts; the first LW_CHAIN_MAX are kept (a chain that
     * starts over at every session of a schedule switches many times) */
    lw_switch spare = {0};
    lw_switch *sw = res->n_switches < LW_CHAIN_MAX ? &res->switches[res->n_switches++] : &spare;
    res->switches_total++;
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
    if (active(r, EV_HALF) && !(event_g(r, EV_HALF, &r->p, curve_depth(&r->e, r->x)) > 0.0))
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
        !(event_g(r, EV_HALF, &r->p, curve_depth(&r->e, r->x)) > 0.0))
        st = act(r, EV_HALF, before);
    bool end = first >= EV_REL && first <= EV_CAPACITY;
    size_t switches = r->e.res->switches_total;
    if (st == LW_OK && first >= 0 && !end)
        st = act(r, first, before);
    if (st == LW_OK)
        st = cascade(r);
    if (st == LW_OK && end && !r->done && r->e.res->switches_total == switches)
        st = act(r, first, before); /* no switch: the end located stands */
    /* an end already reached at this instant ends the run now */
    for (int k = EV_REL; k <= EV_CAPACITY && st == LW_OK && !r->done; k++)
        if (active(r, k) && !(event_g(r, k, &r->p, curve_depth(&r->e, r->x)) > 0.0))
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
        r->knot_next = knot_after(r->e.l, curve_depth(&r->e, r->x) + 1e-12);
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

/* Whether the Jacobians are renewed after a step whose Newton iteration
 * contracted by theta: kept while Newton converges fast (RADAU5 renews
 * them unless theta is below 0.001; here a renewal costs as much as an
 * iteration, so they are kept longer). */
#define JAC_KEEP_THETA 0.05

/* Integrate from the current state to the end (or to 30 s with
 * stop_at_30s). */
static lw_status integrate(run *r, bool stop_at_30s)
{
    const lw_point p0 = r->p;
    double t_est = (1.0 - curve_depth(&r->e, r->x)) * 3600.0 * p0.dtdd_h;
    bool known = isfinite(t_est) && t_est > 0.0;
    double h_max = known ? t_est / LW_TRANSIENT_STEPS_MIN : 3600.0;
    r->trace_dt = known ? t_est / LW_TRANSIENT_TRACE_GAPS : 60.0;
    double h = fmin(h_max, 1.0);
    bool improve = true; /* the first step, or one after a rejection */
    while (!r->done) {
        /* 30 s, a chain's timer and a session's end are hit exactly by the
         * step */
        double target = fmin(fmin(r->ref_known ? INFINITY : 30.0, timer_at(r)), r->session_end);
        bool to_target = r->t + h >= target;
        if (to_target)
            h = target - r->t;
        lw_status st = LW_OK;
        if (!r->j.valid) {
            st = jacobian(&r->e, r->x, &r->p, &r->j);
            r->j_fresh = true;
        }
        step s;
        if (st == LW_OK)
            st = radau_step(&r->e, r->x, &r->p, &r->j, r->q, h, improve, &s);
        if (st != LW_OK)
            return st;
        if (!s.ok && !r->j_fresh) {
            r->j.valid = false; /* Newton failed on old Jacobians: renew them first */
            continue;
        }
        /* a step across a kink of the rates (the regulator's switch, a knot
         * of the cell's curves, a corner of the foldback) loses its order
         * and fails its error test, or its Newton iteration: find the
         * earliest kink and let the step to it stand in for this one (if it
         * keeps the tolerance, its other events are found as any step's) */
        int kink = -1;
        step kink_before = {0};
        if (!s.ok || s.err > 1.0) {
            step probe = s;
            if (!s.ok) {
                st = euler(r, NULL, h, &probe);
                if (st != LW_OK)
                    return st;
            }
            double h_kink = h;
            step kink_at = probe;
            static const int kinks[] = {EV_REGIME, EV_KNOT, EV_FOLD_FROM, EV_FOLD_TO};
            for (size_t n = 0; n < sizeof kinks / sizeof kinks[0]; n++) {
                int k = kinks[n];
                if (!fired(r, k, &probe.p, curve_depth(&r->e, probe.x)))
                    continue;
                step bk = {0}, ak = probe;
                double h_k = h;
                st = locate(r, k, h, NULL, &bk, &ak, &h_k);
                if (st != LW_OK)
                    return st;
                if (kink < 0 || h_k < h_kink)
                    kink = k, h_kink = h_k, kink_at = ak, kink_before = bk;
            }
            if (kink >= 0) {
                s = kink_at;
                h = h_kink;
                to_target = false;
            }
        }
        if (!s.ok || s.err > 1.0) {
            double f = s.ok ? fmax(0.2, 0.9 * pow(s.err, -0.25)) : 0.25;
            h *= f;
            improve = true;
            if (h < 1e-9 * (r->t + 1.0))
                return lw_error_set(r->e.err, LW_ENUMERIC, NULL, 0,
                                    "the run in time could not keep its tolerance near "
                                    "%.6g h (the step shrank to nothing)",
                                    r->t / 3600.0);
            continue;
        }
        improve = false;
        /* the earliest event over the step, if any.  A step that ends where
         * the driver went dark has the other events judged at the last
         * point it held: a cell sagging below its end point under load
         * shows there, not at the dark point, where it rests unloaded */
        int first = -1;
        double h_event = h;
        step at = s, before = {0};
        const bool dark_end = kink == EV_REGIME && s.p.regime == LW_REGIME_DROPOUT &&
                              kink_before.ok;
        for (int k = 0; k < EV_COUNT; k++) {
            const step *judge = dark_end && k != kink ? &kink_before : &s;
            if (!fired(r, k, &judge->p, curve_depth(&r->e, judge->x)))
                continue;
            step b = k == kink ? kink_before : (step){0}, a = *judge;
            double h_k = judge->h;
            st = k == kink ? LW_OK : locate(r, k, judge->h, judge, &b, &a, &h_k);
            if (st != LW_OK)
                return st;
            if (first < 0 || h_k < h_event) {
                first = k, h_event = h_k, at = a, before = b;
            }
        }
        /* an event that fires and undoes itself inside the step (the cells
         * sag below an end point and recover as the foldback cuts the power)
         * shows at an inner stage: from the step's start to that stage */
        for (int i = 0; first < 0 && s.ps_ok && i < NS - 1; i++) {
            for (int k = 0; k < EV_COUNT; k++) {
                if (k == kink || !fired(r, k, &s.ps[i], s.ps[i].depth))
                    continue;
                double h_i = r->e.c[i] * h, h_k = h_i;
                step b = {0}, a;
                st = radau_step(&r->e, r->x, &r->p, &r->j, r->q, h_i, false, &a);
                if (st == LW_OK && a.ok && fired(r, k, &a.p, curve_depth(&r->e, a.x)))
                    st = locate(r, k, h_i, &a, &b, &a, &h_k);
                else
                    continue;
                if (st != LW_OK)
                    return st;
                if (first < 0 || h_k < h_event)
                    first = k, h_event = h_k, at = a, before = b;
            }
        }
        double grow = fmin(4.0, fmax(0.2, 0.9 * pow(fmax(s.err, 1e-30), -0.25)));
        bool renew = s.theta > JAC_KEEP_THETA;
        size_t switches = r->e.res->switches_total;
        if (first >= 0) {
            st = accept(r, &at, h_event);
            if (st == LW_OK)
                st = at_instant(r, first, &before);
            renew = true; /* the rates may have a kink here */
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
            if (st == LW_OK && !r->done && r->t >= r->session_end) {
                r->session_over = true; /* switched off until the next session */
                return LW_OK;
            }
        }
        if (st != LW_OK)
            return st;
        if (renew)
            r->j.valid = false;
        if (first >= 0 || r->e.res->switches_total != switches)
            r->win_steps = 0; /* a new smooth stretch */
        h = fmin(h_max, (first >= 0 ? h_event : h) * grow);
        if (r->e.res->switches_total != switches) {
            h = fmin(h_max, 1.0); /* the rates jumped: start small again */
            r->j.valid = false;
            improve = true;
        }
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
    r->x[0] = d0, r->x[1] = r->x[2] = l->pack.ambient_c, r->x[3] = 0.0;
    memset(r->q, 0, sizeof r->q);
    r->knot_next = knot_after(l, d0);
    return mode_point(r);
}

static void init_run(run *r, const lw_light *l, const lw_run_options *opt, lw_result *res,
                     lw_error *err)
{
    memset(r, 0, sizeof *r);
    r->e = (tr){.l = l, .l0 = l, .opt = opt, .res = res, .err = err, .tj_hint = NAN};
    r->first = l;
    r->session_end = INFINITY;
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

/* ---- use schedules ---- */

/* The light off for dt_s: the cells self-discharge and feed the standby
 * drain, kinetic cells' wells level, the heat path cools - each by its
 * closed form (the equations are linear with the light off: docs/model.md,
 * "Use schedules").  The standby drain's energy, drawn at the pack's EMF,
 * goes to the driver (composite 4-point Gauss-Legendre over the rest). */
/* The charge state of a rest: the closed-form solutions for d and u from
 * (d0, u0) under a constant standby current (per unit of C, alpha /s),
 * self-discharge lam /s and, for a kinetic cell, the wells' rate kk /s
 * towards u_inf. */
typedef struct rest_law {
    double d0, u0, alpha, lam, kk, u_inf;
    bool kinetic;
} rest_law;

static void rest_at(const rest_law *w, double t, double y[NX])
{
    double w0 = 1.0 - w->d0;
    double left = w->lam > 0.0 ? (w0 + w->alpha / w->lam) * exp(-w->lam * t) - w->alpha / w->lam
                               : w0 - w->alpha * t;
    y[0] = fmin(1.0, 1.0 - left);
    y[3] = w->kinetic ? w->u_inf + (w->u0 - w->u_inf) * exp(-w->kk * t) : 0.0;
}

static void rest(run *r, double dt_s)
{
    if (!(dt_s > 0.0))
        return;
    const lw_light *l = r->e.l;
    const lw_cell *c = &l->pack.cell;
    const double ic = l->drive.standby_a / l->pack.parallel;
    const double cap = lw_cell_capacity_ah(c, ic, l->cap_factor) * 3600.0; /* A s */
    rest_law w = {.d0 = r->x[0], .u0 = r->x[3], .alpha = cap > 0.0 ? ic / cap : 0.0,
                  .lam = lw_cell_self_discharge_per_h(c) / 3600.0,
                  .kinetic = lw_cell_is_kinetic(c)};
    w.kk = w.kinetic ? c->kinetic_k_per_h / 3600.0 + w.lam : 0.0;
    w.u_inf = w.kinetic && w.kk > 0.0 ? w.alpha / c->kinetic_c / w.kk : 0.0;
    /* the standby energy, J */
    double e_j = 0.0;
    if (l->drive.standby_a > 0.0) {
        const lw_quad_rule *g = lw_quad_gauss(4);
        const int parts = 64;
        const double hp = dt_s / parts;
        for (int k = 0; k < parts; k++)
            for (int i = 0; i < g->n; i++) {
                double y[NX] = {0};
                rest_at(&w, hp * (k + 0.5 * (1.0 + g->x[i])), y);
                lw_cells cells;
                lw_light_cells(l, curve_depth(&r->e, y), &cells);
                e_j += 0.5 * hp * g->w[i] * l->pack.series * cells.ocv_v * l->drive.standby_a;
            }
    }
    rest_at(&w, dt_s, r->x);
    lw_thermal_relax(&l->thermal, l->pack.ambient_c, dt_s, &r->x[1], &r->x[2]);
    r->q[4] += e_j;
    r->q[5] += e_j;
    r->cal_offset += dt_s;
}

/* Keep the session that has just begun (its switch-on point is r->p). */
static lw_status note_session(run *r)
{
    lw_result *res = r->e.res;
    if (res->n_sessions == r->cap_sessions) {
        size_t cap = r->cap_sessions ? 2 * r->cap_sessions : 16;
        lw_session *s = lw_realloc(res->sessions, cap * sizeof *s);
        if (!s)
            return lw_error_set(r->e.err, LW_ENOMEM, NULL, 0, "out of memory for the sessions");
        res->sessions = s;
        r->cap_sessions = cap;
    }
    res->sessions[res->n_sessions++] =
        (lw_session){(r->t + r->cal_offset) / 3600.0, r->t / 3600.0, r->p.flux_lm,
                     r->p.weak_cell_v, r->p.depth, 0.0};
    return LW_OK;
}

/* The light of session plan p. */
static const lw_light *session_light(const run *r, const lw_session_plan *p, const lw_light *own)
{
    return p->light >= 0 ? r->use->lights[p->light] : own;
}

/* Begin the next session after the rest before it: the light in its
 * starting mode (a chain starts over), its switch-on point, the session
 * kept, and whatever holds at that instant (a chain's triggers, the ends:
 * a light whose output is already at a cutoff ends the run here). */
static lw_status next_session(run *r, const lw_light *own)
{
    lw_session_plan p;
    if (!lw_schedule_session(r->use, ++r->session, &p)) {
        finish(r, LW_END_SCHEDULE_DONE, &r->p);
        return LW_OK;
    }
    rest(r, p.start_h * 3600.0 - (r->t + r->cal_offset));
    const lw_light *l = session_light(r, &p, own);
    r->e.l0 = l;
    r->e.l = l->chain ? l->chain->modes[0].light : l;
    r->e.mode = 0;
    r->e.mode_t0 = r->t;
    r->session_end = r->t + p.duration_h * 3600.0;
    r->session_over = false;
    r->j.valid = false;
    r->win_steps = 0;
    r->knot_next = knot_after(r->e.l, curve_depth(&r->e, r->x));
    lw_status st = mode_point(r);
    if (st == LW_OK)
        st = note_session(r);
    if (st != LW_OK)
        return st;
    if (dark(r)) {
        finish(r, LW_END_DRIVER_DROPOUT, &r->p);
        return LW_OK;
    }
    peaks(r);
    st = keep_state(r);
    if (st == LW_OK)
        st = cascade(r);
    if (st == LW_OK && !r->done)
        st = at_instant(r, -1, &(step){0});
    return st;
}

lw_status lw_transient_run(const lw_light *light, const lw_run_options *opt, lw_result *res,
                           lw_error *err)
{
    run r;
    lw_session_plan p0 = {0.0, INFINITY, -1};
    if (light->use && !lw_schedule_session(light->use, 0, &p0))
        return lw_error_set(err, LW_EINPUT, NULL, 0, "the use schedule has no sessions");
    const lw_light *l = light->use && p0.light >= 0 ? light->use->lights[p0.light] : light;
    init_run(&r, l, opt, res, err);
    r.use = light->use;
    r.session_end = p0.duration_h * 3600.0;
    lw_status st = start(&r, res->start_depth);
    if (st == LW_OK && p0.start_h > 0.0) {
        /* the cells rest from the schedule's origin to the first session */
        rest(&r, p0.start_h * 3600.0);
        r.knot_next = knot_after(r.e.l, curve_depth(&r.e, r.x));
        st = mode_point(&r);
    }
    if (st != LW_OK)
        return st;
    const lw_light *own = light;
    light = l;
    res->initial = r.p;
    res->peak_resistor_w = r.p.p_res_peak_w;
    lw_run_note_resistor(light, &r.p, res);
    res->peak_junction_c = r.p.temps.junction_c;
    res->peak_body_c = r.p.temps.body_c;
    res->peak_body_h = 0.0;
    if (light->cutoff.reference == LW_REF_FRESH && (st = fresh_reference(&r, &r.ref)) != LW_OK)
        return st;
    if (res->start_depth >= lw_light_depth_end(light) || r.p.weak_cell_v <= light->cutoff.cell_v)
        finish(&r, LW_END_EMPTY_AT_START, &r.p);
    else if (!(r.p.flux_lm >= opt->visible_lm) || !isfinite(r.p.dtdd_h))
        finish(&r, LW_END_NEVER_LIT, &r.p);
    if (!r.done)
        st = keep_state(&r);
    if (st == LW_OK && r.use)
        st = note_session(&r);
    if (st == LW_OK && !r.done)
        st = cascade(&r); /* a chain's triggers apply from switch-on */
    if (st == LW_OK && !r.done)
        st = integrate(&r, false);
    while (st == LW_OK && !r.done && r.session_over) {
        res->sessions[res->n_sessions - 1].on_h = r.t / 3600.0 - res->sessions[res->n_sessions - 1].on_before_h;
        st = next_session(&r, own);
        if (st == LW_OK && !r.done)
            st = integrate(&r, false);
    }
    if (st != LW_OK)
        return st;
    if (res->n_sessions > 0)
        res->sessions[res->n_sessions - 1].on_h =
            r.t / 3600.0 - res->sessions[res->n_sessions - 1].on_before_h;
    res->calendar_h = (r.t + r.cal_offset) / 3600.0;
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
