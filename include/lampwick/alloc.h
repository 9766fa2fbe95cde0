/*
 * alloc.h - every allocation of liblampwick goes through here.
 *
 * Owns: lw_malloc, lw_calloc, lw_realloc, lw_strdup (the C library's, with
 * the same contracts: NULL on failure, free() releases) and a failure hook
 * for tests: lw_alloc_fail_at(n) makes the n-th allocation from then on
 * fail (and every later one succeed again), so a test can sweep n over
 * every allocation of a run and check that each failure ends in a clean
 * LW_ENOMEM with nothing leaked.  The hook is one atomic counter, armed by
 * the first call of lw_alloc_fail_at; until then (in every program but the
 * tests) an allocation costs one uncontended atomic load more than malloc.
 */
#ifndef LW_ALLOC_H
#define LW_ALLOC_H

/* layer 1, base (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 1
#error "base-layer header included from a lower layer"
#endif

#include <stddef.h>

void *lw_malloc(size_t size);
void *lw_calloc(size_t n, size_t size);
void *lw_realloc(void *p, size_t size);
char *lw_strdup(const char *s);

/* Test hook: the n-th allocation from now fails (n >= 1); 0 turns it off.
 * Returns how many allocations were made since the previous call (the
 * count starts at the first call). */
long lw_alloc_fail_at(long n);

#endif
