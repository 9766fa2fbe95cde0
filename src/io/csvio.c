/*
 * csvio.c - CSV reading and writing through libcsv, atomic output files
 * (see csvio.h).
 */
#include "lampwick/csvio.h"
#include "lampwick/path.h"
#include "lampwick/text.h"
#include "lampwick/number.h"
#include "lampwick/inifile.h"
#include "lampwick/alloc.h"

#include <csv.h>
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>
#include <unistd.h>


struct rd {
    lw_csv *csv;
    lw_error *err;
    int line;          /* line being fed to the parser */
    int rec_line;      /* line where the current record started */
    size_t field;      /* fields seen in the current record */
    bool have_header;
    size_t cap;
    double rowbuf[LW_CSV_COLS_MAX];
    const char *text_name; /* the text column's name, or NULL */
    char textbuf[LW_CSV_NAME_MAX];
    bool failed;
};

/* Copy the field without its surrounding blanks; false when it does not
 * fit (nothing is cut silently). */
static bool trim_copy(char *dst, size_t size, const char *src, size_t len)
{
    while (len > 0 && isspace((unsigned char)*src)) {
        src++;
        len--;
    }
    while (len > 0 && isspace((unsigned char)src[len - 1]))
        len--;
    if (len >= size) {
        dst[0] = '\0';
        return false;
    }
    memcpy(dst, src, len);
    dst[len] = '\0';
    return true;
}

static void on_field(void *s, size_t len, void *data)
{
    struct rd *r = data;
    lw_csv *c = r->csv;
    if (r->failed)
        return;
    if (r->field == 0)
        r->rec_line = r->line;
    size_t idx = r->field++;
    if (!r->have_header) {
        if (idx >= LW_CSV_COLS_MAX) {
            r->failed = true;
            lw_error_set(r->err, LW_EINPUT, c->path, r->rec_line, "more than %d columns",
                         LW_CSV_COLS_MAX);
            return;
        }
        if (!trim_copy(c->names[idx], LW_CSV_NAME_MAX, s ? s : "", s ? len : 0)) {
            r->failed = true;
            lw_error_set(r->err, LW_EINPUT, c->path, r->rec_line,
                         "column %zu of the header is longer than %d characters", idx + 1,
                         LW_CSV_NAME_MAX - 1);
            return;
        }
        if (!c->names[idx][0]) {
            r->failed = true;
            lw_error_set(r->err, LW_EINPUT, c->path, r->rec_line,
                         "column %zu of the header has no name", idx + 1);
        }
        return;
    }
    if (idx >= c->ncol)
        return; /* reported as ragged at the end of the record */
    if ((int)idx == c->text_col) {
        size_t at = 0;
        const char *bad = NULL;
        if (!trim_copy(r->textbuf, sizeof r->textbuf, s ? s : "", s ? len : 0))
            bad = "is longer than 63 bytes";
        else if (!lw_text_utf8_valid(r->textbuf, strlen(r->textbuf), &at))
            bad = "is not valid UTF-8";
        for (const unsigned char *q = (const unsigned char *)r->textbuf; !bad && *q; q++)
            if (*q < 0x20 || *q == 0x7F)
                bad = "holds a control character";
        if (bad) {
            r->failed = true;
            lw_error_set(r->err, LW_EINPUT, c->path, r->rec_line, "column '%s': the field %s",
                         c->names[idx], bad);
        }
        r->rowbuf[idx] = NAN;
        return;
    }
    char buf[LW_CSV_FIELD_MAX];
    if (!trim_copy(buf, sizeof buf, s ? s : "", s ? len : 0)) {
        r->failed = true;
        lw_error_set(r->err, LW_EINPUT, c->path, r->rec_line,
                     "column '%s': the field is longer than %d characters", c->names[idx],
                     LW_CSV_FIELD_MAX - 1);
        return;
    }
    if (!lw_number_parse_double(buf, &r->rowbuf[idx])) {
        r->failed = true;
        lw_error_set(r->err, LW_EINPUT, c->path, r->rec_line,
                     "column '%s': '%s' is not a number", c->names[idx], buf);
    }
}

static void on_record(int ch, void *data)
{
    struct rd *r = data;
    lw_csv *c = r->csv;
    (void)ch;
    if (r->failed) {
        r->field = 0;
        return;
    }
    if (!r->have_header) {
        c->ncol = r->field;
        c->header_line = r->rec_line;
        r->have_header = true;
        r->field = 0;
        for (size_t i = 0; r->text_name && i < c->ncol; i++)
            if (!strcasecmp(c->names[i], r->text_name))
                c->text_col = (int)i;
        if (c->ncol == 1 && strchr(c->names[0], ';')) {
            r->failed = true;
            lw_error_set(r->err, LW_EINPUT, c->path, r->rec_line,
                         "the header is one field with semicolons in it: fields must be "
                         "separated by commas (RFC 4180)");
        }
        return;
    }
    if (r->field != c->ncol) {
        r->failed = true;
        lw_error_set(r->err, LW_EINPUT, c->path, r->rec_line,
                     "row has %zu fields but the header has %zu", r->field, c->ncol);
        return;
    }
    r->field = 0;
    if (c->nrow == LW_CSV_ROWS_MAX) {
        r->failed = true;
        lw_error_set(r->err, LW_EINPUT, c->path, r->rec_line, "more than %d rows",
                     LW_CSV_ROWS_MAX);
        return;
    }
    if (c->nrow == r->cap) {
        size_t cap = r->cap ? 2 * r->cap : 64;
        double *v = lw_realloc(c->v, cap * c->ncol * sizeof *v);
        if (v)
            c->v = v;
        int *ln = v ? lw_realloc(c->line, cap * sizeof *ln) : NULL;
        if (ln)
            c->line = ln;
        char(*tx)[LW_CSV_NAME_MAX] = NULL;
        if (ln && c->text_col >= 0) {
            tx = lw_realloc(c->text, cap * sizeof *tx);
            if (tx)
                c->text = tx;
        }
        if (!v || !ln || (c->text_col >= 0 && !tx)) {
            r->failed = true;
            lw_error_set(r->err, LW_ENOMEM, c->path, r->rec_line, "out of memory");
            return;
        }
        r->cap = cap;
    }
    memcpy(c->v + c->nrow * c->ncol, r->rowbuf, c->ncol * sizeof *c->v);
    if (c->text_col >= 0)
        memcpy(c->text[c->nrow], r->textbuf, sizeof r->textbuf);
    c->line[c->nrow++] = r->rec_line;
}

lw_status lw_csv_read(const char *path, const lw_path_ref *ref, lw_csv *csv, lw_error *err)
{
    return lw_csv_read_text(path, ref, NULL, csv, err);
}

const char *lw_csv_text(const lw_csv *csv, size_t i)
{
    return csv->text_col >= 0 && csv->text && i < csv->nrow ? csv->text[i] : "";
}

lw_status lw_csv_read_text(const char *path, const lw_path_ref *ref, const char *text_column,
                           lw_csv *csv, lw_error *err)
{
    memset(csv, 0, sizeof *csv);
    csv->text_col = -1;
    lw_text_copy(csv->path, lw_path_display(path), sizeof csv->path);
    if (strlen(path) >= sizeof csv->path)
        return lw_error_set(err, LW_EINPUT, NULL, 0, "the path '%.60s...' is too long", path);
    FILE *fp;
    lw_status ost = lw_path_open_regular(path, "rb", ref, &fp, err);
    if (ost != LW_OK)
        return ost;
    struct csv_parser p;
    if (csv_init(&p, CSV_STRICT | CSV_STRICT_FINI | CSV_APPEND_NULL) != 0) {
        fclose(fp);
        return lw_error_set(err, LW_ENOMEM, path, 0, "out of memory");
    }
    csv_set_realloc_func(&p, lw_realloc);
    csv_set_free_func(&p, free);
    struct rd r = {.csv = csv, .err = err, .text_name = text_column};
    char *linebuf = NULL;
    size_t linecap = 0;
    ssize_t got;
    long bytes = 0;
    while (!r.failed && (got = getline(&linebuf, &linecap, fp)) >= 0) {
        r.line++;
        bytes += got;
        if (bytes > LW_CSV_BYTES_MAX) {
            r.failed = true;
            lw_error_set(err, LW_EINPUT, path, r.line, "the file is larger than %ld bytes",
                         LW_CSV_BYTES_MAX);
            break;
        }
        if (memchr(linebuf, '\0', (size_t)got)) {
            r.failed = true;
            lw_error_set(err, LW_EINPUT, path, r.line,
                         "a NUL byte in the line: this is not a text file");
            break;
        }
        char *text = linebuf;
        /* a UTF-8 byte-order mark, as spreadsheet exports write */
        if (r.line == 1 && got >= 3 && !memcmp(text, "\xEF\xBB\xBF", 3)) {
            text += 3;
            got -= 3;
        }
        if ((size_t)got != csv_parse(&p, text, (size_t)got, on_field, on_record, &r)) {
            r.failed = true;
            lw_error_set(err, LW_EINPUT, path, r.line, "CSV syntax: %s",
                         csv_strerror(csv_error(&p)));
        }
    }
    if (!r.failed && csv_fini(&p, on_field, on_record, &r) != 0 && !r.failed) {
        r.failed = true;
        lw_error_set(err, LW_EINPUT, path, r.line, "CSV syntax: %s",
                     csv_strerror(csv_error(&p)));
    }
    bool io_error = ferror(fp);
    free(linebuf);
    csv_free(&p);
    fclose(fp);
    if (!r.failed && io_error) {
        r.failed = true;
        lw_error_set(err, LW_EIO, path, 0, "read error");
    }
    if (!r.failed && !r.have_header) {
        r.failed = true;
        lw_error_set(err, LW_EINPUT, path, 1, "the file is empty (expected a header row)");
    }
    if (!r.failed && csv->nrow == 0) {
        r.failed = true;
        lw_error_set(err, LW_EINPUT, path, csv->header_line, "no data rows after the header");
    }
    if (r.failed) {
        lw_status code = err ? err->code : LW_EINPUT;
        lw_csv_clear(csv);
        return code ? code : LW_EINPUT;
    }
    return LW_OK;
}

void lw_csv_clear(lw_csv *csv)
{
    if (!csv)
        return;
    free(csv->v);
    free(csv->line);
    free(csv->text);
    csv->v = NULL;
    csv->line = NULL;
    csv->text = NULL;
    csv->nrow = csv->ncol = 0;
}

int lw_csv_column(const lw_csv *csv, const char *name)
{
    for (size_t i = 0; i < csv->ncol; i++)
        if (!strcasecmp(csv->names[i], name))
            return (int)i;
    return -1;
}

static void join(char *buf, size_t size, const char *const *list)
{
    for (size_t i = 0; list && list[i]; i++) {
        strncat(buf, buf[0] ? ", " : "", size - strlen(buf) - 1);
        strncat(buf, list[i], size - strlen(buf) - 1);
    }
}

lw_status lw_csv_expect(const lw_csv *csv, const char *const *required,
                        const char *const *optional, lw_error *err)
{
    char want[512] = "";
    join(want, sizeof want, required);
    if (optional && optional[0]) {
        strncat(want, " (optional: ", sizeof want - strlen(want) - 1);
        join(want + strlen(want), sizeof want - strlen(want), optional);
        strncat(want, ")", sizeof want - strlen(want) - 1);
    }
    for (size_t c = 0; c < csv->ncol; c++)
        for (size_t k = 0; k < c; k++)
            if (!strcasecmp(csv->names[c], csv->names[k]))
                return lw_error_set(err, LW_EINPUT, csv->path, csv->header_line,
                                    "column '%s' appears twice", csv->names[c]);
    for (size_t i = 0; required[i]; i++)
        if (lw_csv_column(csv, required[i]) < 0)
            return lw_error_set(err, LW_EINPUT, csv->path, csv->header_line,
                                "missing column '%s'; expected columns: %s", required[i], want);
    for (size_t c = 0; c < csv->ncol; c++) {
        bool known = false;
        for (size_t i = 0; required[i] && !known; i++)
            known = !strcasecmp(csv->names[c], required[i]);
        for (size_t i = 0; optional && optional[i] && !known; i++)
            known = !strcasecmp(csv->names[c], optional[i]);
        if (!known)
            return lw_error_set(err, LW_EINPUT, csv->path, csv->header_line,
                                "unknown column '%s'; expected columns: %s", csv->names[c],
                                want);
    }
    return LW_OK;
}

/* ---- writing ---- */

void lw_csvw_init(lw_csvw *w, FILE *fp)
{
    *w = (lw_csvw){.fp = fp};
}

void lw_csvw_init_mem(lw_csvw *w)
{
    *w = (lw_csvw){.fp = NULL};
}

/* Room for n more bytes and a NUL in memory. */
static bool mem_room(lw_csvw *w, size_t n)
{
    if (w->len + n + 1 <= w->cap)
        return true;
    size_t cap = w->cap ? 2 * w->cap : 256;
    while (cap < w->len + n + 1)
        cap *= 2;
    char *b = lw_realloc(w->buf, cap);
    if (!b)
        return false;
    w->buf = b;
    w->cap = cap;
    return true;
}

static void put(lw_csvw *w, const char *s, size_t n)
{
    if (w->fp) {
        if (fwrite(s, 1, n, w->fp) != n)
            w->failed = true;
        return;
    }
    if (!mem_room(w, n)) {
        w->failed = true;
        return;
    }
    memcpy(w->buf + w->len, s, n);
    w->len += n;
    w->buf[w->len] = '\0';
}

/* A field quoted by libcsv (RFC 4180: in quotes, quotes doubled). */
static void put_quoted(lw_csvw *w, const char *s)
{
    size_t n = strlen(s);
    if (w->fp) {
        if (csv_fwrite(w->fp, s, n) != 0)
            w->failed = true;
        return;
    }
    size_t need = csv_write(NULL, 0, s, n);
    if (!mem_room(w, need)) {
        w->failed = true;
        return;
    }
    w->len += csv_write(w->buf + w->len, need, s, n);
    w->buf[w->len] = '\0';
}

static bool needs_quotes(const char *s)
{
    if (!s[0])
        return false;
    if (isspace((unsigned char)s[0]) || isspace((unsigned char)s[strlen(s) - 1]))
        return true;
    return strpbrk(s, ",\"\r\n") != NULL;
}

void lw_csvw_text(lw_csvw *w, const char *s)
{
    if (w->fields++ > 0)
        put(w, ",", 1);
    if (needs_quotes(s))
        put_quoted(w, s);
    else
        put(w, s, strlen(s));
}

void lw_csvw_num(lw_csvw *w, double v)
{
    char buf[64];
    lw_number_format(buf, sizeof buf, v);
    lw_csvw_text(w, buf);
}

void lw_csvw_end_row(lw_csvw *w)
{
    put(w, "\r\n", 2);
    w->fields = 0;
}
