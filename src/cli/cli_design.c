/*
 * cli_design.c - the design commands: sweep, pick, size, table.
 *
 * Parses their options, calls the library (sweep.c, pick.c, size.c,
 * spec.c) and prints what it returns.
 */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "cli.h"
#include "lampwick/number.h"

/* ---- progress on a terminal ---- */

static void progress(size_t done, size_t total, void *ctx)
{
    (void)ctx;
    if (done % 50 != 0 && done != total)
        return;
    fprintf(stderr, "\r  %zu / %zu runs", done, total);
    if (done == total)
        fputs("\r                          \r", stderr);
}

/* Runs from which a sweep is slow enough (a second or more) that a
 * progress count on a terminal helps. */
#define PROGRESS_RUNS_MIN 500

static bool want_progress(size_t n)
{
    return n >= PROGRESS_RUNS_MIN && isatty(STDERR_FILENO);
}

static int parse_eseries(const char *cmd, const char *arg, int *eseries)
{
    if (!lw_eseries_parse(arg, eseries))
        return usage_error(cmd, "--eseries takes E3, E6, E12, E24, E48, E96 or E192");
    return 0;
}

/* ---- sweep ---- */

const cli_option cli_sweep_options[] = {
    {"vary", "KEY=VALUES", OPT_VARY, "a key to vary (repeatable: the full grid is run)"},
    {"set", "SECTION.KEY=VALUE", OPT_SET, "fix a value for every row (repeatable)"},
    {"mode", "NAME", OPT_MODE, "start from a mode"},
    {"format", "text|csv|md|json", OPT_FORMAT,
     "output format (default text; csv, md and json carry\nevery column of 'run --format csv')"},
    CLI_OPT_QUIET,
    {"plot", "FILE.svg", OPT_PLOT, "runtime against light output, one series per cell"},
    {"columns", "LIST", OPT_COLUMNS, "which columns of 'run --format csv' to show"},
    CLI_OPT_THREADS,
    CLI_OPT_USE,
    CLI_OPT_HELP,
    CLI_OPT_END};

typedef struct sweep_args {
    common_opts o;
    const char *varies[LW_SWEEP_VARY_MAX];
    size_t nvary;
    const char *plot_path, *columns;
} sweep_args;

static int sweep_option(void *ctx, int id, const char *arg)
{
    sweep_args *a = ctx;
    switch (id) {
    case OPT_VARY:
        if (a->nvary == LW_SWEEP_VARY_MAX)
            return usage_error("sweep", "too many --vary options (at most %d)", LW_SWEEP_VARY_MAX);
        a->varies[a->nvary++] = arg;
        return 0;
    case OPT_PLOT:
        a->plot_path = arg;
        return 0;
    case OPT_COLUMNS:
        a->columns = arg;
        return 0;
    default:
        return common_option("sweep", &a->o, id, arg);
    }
}

static lw_status sweep_plot(const char *path, const lw_profile *prof, const lw_sweep *sw,
                            lw_error *err)
{
    lw_chart c;
    void *buf = NULL;
    lw_status st = lw_plot_sweep(prof, sw, &c, &buf, err);
    if (st == LW_OK)
        st = write_chart(path, &c, err);
    free(buf);
    return st;
}

int cli_sweep(int argc, char **argv)
{
    sweep_args a = {.o = {.fmt = LW_FMT_TEXT}};
    int first, rc = cli_parse(cli_find("sweep"), argc, argv, sweep_option, &a, &first);
    if (rc)
        return rc < 0 ? 0 : rc;
    if (first + 1 != argc)
        return usage_error("sweep", "name exactly one profile");
    if (a.nvary == 0)
        return usage_error("sweep", "give at least one --vary KEY=VALUES");
    if ((rc = cli_out_open("sweep", &a.o)) != 0)
        return rc;
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_vary vary[LW_SWEEP_VARY_MAX];
    memset(vary, 0, sizeof vary);
    lw_sweep sw = {0};
    lw_status st = load_profile(argv[first], &a.o, &prof, &err);
    const char *outs[] = {a.plot_path}, *names[] = {"--plot"};
    if (st == LW_OK)
        st = check_outputs(&prof, NULL, 0, outs, names, 1, &err);
    for (size_t k = 0; k < a.nvary && st == LW_OK; k++) {
        st = lw_vary_parse(a.varies[k], &prof, &vary[k], &err);
        if (st == LW_OK && vary[k].note[0])
            fprintf(stderr, "lampwick: note: %s\n", vary[k].note);
    }
    size_t total = 1;
    for (size_t k = 0; k < a.nvary && st == LW_OK; k++)
        total *= vary[k].n;
    /* the rows are written as they complete; the chart comes after them */
    if (st == LW_OK)
        st = lw_report_sweep_stream(&prof, vary, a.nvary, a.o.threads, a.o.fmt, a.o.quiet,
                                    a.columns, a.o.out, want_progress(total) ? progress : NULL,
                                    NULL, &sw, &err);
    if (st == LW_OK && a.plot_path)
        st = sweep_plot(a.plot_path, &prof, &sw, &err);
    int code = st == LW_OK ? 0 : report_error(&err);
    lw_sweep_clear(&sw);
    for (size_t k = 0; k < a.nvary; k++)
        lw_vary_clear(&vary[k]);
    lw_profile_clear(&prof);
    return cli_out_close(&a.o, "sweep", argv[first], code);
}

/* ---- pick ---- */

const cli_option cli_pick_options[] = {
    {"target-ma", "X", OPT_TARGET_MA, "LED current per string at fresh cells, mA"},
    {"target-lm", "Y", OPT_TARGET_LM, "light output at fresh cells, lm"},
    {"eseries", "E24", OPT_ESERIES,
     "E3, E6, E12, E24 (default), E48, E96, E192; the part\ntolerance is the series' usual "
     "one unless the profile\nsets drive.tolerance_pct"},
    {"cells", "LIST", OPT_CELLS,
     "choose the part for each of these cells (comma-separated,\nor 'all'; default: the "
     "profile's cell)"},
    CLI_OPT_SET,
    CLI_OPT_MODE,
    CLI_OPT_FORMAT,
    CLI_OPT_QUIET,
    CLI_OPT_HELP,
    CLI_OPT_END};

typedef struct pick_args {
    common_opts o;
    int eseries, ntargets;
    lw_target_kind kind;
    double target;
    const char *cells;
} pick_args;

static int pick_option(void *ctx, int id, const char *arg)
{
    pick_args *a = ctx;
    switch (id) {
    case OPT_TARGET_MA:
    case OPT_TARGET_LM:
        if (!lw_number_parse_double(arg, &a->target) || !(a->target > 0))
            return usage_error("pick", "the target must be a positive number");
        a->kind = id == OPT_TARGET_MA ? LW_TARGET_CURRENT : LW_TARGET_FLUX;
        a->ntargets++;
        return 0;
    case OPT_ESERIES:
        return parse_eseries("pick", arg, &a->eseries);
    case OPT_CELLS:
        a->cells = arg;
        return 0;
    default:
        return common_option("pick", &a->o, id, arg);
    }
}

int cli_pick(int argc, char **argv)
{
    pick_args a = {.o = {.fmt = LW_FMT_TEXT}, .eseries = 24};
    int first, rc = cli_parse(cli_find("pick"), argc, argv, pick_option, &a, &first);
    if (rc)
        return rc < 0 ? 0 : rc;
    if (first + 1 != argc)
        return usage_error("pick", "name exactly one profile");
    if (a.ntargets != 1)
        return usage_error("pick", "give exactly one of --target-ma and --target-lm");
    if ((rc = cli_out_open("pick", &a.o)) != 0)
        return rc;
    double target = a.target * (a.kind == LW_TARGET_CURRENT ? 1e-3 : 1.0);
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_vary cellv = {0};
    const char **cells = NULL;
    const char *own[2] = {NULL, NULL};
    lw_status st = load_profile(argv[first], &a.o, &prof, &err);
    if (st == LW_OK && a.cells)
        st = parse_cells(a.cells, &prof, &cellv, &cells, &err);
    own[0] = prof.cell_ref;
    const char *const *list = cells ? cells : own;
    size_t n = 0;
    while (st == LW_OK && list[n])
        n++;
    lw_pick *picks = st == LW_OK ? lw_calloc(n ? n : 1, sizeof *picks) : NULL;
    lw_status *status = picks ? lw_calloc(n ? n : 1, sizeof *status) : NULL;
    lw_error *errs = status ? lw_calloc(n ? n : 1, sizeof *errs) : NULL;
    if (st == LW_OK && (!picks || !status || !errs)) {
        lw_error_set(&err, LW_ENOMEM, NULL, 0, "out of memory");
        st = LW_ENOMEM;
    }
    if (st == LW_OK && !cells) {
        status[0] = lw_pick_resistor(&prof, a.kind, target, a.eseries, &picks[0], &errs[0]);
        if (status[0] != LW_OK && status[0] != LW_ENOANSWER)
            st = lw_error_set(&err, status[0], errs[0].file, errs[0].line, "%s", errs[0].msg);
    } else if (st == LW_OK) {
        st = lw_pick_cells(&prof, list, a.kind, target, a.eseries, picks, status, errs, &err);
    }
    /* report the parts that can be shown (safe ones), then every refusal */
    int code = 0;
    if (st == LW_OK) {
        size_t shown = 0;
        for (size_t i = 0; i < n; i++)
            if (status[i] == LW_OK || (picks[i].resistor_ohm > 0 && picks[i].within_ratings))
                picks[shown++] = picks[i];
        if (shown)
            st = lw_report_pick(a.o.out, &prof, picks, shown, a.kind, target, a.o.fmt,
                                a.o.quiet, &err);
        for (size_t i = 0; st == LW_OK && i < n; i++)
            if (status[i] != LW_OK)
                code = report_error(&errs[i]);
    }
    if (st != LW_OK)
        code = report_error(&err);
    for (size_t i = 0; picks && i < n; i++)
        lw_pick_clear(&picks[i]);
    free(picks);
    free(status);
    free(errs);
    free(cells);
    lw_vary_clear(&cellv);
    lw_profile_clear(&prof);
    return cli_out_close(&a.o, "pick", argv[first], code);
}

/* ---- size ---- */

const cli_option cli_size_options[] = {
    {"runtime-h", "H", OPT_RUNTIME, "required runtime, hours"},
    {"flux-lm", "F", OPT_FLUX, "keep the output at or above F lm"},
    {"cells", "LIST", OPT_CELLS,
     "cell names, comma-separated, or 'all' (default: the\nprofile's cell)"},
    {"max-series", "S", OPT_MAXS, "at most S cells in series (default 4)"},
    {"max-parallel", "P", OPT_MAXP, "at most P in parallel (default 2)"},
    {"eseries", "E24", OPT_ESERIES, "preferred series of the resistor (default E24)"},
    {"top", "N", OPT_TOP, "show the best N packs (default 5)"},
    CLI_OPT_THREADS,
    CLI_OPT_SET,
    CLI_OPT_MODE,
    CLI_OPT_FORMAT,
    CLI_OPT_QUIET,
    CLI_OPT_USE,
    CLI_OPT_HELP,
    CLI_OPT_END};

typedef struct size_args {
    common_opts o;
    lw_size_options opt;
    const char *cells;
    int top;
} size_args;

static int size_option(void *ctx, int id, const char *arg)
{
    size_args *a = ctx;
    switch (id) {
    case OPT_RUNTIME:
        if (!lw_number_parse_double(arg, &a->opt.runtime_h) || !(a->opt.runtime_h > 0))
            return usage_error("size", "--runtime-h takes a positive number of hours");
        return 0;
    case OPT_FLUX:
        if (!lw_number_parse_double(arg, &a->opt.flux_lm) || !(a->opt.flux_lm > 0))
            return usage_error("size", "--flux-lm takes a positive number of lumens");
        return 0;
    case OPT_CELLS:
        a->cells = arg;
        return 0;
    case OPT_MAXS:
    case OPT_MAXP: {
        int v;
        if (!lw_number_parse_int(arg, &v) || v < 1 || v > 24)
            return usage_error("size", "--max-series and --max-parallel take 1 to 24");
        *(id == OPT_MAXS ? &a->opt.max_series : &a->opt.max_parallel) = v;
        return 0;
    }
    case OPT_ESERIES:
        return parse_eseries("size", arg, &a->opt.eseries);
    case OPT_TOP:
        if (!lw_number_parse_int(arg, &a->top) || a->top < 1)
            return usage_error("size", "--top takes a positive whole number");
        return 0;
    default:
        return common_option("size", &a->o, id, arg);
    }
}

int cli_size(int argc, char **argv)
{
    size_args a = {.o = {.fmt = LW_FMT_TEXT},
                   .opt = {.runtime_h = NAN, .flux_lm = NAN, .max_series = 4, .max_parallel = 2,
                           .eseries = 24},
                   .top = 5};
    int first, rc = cli_parse(cli_find("size"), argc, argv, size_option, &a, &first);
    if (rc)
        return rc < 0 ? 0 : rc;
    if (first + 1 != argc)
        return usage_error("size", "name exactly one profile");
    if (isnan(a.opt.runtime_h))
        return usage_error("size", "give the required runtime with --runtime-h");
    if ((rc = cli_out_open("size", &a.o)) != 0)
        return rc;
    a.opt.threads = a.o.threads;
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_vary cellv = {0};
    const char **cells = NULL;
    lw_size_row *rows = NULL;
    lw_rtable *t = NULL;
    size_t n = 0, fits = 0;
    lw_status st = load_profile(argv[first], &a.o, &prof, &err);
    if (st == LW_OK && a.cells)
        st = parse_cells(a.cells, &prof, &cellv, &cells, &err);
    a.opt.cells = cells;
    if (st == LW_OK)
        st = lw_size_packs(&prof, &a.opt, &rows, &n, &err);
    while (st == LW_OK && fits < n && rows[fits].fits)
        fits++;
    size_t show = fits ? (fits < (size_t)a.top ? fits : (size_t)a.top) : (n ? 1 : 0);
    if (st == LW_OK)
        st = lw_report_size(&prof, &a.opt, rows, show, fits > 0, a.o.fmt, &t, &err);
    if (st == LW_OK) {
        t->quiet = a.o.quiet;
        st = lw_rtable_write(t, a.o.out, a.o.fmt, &err);
    }
    int code = st == LW_OK ? 0 : report_error(&err);
    if (st == LW_OK && !fits) {
        fprintf(stderr, "lampwick: %s: no pack of %s meets %g h%s\n", prof.path,
                a.cells ? a.cells : prof.cell_ref, a.opt.runtime_h,
                isnan(a.opt.flux_lm) ? "" : " above the flux floor");
        code = EXIT_NOANSWER;
    }
    lw_rtable_free(t);
    free(rows);
    free(cells);
    lw_vary_clear(&cellv);
    lw_profile_clear(&prof);
    return cli_out_close(&a.o, "size", argv[first], code);
}

/* ---- table ---- */

const cli_option cli_table_options[] = {
    {"cells", "LIST", OPT_CELLS,
     "one column group per cell (comma-separated, or 'all';\ndefault: the profile's cell)"},
    CLI_OPT_SET,
    CLI_OPT_FORMAT,
    CLI_OPT_QUIET,
    CLI_OPT_THREADS,
    {"plot", "FILE.svg", OPT_PLOT,
     "write a chart of every mode's output against time\n(the first cell's)"},
    CLI_OPT_USE,
    CLI_OPT_HELP,
    CLI_OPT_END};

typedef struct table_args {
    common_opts o;
    const char *cells;
    const char *plot_path;
} table_args;

static lw_status modes_chart_fn(FILE *fp, const void *ctx, lw_error *err)
{
    return lw_plot_modes(fp, ctx, 0, err);
}

static int table_option(void *ctx, int id, const char *arg)
{
    table_args *a = ctx;
    if (id == OPT_CELLS) {
        a->cells = arg;
        return 0;
    }
    if (id == OPT_PLOT) {
        a->plot_path = arg;
        return 0;
    }
    return common_option("table", &a->o, id, arg);
}

int cli_table(int argc, char **argv)
{
    table_args a = {.o = {.fmt = LW_FMT_TEXT}};
    int first, rc = cli_parse(cli_find("table"), argc, argv, table_option, &a, &first);
    if (rc)
        return rc < 0 ? 0 : rc;
    if (first + 1 != argc)
        return usage_error("table", "name exactly one profile");
    if ((rc = cli_out_open("table", &a.o)) != 0)
        return rc;
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_vary cellv = {0};
    const char **cells = NULL;
    lw_rtable *t = NULL;
    lw_spec spec = {0};
    lw_status st = load_profile(argv[first], &a.o, &prof, &err);
    const char *outs[] = {a.plot_path}, *names[] = {"--plot"};
    if (st == LW_OK)
        st = check_outputs(&prof, NULL, 0, outs, names, 1, &err);
    if (st == LW_OK && a.cells)
        st = parse_cells(a.cells, &prof, &cellv, &cells, &err);
    if (st == LW_OK)
        st = lw_spec_compute(&prof, cells, a.o.threads, &spec, &err);
    if (st == LW_OK)
        st = lw_report_spec(&spec, a.o.fmt, &t, &err);
    if (st == LW_OK && a.plot_path)
        st = lw_outfile_write(a.plot_path, modes_chart_fn, &spec, &err);
    if (st == LW_OK) {
        t->quiet = a.o.quiet;
        st = lw_rtable_write(t, a.o.out, a.o.fmt, &err);
    }
    if (st == LW_OK && a.o.fmt != LW_FMT_CSV) { /* CSV stays one table */
        lw_rtable *ct = NULL;
        st = lw_report_spec_corners(&spec, a.o.fmt, &ct, &err);
        if (st == LW_OK) {
            fputc('\n', a.o.out);
            ct->quiet = a.o.quiet;
            st = lw_rtable_write(ct, a.o.out, a.o.fmt, &err);
        }
        lw_rtable_free(ct);
    }
    int code = st == LW_OK ? 0 : report_error(&err);
    lw_spec_clear(&spec);
    lw_rtable_free(t);
    free(cells);
    lw_vary_clear(&cellv);
    lw_profile_clear(&prof);
    return cli_out_close(&a.o, "table", argv[first], code);
}
