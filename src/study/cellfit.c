/*
 * cellfit.c - cell models from discharge logs (see cellfit.h).
 */
#include "lampwick/cellfit.h"
#include "lampwick/engine.h"
#include "lampwick/roots.h"
#include "lampwick/text.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/csvio.h"
#include "lampwick/alloc.h"

#define DENSE 401 /* depths at which the logs are compared */

void lw_cellfit_log_clear(lw_cellfit_log *log)
{
    if (!log)
        return;
    free(log->t_h);
    free(log->line);
    log->t_h = log->v = log->i_a = NULL;
    log->line = NULL;
    log->n = 0;
}

static int cmp_double(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

lw_status lw_cellfit_log_read(const char *path, double load_ohm, double load_a, lw_cellfit_log *log,
                       lw_error *err)
{
    memset(log, 0, sizeof *log);
    log->load_ohm = load_ohm > 0.0 ? load_ohm : NAN;
    log->load_a = !(load_ohm > 0.0) && load_a > 0.0 ? load_a : NAN;
    lw_text_copy(log->path, path, sizeof log->path);
    lw_csv csv;
    lw_status st = lw_csv_read(path, NULL, &csv, err);
    if (st != LW_OK)
        return st;
    static const char *const req[] = {"time_s", "voltage_v", NULL};
    static const char *const opt[] = {"current_ma", NULL};
    st = lw_csv_expect(&csv, req, opt, err);
    int ct = lw_csv_column(&csv, "time_s"), cv = lw_csv_column(&csv, "voltage_v"),
        ci = lw_csv_column(&csv, "current_ma");
    if (st == LW_OK && ci < 0 && !(load_ohm > 0) && !(load_a > 0))
        st = lw_error_set(err, LW_EINPUT, path, csv.header_line,
                          "the log has no current_ma column: give the load (--load-ohm or "
                          "--load-ma)");
    if (st == LW_OK && csv.nrow < 10)
        st = lw_error_set(err, LW_EINPUT, path, csv.line[csv.nrow - 1],
                          "%zu samples are too few for a discharge log (need at least 10)",
                          csv.nrow);
    size_t n = csv.nrow;
    double *buf = st == LW_OK ? lw_malloc(3 * n * sizeof *buf) : NULL;
    int *lines = buf ? lw_malloc(n * sizeof *lines) : NULL;
    if (!buf || !lines) {
        free(buf);
        lw_csv_clear(&csv);
        return st != LW_OK ? st : lw_error_set(err, LW_ENOMEM, path, 0, "out of memory");
    }
    for (size_t k = 0; st == LW_OK && k < n; k++) {
        double t = lw_csv_at(&csv, k, ct), v = lw_csv_at(&csv, k, cv);
        double i = ci >= 0 ? lw_csv_at(&csv, k, ci) * 1e-3
                           : (load_ohm > 0 ? v / load_ohm : load_a);
        lines[k] = csv.line[k];
        if (k > 0 && !(t > buf[k - 1] * 3600.0))
            st = lw_error_set(err, LW_EINPUT, path, csv.line[k],
                              "time_s = %g does not increase on the previous sample (%g)", t,
                              buf[k - 1] * 3600.0);
        else if (!(v > 0))
            st = lw_error_set(err, LW_EINPUT, path, csv.line[k],
                              "voltage_v = %g: expected a positive voltage", v);
        else if (!(i > 0))
            st = lw_error_set(err, LW_EINPUT, path, csv.line[k],
                              "the current is %g mA: expected a positive discharge current",
                              i * 1e3);
        buf[k] = t / 3600.0;
        buf[n + k] = v;
        buf[2 * n + k] = i;
    }
    /* gaps: a step over 10 times the median step */
    double *steps = st == LW_OK ? lw_malloc((n - 1) * sizeof *steps) : NULL;
    if (st == LW_OK && !steps)
        st = lw_error_set(err, LW_ENOMEM, path, 0, "out of memory");
    if (steps) {
        for (size_t k = 1; k < n; k++)
            steps[k - 1] = buf[k] - buf[k - 1];
        qsort(steps, n - 1, sizeof *steps, cmp_double);
        double median = steps[(n - 1) / 2];
        for (size_t k = 1; st == LW_OK && k < n; k++)
            if (buf[k] - buf[k - 1] > 10.0 * median)
                st = lw_error_set(err, LW_EINPUT, path, csv.line[k],
                                  "gap in the log: %g s since the previous sample, more than "
                                  "10 times the usual %g s",
                                  (buf[k] - buf[k - 1]) * 3600.0, median * 3600.0);
        free(steps);
    }
    lw_csv_clear(&csv);
    if (st != LW_OK) {
        free(buf);
        free(lines);
        return st;
    }
    log->n = n;
    log->t_h = buf;
    log->v = buf + n;
    log->i_a = buf + 2 * n;
    log->line = lines;
    return LW_OK;
}

/* Per-log reduction: charge to each sample, the end crossing, capacity. */
typedef struct reduced {
    size_t n;         /* samples up to and including the end crossing */
    double *q;        /* Ah removed at each sample (the last is the crossing) */
    double *v, *i;    /* voltage, current at each */
    double cap_ah, hours;
} reduced;

static lw_status reduce(const lw_cellfit_log *log, double cutoff_v, reduced *r, lw_error *err)
{
    memset(r, 0, sizeof *r);
    size_t end = 0;
    while (end < log->n && log->v[end] > cutoff_v)
        end++;
    if (end == log->n) {
        double vmin = log->v[0];
        size_t at = 0;
        for (size_t k = 1; k < log->n; k++)
            if (log->v[k] < vmin) {
                vmin = log->v[k];
                at = k;
            }
        return lw_error_set(err, LW_EINPUT, log->path, log->line[at],
                            "the log never reaches the end point %g V (lowest %g V here)",
                            cutoff_v, vmin);
    }
    if (end < 5)
        return lw_error_set(err, LW_EINPUT, log->path, log->line[end],
                            "the voltage is at the end point %g V after only %zu samples",
                            cutoff_v, end);
    r->n = end + 1;
    r->q = lw_malloc(3 * r->n * sizeof *r->q);
    if (!r->q)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    r->v = r->q + r->n;
    r->i = r->q + 2 * r->n;
    r->q[0] = 0;
    r->v[0] = log->v[0];
    r->i[0] = log->i_a[0];
    for (size_t k = 1; k < end; k++) {
        r->q[k] = r->q[k - 1] + 0.5 * (log->i_a[k] + log->i_a[k - 1]) *
                                    (log->t_h[k] - log->t_h[k - 1]);
        r->v[k] = log->v[k];
        r->i[k] = log->i_a[k];
    }
    /* the crossing between samples end-1 and end, by linear interpolation */
    double u = (log->v[end - 1] - cutoff_v) / (log->v[end - 1] - log->v[end]);
    double t_end = log->t_h[end - 1] + u * (log->t_h[end] - log->t_h[end - 1]);
    double i_end = log->i_a[end - 1] + u * (log->i_a[end] - log->i_a[end - 1]);
    r->q[end] = r->q[end - 1] + 0.5 * (i_end + log->i_a[end - 1]) * (t_end - log->t_h[end - 1]);
    r->v[end] = cutoff_v;
    r->i[end] = i_end;
    r->cap_ah = r->q[end];
    r->hours = t_end - log->t_h[0];
    return LW_OK;
}

/* Linear interpolation of y at depth d over a reduced log (q/cap). */
static double at_depth(const reduced *r, const double *y, double d)
{
    double q = d * r->cap_ah;
    size_t lo = 0, hi = r->n - 1;
    if (q <= r->q[0])
        return y[0];
    if (q >= r->q[hi])
        return y[hi];
    while (hi - lo > 1) {
        size_t mid = (lo + hi) / 2;
        if (r->q[mid] <= q)
            lo = mid;
        else
            hi = mid;
    }
    double u = (q - r->q[lo]) / (r->q[hi] - r->q[lo]);
    return y[lo] + u * (y[hi] - y[lo]);
}

/* Ramer-Douglas-Peucker: mark the points to keep so that the polyline
 * through them stays within tol of every point of (x, y). */
static void rdp(const double *x, const double *y, size_t a, size_t b, double tol, bool *keep)
{
    if (b <= a + 1)
        return;
    double worst = -1;
    size_t at = a;
    for (size_t k = a + 1; k < b; k++) {
        double u = (x[k] - x[a]) / (x[b] - x[a]);
        double dev = fabs(y[k] - (y[a] + u * (y[b] - y[a])));
        if (dev > worst) {
            worst = dev;
            at = k;
        }
    }
    if (worst > tol) {
        keep[at] = true;
        rdp(x, y, a, at, tol, keep);
        rdp(x, y, at, b, tol, keep);
    }
}

/* Near the end both logs are normalised to reach the end point at 100 %
 * depth, so their difference -- the resistance -- collapses there although
 * the cell's resistance rises, and on the steep knee before it a depth
 * misalignment of the two logs of a fraction of a percent moves their
 * difference by more than the IR drop itself.  The stated rule: R and OCV
 * come from both logs while the heavier log is at least RELIABLE_MARGIN
 * times the IR-drop difference (I_hi - I_lo) * R~ above the end point (R~
 * the median resistance from 10 to 90 % depth) and the lighter log's slope
 * dV/dd is at most KNEE_SLOPE times its median from 10 to 90 %; beyond that
 * depth R continues on the least-squares line through the last TREND_SPAN
 * of depth before it, never falling, and OCV = V_lo + I_lo * R from the
 * lighter log. */
#define RELIABLE_MARGIN 3.0
#define KNEE_SLOPE 10.0
#define TREND_SPAN 0.10

static int cmp_dbl(const void *a, const void *b)
{
    double x = *(const double *)a, y = *(const double *)b;
    return (x > y) - (x < y);
}

/* The last dense index at which both logs give the resistance. */
/* Median of the values of f over the dense depths from 10 to 90 %. */
static double mid_median(const double *d, const double *f)
{
    double mid[DENSE];
    size_t nm = 0;
    for (size_t k = 0; k < DENSE; k++)
        if (d[k] >= 0.1 && d[k] <= 0.9)
            mid[nm++] = f[k];
    if (nm == 0)
        return f[DENSE / 2];
    qsort(mid, nm, sizeof *mid, cmp_dbl);
    return mid[nm / 2];
}

static size_t reliable_limit(const reduced *lo, const reduced *hi, double cutoff_v,
                             const double *d, const double *res)
{
    double slope[DENSE];
    for (size_t k = 0; k < DENSE; k++) {
        size_t a = k ? k - 1 : k, b = k + 1 < DENSE ? k + 1 : k;
        slope[k] = fabs(at_depth(lo, lo->v, d[b]) - at_depth(lo, lo->v, d[a])) / (d[b] - d[a]);
    }
    double r_med = mid_median(d, res), s_med = mid_median(d, slope);
    for (size_t k = 0; k < DENSE; k++) {
        double di = at_depth(hi, hi->i, d[k]) - at_depth(lo, lo->i, d[k]);
        if (at_depth(hi, hi->v, d[k]) - cutoff_v < RELIABLE_MARGIN * di * r_med ||
            (d[k] > 0.5 && slope[k] > KNEE_SLOPE * s_med))
            return k > 0 ? k - 1 : 0;
    }
    return DENSE - 1;
}

static void extend_near_end(const reduced *lo, const double *d, size_t lim, double *rs,
                            double *ocv)
{
    /* the trend of R over the last TREND_SPAN of depth before lim */
    double sx = 0, sy = 0, sxx = 0, sxy = 0;
    int m = 0;
    for (size_t k = 0; k <= lim; k++) {
        if (d[k] < d[lim] - TREND_SPAN)
            continue;
        sx += d[k];
        sy += rs[k];
        sxx += d[k] * d[k];
        sxy += d[k] * rs[k];
        m++;
    }
    double den = m * sxx - sx * sx;
    double slope = m > 1 && den > 0 ? (m * sxy - sx * sy) / den : 0.0;
    double icpt = m > 0 ? (sy - slope * sx) / m : rs[lim];
    for (size_t k = lim + 1; k < DENSE; k++) {
        rs[k] = fmax(rs[k - 1], icpt + slope * d[k]);
        ocv[k] = at_depth(lo, lo->v, d[k]) + at_depth(lo, lo->i, d[k]) * rs[k];
    }
}

/* The runtime of a log's load (its resistance, or its current held by an
 * ideal regulator) to the end point through the fitted cell, under
 * Peukert's law or the kinetic model: the load is a light whose "LED" is
 * 0 V, so the run is the cell's alone. */
static lw_status replay_log(const lw_cell *cell, const lw_cellfit_log *log, double cutoff_v,
                            bool kinetic, double *hours, lw_error *err)
{
    lw_light l;
    memset(&l, 0, sizeof l);
    lw_cell_copy(&l.pack.cell, cell);
    l.pack.cell.rate_model = kinetic ? LW_RATE_KINETIC : LW_RATE_PEUKERT;
    l.pack.series = l.pack.parallel = 1;
    l.pack.ambient_c = 20.0;
    l.led = (lw_led){.model = LW_LED_CONSTANT, .count = 1, .strings = 1, .v_scale = 1.0,
                     .forward_v = 0.0, .flux_lm = 1.0, .flux_current_a = 1.0,
                     .flux_exponent = 1.0, .max_current_a = 1e6};
    if (log->load_ohm > 0.0) {
        l.drive = (lw_drive){.type = LW_DRIVE_RESISTOR, .resistor_ohm = log->load_ohm,
                             .duty_pct = 100.0};
    } else {
        double mean = 0.0;
        for (size_t i = 0; i < log->n; i++)
            mean += log->i_a[i];
        l.drive = (lw_drive){.type = LW_DRIVE_LINEAR_CC, .set_a = mean / (double)log->n,
                             .dropout_v = 0.0, .duty_pct = 100.0};
    }
    l.cutoff = (lw_cutoff){.relative_pct = 1e-6, .reference = LW_REF_OWN, .cell_v = cutoff_v};
    lw_light_update_factors(&l, NULL);
    lw_run_options o = lw_run_options_default();
    o.visible_lm = 0.0;
    o.rtol = 1e-8;
    lw_result r;
    lw_status st = lw_run(&l, &o, &r, err);
    *hours = st == LW_OK ? r.runtime_h : NAN;
    lw_run_result_clear(&r);
    lw_light_clear(&l);
    return st;
}

lw_status lw_cellfit_fit(const lw_cellfit_log *logs, size_t nlogs, const lw_cellfit_options *opt,
                      lw_cellfit *out, lw_error *err)
{
    memset(out, 0, sizeof *out);
    if (nlogs < 1 || nlogs > 2)
        return lw_error_set(err, LW_EINPUT, NULL, 0, "give one or two discharge logs");
    if (nlogs == 1 && !(opt->resistance_ohm > 0))
        return lw_error_set(err, LW_EINPUT, logs[0].path, 0,
                            "with one log the internal resistance cannot be separated from the "
                            "load: give it with --resistance-ohm, or log a second load");
    reduced r[2];
    memset(r, 0, sizeof r);
    lw_status st = LW_OK;
    for (size_t k = 0; k < nlogs && st == LW_OK; k++)
        st = reduce(&logs[k], opt->cutoff_v, &r[k], err);
    double d[DENSE], ocv[DENSE], res[DENSE];
    size_t lo = 0, hi = nlogs - 1;
    if (st == LW_OK && nlogs == 2) {
        if (r[1].cap_ah / r[1].hours < r[0].cap_ah / r[0].hours) {
            lo = 1;
            hi = 0;
        }
        double m_lo = r[lo].cap_ah / r[lo].hours, m_hi = r[hi].cap_ah / r[hi].hours;
        if (!(m_hi > 1.2 * m_lo))
            st = lw_error_set(err, LW_EINPUT, logs[hi].path, 0,
                              "the two logs' mean currents (%.4g and %.4g mA) are too close to "
                              "separate resistance from voltage: use loads at least 1.2x apart",
                              m_lo * 1e3, m_hi * 1e3);
    }
    for (size_t k = 0; k < DENSE && st == LW_OK; k++) {
        d[k] = (double)k / (DENSE - 1);
        if (nlogs == 2) {
            double v1 = at_depth(&r[lo], r[lo].v, d[k]), i1 = at_depth(&r[lo], r[lo].i, d[k]);
            double v2 = at_depth(&r[hi], r[hi].v, d[k]), i2 = at_depth(&r[hi], r[hi].i, d[k]);
            res[k] = (v1 - v2) / (i2 - i1);
            ocv[k] = v1 + i1 * res[k];
        } else {
            res[k] = opt->resistance_ohm;
            ocv[k] = at_depth(&r[0], r[0].v, d[k]) + at_depth(&r[0], r[0].i, d[k]) * res[k];
        }
    }
    /* where both logs give R (two logs), then R smoothed over +-1.25 % of
     * depth within that range (the difference of two noisy logs) */
    size_t lim = DENSE - 1;
    if (st == LW_OK && nlogs == 2)
        lim = reliable_limit(&r[lo], &r[hi], opt->cutoff_v, d, res);
    double rs[DENSE];
    for (size_t k = 0; k <= lim && st == LW_OK; k++) {
        double s = 0;
        int m = 0;
        for (int j = -5; j <= 5; j++) {
            long idx = (long)k + j;
            if (idx >= 0 && idx <= (long)lim) {
                s += res[idx];
                m++;
            }
        }
        rs[k] = s / m;
    }
    if (st == LW_OK)
        out->reliable_depth = d[lim];
    if (st == LW_OK && lim + 1 < DENSE)
        extend_near_end(&r[lo], d, lim, rs, ocv);
    for (size_t k = 0; k < DENSE && st == LW_OK; k++)
        if (!(rs[k] > 0))
            st = lw_error_set(err, LW_EINPUT, logs[0].path, 0,
                              "the logs give a resistance of %.4g ohm at %.0f %% depth: check "
                              "the loads and that both logs are of the same cell type",
                              rs[k], 100.0 * d[k]);
    /* OCV must not rise with depth: take the running minimum (noise only) */
    for (size_t k = 1; k < DENSE && st == LW_OK; k++)
        ocv[k] = fmin(ocv[k], ocv[k - 1]);
    bool keep[DENSE] = {false};
    if (st == LW_OK) {
        keep[0] = keep[DENSE - 1] = true;
        rdp(d, ocv, 0, DENSE - 1, opt->tolerance_v > 0 ? opt->tolerance_v : 0.005, keep);
    }
    size_t nk = 0;
    double kd[DENSE], kv[DENSE], kr[DENSE];
    for (size_t k = 0; k < DENSE && st == LW_OK; k++)
        if (keep[k]) {
            kd[nk] = d[k];
            kv[nk] = ocv[k];
            kr[nk] = rs[k];
            nk++;
        }
    if (st == LW_OK) {
        /* deviation of the thinned curve from the dense one */
        size_t j = 0;
        for (size_t k = 0; k < DENSE; k++) {
            while (j + 1 < nk - 1 && kd[j + 1] < d[k])
                j++;
            double u = (d[k] - kd[j]) / (kd[j + 1] - kd[j]);
            double v = kv[j] + u * (kv[j + 1] - kv[j]);
            out->max_dev_v = fmax(out->max_dev_v, fabs(v - ocv[k]));
        }
        out->dense_points = DENSE;
        lw_cell *c = &out->cell;
        lw_text_copy(c->name, opt->name ? opt->name : "fitted-cell", sizeof c->name);
        c->chemistry = opt->chemistry;
        c->rechargeable = opt->rechargeable;
        c->cutoff_v = opt->cutoff_v;
        c->capacity_ah = r[lo].cap_ah;
        c->rated_a = r[lo].cap_ah / r[lo].hours;
        c->max_capacity_ah = c->capacity_ah;
        c->peukert = 1.0;
        out->nlogs = nlogs;
        for (size_t k = 0; k < nlogs; k++) {
            out->capacity_ah[k] = r[k].cap_ah;
            out->hours[k] = r[k].hours;
            out->mean_a[k] = r[k].cap_ah / r[k].hours;
        }
        if (nlogs == 2) {
            double k_est = 1.0 + log(r[lo].cap_ah / r[hi].cap_ah) /
                                     log(out->mean_a[hi] / out->mean_a[lo]);
            out->peukert_estimated = true;
            out->peukert_clamped = k_est < 1.0 || k_est > 2.0;
            c->peukert = fmin(2.0, fmax(1.0, k_est));
        }
        c->nominal_v = isnan(opt->nominal_v) ? kv[0] : opt->nominal_v;
        if (isnan(opt->nominal_v)) {
            size_t j2 = 0;
            while (j2 + 1 < nk - 1 && kd[j2 + 1] < 0.5)
                j2++;
            double u = (0.5 - kd[j2]) / (kd[j2 + 1] - kd[j2]);
            c->nominal_v = round(100.0 * (kv[j2] + u * (kv[j2 + 1] - kv[j2]))) / 100.0;
        }
        c->ocv = lw_interp_new(kd, kv, nk, err);
        c->res = c->ocv ? lw_interp_new(kd, kr, nk, err) : NULL;
        if (!c->res)
            st = err && err->code ? err->code : LW_ENOMEM;
        if (st == LW_OK && !(c->cutoff_v < kv[0]))
            st = lw_error_set(err, LW_EINPUT, logs[0].path, 0,
                              "the end point %g V is not below the fresh open-circuit voltage "
                              "%g V",
                              c->cutoff_v, kv[0]);
    }
    for (size_t k = 0; k < nlogs; k++)
        free(r[k].q);
    if (st == LW_OK && nlogs == 2 && opt->total_ah > 0.0) {
        lw_cell *c = &out->cell;
        st = lw_cellfit_kinetic(opt->total_ah, out->mean_a[0], out->capacity_ah[0],
                                out->mean_a[1], out->capacity_ah[1], &c->kinetic_c,
                                &c->kinetic_k_per_h, err);
        out->kinetic_fitted = st == LW_OK;
        if (st == LW_OK)
            c->max_capacity_ah = fmax(c->capacity_ah, opt->total_ah);
    }
    for (int m = 0; m < 2; m++)
        for (int k = 0; k < 2; k++)
            out->model_hours[m][k] = NAN;
    for (size_t k = 0; k < nlogs && st == LW_OK; k++)
        for (int m = 0; m < (out->kinetic_fitted ? 2 : 1) && st == LW_OK; m++)
            st = replay_log(&out->cell, &logs[k], opt->cutoff_v, m == 1,
                            &out->model_hours[m][k], err);
    if (st != LW_OK)
        lw_cell_clear(&out->cell);
    return st;
}

/* ---- the kinetic model from two capacities ---- */

typedef struct kin_fit {
    double total_ah, i_a[2], q_ah[2];
} kin_fit;

/* c from capacity j at rate constant k (the closed form solved for c). */
static double kin_c(const kin_fit *f, int j, double k)
{
    double a = f->i_a[j] / k * -expm1(-k * f->q_ah[j] / f->i_a[j]);
    return a / (f->total_ah - f->q_ah[j] + a);
}

/* c1 - c2 at k = e^x. */
static double kin_gap(double x, void *ctx)
{
    const kin_fit *f = ctx;
    double k = exp(x);
    return kin_c(f, 0, k) - kin_c(f, 1, k);
}

lw_status lw_cellfit_kinetic(double total_ah, double i1_a, double q1_ah, double i2_a,
                             double q2_ah, double *c, double *k_per_h, lw_error *err)
{
    kin_fit f = {total_ah, {i1_a, i2_a}, {q1_ah, q2_ah}};
    if (i1_a > i2_a)
        f = (kin_fit){total_ah, {i2_a, i1_a}, {q2_ah, q1_ah}};
    if (!(f.i_a[0] > 0.0 && f.i_a[1] > f.i_a[0] && f.q_ah[1] > 0.0 && f.q_ah[1] < f.q_ah[0] &&
          f.q_ah[0] < total_ah))
        return lw_error_set(err, LW_EINPUT, NULL, 0,
                            "the kinetic model needs two capacities that fall as the current "
                            "rises, both below the total charge (%g and %g Ah at %g and %g A, "
                            "total %g Ah)",
                            q1_ah, q2_ah, i1_a, i2_a, total_ah);
    const double lo = log(1e-6), hi = log(1e6);
    const int steps = 240;
    double xa = lo, ga = kin_gap(xa, &f);
    for (int s = 1; s <= steps; s++) {
        double xb = lo + (hi - lo) * s / steps, gb = kin_gap(xb, &f);
        if (isfinite(ga) && isfinite(gb) && (ga == 0.0 || ga * gb < 0.0)) {
            double x = xa;
            lw_status st = ga == 0.0 ? LW_OK
                                     : lw_root_brent(kin_gap, &f, xa, xb, ga, gb, 1e-14, 200,
                                                     &x, err);
            if (st != LW_OK)
                return st;
            *k_per_h = exp(x);
            *c = kin_c(&f, 0, *k_per_h);
            return LW_OK;
        }
        xa = xb, ga = gb;
    }
    return lw_error_set(err, LW_ENUMERIC, NULL, 0,
                        "no rate constant from 1e-6 to 1e6 per hour gives the kinetic model "
                        "both capacities (%g Ah at %g A, %g Ah at %g A, total %g Ah)",
                        f.q_ah[0], f.i_a[0], f.q_ah[1], f.i_a[1], total_ah);
}
