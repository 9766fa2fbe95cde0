/*
 * profchain.c - step-down chains in profiles (see profchain.h and
 * chain.h).  Units as written: s, V per cell, deg C.
 *
 * Keys of a [mode NAME] section that are not "section.key" overrides:
 *   next = MODE | off      the mode that follows, or off
 *   next_after_s = T       after T s in this mode
 *   next_below_cell_v = V  when the on-state loaded cell voltage falls to V
 *   next_above_c = C       when the body reaches C deg C ([thermal])
 * A next needs a trigger and a trigger a next; the modes of a chain share
 * the pack (depth of discharge carries over); chains are acyclic.
 */
#include "profchain.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"
#include "lampwick/number.h"
#include "lampwick/text.h"

enum { K_NEXT, K_AFTER, K_BELOW, K_ABOVE, K_COUNT };

static const char *const chain_keys[K_COUNT] = {"next", "next_after_s", "next_below_cell_v",
                                                "next_above_c"};

/* The range of each trigger as written. */
static const double key_min[K_COUNT] = {0, 0.0, 0.0, -50.0};
static const double key_max[K_COUNT] = {0, 1e7, 10.0, 250.0};

bool lw_profchain_is_key(const char *key)
{
    for (int k = 0; k < K_COUNT; k++)
        if (!strcmp(key, chain_keys[k]))
            return true;
    return false;
}

/* A mode's chain keys as read. */
typedef struct mode_keys {
    char next[LW_NAME_MAX];   /* "" for none */
    double v[K_COUNT];        /* triggers, NAN when not given */
    int line[K_COUNT];        /* 0 when not given */
    int section_line;
} mode_keys;

static lw_status read_keys(const lw_profile *p, const char *mode, mode_keys *m, lw_error *err)
{
    memset(m, 0, sizeof *m);
    for (int k = 0; k < K_COUNT; k++)
        m->v[k] = NAN;
    char section[LW_INI_NAME_MAX];
    snprintf(section, sizeof section, "mode %s", mode);
    m->section_line = lw_ini_section_line(p->ini, section);
    for (size_t i = 0; i < p->ini->n; i++) {
        const lw_ini_entry *e = &p->ini->entries[i];
        const char *name = lw_profile_section_mode(e->section);
        if (!name || strcmp(name, mode) != 0 || !lw_profchain_is_key(e->key))
            continue;
        int k = 0;
        while (strcmp(e->key, chain_keys[k]) != 0)
            k++;
        m->line[k] = e->line;
        if (k == K_NEXT) {
            if (!lw_text_copy(m->next, e->value, sizeof m->next) || !m->next[0])
                return lw_error_set(err, LW_EINPUT, p->path, e->line,
                                    "[%s] next: name a mode or off", e->section);
            continue;
        }
        double x;
        if (!lw_number_parse_double(e->value, &x) || !(x > key_min[k] || (k == K_ABOVE &&
                                                                            x >= key_min[k])) ||
            !(x <= key_max[k]))
            return lw_error_set(err, LW_EINPUT, p->path, e->line,
                                "[%s] %s = '%s': expected a number %s %g to %g", e->section,
                                e->key, e->value, k == K_ABOVE ? "from" : "above", key_min[k],
                                key_max[k]);
        m->v[k] = x;
    }
    bool trigger = m->line[K_AFTER] || m->line[K_BELOW] || m->line[K_ABOVE];
    if (m->next[0] && !trigger)
        return lw_error_set(err, LW_EINPUT, p->path, m->line[K_NEXT],
                            "[mode %s] next = %s needs a trigger: next_after_s, "
                            "next_below_cell_v or next_above_c",
                            mode, m->next);
    if (!m->next[0] && trigger) {
        int k = m->line[K_AFTER] ? K_AFTER : (m->line[K_BELOW] ? K_BELOW : K_ABOVE);
        return lw_error_set(err, LW_EINPUT, p->path, m->line[k],
                            "[mode %s] %s needs next = MODE or off", mode, chain_keys[k]);
    }
    return LW_OK;
}

/* The profile's own copy of a mode's name (stable while the profile
 * lives), NULL when there is no such mode. */
static const char *mode_named(const lw_profile *p, const char *name)
{
    for (size_t i = 0; i < lw_profile_mode_count(p); i++)
        if (!strcmp(lw_profile_mode_name(p, i), name))
            return lw_profile_mode_name(p, i);
    return NULL;
}

lw_status lw_profchain_check(const lw_profile *p, lw_error *err)
{
    size_t n = lw_profile_mode_count(p);
    for (size_t i = 0; i < n; i++) {
        const char *start = lw_profile_mode_name(p, i);
        mode_keys m;
        lw_status st = read_keys(p, start, &m, err);
        if (st != LW_OK)
            return st;
        if (!m.next[0])
            continue;
        if (m.line[K_ABOVE] && !p->light.thermal.enabled)
            return lw_error_set(err, LW_EINPUT, p->path, m.line[K_ABOVE],
                                "[mode %s] next_above_c needs a [thermal] section (the body "
                                "temperature)",
                                start);
        /* follow the chain from this mode: a cycle comes back to a mode seen */
        const char *at = start;
        int at_line = m.line[K_NEXT];
        for (size_t steps = 0; strcmp(m.next, "off") != 0; steps++) {
            const char *next = mode_named(p, m.next);
            if (!next)
                return lw_error_set(err, LW_EINPUT, p->path, at_line,
                                    "[mode %s] next = %s: no such mode (name a mode or off)", at,
                                    m.next);
            if (next == start || steps >= n)
                return lw_error_set(err, LW_EINPUT, p->path, at_line,
                                    "[mode %s] next = %s: the chain from [mode %s] comes back "
                                    "to a mode it has left (a cycle)",
                                    at, m.next, start);
            if (steps + 1 >= LW_CHAIN_MAX)
                return lw_error_set(err, LW_EINPUT, p->path, at_line,
                                    "[mode %s] next: a chain of more than %d modes", at,
                                    LW_CHAIN_MAX);
            at = next;
            st = read_keys(p, at, &m, err);
            if (st != LW_OK)
                return st;
            if (!m.next[0])
                break;
            at_line = m.line[K_NEXT];
        }
    }
    return LW_OK;
}

/* The modes of a chain share the pack: the depth of discharge carries over. */
lw_status lw_profchain_same_pack(const lw_profile *a, const lw_profile *b, const char *mode,
                                 int line, lw_error *err)
{
    const lw_pack *x = &a->light.pack, *y = &b->light.pack;
    if (strcmp(a->cell_path, b->cell_path) != 0 || x->series != y->series ||
        x->parallel != y->parallel || x->ambient_c != y->ambient_c ||
        x->stored_months != y->stored_months || x->capacity_spread != y->capacity_spread ||
        x->resistance_spread != y->resistance_spread || x->cell.rate_model != y->cell.rate_model)
        return lw_error_set(err, LW_EINPUT, b->path, line,
                            "[mode %s] changes the pack of a chain that starts at [mode %s]: "
                            "the modes of a chain share their cells",
                            mode, a->mode);
    return LW_OK;
}

lw_status lw_profchain_build(const lw_profile *base, const lw_profile_variant *v,
                             const char *origin, lw_profile *out, lw_error *err)
{
    if (!out->mode[0] || v->single_mode)
        return LW_OK;
    mode_keys m;
    lw_status st = read_keys(out, out->mode, &m, err);
    if (st != LW_OK || !m.next[0])
        return st;
    lw_chain *c = lw_chain_new();
    if (!c)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    char name[LW_NAME_MAX];
    lw_text_copy(name, out->mode, sizeof name);
    while (st == LW_OK) {
        if (c->n == LW_CHAIN_MAX) { /* lw_profchain_check refused it at load */
            st = lw_error_set(err, LW_EINPUT, out->path, m.line[K_NEXT],
                              "a chain of more than %d modes", LW_CHAIN_MAX);
            break;
        }
        lw_chain_mode *cm = &c->modes[c->n];
        lw_text_copy(cm->name, name, sizeof cm->name);
        cm->light = lw_calloc(1, sizeof *cm->light);
        if (!cm->light) {
            st = lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
            break;
        }
        c->n++;
        if (c->n == 1) {
            lw_light_copy(cm->light, &out->light);
        } else {
            lw_profile_variant w = *v;
            w.mode = name;
            w.single_mode = true;
            lw_profile q;
            st = read_keys(out, name, &m, err);
            if (st == LW_OK)
                st = lw_profile_derive(base, &w, origin, &q, err);
            else
                memset(&q, 0, sizeof q);
            if (st == LW_OK)
                st = lw_profchain_same_pack(out, &q, name, m.section_line, err);
            if (st == LW_OK)
                lw_light_copy(cm->light, &q.light);
            lw_profile_clear(&q);
        }
        if (st != LW_OK)
            break;
        cm->after_s = m.v[K_AFTER];
        cm->below_cell_v = m.v[K_BELOW];
        cm->above_c = m.v[K_ABOVE];
        if (!m.next[0]) {
            cm->next = LW_CHAIN_NONE;
            break;
        }
        if (!strcmp(m.next, "off")) {
            cm->next = LW_CHAIN_OFF;
            break;
        }
        cm->next = (int)c->n;
        lw_text_copy(name, m.next, sizeof name);
    }
    if (st != LW_OK) {
        lw_chain_unref(c);
        return st;
    }
    out->light.chain = c;
    return LW_OK;
}
