/*
 * cli_opts.c - the option machinery of the command line and the helpers
 * every command shares (see cli.h).
 */
#include "cli.h"
#include "lampwick/text.h"
#include "lampwick/number.h"

#include <getopt.h>
#include <inttypes.h>
#include <errno.h>
#include <limits.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include "lw_config.h"

char cli_short_name(int id)
{
    return id == OPT_OUTPUT ? 'o' : id == OPT_QUIET ? 'q' : 0;
}

const cli_command *cli_find(const char *name)
{
    for (size_t i = 0; i < cli_ncommands; i++)
        if (!strcmp(cli_commands[i].name, name))
            return &cli_commands[i];
    return NULL;
}

/* Width of the option column of the help. */
#define HELP_COLUMN 27

void cli_help(const cli_command *cmd, FILE *fp)
{
    fprintf(fp, "Usage: lampwick %s %s\n\n%s", cmd->name, cmd->synopsis, cmd->about);
    if (cmd->options && cmd->options[0].name)
        fputs("\nOptions\n", fp);
    for (const cli_option *o = cmd->options; o && o->name; o++) {
        char left[96];
        if (cli_short_name(o->id))
            snprintf(left, sizeof left, "  -%c, --%s%s%s", cli_short_name(o->id), o->name,
                     o->arg ? " " : "", o->arg ? o->arg : "");
        else
            snprintf(left, sizeof left, "  --%s%s%s", o->name, o->arg ? " " : "",
                     o->arg ? o->arg : "");
        if (o->id == OPT_HELP)
            snprintf(left, sizeof left, "  -h, --help");
        size_t w = strlen(left);
        fputs(left, fp);
        if (w + 1 >= HELP_COLUMN) {
            fputc('\n', fp);
            w = 0;
        }
        /* the help may hold several lines, each indented to the column */
        for (const char *h = o->help; *h;) {
            const char *nl = strchr(h, '\n');
            size_t len = nl ? (size_t)(nl - h) : strlen(h);
            fprintf(fp, "%*s%.*s\n", (int)(HELP_COLUMN - w), "", (int)len, h);
            w = 0;
            h += len + (nl ? 1 : 0);
        }
    }
    if (cmd->notes)
        fprintf(fp, "\n%s", cmd->notes);
}

int cli_parse(const cli_command *cmd, int argc, char **argv, cli_on_option fn, void *ctx,
              int *first)
{
    size_t n = 0;
    while (cmd->options[n].name)
        n++;
    struct option *lo = lw_calloc(n + 1, sizeof *lo);
    if (!lo) {
        fputs("lampwick: out of memory\n", stderr);
        return EXIT_NOANSWER;
    }
    for (size_t i = 0; i < n; i++)
        lo[i] = (struct option){cmd->options[i].name,
                                cmd->options[i].arg ? required_argument : no_argument, NULL,
                                cmd->options[i].id};
    char shorts[64] = ":h"; /* the short names, each with ':' when it takes an argument */
    for (size_t i = 0, k = 2; i < n && k + 3 < sizeof shorts; i++)
        if (cli_short_name(cmd->options[i].id)) {
            shorts[k++] = cli_short_name(cmd->options[i].id);
            if (cmd->options[i].arg)
                shorts[k++] = ':';
            shorts[k] = '\0';
        }
    opterr = 0; /* one message, ours */
    optind = 0;   /* 0, not 1: GNU getopt then starts over completely */
    int c, rc = 0;
    while (rc == 0 && (c = getopt_long(argc, argv, shorts, lo, NULL)) != -1) {
        for (size_t i = 0; i < n && c != OPT_HELP; i++)
            if (cli_short_name(cmd->options[i].id) && c == cli_short_name(cmd->options[i].id))
                c = cmd->options[i].id;
        const char *opt = optind > 0 && optind <= argc ? argv[optind - 1] : "?";
        if (c == '?') {
            if (optopt && optopt < 256)
                rc = usage_error(cmd->name, "unknown option '-%c'", optopt);
            else
                rc = usage_error(cmd->name, "unknown option '%s'", opt);
        } else if (c == ':') {
            rc = usage_error(cmd->name, "option '%s' needs an argument", opt);
        } else if (c == OPT_HELP) {
            cli_help(cmd, stdout);
            rc = -1;
        } else {
            rc = fn(ctx, c, optarg);
        }
    }
    free(lo);
    *first = optind;
    return rc;
}

int common_option(const char *cmd, common_opts *o, int id, const char *arg)
{
    switch (id) {
    case OPT_SET:
        if (o->nsets == sizeof o->sets / sizeof o->sets[0])
            return usage_error(cmd, "too many --set options (at most %zu)",
                               sizeof o->sets / sizeof o->sets[0]);
        o->sets[o->nsets++] = arg;
        return 0;
    case OPT_MODE:
        o->mode = arg;
        return 0;
    case OPT_QUIET:
        o->quiet = true;
        return 0;
    case OPT_FORMAT:
        if (!lw_rtable_format_parse(arg, &o->fmt))
            return usage_error(cmd, "--format takes text, csv, md or json");
        return 0;
    case OPT_USE: {
        /* ON_H,OFF_H: the periodic pattern; anything else a sessions file
         * (made absolute here: the profile's keys are relative to its folder) */
        const char *comma = strchr(arg, ',');
        char on[64];
        double a, b;
        if (comma && (size_t)(comma - arg) < sizeof on) {
            memcpy(on, arg, (size_t)(comma - arg));
            on[comma - arg] = '\0';
            if (!lw_number_parse_double(on, &a) || !lw_number_parse_double(comma + 1, &b) ||
                !(a > 0) || !(b >= 0))
                return usage_error(cmd, "--use takes ON_H,OFF_H (hours, ON_H above 0) or a "
                                        "sessions file");
            snprintf(o->use_sets[0], sizeof o->use_sets[0], "use.on_h=%s", on);
            snprintf(o->use_sets[1], sizeof o->use_sets[1], "use.off_h=%s", comma + 1);
        } else {
            char cwd[LW_PATH_MAX], abs[LW_PATH_MAX];
            if (arg[0] == '/')
                lw_text_copy(abs, arg, sizeof abs);
            else if (!getcwd(cwd, sizeof cwd) || !lw_path_join(abs, sizeof abs, cwd, arg))
                return usage_error(cmd, "--use: the path is too long");
            int n = snprintf(o->use_sets[0], sizeof o->use_sets[0], "use.sessions_file=%s", abs);
            if (n < 0 || (size_t)n >= sizeof o->use_sets[0])
                return usage_error(cmd, "--use: the path is too long");
            o->use_sets[1][0] = '\0';
        }
        for (int k = 0; k < 2; k++) {
            if (!o->use_sets[k][0])
                continue;
            if (o->nsets == sizeof o->sets / sizeof o->sets[0])
                return usage_error(cmd, "too many --set options (at most %zu)",
                                   sizeof o->sets / sizeof o->sets[0]);
            o->sets[o->nsets++] = o->use_sets[k];
        }
        return 0;
    }
    case OPT_THREADS:
        if (!lw_number_parse_int(arg, &o->threads) || o->threads < 1 ||
            o->threads > LW_POOL_THREADS_MAX)
            return usage_error(cmd, "--threads takes a whole number from 1 to %d",
                               LW_POOL_THREADS_MAX);
        return 0;
    default:
        return 1;
    }
}

int cli_out_open(const char *cmd, common_opts *o)
{
    o->out = stdout;
    if (o->fmt != LW_FMT_JSON)
        return 0;
    o->out = open_memstream(&o->json, &o->json_len);
    if (!o->out) {
        fprintf(stderr, "lampwick: %s: out of memory for the JSON output\n", cmd);
        return EXIT_NOANSWER;
    }
    return 0;
}

int cli_out_close(common_opts *o, const char *cmd, const char *input, int code)
{
    if (o->fmt != LW_FMT_JSON || !o->out)
        return code;
    bool failed = fclose(o->out) != 0;
    o->out = NULL;
    lw_error err;
    lw_error_clear(&err);
    if (failed && code == 0) {
        lw_error_set(&err, LW_ENOMEM, NULL, 0, "%s: out of memory for the JSON output", cmd);
        code = report_error(&err);
    }
    if (!failed && (code == 0 || (code == EXIT_NOANSWER && o->json_len))) {
        lw_jdoc *d = lw_jdoc_new(cmd, input, &err);
        lw_status st = d ? lw_jdoc_add_written(d, o->json, o->json_len, &err) : err.code;
        char *text = st == LW_OK ? lw_jdoc_print(d, &err) : NULL;
        if (text)
            fputs(text, stdout);
        else
            code = report_error(&err);
        free(text);
        lw_jdoc_free(d);
    }
    free(o->json);
    o->json = NULL;
    return code;
}

/* A whole number 0..max in decimal, no sign. */
static bool parse_u64(const char *s, uint64_t max, uint64_t *out)
{
    if (!s[0] || strspn(s, "0123456789") != strlen(s))
        return false;
    errno = 0;
    unsigned long long v = strtoull(s, NULL, 10);
    if (errno || v > max)
        return false;
    *out = v;
    return true;
}

int sample_option(const char *cmd, int id, const char *arg, size_t *samples, uint64_t *seed)
{
    uint64_t v;
    if (id == OPT_SAMPLES) {
        if (!parse_u64(arg, LW_MC_SAMPLES_MAX, &v) || v < 2)
            return usage_error(cmd, "--samples takes a whole number from 2 to %d",
                               LW_MC_SAMPLES_MAX);
        *samples = (size_t)v;
        return 0;
    }
    if (!parse_u64(arg, UINT64_MAX, seed))
        return usage_error(cmd, "--seed takes a whole number from 0 to %" PRIu64, UINT64_MAX);
    return 0;
}

int report_error(const lw_error *err)
{
    char buf[LW_ERR_FILE_MAX + LW_ERR_MSG_MAX + 32];
    lw_error_format(err, buf, sizeof buf);
    fprintf(stderr, "lampwick: %s\n", buf);
    return lw_status_exit_code(err->code);
}

int usage_error(const char *cmd, const char *fmt, ...)
{
    char msg[512], safe[2048];
    va_list ap;
    va_start(ap, fmt);
    /* va_start is above */
    // NOLINTNEXTLINE(clang-analyzer-valist.Uninitialized)
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    lw_text_escape(safe, sizeof safe, msg);
    fprintf(stderr, "lampwick %s: %s\nTry 'lampwick help %s'.\n", cmd, safe, cmd);
    return EXIT_BADINPUT;
}

static bool file_exists(const char *path)
{
    struct stat sb;
    return stat(path, &sb) == 0;
}

/* The source folder of the meson build folder `build`, from the build's
 * own record of it (meson-info/meson-info.json: "directories": {"source":
 * "..."}), so that lampwick run from a build folder finds the source tree's
 * cells while the binary carries no path of the build machine.  false when
 * there is no such record or the path is escaped beyond \\ and \". */
static bool build_source_root(const char *build, char *out, size_t size)
{
    char path[PATH_MAX + 32], buf[8192];
    snprintf(path, sizeof path, "%s/meson-info/meson-info.json", build);
    FILE *fp = fopen(path, "r");
    if (!fp)
        return false;
    size_t n = fread(buf, 1, sizeof buf - 1, fp);
    fclose(fp);
    buf[n] = '\0';
    const char *k = strstr(buf, "\"source\":");
    if (!k || !(k = strchr(k + 9, '"')))
        return false;
    size_t o = 0;
    for (k++; *k && *k != '"'; k++) {
        if (*k == '\\') {
            k++;
            if (*k != '\\' && *k != '"')
                return false;
        }
        if (o + 1 >= size)
            return false;
        out[o++] = *k;
    }
    out[o] = '\0';
    return *k == '"' && o > 0;
}

/* The cell search path: LAMPWICK_CELLS, the user's cells, the installed
 * library, and the source tree's cells/ when this executable runs from a
 * meson build folder (the executable itself, or in a folder of it). */
void build_search(lw_search *s)
{
    lw_search_default(s);
    char exe[PATH_MAX], dir[PATH_MAX], build[PATH_MAX + 4], probe[PATH_MAX + 32];
    ssize_t n = readlink("/proc/self/exe", exe, sizeof exe - 1);
    if (n <= 0)
        return;
    exe[n] = '\0';
    lw_path_dir(dir, sizeof dir, exe);
    snprintf(build, sizeof build, "%s", dir);
    snprintf(probe, sizeof probe, "%s/build.ninja", build);
    if (!file_exists(probe)) {
        snprintf(build, sizeof build, "%s/..", dir);
        snprintf(probe, sizeof probe, "%s/build.ninja", build);
        if (!file_exists(probe))
            return;
    }
    char source[PATH_MAX], cells[PATH_MAX + 8];
    if (build_source_root(build, source, sizeof source)) {
        snprintf(cells, sizeof cells, "%s/cells", source);
        lw_search_add(s, cells);
    }
}

lw_status load_profile(const char *path, const common_opts *o, lw_profile *prof, lw_error *err)
{
    lw_search search;
    build_search(&search);
    return lw_profile_load_variant(path, &search, o->mode, o->sets, o->nsets, prof, err);
}

static lw_status chart_fn(FILE *fp, const void *ctx, lw_error *err)
{
    return lw_plot_svg(fp, ctx, err);
}

lw_status write_chart(const char *path, const lw_chart *chart, lw_error *err)
{
    return lw_outfile_write(path, chart_fn, chart, err);
}

lw_status parse_cells(const char *list, const lw_profile *prof, lw_vary *v, const char ***cells,
                      lw_error *err)
{
    char arg[1024];
    if ((size_t)snprintf(arg, sizeof arg, "pack.cell=%s", list) >= sizeof arg)
        return lw_error_set(err, LW_EINPUT, "--cells", 0, "the list of cells is too long");
    lw_status st = lw_vary_parse(arg, prof, v, err);
    if (st != LW_OK)
        return st;
    if (v->note[0])
        fprintf(stderr, "lampwick: note: %s\n", v->note);
    const char **c = lw_calloc(v->n + 1, sizeof *c);
    if (!c)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    for (size_t i = 0; i < v->n; i++)
        c[i] = v->values[i];
    *cells = c;
    return LW_OK;
}

lw_status check_outputs(const lw_profile *prof, const char *const *inputs, size_t ninputs,
                        const char *const *outs, const char *const *names, size_t n,
                        lw_error *err)
{
    enum { MAX = 32 };
    char files[MAX][LW_PATH_MAX];
    const char *others[MAX + 16];
    size_t m = prof ? lw_profile_inputs(prof, files, MAX) : 0, k = 0;
    for (size_t i = 0; i < m; i++)
        others[k++] = files[i];
    for (size_t i = 0; i < ninputs && k < MAX; i++)
        others[k++] = inputs[i];
    lw_status st = LW_OK;
    for (size_t i = 0; i < n && st == LW_OK; i++) {
        if (!outs[i])
            continue;
        st = lw_outfile_check(outs[i], names[i], others, k, err);
        for (size_t j = 0; j < i && st == LW_OK; j++)
            if (outs[j]) {
                const char *pair[1] = {outs[j]};
                st = lw_outfile_check(outs[i], names[i], pair, 1, err);
                if (st != LW_OK)
                    break;
            }
    }
    return st;
}
