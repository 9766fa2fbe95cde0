/*
 * api.h - liblampwick for other languages: whole answers as JSON text, no
 * structures to lay out.
 *
 * Owns: lw_api_run_json and lw_api_free.  A caller in Python (ctypes), Lua,
 * Julia or any language with a C foreign-function interface passes strings
 * and gets a string back; docs/examples/run_light.py is the Python example
 * (CI runs it against the built library).
 */
#ifndef LW_API_H
#define LW_API_H

/* layer 5, report (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 5
#error "report-layer header included from a lower layer"
#endif

#include <stddef.h>

/* Run the light of the profile at profile_path as `lampwick run
 * --format json` does: mode (NULL or "" for none) and sets[0 .. nsets-1]
 * ("section.key=value" overrides, as --set) applied, cells looked up in
 * lw_search_default's folders.  Returns the JSON document (jsondoc.h,
 * docs/schema/run.schema.json), or on a failure the document with no tables
 * and an "error" object {"status", "file", "line", "message"} (status as
 * the command line's exit codes: 1 no answer, 2 bad input).  NULL only when
 * out of memory.  Free the text with lw_api_free. */
char *lw_api_run_json(const char *profile_path, const char *mode, const char *const *sets,
                      size_t nsets);

/* Free a text lw_api_run_json returned (NULL-safe). */
void lw_api_free(char *text);

#endif
