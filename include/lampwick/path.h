/*
 * path.h - paths, and opening the files lampwick reads.
 *
 * Owns: joining a relative path to the folder of the file that names it,
 * the folder of a path, and opening an input file: only a regular file is
 * opened (a folder, device, pipe or socket is refused, judged on what was
 * opened, without blocking), with messages that name the key that named
 * the file.
 */
#ifndef LW_PATH_H
#define LW_PATH_H

/* layer 3, io (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 3
#error "io-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>
#include "error.h"

/* Join dir and rel ("rel" when rel is absolute or dir is empty); false when
 * the result does not fit (out then holds a cut text: do not use it). */
bool lw_path_join(char *out, size_t size, const char *dir, const char *rel);
/* The folder part of a path ("." when there is none). */
void lw_path_dir(char *out, size_t size, const char *path);

/* Who named a file, for messages: the key's file and line and the key in
 * words ("[cell] curve"). */
typedef struct lw_path_ref {
    const char *file;
    int line;
    const char *what;
} lw_path_ref;

/* Open a regular file for reading; a folder, device, pipe or socket is
 * refused.  Errors name ref->file:ref->line and ref->what when ref is given
 * ("[cell] curve: cannot open 'x.csv': ..."), else the path itself.  The
 * path "-" given by the user (ref NULL) is standard input, whatever it is
 * (a file named by a key is never standard input); the FILE is a copy of
 * its descriptor, so closing it leaves standard input open. */
#define LW_PATH_STDIN_NAME "(standard input)"
/* The name messages give a path: LW_PATH_STDIN_NAME for "-". */
const char *lw_path_display(const char *path);
LW_MUST_CHECK lw_status lw_path_open_regular(const char *path, const char *mode,
                                             const lw_path_ref *ref, FILE **fp, lw_error *err);

/* How many times lw_path_open_regular opened `path` (as given) since the
 * last lw_path_opens_reset, for tests that check a file is read once; the
 * first LW_PATH_COUNTED paths are counted. */
#define LW_PATH_COUNTED 256
size_t lw_path_opens(const char *path);
void lw_path_opens_reset(void);

#endif
