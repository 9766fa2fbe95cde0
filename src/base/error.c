/*
 * error.c - the error record and strict number parsing (see error.h).
 */
#include "error.h"

#include <ctype.h>
#include <errno.h>
#include <limits.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void lw_error_clear(lw_error *err)
{
    if (!err)
        return;
    err->code = LW_OK;
    err->file[0] = '\0';
    err->line = 0;
    err->msg[0] = '\0';
}

lw_status lw_error_vset(lw_error *err, lw_status code, const char *file, int line,
                        const char *fmt, va_list ap)
{
    if (!err || err->code != LW_OK)
        return code;
    err->code = code;
    lw_strlcpy(err->file, file ? file : "", sizeof err->file);
    err->line = line;
    vsnprintf(err->msg, sizeof err->msg, fmt, ap); // NOLINT(clang-analyzer-valist.Uninitialized): va_start in the caller
    return code;
}

lw_status lw_error_set(lw_error *err, lw_status code, const char *file, int line,
                       const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    lw_status st = lw_error_vset(err, code, file, line, fmt, ap);
    va_end(ap);
    return st;
}

/* Copy text into out (room for size), with every byte that could steer a
 * terminal -- a control character, DEL, or a byte of invalid UTF-8 --
 * written as \xNN.  Returns the length written. */
size_t lw_escape(char *out, size_t size, const char *text)
{
    size_t o = 0;
    const unsigned char *s = (const unsigned char *)text;
    while (*s && o + 5 <= size) { /* room for one \xNN and the NUL */
        unsigned char c = *s;
        size_t len = c < 0x80 ? 1 : (c >> 5) == 6 ? 2 : (c >> 4) == 14 ? 3 : (c >> 3) == 30 ? 4 : 0;
        size_t avail = strnlen((const char *)s, 4);
        bool ok = len > 0 && len <= avail && c >= 0x20 && c != 0x7F &&
                  lw_utf8_valid((const char *)s, len, NULL);
        if (ok && o + len < size) {
            memcpy(out + o, s, len);
            o += len;
            s += len;
        } else {
            o += (size_t)snprintf(out + o, size - o, "\\x%02X", c);
            s++;
        }
    }
    out[o] = '\0';
    return o;
}

void lw_error_format(const lw_error *err, char *buf, size_t size)
{
    if (!buf || size == 0)
        return;
    buf[0] = '\0';
    if (!err)
        return;
    char raw[LW_ERR_FILE_MAX + LW_ERR_MSG_MAX + 32];
    if (err->file[0] && err->line > 0)
        snprintf(raw, sizeof raw, "%s:%d: %s", err->file, err->line, err->msg);
    else if (err->file[0])
        snprintf(raw, sizeof raw, "%s: %s", err->file, err->msg);
    else
        snprintf(raw, sizeof raw, "%s", err->msg);
    lw_escape(buf, size, raw);
}

static const char *skip_blank(const char *s)
{
    while (*s && isspace((unsigned char)*s))
        s++;
    return s;
}

bool lw_parse_double(const char *s, double *out)
{
    if (!s)
        return false;
    s = skip_blank(s);
    if (!*s)
        return false;
    /* strtod accepts "nan", "inf" and hex floats; a value in a data file is a
     * plain decimal number, so refuse anything that starts otherwise. */
    const char *p = s;
    if (*p == '+' || *p == '-')
        p++;
    if (!isdigit((unsigned char)*p) && *p != '.')
        return false;
    if (p[0] == '0' && (p[1] == 'x' || p[1] == 'X'))
        return false;
    char *end = NULL;
    errno = 0;
    double v = strtod(s, &end);
    if (end == s || errno == ERANGE || !isfinite(v))
        return false;
    if (*skip_blank(end) != '\0')
        return false;
    *out = v;
    return true;
}

static double prefix_scale(char c)
{
    switch (c) {
    case 'R':
    case 'r':
        return 1.0;
    case 'k':
    case 'K':
        return 1e3;
    case 'M':
        return 1e6;
    default:
        return 0.0;
    }
}

static bool parse_coded(const char *s, double *out)
{
    char buf[64];
    size_t len = strlen(s);
    while (len > 0 && isspace((unsigned char)s[len - 1]))
        len--;
    while (len > 0 && isspace((unsigned char)*s)) {
        s++;
        len--;
    }
    if (len == 0 || len >= sizeof buf)
        return false;
    memcpy(buf, s, len);
    buf[len] = '\0';
    double v;
    if (lw_parse_double(buf, &v))
        goto done;
    /* "2.2k", "1M": a number and a prefix at the end */
    double scale = prefix_scale(buf[len - 1]);
    if (scale > 0.0 && buf[len - 1] != 'R' && buf[len - 1] != 'r') {
        buf[len - 1] = '\0';
        if (lw_parse_double(buf, &v)) {
            v *= scale;
            goto done;
        }
        buf[len - 1] = s[len - 1];
    }
    /* "4k7", "4R7", "0R22": the prefix letter stands for the decimal point */
    for (size_t i = 0; i < len; i++) {
        double sc = prefix_scale(buf[i]);
        if (sc == 0.0)
            continue;
        if (i == 0 || i + 1 == len || strchr(buf, '.'))
            return false;
        buf[i] = '.';
        if (!lw_parse_double(buf, &v))
            return false;
        v *= sc;
        goto done;
    }
    return false;
done:
    if (!(v >= 0.0) || !isfinite(v))
        return false;
    *out = v;
    return true;
}

bool lw_parse_number(const char *s, double *out)
{
    return lw_parse_double(s, out) || parse_coded(s, out);
}

bool lw_parse_int(const char *s, int *out)
{
    if (!s)
        return false;
    s = skip_blank(s);
    if (!*s)
        return false;
    const char *p = (*s == '+' || *s == '-') ? s + 1 : s;
    if (!isdigit((unsigned char)*p))
        return false;
    char *end = NULL;
    errno = 0;
    long v = strtol(s, &end, 10);
    if (errno == ERANGE || v < INT_MIN || v > INT_MAX)
        return false;
    if (*skip_blank(end) != '\0')
        return false;
    *out = (int)v;
    return true;
}

bool lw_strlcpy(char *dst, const char *src, size_t size)
{
    if (size == 0)
        return false;
    size_t n = strlen(src);
    if (n >= size) {
        memcpy(dst, src, size - 1);
        dst[size - 1] = '\0';
        return false;
    }
    memcpy(dst, src, n + 1);
    return true;
}

void lw_format_double(char *buf, size_t size, double v)
{
    if (!isfinite(v)) {
        if (size)
            buf[0] = '\0';
        return;
    }
    /* a decimal of at most 15 digits that reads back as v is what %.15g
     * prints (zeros trimmed); otherwise 16, and 17 always round-trips */
    for (int prec = 15; prec <= 17; prec++) {
        snprintf(buf, size, "%.*g", prec, v);
        if (prec == 17 || strtod(buf, NULL) == v)
            return;
    }
}

/* (see error.h) */
bool lw_utf8_valid(const char *s, size_t n, size_t *at)
{
    size_t i = 0;
    while (i < n) {
        unsigned char c = (unsigned char)s[i];
        size_t len = c < 0x80 ? 1 : (c >> 5) == 6 ? 2 : (c >> 4) == 14 ? 3 : (c >> 3) == 30 ? 4 : 0;
        if (len == 0 || i + len > n || (len == 2 && c < 0xC2) || (len == 4 && c > 0xF4))
            goto bad;
        for (size_t k = 1; k < len; k++)
            if (((unsigned char)s[i + k] & 0xC0) != 0x80)
                goto bad;
        if (len == 3) {
            unsigned char c1 = (unsigned char)s[i + 1];
            if ((c == 0xE0 && c1 < 0xA0) || (c == 0xED && c1 >= 0xA0)) /* overlong, surrogate */
                goto bad;
        }
        if (len == 4) {
            unsigned char c1 = (unsigned char)s[i + 1];
            if ((c == 0xF0 && c1 < 0x90) || (c == 0xF4 && c1 >= 0x90))
                goto bad;
        }
        i += len;
    }
    return true;
bad:
    if (at)
        *at = i;
    return false;
}

