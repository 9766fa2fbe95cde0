/*
 * profschedule.h - use schedules in profiles (internal to the io layer):
 * [use] on_h and off_h, or a sessions file, checked and turned into the
 * schedule a run gets (schedule.h).
 */
#ifndef LW_PROFSCHEDULE_H
#define LW_PROFSCHEDULE_H

#include "lampwick/profile.h"

/* Give out->light its use schedule when out has a [use] section (unless v
 * asks for the light without it): periodic from on_h and off_h, or the
 * sessions of sessions_file (CSV start_h, duration_h and an optional mode
 * column; a session's mode is base plus that mode's overrides plus v's).
 * Messages name file:line and the key or column. */
LW_MUST_CHECK lw_status lw_profschedule_build(const lw_profile *base, const lw_profile_variant *v,
                                              const char *origin, lw_profile *out,
                                              lw_error *err);

#endif
