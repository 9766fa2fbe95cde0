/*
 * testutil.h - helpers shared by the cmocka tests.
 *
 * cmocka 1.1.5 (Debian 12) compares assert_float_equal as float, so doubles
 * are checked with assert_close (relative) and assert_near (absolute).
 */
#ifndef LW_TESTUTIL_H
#define LW_TESTUTIL_H

#include <math.h>
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>
#include <cmocka.h>

#define assert_close(got, want, rel)                                                           \
    do {                                                                                       \
        double g_ = (got), w_ = (want);                                                        \
        if (!(fabs(g_ - w_) <= (rel) * fabs(w_)))                                              \
            fail_msg("%s = %.17g, want %.17g (rel %.3g)", #got, g_, w_,                        \
                     w_ != 0 ? fabs(g_ - w_) / fabs(w_) : fabs(g_));                           \
    } while (0)

#define assert_near(got, want, abs_tol)                                                        \
    do {                                                                                       \
        double g_ = (got), w_ = (want);                                                        \
        if (!(fabs(g_ - w_) <= (abs_tol)))                                                     \
            fail_msg("%s = %.17g, want %.17g (+- %g)", #got, g_, w_, (double)(abs_tol));       \
    } while (0)

/* Assert that an lw_error names `file_suffix`, `line` and contains `text`. */
#define assert_error_at(err, file_suffix, line_, text)                                         \
    do {                                                                                       \
        const char *f_ = (err).file;                                                           \
        size_t lf_ = strlen(f_), ls_ = strlen(file_suffix);                                    \
        if (lf_ < ls_ || strcmp(f_ + lf_ - ls_, (file_suffix)) != 0)                           \
            fail_msg("error file '%s' does not end in '%s' (msg: %s)", f_, (file_suffix),      \
                     (err).msg);                                                               \
        if ((err).line != (line_))                                                             \
            fail_msg("error line %d, want %d (msg: %s)", (err).line, (line_), (err).msg);      \
        if (!strstr((err).msg, (text)))                                                        \
            fail_msg("error message '%s' lacks '%s'", (err).msg, (text));                      \
    } while (0)

#endif
