/*
 * alloc.c - allocation wrappers with a failure hook for tests (alloc.h).
 */
#include "lampwick/alloc.h"

#include <stdatomic.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

static atomic_long countdown; /* > 0: allocations until the one that fails */
static atomic_long made;      /* allocations since the last lw_alloc_fail_at */
static atomic_bool counting;  /* lw_alloc_fail_at was called: count (tests only; the
                                 shared counter would make every allocation of every
                                 thread contend for one cache line) */

static int should_fail(void)
{
    if (!atomic_load_explicit(&counting, memory_order_relaxed))
        return 0;
    atomic_fetch_add(&made, 1);
    if (atomic_load_explicit(&countdown, memory_order_relaxed) <= 0)
        return 0;
    return atomic_fetch_sub(&countdown, 1) == 1;
}

void *lw_malloc(size_t size)
{
    return should_fail() ? NULL : malloc(size ? size : 1);
}

void *lw_calloc(size_t n, size_t size)
{
    return should_fail() ? NULL : calloc(n ? n : 1, size ? size : 1);
}

void *lw_realloc(void *p, size_t size)
{
    return should_fail() ? NULL : realloc(p, size ? size : 1);
}

char *lw_strdup(const char *s)
{
    size_t n = strlen(s) + 1;
    char *d = lw_malloc(n);
    if (d)
        memcpy(d, s, n);
    return d;
}

long lw_alloc_fail_at(long n)
{
    atomic_store(&counting, true);
    atomic_store(&countdown, n > 0 ? n : 0);
    return atomic_exchange(&made, 0);
}
