/*
 * profchain.h - step-down chains in profiles (internal to the io layer):
 * the chain keys of a [mode NAME] section, their checks at load, and the
 * chain a run of a mode gets (chain.h).
 */
#ifndef LW_PROFCHAIN_H
#define LW_PROFCHAIN_H

#include "lampwick/profile.h"

/* True for a key of a [mode NAME] section that belongs to its chain
 * (next, next_after_s, next_below_cell_v, next_above_c), not an override. */
bool lw_profchain_is_key(const char *key);

/* Check every mode's chain keys and that no chain is a cycle; messages
 * name file:line and the key. */
LW_MUST_CHECK lw_status lw_profchain_check(const lw_profile *p, lw_error *err);

/* When out's mode starts a chain, give out->light the chain: every mode of
 * it is base plus that mode's overrides plus v's overrides. */
LW_MUST_CHECK lw_status lw_profchain_build(const lw_profile *base, const lw_profile_variant *v,
                                           const char *origin, lw_profile *out, lw_error *err);

/* The same pack in a (the profile of a run) and b (another mode's): the
 * state of the cells carries over between them; the error names mode at
 * line. */
LW_MUST_CHECK lw_status lw_profchain_same_pack(const lw_profile *a, const lw_profile *b,
                                               const char *mode, int line, lw_error *err);

#endif
