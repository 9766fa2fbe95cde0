/*
 * cli_report.c - `lampwick report`: the design review in one HTML file
 * (htmlreport.h).
 */
#include "cli.h"

#include <stdlib.h>
#include <string.h>
#include <time.h>

const cli_option cli_report_options[] = {
    {"output", "FILE.html", OPT_OUTPUT, "write the review there (default: standard output)"},
    CLI_OPT_SET,
    CLI_OPT_MODE,
    CLI_OPT_USE,
    CLI_OPT_SAMPLES,
    CLI_OPT_SEED,
    CLI_OPT_THREADS,
    CLI_OPT_HELP,
    CLI_OPT_END};

typedef struct report_args {
    common_opts o;
    const char *out;
    size_t samples;
    uint64_t seed;
} report_args;

static int report_option(void *ctx, int id, const char *arg)
{
    report_args *a = ctx;
    switch (id) {
    case OPT_OUTPUT:
        a->out = arg;
        return 0;
    case OPT_SAMPLES:
    case OPT_SEED:
        return sample_option("report", id, arg, &a->samples, &a->seed);
    default:
        return common_option("report", &a->o, id, arg);
    }
}

/* The report's date: SOURCE_DATE_EPOCH's when set (the reproducible-builds
 * convention, so a report can be made again byte for byte), else today's,
 * both in UTC. */
static void report_date(char *buf, size_t size)
{
    const char *sde = getenv("SOURCE_DATE_EPOCH");
    char *end = NULL;
    long long e = sde && *sde ? strtoll(sde, &end, 10) : -1;
    time_t t = e >= 0 && end && !*end ? (time_t)e : time(NULL);
    struct tm tm;
    if (!gmtime_r(&t, &tm) || !strftime(buf, size, "%Y-%m-%d", &tm))
        snprintf(buf, size, "(date unknown)");
}

typedef struct html_ctx {
    const lw_profile *prof;
    const lw_html_options *opt;
} html_ctx;

static lw_status html_fn(FILE *fp, const void *ctx, lw_error *err)
{
    const html_ctx *c = ctx;
    return lw_report_html(fp, c->prof, c->opt, err);
}

int cli_report(int argc, char **argv)
{
    report_args a = {.o = {.fmt = LW_FMT_TEXT}, .out = "-", .seed = 1};
    int first, rc = cli_parse(cli_find("report"), argc, argv, report_option, &a, &first);
    if (rc)
        return rc < 0 ? 0 : rc;
    if (first + 1 != argc)
        return usage_error("report", "name exactly one profile");
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_status st = load_profile(argv[first], &a.o, &prof, &err);
    const char *outs[] = {a.out}, *names[] = {"--output"};
    if (st == LW_OK && strcmp(a.out, "-") != 0)
        st = check_outputs(&prof, NULL, 0, outs, names, 1, &err);
    char date[32];
    report_date(date, sizeof date);
    lw_html_options opt = {.date = date, .spread_samples = a.samples, .seed = a.seed,
                           .threads = a.o.threads};
    html_ctx c = {&prof, &opt};
    if (st == LW_OK)
        st = lw_outfile_write(a.out, html_fn, &c, &err);
    int code = st == LW_OK ? 0 : report_error(&err);
    lw_profile_clear(&prof);
    return code;
}
