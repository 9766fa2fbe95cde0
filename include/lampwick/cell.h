/*
 * cell.h - the cell model: open-circuit voltage and internal resistance
 * against depth of discharge, rate-dependent capacity, temperature factors.
 *
 * Owns: lw_cell (one cell type, as read from a cell file) and the pure
 * functions of the model.  No I/O here: cellfile.c reads cell files.
 *
 * Units: SI inside (V, A, ohm, Ah, h); depth of discharge d is a fraction
 * 0..1 of the effective capacity; temperatures in degrees Celsius.
 *
 * Model (docs/model.md):
 *   OCV(d), R(d): linear interpolation in d between the curve's points,
 *     clamped at the ends.  At an ambient temperature the resistance is
 *     multiplied by the resistance factor of the temperature table and every
 *     capacity by its capacity factor (factors interpolated linearly in
 *     temperature, clamped; 1 without a table).  OCV is not scaled.
 *   C_eff(Ic) = kc * min(Cmax, C * (I_rated / Ic)^(k - 1)): Peukert's law
 *     (W. Peukert, Elektrotechnische Zeitschrift 18, 1897) referred to the
 *     rated current, capped at the low-drain capacity Cmax.
 *   Kinetic cells (rate_model = kinetic): no Peukert's law; C = kc * Cmax in
 *     two wells (lw_cell_kinetic_capacity_ah; the run in time holds them).
 *   dd/dt = Ic / C_eff(Ic) + lambda * (1 - d): the current, plus self-discharge
 *     of the charge left at lambda = -ln(1 - s/100) / 730.5 h for s % a month
 *     (so that a month on the shelf keeps 1 - s/100 of the charge).
 */
#ifndef LW_CELL_H
#define LW_CELL_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include "interp.h"
#include "number.h"

#define LW_NAME_MAX 64

typedef enum lw_chemistry {
    LW_CHEM_ALKALINE, LW_CHEM_NIMH, LW_CHEM_NICD, LW_CHEM_LI_FES2, LW_CHEM_LI_MNO2,
    LW_CHEM_LI_ION, LW_CHEM_LIFEPO4, LW_CHEM_LEAD_ACID, LW_CHEM_OTHER, LW_CHEM_COUNT
} lw_chemistry;

/* Names as written in cell files ("alkaline", "nimh", ..., "other"). */
extern const char *const lw_cell_chemistry_names[LW_CHEM_COUNT + 1];

/* How the capacity depends on the current and on rest: Peukert's law, or
 * the kinetic battery model (J. F. Manwell and J. G. McGowan, Solar Energy
 * 50(5):399-405, 1993): two wells of charge, the available one feeding the
 * load and refilled from the bound one at a rate set by the difference of
 * their heights.  docs/model.md, "The kinetic battery model". */
typedef enum lw_rate_model { LW_RATE_PEUKERT, LW_RATE_KINETIC, LW_RATE_COUNT } lw_rate_model;

/* Names as written in cell files ("peukert", "kinetic"). */
extern const char *const lw_cell_rate_model_names[LW_RATE_COUNT + 1];

typedef struct lw_cell {
    char name[LW_NAME_MAX];        /* e.g. "LR6-alkaline" */
    char path[LW_PATH_MAX];        /* cell file it came from, for messages */
    char curve_path[LW_PATH_MAX];  /* its curve CSV, "" when built in code */
    char temperature_path[LW_PATH_MAX]; /* its temperature CSV, or "" */
    lw_chemistry chemistry;
    double nominal_v;              /* V, nameplate */
    double capacity_ah;            /* Ah delivered at rated_a to cutoff_v, 20 C */
    double rated_a;                /* A, current of the capacity rating, > 0 */
    double peukert;                /* Peukert exponent k, 1 <= k <= 2 */
    double max_capacity_ah;        /* Ah, low-drain cap, >= capacity_ah */
    double cutoff_v;               /* V, end-point voltage of the rating */
    bool rechargeable;
    double mass_g;                 /* g, 0 when not given */
    double self_discharge_pct_month; /* % of capacity lost per month at 20 C */
    lw_rate_model rate_model;      /* Peukert's law (default) or the kinetic model */
    double kinetic_c;              /* kinetic: the available well's share c, 0 < c < 1
                                      (NAN when not given) */
    double kinetic_k_per_h;        /* kinetic: k' = k / (c (1 - c)), 1/h, > 0 (NAN when
                                      not given) */
    lw_interp *ocv;                 /* depth fraction -> open-circuit V, non-increasing */
    lw_interp *res;                 /* depth fraction -> internal ohm, > 0 */
    lw_interp *temp_capacity;       /* deg C -> capacity factor, or NULL */
    lw_interp *temp_resistance;     /* deg C -> resistance factor, or NULL */
    lw_number_memo memo_rated;      /* ln rated_a (made by lw_cell_prepare) */
    double memo_sd_pct, memo_sd_per_h; /* self-discharge: the rate per hour made
                                      for the monthly figure memo_sd_pct */
} lw_cell;

/* Drop the tables a cell holds (it does not free the struct itself). */
void lw_cell_clear(lw_cell *cell);

/* Deep-enough copy: the tables are shared by reference. */
void lw_cell_copy(lw_cell *dst, const lw_cell *src);

/* Keep the derived constants every solve needs (a stale one, after a field
 * changed, costs time only). */
void lw_cell_prepare(lw_cell *cell);

/* Capacity and resistance factors at ambient_c (1 without a table; clamped
 * to the table's end values outside its range). *outside is set true when
 * ambient_c lies outside a table's range. */
void lw_cell_temperature_factors(const lw_cell *cell, double ambient_c, double *cap_factor,
                                 double *res_factor, bool *outside);

/* Effective capacity (Ah) at per-cell current ic_a (>= 0): Peukert's law
 * against the rated point, capped at the low-drain capacity, times cap_factor.
 * At ic_a == 0 it is the cap. */
double lw_cell_capacity_ah(const lw_cell *cell, double ic_a, double cap_factor);

/* The same with ln(ic_a) given (NAN: not known), for the power law. */
double lw_cell_capacity_ah_at(const lw_cell *cell, double ic_a, double log_ic, double cap_factor);

/* Does the cell follow the kinetic model? */
bool lw_cell_is_kinetic(const lw_cell *cell);

/* The kinetic model's charge delivered at a constant per-cell current i_a
 * from full until the available well is empty, Ah, for total capacity
 * c_ah (the closed form of Manwell and McGowan: the time T at which
 * c C - c I T - (I / k') (1 - c) (1 - exp(-k' T)) = 0, times I). */
double lw_cell_kinetic_capacity_ah(double c_ah, double c, double k_per_h, double i_a);

/* Self-discharge rate lambda in 1/h from self_discharge_pct_month s:
 * -ln(1 - s/100) / 730.5 h (730.5 h = an average month); 0 for s = 0. */
double lw_cell_self_discharge_per_h(const lw_cell *cell);

/* True for chemistries whose cells must not be discharged past the maker's
 * end-point voltage (lithium-ion, LiFePO4): the over-discharge warning. */
bool lw_cell_chemistry_needs_endpoint(lw_chemistry chem);

#endif
