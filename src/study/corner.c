/*
 * corner.c - the corners of a design (see corner.h).  deg C, A, W, h.
 */
#include "lampwick/corner.h"

#include <math.h>

const char *const lw_corner_names[LW_CORNER_COUNT + 1] = {"nominal", "worst hot", "cold",
                                                          "end of run", NULL};

/* A shallow copy of light (tables borrowed) at ambient t_c. */
static lw_light at_ambient(const lw_light *light, double t_c)
{
    lw_light l = *light;
    l.pack.ambient_c = t_c;
    lw_light_update_factors(&l, NULL);
    return l;
}

lw_status lw_corner_compute(const lw_light *light, const lw_result *run,
                            lw_corner out[LW_CORNER_COUNT], lw_error *err)
{
    const lw_pack *pk = &light->pack;
    for (int k = 0; k < LW_CORNER_COUNT; k++)
        out[k] = (lw_corner){.kind = (lw_corner_kind)k, .ambient_c = pk->ambient_c,
                             .runtime_h = NAN, .flux_30s_lm = NAN};
    out[LW_CORNER_NOMINAL].runtime_h = run->runtime_h;
    out[LW_CORNER_NOMINAL].flux_30s_lm = run->flux_30s_lm;
    lw_status st = lw_light_point(light, 0.0, false, &out[LW_CORNER_NOMINAL].pt, err);
    /* worst hot: at the range's hottest ambient */
    lw_light hot = *light;
    if (pk->ambient_range) {
        hot = at_ambient(light, pk->ambient_hi_c);
        out[LW_CORNER_HOT].ambient_c = pk->ambient_hi_c;
        out[LW_CORNER_HOT].from_range = true;
    }
    if (st == LW_OK)
        st = lw_run_worst_case(&hot, &out[LW_CORNER_HOT].pt, err);
    if (st != LW_OK)
        return st;
    /* cold: the range's lowest ambient, else the cell table's lowest */
    const lw_interp *t = pk->cell.temp_resistance;
    double cold_c = pk->ambient_c;
    if (pk->ambient_range) {
        cold_c = pk->ambient_lo_c;
        out[LW_CORNER_COLD].from_range = true;
    } else if (t) {
        cold_c = t->x[0];
        out[LW_CORNER_COLD].from_table = true;
    }
    out[LW_CORNER_COLD].ambient_c = cold_c;
    lw_light cold = at_ambient(light, cold_c);
    st = lw_light_point(&cold, 0.0, false, &out[LW_CORNER_COLD].pt, err);
    lw_result r;
    if (st == LW_OK && (st = lw_run(&cold, NULL, &r, err)) == LW_OK) {
        out[LW_CORNER_COLD].runtime_h = r.runtime_h;
        out[LW_CORNER_COLD].flux_30s_lm = r.flux_30s_lm;
        lw_run_result_clear(&r);
    }
    out[LW_CORNER_END].pt = run->final;
    return st;
}
