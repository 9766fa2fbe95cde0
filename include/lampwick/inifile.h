/*
 * inifile.h - reading INI files with line numbers.
 *
 * Owns: lw_ini (every `key = value` of a file with its section and line, and
 * the line of every section header), read through inih's ini_parse_stream
 * with our own line-counting reader.  What the keys mean is the schemas'
 * business (keys.h).
 *
 * Refused, each with file:line: a path that is not a regular file (a
 * folder, device, pipe), a file over LW_INI_BYTES_MAX, lines of 200 bytes or
 * more (inih would split them silently), a NUL byte, a control character
 * other than tab, invalid UTF-8, lines that are neither `[section]` nor
 * `key = value`, repeated keys within a section (this also catches indented
 * lines, which inih would join to the previous value; found in O(1) by a
 * hash), keys before any section, more than LW_INI_ENTRIES_MAX keys or
 * LW_INI_SECTIONS_MAX sections, names of 64 bytes or more.  Reading stops at
 * the first error, so a misspelt key on line 2 is reported at once.
 */
#ifndef LW_INIFILE_H
#define LW_INIFILE_H

/* layer 3, io (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 3
#error "io-layer header included from a lower layer"
#endif

#include <stdatomic.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>
#include "error.h"

#define LW_INI_LINE_MAX 200
#define LW_INI_NAME_MAX 64
/* Limits of one INI file: far above any real profile or cell file (the
 * bundled ones are under 2 kB, 60 keys, 10 sections). */
#define LW_INI_BYTES_MAX (1024L * 1024)
#define LW_INI_ENTRIES_MAX 10000
#define LW_INI_SECTIONS_MAX 1000

typedef struct lw_ini_entry {
    char section[LW_INI_NAME_MAX];
    char key[LW_INI_NAME_MAX];
    char value[LW_INI_LINE_MAX];
    int line;
} lw_ini_entry;

typedef struct lw_ini_section {
    char name[LW_INI_NAME_MAX];
    int line;
} lw_ini_section;

typedef struct lw_ini {
    char path[512];
    lw_ini_entry *entries;
    size_t n, cap;
    lw_ini_section *sections;
    size_t n_sections, cap_sections;
    _Atomic int refs;     /* holders sharing this read-only copy (profiles);
                             0 from lw_ini_read, kept by the holders */
} lw_ini;

/* Called for each section header (key NULL) and each key as it is read
 * (check_ctx passed through): a status other than LW_OK stops reading at
 * that line.  A section header that repeats an earlier one is refused by
 * the reader itself. */
typedef lw_status (*lw_ini_check)(const void *check_ctx, const char *section, const char *key,
                                  const char *file, int line, lw_error *err);

/* Read a whole INI file; `check` may be NULL.  On failure nothing is kept
 * (*ini is empty). */
LW_MUST_CHECK lw_status lw_ini_read(const char *path, lw_ini *ini, lw_ini_check check,
                                    const void *check_ctx, lw_error *err);

void lw_ini_clear(lw_ini *ini);
/* Line of the header of section `name`, 0 if absent. */
int lw_ini_section_line(const lw_ini *ini, const char *name);

/* Line of `key` in `section`, 0 if absent. */
int lw_ini_key_line(const lw_ini *ini, const char *section, const char *key);

#endif
