/*
 * inifile.c - INI reading with line numbers (see inifile.h).
 */
#include "lampwick/inifile.h"
#include "lampwick/path.h"
#include "lampwick/text.h"
#include "lampwick/alloc.h"

#include <ctype.h>
#include <errno.h>
#include <ini.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

/* Duplicate (section, key) detection in O(1) per entry: open addressing
 * on an FNV-1a hash of "section\0key", the table kept at most half full. */
static uint64_t entry_hash(const char *section, const char *key)
{
    uint64_t h = 1469598103934665603u;
    for (const char *p = section; *p; p++)
        h = (h ^ (unsigned char)*p) * 1099511628211u;
    h = (h ^ 0xFFu) * 1099511628211u;
    for (const char *p = key; *p; p++)
        h = (h ^ (unsigned char)*p) * 1099511628211u;
    return h;
}

struct reader {
    FILE *fp;
    int line;
    lw_ini *ini;
    lw_error *err;          /* the first error of reading, or of the check */
    lw_ini_check check;
    const void *check_ctx;
    size_t *slots;          /* hash table of entry index + 1 (0: empty) */
    size_t nslots;
    char *buf;              /* getline buffer */
    size_t bufcap;
    long bytes;
    bool stop;              /* an error is recorded: feed inih no more lines */
};

static bool fail(struct reader *r, lw_status code, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 3, 4)))
#endif
    ;

static bool fail(struct reader *r, lw_status code, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    lw_error_vset(r->err, code, r->ini->path, r->line, fmt, ap);
    va_end(ap);
    r->stop = true;
    return false;
}

/* The key of a "key = value" line whose '=' comes before column at, as
 * plain printable ASCII, so that a message about the value can name it. */
static bool key_before(const char *s, size_t at, char *key, size_t size)
{
    const char *eq = memchr(s, '=', at);
    if (!eq)
        return false;
    const char *b = s, *e = eq;
    while (b < e && (*b == ' ' || *b == '\t'))
        b++;
    while (e > b && (e[-1] == ' ' || e[-1] == '\t'))
        e--;
    size_t n = (size_t)(e - b);
    if (n == 0 || n >= size || *b == '[' || *b == ';' || *b == '#')
        return false;
    for (const char *c = b; c < e; c++)
        if (*c <= ' ' || *c > '~')
            return false;
    memcpy(key, b, n);
    key[n] = '\0';
    return true;
}

/* Check one raw line: no NUL byte, no control character but tab, valid
 * UTF-8, shorter than LW_INI_LINE_MAX. */
static bool line_ok(struct reader *r, const char *s, size_t n)
{
    if (memchr(s, '\0', n))
        return fail(r, LW_EINPUT, "a NUL byte in the line: this is not a text file");
    size_t len = n;
    while (len > 0 && (s[len - 1] == '\n' || s[len - 1] == '\r'))
        len--;
    if (len >= LW_INI_LINE_MAX - 1)
        return fail(r, LW_EINPUT, "line is too long (at most %d characters)",
                    LW_INI_LINE_MAX - 2);
    char key[LW_INI_NAME_MAX];
    for (size_t i = 0; i < len; i++)
        if ((unsigned char)s[i] < 0x20 && s[i] != '\t') {
            if (key_before(s, i, key, sizeof key))
                return fail(r, LW_EINPUT, "%s: control character \\x%02X in the value", key,
                            (unsigned char)s[i]);
            return fail(r, LW_EINPUT, "control character \\x%02X in the line",
                        (unsigned char)s[i]);
        }
    size_t at;
    if (!lw_text_utf8_valid(s, len, &at)) {
        if (key_before(s, at, key, sizeof key))
            return fail(r, LW_EINPUT, "%s: invalid UTF-8 in the value (column %zu)", key, at + 1);
        return fail(r, LW_EINPUT, "invalid UTF-8 at column %zu", at + 1);
    }
    return true;
}

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
    size_t len = (size_t)(end - p);
    while (len > 0 && isspace((unsigned char)p[len - 1]))
        len--;
    while (len > 0 && isspace((unsigned char)*p)) {
        p++;
        len--;
    }
    if (len >= LW_INI_NAME_MAX) {
        fail(r, LW_EINPUT, "section name too long (at most %d characters)", LW_INI_NAME_MAX - 1);
        return;
    }
    if (ini->n_sections == LW_INI_SECTIONS_MAX) {
        fail(r, LW_EINPUT, "more than %d sections", LW_INI_SECTIONS_MAX);
        return;
    }
    if (ini->n_sections == ini->cap_sections) {
        size_t cap = ini->cap_sections ? 2 * ini->cap_sections : 16;
        lw_ini_section *s = lw_realloc(ini->sections, cap * sizeof *s);
        if (!s) {
            fail(r, LW_ENOMEM, "out of memory");
            return;
        }
        ini->sections = s;
        ini->cap_sections = cap;
    }
    lw_ini_section *s = &ini->sections[ini->n_sections];
    memcpy(s->name, p, len);
    s->name[len] = '\0';
    s->line = r->line;
    for (size_t k = 0; k < ini->n_sections; k++)
        if (!strcmp(ini->sections[k].name, s->name)) {
            fail(r, LW_EINPUT, "[%s] appears twice (first on line %d)", s->name,
                 ini->sections[k].line);
            return;
        }
    ini->n_sections++;
    if (r->check && r->check(r->check_ctx, s->name, NULL, ini->path, r->line, r->err) != LW_OK)
        r->stop = true;
}

/* fgets-style reader for inih: counts lines, checks each, and stops the
 * parse (end of input) once an error is recorded. */
static char *read_line(char *str, int num, void *stream)
{
    struct reader *r = stream;
    if (r->stop)
        return NULL;
    ssize_t got = getline(&r->buf, &r->bufcap, r->fp);
    if (got < 0)
        return NULL;
    r->line++;
    r->bytes += got;
    if (r->bytes > LW_INI_BYTES_MAX) {
        fail(r, LW_EINPUT, "the file is larger than %ld bytes", LW_INI_BYTES_MAX);
        return NULL;
    }
    if (!line_ok(r, r->buf, (size_t)got) || got >= num)
        return NULL;
    memcpy(str, r->buf, (size_t)got + 1);
    note_section(r, str);
    return r->stop ? NULL : str;
}

static bool grow_slots(struct reader *r)
{
    size_t n = r->nslots ? 2 * r->nslots : 64;
    size_t *slots = lw_calloc(n, sizeof *slots);
    if (!slots)
        return false;
    for (size_t i = 0; i < r->ini->n; i++) {
        const lw_ini_entry *e = &r->ini->entries[i];
        size_t h = (size_t)entry_hash(e->section, e->key) & (n - 1);
        while (slots[h])
            h = (h + 1) & (n - 1);
        slots[h] = i + 1;
    }
    free(r->slots);
    r->slots = slots;
    r->nslots = n;
    return true;
}

static int on_value(void *user, const char *section, const char *name, const char *value)
{
    struct reader *r = user;
    lw_ini *ini = r->ini;
    if (r->stop)
        return 0;
    if (!section[0]) {
        fail(r, LW_EINPUT, "key '%s' comes before any [section]", name);
        return 0;
    }
    if (strlen(section) >= LW_INI_NAME_MAX || strlen(name) >= LW_INI_NAME_MAX) {
        fail(r, LW_EINPUT, "section or key name too long (at most %d characters)",
             LW_INI_NAME_MAX - 1);
        return 0;
    }
    if (r->check && r->check(r->check_ctx, section, name, ini->path, r->line, r->err) != LW_OK) {
        r->stop = true;
        return 0;
    }
    if (2 * (ini->n + 1) > r->nslots && !grow_slots(r)) {
        fail(r, LW_ENOMEM, "out of memory");
        return 0;
    }
    size_t h = (size_t)entry_hash(section, name) & (r->nslots - 1);
    for (; r->slots[h]; h = (h + 1) & (r->nslots - 1)) {
        const lw_ini_entry *e = &ini->entries[r->slots[h] - 1];
        if (!strcmp(e->section, section) && !strcmp(e->key, name)) {
            lw_error_set(r->err, LW_EINPUT, ini->path, r->line,
                         "[%s] %s is given twice (first on line %d); an indented line also "
                         "continues the previous value",
                         section, name, e->line);
            r->stop = true;
            return 0;
        }
    }
    if (ini->n == LW_INI_ENTRIES_MAX) {
        fail(r, LW_EINPUT, "more than %d keys", LW_INI_ENTRIES_MAX);
        return 0;
    }
    if (ini->n == ini->cap) {
        size_t cap = ini->cap ? 2 * ini->cap : 32;
        lw_ini_entry *e = lw_realloc(ini->entries, cap * sizeof *e);
        if (!e) {
            fail(r, LW_ENOMEM, "out of memory");
            return 0;
        }
        ini->entries = e;
        ini->cap = cap;
    }
    r->slots[h] = ini->n + 1;
    lw_ini_entry *e = &ini->entries[ini->n++];
    lw_text_copy(e->section, section, sizeof e->section);
    lw_text_copy(e->key, name, sizeof e->key);
    lw_text_copy(e->value, value, sizeof e->value); /* lines are shorter than the value field */
    e->line = r->line;
    return 1;
}

lw_status lw_ini_read(const char *path, lw_ini *ini, lw_ini_check check, const void *check_ctx,
                      lw_error *err)
{
    memset(ini, 0, sizeof *ini);
    if (!lw_text_copy(ini->path, lw_path_display(path), sizeof ini->path))
        return lw_error_set(err, LW_EINPUT, NULL, 0, "the path '%.60s...' is too long", path);
    FILE *fp;
    lw_status st = lw_path_open_regular(path, "r", NULL, &fp, err);
    if (st != LW_OK)
        return st;
    lw_error local;
    lw_error_clear(&local);
    struct reader r = {.fp = fp, .ini = ini, .err = &local, .check = check,
                       .check_ctx = check_ctx};
    int rc = ini_parse_stream(read_line, &r, on_value, &r);
    bool read_error = ferror(fp);
    fclose(fp);
    free(r.slots);
    free(r.buf);
    if (local.code != LW_OK && (rc <= 0 || local.line <= rc)) {
        if (err && err->code == LW_OK)
            *err = local;
        st = local.code;
    } else if (rc > 0) {
        st = lw_error_set(err, LW_EINPUT, ini->path, rc, "expected '[section]' or 'key = value'");
    } else if (read_error) {
        st = lw_error_set(err, LW_EIO, ini->path, 0, "read error");
    } else if (rc < 0) {
        st = lw_error_set(err, LW_ENOMEM, ini->path, 0, "out of memory");
    }
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
