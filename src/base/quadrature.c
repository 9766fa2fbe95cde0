/*
 * quadrature.c - fixed rules on [-1, 1], Legendre series and the error
 * estimate from their decay (see quadrature.h; tables in quadtab.c).
 */
#include "lampwick/quadrature.h"

#include <math.h>
#include <stddef.h>

const lw_quad_rule *lw_quad_gauss(int n)
{
    n = n < 1 ? 1 : (n > LW_QUAD_GAUSS_MAX ? LW_QUAD_GAUSS_MAX : n);
    return &lw_quad_gauss_rules[n];
}

const lw_quad_rule *lw_quad_lobatto(int n)
{
    n = n < 3 ? 3 : (n > LW_QUAD_LOBATTO_MAX ? LW_QUAD_LOBATTO_MAX : n);
    return &lw_quad_lobatto_rules[n];
}

static bool is_lobatto(const lw_quad_rule *rule)
{
    return rule->n >= 3 && rule->x[0] == -1.0;
}

int lw_quad_degree(const lw_quad_rule *rule)
{
    return is_lobatto(rule) ? 2 * rule->n - 3 : 2 * rule->n - 1;
}

double lw_quad_sum(const lw_quad_rule *rule, const double *f, int stride)
{
    double s = 0.0;
    for (int j = 0; j < rule->n; j++)
        s += rule->w[j] * f[(ptrdiff_t)j * stride];
    return s;
}

void lw_quad_legendre_many(const lw_quad_rule *rule, const double *f, int m, double *a,
                           double *sum)
{
    const int n = rule->n;
    for (int i = 0; i < m; i++)
        sum[i] = 0.0;
    for (ptrdiff_t k = 0; k < (ptrdiff_t)n * m; k++)
        a[k] = 0.0;
    for (int j = 0; j < n; j++) {
        const double *fj = f + (ptrdiff_t)j * m, w = rule->w[j];
        for (int i = 0; i < m; i++)
            sum[i] += w * fj[i];
        for (int k = 0; k < n; k++) {
            const double c = rule->c[(ptrdiff_t)k * n + j];
            double *ak = a + (ptrdiff_t)k * m;
            for (int i = 0; i < m; i++)
                ak[i] += c * fj[i];
        }
    }
}

void lw_quad_legendre(const lw_quad_rule *rule, const double *f, int stride, double *a)
{
    const int n = rule->n;
    for (int k = 0; k < n; k++) {
        const double *row = rule->c + (ptrdiff_t)k * n;
        double s = 0.0;
        for (int j = 0; j < n; j++)
            s += row[j] * f[(ptrdiff_t)j * stride];
        a[k] = s;
    }
}

/* The most nodes of any rule in the tables. */
#define RULE_NODES_MAX LW_QUAD_LOBATTO_MAX
_Static_assert(LW_QUAD_GAUSS_MAX <= RULE_NODES_MAX, "the envelope holds every rule's");

lw_quad_estimate lw_quad_estimate_error(const lw_quad_rule *rule, const double *a, double noise)
{
    const int n = rule->n < RULE_NODES_MAX ? rule->n : RULE_NODES_MAX;
    lw_quad_estimate est = {0.0, 1.0, 0.0, 0.0};
    for (int k = 0; k < n; k++)
        if (!isfinite(a[k])) {
            est.error = est.tail = est.beyond = INFINITY;
            return est;
        }
    /* the envelope from the right, E_k = max_{j >= k} |a_j| (noise as zero),
     * k >= 1 */
    double env[RULE_NODES_MAX] = {0};
    double m = 0.0;
    for (int k = n - 1; k >= 1; k--) {
        double v = fabs(a[k]);
        m = v > noise && v > m ? v : m;
        env[k] = m;
    }
    const int kt = n - 2; /* the tail: the last two coefficients' larger */
    if (kt < 1) {
        est.tail = est.beyond = n > 1 ? env[1] : 0.0;
        est.error = LW_QUAD_SAFETY * est.tail;
        return est;
    }
    est.tail = env[kt];
    if (est.tail == 0.0) { /* a polynomial the rule integrates, to rounding */
        est.rate = 0.0;
        return est;
    }
    /* the fall per degree: the mean fall over two degrees, the slowest of
     * the last two such (a decay that slows is believed at its slowest; a
     * coefficient that is small by accident, an extremum at the middle of
     * the piece, is covered by the envelope of the next); four and five
     * nodes read it up to the last coefficient, three have one step */
    double rate;
    if (kt >= 4)
        rate = sqrt(fmax(env[kt] / env[kt - 2], env[kt - 1] / env[kt - 3]));
    else if (kt == 3)
        rate = sqrt(fmax(env[3] / env[1], env[4] / env[2]));
    else if (kt == 2)
        rate = fmax(fmax(env[2] / env[1], sqrt(env[3] / env[1])), env[3] / env[2]);
    else /* kt 1 (three nodes: E_2 = |a_2|) */
        rate = env[2] / env[1];
    return lw_quad_estimate_at(rule, a, noise, est.tail, rate < 1.0 ? rate : 1.0);
}

lw_quad_estimate lw_quad_estimate_at(const lw_quad_rule *rule, const double *a, double noise,
                                     double tail, double rate)
{
    const int n = rule->n;
    lw_quad_estimate est = {0.0, rate, tail, 0.0};
    if (tail == 0.0) {
        est.rate = 0.0;
        return est;
    }
    /* the first coefficient past the polynomial: two falls past E_{n-2}, or
     * one past a[n-1] */
    double one = fabs(a[n - 1]) * rate, two = tail * rate * rate;
    est.beyond = one > two ? one : two;
    if (n < 3 || rate >= LW_QUAD_RATE_MAX) {
        est.error = LW_QUAD_SAFETY * tail;
        est.beyond = tail;
        return est;
    }
    int reach = lw_quad_degree(rule) + 1 - (n - 2);
    double fall = 1.0;
    for (int k = 0; k < reach; k++)
        fall *= rate;
    est.error = LW_QUAD_SAFETY * tail * fall;
    if (est.error < noise)
        est.error = 0.0;
    return est;
}

/* P_k(x) and P_k'(x) for k = 0 .. n-1 by the three-term recurrences
 * (k + 1) P_{k+1} = (2k + 1) x P_k - k P_{k-1} and
 * P'_{k+1} = P'_{k-1} + (2k + 1) P_k (Abramowitz and Stegun 22.7.10, 22.8.5). */
double lw_legendre_eval(const double *a, int n, double x, double *dp)
{
    double p0 = 1.0, p1 = x, d0 = 0.0, d1 = 1.0;
    double s = n > 0 ? a[0] : 0.0, ds = 0.0;
    if (n > 1) {
        s += a[1] * x;
        ds += a[1];
    }
    for (int k = 1; k + 1 < n; k++) {
        double p2 = ((2 * k + 1) * x * p1 - k * p0) / (k + 1);
        double d2 = d0 + (2 * k + 1) * p1;
        s += a[k + 1] * p2;
        ds += a[k + 1] * d2;
        p0 = p1, p1 = p2, d0 = d1, d1 = d2;
    }
    if (dp)
        *dp = ds;
    return s;
}

/* The integral from -1 to x of P_k is (P_{k+1}(x) - P_{k-1}(x)) / (2k + 1)
 * for k >= 1 (Abramowitz and Stegun 22.13.1 with 22.7.10), and x + 1 for
 * k = 0. */
double lw_legendre_integral(const double *a, int n, double x)
{
    if (n <= 0)
        return 0.0;
    double pm = 1.0, p = x; /* P_{k-1}, P_k */
    double s = a[0] * (x + 1.0);
    for (int k = 1; k < n; k++) {
        double pn = ((2 * k + 1) * x * p - k * pm) / (k + 1);
        s += a[k] * (pn - pm) / (2 * k + 1);
        pm = p, p = pn;
    }
    return s;
}

/* The most Newton-or-bisection steps of a root: bisection alone halves a
 * bracket of width 2 to below 1e-16 in 55. */
#define LEGENDRE_ROOT_ITER_MAX 100

bool lw_legendre_root(const double *a, int n, double level, double lo, double hi, double *root)
{
    double flo = lw_legendre_eval(a, n, lo, NULL) - level;
    double fhi = lw_legendre_eval(a, n, hi, NULL) - level;
    if (!(flo * fhi <= 0.0))
        return false;
    if (flo == 0.0 || fhi == 0.0) {
        *root = flo == 0.0 ? lo : hi;
        return true;
    }
    double x = lo - flo * (hi - lo) / (fhi - flo);
    for (int it = 0; it < LEGENDRE_ROOT_ITER_MAX; it++) {
        double d, f = lw_legendre_eval(a, n, x, &d) - level;
        if (f == 0.0)
            break;
        if ((f < 0.0) == (flo < 0.0))
            lo = x, flo = f;
        else
            hi = x;
        double next = d != 0.0 ? x - f / d : 0.5 * (lo + hi);
        /* converged: judged before the bracket, of which x is now an end */
        if (fabs(next - x) <= 4e-16 * (1.0 + fabs(x)) || hi - lo <= 4e-16) {
            x = next > lo && next < hi ? next : x;
            break;
        }
        x = next > lo && next < hi ? next : 0.5 * (lo + hi);
    }
    *root = x;
    return true;
}
