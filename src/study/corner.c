/*
 * corner.c - the corners of a design (see corner.h).
 */
#include "lampwick/corner.h"

const char *const lw_corner_names[LW_CORNER_COUNT + 1] = {"nominal", "worst hot", "cold",
                                                          "end of run", NULL};

lw_status lw_corner_compute(const lw_light *light, const lw_result *run,
                     lw_corner out[LW_CORNER_COUNT], lw_error *err)
{
    for (int k = 0; k < LW_CORNER_COUNT; k++)
        out[k] = (lw_corner){.kind = (lw_corner_kind)k, .ambient_c = light->pack.ambient_c};
    lw_status st = lw_light_point(light, 0.0, false, &out[LW_CORNER_NOMINAL].pt, err);
    if (st == LW_OK)
        st = lw_run_worst_case(light, &out[LW_CORNER_HOT].pt, err);
    if (st != LW_OK)
        return st;
    lw_light cold = *light; /* shallow: tables borrowed */
    const lw_interp *t = light->pack.cell.temp_resistance;
    if (t) {
        cold.pack.ambient_c = t->x[0];
        out[LW_CORNER_COLD].ambient_c = t->x[0];
        out[LW_CORNER_COLD].from_table = true;
    }
    lw_light_update_factors(&cold, NULL);
    st = lw_light_point(&cold, 0.0, false, &out[LW_CORNER_COLD].pt, err);
    out[LW_CORNER_END].pt = run->final;
    return st;
}
