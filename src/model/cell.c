/*
 * cell.c - the cell model (see cell.h for the equations and their sources).
 */
#include "lampwick/cell.h"

#include <math.h>
#include <string.h>

const char *const lw_cell_chemistry_names[LW_CHEM_COUNT + 1] = {
    "alkaline", "nimh", "nicd", "li-fes2", "li-mno2", "li-ion", "lifepo4", "lead-acid", "other",
    NULL};

void lw_cell_clear(lw_cell *cell)
{
    if (!cell)
        return;
    lw_interp_free(cell->ocv);
    lw_interp_free(cell->res);
    lw_interp_free(cell->temp_capacity);
    lw_interp_free(cell->temp_resistance);
    cell->ocv = cell->res = cell->temp_capacity = cell->temp_resistance = NULL;
}

void lw_cell_copy(lw_cell *dst, const lw_cell *src)
{
    *dst = *src;
    lw_interp_ref(dst->ocv);
    lw_interp_ref(dst->res);
    lw_interp_ref(dst->temp_capacity);
    lw_interp_ref(dst->temp_resistance);
}

static double factor_at(const lw_interp *t, double temp_c, bool *outside)
{
    if (!t)
        return 1.0;
    if (temp_c < t->x[0] || temp_c > t->x[t->n - 1])
        *outside = true;
    return lw_interp_linear(t, temp_c);
}

void lw_cell_temperature_factors(const lw_cell *cell, double ambient_c, double *cap_factor,
                                 double *res_factor, bool *outside)
{
    bool out = false;
    *cap_factor = factor_at(cell->temp_capacity, ambient_c, &out);
    *res_factor = factor_at(cell->temp_resistance, ambient_c, &out);
    if (outside)
        *outside = out;
}

double lw_cell_capacity_ah(const lw_cell *cell, double ic_a, double cap_factor)
{
    /* k = 1: the rated capacity at every current (no rate effect). */
    if (cell->peukert == 1.0)
        return cap_factor * cell->capacity_ah;
    double c = cell->max_capacity_ah;
    if (ic_a > 0.0) {
        double p = cell->capacity_ah * exp((cell->peukert - 1.0) * log(cell->rated_a / ic_a));
        if (p < c)
            c = p;
    }
    return cap_factor * c;
}

double lw_cell_self_discharge_per_h(const lw_cell *cell)
{
    double s = cell->self_discharge_pct_month / 100.0;
    return s > 0.0 ? -log1p(-s) / 730.5 : 0.0;
}

bool lw_cell_chemistry_needs_endpoint(lw_chemistry chem)
{
    return chem == LW_CHEM_LI_ION || chem == LW_CHEM_LIFEPO4;
}
