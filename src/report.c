/*
 * report.c - text / CSV / Markdown tables and the run report (see report.h).
 */
#include "report.h"

#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include "csvio.h"

const char *const lw_caution_line =
    "Caution: estimates from typical data. Follow the cell maker's limits and the applicable "
    "safety standards; have a product checked by qualified people.";

bool lw_format_parse(const char *s, lw_format *fmt)
{
    if (!strcmp(s, "text"))
        *fmt = LW_FMT_TEXT;
    else if (!strcmp(s, "csv"))
        *fmt = LW_FMT_CSV;
    else if (!strcmp(s, "md"))
        *fmt = LW_FMT_MD;
    else
        return false;
    return true;
}

lw_rtable *lw_rtable_new(size_t ncol, lw_error *err)
{
    lw_rtable *t = calloc(1, sizeof *t);
    if (t) {
        t->head = calloc(ncol ? ncol : 1, sizeof *t->head);
        t->group = calloc(ncol ? ncol : 1, sizeof *t->group);
    }
    if (!t || !t->head || !t->group) {
        if (t) {
            free(t->head);
            free(t->group);
        }
        free(t);
        lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
        return NULL;
    }
    t->ncol = ncol;
    return t;
}

void lw_rtable_free(lw_rtable *t)
{
    if (!t)
        return;
    for (size_t i = 0; i < t->ncol; i++) {
        free(t->head[i]);
        free(t->group[i]);
    }
    free(t->group);
    for (size_t i = 0; i < t->nrow * t->ncol; i++)
        free(t->cell[i]);
    for (size_t i = 0; i < t->nnotes; i++)
        free(t->notes[i]);
    free(t->head);
    free(t->cell);
    free(t->notes);
    free(t->title);
    free(t);
}

static lw_status dup_into(char **slot, const char *text, lw_error *err)
{
    char *s = strdup(text ? text : "");
    if (!s)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
    free(*slot);
    *slot = s;
    return LW_OK;
}

lw_status lw_rtable_head(lw_rtable *t, size_t col, const char *name, lw_error *err)
{
    return dup_into(&t->head[col], name, err);
}

lw_status lw_rtable_group(lw_rtable *t, size_t col, const char *group, lw_error *err)
{
    return dup_into(&t->group[col], group, err);
}

lw_status lw_rtable_add_row(lw_rtable *t, size_t *row, lw_error *err)
{
    if (t->nrow == t->cap) {
        size_t cap = t->cap ? 2 * t->cap : 16;
        char **c = realloc(t->cell, cap * t->ncol * sizeof *c);
        if (!c)
            return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
        t->cell = c;
        t->cap = cap;
    }
    memset(t->cell + t->nrow * t->ncol, 0, t->ncol * sizeof *t->cell);
    *row = t->nrow++;
    return LW_OK;
}

lw_status lw_rtable_set(lw_rtable *t, size_t row, size_t col, const char *text, lw_error *err)
{
    return dup_into(&t->cell[row * t->ncol + col], text, err);
}

lw_status lw_rtable_setf(lw_rtable *t, size_t row, size_t col, lw_error *err, const char *fmt,
                         ...)
{
    char buf[512];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(buf, sizeof buf, fmt, ap); // NOLINT(clang-analyzer-valist.Uninitialized): va_start above
    va_end(ap);
    return lw_rtable_set(t, row, col, buf, err);
}

lw_status lw_rtable_note(lw_rtable *t, const char *text, lw_error *err)
{
    char **n = realloc(t->notes, (t->nnotes + 1) * sizeof *n);
    if (!n)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
    t->notes = n;
    t->notes[t->nnotes] = NULL;
    lw_status st = dup_into(&t->notes[t->nnotes], text, err);
    if (st == LW_OK)
        t->nnotes++;
    return st;
}

lw_status lw_rtable_set_title(lw_rtable *t, const char *text, lw_error *err)
{
    return dup_into(&t->title, text, err);
}

static size_t width(const char *s);
static void pad(FILE *fp, size_t n);

static const char *cell_text(const lw_rtable *t, size_t r, size_t c)
{
    const char *s = t->cell[r * t->ncol + c];
    return s ? s : "";
}

/* Right-aligned: every non-empty cell is a number, or a number with a unit
 * ("41 h", "45 min"). */
static bool numeric_column(const lw_rtable *t, size_t c)
{
    bool any = false;
    for (size_t r = 0; r < t->nrow; r++) {
        const char *s = cell_text(t, r, c);
        double v;
        if (!s[0] || !strcmp(s, "-"))
            continue;
        if (!lw_parse_double(s, &v)) {
            char num[64];
            const char *sp = strchr(s, ' ');
            size_t len = sp ? (size_t)(sp - s) : 0;
            if (!sp || len >= sizeof num || strchr(sp + 1, ' '))
                return false;
            memcpy(num, s, len);
            num[len] = '\0';
            if (!lw_parse_double(num, &v))
                return false;
        }
        any = true;
    }
    return any;
}

static const char *group_of(const lw_rtable *t, size_t c)
{
    return t->group[c] ? t->group[c] : "";
}

/* Text: a line of group labels over their columns, underlined. */
static void write_groups(const lw_rtable *t, FILE *fp, const size_t *w)
{
    bool any = false;
    for (size_t c = 0; c < t->ncol; c++)
        any = any || group_of(t, c)[0];
    if (!any)
        return;
    for (int pass = 0; pass < 2; pass++) {
        size_t c = 0;
        while (c < t->ncol) {
            size_t e = c + 1, span = w[c];
            while (e < t->ncol && !strcmp(group_of(t, e), group_of(t, c)))
                span += 2 + w[e++];
            const char *g = group_of(t, c);
            if (c)
                fputs("  ", fp);
            bool last = e == t->ncol;
            if (pass == 0) {
                fputs(g, fp);
                if (!last)
                    pad(fp, span > width(g) ? span - width(g) : 0);
            } else if (g[0]) {
                for (size_t i = 0; i < span; i++)
                    fputc('=', fp);
            } else if (!last) {
                pad(fp, span);
            }
            c = e;
        }
        fputc('\n', fp);
    }
}

/* Display width of UTF-8 text: count code points, not bytes. */
static size_t width(const char *s)
{
    size_t w = 0;
    for (; *s; s++)
        if (((unsigned char)*s & 0xC0) != 0x80)
            w++;
    return w;
}

static void pad(FILE *fp, size_t n)
{
    for (size_t i = 0; i < n; i++)
        fputc(' ', fp);
}

static void write_text(const lw_rtable *t, FILE *fp)
{
    size_t *w = calloc(t->ncol, sizeof *w);
    bool *num = calloc(t->ncol, sizeof *num);
    if (!w || !num) {
        free(w);
        free(num);
        return;
    }
    for (size_t c = 0; c < t->ncol; c++) {
        w[c] = width(t->head[c] ? t->head[c] : "");
        for (size_t r = 0; r < t->nrow; r++)
            if (width(cell_text(t, r, c)) > w[c])
                w[c] = width(cell_text(t, r, c));
        num[c] = numeric_column(t, c);
    }
    /* a group label wider than its columns widens the last of them */
    for (size_t c = 0; c < t->ncol;) {
        size_t e = c + 1, span = w[c];
        while (e < t->ncol && !strcmp(group_of(t, e), group_of(t, c)))
            span += 2 + w[e++];
        if (width(group_of(t, c)) > span)
            w[e - 1] += width(group_of(t, c)) - span;
        c = e;
    }
    if (t->title)
        fprintf(fp, "%s\n\n", t->title);
    write_groups(t, fp, w);
    for (size_t c = 0; c < t->ncol; c++) {
        const char *h = t->head[c] ? t->head[c] : "";
        if (c)
            fputs("  ", fp);
        if (num[c])
            pad(fp, w[c] - width(h));
        fputs(h, fp);
        if (!num[c] && c + 1 < t->ncol)
            pad(fp, w[c] - width(h));
    }
    fputc('\n', fp);
    for (size_t c = 0; c < t->ncol; c++) {
        if (c)
            fputs("  ", fp);
        for (size_t i = 0; i < w[c]; i++)
            fputc('-', fp);
    }
    fputc('\n', fp);
    for (size_t r = 0; r < t->nrow; r++) {
        for (size_t c = 0; c < t->ncol; c++) {
            const char *s = cell_text(t, r, c);
            if (c)
                fputs("  ", fp);
            if (num[c])
                pad(fp, w[c] - width(s));
            fputs(s, fp);
            if (!num[c] && c + 1 < t->ncol)
                pad(fp, w[c] - width(s));
        }
        fputc('\n', fp);
    }
    if (t->nnotes)
        fputc('\n', fp);
    for (size_t i = 0; i < t->nnotes; i++)
        fprintf(fp, "%s\n", t->notes[i]);
    free(w);
    free(num);
}

static void md_cell(FILE *fp, const char *s)
{
    fputc(' ', fp);
    for (; *s; s++) {
        if (*s == '|')
            fputs("\\|", fp);
        else if (*s == '\n')
            fputc(' ', fp);
        else
            fputc(*s, fp);
    }
    fputs(" |", fp);
}

static void write_md(const lw_rtable *t, FILE *fp)
{
    if (t->title)
        fprintf(fp, "**%s**\n\n", t->title);
    fputc('|', fp);
    for (size_t c = 0; c < t->ncol; c++) {
        char h[256];
        snprintf(h, sizeof h, "%s%s%s", group_of(t, c), group_of(t, c)[0] ? " " : "",
                 t->head[c] ? t->head[c] : "");
        md_cell(fp, h);
    }
    fputs("\n|", fp);
    for (size_t c = 0; c < t->ncol; c++)
        fputs(numeric_column(t, c) ? " ---: |" : " :--- |", fp);
    fputc('\n', fp);
    for (size_t r = 0; r < t->nrow; r++) {
        fputc('|', fp);
        for (size_t c = 0; c < t->ncol; c++)
            md_cell(fp, cell_text(t, r, c));
        fputc('\n', fp);
    }
    if (t->nnotes)
        fputc('\n', fp);
    for (size_t i = 0; i < t->nnotes; i++)
        fprintf(fp, "%s%s\n", t->notes[i], i + 1 < t->nnotes ? "  " : "");
}

static void write_csv(const lw_rtable *t, FILE *fp, lw_csvw *w)
{
    lw_csvw_init(w, fp);
    for (size_t c = 0; c < t->ncol; c++)
        lw_csvw_text(w, t->head[c] ? t->head[c] : "");
    lw_csvw_end_row(w);
    for (size_t r = 0; r < t->nrow; r++) {
        for (size_t c = 0; c < t->ncol; c++)
            lw_csvw_text(w, cell_text(t, r, c));
        lw_csvw_end_row(w);
    }
}

lw_status lw_rtable_write(const lw_rtable *t, FILE *fp, lw_format fmt, lw_error *err)
{
    lw_csvw w = {0};
    if (fmt == LW_FMT_CSV)
        write_csv(t, fp, &w);
    else if (fmt == LW_FMT_MD)
        write_md(t, fp);
    else
        write_text(t, fp);
    if (w.failed || ferror(fp))
        return lw_error_set(err, LW_EIO, NULL, 0, "write error");
    return LW_OK;
}

/* ---- the run report ---- */

const char *const lw_run_columns[] = {
    "runtime_h", "end_reason", "initial_led_ma", "initial_pack_ma", "initial_flux_lm",
    "flux_30s_lm", "time_to_half_h", "regulated_h", "lumen_hours", "energy_drawn_wh",
    "energy_led_wh", "energy_resistor_wh", "energy_internal_wh", "energy_driver_wh",
    "efficiency_pct", "lm_per_w", "peak_resistor_w", "worst_led_ma", "worst_resistor_w", "final_cell_v",
    "solves", "warnings"};
const size_t lw_run_ncolumns = sizeof lw_run_columns / sizeof lw_run_columns[0];

void lw_warnings_text(unsigned warnings, char *buf, size_t size)
{
    buf[0] = '\0';
    for (int i = 0; i < LW_WARN_COUNT_; i++) {
        if (!(warnings & (1u << i)))
            continue;
        if (buf[0])
            strncat(buf, ";", size - strlen(buf) - 1);
        strncat(buf, lw_warning_names[i], size - strlen(buf) - 1);
    }
}

static double efficiency_pct(const lw_result *r)
{
    return r->energy_drawn_wh > 0 ? 100.0 * r->energy_led_wh / r->energy_drawn_wh : NAN;
}

/* Numbers to 6 significant digits; NaN as empty. */
static lw_status set_num(lw_rtable *t, size_t row, size_t col, double v, lw_error *err)
{
    if (!isfinite(v))
        return lw_rtable_set(t, row, col, "", err);
    return lw_rtable_setf(t, row, col, err, "%.6g", v);
}

lw_status lw_report_run_row(lw_rtable *t, size_t row, size_t c, const lw_light *light,
                            const lw_result *r, lw_error *err)
{
    char warn[512];
    lw_warnings_text(r->warnings, warn, sizeof warn);
    double v[] = {r->runtime_h,
                  NAN,
                  r->initial.led_a * 1e3,
                  r->initial.pack_a * 1e3 * light->drive.duty_pct / 100.0,
                  r->initial.flux_lm,
                  r->flux_ref_lm,
                  r->time_to_half_h,
                  r->regulated_h,
                  r->lumen_hours,
                  r->energy_drawn_wh,
                  r->energy_led_wh,
                  r->energy_resistor_wh,
                  r->energy_internal_wh,
                  r->energy_driver_wh,
                  efficiency_pct(r),
                  r->energy_drawn_wh > 0 ? r->lumen_hours / r->energy_drawn_wh : NAN,
                  r->peak_resistor_w,
                  r->worst_led_a * 1e3,
                  r->worst_resistor_w,
                  r->final.cell_v,
                  r->solves,
                  NAN};
    lw_status st = LW_OK;
    for (size_t i = 0; i < lw_run_ncolumns && st == LW_OK; i++) {
        if (i == 1)
            st = lw_rtable_set(t, row, c + i, lw_end_reason_names[r->end_reason], err);
        else if (i == lw_run_ncolumns - 1)
            st = lw_rtable_set(t, row, c + i, warn, err);
        else
            st = set_num(t, row, c + i, v[i], err);
    }
    return st;
}

void lw_format_hours(double h, char *buf, size_t size)
{
    if (!isfinite(h))
        snprintf(buf, size, "not reached");
    else if (h < 1.0)
        snprintf(buf, size, "%.1f min", h * 60.0);
    else if (h < 100.0)
        snprintf(buf, size, "%.2f h", h);
    else
        snprintf(buf, size, "%.0f h (%.1f days)", h, h / 24.0);
}

static const char *end_text(lw_end_reason why)
{
    switch (why) {
    case LW_END_RELATIVE:
        return "output fell to the relative cutoff";
    case LW_END_FLUX_FLOOR:
        return "output fell to the flux floor";
    case LW_END_CELL_VOLTAGE:
        return "loaded cell voltage reached the end point";
    case LW_END_CAPACITY:
        return "cells fully discharged before any cutoff";
    case LW_END_NEVER_LIT:
        return "the LEDs never light: the pack cannot exceed their forward voltage";
    case LW_END_DRIVER_DROPOUT:
    default:
        return "the converter can no longer draw its input power";
    }
}

static const char *warning_text(int bit)
{
    /* long texts are split across lines on purpose */
    // NOLINTBEGIN(bugprone-suspicious-missing-comma)
    static const char *const text[LW_WARN_COUNT_] = {
        "LED current at fresh cells is above the LED's max_current_ma",
        "worst case (resistor at -tolerance, low forward voltage, fresh cells) exceeds the "
        "LED's max_current_ma",
        "resistor power is above half its rating (common derating practice)",
        "the cutoff lets a lithium cell fall below the maker's end-point voltage: "
        "over-discharge risk",
        "the LEDs never light",
        "the run reached full depth of discharge without reaching its cutoff",
        "an LED table was read beyond its last measured point",
        "ambient temperature is outside the cell's temperature table (end values used)",
        "the integration tolerance was not met everywhere",
        "resistor power exceeds its rating"};
    // NOLINTEND(bugprone-suspicious-missing-comma)
    return text[bit];
}

static void text_report(FILE *fp, const lw_profile *p, const lw_result *r)
{
    const lw_light *l = &p->light;
    const lw_point *i0 = &r->initial;
    const double duty = l->drive.duty_pct / 100.0;
    char buf[64], buf2[64];
    fprintf(fp, "%s%s%s\n", l->name, p->mode[0] ? ", mode " : "", p->mode);
    fprintf(fp, "  pack    %d x %s (%d in series, %d in parallel) at %g C\n",
            l->pack.series * l->pack.parallel, l->pack.cell.name, l->pack.series,
            l->pack.parallel, l->pack.ambient_c);
    fprintf(fp, "  LEDs    %d string%s of %d, %s model\n", l->led.strings,
            l->led.strings == 1 ? "" : "s", l->led.count, lw_led_model_names[l->led.model]);
    fprintf(fp, "  drive   %s", lw_drive_type_names[l->drive.type]);
    if (l->drive.type == LW_DRIVE_RESISTOR || l->drive.resistor_ohm > 0)
        fprintf(fp, ", %g ohm per string", l->drive.resistor_ohm);
    if (l->drive.type != LW_DRIVE_RESISTOR)
        fprintf(fp, ", set %g mA", l->drive.set_a * 1e3);
    if (duty < 1.0)
        fprintf(fp, ", PWM %g %%", l->drive.duty_pct);
    fputs("\n\nAt switch-on (fresh cells)\n", fp);
    fprintf(fp, "  pack voltage        %.3f V open circuit, %.3f V loaded\n",
            l->pack.series * i0->ocv_v, i0->pack_v);
    fprintf(fp, "  LED current         %.2f mA per string%s (pack %.2f mA)\n", i0->led_a * 1e3,
            duty < 1.0 ? " peak" : "", i0->pack_a * duty * 1e3);
    fprintf(fp, "  LED voltage         %.3f V per LED\n", i0->led_v);
    if (l->drive.resistor_ohm > 0)
        fprintf(fp, "  resistor            %.3f V, %.1f mW each%s\n",
                i0->led_a * l->drive.resistor_ohm, i0->p_res_peak_w * 1e3,
                duty < 1.0 ? " at peak" : "");
    if (i0->p_drv_w > 0)
        fprintf(fp, "  driver loss         %.1f mW\n", i0->p_drv_w * 1e3);
    fprintf(fp, "  LED power           %.1f mW\n", i0->p_led_w * 1e3);
    fprintf(fp, "  light output        %.4g lm (%.4g lm after 30 s)\n", i0->flux_lm,
            r->flux_ref_lm);
    if (i0->p_drawn_w > 0)
        fprintf(fp, "  efficiency          %.1f %% of the power drawn reaches the LEDs\n",
                100.0 * i0->p_led_w / i0->p_drawn_w);
    fputs("\nRun\n", fp);
    lw_format_hours(r->runtime_h, buf, sizeof buf);
    fprintf(fp, "  runtime to cutoff   %s  [%s: %s]\n", buf, lw_end_reason_names[r->end_reason],
            end_text(r->end_reason));
    lw_format_hours(r->time_to_half_h, buf, sizeof buf);
    fprintf(fp, "  time to 50 %%        %s\n", buf);
    if (isfinite(r->regulated_h)) {
        lw_format_hours(r->regulated_h, buf, sizeof buf);
        fprintf(fp, "  in regulation       %s\n", buf);
    }
    fprintf(fp, "  lumen-hours         %.4g lm h (%.3g lm per W drawn from the cells)\n",
            r->lumen_hours, r->energy_drawn_wh > 0 ? r->lumen_hours / r->energy_drawn_wh : 0.0);
    if (l->pack.stored_months > 0)
        fprintf(fp, "  after storage       %g months on the shelf: starts at %.1f %% depth\n",
                l->pack.stored_months, 100.0 * r->start_depth);
    fprintf(fp, "  cutoff              %g %% of the 30-s output", l->cutoff.relative_pct);
    if (l->cutoff.flux_lm > 0)
        fprintf(fp, ", or %g lm", l->cutoff.flux_lm);
    fprintf(fp, ", or %.3g V per cell loaded\n", l->cutoff.cell_v);
    fprintf(fp, "  at the end          %.3f V per cell loaded, depth %.1f %%\n", r->final.cell_v,
            100.0 * r->end_depth);
    fputs("\nEnergy\n", fp);
    double drawn = r->energy_drawn_wh;
    const struct {
        const char *name;
        double wh;
    } e[] = {{"into the LEDs", r->energy_led_wh},
             {"series resistors", r->energy_resistor_wh},
             {"cells' internal R", r->energy_internal_wh},
             {"driver", r->energy_driver_wh}};
    fprintf(fp, "  drawn from cells    %.4g Wh\n", drawn);
    for (size_t k = 0; k < sizeof e / sizeof e[0]; k++) {
        if (k == 3 && l->drive.type == LW_DRIVE_RESISTOR)
            continue;
        snprintf(buf2, sizeof buf2, "%.1f %%", drawn > 0 ? 100.0 * e[k].wh / drawn : 0.0);
        fprintf(fp, "  %-19s %.4g Wh  %s\n", e[k].name, e[k].wh, buf2);
    }
    fprintf(fp, "\n  (%d operating-point solves)\n", r->solves);
    if (r->warnings) {
        fputs("\nWarnings\n", fp);
        for (int i = 0; i < LW_WARN_COUNT_; i++)
            if (r->warnings & (1u << i))
                fprintf(fp, "  ! %s\n", warning_text(i));
        if (r->warnings & (LW_WARN_LED_OVER_MAX | LW_WARN_LED_OVER_MAX_WORST))
            fprintf(fp, "    nominal %.1f mA, worst case %.1f mA, max %.1f mA\n",
                    r->initial.led_a * 1e3, r->worst_led_a * 1e3, l->led.max_current_a * 1e3);
        if (r->warnings & (LW_WARN_RESISTOR_HOT | LW_WARN_RESISTOR_OVER_RATING))
            fprintf(fp, "    peak %.3g W nominal, %.3g W worst case, rating %.3g W\n",
                    r->peak_resistor_w, r->worst_resistor_w, l->drive.rating_w);
    }
    fprintf(fp, "\n%s\n", lw_caution_line);
}

lw_status lw_report_run(FILE *fp, lw_format fmt, const lw_profile *prof, const lw_result *res,
                        lw_error *err)
{
    if (fmt == LW_FMT_TEXT) {
        text_report(fp, prof, res);
        return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
    }
    lw_rtable *t = lw_rtable_new(lw_run_ncolumns, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = LW_OK;
    size_t row;
    for (size_t c = 0; c < lw_run_ncolumns && st == LW_OK; c++)
        st = lw_rtable_head(t, c, lw_run_columns[c], err);
    if (st == LW_OK)
        st = lw_rtable_add_row(t, &row, err);
    if (st == LW_OK)
        st = lw_report_run_row(t, row, 0, &prof->light, res, err);
    if (st == LW_OK && fmt == LW_FMT_MD)
        st = lw_rtable_note(t, lw_caution_line, err);
    if (st == LW_OK)
        st = lw_rtable_write(t, fp, fmt, err);
    lw_rtable_free(t);
    return st;
}
