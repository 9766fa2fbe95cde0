/*
 * jsontable.h - inside liblampwick's report layer only: a table as a cJSON
 * object (rtable.c), for the JSON document (jsondoc.c).  Not installed:
 * cJSON stays out of the public interface.
 */
#ifndef LW_JSONTABLE_H
#define LW_JSONTABLE_H

#include <cJSON.h>
#include "lampwick/rtable.h"

/* {"title": text or null, "columns": [names], "rows": [{name: value}],
 * "notes": [texts]}; a cell is a number when its whole full-precision text
 * is a finite number, null when empty or "-", else its text.  NULL when
 * out of memory. */
cJSON *lw_rtable_to_json(const lw_rtable *t);

#endif
