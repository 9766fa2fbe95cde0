/*
 * cellfile.c - cell files and the cell search path (see cellfile.h).
 */
#include "lampwick/cellfile.h"
#include "lampwick/number.h"
#include "lampwick/path.h"
#include "lampwick/text.h"

#include <ctype.h>
#include <dirent.h>
#include <errno.h>
#include <math.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>
#include "lampwick/csvio.h"
#include "lampwick/alloc.h"

/* How far into a file lw_cellfile_is_cell looks for a [cell] section: a
 * cell file opens with it after a comment block, so a listing of a folder
 * need not read whole unrelated files. */
#define CELL_SECTION_LINES_MAX 2000

/* What a cell file holds besides the lw_cell itself. */
typedef struct cellspec {
    lw_cell cell;
    double max_capacity_ah; /* NAN until given: defaults to capacity */
    char curve[LW_PATH_MAX];
    char temperature[LW_PATH_MAX];
} cellspec;

#define CK(name_, type_, field_, scale_, min_, max_, flags_, def_, help_)                     \
    {"cell", name_, type_, offsetof(cellspec, field_), 0, scale_, min_, max_, flags_, NULL,   \
     def_, help_}

const lw_keydef lw_cellfile_keys[] = {
    {"cell", "name", LW_K_TEXT, offsetof(cellspec, cell.name), LW_NAME_MAX, 1, NAN, NAN,
     LW_KF_REQUIRED, NULL, "", "cell type name"},
    {"cell", "chemistry", LW_K_CHOICE, offsetof(cellspec, cell.chemistry), 0, 1, NAN, NAN,
     LW_KF_REQUIRED, lw_cell_chemistry_names, "", "electrochemical system"},
    CK("nominal_v", LW_K_NUM, cell.nominal_v, 1, 0, 100, LW_KF_REQUIRED | LW_KF_MIN_OPEN, "",
       "nameplate voltage, V"),
    CK("capacity_mah", LW_K_NUM, cell.capacity_ah, 1e-3, 0, 1e7, LW_KF_REQUIRED | LW_KF_MIN_OPEN,
       "", "capacity at rated_ma to cutoff_v at 20 C, mAh"),
    CK("rated_ma", LW_K_NUM, cell.rated_a, 1e-3, 0, 1e6, LW_KF_REQUIRED | LW_KF_MIN_OPEN, "",
       "discharge current of the capacity rating, mA"),
    CK("peukert", LW_K_NUM, cell.peukert, 1, 1, 2, 0, "1", "Peukert exponent, 1 to 2"),
    CK("max_capacity_mah", LW_K_NUM, max_capacity_ah, 1e-3, 0, 1e7, LW_KF_MIN_OPEN, "",
       "capacity at very low drain (cap on Peukert's law), mAh; default capacity_mah"),
    CK("cutoff_v", LW_K_NUM, cell.cutoff_v, 1, 0, 100, LW_KF_REQUIRED | LW_KF_MIN_OPEN, "",
       "end-point voltage, V"),
    {"cell", "rechargeable", LW_K_BOOL, offsetof(cellspec, cell.rechargeable), 0, 1, NAN, NAN,
     LW_KF_REQUIRED, NULL, "", "yes or no"},
    {"cell", "curve", LW_K_TEXT, offsetof(cellspec, curve), LW_PATH_MAX, 1, NAN, NAN,
     LW_KF_REQUIRED, NULL, "", "CSV depth_pct,open_circuit_v,resistance_ohm"},
    {"cell", "temperature", LW_K_TEXT, offsetof(cellspec, temperature), LW_PATH_MAX, 1, NAN,
     NAN, 0, NULL, "", "CSV temp_c,capacity_factor,resistance_factor"},
    CK("mass_g", LW_K_NUM, cell.mass_g, 1, 0, 1e6, 0, "0", "mass of one cell, g"),
    CK("self_discharge_pct_month", LW_K_NUM, cell.self_discharge_pct_month, 1, 0, 50, 0, "0",
       "charge lost per month in storage at 20 C, %"),
    {"cell", "rate_model", LW_K_CHOICE, offsetof(cellspec, cell.rate_model), 0, 1, NAN, NAN, 0,
     lw_cell_rate_model_names, "peukert",
     "how capacity depends on current and rest: peukert (Peukert's law, capped at "
     "max_capacity_mah) or kinetic (two wells that recover at rest; needs available_pct and "
     "recovery_per_h)"},
    CK("available_pct", LW_K_NUM, cell.kinetic_c, 1e-2, 0, 100, LW_KF_MIN_OPEN | LW_KF_MAX_OPEN,
       "", "kinetic model: the share of the charge in the available well, %"),
    CK("recovery_per_h", LW_K_NUM, cell.kinetic_k_per_h, 1, 0, 1e6, LW_KF_MIN_OPEN, "",
       "kinetic model: the rate constant k' of the exchange between the wells, 1/h"),
};
const size_t lw_cellfile_nkeys = sizeof lw_cellfile_keys / sizeof lw_cellfile_keys[0];

static const char *const curve_cols[] = {"depth_pct", "open_circuit_v", "resistance_ohm", NULL};
static const char *const temp_cols[] = {"temp_c", "capacity_factor", "resistance_factor", NULL};

static lw_status load_curve(const char *path, const lw_path_ref *ref, lw_cell *cell,
                            lw_error *err)
{
    lw_csv csv;
    lw_status st = lw_csv_read(path, ref, &csv, err);
    if (st != LW_OK)
        return st;
    st = lw_csv_expect(&csv, curve_cols, NULL, err);
    size_t n = csv.nrow;
    double *buf = st == LW_OK ? lw_malloc(3 * n * sizeof *buf) : NULL;
    if (!buf) {
        lw_csv_clear(&csv);
        return st != LW_OK ? st : lw_error_set(err, LW_ENOMEM, path, 0, "out of memory");
    }
    int cd = lw_csv_column(&csv, "depth_pct"), co = lw_csv_column(&csv, "open_circuit_v"),
        cr = lw_csv_column(&csv, "resistance_ohm");
    for (size_t i = 0; st == LW_OK && i < n; i++) {
        double d = lw_csv_at(&csv, i, cd), v = lw_csv_at(&csv, i, co), r = lw_csv_at(&csv, i, cr);
        int line = csv.line[i];
        if (i == 0 && d != 0.0)
            st = lw_error_set(err, LW_EINPUT, path, line,
                              "depth_pct must start at 0 (fresh cell), got %g", d);
        else if (i > 0 && !(d > buf[i - 1] * 100.0))
            st = lw_error_set(err, LW_EINPUT, path, line,
                              "depth_pct = %g does not increase (previous row %g): the curve "
                              "must be in order of depth",
                              d, buf[i - 1] * 100.0);
        else if (d > 100.0)
            st = lw_error_set(err, LW_EINPUT, path, line, "depth_pct = %g is above 100", d);
        else if (!(v > 0.0))
            st = lw_error_set(err, LW_EINPUT, path, line,
                              "open_circuit_v = %g: expected a positive voltage", v);
        else if (i > 0 && v > buf[n + i - 1])
            st = lw_error_set(err, LW_EINPUT, path, line,
                              "open_circuit_v = %g rises with depth (previous row %g): expected "
                              "a non-increasing curve",
                              v, buf[n + i - 1]);
        else if (!(r > 0.0))
            st = lw_error_set(err, LW_EINPUT, path, line,
                              "resistance_ohm = %g: expected a positive resistance", r);
        if (st == LW_OK) {
            buf[i] = d / 100.0;
            buf[n + i] = v;
            buf[2 * n + i] = r;
        }
    }
    if (st == LW_OK && buf[n - 1] != 1.0)
        st = lw_error_set(err, LW_EINPUT, path, csv.line[n - 1],
                          "depth_pct must end at 100 (fully discharged), got %g",
                          buf[n - 1] * 100.0);
    if (st == LW_OK) {
        cell->ocv = lw_interp_new(buf, buf + n, n, err);
        cell->res = cell->ocv ? lw_interp_new(buf, buf + 2 * n, n, err) : NULL;
        if (!cell->res)
            st = err && err->code ? err->code : LW_ENOMEM;
    }
    free(buf);
    lw_csv_clear(&csv);
    return st;
}

static lw_status load_temperature(const char *path, const lw_path_ref *ref, lw_cell *cell,
                                  lw_error *err)
{
    lw_csv csv;
    lw_status st = lw_csv_read(path, ref, &csv, err);
    if (st != LW_OK)
        return st;
    st = lw_csv_expect(&csv, temp_cols, NULL, err);
    size_t n = csv.nrow;
    double *buf = st == LW_OK ? lw_malloc(3 * n * sizeof *buf) : NULL;
    if (!buf) {
        lw_csv_clear(&csv);
        return st != LW_OK ? st : lw_error_set(err, LW_ENOMEM, path, 0, "out of memory");
    }
    int ct = lw_csv_column(&csv, "temp_c"), cc = lw_csv_column(&csv, "capacity_factor"),
        cr = lw_csv_column(&csv, "resistance_factor");
    for (size_t i = 0; st == LW_OK && i < n; i++) {
        double t = lw_csv_at(&csv, i, ct), c = lw_csv_at(&csv, i, cc), r = lw_csv_at(&csv, i, cr);
        if (i > 0 && !(t > buf[i - 1]))
            st = lw_error_set(err, LW_EINPUT, path, csv.line[i],
                              "temp_c = %g does not increase (previous row %g)", t, buf[i - 1]);
        else if (t < -80.0 || t > 150.0)
            st = lw_error_set(err, LW_EINPUT, path, csv.line[i],
                              "temp_c = %g: expected -80 to 150", t);
        else if (!(c > 0.0 && c <= 2.0))
            st = lw_error_set(err, LW_EINPUT, path, csv.line[i],
                              "capacity_factor = %g: expected > 0 and <= 2", c);
        else if (!(r > 0.0 && r <= 100.0))
            st = lw_error_set(err, LW_EINPUT, path, csv.line[i],
                              "resistance_factor = %g: expected > 0 and <= 100", r);
        if (st == LW_OK) {
            buf[i] = t;
            buf[n + i] = c;
            buf[2 * n + i] = r;
        }
    }
    if (st == LW_OK && n < 2)
        st = lw_error_set(err, LW_EINPUT, path, csv.line[0],
                          "a temperature table needs at least 2 rows");
    if (st == LW_OK) {
        cell->temp_capacity = lw_interp_new(buf, buf + n, n, err);
        cell->temp_resistance =
            cell->temp_capacity ? lw_interp_new(buf, buf + 2 * n, n, err) : NULL;
        if (!cell->temp_resistance)
            st = err && err->code ? err->code : LW_ENOMEM;
    }
    free(buf);
    lw_csv_clear(&csv);
    return st;
}

static lw_status apply_cell_entries(const lw_ini *ini, cellspec *spec, bool *given,
                                    lw_error *err)
{
    for (size_t i = 0; i < ini->n; i++) {
        const lw_ini_entry *e = &ini->entries[i];
        const lw_keydef *d = lw_key_find(lw_cellfile_keys, lw_cellfile_nkeys, e->section, e->key);
        if (!d)
            return lw_key_unknown(lw_cellfile_keys, lw_cellfile_nkeys, e->section, e->key,
                                  ini->path, e->line, err);
        lw_status st = lw_key_apply(d, spec, e->value, ini->path, e->line, err);
        if (st != LW_OK)
            return st;
        given[d - lw_cellfile_keys] = true;
    }
    return LW_OK;
}

static lw_status check_cell(const lw_ini *ini, cellspec *spec, const bool *given,
                            lw_error *err)
{
    int sec = lw_ini_section_line(ini, "cell");
    for (size_t k = 0; k < lw_cellfile_nkeys; k++)
        if ((lw_cellfile_keys[k].flags & LW_KF_REQUIRED) && !given[k])
            return lw_error_set(err, LW_EINPUT, ini->path, sec ? sec : 1,
                                "[cell] is missing the key '%s' (%s)", lw_cellfile_keys[k].name,
                                lw_cellfile_keys[k].help);
    lw_cell *c = &spec->cell;
    c->max_capacity_ah = isnan(spec->max_capacity_ah) ? c->capacity_ah : spec->max_capacity_ah;
    if (c->max_capacity_ah < c->capacity_ah) {
        return lw_error_set(err, LW_EINPUT, ini->path,
                            lw_ini_key_line(ini, "cell", "max_capacity_mah"),
                            "max_capacity_mah (%g) is below capacity_mah (%g): the low-drain "
                            "capacity cannot be smaller than the rated one",
                            c->max_capacity_ah * 1e3, c->capacity_ah * 1e3);
    }
    if (c->rate_model == LW_RATE_KINETIC) {
        const char *missing = isnan(c->kinetic_c) ? "available_pct"
                              : isnan(c->kinetic_k_per_h) ? "recovery_per_h"
                                                          : NULL;
        if (missing)
            return lw_error_set(err, LW_EINPUT, ini->path,
                                lw_ini_key_line(ini, "cell", "rate_model"),
                                "rate_model = kinetic needs '%s' (the kinetic model's %s)",
                                missing,
                                missing[0] == 'a' ? "available well's share, %"
                                                  : "rate constant k', 1/h");
    }
    return LW_OK;
}

/* Each key as the file is read must be a cell-file key. */
/* Judged as the file is read (ctx: the key that named the file, or NULL):
 * a file whose first section is not [cell] is not a cell file (a light
 * profile named by mistake), said at once with the key that named it. */
static lw_status cell_check(const void *ctx, const char *section, const char *key, const char *file,
                            int line, lw_error *err)
{
    const lw_path_ref *ref = ctx;
    if (!key && strcmp(section, "cell") != 0) {
        if (ref)
            return lw_error_set(err, LW_EINPUT, ref->file, ref->line,
                                "%s: '%s' is not a cell file (it has no [cell] section)",
                                ref->what, file);
        return lw_error_set(err, LW_EINPUT, file, line,
                            "not a cell file: [%s] where a cell file has [cell]", section);
    }
    if (!key || lw_key_find(lw_cellfile_keys, lw_cellfile_nkeys, section, key))
        return LW_OK;
    return lw_key_unknown(lw_cellfile_keys, lw_cellfile_nkeys, section, key, file, line, err);
}

lw_status lw_cellfile_load(const char *path, lw_cell *cell, lw_error *err)
{
    return lw_cellfile_load_named(path, NULL, cell, err);
}

lw_status lw_cellfile_load_named(const char *path, const lw_path_ref *ref, lw_cell *cell,
                                 lw_error *err)
{
    memset(cell, 0, sizeof *cell);
    lw_ini ini;
    lw_status st = lw_ini_read(path, &ini, cell_check, ref, err);
    if (st != LW_OK)
        return st;
    cellspec spec;
    memset(&spec, 0, sizeof spec);
    spec.max_capacity_ah = NAN;
    spec.cell.kinetic_c = spec.cell.kinetic_k_per_h = NAN;
    bool given[sizeof lw_cellfile_keys / sizeof lw_cellfile_keys[0]] = {false};
    st = lw_key_defaults(lw_cellfile_keys, lw_cellfile_nkeys, &spec, err);
    if (st == LW_OK)
        st = apply_cell_entries(&ini, &spec, given, err);
    if (st == LW_OK)
        st = check_cell(&ini, &spec, given, err);
    char dir[LW_PATH_MAX], file[LW_PATH_MAX];
    lw_path_dir(dir, sizeof dir, path);
    if (st == LW_OK && !lw_path_join(file, sizeof file, dir, spec.curve))
        st = lw_error_set(err, LW_EINPUT, path, lw_ini_key_line(&ini, "cell", "curve"),
                          "[cell] curve: the path is too long (at most %d bytes)",
                          LW_PATH_MAX - 1);
    if (st == LW_OK) {
        lw_path_ref by = {path, lw_ini_key_line(&ini, "cell", "curve"), "[cell] curve"};
        st = load_curve(file, &by, &spec.cell, err);
        lw_text_copy(spec.cell.curve_path, file, sizeof spec.cell.curve_path);
    }
    if (st == LW_OK && spec.temperature[0] &&
        !lw_path_join(file, sizeof file, dir, spec.temperature))
        st = lw_error_set(err, LW_EINPUT, path, lw_ini_key_line(&ini, "cell", "temperature"),
                          "[cell] temperature: the path is too long (at most %d bytes)",
                          LW_PATH_MAX - 1);
    if (st == LW_OK && spec.temperature[0]) {
        lw_path_ref by = {path, lw_ini_key_line(&ini, "cell", "temperature"),
                          "[cell] temperature"};
        st = load_temperature(file, &by, &spec.cell, err);
        lw_text_copy(spec.cell.temperature_path, file, sizeof spec.cell.temperature_path);
    }
    if (st == LW_OK && !(spec.cell.cutoff_v < spec.cell.ocv->y[0])) {
        st = lw_error_set(err, LW_EINPUT, path, lw_ini_key_line(&ini, "cell", "cutoff_v"),
                          "cutoff_v = %g is not below the fresh open-circuit voltage %g",
                          spec.cell.cutoff_v, spec.cell.ocv->y[0]);
    }
    lw_ini_clear(&ini);
    if (st != LW_OK) {
        lw_cell_clear(&spec.cell);
        return st;
    }
    lw_text_copy(spec.cell.path, path, sizeof spec.cell.path);
    *cell = spec.cell;
    return LW_OK;
}

static bool is_file(const char *path)
{
    struct stat sb;
    return stat(path, &sb) == 0 && S_ISREG(sb.st_mode);
}

lw_status lw_cellfile_find(const char *ref, const char *base_dir, const lw_search *search,
                       char *path, size_t size, lw_error *err)
{
    size_t len = strlen(ref);
    bool is_path = strchr(ref, '/') || (len > 4 && !strcmp(ref + len - 4, ".ini"));
    char cand[LW_PATH_MAX], name[LW_PATH_MAX];
    if (is_path) {
        if (!lw_path_join(cand, sizeof cand, base_dir, ref))
            return lw_error_set(err, LW_EINPUT, NULL, 0, "the cell path is too long");
        if (!is_file(cand))
            return lw_error_set(err, LW_EINPUT, NULL, 0, "cell file '%s' not found", cand);
        lw_text_copy(path, cand, size);
        return LW_OK;
    }
    snprintf(name, sizeof name, "%s.ini", ref);
    if (lw_path_join(cand, sizeof cand, base_dir, name) && is_file(cand)) {
        lw_text_copy(path, cand, size);
        return LW_OK;
    }
    char tried[1024];
    snprintf(tried, sizeof tried, "%s", base_dir);
    for (size_t i = 0; search && i < search->n; i++) {
        if (lw_path_join(cand, sizeof cand, search->dirs[i], name) && is_file(cand)) {
            lw_text_copy(path, cand, size);
            return LW_OK;
        }
        strncat(tried, ", ", sizeof tried - strlen(tried) - 1);
        strncat(tried, search->dirs[i], sizeof tried - strlen(tried) - 1);
    }
    return lw_error_set(err, LW_EINPUT, NULL, 0,
                        "no cell named '%s' (looked for %s in: %s; see 'lampwick cells')", ref,
                        name, tried);
}

static int cmp_str(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

void lw_cellfile_list_clear(lw_cellfile_list *l)
{
    if (!l)
        return;
    for (size_t i = 0; i < l->n; i++) {
        free(l->names[i]);
        free(l->paths[i]);
    }
    for (size_t i = 0; i < l->nskipped; i++)
        free(l->skipped[i]);
    free(l->names);
    free(l->paths);
    free(l->skipped);
    memset(l, 0, sizeof *l);
}

bool lw_cellfile_is_cell(const char *path)
{
    FILE *fp;
    lw_error ignore;
    lw_error_clear(&ignore);
    if (lw_path_open_regular(path, "r", NULL, &fp, &ignore) != LW_OK)
        return true; /* unreadable: listed, and loading it says why */
    char line[LW_INI_LINE_MAX + 2];
    bool found = false;
    for (int k = 0; k < CELL_SECTION_LINES_MAX && !found && fgets(line, sizeof line, fp); k++) {
        const char *p = line;
        while (*p == ' ' || *p == '\t')
            p++;
        found = !strncmp(p, "[cell]", 6);
    }
    fclose(fp);
    return found;
}

/* Append a copy of text to a growing array. */
static bool push_str(char ***arr, size_t n, const char *text)
{
    char **a = lw_realloc(*arr, (n + 1) * sizeof *a);
    if (!a)
        return false;
    *arr = a;
    a[n] = lw_strdup(text);
    return a[n] != NULL; /* a[n] is not counted on failure: nothing to free */
}

lw_status lw_cellfile_list_read(const lw_search *search, lw_cellfile_list *l, lw_error *err)
{
    memset(l, 0, sizeof *l);
    for (size_t i = 0; i < search->n; i++) {
        DIR *dir = opendir(search->dirs[i]);
        if (!dir)
            continue;
        size_t first = l->n;
        struct dirent *de;
        bool oom = false;
        while (!oom && (de = readdir(dir)) != NULL) {
            size_t len = strlen(de->d_name);
            if (len <= 4 || strcmp(de->d_name + len - 4, ".ini") != 0 || de->d_name[0] == '.')
                continue;
            char name[LW_PATH_MAX], full[LW_PATH_MAX];
            snprintf(name, sizeof name, "%.*s", (int)(len - 4), de->d_name);
            if (!lw_path_join(full, sizeof full, search->dirs[i], de->d_name))
                continue; /* too long to be opened by name: not listed */
            bool dup = false;
            for (size_t k = 0; k < l->n && !dup; k++)
                dup = !strcmp(l->names[k], name);
            if (dup)
                continue;
            if (!lw_cellfile_is_cell(full)) {
                oom = !push_str(&l->skipped, l->nskipped, full);
                l->nskipped += !oom;
                continue;
            }
            oom = !push_str(&l->names, l->n, name);
            if (!oom && !push_str(&l->paths, l->n, full)) {
                free(l->names[l->n]);
                oom = true;
            }
            if (!oom)
                l->n++;
        }
        closedir(dir);
        if (oom) {
            lw_cellfile_list_clear(l);
            return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
        }
        /* sort this folder's names, keeping paths alongside */
        for (size_t a = first + 1; a < l->n; a++)
            for (size_t b = a; b > first && cmp_str(&l->names[b - 1], &l->names[b]) > 0; b--) {
                char *t = l->names[b];
                l->names[b] = l->names[b - 1];
                l->names[b - 1] = t;
                t = l->paths[b];
                l->paths[b] = l->paths[b - 1];
                l->paths[b - 1] = t;
            }
    }
    return LW_OK;
}

/* Can text be written as an INI value and read back as exactly itself?
 * Not empty, at most max bytes, valid UTF-8, no control character, no
 * leading or trailing blank (the reader trims them), no ';' or '#' (comment
 * starts) and no '[' or '=' (a line that could read as a section or key). */
static bool ini_value_ok(const char *text, size_t max, const char **why)
{
    size_t n = strlen(text);
    *why = NULL;
    if (n == 0)
        *why = "is empty";
    else if (n > max)
        *why = "is too long";
    else if (!lw_text_utf8_valid(text, n, NULL))
        *why = "is not valid UTF-8";
    else if (isspace((unsigned char)text[0]) || isspace((unsigned char)text[n - 1]))
        *why = "starts or ends with a blank";
    for (size_t i = 0; i < n && !*why; i++) {
        unsigned char c = (unsigned char)text[i];
        if (c < 0x20 || c == 0x7F)
            *why = "holds a control character";
        else if (c == ';' || c == '#' || c == '[' || c == ']' || c == '=')
            *why = "holds one of ; # [ ] =";
    }
    return *why == NULL;
}

/* The curve named by an existing cell file, if it is one this function
 * wrote (BASE.curve-XXXXXXXX.csv beside it): replaced on success. */
static void previous_curve(const char *ini_path, const char *base, char *out, size_t size)
{
    out[0] = '\0';
    lw_ini old;
    lw_error ignore;
    lw_error_clear(&ignore);
    if (access(ini_path, F_OK) != 0 || lw_ini_read(ini_path, &old, NULL, NULL, &ignore) != LW_OK)
        return;
    for (size_t i = 0; i < old.n; i++) {
        const char *v = old.entries[i].value;
        size_t lb = strlen(base);
        if (!strcmp(old.entries[i].key, "curve") && !strncmp(v, base, lb) &&
            !strncmp(v + lb, ".curve-", 7) && strlen(v) == lb + 7 + 8 + 4 &&
            !strcmp(v + lb + 15, ".csv")) {
            char dir[LW_PATH_MAX];
            lw_path_dir(dir, sizeof dir, ini_path);
            if (!lw_path_join(out, size, dir, v))
                out[0] = '\0';
        }
    }
    lw_ini_clear(&old);
}

static lw_status write_curve(FILE *fp, const void *ctx, lw_error *err)
{
    const lw_cell *cell = ctx;
    lw_csvw w;
    lw_csvw_init(&w, fp);
    lw_csvw_text(&w, "depth_pct");
    lw_csvw_text(&w, "open_circuit_v");
    lw_csvw_text(&w, "resistance_ohm");
    lw_csvw_end_row(&w);
    for (size_t i = 0; i < cell->ocv->n; i++) {
        lw_csvw_num(&w, 100.0 * cell->ocv->x[i]);
        lw_csvw_num(&w, cell->ocv->y[i]);
        lw_csvw_num(&w, cell->res->y[i]);
        lw_csvw_end_row(&w);
    }
    return w.failed ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
}

typedef struct {
    const lw_cell *cell;
    const char *comment;
    const char *curve_name;
} cell_text;

static lw_status write_cell_text(FILE *fp, const void *ctx, lw_error *err)
{
    const cell_text *t = ctx;
    const lw_cell *cell = t->cell;
    for (const char *p = t->comment; p && *p;) {
        const char *nl = strchr(p, '\n');
        size_t n = nl ? (size_t)(nl - p) : strlen(p);
        /* escaped to at most 180 bytes, cut only between whole characters
         * and escapes (a cut inside a UTF-8 sequence would not read back) */
        char line[LW_INI_LINE_MAX], safe[181];
        snprintf(line, sizeof line, "%.*s", (int)(n < 150 ? n : 150), p);
        lw_text_escape(safe, sizeof safe, line);
        fprintf(fp, "; %s\n", safe);
        p += n + (nl ? 1 : 0);
    }
    fprintf(fp, "[cell]\nname = %s\nchemistry = %s\nnominal_v = %.17g\ncapacity_mah = %.17g\n"
                "rated_ma = %.17g\npeukert = %.17g\nmax_capacity_mah = %.17g\ncutoff_v = %.17g\n"
                "rechargeable = %s\n",
            cell->name, lw_cell_chemistry_names[cell->chemistry], cell->nominal_v,
            cell->capacity_ah * 1e3, cell->rated_a * 1e3, cell->peukert,
            cell->max_capacity_ah * 1e3, cell->cutoff_v, cell->rechargeable ? "yes" : "no");
    if (cell->mass_g > 0)
        fprintf(fp, "mass_g = %.17g\n", cell->mass_g);
    if (cell->self_discharge_pct_month > 0)
        fprintf(fp, "self_discharge_pct_month = %.17g\n", cell->self_discharge_pct_month);
    if (cell->rate_model != LW_RATE_PEUKERT)
        fprintf(fp, "rate_model = %s\n", lw_cell_rate_model_names[cell->rate_model]);
    if (!isnan(cell->kinetic_c) && cell->kinetic_c > 0)
        fprintf(fp, "available_pct = %.17g\n", 100.0 * cell->kinetic_c);
    if (!isnan(cell->kinetic_k_per_h) && cell->kinetic_k_per_h > 0)
        fprintf(fp, "recovery_per_h = %.17g\n", cell->kinetic_k_per_h);
    fprintf(fp, "curve = %s\n", t->curve_name);
    return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
}

static lw_status lw_cellfile_save_in_c_locale(const char *ini_path, const lw_cell *cell,
                                              const char *comment, lw_error *err)
{
    size_t len = strlen(ini_path);
    const char *why;
    if (len < 5 || strcmp(ini_path + len - 4, ".ini") != 0)
        return lw_error_set(err, LW_EINPUT, ini_path, 0, "a cell file name must end in .ini");
    if (!ini_value_ok(cell->name, LW_NAME_MAX - 1, &why))
        return lw_error_set(err, LW_EINPUT, ini_path, 0,
                            "the cell name %s: it could not be read back as written", why);
    /* the curve: BASE.curve-XXXXXXXX.csv, a new name every time, so that the
     * old cell file never points at a new curve */
    const char *slash = strrchr(ini_path, '/');
    const char *base_start = slash ? slash + 1 : ini_path;
    char base[LW_PATH_MAX], curve_path[LW_PATH_MAX], curve_name[LW_PATH_MAX];
    snprintf(base, sizeof base, "%.*s", (int)(len - 4 - (size_t)(base_start - ini_path)),
             base_start);
    if (strlen(base) > 400)
        return lw_error_set(err, LW_EINPUT, ini_path, 0,
                            "the cell file's name is longer than 400 bytes");
    unsigned seed = (unsigned)getpid() * 2654435761u ^ (unsigned)time(NULL);
    bool named = false;
    for (int attempt = 0; attempt < 16 && !named; attempt++) {
        seed = seed * 1103515245u + 12345u;
        if ((size_t)snprintf(curve_name, sizeof curve_name, "%.400s.curve-%08x.csv", base,
                             seed) >= sizeof curve_name)
            return lw_error_set(err, LW_EINPUT, ini_path, 0, "the path is too long");
        if (!ini_value_ok(curve_name, LW_INI_LINE_MAX - 16, &why))
            return lw_error_set(err, LW_EINPUT, ini_path, 0,
                                "the curve's file name %s (from the cell file's name)", why);
        if ((size_t)snprintf(curve_path, sizeof curve_path, "%.*s%s",
                             (int)(base_start - ini_path), ini_path,
                             curve_name) >= sizeof curve_path)
            return lw_error_set(err, LW_EINPUT, ini_path, 0, "the path is too long");
        named = access(curve_path, F_OK) != 0; /* else taken: another name */
    }
    if (!named)
        return lw_error_set(err, LW_EIO, ini_path, 0, "no free name for the curve file");
    char old_curve[LW_PATH_MAX];
    previous_curve(ini_path, base, old_curve, sizeof old_curve);
    /* 1: the curve under its new name, removed again by a signal until the
     * cell file naming it is in place; the old pair is untouched */
    int guard = lw_outfile_guard(curve_path);
    lw_status st = lw_outfile_write_durable(curve_path, -1, write_curve, cell, err);
    if (st != LW_OK) {
        lw_outfile_unguard(guard);
        return st;
    }
    /* 2: the cell file naming the new curve, renamed last; the guard is
     * released in the same step as that rename */
    cell_text text = {cell, comment, curve_name};
    st = lw_outfile_write_durable(ini_path, guard, write_cell_text, &text, err);
    if (st != LW_OK) {
        unlink(curve_path);
        lw_outfile_unguard(guard);
        return st;
    }
    /* 3: the curve the old cell file named, no longer used */
    if (old_curve[0] && strcmp(old_curve, curve_path) != 0)
        unlink(old_curve);
    return LW_OK;
}

lw_status lw_cellfile_save(const char *ini_path, const lw_cell *cell, const char *comment,
                       lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_cellfile_save_in_c_locale(ini_path, cell, comment, err);
    lw_number_locale_end(saved);
    return result;
}
