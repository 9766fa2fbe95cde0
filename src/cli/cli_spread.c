/*
 * cli_spread.c - `lampwick spread`: the spread of a design over the units
 * shipped (montecarlo.h, mcreport.h).  Parses and prints only.
 */
#include "cli.h"
#include "lampwick/number.h"

#include <errno.h>
#include <inttypes.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

const cli_option cli_spread_options[] = {
    {"spread", "KEY=FORM", OPT_SPREAD,
     "spread a numeric profile key (repeatable; over the\nprofile's [spread] entry for the "
     "same key)"},
    CLI_OPT_SAMPLES,
    CLI_OPT_SEED,
    {"sampling", "random|sobol", OPT_SAMPLING,
     "random units (default; with intervals) or Sobol points\n(sharper estimates for the same "
     "units, no intervals)"},
    {"target", "QUANTITY>=VALUE", OPT_TARGET,
     "a condition each unit should meet (repeatable): the\nyield is the share meeting all"},
    {"histogram", "FILE.svg", OPT_HIST, "histogram of --quantity with its percentiles"},
    {"quantity", "NAME", OPT_QUANTITY, "the histogram's quantity (default runtime_h)"},
    {"ranking", "FILE.svg", OPT_RANKING, "chart of what drives the spread of runtime and output"},
    {"samples-out", "FILE.csv", OPT_SAMPLES_OUT, "every unit: drawn values and results"},
    CLI_OPT_SET,
    CLI_OPT_MODE,
    CLI_OPT_FORMAT,
    CLI_OPT_QUIET,
    CLI_OPT_THREADS,
    CLI_OPT_HELP,
    CLI_OPT_END};

typedef struct spread_args {
    common_opts o;
    const char *spreads[LW_MC_KEYS_MAX];
    size_t nspreads;
    const char *targets[LW_MC_TARGETS_MAX];
    size_t ntargets;
    size_t samples;
    uint64_t seed;
    const char *hist, *ranking, *samples_out, *quantity;
    bool sobol;
} spread_args;

static int spread_option(void *ctx, int id, const char *arg)
{
    spread_args *a = ctx;
    switch (id) {
    case OPT_SPREAD:
        if (a->nspreads == LW_MC_KEYS_MAX)
            return usage_error("spread", "at most %d --spread options", LW_MC_KEYS_MAX);
        a->spreads[a->nspreads++] = arg;
        return 0;
    case OPT_SAMPLES:
    case OPT_SEED:
        return sample_option("spread", id, arg, &a->samples, &a->seed);
    case OPT_TARGET:
        if (a->ntargets == LW_MC_TARGETS_MAX)
            return usage_error("spread", "at most %d --target options", LW_MC_TARGETS_MAX);
        a->targets[a->ntargets++] = arg;
        return 0;
    case OPT_SAMPLING:
        if (strcmp(arg, "random") != 0 && strcmp(arg, "sobol") != 0)
            return usage_error("spread", "--sampling takes random or sobol");
        a->sobol = !strcmp(arg, "sobol");
        return 0;
    case OPT_HIST:
        a->hist = arg;
        return 0;
    case OPT_QUANTITY:
        a->quantity = arg;
        return 0;
    case OPT_RANKING:
        a->ranking = arg;
        return 0;
    case OPT_SAMPLES_OUT:
        a->samples_out = arg;
        return 0;
    default:
        return common_option("spread", &a->o, id, arg);
    }
}

typedef struct {
    const lw_mc_study *s;
    lw_mc_quantity q;
} hist_ctx;

static lw_status hist_fn(FILE *fp, const void *ctx, lw_error *err)
{
    const hist_ctx *h = ctx;
    return lw_plot_mc_histogram(fp, h->s, h->q, err);
}

static lw_status ranking_fn(FILE *fp, const void *ctx, lw_error *err)
{
    return lw_plot_mc_ranking(fp, ctx, err);
}

static lw_status samples_fn(FILE *fp, const void *ctx, lw_error *err)
{
    return lw_report_mc_samples(fp, ctx, err);
}

static void progress(size_t done, size_t total, void *ctx)
{
    (void)ctx;
    if (done % 500 != 0 && done != total)
        return;
    fprintf(stderr, "\r  %zu / %zu units", done, total);
    if (done == total)
        fputs("\r                              \r", stderr);
}

/* The keys: the profile's [spread], each --spread replacing or adding. */
static lw_status gather_keys(const lw_profile *prof, const spread_args *a, lw_mc_key *keys,
                             size_t *n, lw_error *err)
{
    lw_status st = lw_mc_keys_of_profile(prof, keys, n, err);
    for (size_t i = 0; i < a->nspreads && st == LW_OK; i++) {
        const char *eq = strchr(a->spreads[i], '=');
        char key[2 * LW_INI_NAME_MAX];
        if (!eq || eq == a->spreads[i] || (size_t)(eq - a->spreads[i]) >= sizeof key)
            return lw_error_set(err, LW_EINPUT, "--spread", 0,
                                "'%s': write --spread SECTION.KEY=FORM", a->spreads[i]);
        memcpy(key, a->spreads[i], (size_t)(eq - a->spreads[i]));
        key[eq - a->spreads[i]] = '\0';
        size_t j = 0;
        while (j < *n && strcmp(keys[j].key, key) != 0)
            j++;
        if (j == LW_MC_KEYS_MAX)
            return lw_error_set(err, LW_EINPUT, "--spread", 0, "at most %d spread keys",
                                LW_MC_KEYS_MAX);
        st = lw_mc_key_parse(prof, key, eq + 1, "--spread", 0, &keys[j], err);
        if (st == LW_OK && j == *n)
            ++*n;
    }
    return st;
}

int cli_spread(int argc, char **argv)
{
    spread_args a = {.o = {.fmt = LW_FMT_TEXT}, .samples = LW_MC_SAMPLES_DEFAULT, .seed = 1};
    int first, rc = cli_parse(cli_find("spread"), argc, argv, spread_option, &a, &first);
    if (rc)
        return rc < 0 ? 0 : rc;
    if (first + 1 != argc)
        return usage_error("spread", "name exactly one profile");
    lw_mc_quantity hq = LW_MC_RUNTIME;
    if (a.quantity) {
        int q = -1;
        for (int i = 0; i < LW_MC_QCOUNT; i++)
            if (!strcmp(a.quantity, lw_mc_quantity_names[i]))
                q = i;
        if (q < 0)
            return usage_error("spread", "--quantity: '%s' is not one of runtime_h, flux_30s_lm, "
                                         "lumen_hours, time_to_half_h, initial_led_ma, "
                                         "peak_resistor_w, peak_junction_c", a.quantity);
        hq = (lw_mc_quantity)q;
    }
    if ((rc = cli_out_open("spread", &a.o)) != 0)
        return rc;
    lw_error err;
    lw_error_clear(&err);
    lw_mc_target targets[LW_MC_TARGETS_MAX];
    lw_status st = LW_OK;
    for (size_t i = 0; i < a.ntargets && st == LW_OK; i++)
        st = lw_mc_target_parse(a.targets[i], &targets[i], &err);
    lw_profile prof;
    memset(&prof, 0, sizeof prof);
    if (st == LW_OK)
        st = load_profile(argv[first], &a.o, &prof, &err);
    const char *outs[] = {a.hist, a.ranking, a.samples_out};
    const char *names[] = {"--histogram", "--ranking", "--samples-out"};
    if (st == LW_OK)
        st = check_outputs(&prof, NULL, 0, outs, names, 3, &err);
    lw_mc_key keys[LW_MC_KEYS_MAX];
    size_t nkeys = 0;
    if (st == LW_OK)
        st = gather_keys(&prof, &a, keys, &nkeys, &err);
    lw_mc_options opt = {.samples = a.samples, .seed = a.seed, .threads = a.o.threads,
                         .sobol = a.sobol};
    lw_mc_result res;
    memset(&res, 0, sizeof res);
    if (st == LW_OK)
        st = lw_mc_run(&prof, keys, nkeys, &opt,
                       a.samples >= 2000 && isatty(STDERR_FILENO) ? progress : NULL, NULL, &res,
                       &err);
    lw_mc_study s = {&prof, keys, nkeys, &opt, &res, targets, a.ntargets};
    hist_ctx h = {&s, hq};
    if (st == LW_OK && a.hist)
        st = lw_outfile_write(a.hist, hist_fn, &h, &err);
    if (st == LW_OK && a.ranking)
        st = lw_outfile_write(a.ranking, ranking_fn, &s, &err);
    if (st == LW_OK && a.samples_out)
        st = lw_outfile_write(a.samples_out, samples_fn, &s, &err);
    if (st == LW_OK)
        st = lw_report_mc(a.o.out, &s, a.o.fmt, a.o.quiet, &err);
    int code = st == LW_OK ? 0 : report_error(&err);
    lw_mc_result_clear(&res);
    lw_profile_clear(&prof);
    return cli_out_close(&a.o, "spread", argv[first], code);
}
