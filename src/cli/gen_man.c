/*
 * gen_man.c - writes one manual page (cli_man.c) for the build:
 * gen_man PAGE OUTPUT.
 */
#include "cli.h"

int main(int argc, char **argv)
{
    if (argc != 3) {
        fputs("usage: gen_man PAGE OUTPUT\n", stderr);
        return EXIT_BADINPUT;
    }
    FILE *fp = fopen(argv[2], "w");
    if (!fp) {
        perror(argv[2]);
        return EXIT_BADINPUT;
    }
    int rc = cli_man_write(argv[1], fp);
    if (fclose(fp) != 0 && rc == 0)
        rc = EXIT_BADINPUT;
    if (rc)
        fprintf(stderr, "gen_man: cannot write %s\n", argv[1]);
    return rc;
}
