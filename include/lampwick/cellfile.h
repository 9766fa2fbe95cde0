/*
 * cellfile.h - cell files: reading cells/NAME.ini and its CSV curves, and
 * finding a cell by name along the search path.
 *
 * Owns: the cell-file schema (docs/formats.md), lw_cellfile_load(),
 * lw_cellfile_find() along the search path (search.h), the list of cells and
 * lw_cellfile_save().
 *
 * Cell file keys ([cell] section; units in the names, converted to SI here):
 *   name, chemistry, nominal_v, capacity_mah, rated_ma, peukert (1),
 *   max_capacity_mah (= capacity_mah), cutoff_v, rechargeable, curve,
 *   temperature, mass_g (0), self_discharge_pct_month (0)
 * Curve CSV: depth_pct, open_circuit_v, resistance_ohm; depth from 0 to 100,
 * strictly increasing; open-circuit voltage positive and non-increasing;
 * resistance positive.
 * Temperature CSV: temp_c, capacity_factor, resistance_factor; temperature
 * strictly increasing; factors positive.
 */
#ifndef LW_CELLFILE_H
#define LW_CELLFILE_H

/* layer 3, io (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 3
#error "io-layer header included from a lower layer"
#endif

#include <stddef.h>
#include "cell.h"
#include "inifile.h"
#include "keys.h"
#include "path.h"
#include "search.h"

/* The cell-file schema, for documentation and tests. */
extern const lw_keydef lw_cellfile_keys[];
extern const size_t lw_cellfile_nkeys;

/* Load a cell file and the CSV files it names (relative to its folder).
 * On failure *cell is left empty.  Free with lw_cell_clear. */
LW_MUST_CHECK lw_status lw_cellfile_load(const char *path, lw_cell *cell, lw_error *err);

/* The same for a file named by a key (ref: "[pack] cell" at its line): a
 * file that is not a cell file (its first section is not [cell]) is said
 * to be so at the key. */
LW_MUST_CHECK lw_status lw_cellfile_load_named(const char *path, const lw_path_ref *ref,
                                               lw_cell *cell, lw_error *err);

/* Resolve a cell reference: a path (contains '/' or ends in ".ini") is taken
 * relative to base_dir; a name is looked up as NAME.ini in base_dir, then in
 * each folder of `search`.  Writes the file's path on success; the error
 * lists the folders searched. */
LW_MUST_CHECK lw_status lw_cellfile_find(const char *ref, const char *base_dir,
                                         const lw_search *search, char *path, size_t size,
                                         lw_error *err);

/* The cell files of the search folders: names (file names without
 * ".ini"), first folder first, each name once, sorted within a folder.  An
 * INI file without a [cell] section (a light profile kept beside the
 * cells) is not a cell file: its path goes to `skipped`. */
typedef struct lw_cellfile_list {
    char **names, **paths;
    size_t n;
    char **skipped;
    size_t nskipped;
} lw_cellfile_list;

/* Does the file have a [cell] section (among its first 2,000 lines)?  An
 * unreadable file counts as one (loading it then says why). */
bool lw_cellfile_is_cell(const char *path);

LW_MUST_CHECK lw_status lw_cellfile_list_read(const lw_search *search, lw_cellfile_list *list,
                                              lw_error *err);
void lw_cellfile_list_clear(lw_cellfile_list *list);

/* Write a cell file at ini_path and its curve beside it as
 * BASE.curve-XXXXXXXX.csv, a new name at every write: first the curve, then
 * the cell file naming it (each through a temporary name, synced, renamed),
 * then the curve the old cell file named is removed.  Any failure leaves
 * the old pair as it was (a crash between the steps leaves at most an
 * unused curve file).  Every value written reads back exactly: a cell name
 * that could not (a control character, ';', '#', '[', ']', '=', a leading or
 * trailing blank, invalid UTF-8, too long) is refused.  `comment` (may hold
 * several lines) goes at the top as ';' comments, control characters shown
 * as \xNN.  The cell must not have a temperature table. */
LW_MUST_CHECK lw_status lw_cellfile_save(const char *ini_path, const lw_cell *cell,
                                         const char *comment, lw_error *err);

#endif
