/*
 * plot.c - standalone SVG charts (see plot.h).
 *
 * Layout: title and subtitle on top, panels stacked with a shared x axis at
 * the bottom, legend in the top-right of each panel.  Colours are the
 * nine of P. Tol's "muted" qualitative scheme, chosen to stay apart for
 * colour-blind readers (P. Tol, "Colour Schemes", SRON technical note
 * SRON/EPS/TN/09-002; the values from memory); past nine series the colours
 * repeat with another dash pattern (lines) or marker shape (points), so
 * up to 36 series stay distinct.
 */
#include "lampwick/plot.h"
#include "lampwick/number.h"
#include "lampwick/text.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/report.h"
#include "lampwick/alloc.h"

static const char *const palette[] = {"#332288", "#88ccee", "#44aa99", "#117733", "#999933",
                                      "#ddcc77", "#cc6677", "#882255", "#aa4499"};
#define NPAL (sizeof palette / sizeof palette[0])
/* The variants past the palette: a line's dash pattern, a point's marker. */
#define NVARIANT 4
static const char *const dashes[NVARIANT] = {"", " stroke-dasharray='7 4'",
                                             " stroke-dasharray='2 3'",
                                             " stroke-dasharray='9 3 2 3'"};

/* A point's marker of variant v (circle, square, triangle, diamond). */
static void marker(FILE *fp, double x, double y, const char *colour, size_t v)
{
    switch (v % NVARIANT) {
    case 1:
        fprintf(fp, "<rect x='%.2f' y='%.2f' width='7' height='7' fill='%s'/>\n", x - 3.5,
                y - 3.5, colour);
        break;
    case 2:
        fprintf(fp, "<polygon points='%.2f,%.2f %.2f,%.2f %.2f,%.2f' fill='%s'/>\n", x, y - 4.5,
                x + 4.2, y + 3, x - 4.2, y + 3, colour);
        break;
    case 3:
        fprintf(fp, "<polygon points='%.2f,%.2f %.2f,%.2f %.2f,%.2f %.2f,%.2f' fill='%s'/>\n", x,
                y - 4.5, x + 4.5, y, x, y + 4.5, x - 4.5, y, colour);
        break;
    default:
        fprintf(fp, "<circle cx='%.2f' cy='%.2f' r='3.5' fill='%s'/>\n", x, y, colour);
    }
}

/* The default canvas, pixels: wide enough for a legend beside a 10-tick axis,
 * in proportion near the golden ratio (common practice, no source). */
#define CANVAS_W_PX 900
#define CANVAS_H_PX 560
/* An axis goes logarithmic when its data span more than this ratio: below
 * it a linear axis from zero reads better; above, small values crowd into
 * the corner (common practice, no source).  LED fit residuals use a lower
 * ratio on current, since a forward-voltage sweep is usually taken in
 * decades. */
#define LOG_AXIS_RATIO 30.0
#define LOG_AXIS_RATIO_LED_I 20.0
/* Points on each fitted LED curve: smooth at 900 px. */
#define LED_CURVE_POINTS 200

size_t lw_plot_ticks(double lo, double hi, size_t max_ticks, double *ticks)
{
    if (!(hi > lo) || max_ticks < 2 || !isfinite(hi - lo))
        return 0;
    double raw = (hi - lo) / (double)(max_ticks - 1);
    if (!(raw > 0) || !isfinite(log10(raw)))
        return 0;
    double mag = pow(10.0, floor(log10(raw)));
    double step = mag;
    if (raw / mag > 5.0)
        step = 10.0 * mag;
    else if (raw / mag > 2.0)
        step = 5.0 * mag;
    else if (raw / mag > 1.0)
        step = 2.0 * mag;
    size_t n = 0;
    for (double t = ceil(lo / step - 1e-9) * step; t <= hi + 1e-9 * step && n < LW_PLOT_TICKS_MAX;
         t += step) {
        ticks[n++] = fabs(t) < 1e-12 * step ? 0.0 : t;
    }
    return n;
}

/* Ticks of a log axis: powers of ten, with 2 and 5 when the range is short. */
static size_t log_ticks(double lo, double hi, double *ticks)
{
    size_t n = 0;
    if (!(lo > 0) || !(hi >= lo) || !isfinite(log10(lo)) || !isfinite(log10(hi)))
        return 0;
    int d0 = (int)floor(log10(lo)), d1 = (int)ceil(log10(hi));
    bool fine = d1 - d0 <= 3;
    for (int d = d0; d <= d1 && n < LW_PLOT_TICKS_MAX; d++) {
        const double m[] = {1, 2, 5};
        for (int k = 0; k < (fine ? 3 : 1) && n < LW_PLOT_TICKS_MAX; k++) {
            double t = m[k] * pow(10.0, d);
            if (t >= lo * (1 - 1e-9) && t <= hi * (1 + 1e-9))
                ticks[n++] = t;
        }
    }
    return n;
}

static void fmt_tick(char *buf, size_t size, double v)
{
    double a = fabs(v);
    if (a != 0 && (a >= 1e6 || a < 1e-3))
        snprintf(buf, size, "%.0e", v);
    else
        snprintf(buf, size, "%.10g", v);
}

#define LABELS_MAX 256
typedef struct frame {
    double x0, x1, y0, y1;      /* pixel box: x0 left, y0 top */
    double lo, hi;              /* x data range */
    double ylo, yhi;            /* y data range */
    bool xlog, ylog;
    /* the point labels placed so far in this panel (left, top, right, bottom),
     * so that no label is drawn over another of any series */
    double lab[LABELS_MAX][4];
    size_t nlab;
} frame;

/* Place a label box if it overlaps none placed before and stays inside the
 * panel; false: leave this label out (the point still shows). */
static bool place_label(frame *f, double l, double t, double r, double b)
{
    if (l < f->x0 || r > f->x1 || t < f->y0 || b > f->y1 || f->nlab == LABELS_MAX)
        return false;
    for (size_t i = 0; i < f->nlab; i++)
        if (l < f->lab[i][2] && r > f->lab[i][0] && t < f->lab[i][3] && b > f->lab[i][1])
            return false;
    f->lab[f->nlab][0] = l, f->lab[f->nlab][1] = t, f->lab[f->nlab][2] = r;
    f->lab[f->nlab][3] = b;
    f->nlab++;
    return true;
}

static double map(double v, double lo, double hi, bool lg, double p0, double p1)
{
    double u = lg ? (log10(v) - log10(lo)) / (log10(hi) - log10(lo)) : (v - lo) / (hi - lo);
    return p0 + u * (p1 - p0);
}

static double px(const frame *f, double x) { return map(x, f->lo, f->hi, f->xlog, f->x0, f->x1); }
static double py(const frame *f, double y) { return map(y, f->ylo, f->yhi, f->ylog, f->y1, f->y0); }

static void data_range(const lw_axis *ax, const lw_series *s, size_t ns, bool want_x,
                       const lw_refline *refs, size_t nrefs, double *lo, double *hi)
{
    if (ax->lo < ax->hi) {
        *lo = ax->lo;
        *hi = ax->hi;
        return;
    }
    double a = INFINITY, b = -INFINITY;
    for (size_t i = 0; i < ns; i++)
        for (size_t k = 0; k < s[i].n; k++) {
            double v = want_x ? s[i].x[k] : s[i].y[k];
            if (!isfinite(v) || (ax->log && v <= 0))
                continue;
            a = fmin(a, v);
            b = fmax(b, v);
        }
    for (size_t i = 0; i < nrefs; i++) {
        if (!isfinite(refs[i].y) || (ax->log && refs[i].y <= 0))
            continue;
        a = fmin(a, refs[i].y);
        b = fmax(b, refs[i].y);
    }
    /* nothing to show, or a span no double can hold: a plain default */
    if (!isfinite(a) || !isfinite(b) || !isfinite(b - a) ||
        (ax->log && !(isfinite(log10(b) - log10(a))))) {
        a = ax->log ? 1 : 0;
        b = ax->log ? 10 : 1;
    }
    /* headroom: no point or label sits on the frame (4 % of the span, a
     * judgement; an axis starting at zero keeps its zero) */
    if (ax->log && b > a) {
        double d = 0.04 * (log10(b) - log10(a));
        a /= pow(10.0, d);
        b *= pow(10.0, d);
    } else if (b > a) {
        double d = 0.04 * (b - a);
        a = ax->from_zero && a >= 0.0 ? a : a - d;
        b += d;
    }
    if (ax->from_zero && !ax->log)
        a = fmin(a, 0.0);
    if (ax->log) {
        a = pow(10.0, floor(log10(a) * 10.0) / 10.0);
        b = pow(10.0, ceil(log10(b) * 10.0) / 10.0);
        if (b <= a)
            b = a * 10.0;
    } else {
        if (b <= a)
            b = a + (a != 0 ? fabs(a) * 0.1 : 1.0);
        double t[LW_PLOT_TICKS_MAX];
        size_t n = lw_plot_ticks(a, b, 6, t);
        double step = n >= 2 ? t[1] - t[0] : (b - a);
        a = floor(a / step + 1e-9) * step;
        b = ceil(b / step - 1e-9) * step;
        if (b <= a)
            b = a + step;
    }
    *lo = a;
    *hi = b;
}

static void draw_axes(FILE *fp, const frame *f, const lw_panel *p, bool bottom,
                      const lw_axis *xa)
{
    double t[LW_PLOT_TICKS_MAX];
    char buf[64];
    fprintf(fp, "<rect x='%.1f' y='%.1f' width='%.1f' height='%.1f' fill='#ffffff' "
                "stroke='#555' stroke-width='1'/>\n",
            f->x0, f->y0, f->x1 - f->x0, f->y1 - f->y0);
    size_t n = f->ylog ? log_ticks(f->ylo, f->yhi, t) : lw_plot_ticks(f->ylo, f->yhi, 8, t);
    for (size_t i = 0; i < n; i++) {
        double y = py(f, t[i]);
        fprintf(fp, "<line x1='%.1f' y1='%.1f' x2='%.1f' y2='%.1f' stroke='#e3e3e3'/>\n", f->x0,
                y, f->x1, y);
        fmt_tick(buf, sizeof buf, t[i]);
        fprintf(fp, "<text x='%.1f' y='%.1f' text-anchor='end' class='tick'>%s</text>\n",
                f->x0 - 6, y + 4, buf);
    }
    if (p->y2_label && p->y2_scale > 0) {
        /* the right axis gets round numbers of its own unit */
        double t2[LW_PLOT_TICKS_MAX];
        size_t n2 = lw_plot_ticks(f->ylo * p->y2_scale, f->yhi * p->y2_scale, 6, t2);
        for (size_t i = 0; i < n2; i++) {
            double y = py(f, t2[i] / p->y2_scale);
            fmt_tick(buf, sizeof buf, t2[i]);
            fprintf(fp, "<line x1='%.1f' y1='%.1f' x2='%.1f' y2='%.1f' stroke='#555'/>\n", f->x1,
                    y, f->x1 + 4, y);
            fprintf(fp, "<text x='%.1f' y='%.1f' class='tick'>%s</text>\n", f->x1 + 7, y + 4,
                    buf);
        }
    }
    double ymid = 0.5 * (f->y0 + f->y1);
    fprintf(fp, "<text transform='translate(%.1f,%.1f) rotate(-90)' text-anchor='middle' "
                "class='axis'>",
            f->x0 - 52, ymid);
    lw_text_xml_write(fp, p->y.label);
    fputs("</text>\n", fp);
    if (p->y2_label) {
        fprintf(fp, "<text transform='translate(%.1f,%.1f) rotate(90)' text-anchor='middle' "
                    "class='axis'>",
                f->x1 + 52, ymid);
        lw_text_xml_write(fp, p->y2_label);
        fputs("</text>\n", fp);
    }
    n = f->xlog ? log_ticks(f->lo, f->hi, t) : lw_plot_ticks(f->lo, f->hi, 8, t);
    for (size_t i = 0; i < n; i++) {
        double x = px(f, t[i]);
        fprintf(fp, "<line x1='%.1f' y1='%.1f' x2='%.1f' y2='%.1f' stroke='#e3e3e3'/>\n", x,
                f->y0, x, f->y1);
        if (bottom) {
            fmt_tick(buf, sizeof buf, t[i]);
            fprintf(fp, "<text x='%.1f' y='%.1f' text-anchor='middle' class='tick'>%s</text>\n",
                    x, f->y1 + 18, buf);
        }
    }
    if (bottom) {
        fprintf(fp, "<text x='%.1f' y='%.1f' text-anchor='middle' class='axis'>",
                0.5 * (f->x0 + f->x1), f->y1 + 42);
        lw_text_xml_write(fp, xa->label);
        fputs("</text>\n", fp);
    }
}

/* A series' look: its colour, and its variant past the palette (auto_index
 * the series' place among the chart's). */
static const char *series_colour(const lw_series *s, size_t auto_index)
{
    return palette[(s->colour > 0 ? (size_t)(s->colour - 1) : auto_index) % NPAL];
}

static size_t series_variant(const lw_series *s, size_t auto_index)
{
    return s->colour > 0 ? 0 : (auto_index / NPAL) % NVARIANT;
}

static const char *series_dash(const lw_series *s, size_t auto_index)
{
    return s->dashed ? " stroke-dasharray='6 4'" : dashes[series_variant(s, auto_index)];
}

static void draw_series(FILE *fp, frame *f, const lw_series *s, size_t auto_index)
{
    const char *colour = series_colour(s, auto_index);
    if (!s->points) {
        fprintf(fp, "<polyline fill='none' stroke='%s' stroke-width='2'%s points='", colour,
                series_dash(s, auto_index));
        for (size_t k = 0; k < s->n; k++) {
            if (!isfinite(s->x[k]) || !isfinite(s->y[k]))
                continue;
            if ((f->xlog && s->x[k] <= 0) || (f->ylog && s->y[k] <= 0))
                continue;
            fprintf(fp, "%.2f,%.2f ", px(f, s->x[k]), py(f, s->y[k]));
        }
        fputs("'/>\n", fp);
        return;
    }
    for (size_t k = 0; k < s->n; k++) {
        if (!isfinite(s->x[k]) || !isfinite(s->y[k]))
            continue;
        if ((f->xlog && s->x[k] <= 0) || (f->ylog && s->y[k] <= 0))
            continue;
        double x = px(f, s->x[k]), y = py(f, s->y[k]);
        marker(fp, x, y, colour, series_variant(s, auto_index));
        /* the label right of the point, or left of it near the right edge;
         * left out where it would cover another (thinned, never overlapped) */
        double w = 6.0 * (double)(s->labels && s->labels[k] ? strlen(s->labels[k]) : 0);
        bool left = x + 5 + w > f->x1;
        double tx = left ? x - 5 - w : x + 5;
        if (s->labels && s->labels[k] && place_label(f, tx, y - 15, tx + w, y - 3)) {
            fprintf(fp, "<text x='%.2f' y='%.2f' class='pt'>", tx, y - 5);
            lw_text_xml_write(fp, s->labels[k]);
            fputs("</text>\n", fp);
        }
    }
}

/* Data points of the panel inside a pixel box. */
static size_t points_in(const frame *f, const lw_panel *p, double x0, double y0, double x1,
                        double y1)
{
    size_t n = 0;
    for (size_t i = 0; i < p->nseries; i++)
        for (size_t k = 0; k < p->series[i].n; k++) {
            double x = p->series[i].x[k], y = p->series[i].y[k];
            if (!isfinite(x) || !isfinite(y) || (f->xlog && x <= 0) || (f->ylog && y <= 0))
                continue;
            double X = px(f, x), Y = py(f, y);
            n += X >= x0 && X <= x1 && Y >= y0 && Y <= y1;
        }
    return n;
}

/* The legend goes in the corner of the panel that hides the fewest points. */
/* The legend's box (left, top, width, height) in the corner of the panel
 * with the fewest data points; false: no legend. */
static bool legend_box(const frame *f, const lw_panel *p, double box[4])
{
    size_t items = p->nseries + p->nrefs;
    if (items == 0)
        return false;
    double w = p->legend_title ? 7.0 * (double)strlen(p->legend_title) - 32.0 : 0;
    for (size_t i = 0; i < p->nseries; i++)
        w = fmax(w, 7.0 * (double)strlen(p->series[i].name ? p->series[i].name : ""));
    for (size_t i = 0; i < p->nrefs; i++)
        w = fmax(w, 7.0 * (double)strlen(p->refs[i].label ? p->refs[i].label : ""));
    w += 40;
    const double head = p->legend_title ? 18.0 : 0.0;
    double h = 18.0 * (double)items + 6 + head;
    const double cx[4] = {f->x1 - 10 - w, f->x0 + 10, f->x1 - 10 - w, f->x0 + 10};
    const double cy[4] = {f->y0 + 4, f->y0 + 4, f->y1 - 4 - h, f->y1 - 4 - h};
    size_t best = 0, least = (size_t)-1;
    for (size_t c = 0; c < 4; c++) {
        size_t n = points_in(f, p, cx[c] - 6, cy[c] - 6, cx[c] + w + 6, cy[c] + h + 6);
        if (n < least) {
            least = n;
            best = c;
        }
    }
    box[0] = cx[best], box[1] = cy[best], box[2] = w, box[3] = h;
    return true;
}

static void draw_legend(FILE *fp, const frame *f, const lw_panel *p, size_t colour0)
{
    double box[4];
    if (!legend_box(f, p, box))
        return;
    size_t items = p->nseries + p->nrefs;
    const double head = p->legend_title ? 18.0 : 0.0;
    double lx = box[0], y = box[1] + 12;
    fprintf(fp, "<rect x='%.1f' y='%.1f' width='%.1f' height='%.1f' fill='#ffffff' "
                "fill-opacity='0.85' stroke='#bbb'/>\n",
            lx, box[1], box[2], box[3]);
    if (p->legend_title) {
        fprintf(fp, "<text x='%.1f' y='%.1f' class='leg' font-weight='bold'>", lx + 6, y);
        lw_text_xml_write(fp, p->legend_title);
        fputs("</text>\n", fp);
    }
    for (size_t i = 0; i < items; i++) {
        double yy = y + head + 18.0 * (double)i;
        const char *name;
        if (i < p->nseries) {
            const lw_series *s = &p->series[i];
            const char *c = series_colour(s, colour0 + i);
            name = s->name;
            if (s->points)
                marker(fp, lx + 16, yy - 4, c, series_variant(s, colour0 + i));
            else
                fprintf(fp, "<line x1='%.1f' y1='%.1f' x2='%.1f' y2='%.1f' stroke='%s' "
                            "stroke-width='2'%s/>\n",
                        lx + 6, yy - 4, lx + 26, yy - 4, c, series_dash(s, colour0 + i));
        } else {
            name = p->refs[i - p->nseries].label;
            fprintf(fp, "<line x1='%.1f' y1='%.1f' x2='%.1f' y2='%.1f' stroke='#b00020' "
                        "stroke-width='1.5' stroke-dasharray='3 3'/>\n",
                    lx + 6, yy - 4, lx + 26, yy - 4);
        }
        fprintf(fp, "<text x='%.1f' y='%.1f' class='leg'>", lx + 32, yy);
        lw_text_xml_write(fp, name);
        fputs("</text>\n", fp);
    }
}

static lw_status lw_plot_svg_in_c_locale(FILE *fp, const lw_chart *c, lw_error *err)
{
    double W = c->width_px > 0 ? c->width_px : CANVAS_W_PX,
           H = c->height_px > 0 ? c->height_px : CANVAS_H_PX;
    double left = 80, right = 80, top = c->subtitle ? 64 : 46, bottom = 60, gap = 18;
    fprintf(fp, "<?xml version='1.0' encoding='UTF-8'?>\n"
                "<svg xmlns='http://www.w3.org/2000/svg' width='%.0f' height='%.0f' "
                "viewBox='0 0 %.0f %.0f'>\n"
                "<style>text{font-family:sans-serif;fill:#222}.tick{font-size:12px}"
                ".axis{font-size:13px}.leg{font-size:12px}.pt{font-size:10px;fill:#444}"
                ".title{font-size:16px;font-weight:bold}.sub{font-size:12px;fill:#555}</style>\n"
                "<rect width='100%%' height='100%%' fill='#fafaf7'/>\n",
            W, H, W, H);
    /* the chart's name and what it shows, for screen readers and indexes */
    fputs("<title>", fp);
    lw_text_xml_write(fp, c->title ? c->title : "lampwick chart");
    fputs("</title>\n<desc>", fp);
    lw_text_xml_write(fp, c->subtitle ? c->subtitle : "");
    for (size_t k = 0; k < c->npanels; k++) {
        fputs(k ? "; " : (c->subtitle ? ". " : ""), fp);
        lw_text_xml_write(fp, c->panels[k].y.label ? c->panels[k].y.label : "");
    }
    fputs(" against ", fp);
    lw_text_xml_write(fp, c->x.label ? c->x.label : "");
    fputs("</desc>\n", fp);
    if (c->title) {
        fprintf(fp, "<text x='%.1f' y='26' class='title'>", left);
        lw_text_xml_write(fp, c->title);
        fputs("</text>\n", fp);
    }
    if (c->subtitle) {
        fprintf(fp, "<text x='%.1f' y='46' class='sub'>", left);
        lw_text_xml_write(fp, c->subtitle);
        fputs("</text>\n", fp);
    }
    /* shared x range over all panels */
    lw_series all[LW_PLOT_SERIES_MAX * LW_PLOT_PANELS_MAX];
    size_t nall = 0;
    double share = 0;
    for (size_t i = 0; i < c->npanels; i++) {
        for (size_t k = 0; k < c->panels[i].nseries; k++)
            all[nall++] = c->panels[i].series[k];
        share += c->panels[i].height_share > 0 ? c->panels[i].height_share : 1.0;
    }
    double xlo, xhi;
    data_range(&c->x, all, nall, true, NULL, 0, &xlo, &xhi);
    double avail = H - top - bottom - gap * (double)(c->npanels ? c->npanels - 1 : 0);
    double y = top;
    size_t colour0 = 0;
    for (size_t i = 0; i < c->npanels; i++) {
        const lw_panel *p = &c->panels[i];
        double h = avail * (p->height_share > 0 ? p->height_share : 1.0) / share;
        frame f = {.x0 = left, .x1 = W - right, .y0 = y, .y1 = y + h, .lo = xlo, .hi = xhi,
                   .ylo = 0, .yhi = 1, .xlog = c->x.log, .ylog = p->y.log, .nlab = 0};
        data_range(&p->y, p->series, p->nseries, false, p->refs, p->nrefs, &f.ylo, &f.yhi);
        draw_axes(fp, &f, p, i + 1 == c->npanels, &c->x);
        fprintf(fp, "<svg x='%.1f' y='%.1f' width='%.1f' height='%.1f' overflow='hidden'>"
                    "<g transform='translate(%.1f,%.1f)'>\n",
                f.x0, f.y0, f.x1 - f.x0, f.y1 - f.y0, -f.x0, -f.y0);
        for (size_t k = 0; k < p->nrefs; k++)
            fprintf(fp, "<line x1='%.1f' y1='%.1f' x2='%.1f' y2='%.1f' stroke='#b00020' "
                        "stroke-width='1.5' stroke-dasharray='3 3'/>\n",
                    f.x0, py(&f, p->refs[k].y), f.x1, py(&f, p->refs[k].y));
        double lb[4]; /* the legend's box first: no point label goes under it */
        if (legend_box(&f, p, lb) && f.nlab < LABELS_MAX) {
            f.lab[0][0] = lb[0], f.lab[0][1] = lb[1], f.lab[0][2] = lb[0] + lb[2];
            f.lab[0][3] = lb[1] + lb[3];
            f.nlab = 1;
        }
        for (size_t k = 0; k < p->nseries; k++)
            draw_series(fp, &f, &p->series[k], colour0 + k);
        for (size_t k = 0; k < c->nmarks; k++) {
            double x = px(&f, c->marks[k].x);
            fprintf(fp, "<line x1='%.1f' y1='%.1f' x2='%.1f' y2='%.1f' stroke='#555555' "
                        "stroke-width='1' stroke-dasharray='2 3'/>\n",
                    x, f.y0, x, f.y1);
        }
        fputs("</g></svg>\n", fp);
        draw_legend(fp, &f, p, colour0);
        /* the marks' labels over the first panel, after its legend so that
         * none is hidden; staggered down over four rows so that neighbours
         * do not overlap (a spread histogram's three percentiles and a
         * target) */
        for (size_t k = 0; i == 0 && k < c->nmarks; k++) {
            if (!c->marks[k].label)
                continue;
            double x = px(&f, c->marks[k].x);
            bool late = x > 0.5 * (f.x0 + f.x1); /* text to the left of a late mark */
            fprintf(fp, "<text x='%.1f' y='%.1f' class='pt'%s>", late ? x - 4 : x + 4,
                    f.y1 - 8.0 - 14.0 * (double)(k % 4), late ? " text-anchor='end'" : "");
            lw_text_xml_write(fp, c->marks[k].label);
            fputs("</text>\n", fp);
        }
        colour0 += p->nseries;
        y += h + gap;
    }
    fputs("</svg>\n", fp);
    return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
}

static lw_status lw_plot_run_in_c_locale(FILE *fp, const char *title, const lw_light *light,
                                         const lw_result *res, const lw_trace *trace, lw_error *err)
{
    size_t n = trace->n;
    double *buf = lw_malloc(7 * (n ? n : 1) * sizeof *buf);
    if (!buf)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the plot");
    double *t = buf, *pct = buf + n, *vload = buf + 2 * n, *vocv = buf + 3 * n;
    double *tj = buf + 4 * n, *tb = buf + 5 * n, *th = buf + 6 * n;
    for (size_t i = 0; i < n; i++) {
        t[i] = trace->rows[i].t_h;
        pct[i] = trace->rows[i].pct_of_ref;
        vload[i] = trace->rows[i].pt.pack_v;
        vocv[i] = trace->rows[i].pt.ocv_v * light->pack.series;
        tj[i] = trace->rows[i].pt.temps.junction_c;
        tb[i] = trace->rows[i].pt.temps.board_c;
        th[i] = trace->rows[i].pt.temps.body_c;
    }
    char sub[640], cut[64], warn[384];
    char runtime[64];
    lw_report_hours(res->runtime_h, runtime, sizeof runtime);
    lw_report_warnings(res->warnings, warn, sizeof warn);
    snprintf(sub, sizeof sub, "%d x %s, %s drive; runtime to cutoff %s (%s)%s%s",
             light->pack.series * light->pack.parallel, light->pack.cell.name,
             lw_drive_type_names[light->drive.type], runtime,
             lw_run_end_names[res->end_reason], warn[0] ? "; warnings: " : "", warn);
    snprintf(cut, sizeof cut, "cutoff %g %%", light->cutoff.relative_pct);
    lw_chart c = {0};
    c.title = title;
    c.subtitle = sub;
    /* the time axis ends where the run ends, not at the next round number */
    c.x = (lw_axis){.label = "time since switch-on (h)", .lo = 0,
                    .hi = res->runtime_h > 0 ? res->runtime_h * 1.02 : 1.0};
    c.npanels = 2;
    lw_panel *p = &c.panels[0];
    double top = 100.0;
    for (size_t i = 0; i < n; i++)
        top = fmax(top, pct[i]);
    p->y = (lw_axis){.label = light->cutoff.reference == LW_REF_FRESH
                                  ? "light output (% of the fresh 30-s value)"
                                  : "light output (% of 30-s value)",
                     .lo = 0,
                     .hi = 10.0 * ceil(top / 10.0 + 0.3)};
    p->y2_label = "light output (lm)";
    p->y2_scale = res->flux_ref_lm / 100.0;
    p->series[p->nseries++] = (lw_series){.name = "light output", .x = t, .y = pct, .n = n};
    /* the points a specification quotes: 30 s, half, the end */
    double key_t[3], key_pct[3];
    char key_lab[3][80];
    const char *key_labels[3];
    size_t nkey = 0;
    const double ref = res->flux_ref_lm > 0 ? res->flux_ref_lm : NAN;
    key_t[nkey] = 30.0 / 3600.0, key_pct[nkey] = 100.0 * res->flux_30s_lm / ref;
    snprintf(key_lab[nkey], sizeof key_lab[0], "30 s: %.3g lm", res->flux_30s_lm);
    nkey++;
    if (isfinite(res->time_to_half_h)) {
        char h[32];
        lw_report_hours(res->time_to_half_h, h, sizeof h);
        key_t[nkey] = res->time_to_half_h, key_pct[nkey] = 50.0;
        snprintf(key_lab[nkey], sizeof key_lab[0], "half: %s", h);
        nkey++;
    }
    key_t[nkey] = res->runtime_h, key_pct[nkey] = 100.0 * res->final.flux_lm / ref;
    snprintf(key_lab[nkey], sizeof key_lab[0], "end: %s", runtime);
    nkey++;
    for (size_t k = 0; k < nkey; k++)
        key_labels[k] = key_lab[k];
    if (isfinite(ref) && res->runtime_h > 0)
        p->series[p->nseries++] = (lw_series){.name = "30 s, half, end", .x = key_t,
                                              .y = key_pct, .n = nkey, .points = true,
                                              .labels = key_labels, .colour = 8};
    p->refs[p->nrefs++] = (lw_refline){light->cutoff.relative_pct, cut};
    p->height_share = 1.4;
    p = &c.panels[1];
    p->y = (lw_axis){.label = "pack voltage (V)"};
    p->series[p->nseries++] = (lw_series){.name = "loaded", .x = t, .y = vload, .n = n};
    p->series[p->nseries++] =
        (lw_series){.name = "open circuit", .x = t, .y = vocv, .n = n, .dashed = true};
    char endp[64];
    snprintf(endp, sizeof endp, "end point %.3g V per cell", light->cutoff.cell_v);
    p->refs[p->nrefs++] = (lw_refline){light->cutoff.cell_v * light->pack.series, endp};
    p->height_share = 1.0;
    char touch[64], jmax[64];
    if (light->thermal.enabled) {
        /* the heat path: junction, board and body, with the limits given */
        p = &c.panels[c.npanels++];
        p->y = (lw_axis){.label = "temperature (°C)"};
        p->series[p->nseries++] = (lw_series){.name = "LED junction", .x = t, .y = tj, .n = n};
        p->series[p->nseries++] =
            (lw_series){.name = "board", .x = t, .y = tb, .n = n, .dashed = true};
        p->series[p->nseries++] = (lw_series){.name = "body", .x = t, .y = th, .n = n};
        snprintf(touch, sizeof touch, "touch limit %g °C", light->thermal.max_touch_c);
        p->refs[p->nrefs++] = (lw_refline){light->thermal.max_touch_c, touch};
        if (isfinite(light->led.max_junction_c)) {
            snprintf(jmax, sizeof jmax, "junction max %g °C", light->led.max_junction_c);
            p->refs[p->nrefs++] = (lw_refline){light->led.max_junction_c, jmax};
        }
        p->height_share = 1.0;
    }
    /* a step-down chain's switches */
    char marks[LW_PLOT_MARKS_MAX][2 * LW_NAME_MAX + 8];
    for (size_t i = 0; light->chain && i < res->n_switches && c.nmarks < LW_PLOT_MARKS_MAX;
         i++) {
        const lw_switch *sw = &res->switches[i];
        if ((size_t)sw->from >= light->chain->n || (sw->to >= 0 && (size_t)sw->to >= light->chain->n))
            continue; /* a session in another starting mode: its own chain */
        snprintf(marks[c.nmarks], sizeof marks[0], "%s to %s",
                 light->chain->modes[sw->from].name,
                 sw->to >= 0 ? light->chain->modes[sw->to].name : "off");
        c.marks[c.nmarks] = (lw_xmark){sw->t_h, marks[c.nmarks]};
        c.nmarks++;
    }
    lw_status st = lw_plot_svg(fp, &c, err);
    free(buf);
    return st;
}

/* A run in sessions, night by night: the output and the weakest cell's
 * loaded voltage at each switch-on against the calendar day. */
static lw_status lw_plot_sessions_in_c_locale(FILE *fp, const char *title, const lw_light *light,
                                              const lw_result *res, lw_error *err)
{
    size_t n = res->n_sessions;
    double *buf = lw_malloc(3 * (n ? n : 1) * sizeof *buf);
    if (!buf)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the plot");
    double *day = buf, *lm = buf + n, *v = buf + 2 * n, top = 0.0;
    for (size_t i = 0; i < n; i++) {
        day[i] = res->sessions[i].start_h / 24.0;
        lm[i] = res->sessions[i].flux_start_lm;
        v[i] = res->sessions[i].cell_v_start;
        top = fmax(top, lm[i]);
    }
    char sub[512], use[96], runtime[64], cut[64], endp[64];
    lw_report_schedule(light, use, sizeof use);
    lw_report_hours(res->runtime_h, runtime, sizeof runtime);
    snprintf(sub, sizeof sub, "%d x %s, %s; %zu sessions, %s of use to the cutoff (%s)",
             light->pack.series * light->pack.parallel, light->pack.cell.name, use, n, runtime,
             lw_run_end_names[res->end_reason]);
    lw_chart c = {0};
    c.title = title;
    c.subtitle = sub;
    double last = n ? day[n - 1] : 1.0;
    c.x = (lw_axis){.label = "day of use (calendar days since the first switch-on)", .lo = 0,
                    .hi = last > 0 ? last * 1.04 + 0.5 : 1.0};
    c.npanels = 2;
    lw_panel *p = &c.panels[0];
    p->y = (lw_axis){.label = "light output at switch-on (lm)", .lo = 0,
                     .hi = top > 0 ? 1.15 * top : 1.0};
    p->series[p->nseries++] =
        (lw_series){.name = "output at switch-on", .x = day, .y = lm, .n = n, .points = true};
    snprintf(cut, sizeof cut, "cutoff %g %% of the first 30-s output", light->cutoff.relative_pct);
    p->refs[p->nrefs++] = (lw_refline){light->cutoff.relative_pct / 100.0 * res->flux_ref_lm, cut};
    p->height_share = 1.4;
    p = &c.panels[1];
    p->y = (lw_axis){.label = "cell voltage at switch-on (V, loaded)"};
    p->series[p->nseries++] =
        (lw_series){.name = "weakest cell", .x = day, .y = v, .n = n, .points = true};
    snprintf(endp, sizeof endp, "end point %.3g V", light->cutoff.cell_v);
    p->refs[p->nrefs++] = (lw_refline){light->cutoff.cell_v, endp};
    p->height_share = 1.0;
    lw_status st = lw_plot_svg(fp, &c, err);
    free(buf);
    return st;
}

lw_status lw_plot_sessions(FILE *fp, const char *title, const lw_light *light, const lw_result *res,
                           lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_plot_sessions_in_c_locale(fp, title, light, res, err);
    lw_number_locale_end(saved);
    return result;
}

static lw_status lw_plot_led_fit_in_c_locale(FILE *fp, const double *i_a, const double *v, size_t n,
                          const lw_led_fit *lin, const lw_led_fit *sh, lw_error *err)
{
    size_t nc = LED_CURVE_POINTS;
    double *b = lw_malloc((3 * n + 4 * nc) * sizeof *b);
    if (!b)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    double *ima = b, *rl = b + n, *rs = b + 2 * n, *cx = b + 3 * n, *cl = cx + nc,
           *cs = cl + nc, *cxs = cs + nc;
    double lo = INFINITY, hi = 0;
    for (size_t k = 0; k < n; k++) {
        ima[k] = i_a[k] * 1e3;
        lo = fmin(lo, ima[k]);
        hi = fmax(hi, ima[k]);
    }
    for (size_t k = 0; k < n; k++) {
        double i = i_a[k];
        rl[k] = lin ? 1e3 * (v[k] - (lin->threshold_v + lin->slope_ohm * i)) : NAN;
        rs[k] = sh ? 1e3 * (v[k] - (sh->lsq.coef[0] + sh->lsq.coef[1] * log(i) +
                                    sh->lsq.coef[2] * i))
                   : NAN;
    }
    bool logx = hi > LOG_AXIS_RATIO_LED_I * lo;
    for (size_t k = 0; k < nc; k++) {
        double u = (double)k / (double)(nc - 1);
        cx[k] = cxs[k] = logx ? lo * pow(hi / lo, u) : lo + u * (hi - lo);
        double i = cx[k] * 1e-3;
        cl[k] = lin ? lin->threshold_v + lin->slope_ohm * i : NAN;
        cs[k] = sh ? sh->lsq.coef[0] + sh->lsq.coef[1] * log(i) + sh->lsq.coef[2] * i : NAN;
    }
    lw_chart c = {0};
    c.title = "LED forward voltage: measurements and fitted models";
    c.x = (lw_axis){.label = "current (mA)", .log = logx};
    c.npanels = 2;
    lw_panel *p = &c.panels[0];
    p->y = (lw_axis){.label = "forward voltage (V)"};
    p->series[p->nseries++] = (lw_series){.name = "measured", .x = ima, .y = v, .n = n,
                                          .points = true, .colour = 1};
    if (lin)
        p->series[p->nseries++] =
            (lw_series){.name = "linear fit", .x = cx, .y = cl, .n = nc, .colour = 2};
    if (sh)
        p->series[p->nseries++] = (lw_series){.name = "Shockley fit", .x = cxs, .y = cs,
                                              .n = nc, .dashed = true, .colour = 3};
    p->height_share = 1.5;
    p = &c.panels[1];
    p->y = (lw_axis){.label = "residual (mV)"};
    if (lin)
        p->series[p->nseries++] = (lw_series){.name = "linear", .x = ima, .y = rl, .n = n,
                                              .points = true, .colour = 2};
    if (sh)
        p->series[p->nseries++] = (lw_series){.name = "Shockley", .x = ima, .y = rs, .n = n,
                                              .points = true, .colour = 3};
    p->refs[p->nrefs++] = (lw_refline){0.0, "zero"};
    lw_status st = lw_plot_svg(fp, &c, err);
    free(b);
    return st;
}

/* A profile key in words with its unit, for a legend: the first clause of
 * its help and the unit its name ends in ("pack.ambient_c": "ambient
 * temperature (°C)"); the key itself when the schema does not know it. */
static void key_in_words(const char *dotted, char *out, size_t size)
{
    static const struct {
        const char *suffix, *unit;
    } units[] = {{"_k_w", "K/W"}, {"_j_k", "J/K"}, {"_mv_k", "mV/K"}, {"_pct_k", "%/K"},
                 {"_ohm", "Ω"},   {"_pct", "%"},   {"_ma", "mA"},     {"_ua", "µA"},
                 {"_lm", "lm"},   {"_c", "°C"},    {"_v", "V"},       {"_w", "W"},
                 {"_h", "h"},     {"_s", "s"},     {"_months", "months"}};
    char sec[64];
    const char *dot = strchr(dotted, '.');
    const lw_keydef *d = NULL;
    if (dot && (size_t)(dot - dotted) < sizeof sec) {
        memcpy(sec, dotted, (size_t)(dot - dotted));
        sec[dot - dotted] = '\0';
        d = lw_key_find(lw_profile_keys, lw_profile_nkeys, sec, dot + 1);
    }
    if (!d) {
        snprintf(out, size, "%s", dotted);
        return;
    }
    size_t n = strcspn(d->help, ",;(:");
    while (n > 0 && d->help[n - 1] == ' ')
        n--;
    const char *unit = NULL;
    size_t len = strlen(d->name);
    for (size_t i = 0; i < sizeof units / sizeof units[0] && !unit; i++) {
        size_t ls = strlen(units[i].suffix);
        if (len > ls && !strcmp(d->name + len - ls, units[i].suffix))
            unit = units[i].unit;
    }
    if (unit)
        snprintf(out, size, "%.*s (%s)", (int)n, d->help, unit);
    else
        snprintf(out, size, "%.*s", (int)n, d->help);
}

/* The subtitle of a sweep chart: two keys and a sentence. */
#define SUB_MAX 512
#define LEGEND_MAX 160

static lw_status lw_plot_sweep_in_c_locale(const lw_profile *prof, const lw_sweep *sw, lw_chart *c,
                                           void **buf, lw_error *err)
{
    size_t nk = sw->nvary, group_k = nk, label_k = nk ? nk - 1 : 0;
    for (size_t k = 0; k < nk; k++)
        if (!strcmp(sw->vary[k].key, "drive.resistor_ohm"))
            label_k = k;
    for (size_t k = 0; k < nk && group_k == nk; k++)
        if (k != label_k)
            group_k = k;
    size_t ngroups = group_k < nk ? sw->vary[group_k].n : 1, all_groups = ngroups;
    if (ngroups > LW_PLOT_SERIES_MAX)
        ngroups = LW_PLOT_SERIES_MAX;
    /* one block: x and y of every point, their labels, and the subtitle */
    size_t bytes =
        2 * sw->n * sizeof(double) + sw->n * sizeof(const char *) + SUB_MAX + LEGEND_MAX;
    char *block = lw_malloc(bytes);
    *buf = block;
    if (!block)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    double *xy = (double *)(void *)block;
    const char **labels = (const char **)(void *)(xy + 2 * sw->n);
    char *sub = (char *)(labels + sw->n);
    memset(c, 0, sizeof *c);
    if (ngroups < all_groups) /* never a silent truncation */
        snprintf(sub, SUB_MAX, "each point one full discharge; labels: %s; the first %zu of %zu "
                 "values of %s shown: sweep fewer to see them all",
                 nk ? sw->vary[label_k].key : "", ngroups, all_groups, sw->vary[group_k].key);
    else
        snprintf(sub, SUB_MAX, "each point one full discharge; labels: %s",
                 nk ? sw->vary[label_k].key : "");
    c->title = prof->light.name;
    c->subtitle = sub;
    c->npanels = 1;
    lw_panel *p = &c->panels[0];
    if (group_k < nk) {
        key_in_words(sw->vary[group_k].key, sub + SUB_MAX, LEGEND_MAX);
        p->legend_title = sub + SUB_MAX;
    }
    double xmin = INFINITY, xmax = 0, ymin = INFINITY, ymax = 0;
    size_t used = 0;
    for (size_t g = 0; g < ngroups; g++) {
        lw_series *s = &p->series[p->nseries];
        size_t start = used;
        for (size_t r = 0; r < sw->n; r++) {
            if (group_k < nk && sw->index[r * nk + group_k] != g)
                continue;
            const lw_sweep_point *pt = &sw->points[r];
            if (!(pt->flux_30s_lm > 0 && pt->runtime_h > 0))
                continue;
            xy[used] = pt->flux_30s_lm;
            xy[sw->n + used] = pt->runtime_h;
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
    c->x = (lw_axis){.label = "light output 30 s after switch-on (lm)",
                     .log = xmax > LOG_AXIS_RATIO * xmin,
                     .from_zero = !(xmax > LOG_AXIS_RATIO * xmin)};
    p->y = (lw_axis){.label = "runtime to cutoff (h)", .log = ymax > LOG_AXIS_RATIO * ymin,
                     .from_zero = !(ymax > LOG_AXIS_RATIO * ymin)};
    return LW_OK;
}

lw_status lw_plot_svg(FILE *fp, const lw_chart *c, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_plot_svg_in_c_locale(fp, c, err);
    lw_number_locale_end(saved);
    return result;
}

static lw_status lw_plot_modes_in_c_locale(FILE *fp, const lw_spec *spec, size_t c,
                                           lw_error *err)
{
    size_t n = spec->nrows;
    if (n > LW_PLOT_SERIES_MAX)
        return lw_error_set(err, LW_EINPUT, spec->prof->path, 0,
                            "the chart of modes draws at most %d modes; the profile has %zu",
                            LW_PLOT_SERIES_MAX, n);
    lw_result res[LW_PLOT_SERIES_MAX];
    lw_trace tr[LW_PLOT_SERIES_MAX];
    double *xy[LW_PLOT_SERIES_MAX] = {NULL};
    memset(res, 0, sizeof res);
    memset(tr, 0, sizeof tr);
    lw_chart ch = {0};
    char title[160], sub[256];
    snprintf(title, sizeof title, "%s: output of every mode", spec->prof->light.name);
    const lw_light *l0 = &spec->cases[c].light;
    snprintf(sub, sizeof sub, "%d x %s at %g C, fresh cells; each line to its cutoff",
             l0->pack.series * l0->pack.parallel, l0->pack.cell.name, l0->pack.ambient_c);
    ch.title = title;
    ch.subtitle = sub;
    ch.npanels = 1;
    lw_panel *p = &ch.panels[0];
    p->y = (lw_axis){.label = "light output (lm)", .from_zero = true};
    double t_end = 0.0;
    lw_status st = LW_OK;
    for (size_t r = 0; r < n && st == LW_OK; r++) {
        st = lw_spec_trace(spec, r, c, &res[r], &tr[r], err);
        if (st != LW_OK)
            break;
        xy[r] = lw_malloc(2 * (tr[r].n ? tr[r].n : 1) * sizeof *xy[r]);
        if (!xy[r]) {
            st = lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the plot");
            break;
        }
        for (size_t i = 0; i < tr[r].n; i++) {
            xy[r][i] = tr[r].rows[i].t_h;
            xy[r][tr[r].n + i] = tr[r].rows[i].pt.flux_lm;
        }
        const lw_case *k = &spec->cases[r * spec->ncells + c];
        p->series[p->nseries++] = (lw_series){.name = k->variant.mode ? k->variant.mode
                                                                      : "(as written)",
                                              .x = xy[r],
                                              .y = xy[r] + tr[r].n,
                                              .n = tr[r].n};
        t_end = fmax(t_end, res[r].runtime_h);
    }
    ch.x = (lw_axis){.label = "time since switch-on (h)", .lo = 0,
                     .hi = t_end > 0 ? t_end * 1.02 : 1.0};
    if (st == LW_OK)
        st = lw_plot_svg(fp, &ch, err);
    for (size_t r = 0; r < n; r++) {
        free(xy[r]);
        lw_trace_clear(&tr[r]);
        lw_run_result_clear(&res[r]);
    }
    return st;
}

lw_status lw_plot_modes(FILE *fp, const lw_spec *spec, size_t c, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_plot_modes_in_c_locale(fp, spec, c, err);
    lw_number_locale_end(saved);
    return result;
}

lw_status lw_plot_run(FILE *fp, const char *title, const lw_light *light, const lw_result *res,
                      const lw_trace *trace, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_plot_run_in_c_locale(fp, title, light, res, trace, err);
    lw_number_locale_end(saved);
    return result;
}

lw_status lw_plot_led_fit(FILE *fp, const double *i_a, const double *v, size_t n,
                          const lw_led_fit *lin, const lw_led_fit *sh, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_plot_led_fit_in_c_locale(fp, i_a, v, n, lin, sh, err);
    lw_number_locale_end(saved);
    return result;
}

lw_status lw_plot_sweep(const lw_profile *prof, const lw_sweep *sw, lw_chart *c, void **buf,
                         lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_plot_sweep_in_c_locale(prof, sw, c, buf, err);
    lw_number_locale_end(saved);
    return result;
}

lw_status lw_plot_discharge(FILE *fp, const char *title, const lw_light *light,
                            const lw_result *res, const lw_trace *trace, lw_error *err)
{
    if (res->n_sessions > 0) /* in sessions: night by night */
        return lw_plot_sessions(fp, title, light, res, err);
    return lw_plot_run(fp, title, light, res, trace, err);
}
