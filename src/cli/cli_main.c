/*
 * cli_main.c - the lampwick command: dispatch, help, `check` and `cells`.
 *
 * Owns the command table (each command's synopsis, description, option
 * table and notes, from which its help is generated), the main help, the
 * safety text, `help keys` (printed from the key schemas themselves), and
 * the check and cells commands.
 */
#include "cli.h"
#include "lampwick/text.h"

#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <signal.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "lw_config.h"

void cli_safety(FILE *fp)
{
    enum { WIDTH = 84, INDENT = 2 };
    fputs("Safety\n", fp);
    size_t col = 0;
    for (const char *s = lw_report_safety; *s;) {
        size_t len = strcspn(s, " ");
        if (col && col + 1 + len > WIDTH) {
            fputc('\n', fp);
            col = 0;
        }
        if (col == 0)
            col = (size_t)fprintf(fp, "%*s", INDENT, "");
        else
            col += (size_t)fprintf(fp, " ");
        col += fwrite(s, 1, len, fp);
        s += len;
        s += strspn(s, " ");
    }
    fputc('\n', fp);
}

static const char *const main_help =
    "lampwick - runtime and brightness of battery-powered LED lights\n"
    "\n"
    "Usage: lampwick COMMAND [ARGS...]\n"
    "\n"
    "Commands\n"
    "  run PROFILE      discharge the cells to the cutoff: runtime, output, energy\n"
    "  sweep PROFILE    run a grid of values (--vary KEY=VALUES) and plot the trade-off\n"
    "  pick PROFILE     choose the series resistor, with its corners and ratings\n"
    "  size PROFILE     find the packs that meet a runtime\n"
    "  table PROFILE    runtime table of a product specification, per mode and cell\n"
    "  spread PROFILE   the spread over the units shipped: percentiles, yield, what\n"
    "                   drives it\n"
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
    "LAMPWICK_CELLS (colon-separated), then in your own $XDG_DATA_HOME/lampwick/cells\n"
    "(default ~/.local/share/lampwick/cells), then in the installed cell library.\n"
    "\n"
    "Exit status: 0 success, 1 no answer (the light gives no light, nothing fits,\n"
    "no convergence, out of memory), 2 bad usage, bad input or a failed write.\n";

/* ---- check ---- */

const cli_option cli_check_options[] = {CLI_OPT_SET, CLI_OPT_MODE, CLI_OPT_HELP, CLI_OPT_END};

static void print_summary(const lw_profile *p)
{
    const lw_light *l = &p->light;
    const lw_led *led = &l->led;
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
        printf("shockley n = %g, Is = %g A, Rs = %g ohm", led->ideality, led->saturation_a,
               led->series_ohm);
        break;
    case LW_LED_TABLE:
    default:
        printf("table of %zu points (%s)", led->iv->n, p->iv_file);
        break;
    }
    printf(", data at %g C junction", led->junction_c);
    if (led->flux)
        printf("; flux table of %zu points (%s)", led->flux->n, p->flux_file);
    else
        printf("; %g lm at %g mA, exponent %g", led->flux_lm, led->flux_current_a * 1e3,
               led->flux_exponent);
    printf("; max %g mA\n", led->max_current_a * 1e3);
    char drive[160];
    lw_report_drive(l, drive, sizeof drive);
    printf("  drive   %s", drive);
    if (l->drive.type != LW_DRIVE_CONVERTER && l->drive.resistor_ohm > 0)
        printf(" +-%g %%", l->drive.tolerance_pct);
    if (l->drive.rating_w > 0)
        printf(", rated %g W", l->drive.rating_w);
    if (l->drive.type == LW_DRIVE_LINEAR_CC)
        printf(", dropout %g V", l->drive.dropout_v);
    char ref[96];
    lw_report_reference(l, ref, sizeof ref);
    printf("\n  cutoff  %g %% of %s", l->cutoff.relative_pct, ref);
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

static int check_option(void *ctx, int id, const char *arg)
{
    return common_option("check", ctx, id, arg);
}

int cli_check(int argc, char **argv)
{
    common_opts o = {.fmt = LW_FMT_TEXT};
    int first, rc = cli_parse(cli_find("check"), argc, argv, check_option, &o, &first);
    if (rc)
        return rc < 0 ? 0 : rc;
    if (first >= argc)
        return usage_error("check", "name at least one profile");
    int worst = 0;
    for (int i = first; i < argc; i++) {
        lw_profile prof;
        lw_error err;
        lw_error_clear(&err);
        lw_status st = load_profile(argv[i], &o, &prof, &err);
        lw_mc_key keys[LW_MC_KEYS_MAX];
        size_t nkeys = 0;
        if (st == LW_OK) /* [spread] judged as `lampwick spread` would */
            st = lw_mc_keys_of_profile(&prof, keys, &nkeys, &err);
        if (st == LW_OK) {
            print_summary(&prof);
            for (size_t k = 0; k < nkeys; k++)
                printf("%s%s = %s%s", k ? "; " : "  spread  ", keys[k].key, keys[k].form,
                       k + 1 == nkeys ? "\n" : "");
        } else {
            int code = report_error(&err);
            if (code > worst)
                worst = code;
        }
        lw_profile_clear(&prof);
    }
    return worst;
}

/* ---- cells ---- */

const cli_option cli_cells_options[] = {CLI_OPT_FORMAT, CLI_OPT_QUIET, CLI_OPT_HELP, CLI_OPT_END};

static int cells_option(void *ctx, int id, const char *arg)
{
    return common_option("cells", ctx, id, arg);
}

int cli_cells(int argc, char **argv)
{
    common_opts o = {.fmt = LW_FMT_TEXT};
    int first, rc = cli_parse(cli_find("cells"), argc, argv, cells_option, &o, &first);
    if (rc)
        return rc < 0 ? 0 : rc;
    if (first < argc)
        return usage_error("cells", "takes no arguments");
    if ((rc = cli_out_open("cells", &o)) != 0)
        return rc;
    lw_search search;
    build_search(&search);
    lw_error err;
    lw_error_clear(&err);
    lw_cellfile_list list;
    lw_status st = lw_cellfile_list_read(&search, &list, &err);
    if (st != LW_OK)
        return report_error(&err);
    for (size_t i = 0; i < list.nskipped; i++)
        fprintf(stderr, "lampwick: note: %s is not a cell file (no [cell] section): skipped\n",
                list.skipped[i]);
    size_t n = list.n;
    char **names = list.names, **paths = list.paths;
    static const char *const head[] = {"name",        "chemistry", "nominal_v", "capacity_mah",
                                       "rated_ma",    "cutoff_v",  "rechargeable", "mass_g"};
    lw_rtable *t = lw_rtable_new(8, &err);
    for (size_t k = 0; t && k < 8 && st == LW_OK; k++)
        st = lw_rtable_head(t, k, head[k], &err);
    int bad = 0;
    for (size_t i = 0; t && i < n && st == LW_OK; i++) {
        lw_cell cell;
        lw_error cerr;
        lw_error_clear(&cerr);
        if (lw_cellfile_load(paths[i], &cell, &cerr) != LW_OK) {
            bad = report_error(&cerr);
            continue;
        }
        size_t row;
        st = lw_rtable_add_row(t, &row, &err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 0, names[i], &err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 1, lw_cell_chemistry_names[cell.chemistry], &err);
        const double v[] = {cell.nominal_v, cell.capacity_ah * 1e3, cell.rated_a * 1e3,
                            cell.cutoff_v};
        for (size_t k = 0; k < 4 && st == LW_OK; k++)
            st = lw_rtable_num(t, row, 2 + k, v[k], 6, &err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 6, cell.rechargeable ? "yes" : "no", &err);
        if (st == LW_OK)
            st = lw_rtable_num(t, row, 7, cell.mass_g > 0 ? cell.mass_g : NAN, 6, &err);
        lw_cell_clear(&cell);
    }
    if (t && st == LW_OK && o.fmt != LW_FMT_CSV)
        st = lw_rtable_note(t, "Typical values from handbooks and standards, not any maker's "
                               "data; replace them with measured data for a product.",
                            &err);
    if (t && st == LW_OK) {
        t->quiet = o.quiet;
        st = lw_rtable_write(t, o.out, o.fmt, &err);
    }
    lw_rtable_free(t);
    lw_cellfile_list_clear(&list);
    int code = !t || st != LW_OK ? report_error(&err) : bad;
    if (code == 0 && n == 0) {
        fprintf(stderr, "lampwick: no cell files found; set LAMPWICK_CELLS\n");
        code = EXIT_BADINPUT;
    }
    return cli_out_close(&o, "cells", NULL, code);
}

/* ---- the command table ---- */

const cli_command cli_commands[] = {
    {"run", "PROFILE [OPTIONS]",
     "Discharge the light's cells from fresh to the cutoff, re-solving the LED\n"
     "operating point at every step, and report the runtime, the output over time\n"
     "and where the energy went.\n",
     cli_run_options,
     "The run ends at the first of: output at cutoff.relative_pct % of the output\n"
     "30 s after switch-on (or of fresh cells at 20 C with cutoff.reference = fresh),\n"
     "output at cutoff.flux_lm, loaded cell voltage at cutoff.cell_v, or the cells\n"
     "fully discharged.  A light that gives no light at switch-on (never lit, cells\n"
     "already empty, output already at a cutoff) is reported as such, exit status 1.\n"
     "With pack.capacity_spread_pct the end point is the weakest cell's.  Used in\n"
     "sessions (--use or [use]) the run ends the first time, while on, that an end\n"
     "holds, or after a sessions file's last one; the runtime is then the hours of\n"
     "use, and the report lists the output at every switch-on.\n",
     cli_run},
    {"sweep", "PROFILE --vary KEY=VALUES [--vary ...] [OPTIONS]",
     "Run the full discharge for every combination of the varied values and\n"
     "print one row each.\n",
     cli_sweep_options,
     "VALUES\n"
     "  22,33,47          a list (2.2k, 4k7, 1M and 4R7 are understood)\n"
     "  1..4  1..4:0.5    a numeric range, step 1 or the step after ':'\n"
     "  E24:10..1k        the preferred values of a series (E3 ... E192) in a range\n"
     "  all               for pack.cell: every cell on the search path;\n"
     "                    for mode: every mode of the profile (mode=a,b also works)\n",
     cli_sweep},
    {"pick", "PROFILE (--target-ma X | --target-lm Y) [OPTIONS]",
     "Choose the series resistor from a preferred series: for a current target the\n"
     "smallest value whose nominal current at fresh cells does not exceed it, for a\n"
     "light-output target the largest value that still reaches it.  Then show the\n"
     "chosen part at its corners - nominal; worst case hot (fresh cells at their\n"
     "highest open-circuit voltage and lowest resistance, the resistor at minus its\n"
     "tolerance, the LED at the low end of its forward-voltage spread); cold (at\n"
     "the cell's lowest table temperature); and at the end of the run - with the\n"
     "LED current, light output, resistor power and the margin to each rating, and\n"
     "recommend the smallest standard power rating with at least twice the\n"
     "worst-case dissipation (derating to 50 %, common practice).  A part that\n"
     "exceeds a rating in the worst case is never proposed; when no part meets the\n"
     "target safely, pick says so and exits 1.\n",
     cli_pick_options, NULL, cli_pick},
    {"size", "PROFILE --runtime-h H [OPTIONS]",
     "Find the packs (cell type x series x parallel) that run at least H hours to\n"
     "the cutoff.  With a resistor drive the series resistor is chosen for each\n"
     "pack from a preferred series within the worst-case limits of 'pick' (and the\n"
     "profile's rating_w); with --flux-lm F the light must stay at or above F lm\n"
     "for those hours (the resistor giving the longest time above F is chosen);\n"
     "without it each pack keeps the profile's LED current.  A regulated drive has\n"
     "no resistor to choose: each pack runs with the drive as it is.  Packs are\n"
     "ranked by cell count, then mass.  When nothing fits, size says so, shows what\n"
     "came closest and exits 1.\n",
     cli_size_options, NULL, cli_size},
    {"table", "PROFILE [OPTIONS]",
     "The runtime table of a product specification: one row per mode of the\n"
     "profile, one column group per cell type, with the light output 30 s after\n"
     "switch-on, the runtime to the cutoff and the time to 50 %, hours at full\n"
     "output when a mode regulates, and - when the profile has an [optics] section -\n"
     "peak beam intensity and beam distance to 0.25 lx, as published flashlight\n"
     "performance standards define them.  Each run's warnings are marked, and the\n"
     "rounding rule and the conditions actually computed are printed under the\n"
     "table.  A mode that steps down by itself (next = ... in its [mode]) is run\n"
     "through its steps, and a steps column says them in words.\n",
     cli_table_options, NULL, cli_table},
    {"spread", "PROFILE [--spread KEY=FORM ...] [OPTIONS]",
     "Sample the units a design ships as: each spread key drawn from its\n"
     "distribution (a [spread] section of the profile, or --spread), a full\n"
     "discharge for each unit, and what the units reach: the mean, standard\n"
     "deviation and the 1st, 5th, 50th, 95th and 99th percentiles of runtime,\n"
     "output at 30 s, lumen-hours, time to half, LED current, resistor power and\n"
     "junction temperature, each percentile with its 95 % interval; the share of\n"
     "units with each warning and the yield against --target conditions, with\n"
     "Wilson intervals; and the keys ranked by how much of the spread of runtime\n"
     "and output each drives (standardized rank regression).\n",
     cli_spread_options,
     "FORMS\n"
     "  normal SIGMA | normal SIGMA%   about the profile's value, truncated to the\n"
     "                                 key's range\n"
     "  uniform LOW..HIGH              flat between two values\n"
     "  tolerance PCT                  flat within +-PCT % of the profile's value\n"
     "                                 (the usual reading of a part tolerance)\n"
     "  bin A,B,C | bin A:W,B:W        one of the values, equally likely or weighted\n"
     "Keys: any numeric profile key, e.g. drive.resistor_ohm, led.forward_v,\n"
     "pack.capacity_pct, pack.resistance_pct, pack.ambient_c.\n"
     "Example:\n"
     "  lampwick spread lantern.ini --spread pack.capacity_pct='normal 4' \\\n"
     "      --target runtime_h>=8 --target flux_30s_lm>=100\n",
     cli_spread},
    {"report", "PROFILE [-o FILE.html] [OPTIONS]",
     "The design review in one HTML file: the light and its inputs, where the data\n"
     "come from, the specification table with its test conditions, each mode's\n"
     "discharge chart and all modes together, where the energy goes, the corners,\n"
     "the spread study of the profile's [spread] section with its histogram and\n"
     "ranking, every warning in words, the caution, lampwick's version and the\n"
     "date.  One self-contained file (inline CSS and SVG, no script, no network),\n"
     "laid out to print on A4 or Letter with a page per section.\n",
     cli_report_options,
     "The date is today's (UTC), or that of SOURCE_DATE_EPOCH when it is set.\n"
     "Example:\n"
     "  lampwick report lantern.ini -o lantern-review.html\n",
     cli_report},
    {"fit led", "MEASUREMENTS.csv [OPTIONS]",
     "Least-squares fits of an LED's measured current and voltage (columns\n"
     "current_ma, forward_v; optionally flux_lm or relative_pct):\n"
     "  linear    V = threshold_v + slope_ohm * I\n"
     "  shockley  V = n Vt ln(I/Is) + Rs I, linear in (1, ln I, I), solved by QR\n"
     "  flux      flux = flux_lm (I/I_ref)^exponent, in log-log\n"
     "with R^2, the residual standard error and standard errors, and an [led]\n"
     "section ready to paste into a profile, which records the junction\n"
     "temperature of the bench data (junction_c).\n",
     cli_fit_led_options, NULL, cli_fit_led},
    {"fit cell", "LOG.csv [LOG2.csv] (--load-ohm R[,R2] | --load-ma I[,I2]) --cutoff-v V [OPTIONS]",
     "A cell file from discharge logs (columns time_s, voltage_v and optionally\n"
     "current_ma) into a constant resistance or current.  The charge removed is\n"
     "integrated to the end point; with two logs at different loads the internal\n"
     "resistance against depth comes from the voltage difference at equal depth\n"
     "where both logs are well above the end point, and the Peukert exponent from\n"
     "the two capacities.\n",
     cli_fit_cell_options, NULL, cli_fit_cell},
    {"check", "PROFILE... [OPTIONS]",
     "Load each profile, the cell file and the tables it names, and every mode,\n"
     "and print a short normalised summary, or the first error of each with its\n"
     "file and line.\n",
     cli_check_options, NULL, cli_check},
    {"cells", "[OPTIONS]",
     "List the cell files found along the search path: name, chemistry, nominal\n"
     "voltage, capacity at the rated current, end-point voltage, rechargeable.\n"
     "The values are typical, from handbooks; replace them with the maker's data\n"
     "or your own measurements for a product.\n",
     cli_cells_options, NULL, cli_cells},
};
const size_t cli_ncommands = sizeof cli_commands / sizeof cli_commands[0];

/* ---- help ---- */

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
    print_keys("Cell file keys (cells/*.ini)", lw_cellfile_keys, lw_cellfile_nkeys);
    printf("\nNumbers may carry a resistor-code or SI letter: 4k7, 2.2k, 1M, 4R7.\n");
    return 0;
}

static int help(int argc, char **argv)
{
    if (argc > 2 && !strcmp(argv[2], "keys"))
        return help_keys();
    if (argc > 2) {
        char name[64];
        snprintf(name, sizeof name, "%s%s%s", argv[2], argc > 3 ? " " : "",
                 argc > 3 ? argv[3] : "");
        bool fit = !strcmp(argv[2], "fit") && argc == 3;
        const cli_command *c = fit ? NULL : cli_find(name);
        if (!c && !fit) {
            char safe[256];
            lw_text_escape(safe, sizeof safe, name);
            fprintf(stderr, "lampwick: no command '%s'; see 'lampwick help'\n", safe);
            return EXIT_BADINPUT;
        }
        if (fit) {
            cli_help(cli_find("fit led"), stdout);
            fputc('\n', stdout);
            cli_help(cli_find("fit cell"), stdout);
        } else {
            cli_help(c, stdout);
        }
        fputc('\n', stdout);
        cli_safety(stdout);
        return 0;
    }
    fputs(main_help, stdout);
    fputc('\n', stdout);
    cli_safety(stdout);
    return 0;
}

static int run_command(int argc, char **argv)
{
    const char *cmd = argv[1];
    if (!strcmp(cmd, "--help") || !strcmp(cmd, "-h") || !strcmp(cmd, "help"))
        return help(argc, argv);
    if (!strcmp(cmd, "--version") || !strcmp(cmd, "-V")) {
        printf("lampwick %s\n", LW_VERSION);
        return 0;
    }
    if (!strcmp(cmd, "fit")) {
        if (argc >= 3 && (!strcmp(argv[2], "led") || !strcmp(argv[2], "cell")))
            return cli_find(!strcmp(argv[2], "led") ? "fit led" : "fit cell")
                ->run(argc - 2, argv + 2);
        if (argc >= 3 && (!strcmp(argv[2], "-h") || !strcmp(argv[2], "--help"))) {
            char *hv[] = {argv[0], (char *)"help", (char *)"fit", NULL};
            return help(3, hv);
        }
        return usage_error("fit", "say what to fit: 'fit led FILE' or 'fit cell LOG...'");
    }
    const cli_command *c = cli_find(cmd);
    if (!c || strchr(cmd, ' ')) {
        char safe[256];
        lw_text_escape(safe, sizeof safe, cmd);
        fprintf(stderr, "lampwick: unknown command '%s'; see 'lampwick help'\n", safe);
        return EXIT_BADINPUT;
    }
    return c->run(argc - 1, argv + 1);
}

/* SIGINT, SIGTERM, SIGHUP and SIGPIPE: remove the temporary files of
 * unfinished outputs, then end as the signal would have ended us. */
static void on_signal(int sig)
{
    lw_outfile_remove_all();
    signal(sig, SIG_DFL);
    raise(sig);
}

/* Everything written to standard output must have reached it: a full disk,
 * a closed stream or a write error gives exit status 2 and a message; a
 * reader that went away (a broken pipe) ends us quietly, as a Unix tool. */
static int finish_stdout(int code)
{
    errno = 0;
    bool bad = fflush(stdout) != 0 || ferror(stdout);
    int e = errno;
    if (fclose(stdout) != 0 && !bad) {
        bad = true;
        e = errno;
    }
    if (!bad)
        return code;
    if (e == EPIPE) {
        signal(SIGPIPE, SIG_DFL);
        raise(SIGPIPE);
    }
    fprintf(stderr, "lampwick: cannot write the output: %s\n", e ? strerror(e) : "write error");
    return EXIT_BADINPUT;
}

int lw_cli_run(int argc, char **argv)
{
    if (argc < 2) {
        fputs(main_help, stderr);
        return EXIT_BADINPUT;
    }
    return run_command(argc, argv);
}

int lw_cli_main(int argc, char **argv)
{
    /* a closed standard output would let the next file opened take its
     * place: refuse to run rather than write a report into a data file */
    if (fcntl(STDOUT_FILENO, F_GETFD) < 0) {
        fputs("lampwick: standard output is closed\n", stderr);
        return EXIT_BADINPUT;
    }
    /* past a file-size limit (ulimit -f) a write fails with EFBIG and is
     * reported, instead of the signal ending us with a temporary file left */
    signal(SIGXFSZ, SIG_IGN);
    const int sigs[] = {SIGINT, SIGTERM, SIGHUP, SIGPIPE};
    for (size_t i = 0; i < sizeof sigs / sizeof sigs[0]; i++) {
        struct sigaction sa;
        memset(&sa, 0, sizeof sa);
        sa.sa_handler = on_signal;
        sigemptyset(&sa.sa_mask);
        sigaction(sigs[i], &sa, NULL);
    }
    return finish_stdout(lw_cli_run(argc, argv));
}
