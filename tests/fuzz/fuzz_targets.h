/*
 * fuzz_targets.h - the fuzz targets of lampwick: every input it reads and
 * every text it writes.  Each takes the fuzzer's bytes; any outcome but a
 * crash, a hang, a leak or a sanitizer report is fine (errors come back as
 * lw_error and exit codes).
 *
 *   profile   a light profile, loaded with the bundled cells on its search
 *             path, then run, reported (text, CSV, Markdown), traced and
 *             charted, and its modes tabulated
 *   cell      a cell file with the bundled curve beside it, loaded and run
 *   csv       a CSV table of one kind (the first byte chooses: cell curve,
 *             temperature table, LED I-V, flux, efficiency, discharge log)
 *   args      a --set, --vary or --columns string (the first byte chooses)
 *             applied to the demo light
 *   cli       a scenario: a command line and the files it names (below),
 *             run by the command itself in a scratch folder
 *   writers   names and numbers into every writer: text, CSV and Markdown
 *             tables, an SVG chart, and a cell file that must read back
 *             exactly as written
 *
 * A cli scenario is text: the first line is the command line (words split
 * at spaces, the first one "lampwick"); then any number of files, each
 * introduced by a line "=== NAME" (NAME of letters, digits, '.', '-', '_').
 * No word may hold a '/', so a command only ever reads the scenario's own
 * files and the bundled cells, and writes in the scratch folder.
 */
#ifndef LW_FUZZ_TARGETS_H
#define LW_FUZZ_TARGETS_H

#include <stddef.h>
#include <stdint.h>

int fuzz_profile(const uint8_t *data, size_t size);
int fuzz_cell(const uint8_t *data, size_t size);
int fuzz_csv(const uint8_t *data, size_t size);
int fuzz_args(const uint8_t *data, size_t size);
int fuzz_cli(const uint8_t *data, size_t size);
int fuzz_writers(const uint8_t *data, size_t size);

typedef int (*fuzz_fn)(const uint8_t *data, size_t size);

/* The targets by name (the corpus folders bear these names). */
typedef struct fuzz_target {
    const char *name;
    fuzz_fn fn;
} fuzz_target;
extern const fuzz_target fuzz_targets[];
extern const size_t fuzz_ntargets;

#endif
