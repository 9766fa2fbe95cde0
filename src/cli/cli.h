/*
 * cli.h - the lampwick command line: what the command files share.
 *
 * Owns: the command and option tables (each command declares its options
 * once, with argument name and help line; getopt's table, the help text
 * and the parsing all come from that one table), exit codes, error
 * printing, the cell search path, and loading a profile with --mode and
 * --set.  The command line only parses, calls liblampwick and prints.
 *
 * Exit status: 0 success; 1 a valid run that gives no answer (a light that
 * gives no light, nothing fits, a numerical failure); 2 bad usage or bad
 * input, or output that could not be written.
 */
#ifndef LW_CLI_H
#define LW_CLI_H

#include <stdbool.h>
#include <stdint.h>
#include <stdio.h>
#include <lampwick/lampwick.h>

#define EXIT_NOANSWER 1
#define EXIT_BADINPUT 2

/* The whole program: signal handlers, the command, and the check that
 * standard output got everything (see cli_main.c). */
int lw_cli_main(int argc, char **argv);

/* One command line, without the process-wide set-up and checks (for tests
 * and the fuzzer, which run many in one process). */
int lw_cli_run(int argc, char **argv);

/* ---- option and command tables ---- */

enum {
    OPT_HELP = 'h',
    OPT_SET = 1000, OPT_MODE, OPT_FORMAT, OPT_TRACE, OPT_PLOT, OPT_VARY, OPT_THREADS,
    OPT_TARGET_MA, OPT_TARGET_LM, OPT_ESERIES, OPT_RUNTIME, OPT_FLUX, OPT_CELLS, OPT_MAXS,
    OPT_MAXP, OPT_TOP, OPT_STORED, OPT_COLUMNS, OPT_MODEL, OPT_JUNCTION, OPT_SECTION,
    OPT_LOAD_OHM, OPT_LOAD_MA, OPT_CUTOFF, OPT_RES, OPT_NAME, OPT_OUT, OPT_CHEM, OPT_RECH,
    OPT_TOL, OPT_USE, OPT_TOTAL, OPT_SPREAD, OPT_SAMPLES, OPT_SEED, OPT_TARGET, OPT_HIST,
    OPT_QUANTITY, OPT_RANKING, OPT_SAMPLES_OUT, OPT_SAMPLING, OPT_OUTPUT, OPT_QUIET
};

typedef struct cli_option {
    const char *name;  /* long name without the dashes */
    const char *arg;   /* argument shown in the help ("FILE.csv"); NULL: a flag */
    int id;            /* what getopt returns */
    const char *help;  /* one line (a second line may follow after "\n") */
} cli_option;

/* The short name of an option ('o' for --output, in every command that
 * has it), or 0. */
char cli_short_name(int id);

/* The options several commands share, as table rows. */
#define CLI_OPT_SET {"set", "SECTION.KEY=VALUE", OPT_SET, "override a profile value (repeatable)"}
#define CLI_OPT_MODE {"mode", "NAME", OPT_MODE, "apply the overrides of [mode NAME]"}
#define CLI_OPT_FORMAT                                                                          \
    {"format", "text|csv|md|json", OPT_FORMAT,                                                 \
     "output format (default text; json: one document,\ndocs/json.md)"}
#define CLI_OPT_THREADS                                                                         \
    {"threads", "N", OPT_THREADS, "worker threads (default: the cores this process may use)"}
#define CLI_OPT_USE                                                                             \
    {"use", "ON_H,OFF_H|FILE.csv", OPT_USE,                                                    \
     "use the light in sessions: ON_H hours every ON_H + OFF_H,\nor the sessions of a CSV "     \
     "(start_h,duration_h[,mode]);\nas [use] on_h/off_h or sessions_file"}
#define CLI_OPT_SAMPLES {"samples", "N", OPT_SAMPLES, "units to sample (default 10000)"}
#define CLI_OPT_SEED                                                                            \
    {"seed", "S", OPT_SEED,                                                                    \
     "seed of the random streams (default 1); the same seed\ngives the same output on any "     \
     "number of threads"}
#define CLI_OPT_QUIET                                                                           \
    {"quiet", NULL, OPT_QUIET,                                                                 \
     "no caution and no notes under the tables (text and md\non standard output; files keep "  \
     "them, JSON keeps both)"}
#define CLI_OPT_HELP {"help", NULL, OPT_HELP, "show this help"}
#define CLI_OPT_END {NULL, NULL, 0, NULL}

typedef struct cli_command {
    const char *name;           /* "run", "fit led" */
    const char *synopsis;       /* after "lampwick NAME " */
    const char *about;          /* what it does, a paragraph or two */
    const cli_option *options;  /* ends with CLI_OPT_END */
    const char *notes;          /* after the options; may be NULL */
    int (*run)(int argc, char **argv);
} cli_command;

/* The safety text every help ends with: "Safety" and lw_report_safety
 * wrapped and indented. */
void cli_safety(FILE *fp);

/* Write manual page `page` (lampwick.1, lampwick-profile.5 or
 * lampwick-cell.5) as roff, generated from the command and key tables
 * themselves (cli_man.c); 0, or 2 for an unknown page. */
int cli_man_write(const char *page, FILE *fp);

/* Every command, in the order of `lampwick help`. */
extern const cli_command cli_commands[];
extern const size_t cli_ncommands;

/* The command of that name, or NULL. */
const cli_command *cli_find(const char *name);

/* Write a command's help: usage, about, every option, notes. */
void cli_help(const cli_command *cmd, FILE *fp);

/* Parse argv against the command's table, calling on_option for each
 * option in order.  Returns 0 with *first set to the first operand, -1 when
 * --help was printed, or the exit code of a usage error (printed once, with
 * the offending option). */
typedef int (*cli_on_option)(void *ctx, int id, const char *arg);
int cli_parse(const cli_command *cmd, int argc, char **argv, cli_on_option fn, void *ctx,
              int *first);

/* ---- shared helpers ---- */

typedef struct common_opts {
    const char *sets[LW_PROFILE_OVERRIDES_MAX];
    size_t nsets;
    const char *mode;
    lw_rtable_format fmt;
    bool quiet;        /* -q: no caution and no notes on standard output */
    int threads;
    char use_sets[2][LW_PATH_MAX + 32]; /* --use as --set values */
    /* where the command writes its results (cli_out_open): standard output,
     * or for --format json a buffer of the tables, one JSON object a line,
     * that cli_out_close prints as one document */
    FILE *out;
    char *json;
    size_t json_len;
} common_opts;

/* Handle --set, --mode, --format, --threads, --use; returns 1 when the option is
 * not one of them, 0 when handled, or an exit code. */
int common_option(const char *cmd, common_opts *o, int id, const char *arg);

/* Open o->out for the command's results; 0, or an exit code. */
int cli_out_open(const char *cmd, common_opts *o);
/* Close o->out; for JSON print the document of the tables written (when
 * the command gave an answer: code 0, or 1 with results written) on
 * standard output.  Returns code, or an exit code of its own failure. */
int cli_out_close(common_opts *o, const char *cmd, const char *input, int code);

/* Handle --samples (2 to LW_MC_SAMPLES_MAX) and --seed (any 64-bit whole
 * number): 0, or the exit code of a usage error. */
int sample_option(const char *cmd, int id, const char *arg, size_t *samples, uint64_t *seed);

/* Print "lampwick: file:line: message" and return the exit code. */
int report_error(const lw_error *err);
/* Print a usage error once, with the hint to the command's help. */
int usage_error(const char *cmd, const char *fmt, ...)
#if defined(__GNUC__)
    __attribute__((format(printf, 2, 3)))
#endif
    ;
void build_search(lw_search *s);
/* Load a profile, apply --mode and --set, and resolve. */
lw_status load_profile(const char *path, const common_opts *o, lw_profile *prof, lw_error *err);
/* Write a chart as SVG to path, atomically. */
lw_status write_chart(const char *path, const lw_chart *chart, lw_error *err);
/* Parse a list of cells ("LR6-alkaline,HR6-nimh" or "all") into a
 * NULL-terminated array owned by *v. */
lw_status parse_cells(const char *list, const lw_profile *prof, lw_vary *v, const char ***cells,
                      lw_error *err);

/* Refuse outputs that are one of the inputs (the profile's files when prof
 * is given, and `inputs`) or the same file as another output.  outs[i] may
 * be NULL (option not given); names[i] is its option ("--trace"). */
lw_status check_outputs(const lw_profile *prof, const char *const *inputs, size_t ninputs,
                        const char *const *outs, const char *const *names, size_t n,
                        lw_error *err);

/* The commands. */
int cli_run(int argc, char **argv);
int cli_sweep(int argc, char **argv);
int cli_pick(int argc, char **argv);
int cli_size(int argc, char **argv);
int cli_table(int argc, char **argv);
int cli_fit_led(int argc, char **argv);
int cli_fit_cell(int argc, char **argv);
int cli_check(int argc, char **argv);
int cli_cells(int argc, char **argv);
int cli_spread(int argc, char **argv);
int cli_report(int argc, char **argv);

/* Their option tables and texts (in the file of each command). */
extern const cli_option cli_run_options[], cli_sweep_options[], cli_pick_options[],
    cli_size_options[], cli_table_options[], cli_fit_led_options[], cli_fit_cell_options[],
    cli_check_options[], cli_cells_options[], cli_spread_options[], cli_report_options[];

#endif
