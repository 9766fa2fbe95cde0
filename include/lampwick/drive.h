/*
 * drive.h - the drive elements that feed the LED strings, and their laws.
 *
 * Owns: lw_drive (a series resistor, a linear constant-current regulator or
 * a switching converter, with PWM and standby drain), the converter's
 * efficiency (constant or a table against input voltage) and the input side
 * of a converter: the input voltage and current at which it draws its
 * power from a source of EMF E behind a resistance R.  No I/O.
 *
 * Converter (docs/model.md): the LEDs are held at the set (or fallback)
 * current; the input power P_in = P_out/eta(V_in) + V_in*I_q is drawn from E
 * through R: (E - Ip*R)*(Ip - I_q) = P_out/eta.  With a constant eta that is
 * a quadratic (smaller root); with a table, eta is linear between its knots
 * and the highest root of the power balance is found exactly, piece by
 * piece (drive.c).  None: the source cannot deliver the power.
 */
#ifndef LW_DRIVE_H
#define LW_DRIVE_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

#include <stdbool.h>
#include "interp.h"

typedef enum lw_drive_type {
    LW_DRIVE_RESISTOR, LW_DRIVE_LINEAR_CC, LW_DRIVE_CONVERTER, LW_DRIVE_TYPE_COUNT
} lw_drive_type;

extern const char *const lw_drive_type_names[LW_DRIVE_TYPE_COUNT + 1];

typedef struct lw_drive {
    lw_drive_type type;
    double resistor_ohm;     /* series resistor per string, >= 0 */
    double tolerance_pct;    /* resistor tolerance, +- % */
    double rating_w;         /* resistor power rating, W (0: not given) */
    double regulator_rating_w; /* linear-cc: one string's regulator's power rating, W
                                  (0: not given) */
    double set_a;            /* regulated current per string, A */
    double dropout_v;        /* linear-cc: minimum headroom, V */
    double efficiency_pct;   /* converter: efficiency, % (when no table) */
    lw_interp *efficiency;    /* converter: input V -> efficiency %, or NULL */
    double quiescent_a;      /* converter: quiescent input current, A */
    double min_input_v;      /* converter: undervoltage lockout, V */
    double fallback_a;       /* converter: current after dropout, A (0: off) */
    double duty_pct;         /* PWM duty, 0 < duty <= 100 */
    double standby_a;        /* drain while switched off, A */
} lw_drive;

/* The converter's efficiency (fraction of 1) at input voltage vin: the
 * table's value (clamped at its ends) or efficiency_pct. */
double lw_drive_efficiency(const lw_drive *drive, double vin);

/* The input side of a converter at one moment. */
typedef struct lw_drive_input {
    bool ok;              /* false: the source cannot deliver the power */
    double vin_v;         /* converter input voltage, V */
    double ip_a;          /* on-state input current, A */
    double eta;           /* efficiency at vin_v (fraction of 1) */
    double supply_margin; /* (g_max - P_out/eta) 4R / E^2: >= 0 while the
                             source can feed it, <= 0 when it cannot (the
                             event function of the supply dropout) */
} lw_drive_input;

/* Solve the input side of a converter delivering p_out (W, on-state) from
 * EMF e_v through r_pack (ohm). */
lw_drive_input lw_drive_converter_input(const lw_drive *drive, double e_v, double r_pack,
                                        double p_out);

/* Pack current of a converter: the smaller root of
 * R*Ip^2 - (E + R*Iq)*Ip + (E*Iq + P) = 0, in cancellation-free form.
 * Returns false when there is no real root (the pack cannot deliver P). */
bool lw_drive_converter_input_current(double e_v, double r_ohm, double iq_a, double p_w,
                                double *ip_a);

#endif
