/*
 * api.c - whole answers as JSON text for other languages (see api.h).
 */
#include "lampwick/api.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/engine.h"
#include "lampwick/jsondoc.h"
#include "lampwick/profile.h"
#include "lampwick/report.h"
#include "lampwick/search.h"
#include "lampwick/text.h"

char *lw_api_run_json(const char *profile_path, const char *mode, const char *const *sets,
                      size_t nsets)
{
    lw_error err, derr;
    lw_error_clear(&err);
    lw_error_clear(&derr);
    lw_status st = profile_path ? LW_OK
                                : lw_error_set(&err, LW_EINPUT, NULL, 0, "no profile given");
    lw_search search;
    lw_search_default(&search);
    lw_profile prof;
    memset(&prof, 0, sizeof prof);
    if (st == LW_OK)
        st = lw_profile_load_variant(profile_path, &search, mode && mode[0] ? mode : NULL, sets,
                                     nsets, &prof, &err);
    lw_result res = {0};
    if (st == LW_OK) {
        lw_run_options opt = lw_run_options_default();
        st = lw_run(&prof.light, &opt, &res, &err);
        if (st != LW_OK && !err.file[0]) /* a numerical failure: say which profile */
            lw_text_copy(err.file, prof.path, sizeof err.file);
    }
    /* the tables as `run --format json` writes them, gathered */
    char *buf = NULL;
    size_t len = 0;
    FILE *mem = st == LW_OK ? open_memstream(&buf, &len) : NULL;
    if (st == LW_OK && !mem)
        st = lw_error_set(&err, LW_ENOMEM, NULL, 0, "out of memory for the JSON output");
    if (st == LW_OK)
        st = lw_report_run_with_corners(mem, LW_FMT_JSON, false, &prof, &res, &err);
    if (mem && fclose(mem) != 0 && st == LW_OK)
        st = lw_error_set(&err, LW_ENOMEM, NULL, 0, "out of memory for the JSON output");
    lw_jdoc *d = lw_jdoc_new("run", profile_path, &derr);
    lw_status dst = d ? LW_OK : LW_ENOMEM;
    if (dst == LW_OK && st == LW_OK)
        st = lw_jdoc_add_written(d, buf, len, &err);
    if (dst == LW_OK && st != LW_OK)
        dst = lw_jdoc_set_error(d, &err, &derr);
    char *text = dst == LW_OK ? lw_jdoc_print(d, &derr) : NULL;
    lw_jdoc_free(d);
    free(buf);
    lw_run_result_clear(&res);
    lw_profile_clear(&prof);
    return text;
}

void lw_api_free(char *text)
{
    free(text);
}
