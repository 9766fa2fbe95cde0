/*
 * engine.c - discharge integration in depth of discharge (see engine.h).
 *
 * Invariant: the totals in `tot` are the integrals from the start depth to
 * `d_now` of the accepted pieces, and no active event has triggered before
 * d_now.  Every operating-point solve goes through eval(), which counts it;
 * every point inside the run (not the points solved past its end while an
 * event is sought) goes through note_point(), which keeps the peaks.
 *
 * A piece [a, b] lies inside one interval of the cell curve (the integrands
 * are analytic there but for the model's kinks, which are events).  It is
 * sampled at the nodes of a Gauss-Lobatto rule, ends included, so that
 * neighbouring pieces share their end points; the rule's size is chosen
 * from the smoothness the previous pieces showed, and its error is
 * estimated from the decay of the Legendre coefficients of the polynomial
 * through the nodes (quadrature.h).  A piece that misses the tolerance is
 * tried again with a larger rule or halved, whichever costs fewer solves.
 * Events are watched at every node; one that changes sign is located on
 * that polynomial and polished by Newton steps on solved points.
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
#include "lampwick/quadrature.h"
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

/* The largest Lobatto rule a piece gets: beyond it, halving the piece is
 * cheaper than widening the rule (the coefficients of a function that
 * needs more than 12 nodes fall slowly, and halving speeds their fall). */
#define NODES_MAX 12
/* The smallest: 3 nodes (degree 3, two solves a piece) where the pieces
 * before showed a fall fast enough at this width; its error is read from
 * its one step of coefficients and that fall, the slower (prior_fall()). */
#define NODES_MIN 3
/* The rule of the run's first piece, before any piece has shown how
 * smooth the integrands are: degree 7, enough for most curve intervals at
 * the default tolerance (measured on the bundled cells). */
#define NODES_FIRST 5
/* A piece's rule is sized for this share of the tolerance, so that the
 * estimate usually passes at the first try. */
#define NODES_AIM 0.25
/* The rounding of an integrand value, in units of its size: a solve's
 * result is exact to a few ulps, and its Legendre coefficients sum n of
 * them. */
#define VALUE_NOISE (64.0 * DBL_EPSILON)
/* The rounding of the integration variable at the nodes, in ulps of the
 * depth, that the value noise above gets on top through the integrand's
 * slope: below it, no halving can reduce the error. */
#define DEPTH_NOISE (256.0 * DBL_EPSILON)
/* A total's fall per degree is learnt from a piece only where its tail
 * stands this far above the rounding (closer, the last coefficients are
 * part noise and fall too slowly or too fast). */
#define LEARN_ABOVE_NOISE 100.0
/* A total that changes by more than this share of its size across a piece
 * narrower than 1 / JUMP_SHARE roundings of its depths, its coefficients
 * all lost in that rounding, is not smooth there but all but discontinuous
 * (a light that flips between two states, a rate that climbs without
 * bound): the integral is known only to within its range times the width. */
#define JUMP_SHARE 1e-3
/* The fall per degree taken for a total exact to rounding on a piece: the
 * least rule for the next piece unless it is a million times wider. */
#define LEARN_RATE_EXACT 1e-6
/* A piece narrower than this share of the one learnt from is not learnt
 * from: its few coefficients above the rounding give a fall that, scaled
 * up to a wide piece, overstates the nodes it needs many times over. */
#define LEARN_WIDTH_MIN 0.25
/* The polynomial through a piece's nodes is read over part of it (to an
 * event) only when this many times its estimated error there is within
 * the tolerance: the integral of what it leaves out over part of the piece
 * is not the integral over the whole, which symmetry makes small. */
#define PART_SAFETY 4.0
/* The most Newton steps that polish an event's depth from the root of the
 * polynomial through the nodes (two suffice: the polynomial's root is off
 * by its interpolation error, about the estimate's tail, and each step
 * squares the relative error); a bracketing method takes over after. */
#define POLISH_STEPS 4

enum { Q_T, Q_LMH, Q_LED, Q_RES, Q_INT, Q_DRV, Q_DRAWN, NQ };

enum event_kind { EV_STOP, EV_RECORD, EV_KINK };
enum {
    EV_RELATIVE, EV_FLOOR, EV_CELL_V, EV_DROPOUT, EV_HALF, EV_PEUKERT, EV_REGULATION, EV_KNOT,
    EV_EFFICIENCY, EV_FOLDBACK, NEV
};

/* The events that are bands: a quantity of the point (the LED current, a
 * converter's input voltage, the body temperature) between two adjacent
 * knots of a table the model interpolates piecewise (or two corners); the
 * integrands have a kink where it leaves the band. */
typedef struct band {
    double lo, hi; /* the band holding the quantity: lo <= x <= hi */
    int dir;       /* +1: it left through hi, -1: through lo (set when located) */
} band;

typedef struct engine {
    const lw_light *l;
    const lw_run_options *opt;
    lw_result *res;
    lw_error *err;
    bool fallback;
    double flux_ref;
    double kink_a;            /* per-cell average current of the Peukert cap switch */
    bool active[NEV];
    int watch[NEV], n_watch;  /* the events active at the start, but the dropout (a
                                 record event leaves active[] when it fires) */
    bool positive[NEV];       /* for kinks: sign of g at the current depth */
    band bands[NEV];          /* for EV_KNOT, EV_EFFICIENCY and EV_FOLDBACK */
    double tot[NQ];
    double d_now;
    double density[NQ];       /* totals per unit depth of the pieces accepted so far in
                                 the current interval (dens_k / dens_w) */
    double dens_k[NQ], dens_w;
    /* what the last piece showed of each integrand's smoothness (learn()):
     * its Legendre coefficients on a piece of width learn_w fell by
     * learn_rate per degree from an amplitude learn_amp (relative to the
     * total's size); learn_w 0: nothing learnt yet */
    double learn_w, learn_rate[NQ], learn_amp[NQ];
    double learn_log_rate[NQ], learn_log_need[NQ]; /* their logarithms, the second
                                 of NODES_AIM rtol / (SAFETY amp) (>= 0: no need) */
    size_t cap_pieces;
    size_t seg;               /* curve interval being integrated; SIZE_MAX: search */
    double d0;                /* depth at switch-on */
    double floor_lm;          /* absolute floor: cutoff.flux_lm or the visibility floor */
    double fire_from;         /* depth of the not-fired side of the event last located */
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
    if (e->seg == SIZE_MAX || lw_light_has_spread(e->l))
        return lw_light_point(e->l, d, e->fallback, pt, e->err);
    const lw_interp *o = e->l->pack.cell.ocv, *r = e->l->pack.cell.res;
    size_t i = e->seg;
    if (!(d >= o->x[i] && d <= o->x[i + 1])) /* a piece past collinear points */
        i = lw_interp_find(o, d);
    double u = (d - o->x[i]) / (o->x[i + 1] - o->x[i]);
    u = u < 0.0 ? 0.0 : (u > 1.0 ? 1.0 : u);
    double ocv = o->y[i] + u * (o->y[i + 1] - o->y[i]);
    double res = (r->y[i] + u * (r->y[i + 1] - r->y[i])) * e->l->res_factor;
    return lw_light_point_at(e->l, d, ocv, res, e->fallback, pt, e->err);
}

/* Take a point inside the run into the run's extremes. */
static void note_point(engine *e, const lw_point *pt)
{
    lw_result *r = e->res;
    if (pt->regime != LW_REGIME_DROPOUT && pt->weak_cell_v < r->min_weak_cell_v)
        r->min_weak_cell_v = pt->weak_cell_v;
    if (pt->temps.junction_c > r->peak_junction_c || isnan(r->peak_junction_c))
        r->peak_junction_c = pt->temps.junction_c;
    if (pt->temps.body_c > r->peak_body_c || isnan(r->peak_body_c))
        r->peak_body_c = pt->temps.body_c;
    if (pt->p_res_peak_w > r->peak_resistor_w)
        r->peak_resistor_w = pt->p_res_peak_w;
    if (pt->extrapolated)
        r->warnings |= LW_WARN_EXTRAPOLATED;
    lw_run_note_resistor(e->l, pt, r);
}

static enum event_kind kind_of(int k)
{
    if (k == EV_HALF)
        return EV_RECORD;
    if (k == EV_PEUKERT || k == EV_REGULATION || k == EV_KNOT || k == EV_EFFICIENCY ||
        k == EV_FOLDBACK)
        return EV_KINK;
    if (k == EV_DROPOUT)
        return EV_KINK; /* a stop or a switch to fallback: decided when it fires */
    return EV_STOP;
}

static bool is_band(int k)
{
    return k == EV_KNOT || k == EV_EFFICIENCY || k == EV_FOLDBACK;
}

/* The quantity a band event watches. */
static double band_value(int k, const lw_point *pt)
{
    return k == EV_KNOT ? pt->led_a : (k == EV_EFFICIENCY ? pt->pack_v : pt->temps.body_c);
}

/* Smallest knot above x (dir > 0) or largest strictly below x (dir < 0)
 * in the sorted array xs[n]; +-INFINITY past the ends. */
static double knot_next(const double *xs, size_t n, double x, int dir)
{
    size_t lo = 0, hi = n; /* first index with xs[i] > x (dir > 0), >= x (dir < 0) */
    while (lo < hi) {
        size_t mid = lo + (hi - lo) / 2;
        if (dir > 0 ? xs[mid] > x : xs[mid] >= x)
            hi = mid;
        else
            lo = mid + 1;
    }
    if (dir > 0)
        return lo < n ? xs[lo] : INFINITY;
    return lo > 0 ? xs[lo - 1] : -INFINITY;
}

/* The next knot of band event k's tables beyond x in direction dir. */
static double band_next(const engine *e, int k, double x, int dir)
{
    const lw_light *l = e->l;
    double best = dir > 0 ? INFINITY : -INFINITY;
    const lw_interp *t[2] = {NULL, NULL};
    if (k == EV_KNOT) {
        t[0] = l->led.model == LW_LED_TABLE ? l->led.iv : NULL;
        t[1] = l->led.flux;
    } else if (k == EV_EFFICIENCY) {
        t[0] = l->drive.efficiency;
    } else {
        const double corners[2] = {l->thermal.foldback_from_c, l->thermal.foldback_to_c};
        return knot_next(corners, 2, x, dir);
    }
    for (int i = 0; i < 2; i++) {
        if (!t[i])
            continue;
        double v = knot_next(t[i]->x, t[i]->n, x, dir);
        best = dir > 0 ? fmin(best, v) : fmax(best, v);
    }
    return best;
}

/* The band around x: the largest knot <= x and the smallest > x. */
static void band_set(engine *e, int k, double x)
{
    e->bands[k].lo = band_next(e, k, nextafter(x, INFINITY), -1);
    e->bands[k].hi = band_next(e, k, x, +1);
    e->bands[k].dir = 0;
}

/* After the quantity crossed a knot at the located depth: the band on the
 * far side of that knot. */
static void band_cross(engine *e, int k)
{
    band *b = &e->bands[k];
    if (b->dir > 0) {
        b->lo = b->hi;
        b->hi = band_next(e, k, b->lo, +1);
    } else {
        b->hi = b->lo;
        b->lo = band_next(e, k, b->hi, -1);
    }
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
    case EV_EFFICIENCY:
    case EV_FOLDBACK: {
        /* after a crossing, only the knot the quantity moves towards */
        const band *b = &e->bands[k];
        double x = band_value(k, pt);
        return b->dir > 0 ? b->hi - x : x - b->lo;
    }
    case EV_DROPOUT:
    case EV_REGULATION:
    default:
        return pt->regulation_margin;
    }
}

/* Has event k fired at pt (given the state at the start of the piece)?
 * A band event fires when its quantity leaves the closed band (held
 * exactly at a knot, it stays inside). */
static bool fired(const engine *e, int k, const lw_point *pt)
{
    if (!e->active[k])
        return false;
    if (pt->regime == LW_REGIME_DROPOUT && k != EV_DROPOUT)
        return false; /* a dark point has no output, current or kink to speak of */
    if (is_band(k)) {
        double x = band_value(k, pt);
        return x < e->bands[k].lo || x > e->bands[k].hi;
    }
    double g = event_g(e, k, pt);
    if (kind_of(k) == EV_KINK)
        return (g > 0.0) != e->positive[k];
    return g <= 0.0;
}

/* The sign that makes "not fired" positive for event k, with the band's
 * direction set from the fired point pb. */
static double event_sign(engine *e, int k, const lw_point *pb)
{
    if (is_band(k))
        e->bands[k].dir = band_value(k, pb) > e->bands[k].hi ? +1 : -1;
    if (kind_of(k) == EV_KINK && !is_band(k) && !e->positive[k])
        return -1.0;
    return 1.0;
}

/* The depth to which an event near the point pt is located: event_tol of
 * the depth scale, or looser where the run's tolerance allows it: a depth
 * error dd moves the time by dt/dd dd, the lumen-hours and the energy by
 * their rates times that, each kept within EVENT_SHARE of the tolerance of
 * what the run holds so far (which only grows). */
#define EVENT_SHARE 0.01
static double event_xtol(const engine *e, double d, const lw_point *pt)
{
    double tol = e->opt->event_tol * (fabs(d) + 1e-3);
    if (!(pt->regime != LW_REGIME_DROPOUT && pt->dtdd_h > 0.0 && isfinite(pt->dtdd_h)))
        return tol;
    const double rate[3] = {1.0, pt->flux_lm, pt->p_drawn_w};
    const double held[3] = {e->tot[Q_T], e->tot[Q_LMH], e->tot[Q_DRAWN]};
    double dd = INFINITY;
    for (int i = 0; i < 3; i++)
        if (rate[i] > 0.0)
            dd = fmin(dd, held[i] / (rate[i] * pt->dtdd_h));
    return fmax(tol, EVENT_SHARE * e->opt->rtol * dd);
}

struct locate_ctx {
    engine *e;
    int k;
    double sign;   /* +1: g as is; -1: negated, so that "not fired" is positive */
    bool at_level; /* a band's quantity against `level` instead of the event's g */
    double level;
    bool failed;
};

static double locate_g(const struct locate_ctx *c, const lw_point *pt)
{
    return c->sign * (c->at_level ? band_value(c->k, pt) - c->level : event_g(c->e, c->k, pt));
}

static double locate_fn(double d, void *vctx)
{
    struct locate_ctx *c = vctx;
    lw_point pt;
    if (eval(c->e, d, &pt) != LW_OK) {
        c->failed = true;
        return NAN;
    }
    return locate_g(c, &pt);
}

/* Brent's method on c's function over [a, b], g(a) > 0 >= g(b), to xtol in
 * depth; a solve that fails inside is its own error, not the root
 * finder's. */
static lw_status locate_root(struct locate_ctx *c, double a, double b, double ga, double gb,
                             double xtol, double *d)
{
    lw_status st = lw_root_brent(locate_fn, c, a, b, ga, gb, xtol, c->e->opt->event_iter_max, d,
                                 c->e->err);
    if (c->failed)
        st = c->e->err->code ? c->e->err->code : LW_ENUMERIC;
    return st;
}

/* Depth in [a, b] where event k fires, by Brent's method; g(a) not fired,
 * g(b) fired.  When the start point already sits on the event (g(a) at
 * zero, by a jump or by rounding after the previous event) the event is
 * at a. */
static lw_status locate(engine *e, int k, double a, double b, const lw_point *pa,
                        const lw_point *pb, double *d)
{
    struct locate_ctx c = {.e = e, .k = k, .sign = event_sign(e, k, pb)};
    double ga = locate_g(&c, pa), gb = locate_g(&c, pb);
    e->fire_from = a;
    if (!(ga > 0.0)) {
        *d = a;
        return LW_OK;
    }
    if (gb > 0.0) /* fired at exactly zero (stop events use <= 0) */
        gb = 0.0;
    return locate_root(&c, a, b, ga, gb, event_xtol(e, b, pb), d);
}

/* ---- pieces ------------------------------------------------------------- */

/* A piece [a, b] sampled at the nodes of an n-point Lobatto rule: pt[0] at
 * a, pt[n - 1] at b. */
typedef struct piece {
    double a, b;
    double d[NODES_MAX];      /* the node depths, d[0] = a, d[n - 1] = b */
    const lw_quad_rule *rule;
    int n;
    lw_point pt[NODES_MAX];
    double f[NODES_MAX][NQ];  /* integrands at the nodes */
    double coef[NQ][NODES_MAX]; /* their Legendre coefficients on [a, b] */
    double k[NQ], err[NQ];    /* totals and their estimated errors */
    double tail[NQ];          /* the size of what the polynomials leave out */
    double beyond[NQ];        /* their error between the nodes, about */
    double rate;              /* the slowest fall of the coefficients per degree */
    double q_rate[NQ], q_amp[NQ]; /* each total's fall, and its amplitude a_k / r^k
                                 relative to the total's size (q_rate 0: not read) */
} piece;

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

static double node_depth(const piece *p, int j)
{
    return p->d[j];
}

/* Solve the nodes of p that are not yet solved: all but the ends, and the
 * end b unless have_b. */
static lw_status piece_solve(engine *e, piece *p, bool have_b)
{
    for (int j = 1; j < p->n; j++) {
        if (j == p->n - 1 && have_b)
            break;
        lw_status st = eval(e, node_depth(p, j), &p->pt[j]);
        if (st != LW_OK)
            return st;
    }
    for (int j = 0; j < p->n; j++)
        integrand(&p->pt[j], p->f[j]);
    return LW_OK;
}

/* Set up p on [a, b] with n nodes and its end points. */
static void piece_init(piece *p, double a, double b, int n, const lw_point *pa,
                       const lw_point *pb)
{
    p->a = a, p->b = b;
    p->rule = lw_quad_lobatto(n);
    p->n = p->rule->n;
    const double c = 0.5 * (a + b), h = 0.5 * (b - a);
    for (int j = 1; j + 1 < p->n; j++)
        p->d[j] = c + h * p->rule->x[j];
    p->d[0] = a;
    p->d[p->n - 1] = b;
    p->pt[0] = *pa;
    if (pb)
        p->pt[p->n - 1] = *pb;
}

/* The total whose size sets total q's tolerance: its own, or for the
 * shares of the energy drawn, the energy drawn. */
static int tol_ref(int q)
{
    return q < Q_LED ? q : Q_DRAWN;
}

/* The size total q of a piece of width w with totals k is judged against:
 * its reference total, or that total's mean density over the interval's
 * accepted pieces times w where the piece's own is near zero. */
static double tol_scale(const engine *e, const double k[NQ], int q, double w)
{
    int ref = tol_ref(q);
    return fmax(fabs(k[ref]), e->density[ref] * w);
}

/* The totals of p, their Legendre coefficients and error estimates, each
 * total's from its own coefficients (they do not share their fall: the
 * light output times the hours per depth stays smooth where the hours per
 * depth alone climbs towards the LEDs going out). */
static void piece_sums(piece *p, double prior)
{
    const double h = 0.5 * (p->b - p->a);
    const double dround = DEPTH_NOISE * fmax(fabs(p->a), fabs(p->b));
    lw_quad_estimate est[NQ];
    double noise[NQ], coef_k[NODES_MAX][NQ], sum[NQ];
    double lo[NQ], hi[NQ], big[NQ];
    lw_quad_legendre_many(p->rule, &p->f[0][0], NQ, &coef_k[0][0], sum);
    for (int q = 0; q < NQ; q++)
        lo[q] = INFINITY, hi[q] = -INFINITY, big[q] = 0.0;
    for (int j = 0; j < p->n; j++)
        for (int q = 0; q < NQ; q++) {
            double v = p->f[j][q];
            lo[q] = v < lo[q] ? v : lo[q];
            hi[q] = v > hi[q] ? v : hi[q];
            big[q] = fabs(v) > big[q] ? fabs(v) : big[q];
        }
    for (int q = 0; q < NQ; q++) {
        p->k[q] = h * sum[q];
        for (int k = 0; k < p->n; k++)
            p->coef[q][k] = coef_k[k][q];
        if (big[q] == 0.0) { /* a total that is zero throughout (a loss the drive has not) */
            est[q] = (lw_quad_estimate){0.0, 0.0, 0.0, 0.0};
            noise[q] = 0.0;
            continue;
        }
        /* rounding of the values and, through the slope, of the depths */
        noise[q] = VALUE_NOISE * big[q] + (hi[q] - lo[q]) * dround / (p->b - p->a);
        est[q] = lw_quad_estimate_error(p->rule, p->coef[q], noise[q]);
        if (est[q].tail == 0.0 && hi[q] - lo[q] > JUMP_SHARE * big[q] &&
            dround > JUMP_SHARE * (p->b - p->a))
            est[q].error = hi[q] - lo[q]; /* h times it below: the range's share */
        if (p->n == 3 && isfinite(est[q].tail)) /* its one step is read with the prior */
            est[q] = lw_quad_estimate_at(p->rule, p->coef[q], noise[q], est[q].tail,
                                         prior > 0.0 && prior > est[q].rate ? prior : est[q].rate);
    }
    p->rate = 0.0;
    for (int q = 0; q < NQ; q++) {
        p->err[q] = h * est[q].error;
        p->tail[q] = h * est[q].tail;
        p->beyond[q] = h * est[q].beyond;
        if (est[q].tail > 0.0 && est[q].rate > p->rate)
            p->rate = est[q].rate;
        /* the fall is learnt from coefficients well above the rounding only;
         * a total whose polynomial is exact to rounding falls as fast as
         * any (it asks for the least rule) */
        p->q_rate[q] = p->q_amp[q] = 0.0;
        double size = fabs(p->coef[tol_ref(q)][0]);
        if (!(size > 0.0) || !isfinite(est[q].tail))
            continue;
        if (est[q].tail <= LEARN_ABOVE_NOISE * noise[q]) {
            p->q_rate[q] = LEARN_RATE_EXACT;
            p->q_amp[q] = 1.0;
        } else if (est[q].rate > 0.0 && est[q].rate < 1.0) {
            p->q_rate[q] = est[q].rate;
            double fall = 1.0;
            for (int k = 0; k < p->n - 2; k++)
                fall *= est[q].rate;
            p->q_amp[q] = est[q].tail / size / fall;
        }
    }
}

/* Does every total meet the tolerance on the piece of width w (in depth)?
 * The time is judged against the piece's own (it never vanishes: the sum of
 * the pieces' errors stays within the tolerance of the run).  The output and
 * the energies are judged against the larger of the piece's own and the
 * share, by width, of what the pieces accepted so far in this curve
 * interval hold (e->density): a piece where a total nearly vanishes (the
 * output as the LEDs stop conducting) is not asked for relative accuracy of
 * almost nothing, and the run's total still meets the tolerance.  The
 * energies are judged against the energy drawn, of which each is a share
 * (so a loss that is zero up to rounding, an ideal converter's, does not
 * demand accuracy of noise). */
static bool accurate(const engine *e, double w, const double k[NQ], const double err[NQ])
{
    double rtol = e->opt->rtol;
    for (int q = 0; q < NQ; q++) {
        double scale = q == Q_T ? fabs(k[q]) : tol_scale(e, k, q, w);
        if (!(err[q] <= rtol * scale + 1e-300))
            return false;
    }
    return true;
}

/* May [a, b] be halved again?  Not past max_halvings, and not below
 * LW_PIECE_MIN_REL of its depth: there the nodes sit a few thousand ulps
 * apart, rounding noise in the integrand outweighs any rule's error, and
 * halving could only go on forever. */
static bool may_halve(const engine *e, double a, double b, int depth)
{
    return depth < e->opt->max_halvings && b - a > LW_PIECE_MIN_REL * fmax(fabs(a), fabs(b));
}

/* The rule for a piece of width w: the fewest nodes whose error is within
 * NODES_AIM of the tolerance for every total, at the fall per degree and
 * amplitude the last piece showed, the fall scaled to w (a function
 * analytic near the piece has coefficients a_k ~ A (w / rho)^k, rho set by
 * its nearest singularity; an n-node Lobatto rule misses a_{2n-2}). */
static int nodes_for(const engine *e, double w)
{
    if (!(e->learn_w > 0.0))
        return NODES_FIRST;
    int n = NODES_MIN;
    const double scale = w / e->learn_w, log_scale = lw_root_rough_log(scale);
    for (int q = 0; q < NQ; q++) {
        if (!(e->learn_rate[q] > 0.0) || e->learn_log_need[q] >= 0.0)
            continue;
        if (e->learn_rate[q] * scale >= LW_QUAD_RATE_MAX)
            return NODES_MAX;
        double nq = ceil(1.0 + e->learn_log_need[q] / (2.0 * (e->learn_log_rate[q] + log_scale)));
        n = nq > n ? (nq > NODES_MAX ? NODES_MAX : (int)nq) : n;
    }
    return n;
}

/* How many nodes more piece p (which missed the tolerance) needs: each
 * adds two degrees, so the error falls by rate^2 per node.  A short rule
 * whose coefficients show no fall (with four or five, a function even
 * about the middle or an inflection there cannot be told from one that is
 * not resolved) first reads two more; 0: halve the piece instead. */
#define NODES_AMBIGUOUS 5
static int nodes_more(const engine *e, const piece *p)
{
    const double w = p->b - p->a;
    if (!(p->rate < LW_QUAD_RATE_MAX))
        return p->n <= NODES_AMBIGUOUS ? 2 : 0;
    if (!(p->rate > 0.0))
        return 0;
    double worst = 0.0;
    for (int q = 0; q < NQ; q++) {
        double scale = tol_scale(e, p->k, q, w);
        worst = fmax(worst, p->err[q] / (NODES_AIM * e->opt->rtol * scale + 1e-300));
    }
    return (int)ceil(log(worst) / (-2.0 * log(p->rate)));
}

/* The slowest fall per degree the last piece learnt from predicts for a
 * piece of width w (0: nothing learnt). */
static double prior_fall(const engine *e, double w)
{
    double r = 0.0;
    if (!(e->learn_w > 0.0))
        return 0.0;
    for (int q = 0; q < NQ; q++)
        if (e->learn_rate[q] > 0.0)
            r = fmax(r, e->learn_rate[q] * w / e->learn_w);
    return r;
}

/* Learn the integrands' smoothness from piece p (when it read any). */
static void learn(engine *e, const piece *p)
{
    if (p->b - p->a < LEARN_WIDTH_MIN * e->learn_w)
        return; /* a sliver between two knots: its fall, scaled up, says little */
    bool any = false;
    for (int q = 0; q < NQ; q++)
        any = any || p->q_rate[q] > 0.0;
    if (!any)
        return;
    e->learn_w = p->b - p->a;
    memcpy(e->learn_rate, p->q_rate, sizeof e->learn_rate);
    memcpy(e->learn_amp, p->q_amp, sizeof e->learn_amp);
    for (int q = 0; q < NQ; q++) {
        if (!(p->q_rate[q] > 0.0))
            continue;
        e->learn_log_rate[q] = lw_root_rough_log(p->q_rate[q]);
        e->learn_log_need[q] =
            lw_root_rough_log(NODES_AIM * e->opt->rtol / (LW_QUAD_SAFETY * p->q_amp[q]));
    }
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

/* Add the totals k over [a, b], with their error estimates g, to the run;
 * pts[0 .. npts-1] are the points solved inside [a, b], `regime` the
 * drive's regime over it (pieces end where it changes).  A piece that missed
 * the tolerance on its own (it could not be halved further) is flagged only
 * when its error also shows against the run's totals so far. */
static lw_status accept_totals(engine *e, double a, double b, const double k[NQ],
                               const double g[NQ], bool ok, const lw_point *pts, int npts,
                               lw_regime regime)
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
    for (int j = 0; j < npts; j++)
        note_point(e, &pts[j]);
    if (regime == LW_REGIME_REGULATED)
        e->res->regulated_h += k[Q_T];
    e->dens_w += b - a;
    for (int q = 0; q < NQ; q++) {
        e->tot[q] += k[q];
        e->dens_k[q] += fabs(k[q]);
        e->density[q] = e->dens_k[q] / e->dens_w;
    }
    e->d_now = b;
    return LW_OK;
}

/* ---- spans: pieces without events --------------------------------------- */

/* What a span integration does with its pieces: add them to the run, or
 * only sum them (a part of a piece that an event needs, the hours between
 * two depths). */
typedef struct span_sum {
    bool accumulate;
    double k[NQ];
} span_sum;

/* The most pieces pending at once in a span: one per halving. */
#define SPAN_STACK 64

/* The far halves of halved pieces, waiting their turn (the latest first),
 * each with the point at its end and its count of halvings. */
typedef struct pending {
    struct {
        double d;
        lw_point pt;
        int depth;
    } item[SPAN_STACK];
    int top;
} pending;

static bool pending_push(pending *s, double b, const lw_point *pb, int depth)
{
    if (s->top >= SPAN_STACK)
        return false;
    s->item[s->top].d = b;
    s->item[s->top].pt = *pb;
    s->item[s->top].depth = depth;
    s->top++;
    return true;
}

/* The next piece's end, its point and its halvings; false when none waits. */
static bool pending_pop(pending *s, double *b, lw_point *pb, int *depth)
{
    if (s->top == 0)
        return false;
    s->top--;
    *b = s->item[s->top].d;
    *pb = s->item[s->top].pt;
    *depth = s->item[s->top].depth;
    return true;
}

/* The rule a piece that missed the tolerance tries next on the same piece:
 * the larger one its fall asks for, while that costs fewer solves than
 * halving it would; 0: halve instead. */
static int larger_rule(const engine *e, const piece *p)
{
    int more = nodes_more(e, p);
    return more > 0 && p->n + more <= NODES_MAX &&
                   p->n + more - 1 <= 2 * (nodes_for(e, 0.5 * (p->b - p->a)) - 1) + 1
               ? p->n + more
               : 0;
}

/* What a piece that missed the tolerance does next. */
typedef enum { REFINE_NONE, REFINE_LARGER, REFINE_HALVED } refine_kind;

/* Piece p over [p->a, p->b], which missed the tolerance, is tried again
 * with a larger rule (*n set), or halved: its end (point pb) waits in
 * later, *b becomes the middle, *depth one deeper and *n the half's rule.
 * REFINE_NONE: neither is possible and p stands with its warning. */
static refine_kind refine(const engine *e, const piece *p, const lw_point *pb, pending *later,
                          double *b, int *depth, int *n)
{
    int larger = larger_rule(e, p);
    if (larger > 0) {
        *n = larger;
        return REFINE_LARGER;
    }
    if (may_halve(e, p->a, p->b, *depth) && pending_push(later, p->b, pb, *depth + 1)) {
        ++*depth;
        *b = 0.5 * (p->a + p->b);
        *n = nodes_for(e, *b - p->a);
        return REFINE_HALVED;
    }
    return REFINE_NONE;
}

/* Integrate [a, b] (inside one curve interval, no event inside) from the
 * points at both ends, piece by piece: a piece that misses the tolerance
 * is tried with a larger rule or halved. */
static lw_status span(engine *e, double a, const lw_point *pa, double b, const lw_point *pb,
                      span_sum *sum)
{
    pending later = {.top = 0};
    int depth = 0, n = nodes_for(e, b - a);
    lw_point cur = *pa, end = *pb;
    piece p;
    while (a < b) {
        piece_init(&p, a, b, n, &cur, &end);
        lw_status st = piece_solve(e, &p, true);
        if (st != LW_OK)
            return st;
        piece_sums(&p, prior_fall(e, p.b - p.a));
        bool ok = accurate(e, b - a, p.k, p.err);
        learn(e, &p);
        if (!ok && isfinite(p.k[Q_T])) {
            refine_kind r = refine(e, &p, &end, &later, &b, &depth, &n);
            if (r == REFINE_HALVED && (st = eval(e, b, &end)) != LW_OK)
                return st;
            if (r != REFINE_NONE)
                continue;
        }
        if (sum->accumulate) {
            st = accept_totals(e, a, b, p.k, p.err, ok, p.pt + 1, p.n - 1, p.pt[1].regime);
            if (st != LW_OK)
                return st;
        } else {
            for (int q = 0; q < NQ; q++)
                sum->k[q] += p.k[q];
        }
        a = b;
        cur = end;
        (void)pending_pop(&later, &b, &end, &depth);
        n = nodes_for(e, b - a);
    }
    return LW_OK;
}

/* ---- the end of a converter --------------------------------------------- */

/* [a, b] ending where a converter goes dark.  At its power limit the pack
 * current goes as the square root of the distance to the limit, which no
 * polynomial rule integrates well; with d = b - (b - a) s^2 the integrand
 * times the Jacobian 2 (b - a) s is smooth in s, so Gauss rules (which
 * never touch s = 0, the dark end) run on s in [0, 1], halving in s from
 * the lit end. */
#define LIMIT_NODES 8
static lw_status integrate_to_limit(engine *e, double a, double b)
{
    typedef struct s_piece {
        double s0, s1;
        int depth;
    } s_piece;
    s_piece stack[SPAN_STACK];
    int top = 0;
    stack[top++] = (s_piece){0.0, 1.0, 0};
    const lw_quad_rule *rule = lw_quad_gauss(LIMIT_NODES);
    while (top > 0 && !e->done) {
        top--;
        double s0 = stack[top].s0, s1 = stack[top].s1;
        int depth = stack[top].depth;
        lw_point pts[LIMIT_NODES];
        double f[LIMIT_NODES][NQ];
        double hs = 0.5 * (s1 - s0);
        for (int j = 0; j < LIMIT_NODES; j++) {
            /* descending s: ascending depth */
            double sj = 0.5 * (s0 + s1) - hs * rule->x[j];
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
        double dround = DEPTH_NOISE * fabs(b) / (2.0 * (b - a) * s_mid);
        for (int q = 0; q < NQ; q++) {
            double coef[LIMIT_NODES], lo = f[0][q], hi = lo, big = 0.0;
            for (int j = 0; j < LIMIT_NODES; j++) {
                lo = fmin(lo, f[j][q]);
                hi = fmax(hi, f[j][q]);
                big = fmax(big, fabs(f[j][q]));
            }
            k[q] = hs * lw_quad_sum(rule, &f[0][q], NQ);
            lw_quad_legendre(rule, &f[0][q], NQ, coef);
            double noise = VALUE_NOISE * big + (hi - lo) * dround / (s1 - s0);
            g[q] = hs * lw_quad_estimate_error(rule, coef, noise).error;
        }
        bool ok = accurate(e, (b - a) * (s1 * s1 - s0 * s0), k, g);
        if (!ok && may_halve(e, s0, s1, depth) && top + 2 <= SPAN_STACK) {
            double m = 0.5 * (s0 + s1);
            stack[top++] = (s_piece){s0, m, depth + 1};
            stack[top++] = (s_piece){m, s1, depth + 1};
            continue;
        }
        lw_status st = accept_totals(e, b - (b - a) * s1 * s1,
                                     s0 > 0 ? b - (b - a) * s0 * s0 : b, k, g, ok, pts,
                                     LIMIT_NODES, pts[0].regime);
        if (st != LW_OK)
            return st;
    }
    return LW_OK;
}

/* ---- events at the run's depth ------------------------------------------ */

static void finish(engine *e, lw_end_reason why, const lw_point *pt)
{
    e->res->end_reason = why;
    e->res->end_depth = pt->depth;
    e->res->final = *pt;
    e->done = true;
    note_point(e, pt);
}

static bool lit(const lw_point *pt)
{
    return pt->regime != LW_REGIME_DROPOUT && isfinite(pt->dtdd_h);
}

/* The last operating point the driver held before it went dark at d: walk
 * back from d in growing steps, at most to the not-fired side of the
 * located event. */
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

/* Event k fires between nodes j - 1 (not fired) and j (fired) of piece p:
 * its depth *d and the point there *pt.  The root of the polynomial through
 * the event function's values at the nodes, then Newton steps on solved
 * points (the slope from that polynomial, then secants) until a step is
 * within event_tol; Brent's method on what is left of the bracket when a
 * step leaves it.  Needs every node lit. */
static lw_status locate_smooth(engine *e, int k, const piece *p, int j, double *d,
                               lw_point *pt)
{
    double sign = event_sign(e, k, &p->pt[j]), gv[NODES_MAX], coef[NODES_MAX];
    for (int i = 0; i < p->n; i++)
        gv[i] = sign * event_g(e, k, &p->pt[i]);
    double lo = node_depth(p, j - 1), hi = node_depth(p, j);
    double glo = sign * event_g(e, k, &p->pt[j - 1]), ghi = sign * event_g(e, k, &p->pt[j]);
    e->fire_from = lo;
    if (!(glo > 0.0)) { /* on the event already (a jump, or rounding after the last) */
        *d = lo;
        *pt = p->pt[j - 1];
        return LW_OK;
    }
    lw_quad_legendre(p->rule, gv, 1, coef);
    const double h = 0.5 * (p->b - p->a), c = 0.5 * (p->a + p->b);
    const double tol = event_xtol(e, hi, &p->pt[j]);
    double x, slope;
    if (!lw_legendre_root(coef, p->n, 0.0, (lo - c) / h, (hi - c) / h, &x))
        x = (lo - c) / h - glo * ((hi - lo) / h) / (ghi - glo);
    lw_legendre_eval(coef, p->n, x, &slope);
    slope /= h;
    double at = fmin(fmax(c + h * x, lo), hi), g_prev = NAN, d_prev = NAN;
    for (int it = 0; it < POLISH_STEPS; it++) {
        lw_status st = eval(e, at, pt);
        if (st != LW_OK)
            return st;
        double g = lit(pt) ? sign * event_g(e, k, pt) : NAN;
        if (!isfinite(g))
            break;
        if (g > 0.0)
            lo = at, glo = g;
        else
            hi = at, ghi = g;
        if (g == 0.0) {
            *d = at;
            return LW_OK;
        }
        if (isfinite(g_prev) && at != d_prev)
            slope = (g - g_prev) / (at - d_prev);
        double step = -g / slope;
        if (!isfinite(step))
            break;
        if (fabs(step) <= tol) {
            *d = at;
            return LW_OK;
        }
        double next = at + step;
        if (!(next > lo && next < hi))
            break;
        g_prev = g, d_prev = at, at = next;
    }
    /* what is left of the bracket, by Brent's method */
    struct locate_ctx ctx = {.e = e, .k = k, .sign = sign};
    lw_status st = locate_root(&ctx, lo, hi, glo, ghi > 0.0 ? 0.0 : ghi, tol, d);
    return st == LW_OK ? eval(e, *d, pt) : st;
}

/* Act on event k located at depth d (the totals already reach d); *pt is
 * the point at d. */
static lw_status fire(engine *e, int k, double d, lw_point *pt)
{
    static const lw_end_reason why[] = {LW_END_RELATIVE, LW_END_FLUX_FLOOR,
                                        LW_END_CELL_VOLTAGE, LW_END_DRIVER_DROPOUT};
    lw_status st = LW_OK;
    if (k == EV_DROPOUT) {
        lw_point held = *pt; /* the lit part ends where the driver held */
        if (!e->fallback && e->l->drive.fallback_a > 0.0) {
            e->fallback = true;
            st = eval(e, d, pt);
            if (st != LW_OK)
                return st;
            e->positive[EV_DROPOUT] = pt->regulation_margin > 0.0;
            if (e->positive[EV_DROPOUT]) {
                note_point(e, &held);
                return LW_OK;
            }
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
        if (is_band(k))
            band_cross(e, k);
        else
            e->positive[k] = !e->positive[k];
        break;
    }
    return LW_OK;
}

/* After the converter falls back to its low level the output has jumped:
 * events that the new point already satisfies happen here, at d, and the
 * kinks take the side of the new regime.  The 50 % mark comes first: a
 * jump to or below half while lit sets the time to half, also when the
 * same jump ends the run. */
static lw_status settle(engine *e, double d, lw_point *pt)
{
    static const int order[NEV] = {EV_HALF,       EV_RELATIVE, EV_FLOOR,      EV_CELL_V,
                                   EV_DROPOUT,    EV_PEUKERT,  EV_REGULATION, EV_KNOT,
                                   EV_EFFICIENCY, EV_FOLDBACK};
    for (int i = 0; i < NEV && !e->done; i++) {
        int k = order[i];
        if (!e->active[k])
            continue;
        if (is_band(k)) {
            band_set(e, k, band_value(k, pt));
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

/* The first event among the nodes of p: its kind (-1 none), depth and the
 * point there.  Events are judged node by node; among those that fire
 * between the same two nodes the earliest located wins.  At a dark node
 * the other events are judged at the last point the driver held before it
 * went dark: a cutoff crossed on the way there comes first. */
static lw_status first_event(engine *e, const piece *p, int *first_k, double *d_star,
                             lw_point *at)
{
    *first_k = -1;
    bool all_lit = true;
    for (int j = 0; j < p->n; j++)
        all_lit = all_lit && lit(&p->pt[j]) && isfinite(p->f[j][Q_LMH]);
    for (int j = 1; j < p->n && *first_k < 0; j++) {
        const lw_point *prev = &p->pt[j - 1], *node = &p->pt[j];
        double d_prev = node_depth(p, j - 1), dn = node_depth(p, j);
        lw_point held;
        lw_status st;
        if (fired(e, EV_DROPOUT, node)) {
            double dk;
            st = locate(e, EV_DROPOUT, d_prev, dn, prev, node, &dk);
            if (st == LW_OK)
                st = held_point(e, dk, &held);
            if (st != LW_OK)
                return st;
            *first_k = EV_DROPOUT;
            *d_star = held.depth;
            *at = held;
            node = &held;
            dn = held.depth;
        }
        /* the events are compared by where they fire; the winner's point is
         * then the last the driver held (an event found past the LEDs going
         * out comes after the cutoffs crossed on the way there).  They are
         * taken in the order a straight line between the nodes puts them,
         * and one that has not fired at the best point so far fires after
         * it: it is not located at all; one that has is sought before it. */
        bool bracketed = false, have_best = *first_k >= 0;
        lw_point best = *at;
        int cand[NEV], nc = 0;
        double guess[NEV];
        for (int w = 0; w < e->n_watch; w++) {
            int k = e->watch[w];
            if (!fired(e, k, node) || !(dn > d_prev))
                continue;
            double g0 = fabs(event_g(e, k, prev)), g1 = fabs(event_g(e, k, node));
            double x = is_band(k) || !(g0 + g1 > 0.0) ? dn : d_prev + (dn - d_prev) * g0 / (g0 + g1);
            int i = nc++;
            for (; i > 0 && guess[i - 1] > x; i--)
                cand[i] = cand[i - 1], guess[i] = guess[i - 1];
            cand[i] = k, guess[i] = x;
        }
        for (int i = 0; i < nc; i++) {
            int k = cand[i];
            double hi = dn;
            const lw_point *pb = node;
            if (*first_k >= 0) {
                if (!have_best) {
                    if ((st = eval(e, *d_star, &best)) != LW_OK)
                        return st;
                    have_best = true;
                }
                if (lit(&best)) {
                    if (!fired(e, k, &best))
                        continue; /* it fires after the best so far */
                    hi = *d_star;
                    pb = &best;
                }
            }
            double dk;
            lw_point pk = *pb;
            bool smooth = all_lit && *first_k < 0;
            st = smooth ? locate_smooth(e, k, p, j, &dk, &pk)
                        : locate(e, k, d_prev, hi, prev, pb, &dk);
            if (st != LW_OK)
                return st;
            if (*first_k < 0 || dk < *d_star) {
                *first_k = k;
                *d_star = dk;
                *at = pk;
                bracketed = !smooth;
                have_best = smooth;
                best = pk;
            }
        }
        if (bracketed) {
            if ((st = held_point(e, *d_star, at)) != LW_OK)
                return st;
            *d_star = at->depth;
        }
    }
    return LW_OK;
}

/* The totals of p over [a, d] (d inside the piece) from the polynomials
 * through its nodes, when they are accurate enough for it: the piece met
 * the tolerance as a whole (so its integrands are smooth to its end) and
 * what the polynomials leave out, integrated over [a, d], is within the
 * tolerance too.  False otherwise. */
static bool piece_part(const engine *e, const piece *p, int event, double d, double k[NQ],
                       double g[NQ])
{
    if (!accurate(e, p->b - p->a, p->k, p->err))
        return false;
    /* no other event anywhere in the piece: past its own, the integrands
     * might bend (the LEDs going out under the floor, a knot, a switch)
     * where the polynomials do not see it */
    for (int j = 1; j < p->n; j++)
        for (int w = 0; w < e->n_watch; w++)
            if (e->watch[w] != event && fired(e, e->watch[w], &p->pt[j]))
                return false;
    const double h = 0.5 * (p->b - p->a), x = (2.0 * d - p->a - p->b) / (p->b - p->a);
    for (int q = 0; q < NQ; q++) {
        k[q] = h * lw_legendre_integral(p->coef[q], p->n, x);
        g[q] = PART_SAFETY * LW_QUAD_SAFETY * p->beyond[q];
    }
    return accurate(e, d - p->a, k, g);
}

/* The part [a, d] of piece p added to the run: from its polynomials when
 * they are accurate enough, else integrated afresh from the points at both
 * ends (pd at d). */
static lw_status accept_part(engine *e, const piece *p, int event, double d, const lw_point *pd,
                             bool smooth_past_d)
{
    double k[NQ], g[NQ];
    if (!(d > p->a))
        return LW_OK;
    if (smooth_past_d && piece_part(e, p, event, d, k, g)) {
        int inside = 0;
        while (inside + 1 < p->n && node_depth(p, inside + 1) <= d)
            inside++;
        /* a stop leaves the regime as it was: the point at d has it */
        return accept_totals(e, p->a, d, k, g, true, p->pt + 1, inside, pd->regime);
    }
    span_sum sum = {true, {0}};
    return span(e, p->a, &p->pt[0], d, pd, &sum);
}

/* The time from p's start to d: from its polynomial when accurate enough,
 * else integrated afresh. */
static lw_status time_part(engine *e, const piece *p, int event, double d, const lw_point *pd,
                           double *t_h)
{
    double k[NQ], g[NQ];
    if (piece_part(e, p, event, d, k, g)) {
        *t_h = k[Q_T];
        return LW_OK;
    }
    span_sum sum = {false, {0}};
    lw_status st = d > p->a ? span(e, p->a, &p->pt[0], d, pd, &sum) : LW_OK;
    *t_h = sum.k[Q_T];
    return st;
}

/* Is p's only infinite integrand at its end b, where the drive is still
 * lit (the cells' rate of discharge vanishes there)? */
static bool singular_end(const piece *p)
{
    for (int j = 0; j + 1 < p->n; j++)
        if (!isfinite(p->f[j][Q_T]))
            return false;
    return p->pt[p->n - 1].regime != LW_REGIME_DROPOUT;
}

/* Integrate [A, B] (inside one interval of the cell curve), stopping at the
 * first stop event.  *pa is the point at A; on return, the point where the
 * integration stopped (at B unless the run ended). */
static lw_status run_interval(engine *e, double A, double B, lw_point *pa_io)
{
    pending later = {.top = 0};
    int depth = 0;
    double a = A, b = B;
    lw_point pa = *pa_io, pb;
    bool have_b = false;
    /* the density is of this interval's accepted pieces */
    memset(e->density, 0, sizeof e->density);
    memset(e->dens_k, 0, sizeof e->dens_k);
    e->dens_w = 0.0;
    int n = nodes_for(e, b - a);
    piece p;
    /* each pass ends at an event, a refinement or an accepted piece; a model
     * has a handful of events, so the cap only guards against one that keeps
     * re-firing */
    for (int pass = 0; !e->done && a < B; pass++) {
        if (pass == LW_EVENTS_PER_INTERVAL_MAX)
            return lw_error_set(e->err, LW_ENUMERIC, NULL, 0,
                                "too many events between depths %.6g and %.6g", A, B);
        piece_init(&p, a, b, n, &pa, have_b ? &pb : NULL);
        lw_status st = piece_solve(e, &p, have_b);
        if (st != LW_OK)
            return st;
        pb = p.pt[p.n - 1];
        have_b = true;
        piece_sums(&p, prior_fall(e, p.b - p.a));
        int k;
        double d_star = b;
        lw_point at = pb;
        for (;;) { /* a record event (50 %) is timed, and the nodes scanned again */
            st = first_event(e, &p, &k, &d_star, &at);
            if (st != LW_OK)
                return st;
            if (k < 0 || kind_of(k) != EV_RECORD)
                break;
            double t_part = 0.0;
            if ((st = time_part(e, &p, k, d_star, &at, &t_part)) != LW_OK)
                return st;
            e->res->time_to_half_h = e->tot[Q_T] + t_part;
            e->active[k] = false;
        }
        if (k < 0 && !isfinite(p.k[Q_T]) && singular_end(&p)) {
            /* the rate vanishes at the capacity end itself (cells that only
             * self-discharge): the open rule of a converter's end never
             * touches it */
            if ((st = integrate_to_limit(e, a, b)) != LW_OK)
                return st;
            a = b;
            pa = pb;
            if (!pending_pop(&later, &b, &pb, &depth))
                b = B;
            n = nodes_for(e, b - a);
            continue;
        }
        if (k < 0) {
            bool ok = accurate(e, b - a, p.k, p.err);
            learn(e, &p);
            if (!ok && isfinite(p.k[Q_T])) {
                refine_kind r = refine(e, &p, &pb, &later, &b, &depth, &n);
                have_b = have_b && r != REFINE_HALVED;
                if (r != REFINE_NONE)
                    continue;
            }
            st = accept_totals(e, a, b, p.k, p.err, ok, p.pt + 1, p.n - 1, p.pt[1].regime);
            if (st != LW_OK)
                return st;
            a = b;
            pa = pb;
            if (!pending_pop(&later, &b, &pb, &depth)) {
                b = B;
                have_b = a >= B;
            }
            n = nodes_for(e, b - a);
            continue;
        }
        /* an event at d_star: the lit part of [a, d_star] first (the piece
         * is not learnt from: past the event its integrands may bend) */
        if (d_star > a) {
            if (k == EV_DROPOUT)
                st = integrate_to_limit(e, a, d_star);
            else
                st = accept_part(e, &p, k, d_star, &at, kind_of(k) == EV_STOP);
            if (st != LW_OK)
                return st;
        }
        bool fell_back = k == EV_DROPOUT && !e->fallback;
        if (kind_of(k) == EV_KINK)
            e->learn_w = 0.0; /* the integrands change their form here: learn anew */
        st = fire(e, k, d_star, &at);
        if (st == LW_OK && !e->done && k == EV_DROPOUT)
            st = settle(e, d_star, &at);
        if (st != LW_OK)
            return st;
        a = d_star;
        pa = at;
        e->d_now = a;
        if (fell_back) /* the drive changed: the points ahead are solved again */
            have_b = false;
        n = nodes_for(e, b - a);
    }
    *pa_io = pa;
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


/* ---- time between depths, the 30-s point -------------------------------- */

/* The first kink of the light's integrands strictly inside (a, b), both
 * ends lit: a knot of a table its band events watch, the regulator's
 * margin or the Peukert corner changing sign between the ends (one that
 * crosses and returns inside is not seen).  *found false when none. */
static lw_status kink_inside(engine *e, double a, const lw_point *pa, double b,
                             const lw_point *pb, bool *found, double *dk, lw_point *pk)
{
    static const int kinds[] = {EV_KNOT, EV_EFFICIENCY, EV_FOLDBACK, EV_REGULATION, EV_PEUKERT};
    const double margin = LW_PIECE_MIN_REL * fmax(fabs(a), fabs(b));
    *found = false;
    *dk = b;
    for (size_t i = 0; i < sizeof kinds / sizeof kinds[0]; i++) {
        int k = kinds[i];
        if (!e->active[k])
            continue;
        struct locate_ctx c = {.e = e, .k = k, .sign = 1.0, .at_level = is_band(k)};
        double v0 = 0.0, v1 = 0.0;
        if (is_band(k)) {
            v0 = band_value(k, pa), v1 = band_value(k, pb);
            if (!(v0 != v1))
                continue;
            c.level = v0;
            c.sign = v1 > v0 ? -1.0 : 1.0;
        } else {
            double g0 = event_g(e, k, pa), g1 = event_g(e, k, pb);
            if ((g0 > 0.0) == (g1 > 0.0))
                continue;
            c.sign = g0 > 0.0 ? 1.0 : -1.0;
        }
        /* a band's knots in turn from a: the first may be the one a sits
         * on (a kink located a hair short of its knot) */
        for (int tries = 0; tries < (is_band(k) ? 2 : 1); tries++) {
            if (is_band(k)) {
                c.level = band_next(e, k, c.level, v1 > v0 ? +1 : -1);
                if (!(v1 > v0 ? c.level < v1 : c.level > v1))
                    break; /* no knot between them */
            }
            double ga = locate_g(&c, pa), gb = locate_g(&c, pb), d = b;
            lw_status st = LW_OK;
            if (ga > 0.0)
                st = locate_root(&c, a, b, ga, gb > 0.0 ? 0.0 : gb,
                                 e->opt->event_tol * (fabs(b) + 1e-3), &d);
            if (st != LW_OK)
                return st;
            if (d > a + margin) {
                if (d < b - margin && d < *dk) {
                    *found = true;
                    *dk = d;
                }
                break;
            }
        }
    }
    return *found ? eval(e, *dk, pk) : LW_OK;
}

/* Hours from depth a to b >= a, split at the pack's curve knots and the
 * kinks between them, each part integrated to the run's tolerance from
 * its end points (*pb, the point at b, given; the search-mode solve finds
 * the curve interval). */
static lw_status hours_between(engine *e, double a, double b, const lw_point *pa,
                               const lw_point *pb, double *t_h)
{
    size_t saved = e->seg;
    e->seg = SIZE_MAX;
    *t_h = 0.0;
    lw_status st = LW_OK;
    lw_point cur = *pa;
    for (double x = a; st == LW_OK && x < b;) {
        double end = fmin(b, lw_light_knot_above(e->l, x));
        if (!(end > x))
            end = b; /* past the last knot */
        lw_point pe;
        if (end == b)
            pe = *pb;
        else if ((st = eval(e, end, &pe)) != LW_OK)
            break;
        if (!lit(&cur) || !lit(&pe)) {
            *t_h = INFINITY; /* dark on the way: no time reaches b */
            break;
        }
        bool kink;
        double dk;
        lw_point pk;
        if ((st = kink_inside(e, x, &cur, end, &pe, &kink, &dk, &pk)) != LW_OK)
            break;
        if (kink) {
            end = dk;
            pe = pk;
            if (!lit(&pe)) {
                *t_h = INFINITY;
                break;
            }
        }
        span_sum sum = {false, {0}};
        st = span(e, x, &cur, end, &pe, &sum);
        *t_h += sum.k[Q_T];
        x = end;
        cur = pe;
    }
    e->seg = saved;
    return st;
}

/* The 30 s after switch-on on one smooth stretch: a 3-node Lobatto rule
 * (NODES_MIN) on [d0, d1], d1 a little past the constant-rate guess, gives
 * dt/dd as a quadratic; the depth where its integral (a cubic) reaches
 * 30 s is the 30-s point, when the rule's estimate and the quadratic's own
 * error are within the tolerance there and the quadratic gives, at the
 * point found, the rate solved there.  Three solves where it applies (the
 * middle node, d1 and the point itself); false when it does not (a curve
 * knot or an event in the way, a rate that changes fast). */
#define T30_MARGIN 1.1 /* d1 past the guess: the rate falls by less than 10 % in 30 s */
#define T30_SHARE 0.1  /* the share of the tolerance the 30-s point may use */
static lw_status t30_smooth(engine *e, const lw_point *p0, lw_point *p30, double *d30,
                            bool *done)
{
    const double t30_h = 30.0 / 3600.0, d0 = e->d0;
    *done = false;
    double d1 = d0 + T30_MARGIN * t30_h / p0->dtdd_h;
    if (!(d1 < lw_light_knot_above(e->l, d0)) || !(d1 < lw_light_depth_end(e->l)))
        return LW_OK;
    piece p;
    piece_init(&p, d0, d1, NODES_MIN, p0, NULL);
    lw_status st = piece_solve(e, &p, false);
    if (st != LW_OK)
        return st;
    for (int j = 0; j < p.n; j++)
        if (!lit(&p.pt[j]) || !isfinite(p.f[j][Q_T]))
            return LW_OK;
    piece_sums(&p, prior_fall(e, p.b - p.a));
    const double h = 0.5 * (d1 - d0);
    /* the polynomial's time error moves the 30-s depth by slack / (dt/dd); what
     * that does to the output there is what must stay within the tolerance */
    double slack = LW_QUAD_SAFETY * p.beyond[Q_T] + p.err[Q_T];
    double dlnf = fabs(p.pt[p.n - 1].flux_lm - p0->flux_lm) / (d1 - d0) / p0->flux_lm;
    double dd = slack / fmin(p.f[0][Q_T], p.f[p.n - 1][Q_T]);
    if (!(dd * dlnf <= e->opt->rtol && dd <= 1e-6 * (d1 - d0)) || p.k[Q_T] < t30_h)
        return LW_OK;
    /* the integral of the quadratic from -1 rises through t30 / h once */
    double lo = -1.0, hi = 1.0, x = 2.0 / T30_MARGIN - 1.0;
    for (int it = 0; it < LW_T30_ITER_MAX; it++) {
        double f = h * lw_legendre_integral(p.coef[Q_T], p.n, x) - t30_h;
        double slope = h * lw_legendre_eval(p.coef[Q_T], p.n, x, NULL);
        if (f < 0.0)
            lo = x;
        else
            hi = x;
        double next = slope > 0.0 ? x - f / slope : 0.5 * (lo + hi);
        if (fabs(next - x) <= 4.0 * DBL_EPSILON || hi - lo <= 4.0 * DBL_EPSILON) {
            x = next; /* converged (the step is judged before the bracket, which x ends) */
            break;
        }
        x = next > lo && next < hi ? next : 0.5 * (lo + hi);
    }
    *d30 = d0 + h * (x + 1.0);
    if ((st = eval(e, *d30, p30)) != LW_OK)
        return st;
    /* the quadratic is believed where it also gives the rate solved there: its
     * miss there, over the 30 s, is what the depth found may be out by */
    double miss = fabs(lw_legendre_eval(p.coef[Q_T], p.n, x, NULL) - p30->dtdd_h);
    *done = lit(p30) && miss / p30->dtdd_h * dlnf * (*d30 - d0) <= T30_SHARE * e->opt->rtol;
    return LW_OK;
}

/* The point 30 s after switch-on (the FL 1 reference): t30_smooth where it
 * applies; otherwise the depth solving t(d) = 30 s by Newton's method on
 * the run's own quadrature (dt/dd is the integrand, so each step is exact
 * to second order), safeguarded by bisection.  Each trial's hours are
 * integrated from the deepest point known to come before 30 s, never
 * back from one far beyond it (hours of a long glow, less hours of a long
 * glow, lose the 30 s to the tolerance of the glow).  A light that goes
 * dark (out, or below the visibility floor) or empty before 30 s has no
 * 30-s point: *p30 is then the switch-on point. */
static lw_status point_at_30s(engine *e, const lw_point *p0, lw_point *p30, double *d30)
{
    const double t30_h = 30.0 / 3600.0;
    bool done;
    lw_status st = t30_smooth(e, p0, p30, d30, &done);
    if (st != LW_OK || (done && p30->flux_lm >= e->opt->visible_lm))
        return st;
    const double end = lw_light_depth_end(e->l);
    double lo = e->d0, hi = end, t_lo = 0.0;
    double d = fmin(end, e->d0 + t30_h / p0->dtdd_h);
    bool dark_hi = false;
    lw_point p_lo = *p0;
    *p30 = *p0;
    *d30 = e->d0;
    for (int it = 0; it < LW_T30_ITER_MAX; it++) {
        lw_point pt;
        if ((st = eval(e, d, &pt)) != LW_OK)
            return st;
        double dt = INFINITY;
        if (lit(&pt) && pt.flux_lm >= e->opt->visible_lm &&
            (st = hours_between(e, lo, d, &p_lo, &pt, &dt)) != LW_OK)
            return st;
        double f = t_lo + dt - t30_h;
        if (!isfinite(dt)) { /* dark here or on the way: the 30-s point is before d */
            hi = d;
            dark_hi = true;
        } else if (f < 0.0) {
            lo = d;
            t_lo += dt;
            p_lo = pt;
        } else {
            hi = d;
            dark_hi = false;
        }
        if (isfinite(dt) && fabs(f) <= 1e-14 * t30_h) {
            *p30 = pt;
            *d30 = d;
            return LW_OK;
        }
        if (hi - lo <= 4.0 * DBL_EPSILON * fmax(1.0, hi)) {
            if (dark_hi)
                return LW_OK; /* dark before 30 s: the switch-on point stands in */
            *p30 = isfinite(dt) && f >= 0.0 ? pt : p_lo;
            *d30 = p30->depth;
            return LW_OK;
        }
        if (isfinite(dt) && f < 0.0 && d >= end)
            return LW_OK; /* empty before 30 s */
        double next = isfinite(dt) ? d - f / pt.dtdd_h : NAN;
        d = next > lo && next < hi ? next : 0.5 * (lo + hi);
    }
    return lw_error_set(e->err, LW_ENUMERIC, NULL, 0,
                        "the point 30 s after switch-on was not found in %d steps",
                        LW_T30_ITER_MAX);
}

/* Which events the light has (before the 30-s point is sought: its hours
 * are split at the kinks among them); init_events sets them going. */
static void init_kinds(engine *e)
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
    e->active[EV_EFFICIENCY] = l->drive.type == LW_DRIVE_CONVERTER && l->drive.efficiency;
    /* a body at its balance under foldback: the factor's corners are kinks */
    e->active[EV_FOLDBACK] = lw_thermal_has_foldback(&l->thermal);
    if (c->peukert > 1.0) {
        e->kink_a = c->rated_a * pow(c->capacity_ah / c->max_capacity_ah, 1.0 / (c->peukert - 1.0));
        e->active[EV_PEUKERT] = true;
    }
}

static void init_events(engine *e, const lw_point *p0)
{
    for (int k = 0; k < NEV; k++)
        if (is_band(k) && e->active[k])
            band_set(e, k, band_value(k, p0));
    for (int k = 0; k < NEV; k++)
        e->positive[k] = event_g(e, k, p0) > 0.0;
    e->n_watch = 0;
    for (int k = 0; k < NEV; k++)
        if (e->active[k] && k != EV_DROPOUT)
            e->watch[e->n_watch++] = k;
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
        lw_status st = run_interval(e, a, b, &pa);
        if (st != LW_OK)
            return st;
        a = b;
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
                .d0 = 0.0};
    lw_point p0, p30;
    double d30;
    init_kinds(&f);
    lw_status st = start_point(&f, &p0);
    p30 = p0;
    if (st == LW_OK && p0.flux_lm > 0.0 && isfinite(p0.dtdd_h))
        st = point_at_30s(&f, &p0, &p30, &d30);
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
    note_point(e, p0);
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
    init_kinds(e);
    st = point_at_30s(e, p0, &p30, &res->depth_30s);
    if (st != LW_OK)
        return st;
    if (lit(&p30))
        note_point(e, &p30);
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
        opt->event_iter_max < 10 || opt->event_iter_max > 10000 || opt->max_solves < 10)
        return lw_error_set(err, LW_EINPUT, NULL, 0,
                            "run options: rtol must be 1e-14 to 1e-3, max_halvings 0 to 60, "
                            "start_depth 0 to 1, visible_lm >= 0, event_tol 1e-16 to 1e-6, "
                            "event_iter_max 10 to 10000, max_solves >= 10");
    res->time_to_half_h = NAN;
    res->flux_30s_lm = res->flux_ref_lm = NAN;
    res->junction_30s_c = res->peak_junction_c = res->peak_body_c = res->peak_body_h = NAN;
    res->min_weak_cell_v = INFINITY;
    engine e = {.l = light, .opt = opt, .res = res, .err = err, .seg = SIZE_MAX};
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

lw_status lw_run_hours_between(const lw_light *light, bool fallback, double d0, double d1,
                               double *hours, lw_error *err)
{
    lw_run_options opt = lw_run_options_default();
    lw_result scratch = {0};
    engine e = {.l = light, .opt = &opt, .res = &scratch, .err = err, .seg = SIZE_MAX,
                .fallback = fallback};
    lw_point p0, p1;
    lw_status st = eval(&e, d0, &p0);
    if (st == LW_OK)
        st = eval(&e, d1, &p1);
    span_sum sum = {false, {0}};
    if (st == LW_OK && d1 > d0)
        st = span(&e, d0, &p0, d1, &p1, &sum);
    if (st == LW_OK)
        *hours = sum.k[Q_T];
    return st;
}
