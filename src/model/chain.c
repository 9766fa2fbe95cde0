/*
 * chain.c - step-down chains (see chain.h): the chain object and its
 * reference count.  The switching itself is part of the run in time
 * (transient.c).
 */
#include "lampwick/chain.h"

#include <math.h>
#include <stdlib.h>
#include "lampwick/alloc.h"
#include "lampwick/light.h"

const char *const lw_chain_cause_names[LW_SWITCH_COUNT + 1] = {"timer", "cell-voltage",
                                                               "body-hot", NULL};

lw_chain *lw_chain_new(void)
{
    lw_chain *c = lw_calloc(1, sizeof *c);
    if (c)
        atomic_init(&c->refs, 1);
    return c;
}

void lw_chain_ref(lw_chain *c)
{
    if (c)
        atomic_fetch_add(&c->refs, 1);
}

void lw_chain_unref(lw_chain *c)
{
    if (!c || atomic_fetch_sub(&c->refs, 1) > 1)
        return;
    for (size_t i = 0; i < c->n; i++) {
        lw_light_clear(c->modes[i].light);
        free(c->modes[i].light);
    }
    free(c);
}

bool lw_chain_mode_switches(const lw_chain_mode *m)
{
    return m->next != LW_CHAIN_NONE &&
           (isfinite(m->after_s) || isfinite(m->below_cell_v) || isfinite(m->above_c));
}
