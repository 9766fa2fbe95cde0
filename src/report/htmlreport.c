/*
 * htmlreport.c - the design review in one HTML file (see htmlreport.h).
 *
 * Everything in it comes from the same runs and tables as the other
 * reports: the specification table and its corners (specreport.c), the
 * charts (plot.c), the spread study (mcreport.c), the warnings and caution
 * (report.c); this file lays them out.  Units: h, lm, mA, mW, W, Wh, °C.
 */
#include "lampwick/htmlreport.h"

#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"
#include "lampwick/engine.h"
#include "lampwick/mcreport.h"
#include "lampwick/montecarlo.h"
#include "lampwick/number.h"
#include "lampwick/plot.h"
#include "lampwick/report.h"
#include "lampwick/spec.h"
#include "lampwick/specreport.h"
#include "lampwick/text.h"
#include "lampwick/trace.h"
#include "lw_config.h"

/* Screen and print.  A section starts a new page in print; a table, chart
 * or figure is never split across pages.  No class name of the charts'
 * own style (tick, axis, leg, pt, title, sub) is used here: an inline
 * SVG's style sheet applies to the whole document. */
static const char css[] =
    "body{font-family:'DejaVu Sans','Liberation Sans',Arial,sans-serif;color:#222;"
    "max-width:60em;margin:1.5em auto;padding:0 1em;line-height:1.4;font-size:15px}"
    "h1{font-size:1.6em;margin-bottom:.2em}h2{font-size:1.25em;border-bottom:1px solid #999;"
    "padding-bottom:.15em;margin-top:1.6em}h3{font-size:1.05em}"
    ".meta{color:#555;margin-top:0}"
    "table{border-collapse:collapse;margin:.6em 0 1em;font-size:.9em}"
    "caption{text-align:left;font-weight:bold;padding:.2em 0}"
    "th,td{border:1px solid #bbb;padding:.2em .5em;vertical-align:top}"
    "thead th{background:#eee}td.num,th.num{text-align:right;font-variant-numeric:tabular-nums}"
    ".notes p{margin:.2em 0;font-size:.85em;color:#444}"
    "figure{margin:1em 0}figure svg{max-width:100%;height:auto;display:block}"
    "figcaption{font-size:.85em;color:#444}"
    "dl.figures{display:grid;grid-template-columns:max-content auto;gap:.2em 1em}"
    "dl.figures dt{font-weight:bold}dl.figures dd{margin:0}"
    ".warn li{margin:.3em 0}.caution{border:2px solid #a33;padding:.5em 1em;background:#fff6f4}"
    "footer{margin-top:2em;color:#555;font-size:.85em;border-top:1px solid #999}"
    "@media print{body{max-width:none;margin:0;font-size:11pt}"
    "section{break-before:page}section#summary{break-before:auto}"
    "table,figure,dl,.caution{break-inside:avoid}tr{break-inside:avoid}"
    "thead{display:table-header-group}h2,h3{break-after:avoid}}"
    "@page{margin:15mm}";

static void text(FILE *fp, const char *s)
{
    lw_text_xml_write(fp, s);
}

static void section_begin(FILE *fp, const char *id, const char *heading)
{
    fprintf(fp, "<section id=\"%s\">\n<h2>", id);
    text(fp, heading);
    fputs("</h2>\n", fp);
}

static void section_end(FILE *fp)
{
    fputs("</section>\n", fp);
}

static void para(FILE *fp, const char *s)
{
    fputs("<p>", fp);
    text(fp, s);
    fputs("</p>\n", fp);
}

/* A table written as HTML and freed. */
static lw_status put_table(FILE *fp, lw_rtable *t, lw_status st, lw_error *err)
{
    if (st == LW_OK && t)
        st = lw_rtable_write(t, fp, LW_FMT_HTML, err);
    lw_rtable_free(t);
    return st;
}

/* A chart written by fn into memory, then inline without its XML
 * declaration (an HTML document has none inside), in a figure. */
typedef lw_status (*chart_fn)(FILE *fp, const void *ctx, lw_error *err);

static lw_status figure(FILE *fp, chart_fn fn, const void *ctx, const char *caption,
                        lw_error *err)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *mem = open_memstream(&buf, &len);
    if (!mem)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a chart");
    lw_status st = fn(mem, ctx, err);
    if (fclose(mem) != 0 && st == LW_OK)
        st = lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a chart");
    if (st == LW_OK) {
        const char *svg = buf ? strstr(buf, "<svg") : NULL;
        if (!svg)
            st = lw_error_set(err, LW_EIO, NULL, 0, "internal: a chart without <svg>");
        else {
            fputs("<figure>\n", fp);
            fwrite(svg, 1, len - (size_t)(svg - buf), fp);
            fputs("<figcaption>", fp);
            text(fp, caption);
            fputs("</figcaption>\n</figure>\n", fp);
        }
    }
    free(buf);
    return st;
}

/* ---- what the review runs ---- */

typedef struct review {
    const lw_profile *prof;
    const lw_html_options *opt;
    lw_result run;                 /* the light as loaded */
    lw_spec spec;                  /* every mode with the profile's cell */
    lw_mc_key keys[LW_MC_KEYS_MAX];
    size_t nkeys;
    lw_mc_options mco;
    lw_mc_result mc;
    lw_mc_study study;
} review;

static void review_clear(review *v)
{
    lw_run_result_clear(&v->run);
    lw_spec_clear(&v->spec);
    lw_mc_result_clear(&v->mc);
}

static lw_status review_run(review *v, lw_error *err)
{
    lw_run_options ro = lw_run_options_default();
    lw_status st = lw_run(&v->prof->light, &ro, &v->run, err);
    if (st == LW_OK && lw_run_end_is_dark(v->run.end_reason))
        return lw_error_set(err, LW_ENOANSWER, v->prof->path, 0,
                            "the light gives no light at switch-on (%s): nothing to review",
                            lw_run_end_names[v->run.end_reason]);
    if (st == LW_OK)
        st = lw_spec_compute(v->prof, NULL, v->opt->threads, &v->spec, err);
    if (st == LW_OK)
        st = lw_mc_keys_of_profile(v->prof, v->keys, &v->nkeys, err);
    if (st == LW_OK && v->nkeys) {
        v->mco = (lw_mc_options){
            .samples = v->opt->spread_samples ? v->opt->spread_samples : LW_MC_SAMPLES_DEFAULT,
            .seed = v->opt->seed, .threads = v->opt->threads};
        st = lw_mc_run(v->prof, v->keys, v->nkeys, &v->mco, NULL, NULL, &v->mc, err);
        v->study = (lw_mc_study){v->prof, v->keys, v->nkeys, &v->mco, &v->mc, NULL, 0};
    }
    return st;
}

/* ---- the sections ---- */

static void figure_row(FILE *fp, const char *name, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;

static void figure_row(FILE *fp, const char *name, const char *fmt, ...)
{
    char buf[256];
    va_list ap;
    va_start(ap, fmt);
    /* va_start is above (clang-analyzer 14 misreads it) */
    // NOLINTNEXTLINE(clang-analyzer-valist.Uninitialized)
    vsnprintf(buf, sizeof buf, fmt, ap);
    va_end(ap);
    fputs("<dt>", fp);
    text(fp, name);
    fputs("</dt><dd>", fp);
    text(fp, buf);
    fputs("</dd>\n", fp);
}

static void summary(FILE *fp, const review *v)
{
    const lw_light *l = &v->prof->light;
    const lw_result *r = &v->run;
    const lw_point *i0 = &r->initial;
    char hours[64], half[64], drive[160];
    lw_report_hours(r->runtime_h, hours, sizeof hours);
    lw_report_hours(r->time_to_half_h, half, sizeof half);
    lw_report_drive(l, drive, sizeof drive);
    section_begin(fp, "summary", "Summary");
    fputs("<dl class=\"figures\">\n", fp);
    figure_row(fp, "pack", "%d × %s (%d in series, %d in parallel)",
               l->pack.series * l->pack.parallel, l->pack.cell.name, l->pack.series,
               l->pack.parallel);
    figure_row(fp, "LEDs", "%d string%s of %d, %s model", l->led.strings,
               l->led.strings == 1 ? "" : "s", l->led.count, lw_led_model_names[l->led.model]);
    figure_row(fp, "drive", "%s", drive);
    figure_row(fp, "runtime to cutoff", "%s (%s)", hours, lw_run_end_names[r->end_reason]);
    figure_row(fp, "time to 50 %", "%s", half);
    figure_row(fp, "light output", "%.4g lm at switch-on, %.4g lm after 30 s", i0->flux_lm,
               r->flux_30s_lm);
    figure_row(fp, "LED current at switch-on", "%.2f mA per string", i0->led_a * 1e3);
    if (l->drive.resistor_ohm > 0)
        figure_row(fp, "resistor at switch-on", "%.1f mW each (worst case %.1f mW)",
                   i0->p_res_peak_w * 1e3, r->worst_resistor_w * 1e3);
    figure_row(fp, "lumen-hours", "%.4g lm h", r->lumen_hours);
    if (i0->p_drawn_w > 0)
        figure_row(fp, "efficiency at switch-on", "%.1f %% of the power drawn reaches the LEDs",
                   100.0 * i0->p_led_w / i0->p_drawn_w);
    if (l->thermal.enabled)
        figure_row(fp, "hottest junction", "%.1f °C (body %.1f °C)", r->peak_junction_c,
                   r->peak_body_c);
    fputs("</dl>\n", fp);
    section_end(fp);
}

static const char *origin_text(const lw_profile *p, size_t k, char *buf, size_t size)
{
    switch ((lw_origin)p->key_origin[k]) {
    case LW_FROM_FILE:
        snprintf(buf, size, "line %d", p->key_line[k]);
        break;
    case LW_FROM_MODE:
        snprintf(buf, size, "mode %s, line %d", p->mode, p->key_line[k]);
        break;
    case LW_FROM_OPTION:
        snprintf(buf, size, "%s", p->key_option[k]);
        break;
    default:
        snprintf(buf, size, "default");
    }
    return buf;
}

static lw_status inputs(FILE *fp, const review *v, lw_error *err)
{
    const lw_profile *p = v->prof;
    section_begin(fp, "inputs", "The light and its inputs");
    fputs("<p>Every key the profile gives, as this review ran it. Keys not listed take their "
          "defaults (lampwick-profile(5)).</p>\n", fp);
    static const char *const head[] = {"section", "key", "value", "given at", "meaning"};
    lw_rtable *t = lw_rtable_new(5, err);
    lw_status st = t ? LW_OK : LW_ENOMEM;
    for (size_t k = 0; k < 5 && st == LW_OK; k++)
        st = lw_rtable_head(t, k, head[k], err);
    for (size_t k = 0; k < lw_profile_nkeys && st == LW_OK; k++) {
        const lw_keydef *d = &lw_profile_keys[k];
        char dotted[128], value[LW_PATH_MAX], from[96];
        snprintf(dotted, sizeof dotted, "%s.%s", d->section, d->name);
        if (!lw_profile_given(p, dotted))
            continue;
        lw_profile_value_text(p, dotted, value, sizeof value);
        size_t row;
        st = lw_rtable_add_row(t, &row, err);
        const char *cells[] = {d->section, d->name, value, origin_text(p, k, from, sizeof from),
                               d->help};
        for (size_t c = 0; c < 5 && st == LW_OK; c++)
            st = lw_rtable_set(t, row, c, cells[c], err);
    }
    if (st == LW_OK && t)
        st = lw_rtable_set_title(t, p->path, err);
    st = put_table(fp, t, st, err);
    section_end(fp);
    return st;
}

/* Whether the path read is the one a key names: the same, or the key's
 * relative name at its end ("profiles/led-iv.csv" and "led-iv.csv"). */
static bool same_file(const char *read, const char *named)
{
    size_t n = strlen(read), k = strlen(named);
    if (!k)
        return false;
    return !strcmp(read, named) ||
           (k < n && read[n - k - 1] == '/' && !strcmp(read + n - k, named));
}

static void provenance(FILE *fp, const review *v)
{
    const lw_profile *p = v->prof;
    const lw_light *l = &p->light;
    section_begin(fp, "provenance", "Where the data come from");
    const struct {
        const char *path, *role;
    } roles[] = {{p->path, "profile"},
                 {p->cell_path, "cell file"},
                 {l->pack.cell.curve_path, "cell discharge curve"},
                 {l->pack.cell.temperature_path, "cell temperature table"},
                 {p->iv_file, "LED I-V (measured)"},
                 {p->flux_file, "LED light output (measured)"},
                 {p->efficiency_file, "driver efficiency (measured)"}};
    char files[16][LW_PATH_MAX];
    size_t n = lw_profile_inputs(p, files, 16);
    fputs("<ul>\n", fp);
    for (size_t i = 0; i < n; i++) {
        const char *role = "input";
        for (size_t k = 0; k < sizeof roles / sizeof roles[0]; k++)
            if (same_file(files[i], roles[k].path)) {
                role = roles[k].role;
                break;
            }
        fputs("<li>", fp);
        text(fp, role);
        fputs(": <code>", fp);
        text(fp, files[i]);
        fputs("</code></li>\n", fp);
    }
    fputs("</ul>\n", fp);
    char buf[640];
    snprintf(buf, sizeof buf,
             "LED: %s. Cell %s: the cell files bundled with lampwick hold typical generic "
             "values from handbooks and standards, not any maker's data; a product's figures "
             "need the maker's data sheet or measured discharge logs (lampwick fit cell).",
             l->led.model == LW_LED_TABLE ? "a measured I-V table"
                                          : "model parameters given in the profile",
             l->pack.cell.name);
    para(fp, buf);
    section_end(fp);
}

static lw_status modes_fn(FILE *fp, const void *ctx, lw_error *err)
{
    return lw_plot_modes(fp, ctx, 0, err);
}

typedef struct mode_chart {
    const char *title;
    const lw_light *light;
    const lw_result *res;
    const lw_trace *trace;
} mode_chart;

static lw_status mode_fn(FILE *fp, const void *ctx, lw_error *err)
{
    const mode_chart *m = ctx;
    return lw_plot_discharge(fp, m->title, m->light, m->res, m->trace, err);
}

static lw_status discharge(FILE *fp, const review *v, lw_error *err)
{
    const lw_spec *s = &v->spec;
    section_begin(fp, "discharge", "Discharge");
    lw_status st = LW_OK;
    if (s->nrows > 1)
        st = figure(fp, modes_fn, s, "Every mode's light output against time since switch-on.",
                    err);
    for (size_t r = 0; r < s->nrows && st == LW_OK; r++) {
        const lw_case *k = &s->cases[r * s->ncells];
        if (k->status != LW_OK || lw_run_end_is_dark(k->res.end_reason))
            continue;
        lw_result res = {0};
        lw_trace tr = {0};
        st = lw_spec_trace(s, r, 0, &res, &tr, err);
        char title[200], cap[240];
        const char *mode = k->variant.mode ? k->variant.mode : v->prof->mode;
        snprintf(title, sizeof title, "%s%s%s", v->prof->light.name, mode[0] ? ", mode " : "",
                 mode);
        snprintf(cap, sizeof cap, "%s%s: %s over the run.", mode[0] ? "Mode " : "The light",
                 mode,
                 k->res.n_sessions > 0     ? "light output and weakest cell at each switch-on"
                 : k->light.thermal.enabled ? "light output, pack voltage and temperatures"
                                            : "light output and pack voltage");
        mode_chart m = {title, &k->light, &res, &tr};
        if (st == LW_OK) {
            if (s->nrows > 1) {
                fputs("<h3>", fp);
                text(fp, mode[0] ? mode : "as loaded");
                fputs("</h3>\n", fp);
            }
            st = figure(fp, mode_fn, &m, cap, err);
        }
        lw_trace_clear(&tr);
        lw_run_result_clear(&res);
    }
    section_end(fp);
    return st;
}

static lw_status energy(FILE *fp, const review *v, lw_error *err)
{
    section_begin(fp, "energy", "Where the energy goes");
    lw_rtable *t = NULL;
    lw_status st = lw_report_energy(&v->prof->light, &v->run, LW_FMT_HTML, &t, err);
    st = put_table(fp, t, st, err);
    section_end(fp);
    return st;
}

static lw_status corners(FILE *fp, const review *v, lw_error *err)
{
    section_begin(fp, "corners", "Corners");
    lw_rtable *t = NULL;
    lw_status st = lw_report_spec_corners(&v->spec, LW_FMT_HTML, &t, err);
    st = put_table(fp, t, st, err);
    section_end(fp);
    return st;
}

static lw_status hist_fn(FILE *fp, const void *ctx, lw_error *err)
{
    return lw_plot_mc_histogram(fp, ctx, LW_MC_RUNTIME, err);
}

static lw_status ranking_fn(FILE *fp, const void *ctx, lw_error *err)
{
    return lw_plot_mc_ranking(fp, ctx, err);
}

static lw_status spread(FILE *fp, const review *v, lw_error *err)
{
    section_begin(fp, "spread", "Spread over the units made");
    char line[256];
    lw_status st = lw_report_mc_headline(&v->study, line, sizeof line, err);
    if (st == LW_OK) {
        char buf[400];
        snprintf(buf, sizeof buf,
                 "%zu units sampled at random (seed %llu) from the profile's [spread] "
                 "section: %s",
                 v->mc.n, (unsigned long long)v->mco.seed, line);
        para(fp, buf);
        st = figure(fp, hist_fn, &v->study, "Runtime over the sampled units, percentiles marked.",
                    err);
    }
    if (st == LW_OK)
        st = lw_report_mc(fp, &v->study, LW_FMT_HTML, false, err);
    if (st == LW_OK)
        st = figure(fp, ranking_fn, &v->study,
                    "What drives the runtime and the 30-s output: rank regression.", err);
    section_end(fp);
    return st;
}

/* Every warning the light as loaded or any mode's run raised, in words
 * (the spread's units' shares are in its own section). */
static void warnings(FILE *fp, const review *v)
{
    unsigned all = v->run.warnings;
    for (size_t i = 0; i < v->spec.nrows * v->spec.ncells; i++)
        if (v->spec.cases[i].status == LW_OK)
            all |= v->spec.cases[i].res.warnings;
    section_begin(fp, "warnings", "Warnings");
    if (!all) {
        para(fp, "No run of any mode breaks a rating or limit lampwick checks (LED current, "
                 "resistor and driver power, temperatures, cell voltage).");
    } else {
        fputs("<ul class=\"warn\">\n", fp);
        for (int b = 0; b < LW_WARN_COUNT_; b++)
            if (all & (1u << b)) {
                fputs("<li>", fp);
                text(fp, lw_report_warning(b));
                fputs(".</li>\n", fp);
            }
        fputs("</ul>\n", fp);
    }
    if (v->nkeys && v->mc.n) /* the share of units with each is in the spread section */
        para(fp, "The share of sampled units with each warning is in the spread section.");
    section_end(fp);
}

static void caution(FILE *fp)
{
    section_begin(fp, "caution", "Caution");
    fputs("<div class=\"caution\">\n", fp);
    para(fp, lw_report_caution);
    para(fp, lw_report_safety);
    fputs("</div>\n", fp);
    section_end(fp);
}

static lw_status html_in_c_locale(FILE *fp, const lw_profile *prof, const lw_html_options *opt,
                                  lw_error *err)
{
    review v = {.prof = prof, .opt = opt};
    lw_status st = review_run(&v, err);
    if (st != LW_OK) {
        review_clear(&v);
        return st;
    }
    const char *name = prof->light.name[0] ? prof->light.name : prof->path;
    fputs("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
          "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
          "<meta name=\"generator\" content=\"lampwick " LW_VERSION "\">\n<title>",
          fp);
    text(fp, name);
    fprintf(fp, ": design review</title>\n<style>%s</style>\n</head>\n<body>\n<header>\n<h1>", css);
    text(fp, name);
    fputs("</h1>\n<p class=\"meta\">Design review", fp);
    if (prof->mode[0]) {
        fputs(", mode ", fp);
        text(fp, prof->mode);
    }
    fputs(" · lampwick " LW_VERSION " · ", fp);
    text(fp, opt->date);
    fputs(" · <code>", fp);
    text(fp, prof->path);
    fputs("</code></p>\n</header>\n<main>\n", fp);
    summary(fp, &v);
    st = inputs(fp, &v, err);
    if (st == LW_OK) {
        provenance(fp, &v);
        section_begin(fp, "specification", "Specification table");
        lw_rtable *t = NULL;
        st = lw_report_spec(&v.spec, LW_FMT_HTML, &t, err);
        st = put_table(fp, t, st, err);
        section_end(fp);
    }
    if (st == LW_OK)
        st = discharge(fp, &v, err);
    if (st == LW_OK)
        st = energy(fp, &v, err);
    if (st == LW_OK)
        st = corners(fp, &v, err);
    if (st == LW_OK && v.nkeys)
        st = spread(fp, &v, err);
    if (st == LW_OK) {
        warnings(fp, &v);
        caution(fp);
        fputs("</main>\n<footer>\n<p>Made by lampwick " LW_VERSION " on ", fp);
        text(fp, opt->date);
        fputs(" from <code>", fp);
        text(fp, prof->path);
        fputs("</code>.</p>\n</footer>\n</body>\n</html>\n", fp);
    }
    review_clear(&v);
    if (st == LW_OK && ferror(fp))
        st = lw_error_set(err, LW_EIO, NULL, 0, "write error");
    return st;
}

lw_status lw_report_html(FILE *fp, const lw_profile *prof, const lw_html_options *opt,
                         lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status st = html_in_c_locale(fp, prof, opt, err);
    lw_number_locale_end(saved);
    return st;
}
