/*
 * test_cli.c - the command line's option tables: every option a command
 * accepts is in its help, and every option in its help is accepted (both
 * come from one table, so this checks the generation and the parsing).
 */
#include "testutil.h"
#include <stdlib.h>
#include "cli.h"

static int accept_all(void *ctx, int id, const char *arg)
{
    (void)arg;
    int *seen = ctx;
    (*seen)++;
    return id == 0; /* never: ids are never 0 */
}

static void every_option_is_in_the_help_and_accepted(void **state)
{
    (void)state;
    for (size_t c = 0; c < cli_ncommands; c++) {
        const cli_command *cmd = &cli_commands[c];
        char *text = NULL;
        size_t len = 0;
        FILE *fp = open_memstream(&text, &len);
        assert_non_null(fp);
        cli_help(cmd, fp);
        fclose(fp);
        assert_non_null(strstr(text, cmd->synopsis));
        size_t nopt = 0;
        for (const cli_option *o = cmd->options; o->name; o++, nopt++) {
            char want[80];
            snprintf(want, sizeof want, "--%s", o->name);
            if (!strstr(text, want))
                fail_msg("'lampwick help %s' does not list %s", cmd->name, want);
            if (o->id == OPT_HELP)
                continue;
            /* the parser takes it (with an argument when it needs one) */
            char opt[80], *argv[4] = {(char *)"lampwick", opt, (char *)"x", NULL};
            snprintf(opt, sizeof opt, "--%s", o->name);
            int seen = 0, first = 0;
            int argc = o->arg ? 3 : 2;
            int rc = cli_parse(cmd, argc, argv, accept_all, &seen, &first);
            if (rc != 0 || seen != 1)
                fail_msg("%s %s: parse gave %d after %d options", cmd->name, opt, rc, seen);
        }
        assert_true(nopt > 0);
        /* and an option of no table is refused with exit status 2 */
        char *bad[] = {(char *)"lampwick", (char *)"--no-such-option", NULL};
        int seen = 0, first = 0;
        assert_int_equal(cli_parse(cmd, 2, bad, accept_all, &seen, &first), EXIT_BADINPUT);
        free(text);
    }
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(every_option_is_in_the_help_and_accepted),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
