/*
 * rtable.c - tables of text cells rendered as aligned text, RFC 4180 CSV or
 * Markdown (see rtable.h).
 */
#include "lampwick/rtable.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include "lampwick/alloc.h"
#include "lampwick/csvio.h"
#include "lampwick/number.h"
#include "lampwick/text.h"
#include "jsontable.h"

bool lw_rtable_format_parse(const char *s, lw_rtable_format *fmt)
{
    if (!strcmp(s, "text"))
        *fmt = LW_FMT_TEXT;
    else if (!strcmp(s, "csv"))
        *fmt = LW_FMT_CSV;
    else if (!strcmp(s, "md"))
        *fmt = LW_FMT_MD;
    else if (!strcmp(s, "json"))
        *fmt = LW_FMT_JSON;
    else
        return false;
    return true;
}

bool lw_rtable_for_people(lw_rtable_format fmt)
{
    return fmt == LW_FMT_TEXT || fmt == LW_FMT_HTML;
}

lw_rtable *lw_rtable_new(size_t ncol, lw_error *err)
{
    lw_rtable *t = lw_calloc(1, sizeof *t);
    if (t) {
        t->head = lw_calloc(ncol ? ncol : 1, sizeof *t->head);
        t->group = lw_calloc(ncol ? ncol : 1, sizeof *t->group);
    }
    if (!t || !t->head || !t->group) {
        if (t) {
            free(t->head);
            free(t->group);
        }
        free(t);
        lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
        return NULL;
    }
    t->ncol = ncol;
    return t;
}

void lw_rtable_free(lw_rtable *t)
{
    if (!t)
        return;
    for (size_t i = 0; i < t->ncol; i++) {
        free(t->head[i]);
        free(t->group[i]);
    }
    free(t->group);
    for (size_t i = 0; t->cell && i < t->nrow * t->ncol; i++) {
        free(t->cell[i]);
        free(t->full[i]);
    }
    free(t->full);
    for (size_t i = 0; i < t->nnotes; i++)
        free(t->notes[i]);
    free(t->head);
    free(t->cell);
    free(t->notes);
    free(t->title);
    free(t->arena);
    free(t->off);
    free(t);
}

lw_status lw_rtable_add_packed(lw_rtable *t, const char *packed, size_t len, lw_error *err)
{
    if (t->nrow == t->cap) {
        size_t cap = t->cap ? 2 * t->cap : 64;
        size_t *o = lw_realloc(t->off, cap * t->ncol * sizeof *o);
        if (!o)
            return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
        t->off = o;
        t->cap = cap;
    }
    if (t->arena_len + len > t->arena_cap) {
        size_t cap = t->arena_cap ? 2 * t->arena_cap : 4096;
        while (cap < t->arena_len + len)
            cap *= 2;
        char *a = lw_realloc(t->arena, cap);
        if (!a)
            return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
        t->arena = a;
        t->arena_cap = cap;
    }
    memcpy(t->arena + t->arena_len, packed, len);
    size_t at = t->arena_len, *row = t->off + t->nrow * t->ncol;
    for (size_t c = 0; c < t->ncol; c++) {
        row[c] = at;
        const char *end = memchr(t->arena + at, '\0', t->arena_len + len - at);
        at = end ? (size_t)(end - t->arena) + 1 : t->arena_len + len;
        if (!end) /* fewer cells than columns: the rest empty at the last NUL */
            at--;
    }
    t->arena_len += len;
    t->nrow++;
    return LW_OK;
}

static lw_status dup_into(char **slot, const char *text, lw_error *err)
{
    char *s = lw_strdup(text ? text : "");
    if (!s)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
    free(*slot);
    *slot = s;
    return LW_OK;
}

lw_status lw_rtable_head(lw_rtable *t, size_t col, const char *name, lw_error *err)
{
    return dup_into(&t->head[col], name, err);
}

lw_status lw_rtable_group(lw_rtable *t, size_t col, const char *group, lw_error *err)
{
    return dup_into(&t->group[col], group, err);
}

lw_status lw_rtable_add_row(lw_rtable *t, size_t *row, lw_error *err)
{
    if (t->nrow == t->cap) {
        size_t cap = t->cap ? 2 * t->cap : 16;
        char **c = lw_realloc(t->cell, cap * t->ncol * sizeof *c);
        if (c)
            t->cell = c;
        char **f = c ? lw_realloc(t->full, cap * t->ncol * sizeof *f) : NULL;
        if (f)
            t->full = f;
        if (!c || !f)
            return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
        t->cap = cap;
    }
    memset(t->cell + t->nrow * t->ncol, 0, t->ncol * sizeof *t->cell);
    memset(t->full + t->nrow * t->ncol, 0, t->ncol * sizeof *t->full);
    *row = t->nrow++;
    return LW_OK;
}

lw_status lw_rtable_set(lw_rtable *t, size_t row, size_t col, const char *text, lw_error *err)
{
    free(t->full[row * t->ncol + col]);
    t->full[row * t->ncol + col] = NULL;
    return dup_into(&t->cell[row * t->ncol + col], text, err);
}

lw_status lw_rtable_setf(lw_rtable *t, size_t row, size_t col, lw_error *err, const char *fmt,
                         ...)
{
    char buf[512];
    va_list ap;
    va_start(ap, fmt);
    locale_t saved = lw_number_locale_begin();
    /* va_start is above */
    // NOLINTNEXTLINE(clang-analyzer-valist.Uninitialized)
    vsnprintf(buf, sizeof buf, fmt, ap);
    lw_number_locale_end(saved);
    va_end(ap);
    return lw_rtable_set(t, row, col, buf, err);
}

lw_status lw_rtable_copy_cell(lw_rtable *t, size_t row, size_t col, const lw_rtable *src,
                              size_t sr, size_t sc, lw_error *err)
{
    const char *c = src->cell[sr * src->ncol + sc], *f = src->full[sr * src->ncol + sc];
    lw_status st = lw_rtable_set(t, row, col, c ? c : "", err);
    return st == LW_OK && f ? dup_into(&t->full[row * t->ncol + col], f, err) : st;
}

static lw_status lw_rtable_num_in_c_locale(lw_rtable *t, size_t row, size_t col, double v, int sig,
                        lw_error *err)
{
    char buf[64] = "";
    if (isfinite(v))
        snprintf(buf, sizeof buf, "%.*g", sig, v);
    lw_status st = lw_rtable_set(t, row, col, buf, err);
    if (st != LW_OK || !isfinite(v))
        return st;
    lw_number_format(buf, sizeof buf, v);
    return dup_into(&t->full[row * t->ncol + col], buf, err);
}

lw_status lw_rtable_note(lw_rtable *t, const char *text, lw_error *err)
{
    char **n = lw_realloc(t->notes, (t->nnotes + 1) * sizeof *n);
    if (!n)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
    t->notes = n;
    t->notes[t->nnotes] = NULL;
    lw_status st = dup_into(&t->notes[t->nnotes], text, err);
    if (st == LW_OK)
        t->nnotes++;
    return st;
}

lw_status lw_rtable_set_title(lw_rtable *t, const char *text, lw_error *err)
{
    return dup_into(&t->title, text, err);
}

static size_t width(const char *s);
static void pad(FILE *fp, size_t n);

static const char *cell_text(const lw_rtable *t, size_t r, size_t c)
{
    if (t->off)
        return t->arena + t->off[r * t->ncol + c];
    const char *s = t->cell[r * t->ncol + c];
    return s ? s : "";
}

/* The full-precision text of a cell (CSV's), or its shown text. */
static const char *cell_full(const lw_rtable *t, size_t r, size_t c)
{
    const char *f = t->off || !t->full ? NULL : t->full[r * t->ncol + c];
    return f ? f : cell_text(t, r, c);
}

/* Right-aligned: every non-empty cell is a number, or a number with a unit
 * ("41 h", "45 min"). */
static bool numeric_column(const lw_rtable *t, size_t c)
{
    bool any = false;
    for (size_t r = 0; r < t->nrow; r++) {
        const char *s = cell_text(t, r, c);
        double v;
        if (!s[0] || !strcmp(s, "-"))
            continue;
        if (!lw_number_parse_double(s, &v)) {
            char num[64];
            const char *sp = strchr(s, ' ');
            size_t len = sp ? (size_t)(sp - s) : 0;
            if (!sp || len >= sizeof num || strchr(sp + 1, ' '))
                return false;
            memcpy(num, s, len);
            num[len] = '\0';
            if (!lw_number_parse_double(num, &v))
                return false;
        }
        any = true;
    }
    return any;
}

static const char *group_of(const lw_rtable *t, size_t c)
{
    return t->group[c] ? t->group[c] : "";
}

/* The column after the group that starts at column c (its neighbours with
 * the same label). */
static size_t group_end(const lw_rtable *t, size_t c)
{
    size_t e = c + 1;
    while (e < t->ncol && !strcmp(group_of(t, e), group_of(t, c)))
        e++;
    return e;
}

/* Whether any column has a group label. */
static bool has_groups(const lw_rtable *t)
{
    for (size_t c = 0; c < t->ncol; c++)
        if (group_of(t, c)[0])
            return true;
    return false;
}

/* Text: a line of group labels over their columns, underlined. */
static void write_groups(const lw_rtable *t, FILE *fp, const size_t *w)
{
    if (!has_groups(t))
        return;
    for (int pass = 0; pass < 2; pass++) {
        size_t c = 0;
        while (c < t->ncol) {
            size_t e = group_end(t, c), span = w[c];
            for (size_t k = c + 1; k < e; k++)
                span += 2 + w[k];
            const char *g = group_of(t, c);
            if (c)
                fputs("  ", fp);
            bool last = e == t->ncol;
            if (pass == 0) {
                fputs(g, fp);
                if (!last)
                    pad(fp, span > width(g) ? span - width(g) : 0);
            } else if (g[0]) {
                for (size_t i = 0; i < span; i++)
                    fputc('=', fp);
            } else if (!last) {
                pad(fp, span);
            }
            c = e;
        }
        fputc('\n', fp);
    }
}

/* Display width of UTF-8 text: count code points, not bytes. */
static size_t width(const char *s)
{
    size_t w = 0;
    for (; *s; s++)
        if (((unsigned char)*s & 0xC0) != 0x80)
            w++;
    return w;
}

static void pad(FILE *fp, size_t n)
{
    for (size_t i = 0; i < n; i++)
        fputc(' ', fp);
}

/* false: out of memory, nothing written */
static bool write_text(const lw_rtable *t, FILE *fp)
{
    size_t *w = lw_calloc(t->ncol, sizeof *w);
    bool *num = lw_calloc(t->ncol, sizeof *num);
    if (!w || !num) {
        free(w);
        free(num);
        return false;
    }
    for (size_t c = 0; c < t->ncol; c++) {
        w[c] = width(t->head[c] ? t->head[c] : "");
        for (size_t r = 0; r < t->nrow; r++)
            if (width(cell_text(t, r, c)) > w[c])
                w[c] = width(cell_text(t, r, c));
        num[c] = numeric_column(t, c);
    }
    /* a group label wider than its columns widens the last of them */
    for (size_t c = 0; c < t->ncol;) {
        size_t e = group_end(t, c), span = w[c];
        for (size_t k = c + 1; k < e; k++)
            span += 2 + w[k];
        if (width(group_of(t, c)) > span)
            w[e - 1] += width(group_of(t, c)) - span;
        c = e;
    }
    if (t->title)
        fprintf(fp, "%s\n\n", t->title);
    write_groups(t, fp, w);
    for (size_t c = 0; c < t->ncol; c++) {
        const char *h = t->head[c] ? t->head[c] : "";
        if (c)
            fputs("  ", fp);
        if (num[c])
            pad(fp, w[c] - width(h));
        fputs(h, fp);
        if (!num[c] && c + 1 < t->ncol)
            pad(fp, w[c] - width(h));
    }
    fputc('\n', fp);
    for (size_t c = 0; c < t->ncol; c++) {
        if (c)
            fputs("  ", fp);
        for (size_t i = 0; i < w[c]; i++)
            fputc('-', fp);
    }
    fputc('\n', fp);
    for (size_t r = 0; r < t->nrow; r++) {
        for (size_t c = 0; c < t->ncol; c++) {
            const char *s = cell_text(t, r, c);
            if (c)
                fputs("  ", fp);
            if (num[c])
                pad(fp, w[c] - width(s));
            fputs(s, fp);
            if (!num[c] && c + 1 < t->ncol)
                pad(fp, w[c] - width(s));
        }
        fputc('\n', fp);
    }
    for (size_t i = 0; !t->quiet && i < t->nnotes; i++)
        fprintf(fp, "%s%s\n", i ? "" : "\n", t->notes[i]);
    free(w);
    free(num);
    return true;
}

/* Character c of a Markdown cell as written, in out (1 or 2 characters,
 * the count returned): a bar escaped, a line break as a space. */
static size_t md_char(char c, char out[2])
{
    if (c == '|') {
        out[0] = '\\', out[1] = '|';
        return 2;
    }
    out[0] = c == '\n' ? ' ' : c;
    return 1;
}

static void md_cell(FILE *fp, const char *s)
{
    char e[2];
    fputc(' ', fp);
    for (; *s; s++) {
        size_t k = md_char(*s, e);
        fwrite(e, 1, k, fp);
    }
    fputs(" |", fp);
}

static void md_head(const lw_rtable *t, FILE *fp)
{
    if (t->title)
        fprintf(fp, "**%s**\n\n", t->title);
    fputc('|', fp);
    for (size_t c = 0; c < t->ncol; c++) {
        char h[256];
        snprintf(h, sizeof h, "%s%s%s", group_of(t, c), group_of(t, c)[0] ? " " : "",
                 t->head[c] ? t->head[c] : "");
        md_cell(fp, h);
    }
    fputs("\n|", fp);
    for (size_t c = 0; c < t->ncol; c++)
        fputs(numeric_column(t, c) ? " ---: |" : " :--- |", fp);
    fputc('\n', fp);
}

static void md_notes(const lw_rtable *t, FILE *fp)
{
    if (t->quiet)
        return;
    if (t->nnotes)
        fputc('\n', fp);
    for (size_t i = 0; i < t->nnotes; i++)
        fprintf(fp, "%s%s\n", t->notes[i], i + 1 < t->nnotes ? "  " : "");
}

static void md_row(const lw_rtable *t, size_t r, FILE *fp)
{
    fputc('|', fp);
    for (size_t c = 0; c < t->ncol; c++)
        md_cell(fp, cell_text(t, r, c));
    fputc('\n', fp);
}

static void write_md(const lw_rtable *t, FILE *fp)
{
    md_head(t, fp);
    for (size_t r = 0; r < t->nrow; r++)
        md_row(t, r, fp);
    md_notes(t, fp);
}

static void csv_row(const lw_rtable *t, size_t r, lw_csvw *w)
{
    for (size_t c = 0; c < t->ncol; c++)
        lw_csvw_text(w, cell_full(t, r, c));
    lw_csvw_end_row(w);
}

static void csv_head(const lw_rtable *t, lw_csvw *w)
{
    for (size_t c = 0; c < t->ncol; c++)
        lw_csvw_text(w, t->head[c] ? t->head[c] : "");
    lw_csvw_end_row(w);
}

static void write_csv(const lw_rtable *t, FILE *fp, lw_csvw *w)
{
    lw_csvw_init(w, fp);
    csv_head(t, w);
    for (size_t r = 0; r < t->nrow; r++)
        csv_row(t, r, w);
}

/* ---- JSON ---- */

#define LW_JSON_KEY_MAX 96

/* Whether s is a number in JSON's grammar (RFC 8259 section 6):
 * -?(0|[1-9][0-9]*)(.[0-9]+)?([eE][+-]?[0-9]+)? */
static bool json_number_text(const char *s)
{
    if (*s == '-')
        s++;
    if (*s == '0')
        s++;
    else if (*s >= '1' && *s <= '9')
        while (*s >= '0' && *s <= '9')
            s++;
    else
        return false;
    if (*s == '.') {
        if (!(*++s >= '0' && *s <= '9'))
            return false;
        while (*s >= '0' && *s <= '9')
            s++;
    }
    if (*s == 'e' || *s == 'E') {
        s++;
        if (*s == '+' || *s == '-')
            s++;
        if (!(*s >= '0' && *s <= '9'))
            return false;
        while (*s >= '0' && *s <= '9')
            s++;
    }
    return *s == '\0';
}

/* A cell as a JSON value: a number when the whole text is one (finite),
 * null when empty or "-", otherwise the text. */
static cJSON *json_value(const char *s)
{
    double v;
    if (!s[0] || !strcmp(s, "-"))
        return cJSON_CreateNull();
    if (lw_number_parse_double(s, &v) && isfinite(v))
        /* the text itself where JSON's grammar takes it: the same digits
         * as CSV, the shortest that read back exactly */
        return json_number_text(s) ? cJSON_CreateRaw(s) : cJSON_CreateNumber(v);
    return cJSON_CreateString(s);
}

/* A column's JSON name: its head with "%" as "pct", "+-" as "pm", every
 * other run of characters outside [A-Za-z0-9_.-] as one "_", none at
 * either end ("share %" -> "share_pct"; "runtime_h" and
 * "LR6-alkaline.runtime_h" stay). */
static void json_key(const char *head, char *out, size_t size)
{
    size_t n = 0;
    bool gap = false; /* a "_" is owed before the next word */
    for (const char *s = head; *s; s++) {
        char one[2] = {0};
        const char *word = one;
        if (*s == '%')
            word = "pct";
        else if (s[0] == '+' && s[1] == '-')
            word = "pm", s++;
        else if ((*s >= 'a' && *s <= 'z') || (*s >= 'A' && *s <= 'Z') ||
                 (*s >= '0' && *s <= '9') || *s == '_' || *s == '.' || *s == '-')
            one[0] = *s;
        else {
            gap = true;
            continue;
        }
        bool symbol = word != one; /* "pct" or "pm": a word of its own */
        if ((gap || symbol) && n && out[n - 1] != '_' && n + 1 < size)
            out[n++] = '_';
        for (; *word && n + 1 < size; word++)
            out[n++] = *word;
        gap = symbol;
    }
    while (n && out[n - 1] == '_')
        n--;
    out[n] = '\0';
}

cJSON *lw_rtable_to_json(const lw_rtable *t)
{
    cJSON *o = cJSON_CreateObject(), *cols = NULL, *rows = NULL, *notes = NULL;
    bool ok = o && (t->title ? cJSON_AddStringToObject(o, "title", t->title)
                             : cJSON_AddNullToObject(o, "title")) &&
              (cols = cJSON_AddArrayToObject(o, "columns")) &&
              (rows = cJSON_AddArrayToObject(o, "rows")) &&
              (notes = cJSON_AddArrayToObject(o, "notes"));
    char (*key)[LW_JSON_KEY_MAX] = lw_calloc(t->ncol ? t->ncol : 1, sizeof *key);
    ok = ok && key;
    for (size_t c = 0; ok && c < t->ncol; c++) {
        json_key(t->head[c] ? t->head[c] : "", key[c], sizeof key[c]);
        cJSON *h = cJSON_CreateString(key[c]);
        ok = h && cJSON_AddItemToArray(cols, h);
    }
    for (size_t r = 0; ok && r < t->nrow; r++) {
        cJSON *row = cJSON_CreateObject();
        ok = row && cJSON_AddItemToArray(rows, row);
        for (size_t c = 0; ok && c < t->ncol; c++) {
            cJSON *v = json_value(cell_full(t, r, c));
            ok = v && cJSON_AddItemToObject(row, key[c], v);
        }
    }
    free(key);
    for (size_t i = 0; ok && i < t->nnotes; i++) {
        cJSON *n = cJSON_CreateString(t->notes[i]);
        ok = n && cJSON_AddItemToArray(notes, n);
    }
    if (!ok) {
        cJSON_Delete(o);
        return NULL;
    }
    return o;
}

/* One table as one JSON object on one line (lw_jdoc gathers them). */
static bool write_json(const lw_rtable *t, FILE *fp)
{
    cJSON *o = lw_rtable_to_json(t);
    char *s = o ? cJSON_PrintUnformatted(o) : NULL;
    cJSON_Delete(o);
    if (!s)
        return false;
    fputs(s, fp);
    fputc('\n', fp);
    cJSON_free(s);
    return true;
}

/* ---- HTML ---- */

static void write_html(const lw_rtable *t, FILE *fp)
{
    fputs("<table>\n", fp);
    if (t->title) {
        fputs("<caption>", fp);
        lw_text_xml_write(fp, t->title);
        fputs("</caption>\n", fp);
    }
    fputs("<thead>\n", fp);
    if (has_groups(t)) { /* a row of column groups, each spanning its neighbours */
        fputs("<tr>", fp);
        for (size_t c = 0; c < t->ncol;) {
            size_t e = group_end(t, c);
            fprintf(fp, "<th scope=\"colgroup\" colspan=\"%zu\">", e - c);
            lw_text_xml_write(fp, group_of(t, c));
            fputs("</th>", fp);
            c = e;
        }
        fputs("</tr>\n", fp);
    }
    fputs("<tr>", fp);
    bool *num = lw_calloc(t->ncol ? t->ncol : 1, sizeof *num);
    for (size_t c = 0; c < t->ncol; c++) {
        if (num)
            num[c] = numeric_column(t, c);
        fputs(num && num[c] ? "<th scope=\"col\" class=\"num\">" : "<th scope=\"col\">", fp);
        lw_text_xml_write(fp, t->head[c] ? t->head[c] : "");
        fputs("</th>", fp);
    }
    fputs("</tr>\n</thead>\n<tbody>\n", fp);
    for (size_t r = 0; r < t->nrow; r++) {
        fputs("<tr>", fp);
        for (size_t c = 0; c < t->ncol; c++) {
            fputs(num && num[c] ? "<td class=\"num\">" : "<td>", fp);
            lw_text_xml_write(fp, cell_text(t, r, c));
            fputs("</td>", fp);
        }
        fputs("</tr>\n", fp);
    }
    fputs("</tbody>\n</table>\n", fp);
    free(num);
    if (t->nnotes && !t->quiet) {
        fputs("<div class=\"notes\">\n", fp);
        for (size_t i = 0; i < t->nnotes; i++) {
            fputs("<p>", fp);
            lw_text_xml_write(fp, t->notes[i]);
            fputs("</p>\n", fp);
        }
        fputs("</div>\n", fp);
    }
}

lw_status lw_rtable_write(const lw_rtable *t, FILE *fp, lw_rtable_format fmt, lw_error *err)
{
    lw_csvw w = {0};
    if (fmt == LW_FMT_CSV)
        write_csv(t, fp, &w);
    else if (fmt == LW_FMT_MD)
        write_md(t, fp);
    else if (fmt == LW_FMT_HTML)
        write_html(t, fp);
    else if (fmt == LW_FMT_JSON) {
        if (!write_json(t, fp))
            return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
    } else if (!write_text(t, fp))
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table");
    if (w.failed || ferror(fp))
        return lw_error_set(err, LW_EIO, NULL, 0, "write error");
    return LW_OK;
}

/* A Markdown row in memory: the characters md_cell writes, escaped alike. */
static char *md_row_text(const lw_rtable *t, size_t r, size_t *len)
{
    size_t cap = 4;
    for (size_t c = 0; c < t->ncol; c++)
        cap += 2 * strlen(cell_text(t, r, c)) + 4;
    char *b = lw_malloc(cap), *p = b;
    if (!b)
        return NULL;
    *p++ = '|';
    for (size_t c = 0; c < t->ncol; c++) {
        *p++ = ' ';
        for (const char *s = cell_text(t, r, c); *s; s++)
            p += md_char(*s, p);
        *p++ = ' ', *p++ = '|';
    }
    *p++ = '\n';
    *p = '\0';
    *len = (size_t)(p - b);
    return b;
}

lw_status lw_rtable_render_row(const lw_rtable *t, size_t row, lw_rtable_format fmt, char **out,
                               size_t *len, lw_error *err)
{
    *out = NULL;
    *len = 0;
    if (fmt == LW_FMT_CSV) {
        lw_csvw w;
        lw_csvw_init_mem(&w);
        csv_row(t, row, &w);
        if (w.failed) {
            free(w.buf);
            return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table row");
        }
        *out = w.buf;
        *len = w.len;
        return LW_OK;
    }
    if (fmt == LW_FMT_MD) {
        *out = md_row_text(t, row, len);
        return *out ? LW_OK
                    : lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table row");
    }
    /* text: the shown cells; JSON: the full-precision ones (CSV's) */
    const char *(*cell)(const lw_rtable *, size_t, size_t) =
        fmt == LW_FMT_JSON ? cell_full : cell_text;
    size_t n = 0;
    for (size_t c = 0; c < t->ncol; c++)
        n += strlen(cell(t, row, c)) + 1;
    char *b = lw_malloc(n ? n : 1), *p = b;
    if (!b)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for a table row");
    for (size_t c = 0; c < t->ncol; c++) {
        const char *s = cell(t, row, c);
        size_t k = strlen(s) + 1;
        memcpy(p, s, k);
        p += k;
    }
    *out = b;
    *len = n;
    return LW_OK;
}

lw_status lw_rtable_write_head(const lw_rtable *t, FILE *fp, lw_rtable_format fmt,
                               lw_error *err)
{
    if (fmt == LW_FMT_CSV) {
        lw_csvw w;
        lw_csvw_init(&w, fp);
        csv_head(t, &w);
        if (w.failed)
            return lw_error_set(err, LW_EIO, NULL, 0, "write error");
    } else if (fmt == LW_FMT_MD) {
        md_head(t, fp);
    }
    return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
}

lw_status lw_rtable_write_notes(const lw_rtable *t, FILE *fp, lw_rtable_format fmt,
                                lw_error *err)
{
    if (fmt == LW_FMT_MD)
        md_notes(t, fp);
    return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
}

lw_status lw_rtable_num(lw_rtable *t, size_t row, size_t col, double v, int sig,
                        lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status result = lw_rtable_num_in_c_locale(t, row, col, v, sig, err);
    lw_number_locale_end(saved);
    return result;
}
