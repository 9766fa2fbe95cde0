/*
 * bundled.h - the project's own cells and profiles in tests: the cell
 * search path of the source tree's cells/, and loading profiles/NAME.ini
 * (a failure fails the test, naming file, line and message).
 */
#ifndef LW_BUNDLED_H
#define LW_BUNDLED_H

#include "testutil.h"
#include <lampwick/lampwick.h>

static inline lw_search bundled_cells(void)
{
    lw_search s;
    memset(&s, 0, sizeof s);
    lw_search_add(&s, LW_SOURCE_ROOT "/cells");
    return s;
}

/* Load profiles/NAME.ini of the source tree with the bundled cells. */
static inline lw_profile bundled_profile(const char *name)
{
    char path[512];
    snprintf(path, sizeof path, LW_SOURCE_ROOT "/profiles/%s.ini", name);
    lw_search s = bundled_cells();
    lw_profile p;
    lw_error e;
    lw_error_clear(&e);
    if (lw_profile_load(path, &s, &p, &e) != LW_OK)
        fail_msg("%s:%d: %s", e.file, e.line, e.msg);
    return p;
}

#endif
