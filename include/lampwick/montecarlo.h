/*
 * montecarlo.h - the spread of a design over the units shipped: sampled
 * part and use variations, their runs, and what the runs say.
 *
 * Owns: lw_mc_key (one spread key and its distribution), lw_mc_run (N
 * sampled units of a profile, each a full discharge), lw_mc_summary
 * (moments and percentiles of each quantity with the percentiles'
 * distribution-free intervals), targets and yields with Wilson intervals,
 * the share of units breaking each rating, and the ranking of the keys by
 * standardized rank regression (stats.h).
 *
 * Distributions, written `KEY = FORM` in a profile's [spread] section or
 * `--spread KEY=FORM`:
 *   normal SIGMA        mean the profile's value, SIGMA in the key's unit
 *   normal SIGMA%       SIGMA as a share of the profile's value
 *   uniform LOW..HIGH   flat between two values
 *   tolerance PCT       flat within +-PCT % of the profile's value: the usual
 *                       reading of a part tolerance when nothing more is
 *                       known (common practice, no source); write `normal`
 *                       when the maker states a sigma
 *   bin A,B,C           one of the values, equally likely; A:W,B:W weighted
 * A value the key's range refuses is never drawn: normal is truncated to
 * the range (sampled by its inverse distribution between the range's
 * probabilities), uniform and tolerance are cut to it; bins must lie in it.
 *
 * Sample i draws from random stream (seed, i) (random.h), or with
 * opt.sobol takes Sobol point i, so a seed gives the same units, byte for
 * byte, on any number of threads.  Measured on the demo lantern (docs/
 * spread.md), shifted Sobol points estimate the mean runtime with about a
 * tenth of the error of random ones at 1,024 to 4,096 units and the 5th
 * percentile with 0.36-0.45 of it; random units give the intervals.  Values are in
 * the keys' file units; quantities in the units of `run --format csv`.
 */
#ifndef LW_MONTECARLO_H
#define LW_MONTECARLO_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include <stdint.h>
#include "batch.h"
#include "vary.h"

#define LW_MC_KEYS_MAX LW_PROFILE_OVERRIDES_MAX
#define LW_MC_BINS_MAX 64
#define LW_MC_SAMPLES_MAX 10000000
#define LW_MC_TARGETS_MAX 8
/* The default number of samples: the 1st and 99th percentiles then rest on
 * about 100 units each side, their 95 % intervals about +-2 percentile
 * ranks wide (lw_stats_order_ranks at n = 10,000, p = 0.01: ranks 81..120). */
#define LW_MC_SAMPLES_DEFAULT 10000

typedef enum lw_mc_dist { LW_MC_NORMAL, LW_MC_UNIFORM, LW_MC_TOLERANCE, LW_MC_BIN } lw_mc_dist;

/* "normal", "uniform", "tolerance", "bin". */
extern const char *const lw_mc_dist_names[];

typedef struct lw_mc_key {
    char key[2 * LW_INI_NAME_MAX]; /* "section.key" */
    char form[LW_VARY_VALUE_MAX];  /* the distribution as written */
    char file[LW_PATH_MAX];        /* where it was given ("--spread" for an option) */
    int line;
    lw_mc_dist dist;
    double nominal;                /* the profile's value, file unit */
    double sigma;                  /* normal: file unit */
    double lo, hi;                 /* the range drawn from, cut to the key's */
    double p_lo, p_hi;             /* normal: Phi at the cut range's ends */
    double bins[LW_MC_BINS_MAX], cum[LW_MC_BINS_MAX]; /* bin: values, cumulative weights */
    size_t nbins;
} lw_mc_key;

/* Parse KEY's FORM against the profile (its value and the key's range);
 * messages name file:line and the key. */
LW_MUST_CHECK lw_status lw_mc_key_parse(const lw_profile *prof, const char *key,
                                        const char *form, const char *file, int line,
                                        lw_mc_key *out, lw_error *err);

/* The keys of the profile's [spread] section, in file order. */
LW_MUST_CHECK lw_status lw_mc_keys_of_profile(const lw_profile *prof, lw_mc_key *keys,
                                              size_t *n, lw_error *err);

/* Draw one value of k from uniform u in (0, 1) (inverse distribution). */
double lw_mc_draw(const lw_mc_key *k, double u);

/* The quantities of each unit, named as in `run --format csv`. */
typedef enum lw_mc_quantity {
    LW_MC_RUNTIME, LW_MC_FLUX30, LW_MC_LUMEN_HOURS, LW_MC_HALF, LW_MC_LED_MA,
    LW_MC_RESISTOR_W, LW_MC_JUNCTION_C, LW_MC_QCOUNT
} lw_mc_quantity;
extern const char *const lw_mc_quantity_names[LW_MC_QCOUNT + 1];
/* In words with the unit, for charts: "runtime (h)". */
extern const char *const lw_mc_quantity_words[LW_MC_QCOUNT];

/* The value of quantity q of a run (NAN where the run has none: a light
 * that never falls to half). */
double lw_mc_quantity_of(lw_mc_quantity q, const lw_result *r);

typedef struct lw_mc_options {
    size_t samples;      /* N >= 2 */
    uint64_t seed;
    int threads;         /* <= 0: all cores */
    bool sobol;          /* quasi-random: Sobol points (random.h) shifted modulo 1 by
                            a uniform vector of the seed's (R. Cranley and T. N. L.
                            Patterson, SIAM J. Numer. Anal. 13(6), 1976); the units
                            are then not independent and no interval holds */
} lw_mc_options;

typedef struct lw_mc_result {
    size_t n, nkeys;
    double *x;           /* [nkeys][n] the drawn values, file units */
    double *y;           /* [LW_MC_QCOUNT][n] the quantities */
    unsigned *warnings;  /* [n] LW_WARN_* of each unit's run */
    double nominal[LW_MC_QCOUNT];
    unsigned nominal_warnings;
} lw_mc_result;

/* Run N sampled units of base (its mode and --set already applied).  A unit
 * whose run fails stops the study with that unit's error, the lowest such
 * unit whatever the threads, naming its sample and drawn values.  Free with
 * lw_mc_result_clear. */
LW_MUST_CHECK lw_status lw_mc_run(const lw_profile *base, const lw_mc_key *keys, size_t nkeys,
                                  const lw_mc_options *opt, lw_pool_progress_fn progress,
                                  void *progress_ctx, lw_mc_result *out, lw_error *err);
void lw_mc_result_clear(lw_mc_result *r);

/* The percentiles reported, with the confidence of their intervals. */
#define LW_MC_NPCT 5
extern const double lw_mc_percentiles[LW_MC_NPCT]; /* 0.01 0.05 0.50 0.95 0.99 */
#define LW_MC_CONFIDENCE 0.95
#define LW_MC_Z95 1.959963984540054 /* Phi^-1(0.975) */

typedef struct lw_mc_summary {
    double nominal, mean, sd;
    double pct[LW_MC_NPCT];
    double pct_lo[LW_MC_NPCT], pct_hi[LW_MC_NPCT]; /* NAN: no bound at this N */
    size_t n_finite;     /* units with a value (time to half: those that halve) */
} lw_mc_summary;

/* Summarise quantity q over the units that have it (NAN values left out;
 * n_finite says how many).  LW_ENOMEM only. */
LW_MUST_CHECK lw_status lw_mc_summarise(const lw_mc_result *r, lw_mc_quantity q,
                                        lw_mc_summary *s, lw_error *err);

/* A target "QUANTITY>=VALUE" (or >, <=, <). */
typedef struct lw_mc_target {
    lw_mc_quantity q;
    int op;              /* '>' '<' 'G' (>=) 'L' (<=) */
    double value;
    char text[64];
} lw_mc_target;

LW_MUST_CHECK lw_status lw_mc_target_parse(const char *text, lw_mc_target *t, lw_error *err);

/* Whether unit i meets t (a missing value never does). */
bool lw_mc_meets(const lw_mc_result *r, size_t i, const lw_mc_target *t);

/* Units meeting every target of t[nt], with Wilson's 95 % interval. */
void lw_mc_yield(const lw_mc_result *r, const lw_mc_target *t, size_t nt, size_t *k, double *lo,
                 double *hi);

/* The keys ranked for quantity q: beta[j] (standardized rank regression
 * coefficient), its standard error, and the regression's r2; the share of
 * the variance of q's ranks key j explains is beta[j]^2 (independent keys). */
LW_MUST_CHECK lw_status lw_mc_rank(const lw_mc_result *r, lw_mc_quantity q, double *beta,
                                   double *se, double *r2, lw_error *err);

#endif
