/*
 * inifile.c - INI reading with line numbers and schema-driven values
 * (see inifile.h).
 */
#include "inifile.h"

#include <ctype.h>
#include <errno.h>
#include <ini.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

struct reader {
    FILE *fp;
    int line;
    bool too_long;
    lw_ini *ini;
    lw_error *err;
    bool oom;
};

static void note_section(struct reader *r, const char *text)
{
    const char *p = text;
    while (isspace((unsigned char)*p))
        p++;
    if (*p != '[')
        return;
    p++;
    const char *end = strchr(p, ']');
    if (!end)
        return; /* inih reports the malformed header */
    lw_ini *ini = r->ini;
    if (ini->n_sections == ini->cap_sections) {
        size_t cap = ini->cap_sections ? 2 * ini->cap_sections : 16;
        lw_ini_section *s = realloc(ini->sections, cap * sizeof *s);
        if (!s) {
            r->oom = true;
            return;
        }
        ini->sections = s;
        ini->cap_sections = cap;
    }
    lw_ini_section *s = &ini->sections[ini->n_sections++];
    size_t len = (size_t)(end - p);
    while (len > 0 && isspace((unsigned char)p[len - 1]))
        len--;
    while (len > 0 && isspace((unsigned char)*p)) {
        p++;
        len--;
    }
    if (len >= sizeof s->name)
        len = sizeof s->name - 1;
    memcpy(s->name, p, len);
    s->name[len] = '\0';
    s->line = r->line;
}

/* fgets-style reader for inih: counts lines and refuses over-long ones. */
static char *read_line(char *str, int num, void *stream)
{
    struct reader *r = stream;
    if (r->too_long || r->oom)
        return NULL;
    if (!fgets(str, num, r->fp))
        return NULL;
    r->line++;
    size_t len = strlen(str);
    if (len > 0 && str[len - 1] != '\n' && !feof(r->fp)) {
        r->too_long = true;
        return NULL;
    }
    note_section(r, str);
    return str;
}

static int on_value(void *user, const char *section, const char *name, const char *value)
{
    struct reader *r = user;
    lw_ini *ini = r->ini;
    if (!section[0]) {
        lw_error_set(r->err, LW_EINPUT, ini->path, r->line,
                     "key '%s' comes before any [section]", name);
        return 0;
    }
    for (size_t i = 0; i < ini->n; i++) {
        if (!strcmp(ini->entries[i].section, section) && !strcmp(ini->entries[i].key, name)) {
            lw_error_set(r->err, LW_EINPUT, ini->path, r->line,
                         "[%s] %s is given twice (first on line %d); an indented line also "
                         "continues the previous value",
                         section, name, ini->entries[i].line);
            return 0;
        }
    }
    if (strlen(section) >= LW_INI_NAME_MAX || strlen(name) >= LW_INI_NAME_MAX) {
        lw_error_set(r->err, LW_EINPUT, ini->path, r->line, "section or key name too long");
        return 0;
    }
    if (ini->n == ini->cap) {
        size_t cap = ini->cap ? 2 * ini->cap : 32;
        lw_ini_entry *e = realloc(ini->entries, cap * sizeof *e);
        if (!e) {
            r->oom = true;
            return 0;
        }
        ini->entries = e;
        ini->cap = cap;
    }
    lw_ini_entry *e = &ini->entries[ini->n++];
    lw_strlcpy(e->section, section, sizeof e->section);
    lw_strlcpy(e->key, name, sizeof e->key);
    lw_strlcpy(e->value, value, sizeof e->value);
    e->line = r->line;
    return 1;
}

lw_status lw_ini_read(const char *path, lw_ini *ini, lw_error *err)
{
    memset(ini, 0, sizeof *ini);
    lw_strlcpy(ini->path, path, sizeof ini->path);
    FILE *fp = fopen(path, "r");
    if (!fp)
        return lw_error_set(err, LW_EINPUT, path, 0, "cannot open: %s", strerror(errno));
    lw_error local;
    lw_error_clear(&local);
    struct reader r = {fp, 0, false, ini, &local, false};
    int rc = ini_parse_stream(read_line, &r, on_value, &r);
    bool read_error = ferror(fp);
    fclose(fp);
    lw_status st = LW_OK;
    if (r.oom)
        st = lw_error_set(err, LW_ENOMEM, path, r.line, "out of memory");
    else if (r.too_long)
        st = lw_error_set(err, LW_EINPUT, path, r.line,
                          "line is too long (at most %d characters)", LW_INI_LINE_MAX - 2);
    else if (rc > 0 && (local.code == LW_OK || rc < local.line))
        st = lw_error_set(err, LW_EINPUT, path, rc, "expected '[section]' or 'key = value'");
    else if (local.code != LW_OK) {
        if (err && err->code == LW_OK)
            *err = local;
        st = local.code;
    } else if (read_error)
        st = lw_error_set(err, LW_EIO, path, 0, "read error");
    else if (rc < 0)
        st = lw_error_set(err, LW_EIO, path, 0, "cannot read");
    if (st != LW_OK)
        lw_ini_clear(ini);
    return st;
}

void lw_ini_clear(lw_ini *ini)
{
    if (!ini)
        return;
    free(ini->entries);
    free(ini->sections);
    ini->entries = NULL;
    ini->sections = NULL;
    ini->n = ini->cap = ini->n_sections = ini->cap_sections = 0;
}

int lw_ini_section_line(const lw_ini *ini, const char *name)
{
    for (size_t i = 0; i < ini->n_sections; i++)
        if (!strcmp(ini->sections[i].name, name))
            return ini->sections[i].line;
    return 0;
}

int lw_ini_key_line(const lw_ini *ini, const char *section, const char *key)
{
    for (size_t i = 0; i < ini->n; i++)
        if (!strcmp(ini->entries[i].section, section) && !strcmp(ini->entries[i].key, key))
            return ini->entries[i].line;
    return 0;
}

/* ---- schemas ---- */

const lw_keydef *lw_key_find(const lw_keydef *defs, size_t n, const char *section,
                             const char *name)
{
    for (size_t i = 0; i < n; i++)
        if (!strcmp(defs[i].section, section) && !strcmp(defs[i].name, name))
            return &defs[i];
    return NULL;
}

int lw_edit_distance(const char *a, const char *b)
{
    size_t la = strlen(a), lb = strlen(b);
    if (la > 63 || lb > 63)
        return 99;
    int row[64];
    for (size_t j = 0; j <= lb; j++)
        row[j] = (int)j;
    for (size_t i = 1; i <= la; i++) {
        int diag = row[0];
        row[0] = (int)i;
        for (size_t j = 1; j <= lb; j++) {
            int up = row[j];
            int cost = tolower((unsigned char)a[i - 1]) != tolower((unsigned char)b[j - 1]);
            int best = diag + cost;
            if (row[j - 1] + 1 < best)
                best = row[j - 1] + 1;
            if (up + 1 < best)
                best = up + 1;
            row[j] = best;
            diag = up;
        }
    }
    return row[lb];
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
        int d = lw_edit_distance(defs[i].name, name) + (strcmp(defs[i].section, section) != 0);
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
        return lw_error_set(err, LW_EINPUT, file, line,
                            "unknown section [%s] (key '%s'); known sections: %s", section, key,
                            list);
    }
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
    if (isfinite(d->min))
        snprintf(lo, sizeof lo, "%s %g", (d->flags & LW_KF_MIN_OPEN) ? ">" : ">=", d->min);
    if (isfinite(d->max))
        snprintf(hi, sizeof hi, "%s%s %g", lo[0] ? " and " : "",
                 (d->flags & LW_KF_MAX_OPEN) ? "<" : "<=", d->max);
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

lw_status lw_key_apply(const lw_keydef *d, void *target, const char *value, const char *file,
                       int line, lw_error *err)
{
    char *at = (char *)target + d->offset;
    switch (d->type) {
    case LW_K_NUM: {
        double v;
        if (!lw_parse_number(value, &v) || !in_range(d, v))
            return range_error(d, value, file, line, err);
        double si = v * d->scale;
        memcpy(at, &si, sizeof si);
        return LW_OK;
    }
    case LW_K_INT: {
        int v;
        if (!lw_parse_int(value, &v) || !in_range(d, v))
            return range_error(d, value, file, line, err);
        memcpy(at, &v, sizeof v);
        return LW_OK;
    }
    case LW_K_BOOL: {
        bool v;
        if (!parse_bool(value, &v))
            return lw_error_set(err, LW_EINPUT, file, line,
                                "[%s] %s = %s: expected yes or no", d->section, d->name, value);
        memcpy(at, &v, sizeof v);
        return LW_OK;
    }
    case LW_K_CHOICE: {
        for (int i = 0; d->choices[i]; i++) {
            if (!strcmp(d->choices[i], value)) {
                memcpy(at, &i, sizeof i);
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
    default:
        if (!value[0])
            return lw_error_set(err, LW_EINPUT, file, line, "[%s] %s is empty", d->section,
                                d->name);
        if (!lw_strlcpy(at, value, d->size))
            return lw_error_set(err, LW_EINPUT, file, line, "[%s] %s is too long (at most %zu)",
                                d->section, d->name, d->size - 1);
        return LW_OK;
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
