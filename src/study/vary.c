/*
 * vary.c - parsing --vary KEY=VALUES into the values of one key (see
 * vary.h).
 */
#include "lampwick/vary.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"
#include "lampwick/eseries.h"
#include "lampwick/number.h"
#include "lampwick/text.h"

const char *const lw_vary_forms =
    "a list (22,33,47; 2.2k, 4k7, 1M accepted), a range (1..4 or 1..4:0.5), a preferred-value "
    "range (E24:10..1k), or for pack.cell cell names or 'all' (the cell library), for mode "
    "mode names or 'all'";

static lw_status vary_error(const char *arg, const char *why, lw_error *err)
{
    return lw_error_set(err, LW_EINPUT, "--vary", 0, "'%s': %s; VALUES may be %s", arg, why,
                        lw_vary_forms);
}

static lw_status push(lw_vary *v, size_t *cap, const char *text, lw_error *err)
{
    if (v->n == LW_VARY_MAX_VALUES)
        return lw_error_set(err, LW_EINPUT, "--vary", 0, "%s: more than %d values", v->key,
                            LW_VARY_MAX_VALUES);
    if (v->n == *cap) {
        size_t nc = *cap ? 2 * *cap : 16;
        void *p = lw_realloc(v->values, nc * sizeof *v->values);
        if (!p)
            return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
        v->values = p;
        *cap = nc;
    }
    lw_text_copy(v->values[v->n++], text, LW_VARY_VALUE_MAX);
    return LW_OK;
}

static lw_status push_num(lw_vary *v, size_t *cap, double x, lw_error *err)
{
    char buf[64];
    snprintf(buf, sizeof buf, "%.10g", x);
    return push(v, cap, buf, err);
}

/* A number as in a value list: plain (negative allowed) or with an SI prefix
 * or resistor code. */
static bool parse_num(const char *s, double *out)
{
    return lw_number_parse(s, out);
}

/* "FROM..TO[:STEP]"; *step points at STEP or is NULL. */
static bool parse_span(const char *s, double *lo, double *hi, const char **step)
{
    const char *dots = strstr(s, "..");
    if (!dots)
        return false;
    char a[64], b[64];
    size_t la = (size_t)(dots - s);
    const char *colon = strchr(dots + 2, ':');
    size_t lb = colon ? (size_t)(colon - dots - 2) : strlen(dots + 2);
    if (la == 0 || la >= sizeof a || lb == 0 || lb >= sizeof b)
        return false;
    memcpy(a, s, la);
    a[la] = '\0';
    memcpy(b, dots + 2, lb);
    b[lb] = '\0';
    *step = colon ? colon + 1 : NULL;
    return parse_num(a, lo) && parse_num(b, hi);
}

static lw_status parse_values(const char *arg, const char *vals, bool numeric, const char *dir,
                              const lw_search *search, lw_vary *v, lw_error *err)
{
    size_t cap = 0;
    int series;
    const char *colon = strchr(vals, ':');
    if (colon && colon - vals < 8) {
        char name[8];
        memcpy(name, vals, (size_t)(colon - vals));
        name[colon - vals] = '\0';
        if (lw_eseries_parse(name, &series)) {
            double lo, hi;
            const char *step;
            if (!parse_span(colon + 1, &lo, &hi, &step) || step || !(lo > 0) || hi < lo)
                return vary_error(
                    arg, "a preferred-value range is E24:FROM..TO with 0 < FROM <= TO", err);
            double buf[LW_VARY_ESERIES_MAX];
            size_t k = lw_eseries_range(series, lo, hi, buf, LW_VARY_ESERIES_MAX);
            if (k == 0 || k > LW_VARY_ESERIES_MAX)
                return vary_error(arg, "the range holds no values of the series (or too many)",
                                  err);
            for (size_t i = 0; i < k; i++) {
                lw_status st = push_num(v, &cap, buf[i], err);
                if (st != LW_OK)
                    return st;
            }
            return LW_OK;
        }
    }
    if (numeric && strstr(vals, "..")) { /* (a path like ../cells/x.ini is a text) */
        double lo, hi, step = 1.0;
        const char *stext;
        if (!parse_span(vals, &lo, &hi, &stext) || hi < lo)
            return vary_error(arg, "a range is FROM..TO or FROM..TO:STEP with FROM <= TO", err);
        if (stext && (!parse_num(stext, &step) || !(step > 0)))
            return vary_error(arg, "the step of a range must be a positive number", err);
        double count = floor((hi - lo) / step * (1 + 1e-12) + 1e-9) + 1;
        if (count > LW_VARY_MAX_VALUES)
            return vary_error(arg, "the range has too many values", err);
        for (size_t i = 0; i < (size_t)count; i++) {
            lw_status st = push_num(v, &cap, lo + step * (double)i, err);
            if (st != LW_OK)
                return st;
        }
        return LW_OK;
    }
    if (!strcmp(vals, "all")) {
        if (strcmp(v->key, "pack.cell") != 0)
            return vary_error(arg, "'all' is for pack.cell", err);
        /* the profile's folder first, as a cell name is looked up */
        lw_search s;
        memset(&s, 0, sizeof s);
        if (dir)
            lw_search_add(&s, dir);
        for (size_t i = 0; search && i < search->n; i++)
            lw_search_add(&s, search->dirs[i]);
        lw_cellfile_list list;
        lw_status st = lw_cellfile_list_read(&s, &list, err);
        for (size_t i = 0; st == LW_OK && i < list.n; i++)
            st = push(v, &cap, list.names[i], err);
        if (st == LW_OK && list.nskipped) {
            snprintf(v->note, sizeof v->note, "skipped %zu %s (no [cell] section): ",
                     list.nskipped,
                     list.nskipped == 1 ? "file that is not a cell file"
                                        : "files that are not cell files");
            for (size_t i = 0; i < list.nskipped; i++) {
                strncat(v->note, i ? ", " : "", sizeof v->note - strlen(v->note) - 1);
                strncat(v->note, list.skipped[i], sizeof v->note - strlen(v->note) - 1);
            }
        }
        lw_cellfile_list_clear(&list);
        if (st == LW_OK && v->n == 0)
            return vary_error(arg, "no cell files found", err);
        return st;
    }
    /* a list */
    const char *p = vals;
    while (true) {
        const char *comma = strchr(p, ',');
        size_t len = comma ? (size_t)(comma - p) : strlen(p);
        char item[LW_VARY_VALUE_MAX];
        if (len == 0 || len >= sizeof item)
            return vary_error(arg, "empty or over-long item in the list", err);
        memcpy(item, p, len);
        item[len] = '\0';
        lw_status st;
        double x;
        if (numeric) {
            if (!parse_num(item, &x))
                return vary_error(arg, "not a number in the list", err);
            st = push_num(v, &cap, x, err);
        } else {
            st = push(v, &cap, item, err);
        }
        if (st != LW_OK)
            return st;
        if (!comma)
            break;
        p = comma + 1;
    }
    return LW_OK;
}

static lw_status parse_modes(const char *arg, const char *vals, const lw_profile *prof,
                             lw_vary *v, lw_error *err)
{
    size_t cap = 0, nm = prof ? lw_profile_mode_count(prof) : 0;
    if (nm == 0)
        return vary_error(arg, "the profile has no [mode NAME] sections", err);
    if (!strcmp(vals, "all")) {
        for (size_t i = 0; i < nm; i++) {
            lw_status st = push(v, &cap, lw_profile_mode_name(prof, i), err);
            if (st != LW_OK)
                return st;
        }
        return LW_OK;
    }
    lw_status st = parse_values(arg, vals, false, NULL, NULL, v, err);
    for (size_t k = 0; st == LW_OK && k < v->n; k++) {
        bool found = false;
        for (size_t i = 0; i < nm && !found; i++)
            found = !strcmp(v->values[k], lw_profile_mode_name(prof, i));
        if (!found)
            st = lw_error_set(err, LW_EINPUT, "--vary", 0, "'%s': the profile has no [mode %s]",
                              arg, v->values[k]);
    }
    return st;
}

static lw_status lw_vary_parse_in_c_locale(const char *arg, const lw_profile *prof, lw_vary *v,
                                           lw_error *err)
{
    memset(v, 0, sizeof *v);
    const char *eq = strchr(arg, '=');
    if (!eq || eq == arg || !eq[1])
        return vary_error(arg, "expected KEY=VALUES", err);
    size_t klen = (size_t)(eq - arg);
    if (klen >= sizeof v->key)
        return vary_error(arg, "key too long", err);
    memcpy(v->key, arg, klen);
    v->key[klen] = '\0';
    lw_status st;
    if (!strcmp(v->key, "mode")) {
        st = parse_modes(arg, eq + 1, prof, v, err);
    } else {
        char section[LW_INI_NAME_MAX], key[LW_INI_NAME_MAX];
        const char *dot = strchr(v->key, '.');
        if (!dot || (size_t)(dot - v->key) >= sizeof section || strlen(dot + 1) >= sizeof key)
            return vary_error(arg,
                              "the key is written section.key (e.g. drive.resistor_ohm) or mode",
                              err);
        memcpy(section, v->key, (size_t)(dot - v->key));
        section[dot - v->key] = '\0';
        lw_text_copy(key, dot + 1, sizeof key);
        const lw_keydef *d = lw_key_find(lw_profile_keys, lw_profile_nkeys, section, key);
        if (!d)
            return lw_key_unknown(lw_profile_keys, lw_profile_nkeys, section, key, "--vary", 0,
                                  err);
        bool numeric = d->type == LW_K_NUM || d->type == LW_K_INT;
        st = parse_values(arg, eq + 1, numeric, prof ? prof->dir : NULL,
                          prof ? &prof->search : NULL, v, err);
        for (size_t i = 0; st == LW_OK && d->type == LW_K_CHOICE && i < v->n; i++) {
            bool known = false;
            for (size_t c = 0; d->choices[c] && !known; c++)
                known = !strcmp(d->choices[c], v->values[i]);
            if (!known) {
                char why[256] = "not one of the values of the key: ";
                for (size_t c = 0; d->choices[c]; c++) {
                    strncat(why, c ? ", " : "", sizeof why - strlen(why) - 1);
                    strncat(why, d->choices[c], sizeof why - strlen(why) - 1);
                }
                st = vary_error(arg, why, err);
            }
        }
    }
    if (st != LW_OK)
        lw_vary_clear(v);
    return st;
}

void lw_vary_clear(lw_vary *v)
{
    if (!v)
        return;
    free(v->values);
    v->values = NULL;
    v->n = 0;
}

lw_status lw_vary_parse(const char *arg, const lw_profile *prof, lw_vary *v, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_vary_parse_in_c_locale(arg, prof, v, err);
    lw_number_locale_end(saved);
    return result;
}
