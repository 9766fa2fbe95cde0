/*
 * error.h - lampwick's error record.
 *
 * Owns: struct lw_error (code, file, line, message) and the status codes
 * every library function returns.
 *
 * Convention: a function that can fail takes `lw_error *err` as its last
 * parameter and returns an lw_status.  The first error wins: once err->code is
 * set, later lw_error_set() calls leave it alone, so the message a user sees
 * names the root cause.  Setting an error never allocates.  `err` may be NULL.
 */
#ifndef LW_ERROR_H
#define LW_ERROR_H

/* layer 1, base (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 1
#error "base-layer header included from a lower layer"
#endif

#include <stdarg.h>
#include <stddef.h>

/* A status that must not be ignored: every lw_status-returning function
 * but lw_error_set carries it, so an unchecked status fails the build. */
#if defined(__GNUC__)
#define LW_MUST_CHECK __attribute__((warn_unused_result))
#else
#define LW_MUST_CHECK
#endif

typedef enum lw_status {
    LW_OK = 0,
    LW_ENOANSWER = 1, /* the input is valid but has no answer (never lit, nothing fits) */
    LW_EINPUT = 2,    /* bad input: file, key, value, option */
    LW_EIO = 3,       /* a file could not be read or written */
    LW_ENOMEM = 4,    /* out of memory */
    LW_ENUMERIC = 5   /* an iteration did not converge within its cap */
} lw_status;

/* Longest path lampwick handles, bytes with the NUL (longer ones are
 * refused, never cut); the file an error names is one. */
#define LW_PATH_MAX 512
#define LW_ERR_FILE_MAX LW_PATH_MAX
#define LW_ERR_MSG_MAX 512

typedef struct lw_error {
    lw_status code;              /* LW_OK while nothing has failed */
    char file[LW_ERR_FILE_MAX];  /* file or option the error is about; "" if none */
    int line;                    /* 1-based line in `file`; 0 if not about a line */
    char msg[LW_ERR_MSG_MAX];    /* one sentence, no trailing newline */
} lw_error;

/* Clear an error record (code LW_OK, empty strings). NULL is allowed. */
void lw_error_clear(lw_error *err);

/* Record an error unless one is already recorded (the first error wins).
 * `file` may be NULL.  Returns `code`, so callers can `return lw_error_set(...)`. */
lw_status lw_error_set(lw_error *err, lw_status code, const char *file, int line,
                       const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 6)))
#endif
    ;

/* The same with a va_list. */
lw_status lw_error_vset(lw_error *err, lw_status code, const char *file, int line,
                        const char *fmt, va_list ap)
#if defined(__GNUC__)
    __attribute__((format(printf, 5, 0)))
#endif
    ;

/* Format "file:line: message" (or "file: message", or "message") into buf,
 * with control characters and invalid UTF-8 shown as \xNN, so that no byte
 * of an input can steer the terminal it is printed on. */
void lw_error_format(const lw_error *err, char *buf, size_t size);

/* The process exit status for a status, as the command line uses it: 0
 * for LW_OK; 1 where a valid input has no answer here (no answer, no
 * convergence, out of memory); 2 for bad input or output that could not be
 * written. */
int lw_status_exit_code(lw_status st);

#endif
