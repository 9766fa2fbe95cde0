/*
 * cli_design.c - the design commands: sweep, pick, size, table.
 *
 * Parses their options, calls the library (sweep.c, design.c) and prints.
 */
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "cli_common.h"

const char *const lw_sweep_help =
    "Usage: lampwick sweep PROFILE --vary KEY=VALUES [--vary ...] [OPTIONS]\n"
    "\n"
    "Run the full discharge for every combination of the varied values and\n"
    "print one row each.\n"
    "\n"
    "VALUES\n"
    "  22,33,47          a list (2.2k, 4k7, 1M and 4R7 are understood)\n"
    "  1..4  1..4:0.5    a numeric range, step 1 or the step after ':'\n"
    "  E24:10..1k        the preferred values of a series (E3 ... E192) in a range\n"
    "  all               for pack.cell: every cell on the search path;\n"
    "                    for mode: every mode of the profile (mode=a,b also works)\n"
    "\n"
    "Options\n"
    "  --vary KEY=VALUES        a key to vary (repeatable: the full grid is run)\n"
    "  --set SECTION.KEY=VALUE  fix a value for every row\n"
    "  --mode NAME              start from a mode\n"
    "  --format text|csv|md     (csv and md carry every column of 'run --format csv')\n"
    "  --plot FILE.svg          runtime against light output, one series per cell\n"
    "  --columns LIST           which columns of 'run --format csv' to show\n"
    "  --threads N              worker threads (default: all cores)\n";

const char *const lw_pick_help =
    "Usage: lampwick pick PROFILE (--target-ma X | --target-lm Y) [OPTIONS]\n"
    "\n"
    "Choose the series resistor from a preferred series: for a current target the\n"
    "smallest value whose nominal current at fresh cells does not exceed it, for a\n"
    "light-output target the largest value that still reaches it. Then check the\n"
    "worst case - fresh cells at their highest open-circuit voltage and lowest\n"
    "resistance, the resistor at minus its tolerance, the LED at the low end of\n"
    "its forward-voltage spread - against the LED's max_current_ma, and recommend\n"
    "the smallest standard power rating with at least twice the worst-case\n"
    "dissipation (derating to 50 %, common practice). A part that exceeds a\n"
    "rating in the worst case is never proposed; when no part can meet the\n"
    "target safely, pick says so and exits 1.\n"
    "\n"
    "Options\n"
    "  --target-ma X            LED current per string at fresh cells, mA\n"
    "  --target-lm Y            light output at fresh cells, lm\n"
    "  --series E24             E3, E6, E12, E24 (default), E48, E96, E192; the part\n"
    "                           tolerance is the series' usual one unless the profile\n"
    "                           sets drive.tolerance_pct\n"
    "  --set, --mode, --format  as for run\n";

const char *const lw_size_help =
    "Usage: lampwick size PROFILE --runtime-h H [OPTIONS]\n"
    "\n"
    "Find the packs (cell type x series x parallel) that run at least H hours to\n"
    "the cutoff, choosing the series resistor from a preferred series for each\n"
    "pack within the worst-case limits of 'pick'. With --flux-lm F the light must\n"
    "stay at or above F lm for those hours (the resistor giving the longest time\n"
    "above F is chosen); without it each pack keeps the profile's LED current.\n"
    "Packs are ranked by cell count, then mass. When nothing fits, size says so,\n"
    "shows what came closest and exits 1.\n"
    "\n"
    "Options\n"
    "  --runtime-h H            required runtime, hours\n"
    "  --flux-lm F              keep the output at or above F lm\n"
    "  --cells LIST             cell names, comma-separated, or 'all' (default: the\n"
    "                           profile's cell)\n"
    "  --max-series S           at most S cells in series (default 4)\n"
    "  --max-parallel P         at most P in parallel (default 2)\n"
    "  --series E24             preferred series of the resistor (default E24)\n"
    "  --top N                  show the best N packs (default 5)\n"
    "  --set, --mode, --format  as for run\n";

const char *const lw_table_help =
    "Usage: lampwick table PROFILE [--cells LIST] [--format text|csv|md]\n"
    "\n"
    "The runtime table of a product specification: one row per mode of the\n"
    "profile, one column group per cell type, with the light output 30 s after\n"
    "switch-on, the runtime to the cutoff and the time to 50 %, and - when the\n"
    "profile has an [optics] section - peak beam intensity and beam distance to\n"
    "0.25 lx, as published flashlight performance standards define them. The\n"
    "rounding rule and the test conditions are printed under the table.\n";

static volatile int progress_shown;

static void progress(size_t done, size_t total, void *ctx)
{
    (void)ctx;
    if (done % 50 != 0 && done != total)
        return;
    fprintf(stderr, "\r  %zu / %zu runs", done, total);
    if (done == total)
        fputs("\r                          \r", stderr);
    progress_shown = 1;
}

static bool want_progress(size_t n)
{
    return n >= 500 && isatty(STDERR_FILENO);
}

/* Parse --cells LIST into a NULL-terminated array (owned by *v). */
static lw_status parse_cells(const char *list, const lw_profile *prof, lw_vary *v,
                             const char ***cells, lw_error *err)
{
    char arg[1024];
    snprintf(arg, sizeof arg, "pack.cell=%s", list);
    lw_status st = lw_vary_parse(arg, prof, v, err);
    if (st != LW_OK)
        return st;
    const char **c = calloc(v->n + 1, sizeof *c);
    if (!c)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    for (size_t i = 0; i < v->n; i++)
        c[i] = v->values[i];
    *cells = c;
    return LW_OK;
}

static int parse_threads(const char *cmd, const char *s, int *threads)
{
    if (!lw_parse_int(s, threads) || *threads < 1 || *threads > 64)
        return usage_error(cmd, "--threads takes a whole number from 1 to 64");
    return 0;
}

/* ---- sweep ---- */

static const char *const sweep_text_cols[] = {
    "initial_led_ma", "flux_30s_lm", "runtime_h",     "end_reason",     "regulated_h",
    "time_to_half_h", "lumen_hours", "efficiency_pct", "lm_per_w",       "peak_resistor_w",
    "warnings"};

/* Columns of the sweep table after the varied keys: every run column for
 * csv and md, a readable subset for text, or the user's --columns. */
static lw_status sweep_columns(const char *list, lw_format fmt, const char **cols, size_t *n,
                               lw_error *err)
{
    *n = 0;
    if (!list) {
        size_t k = fmt == LW_FMT_TEXT ? sizeof sweep_text_cols / sizeof sweep_text_cols[0]
                                      : lw_run_ncolumns;
        for (size_t i = 0; i < k; i++)
            cols[(*n)++] = fmt == LW_FMT_TEXT ? sweep_text_cols[i] : lw_run_columns[i];
        return LW_OK;
    }
    const char *p = list;
    while (*p) {
        const char *comma = strchr(p, ',');
        size_t len = comma ? (size_t)(comma - p) : strlen(p);
        size_t i = 0;
        while (i < lw_run_ncolumns &&
               (strlen(lw_run_columns[i]) != len || strncmp(lw_run_columns[i], p, len) != 0))
            i++;
        if (i == lw_run_ncolumns || *n == lw_run_ncolumns) {
            char known[1024] = "";
            for (size_t k = 0; k < lw_run_ncolumns; k++) {
                strncat(known, k ? ", " : "", sizeof known - strlen(known) - 1);
                strncat(known, lw_run_columns[k], sizeof known - strlen(known) - 1);
            }
            return lw_error_set(err, LW_EINPUT, "--columns", 0,
                                "unknown column '%.*s'; the columns are: %s", (int)len, p,
                                known);
        }
        cols[(*n)++] = lw_run_columns[i];
        p += len + (comma ? 1 : 0);
    }
    return LW_OK;
}

static lw_status sweep_table(const lw_sweep *sw, lw_format fmt, const char *columns,
                             lw_rtable **out, lw_error *err)
{
    const char *cols[64];
    size_t ncols;
    lw_status st = sweep_columns(columns, fmt, cols, &ncols, err);
    if (st != LW_OK)
        return st;
    size_t nk = sw->nvary, ncol = nk + ncols;
    lw_rtable *t = lw_rtable_new(ncol, err);
    lw_rtable *full = t ? lw_rtable_new(lw_run_ncolumns, err) : NULL;
    if (!t || !full) {
        lw_rtable_free(t);
        return LW_ENOMEM;
    }
    for (size_t k = 0; k < nk && st == LW_OK; k++)
        st = lw_rtable_head(t, k, sw->vary[k].key, err);
    for (size_t c = 0; c < ncols && st == LW_OK; c++)
        st = lw_rtable_head(t, nk + c, cols[c], err);
    for (size_t r = 0; r < sw->n && st == LW_OK; r++) {
        size_t row = 0, frow = 0;
        st = lw_rtable_add_row(t, &row, err);
        if (st == LW_OK)
            st = lw_rtable_add_row(full, &frow, err);
        for (size_t k = 0; k < nk && st == LW_OK; k++)
            st = lw_rtable_set(t, row, k, sw->vary[k].values[sw->index[r * nk + k]], err);
        if (st == LW_OK)
            st = lw_report_run_row(full, frow, 0, &sw->cases[r].light, &sw->cases[r].res, err);
        for (size_t c = 0; c < ncols && st == LW_OK; c++) {
            size_t src = 0;
            while (strcmp(lw_run_columns[src], cols[c]) != 0)
                src++;
            const char *cell = full->cell[frow * full->ncol + src];
            st = lw_rtable_set(t, row, nk + c, cell ? cell : "", err);
        }
    }
    lw_rtable_free(full);
    if (st != LW_OK) {
        lw_rtable_free(t);
        return st;
    }
    *out = t;
    return LW_OK;
}

/* Trade-off chart: runtime against the 30-s light output, one series per
 * value of the first varied key other than the resistor, points labelled
 * with the resistor (or the last varied key). */
static lw_status sweep_plot(const char *path, const lw_profile *prof, const lw_sweep *sw,
                            lw_error *err)
{
    size_t nk = sw->nvary, group_k = nk, label_k = nk ? nk - 1 : 0;
    for (size_t k = 0; k < nk; k++)
        if (!strcmp(sw->vary[k].key, "drive.resistor_ohm"))
            label_k = k;
    for (size_t k = 0; k < nk && group_k == nk; k++)
        if (k != label_k)
            group_k = k;
    size_t ngroups = group_k < nk ? sw->vary[group_k].n : 1;
    if (ngroups > LW_PLOT_SERIES_MAX)
        ngroups = LW_PLOT_SERIES_MAX;
    double *xy = malloc(2 * sw->n * sizeof *xy);
    const char **labels = malloc(sw->n * sizeof *labels);
    if (!xy || !labels) {
        free(xy);
        free(labels);
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    }
    lw_chart c = {0};
    char sub[256];
    snprintf(sub, sizeof sub, "each point one full discharge; labels: %s",
             nk ? sw->vary[label_k].key : "");
    c.title = prof->light.name;
    c.subtitle = sub;
    c.npanels = 1;
    lw_panel *p = &c.panels[0];
    double xmin = INFINITY, xmax = 0, ymin = INFINITY, ymax = 0;
    size_t used = 0;
    for (size_t g = 0; g < ngroups; g++) {
        lw_series *s = &p->series[p->nseries];
        size_t start = used;
        for (size_t r = 0; r < sw->n; r++) {
            if (group_k < nk && sw->index[r * nk + group_k] != g)
                continue;
            const lw_result *res = &sw->cases[r].res;
            if (!(res->flux_ref_lm > 0 && res->runtime_h > 0))
                continue;
            xy[used] = res->flux_ref_lm;
            xy[sw->n + used] = res->runtime_h;
            labels[used] = nk ? sw->vary[label_k].values[sw->index[r * nk + label_k]] : NULL;
            xmin = fmin(xmin, xy[used]);
            xmax = fmax(xmax, xy[used]);
            ymin = fmin(ymin, xy[sw->n + used]);
            ymax = fmax(ymax, xy[sw->n + used]);
            used++;
        }
        if (used == start)
            continue;
        *s = (lw_series){.name = group_k < nk ? sw->vary[group_k].values[g] : "runs",
                         .x = xy + start, .y = xy + sw->n + start, .n = used - start,
                         .points = true, .labels = labels + start};
        p->nseries++;
    }
    c.x = (lw_axis){.label = "light output 30 s after switch-on (lm)",
                    .log = xmax > 30 * xmin, .from_zero = !(xmax > 30 * xmin)};
    p->y = (lw_axis){.label = "runtime to cutoff (h)", .log = ymax > 30 * ymin,
                     .from_zero = !(ymax > 30 * ymin)};
    lw_status st = write_chart(path, &c, err);
    free(xy);
    free(labels);
    return st;
}

int lw_cmd_sweep(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"vary", required_argument, NULL, OPT_VARY},
        {"set", required_argument, NULL, OPT_SET},
        {"mode", required_argument, NULL, OPT_MODE},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"plot", required_argument, NULL, OPT_PLOT},
        {"threads", required_argument, NULL, OPT_THREADS},
        {"columns", required_argument, NULL, OPT_COLUMNS},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    common_opts o = {.fmt = LW_FMT_TEXT};
    const char *varies[LW_CASE_SETS], *plot_path = NULL, *columns = NULL;
    size_t nvary = 0;
    int c, rc = 0, threads = 0;
    while ((c = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
        if (c == 'h') {
            fputs(lw_sweep_help, stdout);
            return 0;
        }
        if (c == OPT_VARY) {
            if (nvary == LW_CASE_SETS)
                return usage_error("sweep", "too many --vary options");
            varies[nvary++] = optarg;
        } else if (c == OPT_PLOT) {
            plot_path = optarg;
        } else if (c == OPT_COLUMNS) {
            columns = optarg;
        } else if (c == OPT_THREADS) {
            if ((rc = parse_threads("sweep", optarg, &threads)) != 0)
                return rc;
        } else if (!common_option(c, &o, "sweep", &rc)) {
            return usage_error("sweep", "unknown option");
        }
        if (rc)
            return rc;
    }
    if (optind + 1 != argc)
        return usage_error("sweep", "name exactly one profile");
    if (nvary == 0)
        return usage_error("sweep", "give at least one --vary KEY=VALUES");
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_vary vary[LW_CASE_SETS];
    memset(vary, 0, sizeof vary);
    lw_sweep sw = {0};
    lw_rtable *t = NULL;
    lw_status st = load_profile(argv[optind], &o, &prof, &err);
    for (size_t k = 0; k < nvary && st == LW_OK; k++)
        st = lw_vary_parse(varies[k], &prof, &vary[k], &err);
    size_t total = 1;
    for (size_t k = 0; k < nvary && st == LW_OK; k++)
        total *= vary[k].n;
    if (st == LW_OK)
        st = lw_sweep_run(&prof, vary, nvary, threads, want_progress(total) ? progress : NULL,
                          NULL, &sw, &err);
    if (st == LW_OK && plot_path)
        st = sweep_plot(plot_path, &prof, &sw, &err);
    if (st == LW_OK)
        st = sweep_table(&sw, o.fmt, columns, &t, &err);
    if (st == LW_OK && o.fmt != LW_FMT_CSV)
        st = lw_rtable_note(t, lw_caution_line, &err);
    if (st == LW_OK)
        st = lw_rtable_write(t, stdout, o.fmt, &err);
    int code = st == LW_OK ? 0 : report_error(&err);
    lw_rtable_free(t);
    lw_sweep_clear(&sw);
    for (size_t k = 0; k < nvary; k++)
        lw_vary_clear(&vary[k]);
    lw_profile_clear(&prof);
    return code;
}

/* ---- pick ---- */

static lw_status pick_report(const lw_profile *prof, const lw_pick *pk, int series,
                             lw_target_kind kind, double target, lw_format fmt, lw_error *err)
{
    if (fmt == LW_FMT_TEXT) {
        char rt[64];
        lw_format_hours(pk->run.runtime_h, rt, sizeof rt);
        printf("%s: series resistor for %g %s, E%d parts +-%g %%\n", prof->light.name, target,
               kind == LW_TARGET_CURRENT ? "mA per string" : "lm", series, pk->tolerance_pct);
        printf("  ideal resistance     %.4g ohm (nominal parts, fresh cells)\n", pk->ideal_ohm);
        printf("  chosen               %g ohm\n", pk->resistor_ohm);
        printf("  LED current          %.2f mA nominal, %.2f mA worst case (max %.4g mA)\n",
               pk->nominal_led_a * 1e3, pk->worst_led_a * 1e3, pk->max_led_a * 1e3);
        printf("  light output         %.4g lm at switch-on\n", pk->nominal_flux_lm);
        printf("  resistor power       %.3g W nominal, %.3g W worst case", pk->nominal_resistor_w,
               pk->worst_resistor_w);
        if (isfinite(pk->recommended_rating_w))
            printf(" -> a %g W part\n", pk->recommended_rating_w);
        else
            printf(" -> no standard rating is enough\n");
        if (prof->light.drive.rating_w > 0 && prof->light.drive.rating_w < pk->recommended_rating_w)
            printf("  note                 the profile's %g W part is below the recommended "
                   "rating\n",
                   prof->light.drive.rating_w);
        printf("  runtime to cutoff    %s (%s)\n", rt, lw_end_reason_names[pk->run.end_reason]);
        printf("\nWorst case: fresh cells at %.3g V open circuit and %.3g ohm each, resistor "
               "-%g %%, LED forward voltage -%g %%.\n",
               pk->worst.ocv_v, pk->worst.r_cell_ohm,
               pk->tolerance_pct, prof->light.led.forward_spread_pct);
        printf("Power rating: at least twice the worst-case dissipation (derating to 50 %% of "
               "rated power; common practice).\n%s\n",
               lw_caution_line);
        return ferror(stdout) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
    }
    static const char *const head[] = {
        "resistor_ohm",     "series",           "tolerance_pct",      "ideal_ohm",
        "nominal_led_ma",   "worst_led_ma",     "max_led_ma",         "nominal_flux_lm",
        "nominal_resistor_w", "worst_resistor_w", "recommended_rating_w", "runtime_h",
        "end_reason"};
    size_t nh = sizeof head / sizeof head[0];
    lw_rtable *t = lw_rtable_new(nh, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = LW_OK;
    size_t row;
    for (size_t i = 0; i < nh && st == LW_OK; i++)
        st = lw_rtable_head(t, i, head[i], err);
    if (st == LW_OK)
        st = lw_rtable_add_row(t, &row, err);
    double v[] = {pk->resistor_ohm,        series,
                  pk->tolerance_pct,       pk->ideal_ohm,
                  pk->nominal_led_a * 1e3, pk->worst_led_a * 1e3,
                  pk->max_led_a * 1e3,     pk->nominal_flux_lm,
                  pk->nominal_resistor_w,  pk->worst_resistor_w,
                  pk->recommended_rating_w, pk->run.runtime_h};
    for (size_t i = 0; i < nh - 1 && st == LW_OK; i++)
        st = isfinite(v[i]) ? lw_rtable_setf(t, row, i, err, "%.6g", v[i])
                            : lw_rtable_set(t, row, i, "", err);
    if (st == LW_OK)
        st = lw_rtable_set(t, row, nh - 1, lw_end_reason_names[pk->run.end_reason], err);
    if (st == LW_OK)
        st = lw_rtable_write(t, stdout, fmt, err);
    lw_rtable_free(t);
    return st;
}

int lw_cmd_pick(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"target-ma", required_argument, NULL, OPT_TARGET_MA},
        {"target-lm", required_argument, NULL, OPT_TARGET_LM},
        {"series", required_argument, NULL, OPT_SERIES},
        {"set", required_argument, NULL, OPT_SET},
        {"mode", required_argument, NULL, OPT_MODE},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    common_opts o = {.fmt = LW_FMT_TEXT};
    int c, rc = 0, series = 24, ntargets = 0;
    lw_target_kind kind = LW_TARGET_CURRENT;
    double target = NAN;
    while ((c = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
        if (c == 'h') {
            fputs(lw_pick_help, stdout);
            return 0;
        }
        if (c == OPT_TARGET_MA || c == OPT_TARGET_LM) {
            if (!lw_parse_double(optarg, &target) || !(target > 0))
                return usage_error("pick", "the target must be a positive number");
            kind = c == OPT_TARGET_MA ? LW_TARGET_CURRENT : LW_TARGET_FLUX;
            ntargets++;
        } else if (c == OPT_SERIES) {
            if (!lw_eseries_parse(optarg, &series))
                return usage_error("pick", "--series takes E3, E6, E12, E24, E48, E96 or E192");
        } else if (!common_option(c, &o, "pick", &rc)) {
            return usage_error("pick", "unknown option");
        }
        if (rc)
            return rc;
    }
    if (optind + 1 != argc)
        return usage_error("pick", "name exactly one profile");
    if (ntargets != 1)
        return usage_error("pick", "give exactly one of --target-ma and --target-lm");
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_status st = load_profile(argv[optind], &o, &prof, &err);
    lw_pick pk = {0};
    lw_status pst = LW_OK;
    if (st == LW_OK) {
        pst = lw_pick_resistor(&prof, kind, target * (kind == LW_TARGET_CURRENT ? 1e-3 : 1.0),
                               series, &pk, &err);
        if (pst == LW_OK || (pst == LW_ENOANSWER && pk.resistor_ohm > 0 && pk.within_ratings))
            st = pick_report(&prof, &pk, series, kind, target, o.fmt,
                             pst == LW_OK ? &err : NULL);
        else
            st = pst;
    }
    int code = st != LW_OK || pst != LW_OK ? report_error(&err) : 0;
    lw_result_clear(&pk.run);
    lw_profile_clear(&prof);
    return code;
}

/* ---- size ---- */

int lw_cmd_size(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"runtime-h", required_argument, NULL, OPT_RUNTIME},
        {"flux-lm", required_argument, NULL, OPT_FLUX},
        {"cells", required_argument, NULL, OPT_CELLS},
        {"max-series", required_argument, NULL, OPT_MAXS},
        {"max-parallel", required_argument, NULL, OPT_MAXP},
        {"series", required_argument, NULL, OPT_SERIES},
        {"top", required_argument, NULL, OPT_TOP},
        {"threads", required_argument, NULL, OPT_THREADS},
        {"set", required_argument, NULL, OPT_SET},
        {"mode", required_argument, NULL, OPT_MODE},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    common_opts o = {.fmt = LW_FMT_TEXT};
    lw_size_options opt = {.runtime_h = NAN, .flux_lm = NAN, .max_series = 4,
                           .max_parallel = 2, .eseries = 24};
    const char *cells_arg = NULL;
    int c, rc = 0, top = 5;
    while ((c = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
        switch (c) {
        case 'h':
            fputs(lw_size_help, stdout);
            return 0;
        case OPT_RUNTIME:
            if (!lw_parse_double(optarg, &opt.runtime_h) || !(opt.runtime_h > 0))
                return usage_error("size", "--runtime-h takes a positive number of hours");
            break;
        case OPT_FLUX:
            if (!lw_parse_double(optarg, &opt.flux_lm) || !(opt.flux_lm > 0))
                return usage_error("size", "--flux-lm takes a positive number of lumens");
            break;
        case OPT_CELLS:
            cells_arg = optarg;
            break;
        case OPT_MAXS:
        case OPT_MAXP: {
            int v;
            if (!lw_parse_int(optarg, &v) || v < 1 || v > 24)
                return usage_error("size", "--max-series and --max-parallel take 1 to 24");
            *(c == OPT_MAXS ? &opt.max_series : &opt.max_parallel) = v;
            break;
        }
        case OPT_SERIES:
            if (!lw_eseries_parse(optarg, &opt.eseries))
                return usage_error("size", "--series takes E3, E6, E12, E24, E48, E96 or E192");
            break;
        case OPT_TOP:
            if (!lw_parse_int(optarg, &top) || top < 1)
                return usage_error("size", "--top takes a positive whole number");
            break;
        case OPT_THREADS:
            if ((rc = parse_threads("size", optarg, &opt.threads)) != 0)
                return rc;
            break;
        default:
            if (!common_option(c, &o, "size", &rc))
                return usage_error("size", "unknown option");
            if (rc)
                return rc;
        }
    }
    if (optind + 1 != argc)
        return usage_error("size", "name exactly one profile");
    if (isnan(opt.runtime_h))
        return usage_error("size", "give the required runtime with --runtime-h");
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_vary cellv = {0};
    const char **cells = NULL;
    lw_size_row *rows = NULL;
    size_t n = 0;
    lw_status st = load_profile(argv[optind], &o, &prof, &err);
    if (st == LW_OK && cells_arg)
        st = parse_cells(cells_arg, &prof, &cellv, &cells, &err);
    opt.cells = cells;
    if (st == LW_OK)
        st = lw_size_packs(&prof, &opt, &rows, &n, &err);
    int code = 0;
    if (st != LW_OK) {
        code = report_error(&err);
    } else {
        size_t fits = 0;
        while (fits < n && rows[fits].fits)
            fits++;
        size_t show = fits ? (fits < (size_t)top ? fits : (size_t)top) : (n ? 1 : 0);
        static const char *const head[] = {"cell",       "series",          "parallel",
                                           "resistor_ohm", "runtime_h",     "margin_pct",
                                           "initial_flux_lm", "mass_g"};
        lw_rtable *t = lw_rtable_new(8, &err);
        for (size_t k = 0; t && k < 8; k++)
            lw_rtable_head(t, k, head[k], &err);
        for (size_t i = 0; t && i < show; i++) {
            size_t r;
            lw_rtable_add_row(t, &r, &err);
            lw_rtable_set(t, r, 0, rows[i].cell, &err);
            lw_rtable_setf(t, r, 1, &err, "%d", rows[i].series);
            lw_rtable_setf(t, r, 2, &err, "%d", rows[i].parallel);
            lw_rtable_setf(t, r, 3, &err, "%g", rows[i].resistor_ohm);
            lw_rtable_setf(t, r, 4, &err, "%.4g", rows[i].runtime_h);
            lw_rtable_setf(t, r, 5, &err, "%.1f", rows[i].margin_pct);
            lw_rtable_setf(t, r, 6, &err, "%.4g", rows[i].initial_flux_lm);
            lw_rtable_setf(t, r, 7, &err, "%g", rows[i].mass_g);
        }
        char note[256];
        if (t && o.fmt != LW_FMT_CSV) {
            if (!isnan(opt.flux_lm))
                snprintf(note, sizeof note,
                         "Requirement: at least %g lm for %g h. Ranked by cell count, then mass.",
                         opt.flux_lm, opt.runtime_h);
            else
                snprintf(note, sizeof note,
                         "Requirement: %g h to the cutoff at the profile's LED current. Ranked "
                         "by cell count, then mass.",
                         opt.runtime_h);
            lw_rtable_note(t, note, &err);
            if (!fits)
                lw_rtable_note(t, "Nothing fits; the row above is what came closest.", &err);
            lw_rtable_note(t, lw_caution_line, &err);
        }
        if (t && err.code == LW_OK)
            lw_rtable_write(t, stdout, o.fmt, &err);
        lw_rtable_free(t);
        if (err.code != LW_OK)
            code = report_error(&err);
        else if (!fits) {
            fprintf(stderr, "lampwick: %s: no pack of %s meets %g h%s\n", prof.path,
                    cells_arg ? cells_arg : prof.cell_ref, opt.runtime_h,
                    isnan(opt.flux_lm) ? "" : " above the flux floor");
            code = EXIT_NOANSWER;
        }
    }
    free(rows);
    free(cells);
    lw_vary_clear(&cellv);
    lw_profile_clear(&prof);
    return code;
}

/* ---- table ---- */

int lw_cmd_table(int argc, char **argv)
{
    static const struct option longopts[] = {
        {"cells", required_argument, NULL, OPT_CELLS},
        {"set", required_argument, NULL, OPT_SET},
        {"format", required_argument, NULL, OPT_FORMAT},
        {"threads", required_argument, NULL, OPT_THREADS},
        {"help", no_argument, NULL, 'h'},
        {NULL, 0, NULL, 0}};
    common_opts o = {.fmt = LW_FMT_TEXT};
    const char *cells_arg = NULL;
    int c, rc = 0, threads = 0;
    while ((c = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
        if (c == 'h') {
            fputs(lw_table_help, stdout);
            return 0;
        }
        if (c == OPT_CELLS)
            cells_arg = optarg;
        else if (c == OPT_THREADS) {
            if ((rc = parse_threads("table", optarg, &threads)) != 0)
                return rc;
        } else if (!common_option(c, &o, "table", &rc))
            return usage_error("table", "unknown option");
        if (rc)
            return rc;
    }
    if (optind + 1 != argc)
        return usage_error("table", "name exactly one profile");
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    lw_vary cellv = {0};
    const char **cells = NULL;
    lw_rtable *t = NULL;
    lw_status st = load_profile(argv[optind], &o, &prof, &err);
    if (st == LW_OK && cells_arg)
        st = parse_cells(cells_arg, &prof, &cellv, &cells, &err);
    if (st == LW_OK)
        st = lw_spec_table(&prof, cells, o.fmt, threads, &t, &err);
    if (st == LW_OK)
        st = lw_rtable_write(t, stdout, o.fmt, &err);
    int code = st == LW_OK ? 0 : report_error(&err);
    lw_rtable_free(t);
    free(cells);
    lw_vary_clear(&cellv);
    lw_profile_clear(&prof);
    return code;
}
