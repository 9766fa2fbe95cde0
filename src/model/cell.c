/*
 * cell.c - the cell model (see cell.h for the equations and their sources).
 */
#include "lampwick/cell.h"

#include <math.h>
#include <stddef.h>
#include <string.h>
#include "lampwick/roots.h"

const char *const lw_cell_chemistry_names[LW_CHEM_COUNT + 1] = {
    "alkaline", "nimh", "nicd", "li-fes2", "li-mno2", "li-ion", "lifepo4", "lead-acid", "other",
    NULL};

const char *const lw_cell_rate_model_names[LW_RATE_COUNT + 1] = {"peukert", "kinetic", NULL};

bool lw_cell_is_kinetic(const lw_cell *cell)
{
    return cell->rate_model == LW_RATE_KINETIC;
}

typedef struct kinetic_q {
    double c_ah, c, k_per_h, i_a;
} kinetic_q;

/* The available well's charge at time t_h of a constant current from full
 * (Manwell and McGowan, as restated by M. R. Jongerden and B. R.
 * Haverkort, IET Software 3(6), 2009): c C - c I t - (I / k')(1 - c)(1 - e^-k't). */
static double kinetic_available(double t_h, void *ctx)
{
    const kinetic_q *q = ctx;
    return q->c * q->c_ah - q->c * q->i_a * t_h -
           q->i_a / q->k_per_h * (1.0 - q->c) * -expm1(-q->k_per_h * t_h);
}

double lw_cell_kinetic_capacity_ah(double c_ah, double c, double k_per_h, double i_a)
{
    if (!(i_a > 0.0))
        return c_ah;
    kinetic_q q = {c_ah, c, k_per_h, i_a};
    /* the well falls (its slope is -c I - (1 - c) I e^-k't < 0) from c C at
     * 0 to below 0 at C / I, when all the charge would be gone */
    double b = c_ah / i_a, fb = kinetic_available(b, &q), t = b;
    lw_error e;
    if (fb < 0.0 && lw_root_brent(kinetic_available, &q, 0.0, b, c * c_ah, fb, 1e-15 * b, 200,
                                  &t, &e) != LW_OK)
        t = NAN;
    return i_a * t;
}

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

void lw_cell_prepare(lw_cell *cell)
{
    cell->memo_rated = lw_number_memo_of(cell->rated_a);
    cell->memo_sd_pct = NAN;
    cell->memo_sd_per_h = lw_cell_self_discharge_per_h(cell);
    cell->memo_sd_pct = cell->self_discharge_pct_month;
}

double lw_cell_capacity_ah(const lw_cell *cell, double ic_a, double cap_factor)
{
    return lw_cell_capacity_ah_at(cell, ic_a, NAN, cap_factor);
}

double lw_cell_capacity_ah_at(const lw_cell *cell, double ic_a, double log_ic, double cap_factor)
{
    /* the kinetic model's wells hold the low-drain capacity; the rate effect
     * is theirs */
    if (lw_cell_is_kinetic(cell))
        return cap_factor * cell->max_capacity_ah;
    /* k = 1: the rated capacity at every current (no rate effect). */
    if (cell->peukert == 1.0)
        return cap_factor * cell->capacity_ah;
    double c = cell->max_capacity_ah;
    if (ic_a > 0.0) {
        if (!isfinite(log_ic))
            log_ic = log(ic_a);
        double lr = lw_number_memo_log(&cell->memo_rated, cell->rated_a) - log_ic;
        double p = cell->capacity_ah * exp((cell->peukert - 1.0) * lr);
        if (p < c)
            c = p;
    }
    return cap_factor * c;
}

double lw_cell_self_discharge_per_h(const lw_cell *cell)
{
    if (cell->self_discharge_pct_month == cell->memo_sd_pct)
        return cell->memo_sd_per_h;
    double s = cell->self_discharge_pct_month / 100.0;
    return s > 0.0 ? -log1p(-s) / 730.5 : 0.0;
}

bool lw_cell_chemistry_needs_endpoint(lw_chemistry chem)
{
    return chem == LW_CHEM_LI_ION || chem == LW_CHEM_LIFEPO4;
}
