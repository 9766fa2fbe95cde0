/*
 * search.h - the cell search path: the folders a cell name is looked up in
 * (the profile's folder first, then LAMPWICK_CELLS, the user's cells, the
 * installed cells, the source tree's cells; docs/formats.md).
 */
#ifndef LW_SEARCH_H
#define LW_SEARCH_H

/* layer 3, io (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 3
#error "io-layer header included from a lower layer"
#endif

#include <stddef.h>
#include "cell.h"

#define LW_SEARCH_MAX 16

typedef struct lw_search {
    char dirs[LW_SEARCH_MAX][LW_PATH_MAX];
    size_t n;
} lw_search;

/* Append a folder (ignored when empty or the list is full). */
void lw_search_add(lw_search *s, const char *dir);
/* Append each folder of a colon-separated list. */
void lw_search_add_list(lw_search *s, const char *list);

/* The search path of an installed lampwick, in order: the folders of
 * $LAMPWICK_CELLS, the user's cells ($XDG_DATA_HOME/lampwick/cells, by
 * default ~/.local/share/lampwick/cells: the XDG Base Directory
 * Specification), the installed cells.  Clears s first. */
void lw_search_default(lw_search *s);

#endif
