/*
 * number.h - lampwick's number grammar, the same in files, --set and
 * --vary, and the shortest text that reads back exactly.
 *
 * Owns: lw_number_parse (plain decimals and resistor codes), the strict
 * double and integer parsers under it, lw_number_format, and
 * lw_number_memo (a logarithm kept beside its argument).  The resistor
 * codes follow IEC 60062.
 *
 * Locale: every number lampwick parses or prints is in the C locale ("3.5",
 * never "3,5"), whatever locale the host program set.  The parsers and
 * lw_number_format switch the calling thread to the C locale themselves;
 * every library function that prints numbers (reports, tables, charts,
 * cell files, messages) does the same around its work with
 * lw_number_locale_begin/end.
 */
#ifndef LW_NUMBER_H
#define LW_NUMBER_H

/* layer 1, base (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 1
#error "base-layer header included from a lower layer"
#endif

#include <math.h>
#include <stdbool.h>
#include <stddef.h>

/* Strict parse of a whole string as a finite double: leading/trailing blanks
 * allowed, nothing else.  Refuses "", "4.7x", "1,2", "nan", "inf".
 * Writes *out only on success. */
bool lw_number_parse_double(const char *s, double *out);

/* lampwick's number grammar, the same in files, --set and --vary: a plain
 * number as lw_number_parse_double, or a non-negative value with a resistor-code
 * or SI letter (IEC 60062 style): "2.2k", "1M", "4k7", "4R7", "0R22"
 * (R = 1, k = 1e3, M = 1e6).  Writes *out only on success. */
bool lw_number_parse(const char *s, double *out);

/* Strict parse of a whole string as a decimal integer in [INT_MIN, INT_MAX]. */
bool lw_number_parse_int(const char *s, int *out);

/* The shortest decimal text that reads back as exactly v (at most 17
 * significant digits, "%g" style); "" for a non-finite v.  buf needs 32
 * bytes. */
void lw_number_format(char *buf, size_t size, double v);

#ifdef LW_LAYER
/* Inside the library only (locale_t is POSIX 2008, which a user of the
 * public headers need not ask for): switch the calling thread to the C
 * locale; returns what to restore with lw_number_locale_end (nesting is
 * fine). */
#include <locale.h>
locale_t lw_number_locale_begin(void);
void lw_number_locale_end(locale_t saved);
#endif

/* A logarithm kept beside its argument: lw_number_memo_log(m, x) is ln x,
 * read from the memo when x is the value it was made for and computed
 * otherwise, so a memo that went stale (its owner's value changed after
 * it was made) costs time, never accuracy.  For the constants of a light
 * that every solve needs (lw_light_update_factors makes them). */
typedef struct lw_number_memo {
    double x, log_x;
} lw_number_memo;

static inline lw_number_memo lw_number_memo_of(double x)
{
    return (lw_number_memo){x, x > 0.0 ? log(x) : NAN};
}

static inline double lw_number_memo_log(const lw_number_memo *m, double x)
{
    return x == m->x && x > 0.0 ? m->log_x : log(x);
}

#endif
