/*
 * error.c - the error record (see error.h).
 */
#include "lampwick/error.h"
#include "lampwick/text.h"
#include "lampwick/number.h"

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
    lw_text_copy(err->file, file ? file : "", sizeof err->file);
    err->line = line;
    locale_t saved = lw_number_locale_begin(); /* numbers in messages: C locale */
    /* va_start is in the caller */
    // NOLINTNEXTLINE(clang-analyzer-valist.Uninitialized)
    vsnprintf(err->msg, sizeof err->msg, fmt, ap);
    lw_number_locale_end(saved);
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
    lw_text_escape(buf, size, raw);
}

int lw_status_exit_code(lw_status st)
{
    switch (st) {
    case LW_OK:
        return 0;
    case LW_ENOANSWER:
    case LW_ENUMERIC:
    case LW_ENOMEM: /* the run could not be done here: not the input's fault */
        return 1;
    default:
        return 2;
    }
}
