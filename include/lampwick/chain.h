/*
 * chain.h - step-down chains: a light that switches from mode to mode on a
 * timer, at a low cell voltage or at a hot body.
 *
 * Owns: lw_chain (the modes of one chain, each a complete lw_light, and the
 * triggers that move from one to the next) and lw_switch (one switch of a
 * run).  Units: s, V per cell, deg C.  No I/O.
 *
 * A chain starts at its mode 0.  A mode with a `next` switches to it (or
 * switches the light off) at the first of its triggers to fire: the time
 * in the mode reaching after_s, the on-state loaded cell voltage falling to
 * below_cell_v, the body temperature reaching above_c.  The run keeps its
 * depth of discharge and temperatures across a switch; the triggers of the
 * new mode are checked at once, so a chain can cascade.  Chains are acyclic
 * (checked where they are built, io/profile.c), so a run switches at most
 * LW_CHAIN_MAX times.  docs/model.md, "Step-down chains".
 */
#ifndef LW_CHAIN_H
#define LW_CHAIN_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

#include <stdatomic.h>
#include <stdbool.h>
#include <stddef.h>
#include "cell.h"

/* Most modes in one chain: a real light steps down two or three times. */
#define LW_CHAIN_MAX 16

/* `next` values that are not a mode. */
enum { LW_CHAIN_OFF = -1, LW_CHAIN_NONE = -2 };

/* What made a light switch. */
typedef enum lw_switch_cause {
    LW_SWITCH_TIMER, LW_SWITCH_CELL_V, LW_SWITCH_HOT, LW_SWITCH_COUNT
} lw_switch_cause;

/* Names as the outputs write them ("timer", "cell-voltage", "body-hot"). */
extern const char *const lw_chain_cause_names[LW_SWITCH_COUNT + 1];

struct lw_light;

typedef struct lw_chain_mode {
    char name[LW_NAME_MAX];
    struct lw_light *light;  /* the mode's light, owned (its own chain NULL) */
    int next;                /* index of the next mode, LW_CHAIN_OFF or LW_CHAIN_NONE */
    double after_s;          /* switch after this long in the mode; NAN: no timer */
    double below_cell_v;     /* switch at this loaded cell voltage; NAN: none */
    double above_c;          /* switch at this body temperature; NAN: none */
} lw_chain_mode;

typedef struct lw_chain {
    _Atomic int refs;        /* reference count (copies of a light share the chain) */
    size_t n;
    lw_chain_mode modes[LW_CHAIN_MAX];
} lw_chain;

/* One switch of a run. */
typedef struct lw_switch {
    double t_h;              /* when, hours since switch-on */
    int from, to;            /* mode indices; to = LW_CHAIN_OFF for off */
    lw_switch_cause cause;
    double flux_before_lm, flux_after_lm; /* output just before and after (0 for off) */
} lw_switch;

/* A new empty chain (refs 1), NULL without memory. */
lw_chain *lw_chain_new(void);
/* Another reference; NULL-safe. */
void lw_chain_ref(lw_chain *c);
/* Drop a reference, freeing the chain and its modes' lights with the
 * last; NULL-safe. */
void lw_chain_unref(lw_chain *c);

/* True when mode i has a next mode (or off) and a trigger. */
bool lw_chain_mode_switches(const lw_chain_mode *m);

#endif
