/*
 * schedule.h - how a light is used: sessions of use with rests between.
 *
 * Owns: lw_schedule (a periodic pattern - a session of on_h hours every
 * on_h + off_h - or a list of planned or measured sessions, each with its
 * own starting mode) and lw_session (one session of a run, as it went).
 * Units: hours.  No I/O: io/profschedule.c reads [use] and sessions files.
 *
 * At each session the light starts in its starting mode (a step-down chain
 * starts over); between sessions it is off: the cells self-discharge and
 * feed the standby drain, the heat path cools, and kinetic cells recover.
 * A run ends the first time, while on, that an end condition holds, or
 * after the last session of a list.  docs/model.md, "Use schedules".
 */
#ifndef LW_SCHEDULE_H
#define LW_SCHEDULE_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

#include <stdatomic.h>
#include <stdbool.h>
#include <stddef.h>
#include "cell.h"

struct lw_light;

/* One planned session: it starts at start_h (calendar hours from the
 * schedule's origin, when the cells are as the profile says) and lasts
 * duration_h of use. */
typedef struct lw_session_plan {
    double start_h, duration_h;
    int light;               /* its starting mode: -1 the run's own light, else an
                                index into lw_schedule.lights */
} lw_session_plan;

typedef struct lw_schedule {
    _Atomic int refs;        /* reference count (copies of a light share it) */
    double on_h, off_h;      /* periodic (n == 0): on_h of use every on_h + off_h */
    size_t n;                /* a list: its sessions in time order (plan owned) */
    lw_session_plan *plan;
    size_t nlights;          /* the lights of the list's other starting modes, owned */
    struct lw_light **lights;
    char (*names)[LW_NAME_MAX]; /* their mode names, owned */
} lw_schedule;

/* One session of a run, as it went. */
typedef struct lw_session {
    double start_h;          /* calendar hours at switch-on */
    double on_before_h;      /* hours of use before it */
    double flux_start_lm;    /* output at switch-on */
    double cell_v_start;     /* loaded cell voltage at switch-on (the weakest cell's) */
    double depth_start;      /* depth at which the cell's curves are read then */
    double on_h;             /* hours of use in it (to the end of the run in the last) */
} lw_session;

/* A new empty schedule (refs 1), NULL without memory. */
lw_schedule *lw_schedule_new(void);
/* Another reference; NULL-safe. */
void lw_schedule_ref(lw_schedule *s);
/* Drop a reference, freeing the schedule, its plan and lights with the
 * last; NULL-safe. */
void lw_schedule_unref(lw_schedule *s);

/* Session k (from 0): false when there is none (past a list's end). */
bool lw_schedule_session(const lw_schedule *s, size_t k, lw_session_plan *out);

/* True when the schedule is continuous use (periodic with off_h = 0). */
bool lw_schedule_is_continuous(const lw_schedule *s);

#endif
