/*
 * random.h - reproducible random numbers for the Monte Carlo study.
 *
 * Owns: lw_rng, the xoshiro256** generator (D. Blackman and S. Vigna,
 * "Scrambled linear pseudorandom number generators", ACM Transactions on
 * Mathematical Software 47(4), 2021), each stream seeded by SplitMix64
 * (G. L. Steele, D. Lea and C. H. Flood, "Fast splittable pseudorandom
 * number generators", OOPSLA 2014), as its authors advise; and the standard
 * normal quantile, by Halley's iteration on C99 erfc from the start of
 * M. Abramowitz and I. A. Stegun, "Handbook of Mathematical Functions"
 * (1964), formula 26.2.23 (|error| < 4.5e-4), to full double precision.
 *
 * A stream is a pure function of (seed, index): sample i of a study draws
 * from stream i, so its values are the same whichever thread runs it.
 * Unitless.
 */
#ifndef LW_RANDOM_H
#define LW_RANDOM_H

/* layer 1, base (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 1
#error "base-layer header included from a lower layer"
#endif

#include <stdint.h>

typedef struct lw_rng {
    uint64_t s[4];
} lw_rng;

/* Stream `index` of `seed`: its four state words are SplitMix64 outputs
 * 4 index .. 4 index + 3 from seed (never all zero). */
void lw_rng_seed(lw_rng *r, uint64_t seed, uint64_t index);

/* The next 64 random bits. */
uint64_t lw_rng_next(lw_rng *r);

/* A uniform number in the open interval (0, 1): the top 53 bits, offset by
 * half a step, so that neither end occurs (an inverse distribution function
 * may take it). */
double lw_rng_uniform(lw_rng *r);

/* The standard normal quantile Phi^-1(p) for 0 < p < 1 (-INFINITY at 0,
 * +INFINITY at 1, NAN outside), relative error a few ulps. */
double lw_normal_quantile(double p);

/* The standard normal distribution function Phi(x), through erfc. */
double lw_normal_cdf(double x);

/* ---- Sobol points ----
 * The Sobol sequence in up to LW_SOBOL_DIMS dimensions (I. M. Sobol',
 * USSR Comput. Math. Math. Phys. 7(4), 1967), with the primitive
 * polynomials and initial direction numbers of S. Joe and F. Y. Kuo,
 * "Constructing Sobol sequences with better two-dimensional projections",
 * SIAM J. Sci. Comput. 30(5), 2008 (their table new-joe-kuo-6.21201,
 * dimensions 2 to 16; dimension 1 is van der Corput's), point i taken in
 * Gray-code order (A. Antonov and V. Saleev, 1979) from i alone, so any
 * thread may compute any point.  32-bit direction numbers: 2^32 points. */
#define LW_SOBOL_DIMS 16
#define LW_SOBOL_BITS 32

typedef struct lw_sobol {
    uint32_t v[LW_SOBOL_DIMS][LW_SOBOL_BITS]; /* direction numbers, bit k = 2^-(k+1) */
} lw_sobol;

void lw_sobol_init(lw_sobol *s);

/* Point `index` in dims (<= LW_SOBOL_DIMS) dimensions, each in [0, 1). */
void lw_sobol_point(const lw_sobol *s, uint32_t index, int dims, double *u);

#endif
