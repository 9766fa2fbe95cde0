/*
 * plot.h - standalone SVG charts (no dependency; opens in any browser).
 *
 * Owns: lw_chart, a chart of one to three stacked panels sharing an x axis;
 * each panel has a left y axis, an optional right axis that is a linear
 * rescaling of the left one (e.g. lm beside %), series drawn as lines or as
 * labelled points, and horizontal reference lines (e.g. a cutoff); vertical
 * marks cross every panel (e.g. a mode switch).  Axes are
 * linear or logarithmic, with ticks at round numbers (1, 2, 5 x 10^k).
 * lw_plot_run draws the standard chart of a run from its trace.
 */
#ifndef LW_PLOT_H
#define LW_PLOT_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include <stdio.h>
#include "trace.h"
#include "fit.h"
#include "sweep.h"
#include "spec.h"

#define LW_PLOT_SERIES_MAX 16
#define LW_PLOT_PANELS_MAX 3
#define LW_PLOT_REFS_MAX 4
#define LW_PLOT_MARKS_MAX LW_CHAIN_MAX

typedef struct lw_axis {
    const char *label;
    double lo, hi;        /* range; when lo >= hi it is taken from the data */
    bool log;             /* logarithmic (data must be > 0) */
    bool from_zero;       /* automatic range includes 0 */
} lw_axis;

typedef struct lw_series {
    const char *name;     /* legend text */
    const double *x, *y;
    size_t n;
    bool points;          /* markers instead of a line */
    bool dashed;
    const char *const *labels; /* per-point labels (points only), or NULL */
    int colour;           /* palette index + 1; 0: next in turn */
} lw_series;

typedef struct lw_refline {
    double y;
    const char *label;
} lw_refline;

typedef struct lw_panel {
    lw_axis y;
    const char *y2_label; /* right axis label, NULL for none */
    double y2_scale;      /* right value = left value * y2_scale */
    lw_series series[LW_PLOT_SERIES_MAX];
    size_t nseries;
    lw_refline refs[LW_PLOT_REFS_MAX];
    size_t nrefs;
    double height_share;  /* relative height, default 1 */
    const char *legend_title; /* what the series' names are, with the unit in words
                                 ("ambient temperature (°C)"); NULL: none */
} lw_panel;

/* A vertical mark across every panel at x (e.g. a mode switch), labelled
 * at the top of the first panel. */
typedef struct lw_xmark {
    double x;
    const char *label;
} lw_xmark;

typedef struct lw_chart {
    const char *title;
    const char *subtitle;
    lw_axis x;
    lw_xmark marks[LW_PLOT_MARKS_MAX];
    size_t nmarks;
    lw_panel panels[LW_PLOT_PANELS_MAX];
    size_t npanels;
    double width_px, height_px; /* default 900 x 560 */
} lw_chart;

/* Write the chart as a standalone SVG document. */
LW_MUST_CHECK lw_status lw_plot_svg(FILE *fp, const lw_chart *chart, lw_error *err);

/* The most ticks an axis carries: the size of a tick buffer. */
#define LW_PLOT_TICKS_MAX 32

/* Round tick positions covering [lo, hi]: about max_ticks, steps of
 * 1, 2 or 5 x 10^k.  ticks holds LW_PLOT_TICKS_MAX values; returns the
 * count written (at most max_ticks + 1; at least 2 when max_ticks >= 6),
 * 0 when the range is empty or not finite. */
size_t lw_plot_ticks(double lo, double hi, size_t max_ticks, double *ticks);

/* The chart of a run: light output (% of the 30-s output, and lm) with the
 * cutoff line, and pack voltage (loaded and open circuit), against hours. */
LW_MUST_CHECK lw_status lw_plot_run(FILE *fp, const char *title, const lw_light *light,
                                    const lw_result *res, const lw_trace *trace, lw_error *err);

/* A run with a use schedule, night by night: the light output and the
 * weakest cell's loaded voltage at each switch-on against the calendar
 * day, with the cutoff and the end point. */
LW_MUST_CHECK lw_status lw_plot_sessions(FILE *fp, const char *title, const lw_light *light,
                                         const lw_result *res, lw_error *err);

/* The chart of a run as its use calls for: night by night (lw_plot_sessions)
 * for a run in sessions, else output and voltage over the run
 * (lw_plot_run). */
LW_MUST_CHECK lw_status lw_plot_discharge(FILE *fp, const char *title, const lw_light *light,
                                          const lw_result *res, const lw_trace *trace,
                                          lw_error *err);

/* The chart a specification carries: every mode's light output (lm)
 * against hours since switch-on, with cell column c of the table's runs
 * (each mode run again with its trace, lw_spec_trace).  At most
 * LW_PLOT_SERIES_MAX modes. */
LW_MUST_CHECK lw_status lw_plot_modes(FILE *fp, const lw_spec *spec, size_t c, lw_error *err);

/* The chart of an LED fit: the measured points with the fitted curves, and
 * the residuals below (lin and sh may each be NULL). */
LW_MUST_CHECK lw_status lw_plot_led_fit(FILE *fp, const double *i_a, const double *v, size_t n,
                          const lw_led_fit *lin, const lw_led_fit *sh, lw_error *err);

/* The trade-off chart of a sweep: runtime against the 30-s light output, one
 * series per value of the first varied key other than the resistor, points
 * labelled with the resistor (or the last varied key).  Fill *chart; the
 * arrays it points to are malloc'd into *buf (free it after writing). */
LW_MUST_CHECK lw_status lw_plot_sweep(const lw_profile *prof, const lw_sweep *sw, lw_chart *chart,
                        void **buf, lw_error *err);

#endif
