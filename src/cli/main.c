/*
 * main.c - entry point of the lampwick command; everything is in cli.c.
 */
#include "cli.h"

int main(int argc, char **argv)
{
    return lw_cli_main(argc, argv);
}
