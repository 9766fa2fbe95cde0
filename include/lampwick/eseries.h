/*
 * eseries.h - preferred numbers for resistors (IEC 60063:2015, the E-series)
 * and resistance values as people write them.
 *
 * Owns: the E3, E6, E12, E24, E48, E96 and E192 tables, their usual
 * tolerances, and listing the values of a series within a range.
 *
 * E3 to E24 are the published lists, eight of whose E24 values (2.7 3.0 3.3
 * 3.6 3.9 4.3 4.7 8.2) differ from rounding 10^(i/24).  E192 is the published
 * list (three significant figures of 10^(i/192), except 9.20 at i = 185);
 * E96 and E48 are every second and every fourth of its values, as the
 * standard builds them.
 */
#ifndef LW_ESERIES_H
#define LW_ESERIES_H

/* layer 1, base (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 1
#error "base-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include <stddef.h>

/* Series size (3, 6, 12, 24, 48, 96, 192) from "E24" etc.; false if not one. */
bool lw_eseries_parse(const char *name, int *n);

/* The mantissas of series n in [1, 10), ascending; returns the count (0 for
 * an unknown n).  `out` needs room for n values. */
size_t lw_eseries_mantissas(int n, double *out);

/* Usual tolerance of the series, % (E3 40, E6 20, E12 10, E24 5, E48 2,
 * E96 1, E192 0.5). */
double lw_eseries_tolerance_pct(int n);

/* All values of series n in [lo, hi] (inclusive, to 1e-9 relative),
 * ascending; writes at most cap and returns how many there are. */
size_t lw_eseries_range(int n, double lo, double hi, double *out, size_t cap);

/* The series value nearest to v at or above it (round_up) or at or below. */
double lw_eseries_round(int n, double v, bool round_up);


#endif
