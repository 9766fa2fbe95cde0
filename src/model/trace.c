/*
 * trace.c - the trace of a run: rows dense where the output bends (see
 * trace.h).
 */
#include "lampwick/trace.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"
#include "lampwick/text.h"

void lw_trace_clear(lw_trace *trace)
{
    if (!trace)
        return;
    free(trace->rows);
    trace->rows = NULL;
    trace->n = 0;
}

/* Hand the rows to the trace (or free them when st failed): the last row
 * is the end of the run itself, and every row gets its share of the
 * reference output. */
static lw_status finish_rows(const lw_result *res, lw_trace_row *rows, size_t n, lw_status st,
                             lw_trace *trace)
{
    if (st != LW_OK) {
        free(rows);
        return st;
    }
    if (n > 1) {
        rows[n - 1].t_h = res->runtime_h;
        rows[n - 1].pt = res->final;
    }
    for (size_t i = 0; i < n; i++)
        rows[i].pct_of_ref =
            res->flux_ref_lm > 0 ? 100.0 * rows[i].pt.flux_lm / res->flux_ref_lm : 0.0;
    trace->rows = rows;
    trace->n = n;
    return LW_OK;
}

/* The point at a state of a run in time. */
static lw_status state_point(const lw_light *light, const lw_state *s, lw_point *pt,
                             lw_error *err)
{
    const lw_light *base = light;
    lw_session_plan plan;
    if (light->use && s->session >= 0 && lw_schedule_session(light->use, (size_t)s->session, &plan) &&
        plan.light >= 0)
        base = light->use->lights[plan.light]; /* a session in another starting mode */
    const lw_light *l = lw_light_mode(base, s->mode);
    lw_temps t = {NAN, s->board_c, s->body_c};
    return lw_light_point_depth(l, s->depth, s->fallback, &t, pt, err);
}

/* The trace of a run in time: a row at every accepted step (the steps are
 * at most 1/LW_TRANSIENT_STEPS_MIN of the run), more rows between steps
 * by linear interpolation of the state when min_rows asks for them. */
static lw_status trace_of_states(const lw_light *light, const lw_result *res, size_t min_rows,
                                 lw_trace *trace, lw_error *err)
{
    size_t ns = res->n_states;
    size_t sub = ns > 1 && ns - 1 < min_rows ? (min_rows + ns - 2) / (ns - 1) : 1;
    size_t total = ns > 1 ? (ns - 1) * sub + 1 : ns;
    lw_trace_row *rows = lw_malloc((total ? total : 1) * sizeof *rows);
    if (!rows)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the trace");
    lw_status st = LW_OK;
    size_t n = 0;
    for (size_t i = 0; i < ns && st == LW_OK; i++) {
        /* one row at each side of a switch (two states at one instant) */
        size_t parts = i + 1 < ns && res->states[i + 1].t_h > res->states[i].t_h ? sub : 1;
        for (size_t j = 0; j < parts && st == LW_OK; j++) {
            lw_state s = res->states[i];
            if (j > 0) {
                const lw_state *b = &res->states[i + 1];
                double u = (double)j / (double)parts;
                s.t_h += u * (b->t_h - s.t_h);
                s.depth += u * (b->depth - s.depth);
                s.board_c += u * (b->board_c - s.board_c);
                s.body_c += u * (b->body_c - s.body_c);
            }
            rows[n].t_h = s.t_h;
            rows[n].mode = s.mode;
            rows[n].session = s.session;
            st = state_point(light, &s, &rows[n].pt, err);
            n++;
        }
    }
    return finish_rows(res, rows, n, st, trace);
}

lw_status lw_trace_build(const lw_light *light, const lw_result *res, size_t min_rows,
                         lw_trace *trace, lw_error *err)
{
    trace->rows = NULL;
    trace->n = 0;
    memset(trace->modes, 0, sizeof trace->modes);
    for (size_t i = 0; light->chain && i < light->chain->n; i++)
        lw_text_copy(trace->modes[i], light->chain->modes[i].name, sizeof trace->modes[i]);
    if (res->n_states > 0)
        return trace_of_states(light, res, min_rows, trace, err);
    size_t per_piece = res->n_pieces ? (min_rows + res->n_pieces - 1) / res->n_pieces : 1;
    if (per_piece < 1)
        per_piece = 1;
    /* first pass: how many rows each piece gets (denser where output bends) */
    size_t total = 1;
    size_t *k = lw_calloc(res->n_pieces + 1, sizeof *k);
    if (!k)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the trace");
    lw_status st = LW_OK;
    for (size_t i = 0; i < res->n_pieces && st == LW_OK; i++) {
        lw_point p0, p1;
        bool fb = res->pieces[i].fallback;
        st = lw_light_point(light, res->pieces[i].d0, fb, &p0, err);
        if (st == LW_OK)
            st = lw_light_point(light, res->pieces[i].d1, fb, &p1, err);
        if (st != LW_OK)
            break;
        double bend = res->flux_ref_lm > 0 ? fabs(p1.flux_lm - p0.flux_lm) / res->flux_ref_lm
                                           : 0.0;
        /* a row per 1 % of the reference the output moves */
        const double most = LW_TRACE_PIECE_ROWS_MAX;
        double extra = isfinite(bend) ? fmin(most, ceil(bend / 0.01)) : most;
        size_t n = per_piece + (size_t)extra;
        k[i] = n > LW_TRACE_PIECE_ROWS_MAX ? LW_TRACE_PIECE_ROWS_MAX : n;
        total += k[i];
    }
    lw_trace_row *rows = st == LW_OK ? lw_malloc(total * sizeof *rows) : NULL;
    if (!rows) {
        free(k);
        return st != LW_OK ? st
                           : lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the trace");
    }
    size_t n = 0;
    rows[n++] = (lw_trace_row){0.0, res->initial, 0.0, 0, 0};
    for (size_t i = 0; i < res->n_pieces && st == LW_OK; i++) {
        const lw_piece *pc = &res->pieces[i];
        double t = pc->t0_h, dprev = pc->d0;
        for (size_t j = 1; j <= k[i] && st == LW_OK; j++) {
            double d = pc->d0 + (pc->d1 - pc->d0) * (double)j / (double)k[i];
            if (j == k[i])
                d = pc->d1;
            double dt = 0.0;
            st = lw_run_hours_between(light, pc->fallback, dprev, d, &dt, err);
            t += dt;
            if (st == LW_OK)
                st = lw_light_point(light, d, pc->fallback, &rows[n].pt, err);
            rows[n].t_h = t;
            rows[n].mode = 0;
            rows[n].session = 0;
            n++;
            dprev = d;
        }
    }
    free(k);
    return finish_rows(res, rows, n, st, trace);
}
