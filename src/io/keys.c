/*
 * keys.c - keyed schemas: checking, converting and storing values (see
 * keys.h).
 */
#include "lampwick/keys.h"

#include <ctype.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <strings.h>
#include "lampwick/number.h"
#include "lampwick/text.h"

const lw_keydef *lw_key_find(const lw_keydef *defs, size_t n, const char *section,
                             const char *name)
{
    /* the names' first letters first: every run of a study looks keys up
     * (a few per cent of a spread study's time in strcmp otherwise) */
    for (size_t i = 0; i < n; i++)
        if (defs[i].name[0] == name[0] && defs[i].section[0] == section[0] &&
            !strcmp(defs[i].name, name) && !strcmp(defs[i].section, section))
            return &defs[i];
    return NULL;
}

const char *lw_key_suggest(const lw_keydef *defs, size_t n, const char *section,
                           const char *name, char *buf, size_t size)
{
    int best = 4;
    const lw_keydef *pick = NULL;
    size_t len = strlen(name);
    for (size_t i = 0; i < n; i++) {
        /* prefer keys of the same section; a key of another section costs 1;
         * a key without its unit suffix ("resistor" for "resistor_ohm")
         * counts as close */
        int d = lw_text_edit_distance(defs[i].name, name) + (strcmp(defs[i].section, section) != 0);
        if (len >= 3 && !strncmp(defs[i].name, name, len) && defs[i].name[len] == '_')
            d = 1 + (strcmp(defs[i].section, section) != 0);
        if (d < best) {
            best = d;
            pick = &defs[i];
        }
    }
    if (!pick)
        return NULL;
    snprintf(buf, size, "%s.%s", pick->section, pick->name);
    return buf;
}

lw_status lw_key_unknown(const lw_keydef *defs, size_t n, const char *section, const char *key,
                         const char *file, int line, lw_error *err)
{
    bool known_section = false;
    for (size_t i = 0; i < n && !known_section; i++)
        known_section = !strcmp(defs[i].section, section);
    if (!known_section) {
        char list[256] = "";
        for (size_t i = 0; i < n; i++) {
            bool seen = false;
            for (size_t k = 0; k < i && !seen; k++)
                seen = !strcmp(defs[k].section, defs[i].section);
            if (seen)
                continue;
            strncat(list, list[0] ? ", [" : "[", sizeof list - strlen(list) - 1);
            strncat(list, defs[i].section, sizeof list - strlen(list) - 1);
            strncat(list, "]", sizeof list - strlen(list) - 1);
        }
        if (!key)
            return lw_error_set(err, LW_EINPUT, file, line,
                                "unknown section [%s]; known sections: %s", section, list);
        return lw_error_set(err, LW_EINPUT, file, line,
                            "unknown section [%s] (key '%s'); known sections: %s", section, key,
                            list);
    }
    if (!key)
        return LW_OK;
    char buf[160];
    const char *near = lw_key_suggest(defs, n, section, key, buf, sizeof buf);
    if (near)
        return lw_error_set(err, LW_EINPUT, file, line,
                            "unknown key '%s' in [%s]; did you mean '%s'?", key, section, near);
    return lw_error_set(err, LW_EINPUT, file, line, "unknown key '%s' in [%s]", key, section);
}

static lw_status range_error(const lw_keydef *d, const char *value, const char *file, int line,
                             lw_error *err)
{
    char lo[40] = "", hi[40] = "";
    locale_t saved = lw_number_locale_begin();
    if (isfinite(d->min))
        snprintf(lo, sizeof lo, "%s %g", (d->flags & LW_KF_MIN_OPEN) ? ">" : ">=", d->min);
    if (isfinite(d->max))
        snprintf(hi, sizeof hi, "%s%s %g", lo[0] ? " and " : "",
                 (d->flags & LW_KF_MAX_OPEN) ? "<" : "<=", d->max);
    lw_number_locale_end(saved);
    return lw_error_set(err, LW_EINPUT, file, line, "[%s] %s = %s: expected %s %s%s (%s)",
                        d->section, d->name, value, d->type == LW_K_INT ? "an integer" : "a number",
                        lo, hi, d->help);
}

static bool in_range(const lw_keydef *d, double v)
{
    if (isfinite(d->min) && ((d->flags & LW_KF_MIN_OPEN) ? !(v > d->min) : !(v >= d->min)))
        return false;
    if (isfinite(d->max) && ((d->flags & LW_KF_MAX_OPEN) ? !(v < d->max) : !(v <= d->max)))
        return false;
    return true;
}

static bool parse_bool(const char *s, bool *out)
{
    static const char *const yes[] = {"yes", "true", "1", "on"};
    static const char *const no[] = {"no", "false", "0", "off"};
    for (size_t i = 0; i < 4; i++) {
        if (!strcmp(s, yes[i])) {
            *out = true;
            return true;
        }
        if (!strcmp(s, no[i])) {
            *out = false;
            return true;
        }
    }
    return false;
}

/* The one check and store of a numeric value, whether it came as text or
 * as a number; `text` is how the messages show it. */
/* Whether number v is a value of key d (numeric or integer). */
static bool number_ok(const lw_keydef *d, double v)
{
    if (d->type == LW_K_INT)
        return v >= INT_MIN && v <= INT_MAX && v == floor(v) && in_range(d, v);
    return isfinite(v) && in_range(d, v);
}

static lw_status store_number(const lw_keydef *d, char *dst, double v, const char *text,
                              const char *file, int line, lw_error *err)
{
    if (!number_ok(d, v))
        return range_error(d, text, file, line, err);
    if (d->type == LW_K_INT) {
        int i = (int)v;
        memcpy(dst, &i, sizeof i);
        return LW_OK;
    }
    if (v == 0.0)
        v = 0.0; /* no negative zero: "-0" is 0 */
    double si = v * d->scale;
    memcpy(dst, &si, sizeof si);
    return LW_OK;
}

lw_status lw_key_apply_number(const lw_keydef *d, void *target, double value, const char *file,
                              int line, lw_error *err)
{
    if ((d->type == LW_K_NUM || d->type == LW_K_INT) && number_ok(d, value)) /* the usual case: */
        return store_number(d, (char *)target + d->offset, value, "", file, line, err); /* no text */
    char text[32];
    lw_number_format(text, sizeof text, value);
    if (!text[0])
        lw_text_copy(text, isnan(value) ? "nan" : value > 0 ? "inf" : "-inf", sizeof text);
    if (d->type != LW_K_NUM && d->type != LW_K_INT)
        return lw_error_set(err, LW_EINPUT, file, line, "[%s] %s = %s: expected %s", d->section,
                            d->name, text,
                            d->type == LW_K_BOOL ? "yes or no" : "a text, not a number");
    return store_number(d, (char *)target + d->offset, value, text, file, line, err);
}

lw_status lw_key_apply(const lw_keydef *d, void *target, const char *value, const char *file,
                       int line, lw_error *err)
{
    char *dst = (char *)target + d->offset;
    switch (d->type) {
    case LW_K_NUM: {
        double v;
        if (!lw_number_parse(value, &v))
            return range_error(d, value, file, line, err);
        return store_number(d, dst, v, value, file, line, err);
    }
    case LW_K_INT: {
        int v;
        if (!lw_number_parse_int(value, &v))
            return range_error(d, value, file, line, err);
        return store_number(d, dst, v, value, file, line, err);
    }
    case LW_K_BOOL: {
        bool v;
        if (!parse_bool(value, &v))
            return lw_error_set(err, LW_EINPUT, file, line,
                                "[%s] %s = %s: expected yes or no", d->section, d->name, value);
        memcpy(dst, &v, sizeof v);
        return LW_OK;
    }
    case LW_K_CHOICE: {
        for (int i = 0; d->choices[i]; i++) {
            if (!strcmp(d->choices[i], value)) {
                memcpy(dst, &i, sizeof i);
                return LW_OK;
            }
        }
        char list[256] = "";
        for (int i = 0; d->choices[i]; i++) {
            strncat(list, i ? ", " : "", sizeof list - strlen(list) - 1);
            strncat(list, d->choices[i], sizeof list - strlen(list) - 1);
        }
        return lw_error_set(err, LW_EINPUT, file, line, "[%s] %s = %s: expected one of %s",
                            d->section, d->name, value, list);
    }
    case LW_K_TEXT:
    default: {
        size_t len = strlen(value), at;
        if (!value[0])
            return lw_error_set(err, LW_EINPUT, file, line, "[%s] %s is empty", d->section,
                                d->name);
        for (size_t i = 0; i < len; i++)
            if ((unsigned char)value[i] < 0x20 || value[i] == 0x7F)
                return lw_error_set(err, LW_EINPUT, file, line,
                                    "[%s] %s: control character \\x%02X in the text",
                                    d->section, d->name, (unsigned char)value[i]);
        if (!lw_text_utf8_valid(value, len, &at))
            return lw_error_set(err, LW_EINPUT, file, line,
                                "[%s] %s: invalid UTF-8 at byte %zu", d->section, d->name,
                                at + 1);
        if (!lw_text_copy(dst, value, d->size))
            return lw_error_set(err, LW_EINPUT, file, line, "[%s] %s is too long (at most %zu)",
                                d->section, d->name, d->size - 1);
        return LW_OK;
    }
    }
}

lw_status lw_key_defaults(const lw_keydef *defs, size_t n, void *target, lw_error *err)
{
    for (size_t i = 0; i < n; i++) {
        if (!defs[i].def || !defs[i].def[0])
            continue;
        lw_status st = lw_key_apply(&defs[i], target, defs[i].def, "(built-in default)", 0, err);
        if (st != LW_OK)
            return st;
    }
    return LW_OK;
}
