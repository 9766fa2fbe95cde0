/*
 * jsondoc.c - a command's tables as one JSON document (see jsondoc.h).
 *
 * The tables are kept as the text lw_rtable_write gave them, never parsed
 * into doubles and printed again: cJSON's printer keeps 15 digits where
 * they read back within a relative 2.2e-16, which is not always the same
 * double, and a JSON number here must be CSV's, bit for bit.
 */
#include "lampwick/jsondoc.h"

#include <stdlib.h>
#include <string.h>
#include "jsontable.h"
#include "lampwick/alloc.h"
#include "lampwick/report.h"
#include "lw_config.h"

struct lw_jdoc {
    cJSON *root;    /* every field but the tables */
    char **tables;  /* each table's JSON text */
    size_t ntables;
};

static lw_status nomem(lw_error *err)
{
    return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the JSON document");
}

lw_jdoc *lw_jdoc_new(const char *command, const char *input, lw_error *err)
{
    lw_jdoc *d = lw_calloc(1, sizeof *d);
    cJSON *r = d ? cJSON_CreateObject() : NULL;
    bool ok = r && cJSON_AddStringToObject(r, "lampwick", LW_VERSION) &&
              cJSON_AddNumberToObject(r, "format", LW_JDOC_FORMAT) &&
              cJSON_AddStringToObject(r, "command", command) &&
              (input ? cJSON_AddStringToObject(r, "input", input) != NULL
                     : cJSON_AddNullToObject(r, "input") != NULL) &&
              cJSON_AddStringToObject(r, "caution", lw_report_caution);
    if (!ok) {
        cJSON_Delete(r);
        free(d);
        nomem(err);
        return NULL;
    }
    d->root = r;
    return d;
}

void lw_jdoc_free(lw_jdoc *d)
{
    if (!d)
        return;
    cJSON_Delete(d->root);
    for (size_t i = 0; i < d->ntables; i++)
        free(d->tables[i]);
    free(d->tables);
    free(d);
}

/* Keep text[0 .. n-1] as the next table. */
static lw_status keep(lw_jdoc *d, const char *text, size_t n, lw_error *err)
{
    char **t = lw_realloc(d->tables, (d->ntables + 1) * sizeof *t);
    if (!t)
        return nomem(err);
    d->tables = t;
    char *s = lw_malloc(n + 1);
    if (!s)
        return nomem(err);
    memcpy(s, text, n);
    s[n] = '\0';
    d->tables[d->ntables++] = s;
    return LW_OK;
}

lw_status lw_jdoc_add_table(lw_jdoc *d, const lw_rtable *t, lw_error *err)
{
    cJSON *o = lw_rtable_to_json(t);
    char *s = o ? cJSON_PrintUnformatted(o) : NULL;
    cJSON_Delete(o);
    lw_status st = s ? keep(d, s, strlen(s), err) : nomem(err);
    cJSON_free(s);
    return st;
}

lw_status lw_jdoc_add_written(lw_jdoc *d, const char *text, size_t len, lw_error *err)
{
    size_t at = 0;
    while (at < len) {
        const char *nl = memchr(text + at, '\n', len - at);
        size_t n = nl ? (size_t)(nl - (text + at)) : len - at;
        if (n) { /* checked to be one JSON object, then kept as written */
            const char *end = NULL;
            cJSON *o = cJSON_ParseWithLengthOpts(text + at, n, &end, false);
            bool object = o && cJSON_IsObject(o) && end == text + at + n;
            cJSON_Delete(o);
            if (!object)
                return lw_error_set(err, LW_EIO, NULL, 0,
                                    "internal: a command wrote something other than a "
                                    "table into JSON output");
            lw_status st = keep(d, text + at, n, err);
            if (st != LW_OK)
                return st;
        }
        at += n + 1;
    }
    return LW_OK;
}

lw_status lw_jdoc_set_error(lw_jdoc *d, const lw_error *failure, lw_error *err)
{
    cJSON *e = cJSON_CreateObject();
    bool ok = e && cJSON_AddNumberToObject(e, "status", lw_status_exit_code(failure->code)) &&
              cJSON_AddStringToObject(e, "file", failure->file) &&
              cJSON_AddNumberToObject(e, "line", failure->line) &&
              cJSON_AddStringToObject(e, "message", failure->msg);
    if (!ok || !cJSON_AddItemToObject(d->root, "error", e)) {
        cJSON_Delete(e);
        return nomem(err);
    }
    return LW_OK;
}

char *lw_jdoc_print(const lw_jdoc *d, lw_error *err)
{
    /* {"lampwick": ..., "caution": ...[, "error": ...],\n"tables": [\nT1,\nT2\n]}\n */
    char *head = cJSON_PrintUnformatted(d->root);
    size_t n = head ? strlen(head) : 0, total = n + 32;
    for (size_t i = 0; i < d->ntables; i++)
        total += strlen(d->tables[i]) + 2;
    char *out = head ? lw_malloc(total) : NULL;
    if (!out) {
        cJSON_free(head);
        nomem(err);
        return NULL;
    }
    char *p = out;
    memcpy(p, head, n - 1); /* without its closing brace */
    p += n - 1;
    cJSON_free(head);
    static const char tables[] = ",\n\"tables\": [";
    memcpy(p, tables, sizeof tables - 1);
    p += sizeof tables - 1;
    for (size_t i = 0; i < d->ntables; i++) {
        size_t k = strlen(d->tables[i]);
        *p++ = '\n';
        memcpy(p, d->tables[i], k);
        p += k;
        if (i + 1 < d->ntables)
            *p++ = ',';
    }
    const char *end = d->ntables ? "\n]}\n" : "]}\n";
    memcpy(p, end, strlen(end) + 1); /* total has room: 32 bytes over the parts */
    return out;
}
