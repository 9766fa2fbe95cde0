/*
 * jsondoc.h - a command's results as one JSON document.
 *
 * Owns: lw_jdoc, which gathers the tables a command writes into
 *
 *   {"lampwick": "0.1.0", "format": 1, "command": "run",
 *    "input": "profiles/demo.ini" or null, "caution": "...",
 *    "tables": [{"title", "columns", "rows", "notes"}, ...]}
 *
 * and prints it (RFC 8259 JSON, UTF-8, a table a line; numbers in full
 * precision: CSV's text, the shortest that reads back to the same double).  The
 * schema of each command's document is in docs/schema/COMMAND.schema.json
 * (docs/json.md).  JSON is written with cJSON (MIT).
 */
#ifndef LW_JSONDOC_H
#define LW_JSONDOC_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include <stddef.h>
#include "error.h"
#include "rtable.h"

/* Version of the document's shape ("format"): raised when a field's
 * meaning changes or one is removed; new fields and columns keep it. */
#define LW_JDOC_FORMAT 1

typedef struct lw_jdoc lw_jdoc;

/* A document for `command` ("run", "fit led") of the file it read, a
 * profile or a measurements file (`input`, NULL: none); NULL when out of
 * memory. */
lw_jdoc *lw_jdoc_new(const char *command, const char *input, lw_error *err);
void lw_jdoc_free(lw_jdoc *d);

LW_MUST_CHECK lw_status lw_jdoc_add_table(lw_jdoc *d, const lw_rtable *t, lw_error *err);

/* Add the tables that lw_rtable_write wrote as JSON into text[0 .. len-1]
 * (one object a line); LW_EIO if anything else is there. */
LW_MUST_CHECK lw_status lw_jdoc_add_written(lw_jdoc *d, const char *text, size_t len,
                                            lw_error *err);

/* Mark the document failed: "error": {"status", "file", "line",
 * "message"}, status the command line's exit code for err->code. */
LW_MUST_CHECK lw_status lw_jdoc_set_error(lw_jdoc *d, const lw_error *failure, lw_error *err);

/* The document as text, indented, ending in a newline; free() it. */
LW_MUST_CHECK char *lw_jdoc_print(const lw_jdoc *d, lw_error *err);

#endif
