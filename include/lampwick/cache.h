/*
 * cache.h - parsed input files, loaded once per path per process.
 *
 * Owns: the process-wide cache of the cells and tables a profile names (a
 * cell file with its curve and temperature table; LED I-V and flux tables;
 * converter efficiency tables), shared read-only by every profile and case
 * that names the same file: a sweep of a thousand cases reads each file
 * once.  Tables are immutable and reference-counted (interp.h), so a hit
 * costs one stat(2) and a reference.
 *
 * A file is known by its path and what it is read as (`kind`: the same
 * CSV read as an I-V table and as a flux table are two entries), and it is
 * the same file while its device, inode, size and modification time are:
 * a file changed on disk is read again.  (A file rewritten with the same
 * size within the file system's timestamp granularity looks unchanged:
 * programs that rewrite inputs that fast call lw_cache_clear.)  Failed
 * loads are not kept.  At most LW_CACHE_ENTRIES_MAX files are kept; past
 * that the cache starts afresh.  Thread-safe: one mutex, held while a file
 * is loaded, so two threads that miss together read the file once.
 */
#ifndef LW_CACHE_H
#define LW_CACHE_H

/* layer 3, io (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 3
#error "io-layer header included from a lower layer"
#endif

#include "cell.h"
#include "interp.h"

/* Files the cache keeps at most. */
#define LW_CACHE_ENTRIES_MAX 1024

/* Read and parse the table at path (called on a miss). */
typedef lw_status (*lw_cache_table_fn)(const char *path, const void *ctx, lw_interp **out,
                                       lw_error *err);

/* The table at path read as `kind`: from the cache, or by load(path, ctx)
 * and then kept.  *out is a new reference (lw_interp_free it). */
LW_MUST_CHECK lw_status lw_cache_table(const char *path, const char *kind, lw_cache_table_fn load,
                         const void *ctx, lw_interp **out, lw_error *err);

/* Read and parse the cell file at path (called on a miss). */
typedef lw_status (*lw_cache_cell_fn)(const char *path, const void *ctx, lw_cell *out,
                                      lw_error *err);

/* The cell file at path: from the cache, or by load(path, ctx) and then
 * kept.  *out shares the tables (lw_cell_clear it). */
LW_MUST_CHECK lw_status lw_cache_cell(const char *path, lw_cache_cell_fn load, const void *ctx,
                                      lw_cell *out, lw_error *err);

/* Drop every entry (what profiles hold stays valid: tables are counted). */
void lw_cache_clear(void);

#endif
