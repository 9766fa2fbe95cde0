/*
 * cli_fit.c - `lampwick fit led` and `lampwick fit cell`: bench measurements
 * to model data.  Reads the files, calls fit.c / cellfit.c, prints, writes.
 */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include "cli_common.h"

const char *const lw_fit_help =
    "Usage: lampwick fit led MEASUREMENTS.csv [OPTIONS]\n"
    "       lampwick fit cell LOG.csv [LOG2.csv] (--load-ohm R[,R2] | --load-ma I[,I2])\n"
    "                         --cutoff-v V [OPTIONS]\n"
    "\n"
    "fit led: least-squares fits of an LED's measured current and voltage\n"
    "(columns current_ma, forward_v; optionally flux_lm or relative_pct):\n"
    "  linear    V = threshold_v + slope_ohm * I\n"
    "  shockley  V = n Vt ln(I/Is) + Rs I, linear in (1, ln I, I), solved by QR\n"
    "  flux      flux = flux_lm (I/I_ref)^exponent, in log-log\n"
    "with R^2, the residual standard error and standard errors, and an [led]\n"
    "section ready to paste into a profile.\n"
    "  --model linear|shockley|both  (default both)\n"
    "  --junction-c T            junction temperature of the measurements (default 25)\n"
    "  --write-profile-section   print only the [led] section\n"
    "  --plot FILE.svg           points, fitted curves and residuals\n"
    "  --format text|csv|md\n"
    "\n"
    "fit cell: a cell file from discharge logs (columns time_s, voltage_v and\n"
    "optionally current_ma) into a constant resistance or current. The charge\n"
    "removed is integrated to the end point; with two logs at different loads\n"
    "the internal resistance against depth comes from the voltage difference at\n"
    "equal depth and the Peukert exponent from the two capacities.\n"
    "  --load-ohm R[,R2]         constant-resistance load of each log\n"
    "  --load-ma I[,I2]          constant-current load of each log\n"
    "  --cutoff-v V              end-point voltage (required)\n"
    "  --resistance-ohm R        internal resistance, with a single log\n"
    "  --name NAME               cell name (default: the output file's name)\n"
    "  --out FILE.ini            write the cell file and FILE.curve.csv\n"
    "  --chemistry CHEM          alkaline, nimh, li-ion, ... (default other)\n"
    "  --rechargeable yes|no     (default no)\n"
    "  --tolerance-mv T          curve thinning tolerance (default 5 mV)\n";

enum { OPT_MODEL = 2000, OPT_JUNCTION, OPT_SECTION, OPT_LOAD_OHM, OPT_LOAD_MA, OPT_CUTOFF,
       OPT_RES, OPT_NAME, OPT_OUT, OPT_CHEM, OPT_RECH, OPT_TOL };

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
    lw_status st = lw_csv_read(path, &csv, err);
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
    double *buf = st == LW_OK ? malloc(3 * n * sizeof *buf) : NULL;
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
                          const lw_flux_fit *fx, bool relative, const led_data *d)
{
    fprintf(fp, "[led]\n");
    if (sh) {
        fprintf(fp, "model = shockley\nideality = %.5g\nsaturation_a = %.5g\nseries_ohm = %.5g\n"
                    "junction_c = %g\n",
                sh->ideality, sh->saturation_a, sh->series_ohm, sh->junction_c);
    } else {
        fprintf(fp, "model = linear\nthreshold_v = %.5g\nslope_ohm = %.5g\n", lin->threshold_v,
                lin->slope_ohm);
    }
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

static lw_status fit_plot(const char *path, const led_data *d, const lw_led_fit *lin,
                          const lw_led_fit *sh, lw_error *err)
{
    size_t n = d->n, nc = 200;
    double *b = malloc((3 * n + 4 * nc) * sizeof *b);
    if (!b)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    double *ima = b, *rl = b + n, *rs = b + 2 * n, *cx = b + 3 * n, *cl = cx + nc,
           *cs = cl + nc, *cxs = cs + nc;
    double lo = INFINITY, hi = 0;
    for (size_t k = 0; k < n; k++) {
        ima[k] = d->i_a[k] * 1e3;
        lo = fmin(lo, ima[k]);
        hi = fmax(hi, ima[k]);
    }
    for (size_t k = 0; k < n; k++) {
        double i = d->i_a[k];
        rl[k] = lin ? 1e3 * (d->v[k] - (lin->threshold_v + lin->slope_ohm * i)) : NAN;
        rs[k] = sh ? 1e3 * (d->v[k] - (sh->lsq.coef[0] + sh->lsq.coef[1] * log(i) +
                                       sh->lsq.coef[2] * i))
                   : NAN;
    }
    bool logx = hi > 20 * lo;
    for (size_t k = 0; k < nc; k++) {
        double u = (double)k / (nc - 1);
        cx[k] = cxs[k] = logx ? lo * pow(hi / lo, u) : lo + u * (hi - lo);
        double i = cx[k] * 1e-3;
        cl[k] = lin ? lin->threshold_v + lin->slope_ohm * i : NAN;
        cs[k] = sh ? sh->lsq.coef[0] + sh->lsq.coef[1] * log(i) + sh->lsq.coef[2] * i : NAN;
    }
    lw_chart c = {0};
    c.title = "LED forward voltage: measurements and fitted models";
    c.x = (lw_axis){.label = "current (mA)", .log = logx};
    c.npanels = 2;
    lw_panel *p = &c.panels[0];
    p->y = (lw_axis){.label = "forward voltage (V)"};
    p->series[p->nseries++] = (lw_series){.name = "measured", .x = ima, .y = d->v, .n = n,
                                          .points = true, .colour = 1};
    if (lin)
        p->series[p->nseries++] =
            (lw_series){.name = "linear fit", .x = cx, .y = cl, .n = nc, .colour = 2};
    if (sh)
        p->series[p->nseries++] = (lw_series){.name = "Shockley fit", .x = cxs, .y = cs,
                                              .n = nc, .dashed = true, .colour = 3};
    p->height_share = 1.5;
    p = &c.panels[1];
    p->y = (lw_axis){.label = "residual (mV)"};
    if (lin)
        p->series[p->nseries++] = (lw_series){.name = "linear", .x = ima, .y = rl, .n = n,
                                              .points = true, .colour = 2};
    if (sh)
        p->series[p->nseries++] = (lw_series){.name = "Shockley", .x = ima, .y = rs, .n = n,
                                              .points = true, .colour = 3};
    p->refs[p->nrefs++] = (lw_refline){0.0, "zero"};
    lw_status st = write_chart(path, &c, err);
    free(b);
    return st;
}

static void print_fit_text(const lw_led_fit *lin, const lw_led_fit *sh, const lw_flux_fit *fx,
                           bool relative, const led_data *d)
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
                  fx, relative, d);
}

static lw_status fit_table(const lw_led_fit *lin, const lw_led_fit *sh, const lw_flux_fit *fx,
                           lw_format fmt, lw_error *err)
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

static int fit_led(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"model", required_argument, NULL, OPT_MODEL},
        {"junction-c", required_argument, NULL, OPT_JUNCTION},
        {"write-profile-section", no_argument, NULL, OPT_SECTION},
        {"plot", required_argument, NULL, OPT_PLOT},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    common_opts o = {.fmt = LW_FMT_TEXT};
    bool want_lin = true, want_sh = true, section_only = false;
    double tj = 25;
    const char *plot_path = NULL;
    int c, rc = 0;
    while ((c = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
        switch (c) {
        case 'h':
            fputs(lw_fit_help, stdout);
            return 0;
        case OPT_MODEL:
            want_lin = !strcmp(optarg, "linear") || !strcmp(optarg, "both");
            want_sh = !strcmp(optarg, "shockley") || !strcmp(optarg, "both");
            if (!want_lin && !want_sh)
                return usage_error("fit", "--model takes linear, shockley or both");
            break;
        case OPT_JUNCTION:
            if (!lw_parse_double(optarg, &tj) || tj < -60 || tj > 250)
                return usage_error("fit", "--junction-c takes a temperature from -60 to 250");
            break;
        case OPT_SECTION:
            section_only = true;
            break;
        case OPT_PLOT:
            plot_path = optarg;
            break;
        default:
            if (!common_option(c, &o, "fit", &rc))
                return usage_error("fit", "unknown option");
            if (rc)
                return rc;
        }
    }
    if (optind + 1 != argc)
        return usage_error("fit", "fit led takes one measurements file");
    lw_error err;
    lw_error_clear(&err);
    led_data d;
    lw_led_fit lin = {0}, sh = {0};
    lw_flux_fit fx = {0};
    lw_status st = read_led_data(argv[optind], &d, &err);
    if (st == LW_OK && want_lin)
        st = lw_fit_led_linear(d.i_a, d.v, d.n, &lin, &err);
    if (st == LW_OK && want_sh)
        st = lw_fit_led_shockley(d.i_a, d.v, d.n, tj, &sh, &err);
    if (st == LW_OK && d.flux)
        st = lw_fit_flux(d.i_a, d.flux, d.n, &fx, &err);
    if (st != LW_OK && err.file[0] == '\0')
        lw_strlcpy(err.file, argv[optind], sizeof err.file);
    const lw_led_fit *pl = want_lin ? &lin : NULL, *ps = want_sh ? &sh : NULL;
    const lw_flux_fit *pf = d.flux ? &fx : NULL;
    if (st == LW_OK && plot_path)
        st = fit_plot(plot_path, &d, pl, ps, &err);
    if (st == LW_OK) {
        if (section_only)
            print_section(stdout, pl, ps && !ps->weak && (!pl || ps->lsq.rse < pl->lsq.rse) ? ps
                                                                                        : NULL,
                          pf, d.relative, &d);
        else if (o.fmt == LW_FMT_TEXT)
            print_fit_text(pl, ps, pf, d.relative, &d);
        else
            st = fit_table(pl, ps, pf, o.fmt, &err);
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
        return lw_parse_double(s, a) && *a > 0 ? 1 : 0;
    size_t n = (size_t)(comma - s);
    if (n >= sizeof first)
        return 0;
    memcpy(first, s, n);
    first[n] = '\0';
    return lw_parse_double(first, a) && lw_parse_double(comma + 1, b) && *a > 0 && *b > 0 ? 2
                                                                                          : 0;
}

static int fit_cell(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"load-ohm", required_argument, NULL, OPT_LOAD_OHM},
        {"load-ma", required_argument, NULL, OPT_LOAD_MA},
        {"cutoff-v", required_argument, NULL, OPT_CUTOFF},
        {"resistance-ohm", required_argument, NULL, OPT_RES},
        {"name", required_argument, NULL, OPT_NAME},
        {"out", required_argument, NULL, OPT_OUT},
        {"chemistry", required_argument, NULL, OPT_CHEM},
        {"rechargeable", required_argument, NULL, OPT_RECH},
        {"tolerance-mv", required_argument, NULL, OPT_TOL},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    lw_cellfit_options opt = {.cutoff_v = NAN, .resistance_ohm = NAN, .tolerance_v = 0.005,
                              .chemistry = LW_CHEM_OTHER, .nominal_v = NAN};
    double load_ohm[2] = {NAN, NAN}, load_a[2] = {NAN, NAN};
    int nload = 0, c;
    const char *out_path = NULL;
    char name[LW_NAME_MAX] = "";
    while ((c = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
        switch (c) {
        case 'h':
            fputs(lw_fit_help, stdout);
            return 0;
        case OPT_LOAD_OHM:
        case OPT_LOAD_MA: {
            double a = NAN, b = NAN;
            int k = parse_pair(optarg, &a, &b);
            if (!k || nload)
                return usage_error("fit", "give one --load-ohm or --load-ma: VALUE or V1,V2 "
                                          "(positive numbers)");
            nload = k;
            double *dst = c == OPT_LOAD_OHM ? load_ohm : load_a;
            double scale = c == OPT_LOAD_MA ? 1e-3 : 1.0;
            dst[0] = a * scale;
            dst[1] = (k == 2 ? b : a) * scale;
            break;
        }
        case OPT_CUTOFF:
            if (!lw_parse_double(optarg, &opt.cutoff_v) || !(opt.cutoff_v > 0))
                return usage_error("fit", "--cutoff-v takes a positive voltage");
            break;
        case OPT_RES:
            if (!lw_parse_double(optarg, &opt.resistance_ohm) || !(opt.resistance_ohm > 0))
                return usage_error("fit", "--resistance-ohm takes a positive resistance");
            break;
        case OPT_NAME:
            if (!lw_strlcpy(name, optarg, sizeof name))
                return usage_error("fit", "--name is too long");
            break;
        case OPT_OUT:
            out_path = optarg;
            break;
        case OPT_CHEM: {
            int k = 0;
            while (lw_chemistry_names[k] && strcmp(lw_chemistry_names[k], optarg) != 0)
                k++;
            if (!lw_chemistry_names[k])
                return usage_error("fit", "--chemistry takes alkaline, nimh, nicd, li-fes2, "
                                          "li-mno2, li-ion, lifepo4, lead-acid or other");
            opt.chemistry = (lw_chemistry)k;
            break;
        }
        case OPT_RECH:
            if (strcmp(optarg, "yes") != 0 && strcmp(optarg, "no") != 0)
                return usage_error("fit", "--rechargeable takes yes or no");
            opt.rechargeable = !strcmp(optarg, "yes");
            break;
        case OPT_TOL: {
            double mv;
            if (!lw_parse_double(optarg, &mv) || !(mv > 0) || mv > 500)
                return usage_error("fit", "--tolerance-mv takes 0 to 500");
            opt.tolerance_v = mv * 1e-3;
            break;
        }
        default:
            return usage_error("fit", "unknown option");
        }
    }
    int nlogs = argc - optind;
    if (nlogs < 1 || nlogs > 2)
        return usage_error("fit", "fit cell takes one or two discharge logs");
    if (isnan(opt.cutoff_v))
        return usage_error("fit", "give the end-point voltage with --cutoff-v");
    if (!name[0] && out_path) {
        const char *base = strrchr(out_path, '/');
        snprintf(name, sizeof name, "%s", base ? base + 1 : out_path);
        char *dot = strstr(name, ".ini");
        if (dot)
            *dot = '\0';
    }
    opt.name = name[0] ? name : "fitted-cell";
    lw_error err;
    lw_error_clear(&err);
    lw_dlog logs[2];
    memset(logs, 0, sizeof logs);
    lw_status st = LW_OK;
    for (int k = 0; k < nlogs && st == LW_OK; k++)
        st = lw_dlog_read(argv[optind + k], load_ohm[k], load_a[k], &logs[k], &err);
    lw_cellfit fit;
    memset(&fit, 0, sizeof fit);
    if (st == LW_OK)
        st = lw_fit_cell(logs, (size_t)nlogs, &opt, &fit, &err);
    if (st == LW_OK) {
        const lw_cell *cl = &fit.cell;
        printf("cell %s from %d log%s, end point %g V\n", cl->name, nlogs, nlogs > 1 ? "s" : "",
               opt.cutoff_v);
        for (int k = 0; k < nlogs; k++)
            printf("  %s: %.5g mAh in %.4g h, mean %.5g mA\n", argv[optind + k],
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
                     date, argv[optind], nlogs > 1 ? " and " : "", nlogs > 1 ? argv[optind + 1] : "",
                     opt.cutoff_v);
            st = lw_cell_save(out_path, cl, comment, &err);
            if (st == LW_OK)
                printf("  wrote %s and its curve\n", out_path);
        }
    }
    int code = st == LW_OK ? 0 : report_error(&err);
    lw_cell_clear(&fit.cell);
    for (int k = 0; k < 2; k++)
        lw_dlog_clear(&logs[k]);
    return code;
}

int lw_cmd_fit(int argc, char **argv)
{
    if (argc < 2 || (strcmp(argv[1], "led") != 0 && strcmp(argv[1], "cell") != 0)) {
        if (argc >= 2 && (!strcmp(argv[1], "-h") || !strcmp(argv[1], "--help"))) {
            fputs(lw_fit_help, stdout);
            return 0;
        }
        return usage_error("fit", "say what to fit: 'fit led FILE' or 'fit cell LOG...'");
    }
    optind = 1;
    return !strcmp(argv[1], "led") ? fit_led(argc - 1, argv + 1) : fit_cell(argc - 1, argv + 1);
}
