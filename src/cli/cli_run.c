/*
 * cli_run.c - `lampwick run`: options, the run, its report, trace and chart.
 */
#include "cli.h"
#include "lampwick/text.h"
#include "lampwick/number.h"

#include <string.h>

const cli_option cli_run_options[] = {
    CLI_OPT_SET,
    CLI_OPT_MODE,
    CLI_OPT_FORMAT,
    CLI_OPT_QUIET,
    {"trace", "FILE.csv", OPT_TRACE, "write the discharge as a CSV time series"},
    {"plot", "FILE.svg", OPT_PLOT,
     "write a chart of output and pack voltage (with --use or\n[use]: the output at each "
     "switch-on, night by night)"},
    {"stored-months", "M", OPT_STORED,
     "start after M months on the shelf: the cells'\nself-discharge and the drive's standby "
     "drain"},
    CLI_OPT_USE,
    CLI_OPT_HELP,
    CLI_OPT_END};

typedef struct run_args {
    common_opts o;
    const char *trace_path, *plot_path;
    char stored_arg[96];
} run_args;

static int run_option(void *ctx, int id, const char *arg)
{
    run_args *a = ctx;
    switch (id) {
    case OPT_STORED: {
        double m;
        if (!lw_number_parse_double(arg, &m) || m < 0 || m > 600)
            return usage_error("run", "--stored-months takes 0 to 600");
        snprintf(a->stored_arg, sizeof a->stored_arg, "pack.stored_months=%s", arg);
        return common_option("run", &a->o, OPT_SET, a->stored_arg);
    }
    case OPT_TRACE:
        a->trace_path = arg;
        return 0;
    case OPT_PLOT:
        a->plot_path = arg;
        return 0;
    default:
        return common_option("run", &a->o, id, arg);
    }
}

static lw_status trace_fn(FILE *fp, const void *ctx, lw_error *err)
{
    return lw_report_trace_csv(fp, ctx, err);
}

typedef struct {
    const lw_profile *prof;
    const lw_result *res;
    const lw_trace *tr;
} plot_ctx;

static lw_status plot_fn(FILE *fp, const void *ctx, lw_error *err)
{
    const plot_ctx *c = ctx;
    char title[160];
    snprintf(title, sizeof title, "%s%s%s", c->prof->light.name, c->prof->mode[0] ? ", mode " : "",
             c->prof->mode);
    return lw_plot_discharge(fp, title, &c->prof->light, c->res, c->tr, err);
}

static lw_status write_trace(const char *path, const lw_trace *tr, lw_error *err)
{
    return lw_outfile_write(path, trace_fn, tr, err);
}

static lw_status write_plot(const char *path, const lw_profile *prof, const lw_result *res,
                            const lw_trace *tr, lw_error *err)
{
    plot_ctx c = {prof, res, tr};
    return lw_outfile_write(path, plot_fn, &c, err);
}

static const char *dark_text(lw_end_reason why)
{
    switch (why) {
    case LW_END_NEVER_LIT:
        return "the LEDs never light with this pack and drive";
    case LW_END_EMPTY_AT_START:
        return "the cells are empty or at their end point at switch-on";
    default:
        return "the output at switch-on is already at a cutoff";
    }
}

int cli_run(int argc, char **argv)
{
    run_args a = {.o = {.fmt = LW_FMT_TEXT}};
    int first, rc = cli_parse(cli_find("run"), argc, argv, run_option, &a, &first);
    if (rc)
        return rc < 0 ? 0 : rc;
    if (first + 1 != argc)
        return usage_error("run", "name exactly one profile");
    if ((rc = cli_out_open("run", &a.o)) != 0)
        return rc;
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_status st = load_profile(argv[first], &a.o, &prof, &err);
    const char *outs[] = {a.trace_path, a.plot_path}, *names[] = {"--trace", "--plot"};
    if (st == LW_OK)
        st = check_outputs(&prof, NULL, 0, outs, names, 2, &err);
    lw_result res = {0};
    lw_trace tr = {0};
    bool want_trace = a.trace_path || a.plot_path;
    if (st == LW_OK) {
        lw_run_options opt = lw_run_options_default();
        opt.want_trace = want_trace;
        st = lw_run(&prof.light, &opt, &res, &err);
        if (st != LW_OK && !err.file[0]) /* a numerical failure: say which profile */
            lw_text_copy(err.file, prof.path, sizeof err.file);
    }
    if (st == LW_OK && want_trace)
        st = lw_trace_build(&prof.light, &res, LW_TRACE_ROWS_MIN, &tr, &err);
    if (st == LW_OK && want_trace && !prof.light.chain) /* one mode: name it */
        lw_text_copy(tr.modes[0], prof.mode, sizeof tr.modes[0]);
    if (st == LW_OK && a.trace_path)
        st = write_trace(a.trace_path, &tr, &err);
    if (st == LW_OK && a.plot_path)
        st = write_plot(a.plot_path, &prof, &res, &tr, &err);
    if (st == LW_OK)
        st = lw_report_run_with_corners(a.o.out, a.o.fmt, a.o.quiet, &prof, &res, &err);
    int code = st == LW_OK ? 0 : report_error(&err);
    if (st == LW_OK && lw_run_end_is_dark(res.end_reason)) {
        fprintf(stderr, "lampwick: %s: no light: %s\n", prof.path, dark_text(res.end_reason));
        code = EXIT_NOANSWER;
    }
    lw_trace_clear(&tr);
    lw_run_result_clear(&res);
    lw_profile_clear(&prof);
    return cli_out_close(&a.o, "run", argv[first], code);
}
