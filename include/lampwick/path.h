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

/* Open a regular file for reading; a folder, device, pipe or socket is
 * refused.  Errors name what_file:what_line and `what` ("[cell] curve") when
 * what_file is given (the key that named the file), else the path. */
lw_status lw_path_open_regular(const char *path, const char *mode, FILE **fp,
                               const char *what_file, int what_line, const char *what,
                               lw_error *err);

/* Check that a file named by a key can be opened; the error names the file
 * and line of the key (from_file:from_line) and `what` (e.g. "[cell] curve"). */
lw_status lw_path_check_readable(const char *path, const char *from_file, int from_line,
                                 const char *what, lw_error *err);

#endif
