/*
 * cli.c - the lampwick command: subcommands, options, printing, exit codes.
 *
 * Owns everything the user sees that is not a table or plot: help texts,
 * error lines ("lampwick: file:line: message"), and the mapping of library
 * status codes to exit codes (see cli.h).  No computation happens here.
 */
#include "cli.h"
#include "cli_common.h"

#include <getopt.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include "lampwick.h"
#include "lw_config.h"


static const char *const safety_text =
    "Safety\n"
    "  Lithium cells can overheat, vent and burn when shorted, over-discharged, charged\n"
    "  wrongly or mixed with cells of another type, age or charge. Resistors and drivers\n"
    "  get hot: check their power and temperature in the real enclosure. Bright LEDs can\n"
    "  harm eyes (see IEC 62471). lampwick's figures are estimates from typical data:\n"
    "  follow the cell maker's limits, the applicable safety standards (for example\n"
    "  IEC 62133-2 for lithium-ion cells) and local codes, and have a product checked\n"
    "  by qualified people.\n";

static const char *const main_help =
    "lampwick - runtime and brightness of battery-powered LED lights\n"
    "\n"
    "Usage: lampwick COMMAND [ARGS...]\n"
    "\n"
    "Commands\n"
    "  run PROFILE      discharge the cells to the cutoff: runtime, output, energy\n"
    "  sweep PROFILE    run a grid of values (--vary KEY=VALUES) and plot the trade-off\n"
    "  pick PROFILE     choose the series resistor, with worst-case checks\n"
    "  size PROFILE     find the packs that meet a runtime\n"
    "  table PROFILE    runtime table of a product specification, per mode and cell\n"
    "  fit led FILE     fit LED I-V and light output to bench measurements\n"
    "  fit cell LOG...  make a cell file from one or two discharge logs\n"
    "  check PROFILE... load and validate profiles and everything they name\n"
    "  cells            list the cell library\n"
    "  help [COMMAND]   this text, or the help of one command\n"
    "  help keys        every key of light profiles and cell files\n"
    "\n"
    "Options\n"
    "  -h, --help       show help\n"
    "  -V, --version    show the version\n"
    "\n"
    "Cell names are looked up in the profile's folder, then in the folders of\n"
    "LAMPWICK_CELLS (colon-separated), then in the installed cell library.\n"
    "\n"
    "Exit status: 0 success, 1 no answer (the light never lights, nothing fits),\n"
    "2 bad usage or bad input.\n";

static const char *const run_help =
    "Usage: lampwick run PROFILE [OPTIONS]\n"
    "\n"
    "Discharge the light's cells from fresh to the cutoff, re-solving the LED\n"
    "operating point at every step, and report the runtime, the output over time\n"
    "and where the energy went.\n"
    "\n"
    "Options\n"
    "  --set SECTION.KEY=VALUE  override a profile value (repeatable)\n"
    "  --mode NAME              apply the overrides of [mode NAME]\n"
    "  --format text|csv|md     report format (default text)\n"
    "  --trace FILE.csv         write the discharge as a CSV time series\n"
    "  --plot FILE.svg          write a chart of output and pack voltage\n"
    "  --stored-months M        start after M months on the shelf: the cells'\n"
    "                           self-discharge and the drive's standby drain\n"
    "\n"
    "The run ends at the first of: output at cutoff.relative_pct % of the output\n"
    "30 s after switch-on, output at cutoff.flux_lm, loaded cell voltage at\n"
    "cutoff.cell_v, or the cells fully discharged.\n";

static const char *const check_help =
    "Usage: lampwick check PROFILE... [--set SECTION.KEY=VALUE] [--mode NAME]\n"
    "\n"
    "Load each profile, the cell file and the tables it names, and every mode,\n"
    "and print a short normalised summary, or the first error of each with its\n"
    "file and line.\n";

static const char *const cells_help =
    "Usage: lampwick cells [--format text|csv|md]\n"
    "\n"
    "List the cell files found along the search path: name, chemistry, nominal\n"
    "voltage, capacity at the rated current, end-point voltage, rechargeable.\n"
    "The values are typical, from handbooks; replace them with the maker's data\n"
    "or your own measurements for a product.\n";

/* ---- shared helpers ---- */

int exit_code(lw_status st)
{
    switch (st) {
    case LW_OK:
        return 0;
    case LW_ENOANSWER:
    case LW_ENUMERIC:
        return EXIT_NOANSWER;
    default:
        return EXIT_BADINPUT;
    }
}

int report_error(const lw_error *err)
{
    char buf[LW_ERR_FILE_MAX + LW_ERR_MSG_MAX + 32];
    lw_error_format(err, buf, sizeof buf);
    fprintf(stderr, "lampwick: %s\n", buf);
    return exit_code(err->code);
}

int usage_error(const char *cmd, const char *msg)
{
    fprintf(stderr, "lampwick %s: %s\nTry 'lampwick help %s'.\n", cmd, msg, cmd);
    return EXIT_BADINPUT;
}

static bool file_exists(const char *path)
{
    struct stat sb;
    return stat(path, &sb) == 0;
}

/* The cell search path: LAMPWICK_CELLS, the installed library, and the
 * source tree's cells/ when this executable runs from a meson build folder. */
void build_search(lw_search *s)
{
    memset(s, 0, sizeof *s);
    lw_search_add_list(s, getenv("LAMPWICK_CELLS"));
    char exe[PATH_MAX], dir[PATH_MAX], probe[PATH_MAX + 32];
    ssize_t n = readlink("/proc/self/exe", exe, sizeof exe - 1);
    bool in_build = false;
    if (n > 0) {
        exe[n] = '\0';
        lw_path_dir(dir, sizeof dir, exe);
        snprintf(probe, sizeof probe, "%s/../build.ninja", dir);
        in_build = file_exists(probe);
        snprintf(probe, sizeof probe, "%s/build.ninja", dir);
        in_build = in_build || file_exists(probe);
    }
    lw_search_add(s, LW_DATADIR "/cells");
    if (in_build)
        lw_search_add(s, LW_SOURCE_CELLS);
}


/* Handle an option shared by several commands; false if not one of them. */
bool common_option(int c, common_opts *o, const char *cmd, int *rc)
{
    switch (c) {
    case OPT_SET:
        if (o->nsets == sizeof o->sets / sizeof o->sets[0]) {
            *rc = usage_error(cmd, "too many --set options");
            return true;
        }
        o->sets[o->nsets++] = optarg;
        return true;
    case OPT_MODE:
        o->mode = optarg;
        return true;
    case OPT_FORMAT:
        if (!lw_format_parse(optarg, &o->fmt))
            *rc = usage_error(cmd, "--format takes text, csv or md");
        return true;
    default:
        return false;
    }
}

/* Load a profile, apply --mode and --set, and resolve. */
lw_status load_profile(const char *path, const common_opts *o, lw_profile *prof,
                              lw_error *err)
{
    lw_search search;
    build_search(&search);
    lw_status st = lw_profile_load(path, &search, prof, err);
    if (st == LW_OK && o->mode)
        st = lw_profile_apply_mode(prof, o->mode, err);
    for (size_t i = 0; st == LW_OK && i < o->nsets; i++)
        st = lw_profile_set_arg(prof, o->sets[i], err);
    if (st == LW_OK && (o->mode || o->nsets))
        st = lw_profile_resolve(prof, err);
    return st;
}

lw_status write_chart(const char *path, const lw_chart *chart, lw_error *err)
{
    lw_outfile out;
    lw_status st = lw_outfile_open(&out, path, err);
    if (st != LW_OK)
        return st;
    st = lw_plot_svg(out.fp, chart, err);
    if (st != LW_OK) {
        lw_outfile_abort(&out);
        return st;
    }
    return lw_outfile_commit(&out, err);
}

/* ---- check ---- */

static void print_summary(const lw_profile *p)
{
    const lw_light *l = &p->light;
    const lw_led *led = &l->led;
    const lw_drive *d = &l->drive;
    printf("%s: ok\n", p->path);
    printf("  light   %s%s%s\n", l->name, p->mode[0] ? ", mode " : "", p->mode);
    printf("  pack    %d x %s: %d in series, %d in parallel, %g C (%s)\n",
           l->pack.series * l->pack.parallel, l->pack.cell.name, l->pack.series,
           l->pack.parallel, l->pack.ambient_c, p->cell_path);
    printf("  led     %d string%s of %d; ", led->strings, led->strings == 1 ? "" : "s",
           led->count);
    switch (led->model) {
    case LW_LED_CONSTANT:
        printf("constant %g V", led->forward_v);
        break;
    case LW_LED_LINEAR:
        printf("linear %g V + %g ohm x I", led->threshold_v, led->slope_ohm);
        break;
    case LW_LED_SHOCKLEY:
        printf("shockley n = %g, Is = %g A, Rs = %g ohm at %g C", led->ideality,
               led->saturation_a, led->series_ohm, led->junction_c);
        break;
    case LW_LED_TABLE:
    default:
        printf("table of %zu points (%s)", led->iv->n, p->iv_file);
        break;
    }
    if (led->flux)
        printf("; flux table of %zu points (%s)", led->flux->n, p->flux_file);
    else
        printf("; %g lm at %g mA, exponent %g", led->flux_lm, led->flux_current_a * 1e3,
               led->flux_exponent);
    printf("; max %g mA\n", led->max_current_a * 1e3);
    printf("  drive   %s", lw_drive_type_names[d->type]);
    if (d->type == LW_DRIVE_RESISTOR || d->resistor_ohm > 0)
        printf(" %g ohm +-%g %%", d->resistor_ohm, d->tolerance_pct);
    if (d->rating_w > 0)
        printf(", rated %g W", d->rating_w);
    if (d->type != LW_DRIVE_RESISTOR)
        printf(", set %g mA", d->set_a * 1e3);
    if (d->type == LW_DRIVE_LINEAR_CC)
        printf(", dropout %g V", d->dropout_v);
    if (d->type == LW_DRIVE_CONVERTER) {
        if (d->efficiency)
            printf(", efficiency table (%s)", p->efficiency_file);
        else
            printf(", efficiency %g %%", d->efficiency_pct);
    }
    if (d->duty_pct < 100)
        printf(", PWM %g %%", d->duty_pct);
    printf("\n  cutoff  %g %% of the 30-s output", l->cutoff.relative_pct);
    if (l->cutoff.flux_lm > 0)
        printf(", %g lm", l->cutoff.flux_lm);
    printf(", %g V per cell loaded\n", l->cutoff.cell_v);
    size_t nm = lw_profile_mode_count(p);
    if (nm) {
        printf("  modes  ");
        for (size_t i = 0; i < nm; i++)
            printf(" %s", lw_profile_mode_name(p, i));
        printf("\n");
    }
}

static int cmd_check(int argc, char **argv)
{
    static const struct option longopts[] = {{"set", required_argument, NULL, OPT_SET},
                                             {"mode", required_argument, NULL, OPT_MODE},
                                             {"help", no_argument, NULL, 'h'},
                                             {NULL, 0, NULL, 0}};
    common_opts o = {.fmt = LW_FMT_TEXT};
    int c, rc = 0;
    while ((c = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
        if (c == 'h') {
            fputs(check_help, stdout);
            return 0;
        }
        if (!common_option(c, &o, "check", &rc))
            return usage_error("check", "unknown option");
        if (rc)
            return rc;
    }
    if (optind >= argc)
        return usage_error("check", "name at least one profile");
    int worst = 0;
    for (int i = optind; i < argc; i++) {
        lw_profile prof;
        lw_error err;
        lw_error_clear(&err);
        lw_status st = load_profile(argv[i], &o, &prof, &err);
        if (st == LW_OK)
            print_summary(&prof);
        else {
            int code = report_error(&err);
            if (code > worst)
                worst = code;
        }
        lw_profile_clear(&prof);
    }
    return worst;
}

/* ---- cells ---- */

static int cmd_cells(int argc, char **argv)
{
    static const struct option longopts[] = {{"format", required_argument, NULL, OPT_FORMAT},
                                             {"help", no_argument, NULL, 'h'},
                                             {NULL, 0, NULL, 0}};
    common_opts o = {.fmt = LW_FMT_TEXT};
    int c, rc = 0;
    while ((c = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
        if (c == 'h') {
            fputs(cells_help, stdout);
            return 0;
        }
        if (!common_option(c, &o, "cells", &rc))
            return usage_error("cells", "unknown option");
        if (rc)
            return rc;
    }
    if (optind < argc)
        return usage_error("cells", "takes no arguments");
    lw_search search;
    build_search(&search);
    lw_error err;
    lw_error_clear(&err);
    char **names = NULL, **paths = NULL;
    size_t n = 0;
    lw_status st = lw_cell_names(&search, &names, &paths, &n, &err);
    if (st != LW_OK)
        return report_error(&err);
    static const char *const head[] = {"name",        "chemistry", "nominal_v", "capacity_mah",
                                       "rated_ma",    "cutoff_v",  "rechargeable", "mass_g"};
    lw_rtable *t = lw_rtable_new(8, &err);
    for (size_t k = 0; t && k < 8; k++)
        lw_rtable_head(t, k, head[k], &err);
    int bad = 0;
    for (size_t i = 0; t && i < n; i++) {
        lw_cell cell;
        lw_error cerr;
        lw_error_clear(&cerr);
        if (lw_cell_load(paths[i], &cell, &cerr) != LW_OK) {
            bad = report_error(&cerr);
            continue;
        }
        size_t row;
        if (lw_rtable_add_row(t, &row, &err) == LW_OK) {
            lw_rtable_set(t, row, 0, names[i], &err);
            lw_rtable_set(t, row, 1, lw_chemistry_names[cell.chemistry], &err);
            lw_rtable_setf(t, row, 2, &err, "%g", cell.nominal_v);
            lw_rtable_setf(t, row, 3, &err, "%g", cell.capacity_ah * 1e3);
            lw_rtable_setf(t, row, 4, &err, "%g", cell.rated_a * 1e3);
            lw_rtable_setf(t, row, 5, &err, "%g", cell.cutoff_v);
            lw_rtable_set(t, row, 6, cell.rechargeable ? "yes" : "no", &err);
            if (cell.mass_g > 0)
                lw_rtable_setf(t, row, 7, &err, "%g", cell.mass_g);
        }
        lw_cell_clear(&cell);
    }
    if (t && o.fmt != LW_FMT_CSV) {
        lw_rtable_note(t, "Typical values from handbooks and standards, not any maker's data; "
                          "replace them with measured data for a product.",
                       &err);
    }
    if (t && err.code == LW_OK)
        lw_rtable_write(t, stdout, o.fmt, &err);
    lw_rtable_free(t);
    lw_cell_names_free(names, paths, n);
    if (err.code != LW_OK)
        return report_error(&err);
    if (n == 0) {
        fprintf(stderr, "lampwick: no cell files found; set LAMPWICK_CELLS\n");
        return EXIT_BADINPUT;
    }
    return bad;
}

/* ---- run ---- */

static lw_status write_trace(const char *path, const lw_trace *tr, lw_error *err)
{
    lw_outfile out;
    lw_status st = lw_outfile_open(&out, path, err);
    if (st != LW_OK)
        return st;
    static const char *const head[] = {"time_h",  "depth_pct", "pack_v",     "cell_v",
                                       "ocv_cell_v", "led_ma", "led_v",      "resistor_w",
                                       "led_w",   "driver_w",  "flux_lm",    "flux_pct"};
    lw_csvw w;
    lw_csvw_init(&w, out.fp);
    for (size_t k = 0; k < sizeof head / sizeof head[0]; k++)
        lw_csvw_text(&w, head[k]);
    lw_csvw_end_row(&w);
    for (size_t i = 0; i < tr->n; i++) {
        const lw_point *p = &tr->rows[i].pt;
        lw_csvw_num(&w, tr->rows[i].t_h, 9);
        lw_csvw_num(&w, 100.0 * p->depth, 9);
        lw_csvw_num(&w, p->pack_v, 6);
        lw_csvw_num(&w, p->cell_v, 6);
        lw_csvw_num(&w, p->ocv_v, 6);
        lw_csvw_num(&w, p->led_a * 1e3, 6);
        lw_csvw_num(&w, p->led_v, 6);
        lw_csvw_num(&w, p->p_res_w, 6);
        lw_csvw_num(&w, p->p_led_w, 6);
        lw_csvw_num(&w, p->p_drv_w, 6);
        lw_csvw_num(&w, p->flux_lm, 6);
        lw_csvw_num(&w, tr->rows[i].pct_of_ref, 6);
        lw_csvw_end_row(&w);
    }
    if (w.failed) {
        lw_outfile_abort(&out);
        return lw_error_set(err, LW_EIO, path, 0, "write error");
    }
    return lw_outfile_commit(&out, err);
}

static lw_status write_plot(const char *path, const lw_profile *prof, const lw_result *res,
                            const lw_trace *tr, lw_error *err)
{
    lw_outfile out;
    lw_status st = lw_outfile_open(&out, path, err);
    if (st != LW_OK)
        return st;
    char title[160];
    snprintf(title, sizeof title, "%s%s%s", prof->light.name, prof->mode[0] ? ", mode " : "",
             prof->mode);
    st = lw_plot_run(out.fp, title, &prof->light, res, tr, err);
    if (st != LW_OK) {
        lw_outfile_abort(&out);
        return st;
    }
    return lw_outfile_commit(&out, err);
}

static int cmd_run(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"set", required_argument, NULL, OPT_SET},   {"mode", required_argument, NULL, OPT_MODE},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"trace", required_argument, NULL, OPT_TRACE},
        {"plot", required_argument, NULL, OPT_PLOT}, {"help", no_argument, NULL, 'h'},
        {"stored-months", required_argument, NULL, OPT_STORED},
        {NULL, 0, NULL, 0}};
    common_opts o = {.fmt = LW_FMT_TEXT};
    const char *trace_path = NULL, *plot_path = NULL;
    char stored_arg[96];
    int c, rc = 0;
    while ((c = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
        if (c == 'h') {
            fputs(run_help, stdout);
            return 0;
        }
        if (c == OPT_STORED) {
            double m;
            if (!lw_parse_double(optarg, &m) || m < 0 || m > 600)
                return usage_error("run", "--stored-months takes 0 to 600");
            snprintf(stored_arg, sizeof stored_arg, "pack.stored_months=%s", optarg);
            if (o.nsets == sizeof o.sets / sizeof o.sets[0])
                return usage_error("run", "too many --set options");
            o.sets[o.nsets++] = stored_arg;
        } else if (c == OPT_TRACE)
            trace_path = optarg;
        else if (c == OPT_PLOT)
            plot_path = optarg;
        else if (!common_option(c, &o, "run", &rc))
            return usage_error("run", "unknown option");
        if (rc)
            return rc;
    }
    if (optind + 1 != argc)
        return usage_error("run", "name exactly one profile");
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_status st = load_profile(argv[optind], &o, &prof, &err);
    lw_result res = {0};
    lw_trace tr = {0};
    if (st == LW_OK) {
        lw_run_options opt = lw_run_options_default();
        opt.want_trace = trace_path || plot_path;
        st = lw_run(&prof.light, &opt, &res, &err);
        if (st != LW_OK && !err.file[0]) /* a numerical failure: say which profile */
            lw_strlcpy(err.file, prof.path, sizeof err.file);
    }
    if (st == LW_OK && (trace_path || plot_path))
        st = lw_trace_build(&prof.light, &res, 200, &tr, &err);
    if (st == LW_OK && trace_path)
        st = write_trace(trace_path, &tr, &err);
    if (st == LW_OK && plot_path)
        st = write_plot(plot_path, &prof, &res, &tr, &err);
    if (st == LW_OK)
        st = lw_report_run(stdout, o.fmt, &prof, &res, &err);
    int code = st == LW_OK ? 0 : report_error(&err);
    if (st == LW_OK && res.end_reason == LW_END_NEVER_LIT) {
        fprintf(stderr, "lampwick: %s: the LEDs never light with this pack and drive\n",
                prof.path);
        code = EXIT_NOANSWER;
    }
    lw_trace_clear(&tr);
    lw_result_clear(&res);
    lw_profile_clear(&prof);
    return code;
}

/* ---- dispatch ---- */

typedef struct command {
    const char *name;
    int (*fn)(int, char **);
    const char *const *help;
} command;

static const command commands[] = {
    {"run", cmd_run, &run_help},          {"sweep", lw_cmd_sweep, &lw_sweep_help},
    {"pick", lw_cmd_pick, &lw_pick_help}, {"size", lw_cmd_size, &lw_size_help},
    {"table", lw_cmd_table, &lw_table_help}, {"fit", lw_cmd_fit, &lw_fit_help},
    {"check", cmd_check, &check_help},
    {"cells", cmd_cells, &cells_help}};

static const char *help_of(const char *name)
{
    for (size_t i = 0; i < sizeof commands / sizeof commands[0]; i++)
        if (!strcmp(name, commands[i].name))
            return *commands[i].help;
    return NULL;
}

/* `lampwick help keys`: every key of profiles and cell files from the
 * schemas themselves, so the list cannot drift from the code. */
static void print_keys(const char *title, const lw_keydef *defs, size_t n)
{
    printf("%s\n", title);
    const char *section = "";
    for (size_t i = 0; i < n; i++) {
        if (strcmp(section, defs[i].section) != 0) {
            section = defs[i].section;
            printf("  [%s]\n", section);
        }
        char def[64] = "";
        if (defs[i].def && defs[i].def[0])
            snprintf(def, sizeof def, " (default %s)", defs[i].def);
        else if (defs[i].flags & LW_KF_REQUIRED)
            snprintf(def, sizeof def, " (required)");
        printf("    %-26s %s%s\n", defs[i].name, defs[i].help, def);
    }
}

static int help_keys(void)
{
    print_keys("Light profile keys (profiles/*.ini); [mode NAME] sections hold section.key "
               "overrides",
               lw_profile_keys, lw_profile_nkeys);
    printf("\n");
    print_keys("Cell file keys (cells/*.ini)", lw_cell_keys, lw_cell_nkeys);
    return 0;
}

int lw_cli_main(int argc, char **argv)
{
    if (argc < 2) {
        fputs(main_help, stderr);
        return EXIT_BADINPUT;
    }
    const char *cmd = argv[1];
    if (!strcmp(cmd, "--help") || !strcmp(cmd, "-h") || !strcmp(cmd, "help")) {
        if (!strcmp(cmd, "help") && argc > 2 && !strcmp(argv[2], "keys"))
            return help_keys();
        if (!strcmp(cmd, "help") && argc > 2) {
            const char *h = help_of(argv[2]);
            if (!h) {
                fprintf(stderr, "lampwick: no command '%s'; see 'lampwick help'\n", argv[2]);
                return EXIT_BADINPUT;
            }
            fputs(h, stdout);
            fputc('\n', stdout);
            fputs(safety_text, stdout);
            return 0;
        }
        fputs(main_help, stdout);
        fputc('\n', stdout);
        fputs(safety_text, stdout);
        return 0;
    }
    if (!strcmp(cmd, "--version") || !strcmp(cmd, "-V")) {
        printf("lampwick %s\n", LW_VERSION);
        return 0;
    }
    for (size_t i = 0; i < sizeof commands / sizeof commands[0]; i++) {
        if (!strcmp(cmd, commands[i].name)) {
            optind = 1;
            return commands[i].fn(argc - 1, argv + 1);
        }
    }
    fprintf(stderr, "lampwick: unknown command '%s'; see 'lampwick help'\n", cmd);
    return EXIT_BADINPUT;
}
