/*
 * engine.c - discharge integration in depth of discharge (see engine.h).
 *
 * Invariant: the totals in `tot` are the integrals from the start depth to
 * `d_now` of the accepted pieces, and no active event has triggered before
 * d_now.  Every operating-point solve goes through eval(), which counts it.
 */
#include "lampwick/engine.h"

#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/roots.h"
#include "lampwick/alloc.h"
#include "lampwick/transient.h"

const char *const lw_run_end_names[LW_END_COUNT + 1] = {
    "relative-brightness", "flux-floor", "cell-voltage", "capacity", "never-lit",
    "driver-dropout", "empty-at-start", "dim-at-start", "switched-off", "sessions-done", NULL};

bool lw_run_end_is_dark(lw_end_reason why)
{
    return why == LW_END_NEVER_LIT || why == LW_END_EMPTY_AT_START || why == LW_END_DIM_AT_START;
}

const char *const lw_run_warning_names[LW_WARN_COUNT_] = {
    "led-over-max", "led-over-max-worst-case", "resistor-hot", "over-discharge", "never-lit",
    "no-cutoff", "led-table-extrapolated", "temperature-outside-table", "tolerance-not-met",
    "resistor-over-rating", "junction-hot", "body-hot", "resistor-derated", "cell-reversal",
    "regulator-hot"};

/* Gauss-Kronrod 7/15 abscissae and weights (QUADPACK qk15). */
static const double xgk[8] = {
    0.991455371120812639206854697526329, 0.949107912342758524526189684047851,
    0.864864423359769072789712788640926, 0.741531185599394439863864773280788,
    0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
    0.207784955007898467600689403773245, 0.000000000000000000000000000000000};
static const double wgk[8] = {
    0.022935322010529224963732008058970, 0.063092092629978553290700663189204,
    0.104790010322250183839876322541518, 0.140653259715525918745189590510238,
    0.169004726639267902826583426598550, 0.190350578064785409913256402421014,
    0.204432940075298892414161999234649, 0.209482141084727828012999174891714};
static const double wg[4] = {0.129484966168869693270611432679082,
                             0.279705391489276667901467771423780,
                             0.381830050505118944950369775488975,
                             0.417959183673469387755102040816327};

#define NODES 15
enum { Q_T, Q_LMH, Q_LED, Q_RES, Q_INT, Q_DRV, Q_DRAWN, NQ };

enum event_kind { EV_STOP, EV_RECORD, EV_KINK };
enum {
    EV_RELATIVE, EV_FLOOR, EV_CELL_V, EV_DROPOUT, EV_HALF, EV_PEUKERT, EV_REGULATION, EV_KNOT,
    NEV
};

typedef struct engine {
    const lw_light *l;
    const lw_run_options *opt;
    lw_result *res;
    lw_error *err;
    bool fallback;
    double flux_ref;
    double kink_a;            /* per-cell average current of the Peukert cap switch */
    bool active[NEV];
    bool positive[NEV];       /* for kinks: sign of g at the current depth */
    double tot[NQ];
    double d_now;
    double density[NQ];       /* totals per unit depth over the current interval */
    size_t cap_pieces;
    size_t seg;               /* curve interval being integrated; SIZE_MAX: search */
    double d0;                /* depth at switch-on */
    double knot_lo, knot_hi;  /* LED-table knots around the current (EV_KNOT) */
    int knot_dir;             /* +1: the current left through knot_hi, -1: through knot_lo */
    double floor_lm;          /* absolute floor: cutoff.flux_lm or the visibility floor */
    double fire_from;         /* depth of the not-fired side of the event last located */
    double end_d;             /* depth of end_pt: the last interval end solved */
    lw_point end_pt;
    bool done;
} engine;

/* Solve the light at depth d.  Inside the run the curve interval is known
 * (e->seg), so OCV and R come straight from it without a table search. */
static lw_status eval(engine *e, double d, lw_point *pt)
{
    if (++e->res->solves > e->opt->max_solves) {
        *pt = (lw_point){.depth = d, .dtdd_h = INFINITY, .regime = LW_REGIME_DROPOUT};
        return lw_error_set(e->err, LW_ENUMERIC, NULL, 0,
                            "the run stopped after %d operating-point solves near depth %.6g "
                            "without meeting its tolerance (max_solves)",
                            e->opt->max_solves, d);
    }
    lw_status st;
    if (e->seg == SIZE_MAX || lw_light_has_spread(e->l)) {
        st = lw_light_point(e->l, d, e->fallback, pt, e->err);
    } else {
        const lw_interp *o = e->l->pack.cell.ocv, *r = e->l->pack.cell.res;
        size_t i = e->seg;
        double u = (d - o->x[i]) / (o->x[i + 1] - o->x[i]);
        u = u < 0.0 ? 0.0 : (u > 1.0 ? 1.0 : u);
        double ocv = o->y[i] + u * (o->y[i + 1] - o->y[i]);
        double res = (r->y[i] + u * (r->y[i + 1] - r->y[i])) * e->l->res_factor;
        st = lw_light_point_at(e->l, d, ocv, res, e->fallback, pt, e->err);
    }
    if (st == LW_OK) {
        if (pt->regime != LW_REGIME_DROPOUT)
            e->res->min_weak_cell_v = fmin(e->res->min_weak_cell_v, pt->weak_cell_v);
        e->res->peak_junction_c = fmax(e->res->peak_junction_c, pt->temps.junction_c);
        e->res->peak_body_c = fmax(e->res->peak_body_c, pt->temps.body_c);
        lw_run_note_resistor(e->l, pt, e->res);
    }
    return st;
}

static enum event_kind kind_of(int k)
{
    if (k == EV_HALF)
        return EV_RECORD;
    if (k == EV_PEUKERT || k == EV_REGULATION || k == EV_KNOT)
        return EV_KINK;
    if (k == EV_DROPOUT)
        return EV_KINK; /* a stop or a switch to fallback: decided when it fires */
    return EV_STOP;
}

static double event_g(const engine *e, int k, const lw_point *pt)
{
    const lw_light *l = e->l;
    switch (k) {
    case EV_RELATIVE:
        return pt->flux_lm - l->cutoff.relative_pct / 100.0 * e->flux_ref;
    case EV_FLOOR:
        return pt->flux_lm - e->floor_lm;
    case EV_CELL_V:
        return pt->weak_cell_v - l->cutoff.cell_v;
    case EV_HALF:
        return pt->flux_lm - 0.5 * e->flux_ref;
    case EV_PEUKERT:
        return pt->pack_avg_a / l->pack.parallel - e->kink_a;
    case EV_KNOT:
        /* after a crossing, only the knot the current moves towards */
        return e->knot_dir > 0 ? e->knot_hi - pt->led_a : pt->led_a - e->knot_lo;
    case EV_DROPOUT:
    case EV_REGULATION:
    default:
        return pt->regulation_margin;
    }
}

/* Has event k fired at pt (given the state at the start of the piece)?
 * EV_KNOT fires when the current leaves the closed interval of table knots
 * around it (a current held exactly at a knot stays inside). */
static bool fired(const engine *e, int k, const lw_point *pt)
{
    if (!e->active[k])
        return false;
    if (pt->regime == LW_REGIME_DROPOUT && k != EV_DROPOUT)
        return false; /* a dark point has no output, current or kink to speak of */
    if (k == EV_KNOT)
        return pt->led_a < e->knot_lo || pt->led_a > e->knot_hi;
    double g = event_g(e, k, pt);
    if (kind_of(k) == EV_KINK)
        return (g > 0.0) != e->positive[k];
    return g <= 0.0;
}

/* Smallest knot of the LED's tables above x (dir > 0) or largest below
 * (dir < 0); +-INFINITY past the ends. */
static double next_knot(const engine *e, double x, int dir)
{
    const lw_led *led = &e->l->led;
    const lw_interp *t[2] = {led->model == LW_LED_TABLE ? led->iv : NULL, led->flux};
    double best = dir > 0 ? INFINITY : -INFINITY;
    for (int k = 0; k < 2; k++) {
        if (!t[k])
            continue;
        const double *xs = t[k]->x;
        size_t n = t[k]->n, lo = 0, hi = n; /* first index with xs[i] > x (dir > 0) */
        while (lo < hi) {
            size_t mid = lo + (hi - lo) / 2;
            if (dir > 0 ? xs[mid] > x : xs[mid] >= x)
                hi = mid;
            else
                lo = mid + 1;
        }
        if (dir > 0 && lo < n)
            best = fmin(best, xs[lo]);
        else if (dir < 0 && lo > 0)
            best = fmax(best, xs[lo - 1]);
    }
    return best;
}

/* The knots of the LED's I-V and flux tables that bracket current i: the
 * interpolants are cubic between knots and only C1 across them, so the
 * integration breaks where the current crosses one. */
static void knot_interval(engine *e, double i)
{
    e->knot_lo = next_knot(e, nextafter(i, INFINITY), -1); /* largest knot <= i */
    e->knot_hi = next_knot(e, i, +1);                      /* smallest knot > i */
    e->knot_dir = 0;
}

/* After the current crossed a knot at the located depth, the interval on
 * the far side of that knot. */
static void knot_cross(engine *e)
{
    if (e->knot_dir > 0) {
        e->knot_lo = e->knot_hi;
        e->knot_hi = next_knot(e, e->knot_lo, +1);
    } else {
        e->knot_hi = e->knot_lo;
        e->knot_lo = next_knot(e, e->knot_hi, -1);
    }
}

struct locate_ctx {
    engine *e;
    int k;
    double sign; /* +1: g as is; -1: negated, so that "not fired" is positive */
    bool failed;
};

static double locate_fn(double d, void *vctx)
{
    struct locate_ctx *c = vctx;
    lw_point pt;
    if (eval(c->e, d, &pt) != LW_OK) {
        c->failed = true;
        return NAN;
    }
    double g = event_g(c->e, c->k, &pt);
    return c->sign * g;
}

/* Depth in [a, b] where event k fires; g(a) not fired, g(b) fired.  When
 * the start point already sits on the event (g(a) at zero, by a jump or by
 * rounding after the previous event) the event is at a. */
static lw_status locate(engine *e, int k, double a, double b, const lw_point *pa,
                        const lw_point *pb, double *d)
{
    struct locate_ctx c = {e, k, 1.0, false};
    if (k == EV_KNOT)
        e->knot_dir = pb->led_a > e->knot_hi ? +1 : -1;
    if (kind_of(k) == EV_KINK && k != EV_KNOT && !e->positive[k])
        c.sign = -1.0;
    double ga = c.sign * event_g(e, k, pa), gb = c.sign * event_g(e, k, pb);
    e->fire_from = a;
    if (!(ga > 0.0)) {
        *d = a;
        return LW_OK;
    }
    if (gb > 0.0) /* fired at exactly zero (stop events use <= 0) */
        gb = 0.0;
    double tol = e->opt->event_tol * (fabs(b) + 1e-3);
    lw_status st =
        lw_root_brent(locate_fn, &c, a, b, ga, gb, tol, e->opt->event_iter_max, d, e->err);
    if (st == LW_OK && c.failed)
        st = e->err->code ? e->err->code : LW_ENUMERIC;
    return st;
}

static void integrand(const lw_point *pt, double f[NQ])
{
    double w = pt->dtdd_h;
    f[Q_T] = w;
    f[Q_LMH] = pt->flux_lm * w;
    f[Q_LED] = pt->p_led_w * w;
    f[Q_RES] = pt->p_res_w * w;
    f[Q_INT] = pt->p_int_w * w;
    f[Q_DRV] = pt->p_drv_w * w;
    f[Q_DRAWN] = pt->p_drawn_w * w;
}

static double node_depth(double a, double b, int j)
{
    /* j = 0..14 ascending: -xgk[0] .. 0 .. +xgk[0] */
    double c = 0.5 * (a + b), h = 0.5 * (b - a);
    return j < 7 ? c - h * xgk[j] : (j == 7 ? c : c + h * xgk[14 - j]);
}

static lw_status eval_nodes(engine *e, double a, double b, lw_point pts[NODES])
{
    for (int j = 0; j < NODES; j++) {
        lw_status st = eval(e, node_depth(a, b, j), &pts[j]);
        if (st != LW_OK)
            return st;
    }
    return LW_OK;
}

/* Kronrod sums with half-width h of integrand values f at the 15 nodes in
 * ascending order, and the error estimate of each: the difference from the
 * embedded 7-point Gauss rule (conservative: the 15-point result is usually
 * far better).  dx_round is the rounding of the integration variable at the
 * nodes (a few ulps); the integrand's change across the piece times that is
 * the rounding noise of the sums, which no halving reduces, so an estimate
 * within ROUNDING_GUARD times it counts as converged. */
#define ROUNDING_GUARD 256.0

static void gk_rule(double h, double dx_round, double f[NODES][NQ], double k[NQ],
                    double err[NQ])
{
    for (int q = 0; q < NQ; q++) {
        double sk = wgk[7] * f[7][q], sg = wg[3] * f[7][q];
        double lo = f[0][q], hi = f[0][q];
        for (int j = 0; j < 7; j++) {
            double pair = f[j][q] + f[14 - j][q];
            sk += wgk[j] * pair;
            if (j % 2 == 1)
                sg += wg[j / 2] * pair;
        }
        for (int j = 1; j < NODES; j++) {
            lo = fmin(lo, f[j][q]);
            hi = fmax(hi, f[j][q]);
        }
        k[q] = h * sk;
        double noise = ROUNDING_GUARD * (hi - lo) * dx_round;
        err[q] = fmax(0.0, fabs(h * (sk - sg)) - noise);
    }
}

/* Kronrod sums on [a, b] from node points in ascending order. */
static void gk_sums(double a, double b, const lw_point pts[NODES], double k[NQ], double err[NQ])
{
    double f[NODES][NQ];
    for (int j = 0; j < NODES; j++)
        integrand(&pts[j], f[j]);
    gk_rule(0.5 * (b - a), DBL_EPSILON * fmax(fabs(a), fabs(b)), f, k, err);
}

/* May [a, b] be halved again?  Not past max_halvings, and not below
 * LW_PIECE_MIN_REL of its depth: there the nodes sit a few thousand ulps
 * apart, rounding noise in the integrand outweighs any rule's error, and
 * halving could only go on forever. */
static bool may_halve(const engine *e, double a, double b, int depth)
{
    return depth < e->opt->max_halvings && b - a > LW_PIECE_MIN_REL * fmax(fabs(a), fabs(b));
}

/* Does every total meet the tolerance on the piece of width w (in depth)?
 * Each total is judged against the larger of the piece's own value and its
 * share, by width, of the whole curve interval (e->density, from the
 * interval's first estimate): so the sum of the pieces' errors stays within
 * about twice the tolerance of the interval, and a piece where a total
 * nearly vanishes (the light output as the LEDs stop conducting) is not
 * asked for relative accuracy of almost nothing.  The energies are judged
 * against the energy drawn, of which each is a share (so a loss that is zero
 * up to rounding, an ideal converter's, does not demand accuracy of noise). */
static bool accurate(const engine *e, double w, const double k[NQ], const double err[NQ])
{
    double rtol = e->opt->rtol;
    for (int q = 0; q < NQ; q++) {
        int ref = q < Q_LED ? q : Q_DRAWN;
        double scale = fmax(fabs(k[ref]), e->density[ref] * w);
        if (!(err[q] <= rtol * scale + 1e-300))
            return false;
    }
    return true;
}

/* The density of each total over [a, b], per unit depth, from the nodes of
 * the interval's first pass (0 where not finite). */
static void set_density(engine *e, double a, double b, const lw_point pts[NODES])
{
    double k[NQ], g[NQ];
    gk_sums(a, b, pts, k, g);
    for (int q = 0; q < NQ; q++)
        e->density[q] = isfinite(k[q]) && b > a ? fabs(k[q]) / (b - a) : 0.0;
}

static lw_status add_piece(engine *e, double a, double b)
{
    if (!e->opt->want_trace)
        return LW_OK;
    lw_result *r = e->res;
    if (r->n_pieces == e->cap_pieces) {
        size_t cap = e->cap_pieces ? 2 * e->cap_pieces : 64;
        lw_piece *p = lw_realloc(r->pieces, cap * sizeof *p);
        if (!p)
            return lw_error_set(e->err, LW_ENOMEM, NULL, 0, "out of memory for the trace");
        r->pieces = p;
        e->cap_pieces = cap;
    }
    r->pieces[r->n_pieces++] = (lw_piece){a, b, e->tot[Q_T], e->fallback};
    return LW_OK;
}

static void note_point(engine *e, const lw_point *pt)
{
    if (pt->p_res_peak_w > e->res->peak_resistor_w)
        e->res->peak_resistor_w = pt->p_res_peak_w;
    if (pt->extrapolated)
        e->res->warnings |= LW_WARN_EXTRAPOLATED;
}

/* Add an accepted piece [a, b] with its totals k, their error estimates g
 * and node points.  A piece that missed the tolerance on its own (it could
 * not be halved further) is flagged only when its error also shows against
 * the run's totals so far. */
static lw_status accept_piece(engine *e, double a, double b, const lw_point pts[NODES],
                              const double k[NQ], const double g[NQ], bool ok)
{
    for (int q = 0; q < NQ; q++)
        if (!isfinite(k[q]))
            return lw_error_set(e->err, LW_ENUMERIC, NULL, 0,
                                "the discharge rate vanished inside the run near depth %.6g "
                                "(the light went dark without reaching a cutoff)",
                                0.5 * (a + b));
    if (!ok) {
        double tot[NQ];
        for (int q = 0; q < NQ; q++)
            tot[q] = e->tot[q] + k[q];
        if (!accurate(e, b - a, tot, g))
            e->res->warnings |= LW_WARN_TOLERANCE;
    }
    lw_status st = add_piece(e, a, b);
    if (st != LW_OK)
        return st;
    for (int j = 0; j < NODES; j++)
        note_point(e, &pts[j]);
    if (pts[7].regime == LW_REGIME_REGULATED)
        e->res->regulated_h += k[Q_T];
    for (int q = 0; q < NQ; q++)
        e->tot[q] += k[q];
    e->d_now = b;
    return LW_OK;
}

/* Accept or halve [a, b] with node values already computed; no events. */
static lw_status integrate_nodes(engine *e, double a, double b, const lw_point pts[NODES],
                                 int depth)
{
    double k[NQ], g[NQ];
    gk_sums(a, b, pts, k, g);
    bool ok = accurate(e, b - a, k, g);
    if (!isfinite(k[Q_T]))
        return accept_piece(e, a, b, pts, k, g, ok); /* refuses it: no halving helps */
    if (!ok && may_halve(e, a, b, depth)) {
        double m = 0.5 * (a + b);
        lw_point half[NODES];
        lw_status st = eval_nodes(e, a, m, half);
        if (st == LW_OK)
            st = integrate_nodes(e, a, m, half, depth + 1);
        if (st == LW_OK)
            st = eval_nodes(e, m, b, half);
        if (st == LW_OK)
            st = integrate_nodes(e, m, b, half, depth + 1);
        return st;
    }
    return accept_piece(e, a, b, pts, k, g, ok);
}

static lw_status integrate_plain(engine *e, double a, double b)
{
    lw_point pts[NODES];
    lw_status st = eval_nodes(e, a, b, pts);
    if (st == LW_OK)
        set_density(e, a, b, pts);
    return st == LW_OK ? integrate_nodes(e, a, b, pts, 0) : st;
}

/* [a, b] ending where a converter goes dark.  At its power limit the pack
 * current goes as the square root of the distance to the limit, which no
 * polynomial rule integrates well; with d = b - (b - a) s^2 the integrand
 * times the Jacobian 2 (b - a) s is smooth in s (and a smooth integrand
 * stays smooth), so the same rule runs on s in [s0, s1], halving in s. */
static lw_status integrate_to_limit(engine *e, double a, double b, double s0, double s1,
                                    int depth)
{
    lw_point pts[NODES];
    double f[NODES][NQ];
    for (int j = 0; j < NODES; j++) {
        double sj = node_depth(s0, s1, NODES - 1 - j); /* descending s: ascending depth */
        lw_status st = eval(e, b - (b - a) * sj * sj, &pts[j]);
        if (st != LW_OK)
            return st;
        integrand(&pts[j], f[j]);
        for (int q = 0; q < NQ; q++)
            f[j][q] *= 2.0 * (b - a) * sj;
    }
    double k[NQ], g[NQ];
    /* depth rounds by ulps of b; in s that is ds = dd / (2 (b - a) s) */
    double s_mid = fmax(0.5 * (s0 + s1), 1e-300);
    gk_rule(0.5 * (s1 - s0), DBL_EPSILON * fabs(b) / (2.0 * (b - a) * s_mid), f, k, g);
    if (depth == 0) /* the whole piece: its totals per unit depth */
        for (int q = 0; q < NQ; q++)
            e->density[q] = isfinite(k[q]) ? fabs(k[q]) / (b - a) : 0.0;
    bool ok = accurate(e, (b - a) * (s1 * s1 - s0 * s0), k, g);
    if (!ok && may_halve(e, s0, s1, depth)) {
        double m = 0.5 * (s0 + s1);
        lw_status st = integrate_to_limit(e, a, b, m, s1, depth + 1);
        return st == LW_OK ? integrate_to_limit(e, a, b, s0, m, depth + 1) : st;
    }
    return accept_piece(e, b - (b - a) * s1 * s1, s0 > 0 ? b - (b - a) * s0 * s0 : b, pts, k, g,
                        ok);
}

static void finish(engine *e, lw_end_reason why, const lw_point *pt)
{
    e->res->end_reason = why;
    e->res->end_depth = pt->depth;
    e->res->final = *pt;
    e->done = true;
}

/* The last operating point the driver held before it went dark at d: walk
 * back from d in growing steps, at most to the not-fired side of the
 * located event. */
static bool lit(const lw_point *pt)
{
    return pt->regime != LW_REGIME_DROPOUT && isfinite(pt->dtdd_h);
}

static lw_status held_point(engine *e, double d, lw_point *pt)
{
    lw_status st = eval(e, d, pt);
    double lo = e->fire_from;
    double step = e->opt->event_tol * (fabs(d) + 1e-3);
    for (int i = 0; i < 64 && st == LW_OK && !lit(pt) && d > lo; i++) {
        double x = fmax(lo, d - step);
        st = eval(e, x, pt);
        if (x == lo)
            break;
        step *= 4.0;
    }
    return st;
}

/* Act on event k located at depth d (the totals already reach d); *pt is
 * the point at d. */
static lw_status fire(engine *e, int k, double d, lw_point *pt)
{
    static const lw_end_reason why[] = {LW_END_RELATIVE, LW_END_FLUX_FLOOR,
                                        LW_END_CELL_VOLTAGE, LW_END_DRIVER_DROPOUT};
    lw_status st = LW_OK;
    if (k == EV_DROPOUT) {
        lw_point held = *pt; /* run_interval ends the lit part where the driver held */
        if (!e->fallback && e->l->drive.fallback_a > 0.0) {
            e->fallback = true;
            st = eval(e, d, pt);
            if (st != LW_OK)
                return st;
            e->positive[EV_DROPOUT] = pt->regulation_margin > 0.0;
            if (e->positive[EV_DROPOUT])
                return LW_OK;
        }
        finish(e, LW_END_DRIVER_DROPOUT, &held);
        return LW_OK;
    }
    switch (kind_of(k)) {
    case EV_STOP:
        finish(e, why[k], pt);
        break;
    case EV_RECORD:
        e->res->time_to_half_h = e->tot[Q_T];
        e->active[k] = false;
        break;
    case EV_KINK:
    default:
        if (k == EV_KNOT)
            knot_cross(e);
        else
            e->positive[k] = !e->positive[k];
        break;
    }
    return LW_OK;
}

/* Time (h) from a to b, to the run's tolerance, without touching the totals:
 * for an event that needs its time but does not break the integration. */
static lw_status time_integral(engine *e, double a, double b, int depth, double *t_h)
{
    if (!(b > a))
        return LW_OK;
    lw_point pts[NODES];
    lw_status st = eval_nodes(e, a, b, pts);
    if (st != LW_OK)
        return st;
    double k[NQ], err[NQ];
    gk_sums(a, b, pts, k, err);
    if (!isfinite(k[Q_T])) { /* dark somewhere in [a, b]: no time reaches b */
        *t_h = INFINITY;
        return LW_OK;
    }
    if (err[Q_T] <= e->opt->rtol * fabs(k[Q_T]) || !may_halve(e, a, b, depth)) {
        *t_h += k[Q_T];
        return LW_OK;
    }
    double m = 0.5 * (a + b);
    st = time_integral(e, a, m, depth + 1, t_h);
    return st == LW_OK ? time_integral(e, m, b, depth + 1, t_h) : st;
}

/* After the converter falls back to its low level the output has jumped:
 * events that the new point already satisfies happen here, at d, and the
 * kinks take the side of the new regime.  The 50 % mark comes first: a
 * jump to or below half while lit sets the time to half, also when the
 * same jump ends the run. */
static lw_status settle(engine *e, double d, lw_point *pt)
{
    static const int order[NEV] = {EV_HALF,    EV_RELATIVE, EV_FLOOR,      EV_CELL_V,
                                   EV_DROPOUT, EV_PEUKERT,  EV_REGULATION, EV_KNOT};
    for (int i = 0; i < NEV && !e->done; i++) {
        int k = order[i];
        if (!e->active[k])
            continue;
        if (k == EV_KNOT) {
            knot_interval(e, pt->led_a);
            continue;
        }
        if (kind_of(k) == EV_KINK) {
            e->positive[k] = event_g(e, k, pt) > 0.0;
            continue;
        }
        if (fired(e, k, pt)) {
            lw_status st = fire(e, k, d, pt);
            if (st != LW_OK)
                return st;
        }
    }
    return LW_OK;
}

/* The point at d where a finished piece ended: reused when the piece just
 * solved it, solved otherwise. */
static lw_status point_after(engine *e, double d, lw_point *pt)
{
    if (e->end_d == d) {
        *pt = e->end_pt;
        return LW_OK;
    }
    return eval(e, d, pt);
}

/* Integrate [a, b] (inside one interval of the cell curve), stopping at the
 * first stop event.  pa is the point at a. */
static lw_status run_interval(engine *e, double a, double b, lw_point pa, int depth)
{
    /* each pass ends at an event or at b; a model has a handful of events,
     * so the cap only guards against an event that keeps re-firing */
    for (int pass = 0; !e->done && a < b; pass++) {
        if (pass == LW_EVENTS_PER_INTERVAL_MAX)
            return lw_error_set(e->err, LW_ENUMERIC, NULL, 0,
                                "too many events between depths %.6g and %.6g", a, b);
        lw_point pts[NODES + 1];
        lw_status st = eval_nodes(e, a, b, pts);
        if (st == LW_OK)
            st = eval(e, b, &pts[NODES]);
        if (st != LW_OK)
            return st;
        /* earliest sample interval in which any active event fires; a
         * record event (50 %) is timed without breaking the integration,
         * and the scan repeats on the same nodes without it */
        int first_k;
        double d_star;
    rescan:
        first_k = -1;
        d_star = b;
        const lw_point *prev = &pa;
        double d_prev = a;
        for (int j = 0; j <= NODES && first_k < 0; j++) {
            double dj = j < NODES ? node_depth(a, b, j) : b;
            /* at a dark node the other events are judged at the last point
             * the driver held before it went dark: a cutoff crossed on the
             * way there comes first */
            const lw_point *node = &pts[j];
            double dn = dj;
            lw_point held;
            if (fired(e, EV_DROPOUT, node)) {
                double dk;
                st = locate(e, EV_DROPOUT, d_prev, dj, prev, node, &dk);
                if (st == LW_OK)
                    st = held_point(e, dk, &held);
                if (st != LW_OK)
                    return st;
                first_k = EV_DROPOUT;
                d_star = dk;
                node = &held;
                dn = held.depth;
            }
            for (int k = 0; k < NEV; k++) {
                if (k == EV_DROPOUT || !fired(e, k, node) || !(dn > d_prev))
                    continue;
                double dk;
                st = locate(e, k, d_prev, dn, prev, node, &dk);
                if (st != LW_OK)
                    return st;
                if (first_k < 0 || dk < d_star) {
                    first_k = k;
                    d_star = dk;
                }
            }
            prev = &pts[j];
            d_prev = dj;
        }
        if (first_k >= 0 && kind_of(first_k) == EV_RECORD) {
            double t_part = 0.0;
            st = time_integral(e, a, d_star, 0, &t_part);
            if (st != LW_OK)
                return st;
            e->res->time_to_half_h = e->tot[Q_T] + t_part;
            e->active[first_k] = false;
            goto rescan;
        }
        if (first_k < 0) {
            if (!may_halve(e, a, b, depth))
                return integrate_nodes(e, a, b, pts, e->opt->max_halvings);
            /* accept if the error estimate allows; otherwise halve with events */
            double kk[NQ], gg[NQ];
            if (depth == 0)
                set_density(e, a, b, pts);
            gk_sums(a, b, pts, kk, gg);
            if (accurate(e, b - a, kk, gg)) {
                e->end_d = b; /* the next interval starts from this point */
                e->end_pt = pts[NODES];
                return integrate_nodes(e, a, b, pts, 0);
            }
            double m = 0.5 * (a + b);
            lw_point pm;
            st = run_interval(e, a, m, pa, depth + 1);
            if (st == LW_OK && !e->done)
                st = point_after(e, m, &pm);
            if (st != LW_OK || e->done)
                return st;
            return run_interval(e, m, b, pm, depth + 1);
        }
        /* end the lit part where the light is still lit: the driver still
         * held its level, or the current had not yet reached zero */
        lw_point at;
        st = held_point(e, d_star, &at);
        if (st != LW_OK)
            return st;
        d_star = at.depth;
        if (d_star > a) {
            st = first_k == EV_DROPOUT ? integrate_to_limit(e, a, d_star, 0.0, 1.0, 0)
                                       : integrate_plain(e, a, d_star);
            if (st != LW_OK)
                return st;
        }
        pa = at;
        st = fire(e, first_k, d_star, &pa);
        if (st == LW_OK && !e->done && first_k == EV_DROPOUT)
            st = settle(e, d_star, &pa);
        if (st != LW_OK)
            return st;
        a = d_star;
    }
    return LW_OK;
}

lw_run_options lw_run_options_default(void)
{
    return (lw_run_options){.rtol = 1e-10,
                            .max_halvings = 40,
                            .visible_lm = LW_VISIBLE_LM,
                            .event_tol = 1e-13,
                            .event_iter_max = 200,
                            .max_solves = LW_MAX_SOLVES_DEFAULT,
                            .start_depth = 0.0,
                            .want_trace = false};
}

void lw_run_result_clear(lw_result *res)
{
    if (!res)
        return;
    free(res->pieces);
    res->pieces = NULL;
    res->n_pieces = 0;
    free(res->states);
    res->states = NULL;
    res->n_states = 0;
    free(res->sessions);
    res->sessions = NULL;
    res->n_sessions = 0;
}

lw_status lw_run_worst_case(const lw_light *light, lw_point *pt, lw_error *err)
{
    lw_light w = *light; /* shallow: tables borrowed, never freed here */
    const lw_cell *c = &light->pack.cell;
    double r_min = c->res->y[0];
    for (size_t i = 1; i < c->res->n; i++)
        r_min = fmin(r_min, c->res->y[i]);
    w.drive.resistor_ohm *= 1.0 - light->drive.tolerance_pct / 100.0;
    w.led.v_scale = light->led.v_scale * (1.0 - light->led.forward_spread_pct / 100.0);
    return lw_light_point_at(&w, 0.0, c->ocv->y[0], r_min * light->res_factor, false, pt, err);
}

void lw_run_note_resistor(const lw_light *l, const lw_point *pt, lw_result *res)
{
    if (l->drive.type == LW_DRIVE_LINEAR_CC && pt->regime != LW_REGIME_DROPOUT) {
        /* the regulator's dissipation, averaged over the PWM period (what
         * heats it), per string */
        double p = pt->p_drv_w / l->led.strings;
        double k = l->thermal.enabled ? lw_thermal_resistor_derating(pt->temps.body_c) : 1.0;
        res->peak_regulator_w = fmax(res->peak_regulator_w, p);
        res->peak_regulator_derated_w =
            fmax(res->peak_regulator_derated_w, k > 0.0 ? p / k : INFINITY);
    }
    if (!l->thermal.enabled || !(pt->p_res_peak_w > 0.0))
        return;
    double k = lw_thermal_resistor_derating(pt->temps.body_c);
    double need = k > 0.0 ? pt->p_res_peak_w / k : INFINITY;
    res->peak_resistor_derated_w = fmax(res->peak_resistor_derated_w, need);
}

static void set_warnings(const lw_light *l, lw_result *r)
{
    double max_a = l->led.max_current_a;
    if (max_a > 0.0 && r->initial.led_a > max_a)
        r->warnings |= LW_WARN_LED_OVER_MAX;
    if (max_a > 0.0 && r->worst_led_a > max_a)
        r->warnings |= LW_WARN_LED_OVER_MAX_WORST;
    double p_res = fmax(r->peak_resistor_w, r->worst_resistor_w);
    if (l->drive.rating_w > 0.0 && p_res > 0.5 * l->drive.rating_w)
        r->warnings |= LW_WARN_RESISTOR_HOT;
    if (l->drive.rating_w > 0.0 && p_res > l->drive.rating_w)
        r->warnings |= LW_WARN_RESISTOR_OVER_RATING;
    if (l->drive.rating_w > 0.0 && r->peak_resistor_derated_w > l->drive.rating_w)
        r->warnings |= LW_WARN_RESISTOR_DERATED;
    if (lw_cell_chemistry_needs_endpoint(l->pack.cell.chemistry) &&
        l->cutoff.cell_v < l->pack.cell.cutoff_v)
        r->warnings |= LW_WARN_OVER_DISCHARGE;
    if (r->end_reason == LW_END_NEVER_LIT)
        r->warnings |= LW_WARN_NEVER_LIT;
    if (r->end_reason == LW_END_CAPACITY)
        r->warnings |= LW_WARN_NO_CUTOFF;
    if (!lw_run_end_is_dark(r->end_reason) && r->min_weak_cell_v < 0.0)
        r->warnings |= LW_WARN_CELL_REVERSAL;
    if (l->drive.type == LW_DRIVE_LINEAR_CC && l->drive.regulator_rating_w > 0.0 &&
        r->peak_regulator_derated_w > l->drive.regulator_rating_w)
        r->warnings |= LW_WARN_REGULATOR_HOT;
}

/* Time (h) from depth a to b >= a, split at the cell curve's points, each
 * part to the run's tolerance (the search-mode solve finds the interval). */
static lw_status time_between(engine *e, double a, double b, double *t_h)
{
    size_t saved = e->seg;
    e->seg = SIZE_MAX;
    *t_h = 0.0;
    lw_status st = LW_OK;
    for (double x = a; st == LW_OK && x < b;) {
        double end = fmin(b, lw_light_knot_above(e->l, x));
        if (!(end > x))
            end = b; /* past the last knot */
        st = time_integral(e, x, end, 0, t_h);
        x = end;
    }
    e->seg = saved;
    return st;
}

/* Three-point Gauss-Legendre time over a short interval: exact for
 * quintics, so for the Newton corrections below (far shorter than any
 * curve interval) its error is below rounding. */
static lw_status time_short(engine *e, double a, double b, double *t_h)
{
    static const double x3 = 0.774596669241483377035853079956480, w0 = 8.0 / 9.0,
                        w1 = 5.0 / 9.0;
    double c = 0.5 * (a + b), h = 0.5 * (b - a), sum = 0.0;
    const double xs[3] = {c - h * x3, c, c + h * x3}, ws[3] = {w1, w0, w1};
    for (int j = 0; j < 3; j++) {
        lw_point pt;
        lw_status st = eval(e, xs[j], &pt);
        if (st != LW_OK)
            return st;
        sum += ws[j] * pt.dtdd_h;
    }
    *t_h = h * sum;
    return LW_OK;
}

/* The point 30 s after switch-on (the FL 1 reference): the depth solving
 * t(d) = 30 s, by Newton's method on the run's own quadrature (dt/dd is
 * the integrand, so each step is exact to second order), safeguarded by
 * bisection.  A light that goes dark or empty before 30 s has no 30-s
 * point: *p30 is then the switch-on point. */
static lw_status point_at_30s(engine *e, const lw_point *p0, lw_point *p30, double *d30)
{
    const double t30_h = 30.0 / 3600.0;
    double lo = e->d0, hi = 1.0, d = fmin(1.0, e->d0 + t30_h / p0->dtdd_h);
    double t_prev = 0.0, d_prev = e->d0;
    *p30 = *p0;
    *d30 = e->d0;
    for (int it = 0; it < LW_T30_ITER_MAX; it++) {
        lw_point pt;
        lw_status st = eval(e, d, &pt);
        if (st != LW_OK)
            return st;
        double dt = 0.0;
        if (isfinite(pt.dtdd_h))
            st = fabs(d - d_prev) <= 1e-3 * (d_prev - e->d0)
                     ? time_short(e, fmin(d, d_prev), fmax(d, d_prev), &dt)
                     : time_between(e, fmin(d, d_prev), fmax(d, d_prev), &dt);
        if (st != LW_OK)
            return st;
        double t = d >= d_prev ? t_prev + dt : t_prev - dt;
        if (!isfinite(pt.dtdd_h) || !isfinite(t)) { /* dark here: the 30-s point is before */
            hi = d;
            d = 0.5 * (lo + hi);
            continue; /* t_prev and d_prev stay at the last lit point */
        }
        t_prev = t;
        d_prev = d;
        double f = t - t30_h;
        if (f < 0.0)
            lo = d;
        else
            hi = d;
        if (fabs(f) <= 1e-14 * t30_h || hi - lo <= 4.0 * DBL_EPSILON) {
            *p30 = pt;
            *d30 = d;
            return LW_OK;
        }
        if (d >= lw_light_depth_end(e->l) && f < 0.0)
            return LW_OK; /* empty before 30 s */
        double next = d - f / pt.dtdd_h;
        d = next > lo && next < hi ? next : 0.5 * (lo + hi);
    }
    return LW_OK; /* dark before 30 s: the switch-on point stands in */
}

static void init_events(engine *e, const lw_point *p0)
{
    const lw_light *l = e->l;
    const lw_cell *c = &l->pack.cell;
    memset(e->active, 0, sizeof e->active);
    e->active[EV_RELATIVE] = true;
    e->active[EV_FLOOR] = e->floor_lm > 0.0;
    e->active[EV_CELL_V] = true;
    e->active[EV_HALF] = true;
    e->active[EV_DROPOUT] = l->drive.type == LW_DRIVE_CONVERTER;
    e->active[EV_REGULATION] = l->drive.type == LW_DRIVE_LINEAR_CC;
    e->active[EV_KNOT] = l->led.model == LW_LED_TABLE || l->led.flux;
    knot_interval(e, p0->led_a);
    if (c->peukert > 1.0) {
        e->kink_a = c->rated_a * pow(c->capacity_ah / c->max_capacity_ah, 1.0 / (c->peukert - 1.0));
        e->active[EV_PEUKERT] = true;
    }
    for (int k = 0; k < NEV; k++)
        e->positive[k] = event_g(e, k, p0) > 0.0;
}

/* The intervals between the knots of the pack's curves (the cell's curve
 * points, and the weakest cell's with a spread), in turn. */
static lw_status run_body(engine *e, lw_point p0)
{
    const lw_interp *curve = e->l->pack.cell.ocv;
    const double end = lw_light_depth_end(e->l);
    double a = e->d0;
    lw_point pa = p0;
    while (a < end && !e->done) {
        double b = lw_light_knot_above(e->l, a);
        /* without a spread the interval is one of the curve's, whose
         * values come straight from it; the last reaches the end */
        e->seg = lw_interp_find(curve, a);
        if (e->seg + 2 >= curve->n && !lw_light_has_spread(e->l))
            b = end;
        lw_status st = run_interval(e, a, b, pa, 0);
        if (st != LW_OK)
            return st;
        if (!e->done) {
            a = b;
            if ((st = point_after(e, a, &pa)) != LW_OK)
                return st;
        }
    }
    if (!e->done)
        finish(e, LW_END_CAPACITY, &pa);
    return LW_OK;
}

/* The point at switch-on from depth d0: a converter that cannot hold its
 * set level starts at its fallback level. */
static lw_status start_point(engine *e, lw_point *p0)
{
    lw_status st = eval(e, e->d0, p0);
    if (st == LW_OK && p0->regime == LW_REGIME_DROPOUT && e->l->drive.fallback_a > 0.0) {
        e->fallback = true;
        st = eval(e, e->d0, p0);
    }
    return st;
}

/* The reference of the relative cutoff with cutoff.reference = fresh: the
 * 30-s output of the same light with fresh cells at 20 C. */
static lw_status fresh_reference(const engine *e, double *flux_lm)
{
    lw_light w = *e->l; /* shallow: tables borrowed, never freed here */
    w.pack.stored_months = 0.0;
    w.pack.ambient_c = LW_FRESH_REFERENCE_C;
    lw_light_update_factors(&w, NULL);
    engine f = {.l = &w, .opt = e->opt, .res = e->res, .err = e->err, .seg = SIZE_MAX,
                .end_d = -1, .d0 = 0.0};
    lw_point p0, p30;
    double d30;
    lw_status st = start_point(&f, &p0);
    if (st == LW_OK && p0.flux_lm > 0.0 && isfinite(p0.dtdd_h))
        st = point_at_30s(&f, &p0, &p30, &d30);
    else
        p30 = p0;
    *flux_lm = p30.flux_lm > 0.0 ? p30.flux_lm : p0.flux_lm;
    return st;
}

/* Decide how the run starts: the 30-s point and the reference, or an end
 * at switch-on for a light that gives no light (never lit, cells already
 * empty, output already at a cutoff). */
static lw_status start_run(engine *e, lw_point *p0)
{
    const lw_light *l = e->l;
    lw_result *res = e->res;
    lw_status st = start_point(e, p0);
    if (st != LW_OK)
        return st;
    res->initial = *p0;
    res->peak_resistor_w = p0->p_res_peak_w;
    lw_run_note_resistor(e->l, p0, res);
    e->d_now = e->d0;
    e->floor_lm = fmax(l->cutoff.flux_lm, e->opt->visible_lm);
    if (e->d0 >= lw_light_depth_end(l)) {
        finish(e, LW_END_EMPTY_AT_START, p0);
        return LW_OK;
    }
    if (!(p0->flux_lm >= e->opt->visible_lm) || !isfinite(p0->dtdd_h)) {
        finish(e, LW_END_NEVER_LIT, p0);
        return LW_OK;
    }
    if (p0->weak_cell_v <= l->cutoff.cell_v) {
        finish(e, LW_END_EMPTY_AT_START, p0);
        return LW_OK;
    }
    lw_point p30;
    st = point_at_30s(e, p0, &p30, &res->depth_30s);
    if (st != LW_OK)
        return st;
    res->flux_30s_lm = p30.flux_lm > 0.0 ? p30.flux_lm : p0->flux_lm;
    res->junction_30s_c = p30.flux_lm > 0.0 ? p30.temps.junction_c : p0->temps.junction_c;
    e->flux_ref = res->flux_30s_lm;
    if (l->cutoff.reference == LW_REF_FRESH && (st = fresh_reference(e, &e->flux_ref)) != LW_OK)
        return st;
    if (p0->flux_lm <= e->floor_lm || p0->flux_lm <= l->cutoff.relative_pct / 100.0 * e->flux_ref)
        finish(e, LW_END_DIM_AT_START, p0);
    return LW_OK;
}

lw_status lw_run(const lw_light *light, const lw_run_options *opt, lw_result *res, lw_error *err)
{
    lw_run_options defaults = lw_run_options_default();
    if (!opt)
        opt = &defaults;
    memset(res, 0, sizeof *res);
    if (!(opt->rtol >= 1e-14 && opt->rtol <= 1e-3) || opt->max_halvings < 0 ||
        opt->max_halvings > 60 || !(opt->start_depth >= 0.0 && opt->start_depth <= 1.0) ||
        !(opt->visible_lm >= 0.0) || !(opt->event_tol >= 1e-16 && opt->event_tol <= 1e-6) ||
        opt->event_iter_max < 10 || opt->event_iter_max > 10000 || opt->max_solves < 100)
        return lw_error_set(err, LW_EINPUT, NULL, 0,
                            "run options: rtol must be 1e-14 to 1e-3, max_halvings 0 to 60, "
                            "start_depth 0 to 1, visible_lm >= 0, event_tol 1e-16 to 1e-6, "
                            "event_iter_max 10 to 10000, max_solves >= 100");
    res->time_to_half_h = NAN;
    res->flux_30s_lm = res->flux_ref_lm = NAN;
    res->junction_30s_c = res->peak_junction_c = res->peak_body_c = res->peak_body_h = NAN;
    res->min_weak_cell_v = INFINITY;
    engine e = {.l = light, .opt = opt, .res = res, .err = err, .seg = SIZE_MAX, .end_d = -1};
    e.d0 = fmin(1.0, fmax(opt->start_depth, lw_light_stored_depth(light)));
    res->start_depth = e.d0;
    res->depth_30s = e.d0;
    lw_status st = lw_run_worst_case(light, &res->initial, err);
    res->solves++; /* the worst case is an operating-point solve too */
    if (st != LW_OK)
        return st;
    res->worst_led_a = res->initial.led_a;
    res->worst_resistor_w = res->initial.p_res_peak_w;
    if (opt->time_domain || !lw_thermal_quasi_static(&light->thermal) || light->chain ||
        lw_cell_is_kinetic(&light->pack.cell) || light->use) {
        /* state that lives in time: the run in time (transient.h) */
        st = lw_transient_run(light, opt, res, err);
    } else {
        lw_point p0;
        st = start_run(&e, &p0);
        if (st == LW_OK && !e.done) {
            res->flux_ref_lm = e.flux_ref;
            init_events(&e, &p0);
            st = run_body(&e, p0);
        }
        res->runtime_h = e.tot[Q_T];
        res->lumen_hours = e.tot[Q_LMH];
        res->energy_led_wh = e.tot[Q_LED];
        res->energy_resistor_wh = e.tot[Q_RES];
        res->energy_internal_wh = e.tot[Q_INT];
        res->energy_driver_wh = e.tot[Q_DRV];
        res->energy_drawn_wh = e.tot[Q_DRAWN];
    }
    if (st != LW_OK) {
        lw_run_result_clear(res);
        return st;
    }
    if (light->drive.type == LW_DRIVE_RESISTOR)
        res->regulated_h = NAN;
    bool outside = false;
    double cf, rf;
    lw_cell_temperature_factors(&light->pack.cell, light->pack.ambient_c, &cf, &rf, &outside);
    if (outside)
        res->warnings |= LW_WARN_TEMPERATURE;
    /* comparisons with a limit not given (NAN) are false */
    if (fmax(res->peak_junction_c, light->led.t_junction_c) > light->led.max_junction_c)
        res->warnings |= LW_WARN_JUNCTION_HOT;
    if (light->thermal.enabled && res->peak_body_c > light->thermal.max_touch_c)
        res->warnings |= LW_WARN_BODY_HOT;
    set_warnings(light, res);
    return LW_OK;
}

/* ---- time between two depths ------------------------------------------- */

static double time_over(engine *e, double a, double b, lw_status *st)
{
    lw_point pts[NODES];
    *st = eval_nodes(e, a, b, pts);
    if (*st != LW_OK)
        return 0.0;
    double k[NQ], g[NQ];
    gk_sums(a, b, pts, k, g);
    return k[Q_T];
}

lw_status lw_run_hours_between(const lw_light *light, bool fallback, double d0, double d1,
                               double *hours, lw_error *err)
{
    lw_run_options opt = lw_run_options_default();
    lw_result scratch = {0};
    engine e = {.l = light, .opt = &opt, .res = &scratch, .err = err, .seg = SIZE_MAX,
                .fallback = fallback};
    lw_status st;
    double h = time_over(&e, d0, d1, &st);
    if (st == LW_OK)
        *hours = h;
    return st;
}
