/*
 * mcreport.c - tables and charts of a spread study (see
 * mcreport.h).  Quantities in the units of `run --format csv`.
 */
#include "lampwick/mcreport.h"
#include "lampwick/text.h"
#include "lampwick/csvio.h"
#include "lampwick/number.h"
#include "lampwick/plot.h"
#include "lampwick/report.h"
#include "lampwick/stats.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"

#define SIG 6 /* significant digits in text and Markdown (CSV: full precision) */

/* Percentile labels as column heads. */
static const char *const pct_names[LW_MC_NPCT] = {"p1", "p5", "p50", "p95", "p99"};

static lw_status set_row_nums(lw_rtable *t, size_t row, size_t col, const double *v, size_t n,
                               lw_error *err)
{
    lw_status st = LW_OK;
    for (size_t k = 0; k < n && st == LW_OK; k++)
        st = isnan(v[k]) ? lw_rtable_set(t, row, col + k, "-", err)
                         : lw_rtable_num(t, row, col + k, v[k], SIG, err);
    return st;
}

static lw_rtable *table_with(const char *const *head, size_t n, const char *title, lw_error *err)
{
    lw_rtable *t = lw_rtable_new(n, err);
    lw_status st = t ? LW_OK : LW_ENOMEM;
    for (size_t i = 0; i < n && st == LW_OK; i++)
        st = lw_rtable_head(t, i, head[i], err);
    if (st == LW_OK && title)
        st = lw_rtable_set_title(t, title, err);
    if (st != LW_OK) {
        lw_rtable_free(t);
        return NULL;
    }
    return t;
}

/* order[0..n) the indices of size[] largest first, ties in index order
 * (an insertion sort: at most LW_MC_KEYS_MAX keys). */
static void by_size(const double *size, size_t n, size_t *order)
{
    for (size_t k = 0; k < n; k++) {
        size_t j = k;
        while (j > 0 && size[order[j - 1]] < size[k]) {
            order[j] = order[j - 1];
            j--;
        }
        order[j] = k;
    }
}

/* A new row of t for quantity q, its name in column 0. */
static lw_status quantity_row(lw_rtable *t, int q, size_t *row, lw_error *err)
{
    lw_status st = lw_rtable_add_row(t, row, err);
    return st == LW_OK ? lw_rtable_set(t, *row, 0, lw_mc_quantity_names[q], err) : st;
}

/* JSON and HTML take the tables alone: the sentences between them in text
 * and Markdown are said by the tables' titles and notes there (the HTML
 * report writes its own). */
static bool tables_only(lw_rtable_format fmt)
{
    return fmt == LW_FMT_JSON || fmt == LW_FMT_HTML;
}

/* Write t (freed) and a blank line after it in text and Markdown. */
static lw_status put(lw_rtable *t, lw_status st, FILE *fp, lw_rtable_format fmt, bool quiet,
                     lw_error *err)
{
    if (!t)
        return st == LW_OK ? LW_ENOMEM : st;
    t->quiet = quiet;
    if (st == LW_OK)
        st = lw_rtable_write(t, fp, fmt, err);
    lw_rtable_free(t);
    if (st == LW_OK && fmt != LW_FMT_CSV)
        fputc('\n', fp);
    return st;
}

static lw_status summary_table(FILE *fp, const lw_mc_study *s, const lw_mc_summary *sum,
                               lw_rtable_format fmt, bool quiet, lw_error *err)
{
    static const char *const head[] = {"quantity", "nominal", "mean", "sd", "p1",
                                       "p5",       "p50",     "p95",  "p99"};
    char title[160];
    snprintf(title, sizeof title, "The spread of %zu units (seed %llu%s)", s->res->n,
             (unsigned long long)s->opt->seed, s->opt->sobol ? ", Sobol points" : "");
    lw_rtable *t = table_with(head, 9, fmt == LW_FMT_CSV ? NULL : title, err);
    lw_status st = t ? LW_OK : LW_ENOMEM;
    for (int q = 0; q < LW_MC_QCOUNT && st == LW_OK; q++) {
        size_t row;
        st = quantity_row(t, q, &row, err);
        const double v[3] = {sum[q].nominal, sum[q].mean, sum[q].sd};
        if (st == LW_OK)
            st = set_row_nums(t, row, 1, v, 3, err);
        if (st == LW_OK)
            st = set_row_nums(t, row, 4, sum[q].pct, LW_MC_NPCT, err);
    }
    if (st == LW_OK && fmt != LW_FMT_CSV && sum[LW_MC_HALF].n_finite < s->res->n) {
        char note[160];
        snprintf(note, sizeof note,
                 "time_to_half_h: over the %zu units that fall to half before they end",
                 sum[LW_MC_HALF].n_finite);
        st = lw_rtable_note(t, note, err);
    }
    return put(t, st, fp, fmt, quiet, err);
}

static lw_status interval_table(FILE *fp, const lw_mc_summary *sum, lw_rtable_format fmt,
                                bool quiet, lw_error *err)
{
    const char *head[1 + 2 * LW_MC_NPCT];
    char names[2 * LW_MC_NPCT][16];
    head[0] = "quantity";
    for (size_t k = 0; k < LW_MC_NPCT; k++) {
        snprintf(names[2 * k], sizeof names[0], "%s low", pct_names[k]);
        snprintf(names[2 * k + 1], sizeof names[0], "%s high", pct_names[k]);
        head[1 + 2 * k] = names[2 * k];
        head[2 + 2 * k] = names[2 * k + 1];
    }
    lw_rtable *t = table_with(head, 1 + 2 * LW_MC_NPCT,
                              "95 % intervals of the percentiles (order statistics, "
                              "distribution-free; -: none at this many units)",
                              err);
    lw_status st = t ? LW_OK : LW_ENOMEM;
    for (int q = 0; q < LW_MC_QCOUNT && st == LW_OK; q++) {
        size_t row;
        st = quantity_row(t, q, &row, err);
        for (int k = 0; k < LW_MC_NPCT && st == LW_OK; k++) {
            const double v[2] = {sum[q].pct_lo[k], sum[q].pct_hi[k]};
            st = set_row_nums(t, row, 1 + 2 * (size_t)k, v, 2, err);
        }
    }
    return put(t, st, fp, fmt, quiet, err);
}

static lw_status keys_table(FILE *fp, const lw_mc_study *s, lw_rtable_format fmt, bool quiet,
                            lw_error *err)
{
    static const char *const head[] = {"key", "distribution", "nominal", "lowest", "highest",
                                       "given at"};
    lw_rtable *t = table_with(head, 6, "What is spread (values in the key's unit)", err);
    lw_status st = t ? LW_OK : LW_ENOMEM;
    const lw_mc_result *r = s->res;
    for (size_t k = 0; k < s->nkeys && st == LW_OK; k++) {
        const double *x = r->x + k * r->n;
        double lo = x[0], hi = x[0];
        for (size_t i = 1; i < r->n; i++)
            lo = fmin(lo, x[i]), hi = fmax(hi, x[i]);
        size_t row;
        char where[LW_PATH_MAX + 16];
        if (s->keys[k].line > 0)
            snprintf(where, sizeof where, "%s:%d", s->keys[k].file, s->keys[k].line);
        else
            snprintf(where, sizeof where, "%s", s->keys[k].file);
        st = lw_rtable_add_row(t, &row, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 0, s->keys[k].key, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 1, s->keys[k].form, err);
        const double v[3] = {s->keys[k].nominal, lo, hi};
        if (st == LW_OK)
            st = set_row_nums(t, row, 2, v, 3, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 5, where, err);
    }
    bool tolerance = false;
    for (size_t k = 0; k < s->nkeys; k++)
        tolerance = tolerance || s->keys[k].dist == LW_MC_TOLERANCE;
    if (st == LW_OK && tolerance)
        st = lw_rtable_note(t,
                            "tolerance: flat within the band, the usual reading of a part "
                            "tolerance when the maker states no distribution",
                            err);
    return put(t, st, fp, fmt, quiet, err);
}

/* Units, share and Wilson's interval in columns col.. of row (no interval
 * for quasi-random units: they are not independent). */
static lw_status share_cells(lw_rtable *t, size_t row, size_t col, size_t k, size_t n,
                             bool sobol, lw_error *err)
{
    double lo = NAN, hi = NAN;
    if (!sobol)
        lw_stats_wilson(k, n, LW_MC_Z95, &lo, &hi);
    const double v[4] = {(double)k, 100.0 * (double)k / (double)n, 100.0 * lo, 100.0 * hi};
    return set_row_nums(t, row, col, v, 4, err);
}

static lw_status ratings_table(FILE *fp, const lw_mc_study *s, lw_rtable_format fmt, bool quiet,
                               lw_error *err)
{
    static const char *const head[] = {"warning", "units", "share %", "95 % low", "95 % high"};
    lw_rtable *t = table_with(head, 5,
                              "Units with each warning (ratings, limits; Wilson 95 % interval)",
                              err);
    lw_status st = t ? LW_OK : LW_ENOMEM;
    const lw_mc_result *r = s->res;
    size_t shown = 0;
    for (int b = 0; b < LW_WARN_COUNT_ && st == LW_OK; b++) {
        unsigned bit = 1u << b;
        if (bit == LW_WARN_LED_OVER_MAX_WORST)
            continue; /* the design's tolerance check: each unit is its own case here */
        size_t k = 0;
        for (size_t i = 0; i < r->n; i++)
            k += (r->warnings[i] & bit) != 0;
        if (k == 0)
            continue;
        size_t row;
        st = lw_rtable_add_row(t, &row, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 0, lw_report_warning(b), err);
        if (st == LW_OK)
            st = share_cells(t, row, 1, k, r->n, s->opt->sobol, err);
        shown++;
    }
    if (st == LW_OK && shown == 0 && !tables_only(fmt)) { /* no table: one sentence */
        double lo, hi;
        lw_stats_wilson(0, r->n, LW_MC_Z95, &lo, &hi);
        lw_rtable_free(t);
        if (s->opt->sobol)
            fputs("No unit has a warning: none breaks a rating or limit.\n\n", fp);
        else
            fprintf(fp, "No unit has a warning: none breaks a rating or limit (the share that "
                        "would is below %.3g %% at 95 %% confidence).\n\n", 100.0 * hi);
        return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
    }
    return put(t, st, fp, fmt, quiet, err);
}

static lw_status yield_table(FILE *fp, const lw_mc_study *s, lw_rtable_format fmt, bool quiet,
                             lw_error *err)
{
    static const char *const head[] = {"target", "units", "share %", "95 % low", "95 % high"};
    lw_rtable *t = table_with(head, 5, "Yield: units meeting the targets (Wilson 95 % interval)",
                              err);
    lw_status st = t ? LW_OK : LW_ENOMEM;
    for (size_t j = 0; j <= s->ntargets && st == LW_OK; j++) {
        if (j == s->ntargets && s->ntargets < 2)
            break;
        size_t row, k;
        double lo, hi;
        if (j < s->ntargets)
            lw_mc_yield(s->res, &s->targets[j], 1, &k, &lo, &hi);
        else
            lw_mc_yield(s->res, s->targets, s->ntargets, &k, &lo, &hi);
        st = lw_rtable_add_row(t, &row, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 0, j < s->ntargets ? s->targets[j].text : "all of them",
                               err);
        if (st == LW_OK)
            st = share_cells(t, row, 1, k, s->res->n, s->opt->sobol, err);
    }
    return put(t, st, fp, fmt, quiet, err);
}

static lw_status ranking_table(FILE *fp, const lw_mc_study *s, lw_mc_quantity q,
                               lw_rtable_format fmt, bool quiet, lw_error *err)
{
    static const char *const head[] = {"key", "rank coefficient", "+- (1 se)", "share %"};
    double beta[LW_MC_KEYS_MAX], se[LW_MC_KEYS_MAX], r2;
    lw_error local;
    lw_error_clear(&local);
    if (lw_mc_rank(s->res, q, beta, se, &r2, &local) != LW_OK) {
        if (local.code == LW_ENOMEM)
            return lw_error_set(err, LW_ENOMEM, NULL, 0, "%s", local.msg);
        if (tables_only(fmt)) { /* an empty table saying why */
            char why[LW_ERR_MSG_MAX + 64];
            snprintf(why, sizeof why, "What drives %s", lw_mc_quantity_names[q]);
            lw_rtable *t = table_with(head, 4, why, err);
            return put(t, t ? lw_rtable_note(t, local.msg, err) : LW_ENOMEM, fp, fmt, quiet, err);
        }
        fprintf(fp, "What drives %s: %s.\n\n", lw_mc_quantity_names[q], local.msg);
        return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
    }
    char title[200];
    snprintf(title, sizeof title,
             "What drives %s: standardized rank regression (r2 = %.3f of the ranks' variance "
             "explained)", lw_mc_quantity_names[q], r2);
    lw_rtable *t = table_with(head, 4, title, err);
    lw_status st = t ? LW_OK : LW_ENOMEM;
    size_t order[LW_MC_KEYS_MAX];
    double size[LW_MC_KEYS_MAX];
    for (size_t k = 0; k < s->nkeys; k++)
        size[k] = fabs(beta[k]);
    by_size(size, s->nkeys, order);
    for (size_t i = 0; i < s->nkeys && st == LW_OK; i++) {
        size_t k = order[i], row;
        st = lw_rtable_add_row(t, &row, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, row, 0, s->keys[k].key, err);
        const double v[3] = {beta[k], se[k], 100.0 * beta[k] * beta[k]};
        if (st == LW_OK)
            st = set_row_nums(t, row, 1, v, 3, err);
    }
    if (st == LW_OK && r2 < 0.7)
        st = lw_rtable_note(t,
                            "r2 is low: the quantity is far from monotone in the keys, or they "
                            "interact; read the shares as a rough order only",
                            err);
    return put(t, st, fp, fmt, quiet, err);
}

/* "95 % of units run at least X h (95 % interval A to B h); the nominal
 * unit runs Y h." from the runtime's summary rt. */
static void headline(const lw_mc_study *s, const lw_mc_summary *rt, char *buf, size_t size)
{
    char lo[32] = "-", hi[32] = "-", interval[96];
    if (!isnan(rt->pct_lo[1]))
        snprintf(lo, sizeof lo, "%.4g", rt->pct_lo[1]);
    if (!isnan(rt->pct_hi[1]))
        snprintf(hi, sizeof hi, "%.4g", rt->pct_hi[1]);
    if (s->opt->sobol)
        snprintf(interval, sizeof interval, "Sobol points: no interval");
    else
        snprintf(interval, sizeof interval, "95 %% interval %s to %s h", lo, hi);
    snprintf(buf, size, "95 %% of units run at least %.4g h (%s); the nominal unit runs %.4g h.",
             rt->pct[1], interval, rt->nominal);
}

lw_status lw_report_mc_headline(const lw_mc_study *s, char *buf, size_t size, lw_error *err)
{
    lw_mc_summary rt;
    locale_t saved = lw_number_locale_begin();
    lw_status st = lw_mc_summarise(s->res, LW_MC_RUNTIME, &rt, err);
    if (st == LW_OK)
        headline(s, &rt, buf, size);
    lw_number_locale_end(saved);
    return st;
}

static lw_status spread_in_c_locale(FILE *fp, const lw_mc_study *s, lw_rtable_format fmt,
                                    bool quiet, lw_error *err)
{
    lw_mc_summary sum[LW_MC_QCOUNT];
    lw_status st = LW_OK;
    for (int q = 0; q < LW_MC_QCOUNT && st == LW_OK; q++)
        st = lw_mc_summarise(s->res, (lw_mc_quantity)q, &sum[q], err);
    if (st != LW_OK)
        return st;
    if (fmt == LW_FMT_CSV)
        return summary_table(fp, s, sum, fmt, quiet, err);
    if (!tables_only(fmt)) {
        char line[256];
        headline(s, &sum[LW_MC_RUNTIME], line, sizeof line);
        fprintf(fp, "%s%s: spread%s\n\n%s\n\n", fmt == LW_FMT_MD ? "**" : "",
                s->prof->light.name, fmt == LW_FMT_MD ? "**" : "", line);
    }
    st = summary_table(fp, s, sum, fmt, quiet, err);
    if (st == LW_OK && s->opt->sobol && !tables_only(fmt) && !quiet)
        fputs("Sobol points: the estimates converge faster than random units', but the units "
              "are not independent, so no interval is given (sample at random for them).\n\n",
              fp);
    else if (st == LW_OK && !s->opt->sobol)
        st = interval_table(fp, sum, fmt, quiet, err);
    if (st == LW_OK && s->ntargets)
        st = yield_table(fp, s, fmt, quiet, err);
    if (st == LW_OK)
        st = ratings_table(fp, s, fmt, quiet, err);
    if (st == LW_OK)
        st = keys_table(fp, s, fmt, quiet, err);
    if (st == LW_OK)
        st = ranking_table(fp, s, LW_MC_RUNTIME, fmt, quiet, err);
    if (st == LW_OK)
        st = ranking_table(fp, s, LW_MC_FLUX30, fmt, quiet, err);
    if (st == LW_OK && !tables_only(fmt) && !quiet)
        fprintf(fp, "%s\n", lw_report_caution);
    return st == LW_OK && ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : st;
}

lw_status lw_report_mc(FILE *fp, const lw_mc_study *s, lw_rtable_format fmt, bool quiet,
                           lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status st = spread_in_c_locale(fp, s, fmt, quiet, err);
    lw_number_locale_end(saved);
    return st;
}

lw_status lw_report_mc_samples(FILE *fp, const lw_mc_study *s, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    const lw_mc_result *r = s->res;
    lw_csvw w;
    lw_csvw_init(&w, fp);
    lw_csvw_text(&w, "sample");
    for (size_t k = 0; k < s->nkeys; k++)
        lw_csvw_text(&w, s->keys[k].key);
    for (int q = 0; q < LW_MC_QCOUNT; q++)
        lw_csvw_text(&w, lw_mc_quantity_names[q]);
    lw_csvw_text(&w, "warnings");
    lw_csvw_end_row(&w);
    for (size_t i = 0; i < r->n && !w.failed; i++) {
        lw_csvw_num(&w, (double)i);
        for (size_t k = 0; k < s->nkeys; k++)
            lw_csvw_num(&w, r->x[k * r->n + i]);
        for (int q = 0; q < LW_MC_QCOUNT; q++) {
            double y = r->y[(size_t)q * r->n + i];
            if (isnan(y))
                lw_csvw_text(&w, "");
            else
                lw_csvw_num(&w, y);
        }
        char wb[512];
        lw_report_warnings(r->warnings[i], wb, sizeof wb);
        lw_csvw_text(&w, wb);
        lw_csvw_end_row(&w);
    }
    lw_number_locale_end(saved);
    return w.failed || ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
}

/* ---- charts ---- */

#define HIST_BINS_MAX 60

lw_status lw_plot_mc_histogram(FILE *fp, const lw_mc_study *s, lw_mc_quantity q,
                                   lw_error *err)
{
    const lw_mc_result *r = s->res;
    lw_mc_summary sum;
    lw_status st = lw_mc_summarise(r, q, &sum, err);
    if (st != LW_OK)
        return st;
    const double *y = r->y + (size_t)q * r->n;
    double lo = INFINITY, hi = -INFINITY;
    for (size_t i = 0; i < r->n; i++)
        if (isfinite(y[i]))
            lo = fmin(lo, y[i]), hi = fmax(hi, y[i]);
    if (!(lo <= hi))
        return lw_error_set(err, LW_EINPUT, NULL, 0, "%s: no unit has a value to plot",
                            lw_mc_quantity_names[q]);
    /* bins: about the square root of the units (at most HIST_BINS_MAX) */
    size_t nb = (size_t)ceil(sqrt((double)sum.n_finite));
    nb = nb < 5 ? 5 : (nb > HIST_BINS_MAX ? HIST_BINS_MAX : nb);
    if (hi == lo)
        hi = lo + fmax(1e-9, fabs(lo) * 1e-6), nb = 1;
    double count[HIST_BINS_MAX] = {0};
    const double w = (hi - lo) / (double)nb;
    for (size_t i = 0; i < r->n; i++) {
        if (!isfinite(y[i]))
            continue;
        size_t b = (size_t)((y[i] - lo) / w);
        count[b >= nb ? nb - 1 : b] += 100.0 / (double)sum.n_finite;
    }
    double xs[2 * HIST_BINS_MAX + 2], ys[2 * HIST_BINS_MAX + 2];
    size_t m = 0;
    xs[m] = lo, ys[m++] = 0.0;
    for (size_t b = 0; b < nb; b++) {
        xs[m] = lo + (double)b * w, ys[m++] = count[b];
        xs[m] = lo + (double)(b + 1) * w, ys[m++] = count[b];
    }
    xs[m] = hi, ys[m++] = 0.0;
    char title[160], sub[200], lab[3 + LW_MC_TARGETS_MAX][80];
    snprintf(title, sizeof title, "%s: %s over %zu units", s->prof->light.name,
             lw_mc_quantity_words[q], r->n);
    snprintf(sub, sizeof sub, "seed %llu; percentiles of the units marked; nominal %.4g",
             (unsigned long long)s->opt->seed, sum.nominal);
    lw_chart c;
    memset(&c, 0, sizeof c);
    c.title = title;
    c.subtitle = sub;
    c.x = (lw_axis){.label = lw_mc_quantity_words[q]};
    c.npanels = 1;
    c.panels[0].y = (lw_axis){.label = "share of units per bin (%)", .from_zero = true};
    c.panels[0].series[0] = (lw_series){.name = "units", .x = xs, .y = ys, .n = m};
    c.panels[0].nseries = 1;
    const int show[3] = {1, 2, 3}; /* p5, p50, p95 */
    for (int k = 0; k < 3; k++) {
        snprintf(lab[k], sizeof lab[k], "%s %.4g", pct_names[show[k]], sum.pct[show[k]]);
        c.marks[c.nmarks++] = (lw_xmark){sum.pct[show[k]], lab[k]};
    }
    for (size_t j = 0; j < s->ntargets && c.nmarks < LW_PLOT_MARKS_MAX; j++)
        if (s->targets[j].q == q) {
            snprintf(lab[3 + j], sizeof lab[3 + j], "target %s", s->targets[j].text);
            c.marks[c.nmarks++] = (lw_xmark){s->targets[j].value, lab[3 + j]};
        }
    return lw_plot_svg(fp, &c, err);
}


lw_status lw_plot_mc_ranking(FILE *fp, const lw_mc_study *s, lw_error *err)
{
    const lw_mc_quantity qs[2] = {LW_MC_RUNTIME, LW_MC_FLUX30};
    double beta[2][LW_MC_KEYS_MAX], se[2][LW_MC_KEYS_MAX], r2[2];
    for (int i = 0; i < 2; i++) {
        lw_error local;
        lw_error_clear(&local);
        if (lw_mc_rank(s->res, qs[i], beta[i], se[i], &r2[i], &local) != LW_OK) {
            if (local.code == LW_ENOMEM)
                return lw_error_set(err, LW_ENOMEM, NULL, 0, "%s", local.msg);
            for (size_t k = 0; k < s->nkeys; k++)
                beta[i][k] = se[i][k] = 0.0;
            r2[i] = NAN;
        }
    }
    /* keys by their larger effect on either quantity */
    size_t order[LW_MC_KEYS_MAX] = {0};
    double size[LW_MC_KEYS_MAX];
    for (size_t k = 0; k < s->nkeys; k++)
        size[k] = fmax(fabs(beta[0][k]), fabs(beta[1][k]));
    by_size(size, s->nkeys, order);
    const double left = 230, bar_w = 260, gap = 40, top = 80, row_h = 34;
    const double width = left + 2 * (2 * bar_w + gap) - gap + 30;
    const double height = top + row_h * (double)s->nkeys + 60;
    locale_t saved = lw_number_locale_begin();
    fprintf(fp,
            "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
            "<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"%.0f\" height=\"%.0f\" "
            "viewBox=\"0 0 %.0f %.0f\" font-family=\"sans-serif\" font-size=\"13\">\n"
            "<title>What drives the spread: ",
            width, height, width, height);
    lw_text_xml_write(fp, s->prof->light.name);
    fprintf(fp, "</title>\n<desc>Standardized rank regression coefficients of each spread key "
                "for runtime and for the output at 30 s, over %zu units; bars to the right "
                "raise the quantity; whiskers one standard error.</desc>\n"
                "<rect width=\"100%%\" height=\"100%%\" fill=\"white\"/>\n"
                "<text x=\"12\" y=\"24\" font-size=\"16\" font-weight=\"bold\">What drives the "
                "spread: ",
            s->res->n);
    lw_text_xml_write(fp, s->prof->light.name);
    fprintf(fp, "</text>\n<text x=\"12\" y=\"44\" fill=\"#444\">rank regression coefficient "
                "(-1 to 1); share of variance = coefficient squared</text>\n");
    static const char *const colour[2] = {"#1f5fa8", "#c25a00"};
    for (int i = 0; i < 2; i++) {
        double x0 = left + (double)i * (2 * bar_w + gap), mid = x0 + bar_w;
        fprintf(fp, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"middle\" font-weight=\"bold\">%s"
                    "%s</text>\n",
                mid, top - 14, lw_mc_quantity_words[qs[i]], isnan(r2[i]) ? " (does not vary)" : "");
        fprintf(fp, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" stroke=\"#888\"/>\n",
                mid, top - 6, mid, top + row_h * (double)s->nkeys);
        for (int t = -1; t <= 1; t++)
            fprintf(fp, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"middle\" fill=\"#444\">%d"
                        "</text>\n",
                    mid + t * bar_w, top + row_h * (double)s->nkeys + 18, t);
        for (size_t r = 0; r < s->nkeys; r++) {
            size_t k = order[r];
            double y = top + row_h * (double)r + 6, b = beta[i][k];
            double xa = b < 0 ? mid + b * bar_w : mid, wd = fabs(b) * bar_w;
            fprintf(fp, "<rect x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\" "
                        "fill=\"%s\"><title>%s %.3f +- %.3f</title></rect>\n",
                    xa, y, wd, row_h - 12, colour[i], s->keys[k].key, b, se[i][k]);
            double e0 = mid + (b - se[i][k]) * bar_w, e1 = mid + (b + se[i][k]) * bar_w;
            fprintf(fp, "<line x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\" "
                        "stroke=\"black\"/>\n",
                    e0, y + (row_h - 12) / 2, e1, y + (row_h - 12) / 2);
            double tx = b < 0 ? xa - 4 : xa + wd + 4;
            fprintf(fp, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"%s\">%.2f</text>\n", tx,
                    y + row_h / 2 - 2, b < 0 ? "end" : "start", b);
        }
    }
    for (size_t r = 0; r < s->nkeys; r++) {
        fprintf(fp, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"end\">", left - 12,
                top + row_h * (double)r + row_h / 2 + 4);
        lw_text_xml_write(fp, s->keys[order[r]].key);
        fputs("</text>\n", fp);
    }
    fputs("</svg>\n", fp);
    lw_number_locale_end(saved);
    return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
}
