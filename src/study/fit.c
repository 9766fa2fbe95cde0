/*
 * fit.c - linear least squares by Householder QR and the LED fits
 * (see fit.h for the models and sources).
 *
 * Columns are scaled to unit norm before the factorisation, so a basis like
 * (ln I, 1, I) with I in amperes is as well conditioned as the data allow;
 * the scaling is undone on the coefficients.
 */
#include "lampwick/fit.h"
#include "lampwick/csvio.h"

#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/led.h"
#include "lampwick/alloc.h"

/* Rank tests of the least-squares QR: a column whose norm is at most
 * COLUMN_NORM_MIN is zero (the data cannot move that parameter); a diagonal
 * of R at most RANK_RTOL times the largest marks columns that are dependent
 * to within about 1e-10, which the double-precision solve cannot resolve. */
#define COLUMN_NORM_MIN 1e-12
#define RANK_RTOL 1e-10

lw_status lw_fit_lsq_solve(const double *const *x, size_t p, const double *y, size_t n,
                       lw_lsq *out, lw_error *err)
{
    if (p == 0 || p > LW_LSQ_MAX_P)
        return lw_error_set(err, LW_EINPUT, NULL, 0, "least squares: 1 to %d columns",
                            LW_LSQ_MAX_P);
    if (n <= p)
        return lw_error_set(err, LW_EINPUT, NULL, 0,
                            "%zu points are too few to fit %zu parameters (need at least %zu)",
                            n, p, p + 1);
    double *a = lw_malloc((p + 1) * n * sizeof *a); /* column-major, last column is y */
    if (!a)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    double scale[LW_LSQ_MAX_P] = {0};
    for (size_t j = 0; j < p; j++) {
        double s = 0;
        for (size_t i = 0; i < n; i++)
            s += x[j][i] * x[j][i];
        scale[j] = s > 0 ? sqrt(s) : 1.0;
        for (size_t i = 0; i < n; i++)
            a[j * n + i] = x[j][i] / scale[j];
    }
    memcpy(a + p * n, y, n * sizeof *y);
    /* Householder QR applied to [X | y] */
    double rdiag[LW_LSQ_MAX_P] = {0};
    for (size_t k = 0; k < p; k++) {
        double *col = a + k * n;
        double norm = 0;
        for (size_t i = k; i < n; i++)
            norm += col[i] * col[i];
        norm = sqrt(norm);
        if (norm <= COLUMN_NORM_MIN) {
            free(a);
            return lw_error_set(err, LW_EINPUT, NULL, 0,
                                "the data cannot separate the model's parameters (the columns "
                                "are dependent: too few distinct currents?)");
        }
        double alpha = col[k] > 0 ? -norm : norm;
        double vk = col[k] - alpha;
        /* v = (vk, col[k+1..]) ; H = I - 2 v v^T / (v^T v) */
        double vtv = vk * vk;
        for (size_t i = k + 1; i < n; i++)
            vtv += col[i] * col[i];
        for (size_t j = k + 1; j <= p; j++) {
            double *cj = a + j * n;
            double dot = vk * cj[k];
            for (size_t i = k + 1; i < n; i++)
                dot += col[i] * cj[i];
            double f = 2.0 * dot / vtv;
            cj[k] -= f * vk;
            for (size_t i = k + 1; i < n; i++)
                cj[i] -= f * col[i];
        }
        rdiag[k] = alpha;
        col[k] = vk; /* keep v for nothing further; R's diagonal is rdiag */
    }
    /* the independence test relative to the largest diagonal */
    double rmax = 0;
    for (size_t k = 0; k < p; k++)
        rmax = fmax(rmax, fabs(rdiag[k]));
    for (size_t k = 0; k < p; k++)
        if (fabs(rdiag[k]) <= RANK_RTOL * rmax) {
            free(a);
            return lw_error_set(err, LW_EINPUT, NULL, 0,
                                "the data cannot separate the model's parameters (the columns "
                                "are nearly dependent)");
        }
    /* back substitution R c = Q^T y; R(k, j) = a[j*n + k] for j > k */
    const double *qty = a + p * n;
    double c[LW_LSQ_MAX_P] = {0};
    for (size_t k = p; k-- > 0;) {
        double s = qty[k];
        for (size_t j = k + 1; j < p; j++)
            s -= a[j * n + k] * c[j];
        c[k] = s / rdiag[k];
    }
    double ssr = 0;
    for (size_t i = p; i < n; i++)
        ssr += qty[i] * qty[i];
    /* (R^T R)^-1 diagonal via R^-1 (upper triangular) */
    double rinv[LW_LSQ_MAX_P][LW_LSQ_MAX_P] = {{0}};
    for (size_t j = 0; j < p; j++) {
        rinv[j][j] = 1.0 / rdiag[j];
        for (size_t i = j; i-- > 0;) {
            double s = 0;
            for (size_t k = i + 1; k <= j; k++)
                s += a[k * n + i] * rinv[k][j];
            rinv[i][j] = -s / rdiag[i];
        }
    }
    double mean = 0, sst = 0;
    for (size_t i = 0; i < n; i++)
        mean += y[i];
    mean /= (double)n;
    for (size_t i = 0; i < n; i++)
        sst += (y[i] - mean) * (y[i] - mean);
    memset(out, 0, sizeof *out);
    out->n = n;
    out->p = p;
    out->ssr = ssr;
    out->rse = sqrt(ssr / (double)(n - p));
    out->r_squared = sst > 0 ? 1.0 - ssr / sst : 1.0;
    for (size_t j = 0; j < p; j++) {
        double var = 0;
        for (size_t k = j; k < p; k++)
            var += rinv[j][k] * rinv[j][k];
        out->coef[j] = c[j] / scale[j];
        out->stderr_[j] = out->rse * sqrt(var) / scale[j];
    }
    free(a);
    return LW_OK;
}

static lw_status check_points(const double *i_a, const double *v, size_t n, size_t need,
                              lw_error *err)
{
    if (n < need)
        return lw_error_set(err, LW_EINPUT, NULL, 0, "%zu points are too few (need at least %zu)",
                            n, need);
    for (size_t k = 0; k < n; k++) {
        if (!(i_a[k] > 0))
            return lw_error_set(err, LW_EINPUT, NULL, 0,
                                "point %zu: the current must be positive", k + 1);
        if (v && !(v[k] > 0))
            return lw_error_set(err, LW_EINPUT, NULL, 0,
                                "point %zu: the value must be positive", k + 1);
    }
    return LW_OK;
}

/* Least squares on the basis (1, cols[0], ..., cols[p-1]): the constant
 * column comes first, so coef[0] is the intercept. */
static lw_status lsq_with_constant(const double *const *cols, size_t p, const double *y,
                                   size_t n, lw_lsq *out, lw_error *err)
{
    double *one = lw_malloc(n * sizeof *one);
    if (!one)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    for (size_t k = 0; k < n; k++)
        one[k] = 1.0;
    const double *all[LW_LSQ_MAX_P] = {one};
    for (size_t j = 0; j < p && j + 1 < LW_LSQ_MAX_P; j++)
        all[j + 1] = cols[j];
    lw_status st = lw_fit_lsq_solve(all, p + 1, y, n, out, err);
    free(one);
    return st;
}

static void current_range(const double *i_a, size_t n, lw_led_fit *out)
{
    out->i_min_a = out->i_max_a = i_a[0];
    for (size_t k = 1; k < n; k++) {
        out->i_min_a = fmin(out->i_min_a, i_a[k]);
        out->i_max_a = fmax(out->i_max_a, i_a[k]);
    }
}

lw_status lw_fit_led_linear(const double *i_a, const double *v, size_t n, lw_led_fit *out,
                            lw_error *err)
{
    memset(out, 0, sizeof *out);
    lw_status st = check_points(i_a, v, n, 3, err);
    if (st != LW_OK)
        return st;
    const double *cols[1] = {i_a};
    st = lsq_with_constant(cols, 1, v, n, &out->lsq, err);
    if (st != LW_OK)
        return st;
    out->threshold_v = out->lsq.coef[0];
    out->slope_ohm = out->lsq.coef[1];
    current_range(i_a, n, out);
    out->weak = n < 4;
    return LW_OK;
}

lw_status lw_fit_led_shockley(const double *i_a, const double *v, size_t n, double junction_c,
                              lw_led_fit *out, lw_error *err)
{
    memset(out, 0, sizeof *out);
    lw_status st = check_points(i_a, v, n, 4, err);
    if (st != LW_OK)
        return st;
    double *ln_i = lw_malloc(n * sizeof *ln_i);
    if (!ln_i)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    for (size_t k = 0; k < n; k++)
        ln_i[k] = log(i_a[k]);
    const double *cols[2] = {ln_i, i_a};
    st = lsq_with_constant(cols, 2, v, n, &out->lsq, err);
    free(ln_i);
    if (st != LW_OK)
        return st;
    double nvt = out->lsq.coef[1];
    if (!(nvt > 0))
        return lw_error_set(err, LW_EINPUT, NULL, 0,
                            "the fitted slope n*Vt = %g V is not positive: these points do not "
                            "follow a diode law",
                            nvt);
    out->junction_c = junction_c;
    out->ideality = nvt / lw_led_thermal_voltage(junction_c);
    out->saturation_a = exp(-out->lsq.coef[0] / nvt);
    out->series_ohm = out->lsq.coef[2];
    current_range(i_a, n, out);
    /* three parameters need several points over at least a decade of current */
    out->weak = n < 6 || out->i_max_a < 10.0 * out->i_min_a || out->series_ohm < 0;
    return LW_OK;
}

lw_status lw_fit_flux(const double *i_a, const double *flux, size_t n, lw_flux_fit *out,
                      lw_error *err)
{
    memset(out, 0, sizeof *out);
    lw_status st = check_points(i_a, flux, n, 3, err);
    if (st != LW_OK)
        return st;
    double *buf = lw_malloc(2 * n * sizeof *buf);
    if (!buf)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    double log_ref = 0;
    for (size_t k = 0; k < n; k++)
        log_ref += log(i_a[k]);
    log_ref /= (double)n;
    double *lx = buf, *ly = buf + n;
    for (size_t k = 0; k < n; k++) {
        lx[k] = log(i_a[k]) - log_ref;
        ly[k] = log(flux[k]);
    }
    const double *cols[1] = {lx};
    st = lsq_with_constant(cols, 1, ly, n, &out->lsq, err);
    free(buf);
    if (st != LW_OK)
        return st;
    /* report the output at a round reference current near the data's
     * geometric mean (two significant figures) */
    double gm = exp(log_ref), mag = pow(10.0, floor(log10(gm)) - 1.0);
    out->ref_current_a = round(gm / mag) * mag;
    out->exponent = out->lsq.coef[1];
    out->flux_lm = exp(out->lsq.coef[0] + out->exponent * (log(out->ref_current_a) - log_ref));
    return LW_OK;
}

/* ---- measurements ---- */

lw_status lw_fit_led_read(const char *path, lw_fit_data *d, lw_error *err)
{
    memset(d, 0, sizeof *d);
    lw_csv csv;
    lw_status st = lw_csv_read(path, NULL, &csv, err);
    if (st != LW_OK)
        return st;
    static const char *const req[] = {"current_ma", "forward_v", NULL};
    static const char *const opt[] = {"flux_lm", "relative_pct", NULL};
    st = lw_csv_expect(&csv, req, opt, err);
    int ci = lw_csv_column(&csv, "current_ma"), cv = lw_csv_column(&csv, "forward_v");
    int cf = lw_csv_column(&csv, "flux_lm"), cr = lw_csv_column(&csv, "relative_pct");
    if (st == LW_OK && cf >= 0 && cr >= 0)
        st = lw_error_set(err, LW_EINPUT, path, csv.header_line,
                          "give flux_lm or relative_pct, not both");
    if (cf < 0)
        cf = cr;
    size_t n = csv.nrow;
    double *buf = st == LW_OK ? lw_malloc(3 * n * sizeof *buf) : NULL;
    if (!buf) {
        lw_csv_clear(&csv);
        return st != LW_OK ? st : lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    }
    for (size_t k = 0; st == LW_OK && k < n; k++) {
        double i = lw_csv_at(&csv, k, ci), v = lw_csv_at(&csv, k, cv);
        if (!(i > 0))
            st = lw_error_set(err, LW_EINPUT, path, csv.line[k],
                              "current_ma = %g: the fits need positive currents", i);
        else if (!(v > 0))
            st = lw_error_set(err, LW_EINPUT, path, csv.line[k],
                              "forward_v = %g: expected a positive voltage", v);
        else if (cf >= 0 && !(lw_csv_at(&csv, k, cf) > 0))
            st = lw_error_set(err, LW_EINPUT, path, csv.line[k],
                              "%s = %g: expected a positive output", csv.names[cf],
                              lw_csv_at(&csv, k, cf));
        if (st == LW_OK) {
            buf[k] = i * 1e-3;
            buf[n + k] = v;
            buf[2 * n + k] = cf >= 0 ? lw_csv_at(&csv, k, cf) : 0;
        }
    }
    if (st == LW_OK && n < 3)
        st = lw_error_set(err, LW_EINPUT, path, csv.line[n - 1],
                          "%zu points are too few to fit (need at least 3; 6 or more over a "
                          "decade of current for the Shockley model)",
                          n);
    lw_csv_clear(&csv);
    if (st != LW_OK) {
        free(buf);
        return st;
    }
    d->n = n;
    d->i_a = buf;
    d->v = buf + n;
    d->flux = cf >= 0 ? buf + 2 * n : NULL;
    d->relative = cf >= 0 && cf == cr;
    return LW_OK;
}

void lw_fit_data_clear(lw_fit_data *d)
{
    if (!d)
        return;
    free(d->i_a);
    memset(d, 0, sizeof *d);
}

const lw_led_fit *lw_fit_led_best(const lw_led_fit *lin, const lw_led_fit *sh)
{
    if (sh && !sh->weak && (!lin || sh->lsq.rse < lin->lsq.rse))
        return sh;
    return lin;
}
