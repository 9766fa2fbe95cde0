/*
 * test_fit.c - least squares and the LED fits against GSL, recovery of known
 * parameters, and the cell fit from logs generated through the engine.
 */
#include "testutil.h"
#include <gsl/gsl_fit.h>
#include <gsl/gsl_multifit.h>
#include "tmpdir.h"
#include <lampwick/lampwick.h>

/* deterministic noise: a 64-bit LCG (Knuth's MMIX constants) and Box-Muller */
static unsigned long long rng = 12345;
static double uniform01(void)
{
    rng = rng * 6364136223846793005ULL + 1442695040888963407ULL;
    return ((rng >> 11) + 0.5) / 9007199254740992.0;
}
static double gauss(double sigma)
{
    return sigma * sqrt(-2.0 * log(uniform01())) * cos(6.283185307179586 * uniform01());
}

static const double cur_a[] = {0.005, 0.010, 0.020, 0.035, 0.050, 0.075, 0.100, 0.150};
#define NCUR (sizeof cur_a / sizeof cur_a[0])

/* Ordinary least squares line against GSL's gsl_fit_linear (to 1e-12). */
static void linear_fit_against_gsl(void **state)
{
    (void)state;
    double v[NCUR];
    for (size_t k = 0; k < NCUR; k++)
        v[k] = 2.6 + 3.1 * cur_a[k] + gauss(0.01);
    lw_led_fit f;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_fit_led_linear(cur_a, v, NCUR, &f, &e), LW_OK);
    double c0, c1, cov00, cov01, cov11, sumsq;
    gsl_fit_linear(cur_a, 1, v, 1, NCUR, &c0, &c1, &cov00, &cov01, &cov11, &sumsq);
    assert_close(f.threshold_v, c0, 1e-12);
    assert_close(f.slope_ohm, c1, 1e-12);
    assert_close(f.lsq.ssr, sumsq, 1e-9);
    /* GSL's covariance is sigma^2 (X^T X)^-1: the same standard errors */
    assert_close(f.lsq.stderr_[0], sqrt(cov00), 1e-9);
    assert_close(f.lsq.stderr_[1], sqrt(cov11), 1e-9);
}

/* Shockley with series resistance on noise-free data from the model
 * V = n Vt ln(I/Is) + Rs I: parameters recovered to 1e-6. */
static void shockley_recovers_noise_free_parameters(void **state)
{
    (void)state;
    const double n = 3.0, is = 4.6e-18, rs = 1.5, vt = lw_led_thermal_voltage(25);
    double v[NCUR];
    for (size_t k = 0; k < NCUR; k++)
        v[k] = n * vt * log(cur_a[k] / is) + rs * cur_a[k];
    lw_led_fit f;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_fit_led_shockley(cur_a, v, NCUR, 25, &f, &e), LW_OK);
    assert_close(f.ideality, n, 1e-6);
    assert_close(f.saturation_a, is, 1e-6);
    assert_close(f.series_ohm, rs, 1e-6);
    assert_true(f.lsq.r_squared > 1 - 1e-12);
    assert_false(f.weak);
}

/* With 2 mV of measurement noise the fit stays close: stated bounds n
 * within 5 %, Rs within 10 %, RSE near the noise. */
static void shockley_with_noise_within_bounds(void **state)
{
    (void)state;
    const double n = 3.0, is = 4.6e-18, rs = 1.5, vt = lw_led_thermal_voltage(25);
    double v[NCUR];
    rng = 99;
    for (size_t k = 0; k < NCUR; k++)
        v[k] = n * vt * log1p(cur_a[k] / is) + rs * cur_a[k] + gauss(0.002);
    lw_led_fit f;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_fit_led_shockley(cur_a, v, NCUR, 25, &f, &e), LW_OK);
    assert_close(f.ideality, n, 0.05);
    assert_close(f.series_ohm, rs, 0.10);
    assert_true(f.lsq.rse < 0.005 && f.lsq.rse > 0.0005);
    /* the fitted model reproduces the data within 3 sigma everywhere */
    lw_led led = {.model = LW_LED_SHOCKLEY, .count = 1, .strings = 1, .v_scale = 1,
                  .ideality = f.ideality, .saturation_a = f.saturation_a,
                  .series_ohm = f.series_ohm, .junction_c = 25};
    for (size_t k = 0; k < NCUR; k++)
        assert_near(lw_led_voltage(&led, cur_a[k], NULL), v[k], 0.006);
}

/* The basis-function fit (1, ln I, I) against GSL's gsl_multifit_linear. */
static void basis_fit_against_gsl_multifit(void **state)
{
    (void)state;
    double v[NCUR];
    rng = 5;
    for (size_t k = 0; k < NCUR; k++)
        v[k] = 0.08 * log(cur_a[k]) + 3.2 + 1.2 * cur_a[k] + gauss(0.003);
    lw_led_fit f;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_fit_led_shockley(cur_a, v, NCUR, 25, &f, &e), LW_OK);
    gsl_matrix *X = gsl_matrix_alloc(NCUR, 3);
    gsl_vector *y = gsl_vector_alloc(NCUR), *c = gsl_vector_alloc(3);
    gsl_matrix *cov = gsl_matrix_alloc(3, 3);
    for (size_t k = 0; k < NCUR; k++) {
        gsl_matrix_set(X, k, 0, 1.0);
        gsl_matrix_set(X, k, 1, log(cur_a[k]));
        gsl_matrix_set(X, k, 2, cur_a[k]);
        gsl_vector_set(y, k, v[k]);
    }
    double chisq;
    gsl_multifit_linear_workspace *w = gsl_multifit_linear_alloc(NCUR, 3);
    gsl_multifit_linear(X, y, c, cov, &chisq, w);
    for (size_t j = 0; j < 3; j++) {
        assert_close(f.lsq.coef[j], gsl_vector_get(c, j), 1e-9);
        /* GSL's cov is sigma^2 (X^T X)^-1 with sigma^2 = chisq/(n-p) */
        assert_close(f.lsq.stderr_[j], sqrt(gsl_matrix_get(cov, j, j)), 1e-6);
    }
    assert_close(f.lsq.ssr, chisq, 1e-9);
    gsl_multifit_linear_free(w);
    gsl_matrix_free(X);
    gsl_matrix_free(cov);
    gsl_vector_free(y);
    gsl_vector_free(c);
}

/* Power law in log-log: exponent and flux at the reference current. */
static void flux_fit_recovers_power_law(void **state)
{
    (void)state;
    double fl[NCUR];
    for (size_t k = 0; k < NCUR; k++)
        fl[k] = 22.0 * pow(cur_a[k] / 0.06, 0.9);
    lw_flux_fit f;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_fit_flux(cur_a, fl, NCUR, &f, &e), LW_OK);
    assert_close(f.exponent, 0.9, 1e-12);
    assert_close(f.flux_lm, 22.0 * pow(f.ref_current_a / 0.06, 0.9), 1e-12);
}

static void refuses_bad_data(void **state)
{
    (void)state;
    const double i[] = {0.01, 0.02, -0.03}, v[] = {2.7, 2.8, 2.9};
    lw_led_fit f;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_fit_led_linear(i, v, 3, &f, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "point 3"));
    lw_error_clear(&e);
    assert_int_equal(lw_fit_led_shockley(i, v, 2, 25, &f, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "too few"));
    const double same[] = {0.02, 0.02, 0.02, 0.02};
    const double v4[] = {2.7, 2.8, 2.9, 3.0};
    lw_error_clear(&e);
    assert_int_equal(lw_fit_led_linear(same, v4, 4, &f, &e), LW_EINPUT);
    assert_non_null(strstr(e.msg, "cannot separate"));
}

/* ---- cell fit: logs generated through the engine ---- */

static void load_light(lw_light *l, const lw_cell *cell, double r_ohm)
{
    memset(l, 0, sizeof *l);
    lw_cell_copy(&l->pack.cell, cell);
    l->pack.series = l->pack.parallel = 1;
    l->pack.ambient_c = 20;
    /* a resistive load: an "LED" of (almost) zero forward voltage */
    l->led = (lw_led){.model = LW_LED_CONSTANT, .count = 1, .strings = 1, .v_scale = 1,
                      .forward_v = 1e-9, .flux_lm = 1, .flux_current_a = 1e-3,
                      .flux_exponent = 1, .max_current_a = 100};
    l->drive.type = LW_DRIVE_RESISTOR;
    l->drive.resistor_ohm = r_ohm;
    l->drive.duty_pct = 100;
    l->cutoff.relative_pct = 1e-6;
    l->cutoff.cell_v = 0.95;
    lw_light_update_factors(l, NULL);
}

/* A log sampled every 60 s from the engine's trace of a resistive load. */
static void synth_log(const lw_cell *cell, double r_ohm, lw_cellfit_log *log)
{
    lw_light l;
    load_light(&l, cell, r_ohm);
    lw_run_options o = lw_run_options_default();
    o.want_trace = true;
    lw_result r;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_run(&l, &o, &r, &e), LW_OK);
    lw_trace tr;
    assert_int_equal(lw_trace_build(&l, &r, 2000, &tr, &e), LW_OK);
    size_t n = (size_t)(r.runtime_h * 60.0) + 1;
    memset(log, 0, sizeof *log);
    lw_text_copy(log->path, "synthetic", sizeof log->path);
    log->t_h = malloc(3 * n * sizeof(double));
    log->line = calloc(n, sizeof(int));
    log->v = log->t_h + n;
    log->i_a = log->t_h + 2 * n;
    log->n = n;
    size_t k = 0;
    for (size_t s = 0; s < n; s++) {
        double t = s / 60.0;
        while (k + 2 < tr.n && tr.rows[k + 1].t_h < t)
            k++;
        double u = (t - tr.rows[k].t_h) / (tr.rows[k + 1].t_h - tr.rows[k].t_h);
        u = fmin(1.0, fmax(0.0, u));
        log->t_h[s] = t;
        log->v[s] = tr.rows[k].pt.cell_v + u * (tr.rows[k + 1].pt.cell_v - tr.rows[k].pt.cell_v);
        log->i_a[s] = log->v[s] / r_ohm;
        log->line[s] = (int)s + 2;
    }
    lw_trace_clear(&tr);
    lw_run_result_clear(&r);
    lw_light_clear(&l);
}

static double runtime_on(const lw_cell *cell, double r_ohm, double cutoff_v)
{
    lw_light l;
    load_light(&l, cell, r_ohm);
    l.cutoff.cell_v = cutoff_v;
    lw_run_options o = lw_run_options_default();
    lw_result r;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_run(&l, &o, &r, &e), LW_OK);
    lw_light_clear(&l);
    return r.runtime_h;
}

/* Logs from the example "true" cell at 3.9 and 8.2 ohm, fitted back; the
 * fitted cell, run at a load in between (5.6 ohm) to the same end point,
 * must give the original runtime within 1 %. */
static void cell_fit_round_trip(void **state)
{
    (void)state;
    lw_cell truth;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(
        lw_cellfile_load(LW_SOURCE_ROOT "/docs/examples/nimh-aa-sample.ini", &truth, &e), LW_OK);
    lw_cellfit_log logs[2];
    synth_log(&truth, 3.9, &logs[0]);
    synth_log(&truth, 8.2, &logs[1]);
    lw_cellfit_options opt = {.cutoff_v = 1.0, .tolerance_v = 0.002, .name = "refit",
                              .chemistry = LW_CHEM_NIMH, .rechargeable = true, .nominal_v = NAN};
    lw_cellfit fit;
    assert_int_equal(lw_cellfit_fit(logs, 2, &opt, &fit, &e), LW_OK);
    assert_true(fit.peukert_estimated);
    assert_true(fit.cell.peukert > 1.0 && fit.cell.peukert < 1.15);
    assert_true(fit.max_dev_v <= 0.002 + 1e-12);
    /* the internal resistance recovered at mid depth (truth: 0.033 ohm) */
    assert_close(lw_interp_linear(fit.cell.res, 0.5), 0.033, 0.10);
    double t_true = runtime_on(&truth, 5.6, 1.0);
    double t_fit = runtime_on(&fit.cell, 5.6, 1.0);
    assert_close(t_fit, t_true, 0.01);
    /* and the file it writes loads back unchanged */
    char path[600];
    snprintf(path, sizeof path, "%s/refit.ini", tmp_root());
    assert_int_equal(lw_cellfile_save(path, &fit.cell, "test", &e), LW_OK);
    lw_cell back;
    assert_int_equal(lw_cellfile_load(path, &back, &e), LW_OK);
    /* the file holds 6 significant figures */
    assert_close(back.capacity_ah, fit.cell.capacity_ah, 1e-5);
    assert_close(runtime_on(&back, 5.6, 1.0), t_fit, 1e-3);
    lw_cell_clear(&back);
    lw_cell_clear(&fit.cell);
    lw_cell_clear(&truth);
    lw_cellfit_log_clear(&logs[0]);
    lw_cellfit_log_clear(&logs[1]);
}

/* The bundled example logs (with their noise) against the model that
 * generated them (docs/examples/nimh-aa-sample.ini, whose resistance rises
 * from 0.033 ohm at mid depth to 0.12 ohm when empty): the fitted
 * resistance must not collapse towards the end, where both logs are pinned
 * to the end point -- it keeps rising or holds from its last well-determined
 * value, at least the mid-depth value (a collapse gave 0.017 ohm). */
static void cell_fit_resistance_near_empty(void **state)
{
    (void)state;
    lw_cellfit_log logs[2];
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_cellfit_log_read(LW_SOURCE_ROOT "/docs/examples/nimh-aa-3r9.csv", 3.9, NAN,
                                  &logs[0], &e),
                     LW_OK);
    assert_int_equal(lw_cellfit_log_read(LW_SOURCE_ROOT "/docs/examples/nimh-aa-8r2.csv", 8.2, NAN,
                                  &logs[1], &e),
                     LW_OK);
    lw_cellfit_options opt = {.cutoff_v = 1.0, .tolerance_v = 0.005, .name = "ex",
                              .chemistry = LW_CHEM_NIMH, .rechargeable = true, .nominal_v = NAN};
    lw_cellfit fit;
    assert_int_equal(lw_cellfit_fit(logs, 2, &opt, &fit, &e), LW_OK);
    double r_mid = lw_interp_linear(fit.cell.res, 0.5);
    assert_close(r_mid, 0.033, 0.10);
    assert_true(fit.reliable_depth > 0.9 && fit.reliable_depth < 1.0);
    for (double d = fit.reliable_depth; d <= 1.0; d += 0.0025)
        assert_true(lw_interp_linear(fit.cell.res, fmin(d, 1.0)) >= r_mid);
    assert_true(lw_interp_linear(fit.cell.res, 1.0) >= lw_interp_linear(fit.cell.res, 0.9));
    lw_cell_clear(&fit.cell);
    lw_cellfit_log_clear(&logs[0]);
    lw_cellfit_log_clear(&logs[1]);
}

/* Coulomb counting on a constant-current log: capacity = I x t to the end. */
static void one_log_constant_current(void **state)
{
    (void)state;
    char text[40000] = "time_s,voltage_v\n";
    for (int s = 0; s <= 400; s++) {
        char row[64];
        double v = 1.3 - 0.3 * s / 380.0; /* reaches 1.0 V at s = 380 */
        snprintf(row, sizeof row, "%d,%.6f\n", s * 36, v);
        strcat(text, row);
    }
    const char *p = tmp_write("cc.csv", text);
    lw_cellfit_log log;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_cellfit_log_read(p, NAN, 0.5, &log, &e), LW_OK);
    lw_cellfit_options opt = {.cutoff_v = 1.0, .resistance_ohm = 0.05, .tolerance_v = 0.001,
                              .chemistry = LW_CHEM_OTHER, .nominal_v = NAN};
    lw_cellfit fit;
    assert_int_equal(lw_cellfit_fit(&log, 1, &opt, &fit, &e), LW_OK);
    assert_close(fit.cell.capacity_ah, 0.5 * 380 * 36 / 3600.0, 1e-9); /* 1.9 Ah */
    assert_close(fit.cell.peukert, 1.0, 0);
    /* OCV = V + I R at the start: 1.3 + 0.5 x 0.05 */
    assert_close(fit.cell.ocv->y[0], 1.325, 1e-9);
    assert_true(fit.cell.ocv->n <= 4); /* a straight line needs only its ends */
    lw_cell_clear(&fit.cell);
    lw_cellfit_log_clear(&log);
}

static void log_refusals(void **state)
{
    (void)state;
    struct {
        const char *text;
        int line;
        const char *msg;
    } cases[] = {
        {"time_s,voltage_v\n0,1.3\n60,1.2\n", 3, "too few"},
        {"time_s,volts\n0,1.3\n", 1, "missing column 'voltage_v'"},
        {"time_s,voltage_v\n0,1.3\n60,1.29\n120,1.28\n100,1.27\n240,1.26\n300,1.25\n360,1.24\n"
         "420,1.23\n480,1.2\n540,1.1\n600,0.9\n",
         5, "does not increase"},
        {"time_s,voltage_v\n0,1.3\n60,1.29\n120,1.28\n180,1.27\n240,1.26\n300,1.25\n360,1.24\n"
         "420,1.23\n480,1.2\n5400,1.1\n5460,0.9\n",
         11, "gap in the log"},
        {"time_s,voltage_v,current_ma\n0,1.3,100\n60,1.29,100\n120,1.28,0\n180,1.27,100\n"
         "240,1.26,100\n300,1.25,100\n360,1.24,100\n420,1.23,100\n480,1.2,100\n540,1.1,100\n",
         4, "expected a positive discharge current"},
    };
    for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
        const char *p = tmp_write("bad-log.csv", cases[k].text);
        lw_cellfit_log log;
        lw_error e;
        lw_error_clear(&e);
        if (lw_cellfit_log_read(p, 3.9, NAN, &log, &e) != LW_EINPUT)
            fail_msg("case %zu accepted", k);
        assert_error_at(e, "bad-log.csv", cases[k].line, cases[k].msg);
    }
    /* a log that never reaches the end point */
    const char *p = tmp_write("high.csv", "time_s,voltage_v\n0,1.3\n60,1.29\n120,1.28\n"
                                          "180,1.27\n240,1.26\n300,1.25\n360,1.24\n"
                                          "420,1.23\n480,1.22\n540,1.21\n");
    lw_cellfit_log log;
    lw_error e;
    lw_error_clear(&e);
    assert_int_equal(lw_cellfit_log_read(p, 3.9, NAN, &log, &e), LW_OK);
    lw_cellfit_options opt = {.cutoff_v = 1.0, .resistance_ohm = 0.05, .nominal_v = NAN};
    lw_cellfit fit;
    assert_int_equal(lw_cellfit_fit(&log, 1, &opt, &fit, &e), LW_EINPUT);
    assert_error_at(e, "high.csv", 11, "never reaches the end point 1 V");
    lw_cellfit_log_clear(&log);
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(linear_fit_against_gsl),
        cmocka_unit_test(shockley_recovers_noise_free_parameters),
        cmocka_unit_test(shockley_with_noise_within_bounds),
        cmocka_unit_test(basis_fit_against_gsl_multifit),
        cmocka_unit_test(flux_fit_recovers_power_law),
        cmocka_unit_test(refuses_bad_data),
        cmocka_unit_test(cell_fit_round_trip),
        cmocka_unit_test(cell_fit_resistance_near_empty),
        cmocka_unit_test(one_log_constant_current),
        cmocka_unit_test(log_refusals),
    };
    return cmocka_run_group_tests(tests, NULL, tmp_teardown);
}
