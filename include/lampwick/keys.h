/*
 * keys.h - keyed schemas for INI files.
 *
 * Owns: lw_keydef, a table-driven schema that checks a value (number,
 * integer, choice, yes/no, text), converts it from its file unit to SI,
 * stores it at an offset in a struct, and suggests the closest known key for
 * a misspelling.  Used by the light profiles (profile.c) and the cell files
 * (cellfile.c), whatever the value came from: a file or --set.
 */
#ifndef LW_KEYS_H
#define LW_KEYS_H

/* layer 3, io (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 3
#error "io-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include <stddef.h>
#include "error.h"

typedef enum lw_keytype { LW_K_NUM, LW_K_INT, LW_K_TEXT, LW_K_CHOICE, LW_K_BOOL } lw_keytype;

enum {
    LW_KF_REQUIRED = 1u << 0,  /* must be given (model-specific needs are checked later) */
    LW_KF_MIN_OPEN = 1u << 1,  /* value must be > min (not >=) */
    LW_KF_MAX_OPEN = 1u << 2   /* value must be < max */
};

typedef struct lw_keydef {
    const char *section;
    const char *name;
    lw_keytype type;
    size_t offset;            /* where the value goes in the target struct */
    size_t size;              /* for LW_K_TEXT: buffer size */
    double scale;             /* file unit -> SI factor (numbers) */
    double min, max;          /* range in file units */
    unsigned flags;
    const char *const *choices; /* LW_K_CHOICE: NULL-terminated; stored as int */
    const char *def;          /* default as written in docs ("" = none) */
    const char *help;         /* unit and meaning, one line */
} lw_keydef;

/* Find the key `name` in `section` (NULL if unknown). */
const lw_keydef *lw_key_find(const lw_keydef *defs, size_t n, const char *section,
                             const char *name);

/* Closest known "section.key" or key name to a misspelt one (edit distance
 * at most 3), or NULL. */
const char *lw_key_suggest(const lw_keydef *defs, size_t n, const char *section,
                           const char *name, char *buf, size_t size);

/* Record the error for an unknown key (or section) with the closest known
 * key as a suggestion; returns LW_EINPUT.  With key NULL only the section
 * is judged: LW_OK when defs know it. */
LW_MUST_CHECK lw_status lw_key_unknown(const lw_keydef *defs, size_t n, const char *section,
                                       const char *key, const char *file, int line, lw_error *err);

/* Check `value` against `def` and store it into `target`.  Errors name
 * file:line and the key and say what was expected. */
LW_MUST_CHECK lw_status lw_key_apply(const lw_keydef *def, void *target, const char *value,
                                     const char *file, int line, lw_error *err);

/* The same check for a value given as a number (in the key's file unit,
 * drive.resistor_ohm in ohm): range, integer keys whole, no number for a
 * text, choice or yes/no key.  Messages show the number as text. */
LW_MUST_CHECK lw_status lw_key_apply_number(const lw_keydef *def, void *target, double value,
                              const char *file, int line, lw_error *err);

/* Write the default of every key that has one into target. */
LW_MUST_CHECK lw_status lw_key_defaults(const lw_keydef *defs, size_t n, void *target,
                                        lw_error *err);

#endif
