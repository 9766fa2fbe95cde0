/*
 * test_montecarlo.c - the spread study and what it stands on: the random
 * streams, the normal quantile, percentiles and their order-statistic
 * intervals, Wilson's interval and the rank regression, each against GSL
 * or a published formula; and the study on the bundled demo profile
 * against runs of the same light at the matching part values; the corners
 * of an ambient range against plain runs at its ends.
 */
#include "testutil.h"

#include <gsl/gsl_cdf.h>
#include <gsl/gsl_multifit.h>
#include <gsl/gsl_qrng.h>
#include <gsl/gsl_statistics_double.h>
#include <stdlib.h>
#include <lampwick/lampwick.h>

/* The normal quantile against GSL's gsl_cdf_ugaussian_Pinv and
 * gsl_cdf_ugaussian_Qinv (the upper tail, where 1 - p loses digits). */
static void normal_quantile_against_gsl(void **state)
{
    (void)state;
    const double ps[] = {1e-300, 1e-100, 1e-20, 1e-10, 1e-5, 0.001, 0.01,  0.025, 0.1,
                         0.3,    0.4999, 0.5,   0.6,   0.9,  0.975, 0.99, 0.999999};
    for (size_t i = 0; i < sizeof ps / sizeof ps[0]; i++) {
        double want = gsl_cdf_ugaussian_Pinv(ps[i]);
        if (want == 0.0)
            assert_near(lw_normal_quantile(ps[i]), 0.0, 1e-300);
        else
            assert_close(lw_normal_quantile(ps[i]), want, 1e-13);
        /* the distribution function back: GSL gsl_cdf_ugaussian_P, to the
         * conditioning of Phi far out (a relative change eps in x moves Phi
         * by about x^2 eps) */
        assert_close(lw_normal_cdf(want), gsl_cdf_ugaussian_P(want), 4e-15 * (4.0 + want * want));
    }
    assert_true(isinf(lw_normal_quantile(0.0)) && lw_normal_quantile(0.0) < 0);
    assert_true(isinf(lw_normal_quantile(1.0)) && lw_normal_quantile(1.0) > 0);
    assert_true(isnan(lw_normal_quantile(1.5)));
}

/* 10^6 uniforms in 100 bins: Pearson's chi-square below GSL's 0.9999
 * quantile of chi-square with 99 degrees of freedom (a fixed seed, so the
 * check cannot flicker; a broken generator or a biased conversion fails
 * it by orders of magnitude).  Every value lies strictly inside (0, 1). */
static void uniform_streams(void **state)
{
    (void)state;
    enum { N = 1000000, BINS = 100 };
    static size_t count[BINS];
    memset(count, 0, sizeof count);
    lw_rng r;
    for (size_t s = 0; s < N / 1000; s++) {
        lw_rng_seed(&r, 42, s); /* many short streams, as the study draws them */
        for (int i = 0; i < 1000; i++) {
            double u = lw_rng_uniform(&r);
            assert_true(u > 0.0 && u < 1.0);
            count[(size_t)(u * BINS)]++;
        }
    }
    double chi2 = 0.0, e = (double)N / BINS;
    for (int b = 0; b < BINS; b++)
        chi2 += ((double)count[b] - e) * ((double)count[b] - e) / e;
    assert_true(chi2 < gsl_cdf_chisq_Pinv(0.9999, BINS - 1));
    /* streams are pure functions of (seed, index) */
    lw_rng a, b;
    lw_rng_seed(&a, 7, 123);
    lw_rng_seed(&b, 7, 123);
    for (int i = 0; i < 10; i++)
        assert_true(lw_rng_next(&a) == lw_rng_next(&b));
    lw_rng_seed(&b, 7, 124);
    assert_true(lw_rng_next(&a) != lw_rng_next(&b));
}

/* Normal samples by the inverse distribution: the sample mean within
 * 3.29 sigma / sqrt(n) of 0 (the two-sided 99.9 % limit of the mean,
 * any statistics text), and (n - 1) s^2 between GSL's chi-square 0.0005
 * and 0.9995 quantiles (the variance's confidence limits). */
static void normal_sample_moments(void **state)
{
    (void)state;
    enum { N = 200000 };
    double *x = malloc(N * sizeof *x);
    assert_non_null(x);
    lw_rng r;
    lw_rng_seed(&r, 2026, 0);
    for (int i = 0; i < N; i++)
        x[i] = lw_normal_quantile(lw_rng_uniform(&r));
    double mean, sd;
    lw_stats_moments(x, N, &mean, &sd);
    assert_true(fabs(mean) < 3.2905 / sqrt((double)N));
    double q = (N - 1) * sd * sd;
    assert_true(q > gsl_cdf_chisq_Pinv(0.0005, N - 1) && q < gsl_cdf_chisq_Pinv(0.9995, N - 1));
    /* and the moments themselves against GSL's */
    assert_close(mean + 1.0, gsl_stats_mean(x, 1, N) + 1.0, 1e-14);
    assert_close(sd, gsl_stats_sd(x, 1, N), 1e-12);
    /* percentiles: Hyndman-Fan definition 7 is GSL's gsl_stats_quantile_from_sorted_data */
    lw_stats_sort(x, N);
    for (double p = 0.0; p <= 1.0; p += 0.01)
        assert_close(lw_stats_percentile(x, N, p) + 10.0,
                     gsl_stats_quantile_from_sorted_data(x, 1, N, p) + 10.0, 1e-15);
    free(x);
}

/* Wilson's interval: the textbook form (E. B. Wilson, JASA 22, 1927;
 * written as in R. G. Newcombe, Statistics in Medicine 17, 1998, 857-872,
 * method 3) at known values, and Newcombe's worked example 81/263 at 95 %:
 * 0.2553 to 0.3662 (his table I; from memory, to the 4 places printed). */
static void wilson_interval(void **state)
{
    (void)state;
    const size_t ks[] = {0, 1, 5, 81, 50, 263, 999};
    const size_t ns[] = {10, 10, 40, 263, 100, 263, 1000};
    const double z = 1.959963984540054;
    for (size_t i = 0; i < sizeof ks / sizeof ks[0]; i++) {
        double n = (double)ns[i], p = (double)ks[i] / n, q = 1.0 - p;
        double lo_t = (2 * n * p + z * z - z * sqrt(z * z + 4 * n * p * q)) / (2 * (n + z * z));
        double hi_t = (2 * n * p + z * z + z * sqrt(z * z + 4 * n * p * q)) / (2 * (n + z * z));
        double lo, hi;
        lw_stats_wilson(ks[i], ns[i], z, &lo, &hi);
        assert_near(lo, fmax(0.0, lo_t), 1e-14);
        assert_near(hi, fmin(1.0, hi_t), 1e-14);
    }
    double lo, hi;
    lw_stats_wilson(81, 263, z, &lo, &hi);
    assert_near(lo, 0.2553, 0.00005);
    assert_near(hi, 0.3662, 0.00005);
}

/* The order statistics bounding a quantile: each tail at most (1 - conf)/2
 * and no tighter pair allowed, by GSL's binomial distribution functions. */
static void order_statistic_ranks(void **state)
{
    (void)state;
    const size_t ns[] = {20, 100, 1000, 10000, 100000};
    const double ps[] = {0.01, 0.05, 0.5, 0.95, 0.99};
    const double a = 0.025;
    for (size_t i = 0; i < sizeof ns / sizeof ns[0]; i++)
        for (size_t j = 0; j < sizeof ps / sizeof ps[0]; j++) {
            size_t n = ns[i], r, s;
            double p = ps[j];
            lw_stats_order_ranks(n, p, 0.95, &r, &s);
            assert_true(r < s);
            /* P(B <= r - 1) <= a, and r + 1 would break it */
            if (r >= 1) {
                assert_true(gsl_cdf_binomial_P((unsigned)(r - 1), p, (unsigned)n) <= a * (1 + 1e-9));
                assert_true(gsl_cdf_binomial_P((unsigned)r, p, (unsigned)n) > a * (1 - 1e-9));
            } else {
                assert_true(gsl_cdf_binomial_P(0, p, (unsigned)n) > a * (1 - 1e-9));
            }
            /* P(B >= s) <= a, and s - 1 would break it */
            if (s <= n) {
                assert_true(gsl_cdf_binomial_Q((unsigned)(s - 1), p, (unsigned)n) <= a * (1 + 1e-9));
                assert_true(gsl_cdf_binomial_Q((unsigned)(s - 2), p, (unsigned)n) > a * (1 - 1e-9));
            } else {
                assert_true(gsl_cdf_binomial_Q((unsigned)(n - 1), p, (unsigned)n) > a * (1 - 1e-9));
            }
        }
    /* n = 20: no 95 % lower bound for the 1st percentile, no upper for the 99th */
    size_t r, s;
    lw_stats_order_ranks(20, 0.01, 0.95, &r, &s);
    assert_int_equal(r, 0);
    lw_stats_order_ranks(20, 0.99, 0.95, &r, &s);
    assert_int_equal(s, 21);
}

/* Standardized rank regression against GSL's least squares
 * (gsl_multifit_linear) on the same standardized ranks; a quantity that
 * is a monotone function of one key alone has coefficient +-1 and r2 1. */
static void rank_regression(void **state)
{
    (void)state;
    enum { N = 3000, K = 3 };
    static double x[K][N], y[N], ry[N], rx[K][N];
    lw_rng r;
    lw_rng_seed(&r, 5, 0);
    for (int i = 0; i < N; i++) {
        for (int k = 0; k < K; k++)
            x[k][i] = lw_rng_uniform(&r);
        y[i] = exp(3.0 * x[0][i]) + 4.0 * x[1][i] - 0.5 * x[2][i] + 0.3 * lw_rng_uniform(&r);
    }
    const double *cols[K] = {x[0], x[1], x[2]};
    double beta[K], se[K], r2;
    lw_error err;
    lw_error_clear(&err);
    assert_int_equal(lw_stats_srrc(cols, K, y, N, beta, se, &r2, &err), LW_OK);
    /* GSL on ranks standardized here (mean 0, unit sum of squares) */
    assert_true(lw_stats_ranks(y, N, ry));
    gsl_matrix *X = gsl_matrix_alloc(N, K);
    gsl_vector *Y = gsl_vector_alloc(N), *B = gsl_vector_alloc(K);
    gsl_matrix *C = gsl_matrix_alloc(K, K);
    double *cols_std[K + 1];
    for (int k = 0; k <= K; k++) {
        double *c = k < K ? rx[k] : ry;
        if (k < K)
            assert_true(lw_stats_ranks(x[k], N, c));
        double m = gsl_stats_mean(c, 1, N), ss = 0.0;
        for (int i = 0; i < N; i++)
            c[i] -= m, ss += c[i] * c[i];
        for (int i = 0; i < N; i++)
            c[i] /= sqrt(ss);
        cols_std[k] = c;
    }
    for (int i = 0; i < N; i++) {
        for (int k = 0; k < K; k++)
            gsl_matrix_set(X, i, k, cols_std[k][i]);
        gsl_vector_set(Y, i, cols_std[K][i]);
    }
    double chisq;
    gsl_multifit_linear_workspace *w = gsl_multifit_linear_alloc(N, K);
    gsl_multifit_linear(X, Y, B, C, &chisq, w);
    for (int k = 0; k < K; k++) {
        assert_close(beta[k], gsl_vector_get(B, k), 1e-9);
        /* GSL's covariance is scaled by chisq / (N - K); ours by (1 - r2) / (N - K - 1):
         * with centred columns and no intercept these differ only in that degree */
        assert_close(se[k], sqrt(gsl_matrix_get(C, k, k) * (N - K) / (N - K - 1.0)), 1e-6);
    }
    assert_close(r2, 1.0 - chisq, 1e-9);
    assert_true(beta[0] > beta[1] && beta[1] > 0 && beta[2] < 0);
    gsl_multifit_linear_free(w);
    gsl_matrix_free(X);
    gsl_matrix_free(C);
    gsl_vector_free(Y);
    gsl_vector_free(B);
    /* one key: share 1 */
    for (int i = 0; i < N; i++)
        y[i] = -log(x[0][i]);
    assert_int_equal(lw_stats_srrc(cols, 1, y, N, beta, se, &r2, &err), LW_OK);
    assert_close(beta[0], -1.0, 1e-12);
    assert_close(r2, 1.0, 1e-12);
}

static void load_demo(lw_profile *p)
{
    lw_search s;
    memset(&s, 0, sizeof s);
    lw_search_add(&s, LW_SOURCE_ROOT "/cells");
    lw_error err;
    lw_error_clear(&err);
    if (lw_profile_load(LW_SOURCE_ROOT "/profiles/demo.ini", &s, p, &err) != LW_OK)
        fail_msg("%s:%d: %s", err.file, err.line, err.msg);
}

static double runtime_at(const lw_profile *base, const char *key, double v)
{
    lw_profile_variant var;
    memset(&var, 0, sizeof var);
    lw_error err;
    lw_error_clear(&err);
    assert_int_equal(lw_profile_variant_number(&var, key, v, &err), LW_OK);
    lw_profile p;
    assert_int_equal(lw_profile_derive(base, &var, "test", &p, &err), LW_OK);
    lw_result r;
    assert_int_equal(lw_run(&p.light, NULL, &r, &err), LW_OK);
    double h = r.runtime_h;
    lw_run_result_clear(&r);
    lw_profile_clear(&p);
    return h;
}

/* A single resistor tolerance, uniform within +-5 %: runtime is monotone in
 * the resistor, so the sampled p-th runtime percentile lies within its
 * order-statistic interval of the runtime at the resistor's p-quantile
 * (David and Nagaraja, "Order Statistics", section 7.1: the interval
 * covers the true quantile, and the true runtime quantile is the runtime
 * at the resistor's quantile).  The ranking gives the one key all the
 * share, and 1 and 2 threads give the same units bit for bit. */
static void resistor_tolerance_percentiles(void **state)
{
    (void)state;
    lw_profile prof;
    load_demo(&prof);
    lw_mc_key key;
    lw_error err;
    lw_error_clear(&err);
    assert_int_equal(lw_mc_key_parse(&prof, "drive.resistor_ohm", "tolerance 5", NULL, 0, &key,
                                     &err), LW_OK);
    const double r0 = key.nominal;
    assert_close(key.lo, 0.95 * r0, 1e-15);
    assert_close(key.hi, 1.05 * r0, 1e-15);
    lw_mc_options opt = {.samples = 2000, .seed = 11, .threads = 2};
    lw_mc_result res, res1;
    assert_int_equal(lw_mc_run(&prof, &key, 1, &opt, NULL, NULL, &res, &err), LW_OK);
    lw_mc_summary s;
    assert_int_equal(lw_mc_summarise(&res, LW_MC_RUNTIME, &s, &err), LW_OK);
    double up = runtime_at(&prof, "drive.resistor_ohm", 1.01 * r0);
    double down = runtime_at(&prof, "drive.resistor_ohm", 0.99 * r0);
    assert_true(up > down); /* a larger resistor runs longer: monotone */
    for (int k = 0; k < LW_MC_NPCT; k++) {
        double p = lw_mc_percentiles[k];
        double want = runtime_at(&prof, "drive.resistor_ohm", key.lo + p * (key.hi - key.lo));
        if (!isnan(s.pct_lo[k]))
            assert_true(s.pct_lo[k] <= want);
        if (!isnan(s.pct_hi[k]))
            assert_true(want <= s.pct_hi[k]);
    }
    assert_close(s.nominal, runtime_at(&prof, "drive.resistor_ohm", r0), 1e-15);
    /* one key: its share is 1 */
    double beta[1], se[1], r2;
    assert_int_equal(lw_mc_rank(&res, LW_MC_RUNTIME, beta, se, &r2, &err), LW_OK);
    assert_close(beta[0], 1.0, 1e-12);
    assert_close(r2, 1.0, 1e-12);
    /* the same seed on one thread: the same units, bit for bit */
    opt.threads = 1;
    assert_int_equal(lw_mc_run(&prof, &key, 1, &opt, NULL, NULL, &res1, &err), LW_OK);
    assert_memory_equal(res.x, res1.x, res.n * sizeof *res.x);
    assert_memory_equal(res.y, res1.y, LW_MC_QCOUNT * res.n * sizeof *res.y);
    lw_mc_result_clear(&res1);
    /* another seed: other units */
    opt.seed = 12;
    assert_int_equal(lw_mc_run(&prof, &key, 1, &opt, NULL, NULL, &res1, &err), LW_OK);
    assert_true(memcmp(res.x, res1.x, res.n * sizeof *res.x) != 0);
    lw_mc_result_clear(&res1);
    lw_mc_result_clear(&res);
    lw_profile_clear(&prof);
}

/* Distributions: truncation to the key's range, bins and their weights,
 * and refusals that name where the form was given. */
static void distributions(void **state)
{
    (void)state;
    lw_profile prof;
    load_demo(&prof);
    lw_mc_key k;
    lw_error err;
    lw_error_clear(&err);
    /* ambient -60..100 C: a normal of sigma 100 about 20 never leaves it */
    assert_int_equal(lw_mc_key_parse(&prof, "pack.ambient_c", "normal 100", "p.ini", 3, &k, &err),
                     LW_OK);
    lw_rng r;
    lw_rng_seed(&r, 1, 0);
    for (int i = 0; i < 10000; i++) {
        double v = lw_mc_draw(&k, lw_rng_uniform(&r));
        assert_true(v >= -60.0 && v <= 100.0);
    }
    /* the median of the truncated normal stays at the mean only if the cut is
     * symmetric; here the draw at u = 1/2 is Phi^-1 of the middle of the kept mass */
    double mid = 20.0 + 100.0 * gsl_cdf_ugaussian_Pinv(0.5 * (gsl_cdf_ugaussian_P(-0.8) +
                                                              gsl_cdf_ugaussian_P(0.8)));
    assert_close(lw_mc_draw(&k, 0.5), mid, 1e-12);
    /* weighted bins: 1:3 */
    assert_int_equal(lw_mc_key_parse(&prof, "drive.resistor_ohm", "bin 22:1,33:3", NULL, 0, &k,
                                     &err), LW_OK);
    assert_close(lw_mc_draw(&k, 0.2), 22.0, 0);
    assert_close(lw_mc_draw(&k, 0.3), 33.0, 0);
    /* percent sigma */
    assert_int_equal(lw_mc_key_parse(&prof, "drive.resistor_ohm", "normal 10%", NULL, 0, &k, &err),
                     LW_OK);
    assert_close(k.sigma, 3.3, 1e-15);
    /* refusals, with file and line */
    const char *bad[][2] = {{"drive.resistor_ohm", "gaussian 3"}, {"drive.resistor_ohm", "normal"},
                            {"drive.resistor_ohm", "uniform 5..2"},
                            {"drive.resistor_ohm", "bin 10,-1"},
                            {"pack.series", "normal 1"},           {"drive.type", "bin 1"},
                            {"drive.nosuch", "normal 1"},          {"resistor", "normal 1"}};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        lw_error_clear(&err);
        assert_int_equal(lw_mc_key_parse(&prof, bad[i][0], bad[i][1], "p.ini", 9, &k, &err),
                         LW_EINPUT);
        assert_error_at(err, "p.ini", 9, "");
    }
    /* targets */
    lw_mc_target t;
    assert_int_equal(lw_mc_target_parse("runtime_h>=8", &t, &err), LW_OK);
    assert_int_equal(t.q, LW_MC_RUNTIME);
    assert_int_equal(t.op, 'G');
    assert_close(t.value, 8.0, 0);
    assert_int_equal(lw_mc_target_parse("flux_30s_lm<100", &t, &err), LW_OK);
    assert_int_equal(t.op, '<');
    assert_int_equal(lw_mc_target_parse("runtime>=8", &t, &err), LW_EINPUT);
    assert_int_equal(lw_mc_target_parse("runtime_h=8", &t, &err), LW_EINPUT);
    lw_profile_clear(&prof);
}

/* pack.ambient_c as a range: the runs at 20 C held inside it, the cold
 * corner's runtime the runtime of the same light run at the range's low end
 * (set as a plain ambient), the worst hot case at the high end (a hotter
 * junction lowers the forward voltage: more current than at 20 C).  The
 * hot case is lw_run_worst_case at that ambient by definition (corner.h). */
static void ambient_range_corners(void **state)
{
    (void)state;
    lw_profile prof, plain;
    load_demo(&prof);
    lw_error err;
    lw_error_clear(&err);
    assert_int_equal(lw_profile_set(&prof, "pack.ambient_c", "-10..40", LW_FROM_OPTION, "--set", 0,
                                    &err), LW_OK);
    assert_int_equal(lw_profile_resolve(&prof, &err), LW_OK);
    assert_true(prof.light.pack.ambient_range);
    assert_close(prof.light.pack.ambient_c, 20.0, 0);
    lw_result run;
    assert_int_equal(lw_run(&prof.light, NULL, &run, &err), LW_OK);
    lw_corner c[LW_CORNER_COUNT];
    assert_int_equal(lw_corner_compute(&prof.light, &run, c, &err), LW_OK);
    assert_close(c[LW_CORNER_COLD].ambient_c, -10.0, 0);
    assert_close(c[LW_CORNER_HOT].ambient_c, 40.0, 0);
    assert_close(c[LW_CORNER_NOMINAL].runtime_h, run.runtime_h, 0);
    load_demo(&plain);
    assert_close(c[LW_CORNER_COLD].runtime_h, runtime_at(&plain, "pack.ambient_c", -10.0), 1e-14);
    assert_true(c[LW_CORNER_COLD].runtime_h < run.runtime_h); /* alkaline cells in the cold */
    lw_point at20;
    assert_int_equal(lw_run_worst_case(&prof.light, &at20, &err), LW_OK);
    assert_true(c[LW_CORNER_HOT].pt.led_a > at20.led_a);
    assert_true(isnan(c[LW_CORNER_HOT].runtime_h));
    /* a range the wrong way round, and an end outside the key's range */
    assert_int_equal(lw_profile_set(&prof, "pack.ambient_c", "40..-10", LW_FROM_OPTION, "--set", 0,
                                    &err), LW_EINPUT);
    assert_non_null(strstr(err.msg, "LOW..HIGH"));
    assert_int_equal(lw_profile_set(&prof, "pack.ambient_c", "-10..400", LW_FROM_OPTION, "--set",
                                    0, &err), LW_EINPUT);
    lw_run_result_clear(&run);
    lw_profile_clear(&prof);
    lw_profile_clear(&plain);
}

/* Sobol points.  Dimensions 1 and 2 are fixed by the construction (van der
 * Corput, and the one primitive polynomial of degree 1): their first 2^m
 * points equal GSL's gsl_qrng_sobol's as sets.  Every dimension is a
 * (0, m, 1)-net: 2^m points put one in each interval of width 2^-m; and
 * dimensions 1 and 2 a (0, m, 2)-net: one point in every dyadic box of area
 * 2^-m (Sobol' 1967; H. Niederreiter, "Random Number Generation and
 * Quasi-Monte Carlo Methods", SIAM 1992, chapter 4).  Sobol's g-function
 * prod (|4u - 2| + a_j) / (1 + a_j), whose integral is 1 (I. M. Sobol',
 * Math. Comput. Simul. 47, 1998), in 16 dimensions with a_j = j: 2^14
 * points integrate it to 2e-3 (a random sample's standard error there is
 * about 4e-3 for one draw; common practice, no source). */
static void sobol_points(void **state)
{
    (void)state;
    static lw_sobol sb;
    lw_sobol_init(&sb);
    enum { M = 10, N = 1 << M };
    static double ours[N][2], gsl[N][2];
    gsl_qrng *q = gsl_qrng_alloc(gsl_qrng_sobol, 2);
    double g[2];
    /* GSL's sequence leaves out the point at the origin: ours is point 0 */
    ours[0][0] = ours[0][1] = gsl[0][0] = gsl[0][1] = 0.0;
    for (int i = 1; i < N; i++) {
        lw_sobol_point(&sb, (uint32_t)i, 2, ours[i]);
        gsl_qrng_get(q, g);
        gsl[i][0] = g[0], gsl[i][1] = g[1];
    }
    gsl_qrng_free(q);
    double u0[N], g0[N];
    for (int d = 0; d < 2; d++) {
        for (int i = 0; i < N; i++)
            u0[i] = ours[i][d] + 2.0 * ours[i][1 - d], g0[i] = gsl[i][d] + 2.0 * gsl[i][1 - d];
        lw_stats_sort(u0, N);
        lw_stats_sort(g0, N);
        assert_memory_equal(u0, g0, sizeof u0);
    }
    /* nets */
    static double u[N][LW_SOBOL_DIMS];
    for (int i = 0; i < N; i++)
        lw_sobol_point(&sb, (uint32_t)i, LW_SOBOL_DIMS, u[i]);
    for (int j = 0; j < LW_SOBOL_DIMS; j++) {
        static int hit[N];
        memset(hit, 0, sizeof hit);
        for (int i = 0; i < N; i++)
            hit[(int)(u[i][j] * N)]++;
        for (int b = 0; b < N; b++)
            assert_int_equal(hit[b], 1);
    }
    for (int k = 0; k <= M; k++) {
        static int box[N];
        memset(box, 0, sizeof box);
        for (int i = 0; i < N; i++) {
            int a = (int)(u[i][0] * (1 << k)), b = (int)(u[i][1] * (1 << (M - k)));
            box[a * (1 << (M - k)) + b]++;
        }
        for (int b = 0; b < N; b++)
            assert_int_equal(box[b], 1);
    }
    double sum = 0.0;
    const int n = 1 << 14;
    for (int i = 0; i < n; i++) {
        double p = 1.0, v[LW_SOBOL_DIMS];
        lw_sobol_point(&sb, (uint32_t)i, LW_SOBOL_DIMS, v);
        for (int j = 0; j < LW_SOBOL_DIMS; j++)
            p *= (fabs(4.0 * v[j] - 2.0) + (j + 1)) / (1.0 + (j + 1));
        sum += p;
    }
    assert_near(sum / n, 1.0, 2e-3);
}

/* The study on Sobol points: the same units on 1 and 2 threads, and the
 * mean runtime within 0.1 h of a random study of 8 times as many units
 * (whose own standard error is about 0.015 h here). */
static void sobol_study(void **state)
{
    (void)state;
    lw_profile prof;
    load_demo(&prof);
    lw_mc_key keys[LW_MC_KEYS_MAX];
    size_t nk;
    lw_error err;
    lw_error_clear(&err);
    assert_int_equal(lw_mc_keys_of_profile(&prof, keys, &nk, &err), LW_OK);
    assert_int_equal(nk, 4);
    lw_mc_options o = {.samples = 1024, .seed = 3, .threads = 2, .sobol = true};
    lw_mc_result a, b, c;
    assert_int_equal(lw_mc_run(&prof, keys, nk, &o, NULL, NULL, &a, &err), LW_OK);
    o.threads = 1;
    assert_int_equal(lw_mc_run(&prof, keys, nk, &o, NULL, NULL, &b, &err), LW_OK);
    assert_memory_equal(a.y, b.y, LW_MC_QCOUNT * a.n * sizeof *a.y);
    lw_mc_options r = {.samples = 8192, .seed = 4, .threads = 2};
    assert_int_equal(lw_mc_run(&prof, keys, nk, &r, NULL, NULL, &c, &err), LW_OK);
    lw_mc_summary sa, sc;
    assert_int_equal(lw_mc_summarise(&a, LW_MC_RUNTIME, &sa, &err), LW_OK);
    assert_int_equal(lw_mc_summarise(&c, LW_MC_RUNTIME, &sc, &err), LW_OK);
    assert_near(sa.mean, sc.mean, 0.1);
    lw_mc_result_clear(&a);
    lw_mc_result_clear(&b);
    lw_mc_result_clear(&c);
    lw_profile_clear(&prof);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(normal_quantile_against_gsl),
        cmocka_unit_test(uniform_streams),
        cmocka_unit_test(normal_sample_moments),
        cmocka_unit_test(wilson_interval),
        cmocka_unit_test(order_statistic_ranks),
        cmocka_unit_test(rank_regression),
        cmocka_unit_test(resistor_tolerance_percentiles),
        cmocka_unit_test(distributions),
        cmocka_unit_test(ambient_range_corners),
        cmocka_unit_test(sobol_points),
        cmocka_unit_test(sobol_study),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
