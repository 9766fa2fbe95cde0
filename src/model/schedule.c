/*
 * schedule.c - use schedules (see schedule.h): the schedule object, its
 * reference count and its sessions.  Running a schedule is part of the run
 * in time (transient.c).
 */
#include "lampwick/schedule.h"

#include <stdlib.h>
#include "lampwick/alloc.h"
#include "lampwick/light.h"

lw_schedule *lw_schedule_new(void)
{
    lw_schedule *s = lw_calloc(1, sizeof *s);
    if (s)
        atomic_init(&s->refs, 1);
    return s;
}

void lw_schedule_ref(lw_schedule *s)
{
    if (s)
        atomic_fetch_add(&s->refs, 1);
}

void lw_schedule_unref(lw_schedule *s)
{
    if (!s || atomic_fetch_sub(&s->refs, 1) > 1)
        return;
    for (size_t i = 0; i < s->nlights; i++) {
        lw_light_clear(s->lights[i]);
        free(s->lights[i]);
    }
    free(s->lights);
    free(s->names);
    free(s->plan);
    free(s);
}

bool lw_schedule_session(const lw_schedule *s, size_t k, lw_session_plan *out)
{
    if (s->n > 0) {
        if (k >= s->n)
            return false;
        *out = s->plan[k];
        return true;
    }
    *out = (lw_session_plan){(double)k * (s->on_h + s->off_h), s->on_h, -1};
    return true;
}

bool lw_schedule_is_continuous(const lw_schedule *s)
{
    return s->n == 0 && s->off_h == 0.0;
}
