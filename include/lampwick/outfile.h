/*
 * outfile.h - output files that are whole or absent: written under a
 * temporary name in the destination's folder and renamed into place only
 * when complete, so a failed or interrupted run never leaves half a file
 * and never damages the old one.
 *
 * Owns: lw_outfile, the checks on a destination, and the registry of
 * temporary files that a signal handler removes (lw_outfile_remove_all).
 *
 * Destinations: "-" is standard output.  An existing destination must be a
 * regular file (a device, pipe, socket or folder is refused, so that even
 * as root `--trace /dev/null` never replaces a device).  A symbolic link is
 * written through: the temporary file goes beside the link's target and
 * replaces the target, and the link stays (a dangling link is refused).
 * lw_outfile_check refuses a destination that is one of the inputs or
 * another output of the same command.
 */
#ifndef LW_OUTFILE_H
#define LW_OUTFILE_H

/* layer 3, io (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 3
#error "io-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include <stdio.h>
#include "error.h"

/* Longest destination path, bytes (longer ones are refused, never cut). */
#define LW_OUTFILE_PATH_MAX 511

typedef struct lw_outfile {
    FILE *fp;
    char path[LW_OUTFILE_PATH_MAX + 1];  /* as given */
    char dest[LW_OUTFILE_PATH_MAX + 1];  /* what is replaced: path, or a link's target */
    char tmp[LW_OUTFILE_PATH_MAX + 32];
    bool is_stdout;
    bool durable;       /* fsync the file and its folder at commit */
    int slot;           /* registry slot of tmp, -1 for none */
    int release_on_commit; /* a guard released with the rename, -1 for none */
} lw_outfile;

/* Open `path` for writing under a temporary name in the destination's
 * folder ("-" is standard output).  Fails (LW_EINPUT) on a path too long, a
 * destination that is not a regular file or a dangling link; (LW_EIO) when
 * the folder cannot be written. */
LW_MUST_CHECK lw_status lw_outfile_open(lw_outfile *out, const char *path, lw_error *err);

/* Flush, close and rename into place; on any failure remove the temporary
 * and leave the destination as it was.  With out->durable set (cell files)
 * the data and the rename are synced to disk first. */
LW_MUST_CHECK lw_status lw_outfile_commit(lw_outfile *out, lw_error *err);

/* Close and remove the temporary.  Safe on an unopened or committed file. */
void lw_outfile_abort(lw_outfile *out);

/* Refuse an output path that names the same file as one of `others` (the
 * command's inputs and its other outputs; NULL entries are skipped).  The
 * message names the option (`what`, e.g. "--trace"). */
LW_MUST_CHECK lw_status lw_outfile_check(const char *path, const char *what,
                                         const char *const *others, size_t n, lw_error *err);

/* Write a whole file: open `path`, call fn with the temporary's stream,
 * commit.  A writer's LW_EIO (the stream failed) is reported with the path
 * and the system's reason ("cannot write: No space left on device"). */
typedef lw_status (*lw_outfile_fn)(FILE *fp, const void *ctx, lw_error *err);
LW_MUST_CHECK lw_status lw_outfile_write(const char *path, lw_outfile_fn fn, const void *ctx,
                                         lw_error *err);

/* The same, synced to disk with its folder (files that matter: cell files
 * and their curves), and releasing `guard` (lw_outfile_guard, or -1) in
 * the same step as the rename into place. */
LW_MUST_CHECK lw_status lw_outfile_write_durable(const char *path, int guard, lw_outfile_fn fn,
                                   const void *ctx, lw_error *err);

/* Have lw_outfile_remove_all remove `path` too, until unguarded: a file
 * that is complete but not yet wanted (a new cell curve until its cell
 * file is in place).  Returns a guard for lw_outfile_unguard (-1: none). */
int lw_outfile_guard(const char *path);
void lw_outfile_unguard(int guard);

/* Remove every temporary file still open (for a signal handler: only
 * async-signal-safe calls). */
void lw_outfile_remove_all(void);

#endif
