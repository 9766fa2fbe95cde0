/*
 * fuzz_targets.c - the fuzz targets (see fuzz_targets.h).
 *
 * LW_SOURCE_ROOT (a compile-time string) names the source tree, whose
 * cells/ and profiles/ the targets use.
 */
#include "fuzz_targets.h"

#include <dirent.h>
#include <fcntl.h>
#include <stdbool.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include "cli.h"
#include <lampwick/lampwick.h>

#ifndef LW_SOURCE_ROOT
#define LW_SOURCE_ROOT "."
#endif

static char dir[128];

/* Any outcome but a crash, hang, leak or sanitizer report is fine. */
static void any(lw_status st)
{
    (void)st;
}

/* A scratch folder for the whole process, emptied before each input. */
static void scratch(void)
{
    if (!dir[0]) {
        snprintf(dir, sizeof dir, "/tmp/lampwick-fuzz-XXXXXX");
        if (!mkdtemp(dir))
            abort();
        /* the command line prints: keep its output away from the fuzzer's */
        int fd = open("/dev/null", O_WRONLY);
        if (fd >= 0) {
            dup2(fd, STDOUT_FILENO);
            close(fd);
        }
    }
    lw_cache_clear(); /* files of the same name are rewritten for every input */
    DIR *d = opendir(dir);
    if (!d)
        abort();
    struct dirent *de;
    while ((de = readdir(d)) != NULL)
        if (strcmp(de->d_name, ".") != 0 && strcmp(de->d_name, "..") != 0)
            unlinkat(dirfd(d), de->d_name, 0); /* files only: the targets make no folders */
    closedir(d);
}

static const char *put(const char *name, const void *data, size_t size)
{
    static char path[8][256];
    static int k;
    char *p = path[k++ % 8];
    snprintf(p, 256, "%s/%s", dir, name);
    FILE *fp = fopen(p, "wb");
    if (!fp)
        abort();
    fwrite(data, 1, size, fp);
    fclose(fp);
    return p;
}

static const char *put_text(const char *name, const char *text)
{
    return put(name, text, strlen(text));
}

static lw_search bundled(void)
{
    lw_search s;
    memset(&s, 0, sizeof s);
    lw_search_add(&s, LW_SOURCE_ROOT "/cells");
    return s;
}

/* Everything a loaded profile can be put through. */
static void exercise(lw_profile *p)
{
    lw_error e;
    lw_error_clear(&e);
    lw_run_options o = lw_run_options_default();
    o.want_trace = true;
    lw_result r;
    if (lw_run(&p->light, &o, &r, &e) == LW_OK) {
        FILE *sink = fopen("/dev/null", "w");
        lw_trace tr;
        if (sink) {
            any(lw_report_run(sink, LW_FMT_TEXT, false, p, &r, &e));
            any(lw_report_run(sink, LW_FMT_CSV, false, p, &r, &e));
            any(lw_report_run(sink, LW_FMT_MD, true, p, &r, &e));
            any(lw_report_run_with_corners(sink, LW_FMT_JSON, false, p, &r, &e));
            if (lw_trace_build(&p->light, &r, 50, &tr, &e) == LW_OK) {
                any(lw_report_trace_csv(sink, &tr, &e));
                any(lw_plot_run(sink, "fuzz", &p->light, &r, &tr, &e));
                lw_trace_clear(&tr);
            }
            fclose(sink);
        }
        lw_run_result_clear(&r);
    }
    if (lw_profile_mode_count(p) <= 8) {
        lw_rtable *t;
        lw_error_clear(&e);
        if (lw_report_spec_table(p, NULL, LW_FMT_TEXT, 1, &t, &e) == LW_OK)
            lw_rtable_free(t);
        /* the design review: every section, a small spread study */
        lw_html_options ho = {.date = "2026-01-01", .spread_samples = 4, .seed = 1,
                              .threads = 1};
        FILE *sink = fopen("/dev/null", "w");
        if (sink) {
            lw_error_clear(&e);
            any(lw_report_html(sink, p, &ho, &e));
            fclose(sink);
        }
    }
}

int fuzz_profile(const uint8_t *data, size_t size)
{
    scratch();
    lw_search s = bundled();
    lw_profile p;
    lw_error e;
    lw_error_clear(&e);
    if (lw_profile_load(put("p.ini", data, size), &s, &p, &e) == LW_OK)
        exercise(&p);
    lw_profile_clear(&p);
    return 0;
}

static const char *const curve =
    "depth_pct,open_circuit_v,resistance_ohm\n0,1.4,0.03\n90,1.1,0.05\n100,0.8,0.1\n";

int fuzz_cell(const uint8_t *data, size_t size)
{
    scratch();
    put_text("c.curve.csv", curve);
    put_text("c.temperature.csv", "temp_c,capacity_factor,resistance_factor\n-20,0.5,3\n"
                                  "20,1,1\n");
    put("c.ini", data, size);
    put_text("p.ini", "[pack]\ncell = c\nseries = 3\n[led]\nmodel = linear\nthreshold_v = 2.6\n"
                      "slope_ohm = 5\nflux_lm = 20\nflux_current_ma = 50\n[drive]\n"
                      "resistor_ohm = 10\n");
    lw_cell c;
    lw_error e;
    lw_error_clear(&e);
    char path[256];
    snprintf(path, sizeof path, "%s/c.ini", dir);
    if (lw_cellfile_load(path, &c, &e) == LW_OK) {
        lw_cell_clear(&c);
        lw_profile p;
        snprintf(path, sizeof path, "%s/p.ini", dir);
        if (lw_profile_load(path, NULL, &p, &e) == LW_OK)
            exercise(&p);
        lw_profile_clear(&p);
    }
    return 0;
}

int fuzz_csv(const uint8_t *data, size_t size)
{
    if (size < 1)
        return 0;
    scratch();
    int kind = data[0] % 6;
    data++;
    size--;
    lw_error e;
    lw_error_clear(&e);
    if (kind == 5) { /* a discharge log, fitted */
        lw_cellfit_log log;
        if (lw_cellfit_log_read(put("log.csv", data, size), 3.9, 0, &log, &e) == LW_OK) {
            lw_cellfit_options opt = {.cutoff_v = 1.0, .resistance_ohm = 0.05,
                                      .tolerance_v = 0.005, .nominal_v = NAN};
            lw_cellfit fit;
            if (lw_cellfit_fit(&log, 1, &opt, &fit, &e) == LW_OK)
                lw_cell_clear(&fit.cell);
            lw_cellfit_log_clear(&log);
        }
        return 0;
    }
    /* a table named by a cell file or a profile, loaded through its key */
    put_text("c.curve.csv", curve);
    put_text("c.ini", "[cell]\nname = c\nchemistry = nimh\nnominal_v = 1.2\ncapacity_mah = 2000\n"
                      "rated_ma = 400\ncutoff_v = 0.9\nrechargeable = yes\ncurve = c.curve.csv\n"
                      "temperature = t.csv\n");
    put_text("t.csv", "temp_c,capacity_factor,resistance_factor\n-20,0.5,3\n20,1,1\n");
    static const char *const names[] = {"c.curve.csv", "t.csv", "iv.csv", "flux.csv",
                                        "eta.csv"};
    put(names[kind], data, size);
    const char *profile =
        kind == 4 ? "[pack]\ncell = c\nseries = 3\n[led]\nmodel = constant\nforward_v = 3\n"
                    "flux_lm = 20\nflux_current_ma = 50\n[drive]\ntype = converter\n"
                    "set_ma = 50\nefficiency_file = eta.csv\n"
                  : "[pack]\ncell = c\nseries = 3\n[led]\nmodel = table\niv_file = iv.csv\n"
                    "flux_file = flux.csv\n[drive]\nresistor_ohm = 10\n";
    if (kind == 2 || kind == 3) {
        if (kind == 2)
            put_text("flux.csv", "current_ma,flux_lm\n10,5\n50,20\n100,35\n");
        else
            put_text("iv.csv", "current_ma,forward_v\n1,2.5\n10,2.7\n50,2.9\n100,3.1\n");
    } else {
        put_text("iv.csv", "current_ma,forward_v\n1,2.5\n10,2.7\n50,2.9\n100,3.1\n");
        put_text("flux.csv", "current_ma,flux_lm\n10,5\n50,20\n100,35\n");
    }
    lw_profile p;
    if (lw_profile_load(put_text("p.ini", profile), NULL, &p, &e) == LW_OK)
        exercise(&p);
    lw_profile_clear(&p);
    return 0;
}

int fuzz_args(const uint8_t *data, size_t size)
{
    if (size < 1)
        return 0;
    scratch();
    int kind = data[0] % 3;
    char arg[512];
    size_t n = size - 1 < sizeof arg - 1 ? size - 1 : sizeof arg - 1;
    memcpy(arg, data + 1, n);
    arg[n] = '\0';
    lw_search s = bundled();
    lw_profile p;
    lw_error e;
    lw_error_clear(&e);
    if (lw_profile_load(LW_SOURCE_ROOT "/profiles/demo.ini", &s, &p, &e) != LW_OK)
        abort(); /* the bundled demo must load */
    if (kind == 0) {
        if (lw_profile_set_arg(&p, arg, &e) == LW_OK && lw_profile_resolve(&p, &e) == LW_OK)
            exercise(&p);
    } else {
        lw_vary v;
        if (kind == 1 && lw_vary_parse(arg, &p, &v, &e) == LW_OK) {
            if (v.n <= 64) {
                lw_sweep sw;
                if (lw_sweep_run(&p, &v, 1, 1, NULL, NULL, &sw, &e) == LW_OK) {
                    lw_rtable *t;
                    if (lw_report_sweep(&sw, LW_FMT_CSV, NULL, &t, &e) == LW_OK)
                        lw_rtable_free(t);
                    lw_sweep_clear(&sw);
                }
            }
            lw_vary_clear(&v);
        } else if (kind == 2) {
            lw_vary one;
            if (lw_vary_parse("drive.resistor_ohm=22,33", &p, &one, &e) == LW_OK) {
                lw_sweep sw;
                if (lw_sweep_run(&p, &one, 1, 1, NULL, NULL, &sw, &e) == LW_OK) {
                    lw_rtable *t;
                    if (lw_report_sweep(&sw, LW_FMT_TEXT, arg, &t, &e) == LW_OK)
                        lw_rtable_free(t);
                    lw_sweep_clear(&sw);
                }
                lw_vary_clear(&one);
            }
        }
    }
    lw_profile_clear(&p);
    return 0;
}

static bool name_ok(const char *s)
{
    if (!s[0] || !strcmp(s, ".") || !strcmp(s, ".."))
        return false;
    for (; *s; s++)
        if (!((*s >= 'a' && *s <= 'z') || (*s >= 'A' && *s <= 'Z') || (*s >= '0' && *s <= '9') ||
              *s == '.' || *s == '-' || *s == '_'))
            return false;
    return true;
}

int fuzz_cli(const uint8_t *data, size_t size)
{
    if (size > 65536)
        return 0;
    scratch();
    char *text = malloc(size + 1);
    if (!text)
        return 0;
    memcpy(text, data, size);
    text[size] = '\0';
    /* the command line */
    char *nl = strchr(text, '\n');
    if (nl)
        *nl = '\0';
    char *argv[64];
    int argc = 0;
    for (char *w = strtok(text, " "); w && argc < 63; w = strtok(NULL, " "))
        argv[argc++] = w;
    argv[argc] = NULL;
    bool ok = argc >= 1 && !strcmp(argv[0], "lampwick");
    for (int i = 0; i < argc && ok; i++) /* no paths out, and no '-': it would wait on stdin */
        ok = !strchr(argv[i], '/') && strcmp(argv[i], "-") != 0;
    /* the files */
    for (char *p = nl ? nl + 1 : NULL; ok && p && *p;) {
        if (strncmp(p, "=== ", 4) != 0)
            break;
        char *eol = strchr(p, '\n');
        if (!eol)
            break;
        *eol = '\0';
        char *name = p + 4;
        char *body = eol + 1, *next = strstr(body, "\n=== ");
        size_t len = next ? (size_t)(next - body) + 1 : strlen(body);
        if (!name_ok(name))
            ok = false;
        else
            put(name, body, len);
        p = next ? next + 1 : NULL;
    }
    if (ok) {
        char cwd[1024];
        if (getcwd(cwd, sizeof cwd) && chdir(dir) == 0) {
            setenv("LAMPWICK_CELLS", LW_SOURCE_ROOT "/cells", 1);
            (void)lw_cli_run(argc, argv);
            fflush(stdout);
            clearerr(stdout);
            if (chdir(cwd) != 0)
                abort();
        }
    }
    free(text);
    return 0;
}

int fuzz_writers(const uint8_t *data, size_t size)
{
    if (size < 1)
        return 0;
    scratch();
    /* cut the input into up to 8 texts at NUL bytes, the rest is numbers */
    char buf[1024];
    size_t n = size < sizeof buf - 1 ? size : sizeof buf - 1;
    memcpy(buf, data, n);
    buf[n] = '\0';
    const char *texts[8];
    size_t nt = 0;
    for (size_t i = 0; i < n && nt < 8;) {
        texts[nt++] = buf + i;
        i += strlen(buf + i) + 1;
    }
    if (nt == 0)
        texts[nt++] = "";
    double nums[8];
    for (size_t i = 0; i < 8; i++) {
        uint64_t bits = 0;
        for (size_t k = 0; k < 8 && i * 8 + k < size; k++)
            bits = bits << 8 | data[size - 1 - (i * 8 + k)];
        memcpy(&nums[i], &bits, sizeof bits);
    }
    lw_error e;
    lw_error_clear(&e);
    FILE *sink = fopen("/dev/null", "w");
    if (!sink)
        return 0;
    lw_rtable *t = lw_rtable_new(3, &e);
    if (t) {
        size_t row;
        any(lw_rtable_head(t, 0, texts[0], &e));
        any(lw_rtable_group(t, 1, texts[nt > 1 ? 1 : 0], &e));
        if (lw_rtable_add_row(t, &row, &e) == LW_OK) {
            any(lw_rtable_set(t, row, 0, texts[nt > 2 ? 2 : 0], &e));
            any(lw_rtable_num(t, row, 1, nums[0], 6, &e));
            any(lw_rtable_num(t, row, 2, nums[1], 3, &e));
        }
        any(lw_rtable_note(t, texts[nt - 1], &e));
        any(lw_rtable_set_title(t, texts[0], &e));
        for (int f = 0; f < 3; f++)
            any(lw_rtable_write(t, sink, (lw_rtable_format)f, &e));
        lw_rtable_free(t);
    }
    double x[4] = {nums[2], nums[3], 1, 2}, y[4] = {nums[4], nums[5], 3, 4};
    lw_chart c = {0};
    c.title = texts[0];
    c.subtitle = texts[nt - 1];
    c.npanels = 1;
    c.x = (lw_axis){.label = texts[nt > 1 ? 1 : 0], .log = data[0] & 1};
    c.panels[0].y = (lw_axis){.label = texts[0], .log = data[0] & 2};
    const char *labels[4] = {texts[0], texts[nt - 1], NULL, "x"};
    c.panels[0].series[c.panels[0].nseries++] =
        (lw_series){.name = texts[0], .x = x, .y = y, .n = 4, .points = true, .labels = labels};
    c.panels[0].refs[c.panels[0].nrefs++] = (lw_refline){nums[6], texts[nt - 1]};
    any(lw_plot_svg(sink, &c, &e));
    fclose(sink);
    /* a cell named by the input: written only if it reads back exactly */
    lw_cell cell;
    memset(&cell, 0, sizeof cell);
    lw_text_copy(cell.name, texts[0], sizeof cell.name);
    const double d[] = {0, 1}, v[] = {1.4, 0.9}, r[] = {0.03, 0.1};
    cell.ocv = lw_interp_new(d, v, 2, &e);
    cell.res = lw_interp_new(d, r, 2, &e);
    cell.nominal_v = 1.2;
    cell.capacity_ah = 2;
    cell.rated_a = 0.4;
    cell.peukert = 1;
    cell.max_capacity_ah = 2;
    cell.cutoff_v = 1.0;
    char path[256];
    snprintf(path, sizeof path, "%s/w.ini", dir);
    lw_error_clear(&e);
    if (cell.ocv && cell.res && lw_cellfile_save(path, &cell, texts[nt - 1], &e) == LW_OK) {
        lw_cell back;
        lw_error_clear(&e);
        if (lw_cellfile_load(path, &back, &e) != LW_OK || strcmp(back.name, cell.name) != 0)
            abort(); /* what is written must read back exactly */
        lw_cell_clear(&back);
    }
    lw_cell_clear(&cell);
    return 0;
}

const fuzz_target fuzz_targets[] = {
    {"profile", fuzz_profile}, {"cell", fuzz_cell}, {"csv", fuzz_csv},
    {"args", fuzz_args},       {"cli", fuzz_cli},   {"writers", fuzz_writers},
};
const size_t fuzz_ntargets = sizeof fuzz_targets / sizeof fuzz_targets[0];
