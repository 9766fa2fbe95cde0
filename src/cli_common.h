/*
 * cli_common.h - helpers shared by the command-line modules (cli.c,
 * cli_design.c): exit codes, error printing, the cell search path, the
 * options every command takes, and profile loading with --mode and --set.
 */
#ifndef LW_CLI_COMMON_H
#define LW_CLI_COMMON_H

#include <stdbool.h>
#include "lampwick.h"

#define EXIT_NOANSWER 1
#define EXIT_BADINPUT 2

typedef struct common_opts {
    const char *sets[64];
    size_t nsets;
    const char *mode;
    lw_format fmt;
} common_opts;

enum {
    OPT_SET = 1000, OPT_MODE, OPT_FORMAT, OPT_TRACE, OPT_PLOT, OPT_VARY, OPT_THREADS,
    OPT_TARGET_MA, OPT_TARGET_LM, OPT_SERIES, OPT_RUNTIME, OPT_FLUX, OPT_CELLS, OPT_MAXS,
    OPT_MAXP, OPT_TOP, OPT_STORED, OPT_COLUMNS
};

int exit_code(lw_status st);
int report_error(const lw_error *err);
int usage_error(const char *cmd, const char *msg);
void build_search(lw_search *s);
bool common_option(int c, common_opts *o, const char *cmd, int *rc);
lw_status load_profile(const char *path, const common_opts *o, lw_profile *prof, lw_error *err);
/* Write a chart as SVG to path, atomically. */
lw_status write_chart(const char *path, const lw_chart *chart, lw_error *err);

/* Commands of cli_design.c and their help texts. */
int lw_cmd_sweep(int argc, char **argv);
int lw_cmd_pick(int argc, char **argv);
int lw_cmd_size(int argc, char **argv);
int lw_cmd_table(int argc, char **argv);
int lw_cmd_fit(int argc, char **argv);
extern const char *const lw_sweep_help, *const lw_pick_help, *const lw_size_help,
    *const lw_table_help, *const lw_fit_help;

#endif
