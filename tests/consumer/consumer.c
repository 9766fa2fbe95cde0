/*
 * consumer.c - a program outside the project that uses the installed
 * liblampwick through pkg-config: load the demo profile from the installed
 * data (the cells from pkg-config's cellsdir) and run it.  It includes
 * glibc's <error.h> beside <lampwick/lampwick.h> and calls error(): the
 * library's headers live under lampwick/ and put no generic name on the
 * include path.  Built and run by .ci/run after `meson install`.
 */
#define _GNU_SOURCE /* error() */
#include <error.h>
#include <lampwick/lampwick.h>
#include <stdio.h>
#include <string.h>

int main(int argc, char **argv)
{
    if (argc != 3)
        return 2;
    lw_search search;
    memset(&search, 0, sizeof search);
    lw_search_add(&search, argv[2]);
    lw_profile prof;
    lw_error err;
    lw_error_clear(&err);
    if (lw_profile_load(argv[1], &search, &prof, &err) != LW_OK)
        error(1, 0, "%s:%d: %s", err.file, err.line, err.msg); /* glibc's error() */
    lw_result res;
    lw_run_options opt = lw_run_options_default();
    lw_status st = lw_run(&prof.light, &opt, &res, &err);
    if (st == LW_OK)
        printf("%s: %.2f h to %s\n", prof.light.name, res.runtime_h,
               lw_run_end_names[res.end_reason]);
    lw_run_result_clear(&res);
    lw_profile_clear(&prof);
    return st == LW_OK && res.runtime_h > 0 ? 0 : 1;
}
