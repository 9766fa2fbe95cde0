/*
 * profile.h - light profiles: INI file -> lw_light, modes, --set overrides.
 *
 * Owns: lw_profile (a light profile as loaded: the resolved lw_light plus
 * where every value came from), the profile schema (lw_profile_keys, every
 * key with its unit, range and default; docs/formats.md is written from it),
 * and the order of work: load (read, apply, resolve) -> apply a mode and/or
 * --set overrides -> resolve again.  Resolving loads what the profile names
 * (the cell file by name or path, LED and driver tables) and checks the
 * model-specific needs; every refusal names file:line and the key.
 *
 * Sections: [light] [pack] [led] [drive] [cutoff] [optics] [thermal] and any
 * number of [mode NAME] whose keys are "section.key = value" overrides and
 * the keys of a step-down chain (next, next_after_s, next_below_cell_v,
 * next_above_c; io/profchain.c).  A run of a mode that starts a chain gets
 * the chain in its light (lw_profile_derive).
 */
#ifndef LW_PROFILE_H
#define LW_PROFILE_H

/* layer 3, io (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 3
#error "io-layer header included from a lower layer"
#endif

#include "cellfile.h"
#include "light.h"
#include "inifile.h"
#include "keys.h"

#define LW_PROFILE_KEYS_MAX 96
/* At most this many [mode NAME] sections in a profile (a real light has a
 * handful; each is checked at load). */
#define LW_PROFILE_MODES_MAX 256

typedef enum lw_origin { LW_FROM_DEFAULT, LW_FROM_FILE, LW_FROM_MODE, LW_FROM_OPTION } lw_origin;

typedef struct lw_profile {
    char path[LW_PATH_MAX];
    char dir[LW_PATH_MAX];
    lw_light light;                   /* valid after a successful resolve */
    char cell_ref[LW_PATH_MAX];       /* [pack] cell as written */
    char cell_path[LW_PATH_MAX];      /* cell file loaded into light.pack.cell */
    char iv_file[LW_PATH_MAX], flux_file[LW_PATH_MAX], efficiency_file[LW_PATH_MAX];
    double cutoff_cell_v;             /* V; NAN: the cell's end point */
    int rate_model;                   /* [pack] rate_model: 0 the cell file's, else
                                         1 + lw_rate_model */
    int cell_rate_model;              /* the cell file's own lw_rate_model */
    double use_on_h, use_off_h;       /* [use]: hours on and off per session; NAN:
                                         not given */
    char use_file[LW_PATH_MAX];       /* [use] sessions_file as written */
    double beam_angle_deg;            /* [optics]: full beam angle, 0 if not given */
    double peak_cd_per_lm;            /* [optics]: peak intensity per lumen, 0 if not given */
    int key_line[LW_PROFILE_KEYS_MAX];
    unsigned char key_origin[LW_PROFILE_KEYS_MAX]; /* lw_origin */
    char key_option[LW_PROFILE_KEYS_MAX][48]; /* for option values: "--set drive.x" */
    char mode[LW_NAME_MAX];           /* mode applied, "" for none */
    lw_ini *ini;                      /* the file's entries (modes are applied from it);
                                         read-only, shared by copies (counted in
                                         ini->refs, freed with the last) */
    lw_search search;                 /* where cell names are looked up after dir */
} lw_profile;

extern const lw_keydef lw_profile_keys[];
extern const size_t lw_profile_nkeys;

/* Load and resolve a profile.  `search` may be NULL.  On failure *prof is
 * empty (lw_profile_clear is still safe). */
LW_MUST_CHECK lw_status lw_profile_load(const char *path, const lw_search *search, lw_profile *prof,
                          lw_error *err);

/* Free what the profile holds.  NULL-safe. */
void lw_profile_clear(lw_profile *prof);

/* Copy (tables and the file's entries shared by reference counts: either
 * may be cleared first).  Cannot fail today; returns LW_OK. */
LW_MUST_CHECK lw_status lw_profile_copy(lw_profile *dst, const lw_profile *src, lw_error *err);

/* Set "section.key" to value (same checks as the file).  `file` and `line`
 * say where the value came from, for messages; call lw_profile_resolve after
 * the last set. */
LW_MUST_CHECK lw_status lw_profile_set(lw_profile *prof, const char *dotted_key, const char *value,
                         lw_origin origin, const char *file, int line, lw_error *err);

/* Set "section.key" to a number in the key's file unit (drive.resistor_ohm
 * in ohm), with the same checks as a text: no formatting and parsing.
 * Messages name `option` (e.g. "--vary drive.resistor_ohm"). */
LW_MUST_CHECK lw_status lw_profile_set_number(lw_profile *prof, const char *dotted_key,
                                              double value, const char *option, lw_error *err);

/* Parse "section.key=value" from the command line and set it; errors name
 * the option "--set section.key". */
LW_MUST_CHECK lw_status lw_profile_set_arg(lw_profile *prof, const char *arg, lw_error *err);

/* ---- variants ----
 * A variant of a profile is a mode and overrides; lw_profile_derive makes
 * the profile of a variant: copy -> mode -> overrides -> resolve.  It is the
 * one path every run takes: `lampwick run` (--mode, --set) and every case of
 * a sweep, pick, size and table (batch.h). */

#define LW_PROFILE_OVERRIDES_MAX 16

typedef struct lw_profile_override {
    const char *key;      /* "section.key", borrowed */
    const char *text;     /* the value as text, borrowed; NULL: `number` */
    double number;        /* the value in the key's file unit, when text is NULL */
} lw_profile_override;

typedef struct lw_profile_variant {
    const char *mode;     /* borrowed; NULL: the profile as written */
    bool single_mode;     /* the mode alone, without the step-down chain it starts */
    bool without_use;     /* without the profile's use schedule ([use]) */
    lw_profile_override set[LW_PROFILE_OVERRIDES_MAX];
    size_t nset;
} lw_profile_variant;

/* Add an override as text or as a number (key and text are borrowed: they
 * must outlive the variant).  LW_EINPUT when the variant is full. */
LW_MUST_CHECK lw_status lw_profile_variant_text(lw_profile_variant *v, const char *key,
                                                const char *text, lw_error *err);
LW_MUST_CHECK lw_status lw_profile_variant_number(lw_profile_variant *v, const char *key,
                                                  double value, lw_error *err);
/* Add "section.key=value" from the command line: the key is copied into
 * key[size] (which must outlive the variant), the value borrowed from arg. */
LW_MUST_CHECK lw_status lw_profile_variant_arg(lw_profile_variant *v, const char *arg, char *key,
                                               size_t size, lw_error *err);

/* The profile of a variant of base.  Messages about an override name
 * "ORIGIN KEY" (origin "--set", "--vary", ...).  Free *out with
 * lw_profile_clear, also after a failure. */
LW_MUST_CHECK lw_status lw_profile_derive(const lw_profile *base, const lw_profile_variant *v,
                            const char *origin, lw_profile *out, lw_error *err);

/* Load the profile at path and derive the variant of a mode (NULL: none)
 * and "section.key=value" overrides, as `lampwick run --mode --set` does;
 * messages about an override name "--set KEY".  Free *prof with
 * lw_profile_clear, also after a failure. */
LW_MUST_CHECK lw_status lw_profile_load_variant(const char *path, const lw_search *search,
                                                const char *mode, const char *const *sets,
                                                size_t nsets, lw_profile *prof, lw_error *err);

/* Apply the overrides of [mode NAME]; unknown names list the known modes. */
LW_MUST_CHECK lw_status lw_profile_apply_mode(lw_profile *prof, const char *name, lw_error *err);

/* The mode a section name "mode NAME" names, NULL for other sections. */
const char *lw_profile_section_mode(const char *section);

/* Number and names of the profile's modes, in file order. */
size_t lw_profile_mode_count(const lw_profile *prof);
const char *lw_profile_mode_name(const lw_profile *prof, size_t i);

/* Load what the profile names and check model-specific needs. */
LW_MUST_CHECK lw_status lw_profile_resolve(lw_profile *prof, lw_error *err);

/* The files the profile reads (itself, its cell file and curves, LED and
 * driver tables): up to `max` paths into paths[], each LW_PATH_MAX bytes;
 * returns how many. */
size_t lw_profile_inputs(const lw_profile *prof, char (*paths)[LW_PATH_MAX], size_t max);

/* True when "section.key" was set by the file, a mode or an option. */
bool lw_profile_given(const lw_profile *prof, const char *dotted_key);

/* Where a message about [section] name should point: the file and line
 * that gave it (or its section's, or the option's name and line 0). */
void lw_profile_key_where(const lw_profile *prof, const char *section, const char *name,
                          const char **file, int *line);

/* Current value of a key as text (for sweeps and summaries). */
void lw_profile_value_text(const lw_profile *prof, const char *dotted_key, char *buf,
                           size_t size);

#endif
