/*
 * random.c - xoshiro256**, SplitMix64 seeding and the normal quantile
 * (sources in random.h).  Unitless.
 */
#include "lampwick/random.h"

#include <math.h>

/* SplitMix64 from state x: the output for state x + gamma (Steele, Lea and
 * Flood 2014, the constants of their reference). */
static uint64_t splitmix64(uint64_t x)
{
    uint64_t z = x + 0x9e3779b97f4a7c15u;
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9u;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebu;
    return z ^ (z >> 31);
}

void lw_rng_seed(lw_rng *r, uint64_t seed, uint64_t index)
{
    for (uint64_t k = 0; k < 4; k++)
        r->s[k] = splitmix64(seed + (4 * index + k) * 0x9e3779b97f4a7c15u);
    if (!(r->s[0] | r->s[1] | r->s[2] | r->s[3]))
        r->s[0] = 1; /* the one state xoshiro cannot leave */
}

static uint64_t rotl(uint64_t x, int k)
{
    return (x << k) | (x >> (64 - k));
}

uint64_t lw_rng_next(lw_rng *r)
{
    uint64_t *s = r->s;
    const uint64_t result = rotl(s[1] * 5, 7) * 9;
    const uint64_t t = s[1] << 17;
    s[2] ^= s[0];
    s[3] ^= s[1];
    s[1] ^= s[2];
    s[0] ^= s[3];
    s[2] ^= t;
    s[3] = rotl(s[3], 45);
    return result;
}

double lw_rng_uniform(lw_rng *r)
{
    return ((double)(lw_rng_next(r) >> 11) + 0.5) * 0x1.0p-53;
}

double lw_normal_cdf(double x)
{
    return 0.5 * erfc(-x / sqrt(2.0));
}

/* Halley steps on the tail nearer p (so the residual keeps its relative
 * accuracy far out): x < 0 solves Phi(x) = p, by symmetry the upper tail. */
#define NORMAL_HALLEY_STEPS 4
#define SQRT_2PI 2.50662827463100050242 /* sqrt(2 pi) */
double lw_normal_quantile(double p)
{
    if (!(p >= 0.0 && p <= 1.0))
        return NAN;
    if (p == 0.0)
        return -INFINITY;
    if (p == 1.0)
        return INFINITY;
    const double q = p < 0.5 ? p : 1.0 - p; /* the smaller tail (1 - p is exact above 0.5) */
    double sign = p < 0.5 ? -1.0 : 1.0;
    if (p == 0.5)
        return 0.0;
    /* Abramowitz and Stegun 26.2.23: x_q with Q(x_q) = q, for 0 < q <= 0.5 */
    double t = sqrt(-2.0 * log(q));
    double x = t - (2.515517 + t * (0.802853 + t * 0.010328)) /
                       (1.0 + t * (1.432788 + t * (0.189269 + t * 0.001308)));
    for (int k = 0; k < NORMAL_HALLEY_STEPS; k++) {
        /* f(x) = Q(x) - q, Q(x) = erfc(x / sqrt 2) / 2; f' = -phi, f'' = x phi */
        double phi = exp(-0.5 * x * x) / SQRT_2PI;
        /* near the middle 0.5 - q is exact (q >= 0.25) and erf keeps its
         * relative accuracy at small x: x keeps it too */
        double f = q >= 0.25 ? (0.5 - q) - 0.5 * erf(x / sqrt(2.0))
                             : 0.5 * erfc(x / sqrt(2.0)) - q;
        if (!(phi > 0.0))
            break;
        double u = f / phi;              /* -f / f' */
        double step = u / (1.0 - 0.5 * x * u); /* Halley: u / (1 + u f'' / (2 f')) */
        x += step;
        if (fabs(step) <= 2e-16 * fabs(x))
            break;
    }
    return sign * x;
}

/* ---- Sobol points ---- */

/* Joe and Kuo (2008), new-joe-kuo-6.21201, dimensions 2 to 16: the degree s
 * of the primitive polynomial, its inner coefficients a (bits a_1 ..
 * a_{s-1}, most significant first) and the initial direction numbers m_1 ..
 * m_s (odd, m_k < 2^k). */
static const struct {
    int s;
    unsigned a;
    unsigned m[6];
} joe_kuo[LW_SOBOL_DIMS - 1] = {
    {1, 0, {1}},
    {2, 1, {1, 3}},
    {3, 1, {1, 3, 1}},
    {3, 2, {1, 1, 1}},
    {4, 1, {1, 1, 3, 3}},
    {4, 4, {1, 3, 5, 13}},
    {5, 2, {1, 1, 5, 5, 17}},
    {5, 4, {1, 1, 5, 5, 5}},
    {5, 7, {1, 1, 7, 11, 19}},
    {5, 11, {1, 1, 5, 1, 1}},
    {5, 13, {1, 1, 1, 3, 11}},
    {5, 14, {1, 3, 5, 5, 31}},
    {6, 1, {1, 3, 3, 9, 7, 49}},
    {6, 13, {1, 1, 1, 15, 21, 21}},
    {6, 16, {1, 3, 1, 13, 27, 49}},
};

void lw_sobol_init(lw_sobol *sb)
{
    for (int k = 0; k < LW_SOBOL_BITS; k++)
        sb->v[0][k] = 1u << (LW_SOBOL_BITS - 1 - k);
    for (int j = 1; j < LW_SOBOL_DIMS; j++) {
        const int s = joe_kuo[j - 1].s;
        const unsigned a = joe_kuo[j - 1].a;
        uint32_t *v = sb->v[j];
        for (int k = 0; k < s; k++)
            v[k] = (uint32_t)joe_kuo[j - 1].m[k] << (LW_SOBOL_BITS - 1 - k);
        /* the recurrence of the primitive polynomial (Bratley and Fox, ACM
         * TOMS 14(1), 1988, algorithm 659) */
        for (int k = s; k < LW_SOBOL_BITS; k++) {
            uint32_t x = v[k - s] ^ (v[k - s] >> s);
            for (int l = 1; l < s; l++)
                if ((a >> (s - 1 - l)) & 1u)
                    x ^= v[k - l];
            v[k] = x;
        }
    }
}

void lw_sobol_point(const lw_sobol *sb, uint32_t index, int dims, double *u)
{
    const uint32_t gray = index ^ (index >> 1);
    for (int j = 0; j < dims && j < LW_SOBOL_DIMS; j++) {
        uint32_t x = 0;
        for (int k = 0; k < LW_SOBOL_BITS; k++)
            if ((gray >> k) & 1u)
                x ^= sb->v[j][k];
        u[j] = (double)x * 0x1.0p-32;
    }
}
