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
    {"total-mah", "C", OPT_TOTAL,
     "two logs: the charge at a very low drain, to fit the\nkinetic model (available_pct, "
     "recovery_per_h) too"},
    CLI_OPT_HELP,
    CLI_OPT_END};

/* ---- fit led ---- */

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
    const lw_fit_data *d;
    const lw_led_fit *lin, *sh;
} fit_plot_ctx;

static lw_status fit_plot_fn(FILE *fp, const void *ctx, lw_error *err)
{
    const fit_plot_ctx *c = ctx;
    return lw_plot_led_fit(fp, c->d->i_a, c->d->v, c->d->n, c->lin, c->sh, err);
}

static lw_status fit_plot(const char *path, const lw_fit_data *d, const lw_led_fit *lin,
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
    if (a.section_only && a.o.fmt != LW_FMT_TEXT)
        return usage_error("fit led", "--write-profile-section writes the [led] section as "
                                      "text; leave out --format");
    if ((rc = cli_out_open("fit led", &a.o)) != 0)
        return rc;
    lw_error err;
    lw_error_clear(&err);
    lw_fit_data d = {0};
    lw_led_fit lin = {0}, sh = {0};
    lw_flux_fit fx = {0};
    const char *in[] = {argv[first]}, *outs[] = {a.plot_path}, *names[] = {"--plot"};
    lw_status st = check_outputs(NULL, in, 1, outs, names, 1, &err);
    if (st == LW_OK)
        st = lw_fit_led_read(argv[first], &d, &err);
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
    if (st == LW_OK && a.section_only)
        st = lw_report_led_section(a.o.out, &d, pl, ps, pf, a.tj, &err);
    else if (st == LW_OK)
        st = lw_report_led_fit(a.o.out, a.o.fmt, &d, pl, ps, pf, a.tj, &err);
    lw_fit_data_clear(&d);
    return cli_out_close(&a.o, "fit led", argv[first], st == LW_OK ? 0 : report_error(&err));
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
    return lw_number_parse_double(first, a) && lw_number_parse_double(comma + 1, b) && *a > 0 &&
                   *b > 0
               ? 2
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
    case OPT_TOTAL: {
        double mah;
        if (!lw_number_parse_double(arg, &mah) || !(mah > 0) || mah > 1e7)
            return usage_error("fit cell", "--total-mah takes a charge above 0 mAh");
        a->opt.total_ah = mah * 1e-3;
        return 0;
    }
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
                           .chemistry = LW_CHEM_OTHER, .nominal_v = NAN, .total_ah = NAN},
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
        const char *log_names[2] = {argv[optind_], nlogs > 1 ? argv[optind_ + 1] : NULL};
        st = lw_report_cell_fit(stdout, &fit, log_names, opt.cutoff_v, &err);
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
                     date, argv[optind_], nlogs > 1 ? " and " : "",
                     nlogs > 1 ? argv[optind_ + 1] : "", opt.cutoff_v);
            if (st == LW_OK)
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
