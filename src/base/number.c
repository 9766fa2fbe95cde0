/*
 * number.c - lampwick's number grammar, parsed and printed (see number.h).
 */
#include "lampwick/number.h"

#include <ctype.h>
#include <errno.h>
#include <limits.h>
#include <locale.h>
#include <math.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* The C locale, made once (POSIX newlocale; uselocale switches only the
 * calling thread, so a host program's locale and other threads are left
 * alone). */
static locale_t c_locale;
static pthread_once_t c_locale_once = PTHREAD_ONCE_INIT;

static void make_c_locale(void)
{
    c_locale = newlocale(LC_ALL_MASK, "C", (locale_t)0);
}

locale_t lw_number_locale_begin(void)
{
    pthread_once(&c_locale_once, make_c_locale);
    return c_locale ? uselocale(c_locale) : (locale_t)0;
}

void lw_number_locale_end(locale_t saved)
{
    if (saved)
        uselocale(saved);
}

static const char *skip_blank(const char *s)
{
    while (*s && isspace((unsigned char)*s))
        s++;
    return s;
}

bool lw_number_parse_double(const char *s, double *out)
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
    locale_t saved = lw_number_locale_begin();
    double v = strtod(s, &end);
    int e = errno;
    lw_number_locale_end(saved);
    if (end == s || e == ERANGE || !isfinite(v))
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
    if (lw_number_parse_double(buf, &v))
        goto done;
    /* "2.2k", "1M": a number and a prefix at the end */
    double scale = prefix_scale(buf[len - 1]);
    if (scale > 0.0 && buf[len - 1] != 'R' && buf[len - 1] != 'r') {
        buf[len - 1] = '\0';
        if (lw_number_parse_double(buf, &v)) {
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
        if (!lw_number_parse_double(buf, &v))
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

bool lw_number_parse(const char *s, double *out)
{
    return lw_number_parse_double(s, out) || parse_coded(s, out);
}

bool lw_number_parse_int(const char *s, int *out)
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

void lw_number_format(char *buf, size_t size, double v)
{
    if (!isfinite(v)) {
        if (size)
            buf[0] = '\0';
        return;
    }
    /* a decimal of at most 15 digits that reads back as v is what %.15g
     * prints (zeros trimmed); otherwise 16, and 17 always round-trips */
    locale_t saved = lw_number_locale_begin();
    for (int prec = 15; prec <= 17; prec++) {
        snprintf(buf, size, "%.*g", prec, v);
        if (prec == 17 || strtod(buf, NULL) == v)
            break;
    }
    lw_number_locale_end(saved);
}
