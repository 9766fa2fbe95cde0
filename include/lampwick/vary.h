/*
 * vary.h - one varied key of a sweep: --vary KEY=VALUES.
 *
 * Owns: lw_vary (one --vary KEY=VALUES: the key and the list of texts it
 * takes) and its parser.
 *
 * VALUES forms:
 *   22,33,47          a list (SI prefixes and resistor codes allowed for
 *                     numbers: 2.2k, 4k7, 1M, 4R7)
 *   1..4  1..4:0.5    a numeric range, step 1 or the step after ':'
 *   E24:10..1k        the values of a preferred series in a range
 *   all               for pack.cell: every cell file in the profile's folder
 *                     and on the search path (INI files without a [cell]
 *                     section are skipped, with a note);
 *                     for mode: every mode of the profile
 */
#ifndef LW_VARY_H
#define LW_VARY_H

/* layer 4, study (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 4
#error "study-layer header included from a lower layer"
#endif

#include "batch.h"
#include "cellfile.h"

#define LW_VARY_MAX_VALUES 100000
/* Longest text of one value, bytes with the NUL. */
#define LW_VARY_VALUE_MAX 128
/* The most values a preferred-value range (E24:FROM..TO) may expand to:
 * E192 over about 21 decades, far beyond any real part search. */
#define LW_VARY_ESERIES_MAX 4096

typedef struct lw_vary {
    char key[2 * LW_INI_NAME_MAX];
    size_t n;
    char (*values)[LW_VARY_VALUE_MAX]; /* n texts, as set into the profile */
    char note[512];       /* "" or a note for the user (files skipped by 'all') */
} lw_vary;

/* The accepted forms, for messages and help. */
extern const char *const lw_vary_forms;

/* Parse "KEY=VALUES".  The key is a profile key, or `mode` for the
 * profile's modes (a list of mode names, or all).  `prof` gives the modes
 * and the cell search path (pack.cell=all); it may be NULL when neither is
 * used.  Free with lw_vary_clear. */
LW_MUST_CHECK lw_status lw_vary_parse(const char *arg, const lw_profile *prof, lw_vary *v,
                                      lw_error *err);
void lw_vary_clear(lw_vary *v);

#endif
