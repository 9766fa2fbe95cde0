/*
 * cli_fit.c - `lampwick fit led` and `lampwick fit cell`: bench measurements
 * to model data.  Reads the files, calls fit.c / cellfit.c, prints, writes.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include "cli.h"
#include "lampwick/text.h"
#include "lampwick/number.h"

const cli_option cli_fit_led_options[] = {
    {"model", "linear|shockley|both", OPT_MODEL, "which I-V models to fit (default both)"},
    {"junction-c", "T", OPT_JUNCTION,
     "junction temperature of the measurements, C (default 25)"},
    {"write-profile-section", NULL, OPT_SECTION, "print only the [led] section"},
    {"plot", "FILE.svg", OPT_PLOT, "points, fitted curves and residuals"},
    CLI_OPT_FORMAT,
    CLI_OPT_HELP,
    CLI_OPT_END};

const cli_option cli_fit_cell_options[] = {
    {"load-ohm", "R[,R2]", OPT_LOAD_OHM, "constant-resistance load of each log"},
    {"load-ma", "I[,I2]", OPT_LOAD_MA, "constant-current load of each log"},
    {"cutoff-v", "V", OPT_CUTOFF, "end-point voltage (required)"},
    {"resistance-ohm", "R", OPT_RES, "internal resistance, with a single log"},
    {"name", "NAME", OPT_NAME, "cell name (default: the output file's name)"},
    {"out", "FILE.ini", OPT_OUT, "write the cell file and FILE.curve.csv"},
    {"chemistry", "CHEM", OPT_CHEM, "alkaline, nimh, li-ion, ... (default other)"},
    {"rechargeable", "yes|no", OPT_RECH, "(default no)"},
    {"tolerance-mv", "T", OPT_TOL, "curve thinning tolerance (default 5 mV)"},
    CLI_OPT_HELP,
    CLI_OPT_END};

/* ---- fit led ---- */

typedef struct led_data {
    size_t n;
    double *i_a, *v, *flux;  /* flux NULL when not measured */
    bool relative;           /* flux column was relative_pct */
} led_data;

static lw_status read_led_data(const char *path, led_data *d, lw_error *err)
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

static void print_section(FILE *fp, const lw_led_fit *lin, const lw_led_fit *sh,
                          const lw_flux_fit *fx, bool relative, const led_data *d,
                          double junction_c)
{
    fprintf(fp, "[led]\n");
    if (sh) {
        fprintf(fp, "model = shockley\nideality = %.5g\nsaturation_a = %.5g\nseries_ohm = %.5g\n",
                sh->ideality, sh->saturation_a, sh->series_ohm);
    } else if (lin) {
        fprintf(fp, "model = linear\nthreshold_v = %.5g\nslope_ohm = %.5g\n", lin->threshold_v,
                lin->slope_ohm);
    }
    fprintf(fp, "; the junction temperature of the bench data (not a heating setting)\n"
                "junction_c = %g\n",
            junction_c);
    if (fx && !relative)
        fprintf(fp, "flux_lm = %.5g\nflux_current_ma = %.5g\nflux_exponent = %.4g\n",
                fx->flux_lm, fx->ref_current_a * 1e3, fx->exponent);
    else if (fx)
        fprintf(fp, "; output was measured relative: flux_exponent = %.4g; set flux_lm at "
                    "flux_current_ma = %.5g from the LED's data\nflux_exponent = %.4g\n",
                fx->exponent, fx->ref_current_a * 1e3, fx->exponent);
    if (!d->i_a || d->n == 0)
        return;
    double imin = d->i_a[0], imax = d->i_a[0];
    for (size_t k = 1; k < d->n; k++) {
        imin = fmin(imin, d->i_a[k]);
        imax = fmax(imax, d->i_a[k]);
    }
    fprintf(fp, "; fitted by lampwick fit led; valid from %.4g to %.4g mA\n", imin * 1e3,
            imax * 1e3);
}

static void print_fit_text(const lw_led_fit *lin, const lw_led_fit *sh, const lw_flux_fit *fx,
                           bool relative, const led_data *d, double junction_c)
{
    if (!d->i_a || d->n == 0)
        return;
    double lo = d->i_a[0], hi = d->i_a[0];
    for (size_t k = 1; k < d->n; k++) {
        lo = fmin(lo, d->i_a[k]);
        hi = fmax(hi, d->i_a[k]);
    }
    printf("%zu measurements from %.4g to %.4g mA\n\n", d->n, lo * 1e3, hi * 1e3);
    if (lin)
        printf("linear    threshold_v = %.5g V (+- %.2g)   slope_ohm = %.5g ohm (+- %.2g)\n"
               "          R^2 = %.6f   residual standard error %.3g mV\n\n",
               lin->threshold_v, lin->lsq.stderr_[0], lin->slope_ohm, lin->lsq.stderr_[1],
               lin->lsq.r_squared, lin->lsq.rse * 1e3);
    if (sh) {
        printf("shockley  ideality = %.5g   saturation_a = %.4g A   series_ohm = %.5g ohm "
               "(+- %.2g)\n"
               "          at %g C (n Vt = %.5g V +- %.2g)   R^2 = %.6f   residual standard "
               "error %.3g mV\n",
               sh->ideality, sh->saturation_a, sh->series_ohm, sh->lsq.stderr_[2],
               sh->junction_c, sh->lsq.coef[1], sh->lsq.stderr_[1], sh->lsq.r_squared,
               sh->lsq.rse * 1e3);
        if (sh->weak)
            printf("          WARNING: %s; the three parameters are poorly determined\n",
                   sh->series_ohm < 0 ? "the fitted series resistance is negative"
                                      : "fewer than 6 points or less than a decade of current");
        printf("\n");
    }
    if (fx)
        printf("flux      %s = %.5g at %.5g mA, exponent %.4g (+- %.2g), R^2 (log) = %.6f\n\n",
               relative ? "relative_pct" : "flux_lm", fx->flux_lm, fx->ref_current_a * 1e3,
               fx->exponent, fx->lsq.stderr_[1], fx->lsq.r_squared);
    printf("Paste into a profile:\n\n");
    print_section(stdout, lin, sh && !sh->weak && (!lin || sh->lsq.rse < lin->lsq.rse) ? sh : NULL,
                  fx, relative, d, junction_c);
}

static lw_status fit_table(const lw_led_fit *lin, const lw_led_fit *sh, const lw_flux_fit *fx,
                           lw_rtable_format fmt, lw_error *err)
{
    static const char *const head[] = {"model",        "threshold_v", "slope_ohm",
                                       "ideality",     "saturation_a", "series_ohm",
                                       "r_squared",    "rse_v",       "flux_lm",
                                       "flux_current_ma", "flux_exponent"};
    lw_rtable *t = lw_rtable_new(11, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = LW_OK;
    for (size_t k = 0; k < 11 && st == LW_OK; k++)
        st = lw_rtable_head(t, k, head[k], err);
    const lw_led_fit *fits[2] = {lin, sh};
    for (size_t m = 0; m < 2 && st == LW_OK; m++) {
        const lw_led_fit *f = fits[m];
        if (!f)
            continue;
        size_t r;
        st = lw_rtable_add_row(t, &r, err);
        lw_rtable_set(t, r, 0, m == 0 ? "linear" : "shockley", err);
        if (m == 0) {
            lw_rtable_setf(t, r, 1, err, "%.8g", f->threshold_v);
            lw_rtable_setf(t, r, 2, err, "%.8g", f->slope_ohm);
        } else {
            lw_rtable_setf(t, r, 3, err, "%.8g", f->ideality);
            lw_rtable_setf(t, r, 4, err, "%.8g", f->saturation_a);
            lw_rtable_setf(t, r, 5, err, "%.8g", f->series_ohm);
        }
        lw_rtable_setf(t, r, 6, err, "%.8g", f->lsq.r_squared);
        lw_rtable_setf(t, r, 7, err, "%.6g", f->lsq.rse);
        if (fx) {
            lw_rtable_setf(t, r, 8, err, "%.6g", fx->flux_lm);
            lw_rtable_setf(t, r, 9, err, "%.6g", fx->ref_current_a * 1e3);
            lw_rtable_setf(t, r, 10, err, "%.6g", fx->exponent);
        }
    }
    if (st == LW_OK && err && err->code)
        st = err->code;
    if (st == LW_OK)
        st = lw_rtable_write(t, stdout, fmt, err);
    lw_rtable_free(t);
    return st;
}

typedef struct led_args {
    common_opts o;
    bool want_lin, want_sh, section_only;
    double tj;
    const char *plot_path;
} led_args;

static int led_option(void *ctx, int id, const char *arg)
{
    led_args *a = ctx;
    switch (id) {
    case OPT_MODEL:
        a->want_lin = !strcmp(arg, "linear") || !strcmp(arg, "both");
        a->want_sh = !strcmp(arg, "shockley") || !strcmp(arg, "both");
        if (!a->want_lin && !a->want_sh)
            return usage_error("fit led", "--model takes linear, shockley or both");
        return 0;
    case OPT_JUNCTION:
        if (!lw_number_parse_double(arg, &a->tj) || a->tj < -60 || a->tj > 250)
            return usage_error("fit led", "--junction-c takes a temperature from -60 to 250");
        return 0;
    case OPT_SECTION:
        a->section_only = true;
        return 0;
    case OPT_PLOT:
        a->plot_path = arg;
        return 0;
    default:
        return common_option("fit led", &a->o, id, arg);
    }
}

typedef struct {
    const led_data *d;
    const lw_led_fit *lin, *sh;
} fit_plot_ctx;

static lw_status fit_plot_fn(FILE *fp, const void *ctx, lw_error *err)
{
    const fit_plot_ctx *c = ctx;
    return lw_plot_led_fit(fp, c->d->i_a, c->d->v, c->d->n, c->lin, c->sh, err);
}

static lw_status fit_plot(const char *path, const led_data *d, const lw_led_fit *lin,
                          const lw_led_fit *sh, lw_error *err)
{
    fit_plot_ctx c = {d, lin, sh};
    return lw_outfile_write(path, fit_plot_fn, &c, err);
}

int cli_fit_led(int argc, char **argv)
{
    led_args a = {.o = {.fmt = LW_FMT_TEXT}, .want_lin = true, .want_sh = true, .tj = 25};
    int first, rc = cli_parse(cli_find("fit led"), argc, argv, led_option, &a, &first);
    if (rc)
        return rc < 0 ? 0 : rc;
    if (first + 1 != argc)
        return usage_error("fit led", "fit led takes one measurements file");
    lw_error err;
    lw_error_clear(&err);
    led_data d = {0};
    lw_led_fit lin = {0}, sh = {0};
    lw_flux_fit fx = {0};
    const char *in[] = {argv[first]}, *outs[] = {a.plot_path}, *names[] = {"--plot"};
    lw_status st = check_outputs(NULL, in, 1, outs, names, 1, &err);
    if (st == LW_OK)
        st = read_led_data(argv[first], &d, &err);
    if (st == LW_OK && a.want_lin)
        st = lw_fit_led_linear(d.i_a, d.v, d.n, &lin, &err);
    if (st == LW_OK && a.want_sh)
        st = lw_fit_led_shockley(d.i_a, d.v, d.n, a.tj, &sh, &err);
    if (st == LW_OK && d.flux)
        st = lw_fit_flux(d.i_a, d.flux, d.n, &fx, &err);
    if (st != LW_OK && err.file[0] == '\0')
        lw_text_copy(err.file, argv[first], sizeof err.file);
    const lw_led_fit *pl = a.want_lin ? &lin : NULL, *ps = a.want_sh ? &sh : NULL;
    const lw_flux_fit *pf = d.flux ? &fx : NULL;
    if (st == LW_OK && a.plot_path)
        st = fit_plot(a.plot_path, &d, pl, ps, &err);
    if (st == LW_OK) {
        if (a.section_only)
            print_section(stdout, pl,
                          ps && !ps->weak && (!pl || ps->lsq.rse < pl->lsq.rse) ? ps : NULL, pf,
                          d.relative, &d, a.tj);
        else if (a.o.fmt == LW_FMT_TEXT)
            print_fit_text(pl, ps, pf, d.relative, &d, a.tj);
        else
            st = fit_table(pl, ps, pf, a.o.fmt, &err);
    }
    free(d.i_a);
    return st == LW_OK ? 0 : report_error(&err);
}

/* ---- fit cell ---- */

static int parse_pair(const char *s, double *a, double *b)
{
    const char *comma = strchr(s, ',');
    char first[64];
    if (!comma)
        return lw_number_parse_double(s, a) && *a > 0 ? 1 : 0;
    size_t n = (size_t)(comma - s);
    if (n >= sizeof first)
        return 0;
    memcpy(first, s, n);
    first[n] = '\0';
    return lw_number_parse_double(first, a) && lw_number_parse_double(comma + 1, b) && *a > 0 && *b > 0 ? 2
                                                                                          : 0;
}

typedef struct cell_args {
    lw_cellfit_options opt;
    double load_ohm[2], load_a[2];
    int nload;
    const char *out_path;
    char name[LW_NAME_MAX];
} cell_args;

static int cell_option(void *ctx, int id, const char *arg)
{
    cell_args *a = ctx;
    switch (id) {
    case OPT_LOAD_OHM:
    case OPT_LOAD_MA: {
        double x = NAN, y = NAN;
        int k = parse_pair(arg, &x, &y);
        if (!k || a->nload)
            return usage_error("fit cell", "give one --load-ohm or --load-ma: VALUE or V1,V2 "
                                           "(positive numbers)");
        a->nload = k;
        double *dst = id == OPT_LOAD_OHM ? a->load_ohm : a->load_a;
        double scale = id == OPT_LOAD_MA ? 1e-3 : 1.0;
        dst[0] = x * scale;
        dst[1] = (k == 2 ? y : x) * scale;
        return 0;
    }
    case OPT_CUTOFF:
        if (!lw_number_parse_double(arg, &a->opt.cutoff_v) || !(a->opt.cutoff_v > 0))
            return usage_error("fit cell", "--cutoff-v takes a positive voltage");
        return 0;
    case OPT_RES:
        if (!lw_number_parse_double(arg, &a->opt.resistance_ohm) || !(a->opt.resistance_ohm > 0))
            return usage_error("fit cell", "--resistance-ohm takes a positive resistance");
        return 0;
    case OPT_NAME:
        if (!lw_text_copy(a->name, arg, sizeof a->name))
            return usage_error("fit cell", "--name is too long (at most %d bytes)",
                               LW_NAME_MAX - 1);
        return 0;
    case OPT_OUT:
        a->out_path = arg;
        return 0;
    case OPT_CHEM: {
        int k = 0;
        while (lw_cell_chemistry_names[k] && strcmp(lw_cell_chemistry_names[k], arg) != 0)
            k++;
        if (!lw_cell_chemistry_names[k])
            return usage_error("fit cell", "--chemistry takes alkaline, nimh, nicd, li-fes2, "
                                           "li-mno2, li-ion, lifepo4, lead-acid or other");
        a->opt.chemistry = (lw_chemistry)k;
        return 0;
    }
    case OPT_RECH:
        if (strcmp(arg, "yes") != 0 && strcmp(arg, "no") != 0)
            return usage_error("fit cell", "--rechargeable takes yes or no");
        a->opt.rechargeable = !strcmp(arg, "yes");
        return 0;
    case OPT_TOL: {
        double mv;
        if (!lw_number_parse_double(arg, &mv) || !(mv > 0) || mv > 500)
            return usage_error("fit cell", "--tolerance-mv takes 0 to 500");
        a->opt.tolerance_v = mv * 1e-3;
        return 0;
    }
    default:
        return usage_error("fit cell", "unknown option");
    }
}

int cli_fit_cell(int argc, char **argv)
{
    cell_args a = {.opt = {.cutoff_v = NAN, .resistance_ohm = NAN, .tolerance_v = 0.005,
                           .chemistry = LW_CHEM_OTHER, .nominal_v = NAN},
                   .load_ohm = {NAN, NAN}, .load_a = {NAN, NAN}};
    int optind_ = 0, rc = cli_parse(cli_find("fit cell"), argc, argv, cell_option, &a, &optind_);
    if (rc)
        return rc < 0 ? 0 : rc;
    lw_cellfit_options opt = a.opt;
    const char *out_path = a.out_path;
    char *name = a.name;
    double *load_ohm = a.load_ohm, *load_a = a.load_a;
    int nlogs = argc - optind_;
    if (nlogs < 1 || nlogs > 2)
        return usage_error("fit cell", "fit cell takes one or two discharge logs");
    if (isnan(opt.cutoff_v))
        return usage_error("fit cell", "give the end-point voltage with --cutoff-v");
    if (!name[0] && out_path) {
        const char *base = strrchr(out_path, '/');
        snprintf(name, LW_NAME_MAX, "%s", base ? base + 1 : out_path);
        char *dot = strstr(name, ".ini");
        if (dot)
            *dot = '\0';
    }
    opt.name = name[0] ? name : "fitted-cell";
    lw_error err;
    lw_error_clear(&err);
    lw_cellfit_log logs[2];
    memset(logs, 0, sizeof logs);
    const char *in[2] = {argv[optind_], nlogs > 1 ? argv[optind_ + 1] : NULL};
    const char *outs[] = {out_path}, *names[] = {"--out"};
    lw_status st = check_outputs(NULL, in, 2, outs, names, 1, &err);
    for (int k = 0; k < nlogs && st == LW_OK; k++)
        st = lw_cellfit_log_read(argv[optind_ + k], load_ohm[k], load_a[k], &logs[k], &err);
    lw_cellfit fit;
    memset(&fit, 0, sizeof fit);
    if (st == LW_OK)
        st = lw_cellfit_fit(logs, (size_t)nlogs, &opt, &fit, &err);
    if (st == LW_OK) {
        const lw_cell *cl = &fit.cell;
        printf("cell %s from %d log%s, end point %g V\n", cl->name, nlogs, nlogs > 1 ? "s" : "",
               opt.cutoff_v);
        for (int k = 0; k < nlogs; k++)
            printf("  %s: %.5g mAh in %.4g h, mean %.5g mA\n", argv[optind_ + k],
                   fit.capacity_ah[k] * 1e3, fit.hours[k], fit.mean_a[k] * 1e3);
        printf("  capacity_mah %.5g at rated_ma %.5g\n", cl->capacity_ah * 1e3,
               cl->rated_a * 1e3);
        if (fit.peukert_estimated)
            printf("  peukert %.4g from the two capacities%s\n", cl->peukert,
                   fit.peukert_clamped ? " (clamped to 1..2: check the logs)" : "");
        else
            printf("  peukert 1 (one log: the rate effect is not measured)\n");
        double rmin = cl->res->y[0], rmax = rmin;
        for (size_t i = 1; i < cl->res->n; i++) {
            rmin = fmin(rmin, cl->res->y[i]);
            rmax = fmax(rmax, cl->res->y[i]);
        }
        printf("  internal resistance %.4g to %.4g ohm%s\n", rmin, rmax,
               nlogs == 1 ? " (as given by --resistance-ohm)" : " (from the two loads)");
        printf("  curve: %zu points kept of %zu, within %.2g mV of the logs' curve\n",
               cl->ocv->n, fit.dense_points, fit.max_dev_v * 1e3);
        if (out_path) {
            char comment[1024];
            time_t now = time(NULL);
            struct tm tmv;
            char date[32] = "";
            if (gmtime_r(&now, &tmv))
                strftime(date, sizeof date, "%Y-%m-%d", &tmv);
            snprintf(comment, sizeof comment,
                     "Fitted by lampwick fit cell on %s from %s%s%s, end point %g V.\n"
                     "Measured data of one sample: check it against further samples and the "
                     "maker's data.",
                     date, argv[optind_], nlogs > 1 ? " and " : "", nlogs > 1 ? argv[optind_ + 1] : "",
                     opt.cutoff_v);
            st = lw_cellfile_save(out_path, cl, comment, &err);
            if (st == LW_OK)
                printf("  wrote %s and its curve\n", out_path);
        }
    }
    int code = st == LW_OK ? 0 : report_error(&err);
    lw_cell_clear(&fit.cell);
    for (int k = 0; k < 2; k++)
        lw_cellfit_log_clear(&logs[k]);
    return code;
}
