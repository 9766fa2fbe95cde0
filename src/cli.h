/*
 * cli.h - the lampwick command line: argument parsing, printing, exit codes.
 *
 * Exit status: 0 success; 1 a valid run that gives no answer (a light that
 * never lights, nothing fits, a numerical failure); 2 bad usage or bad input.
 */
#ifndef LW_CLI_H
#define LW_CLI_H

int lw_cli_main(int argc, char **argv);

#endif
