/*
 * fixture.h - a small light written to the scratch folder: a flat cell
 * (OCV 3.0 V, 0.5 ohm at every depth, 2 Ah at 0.4 A, no rate effect) and a
 * constant-forward-voltage LED (2.0 V, no temperature coefficients, so the
 * same at every ambient) through a series resistor, simple enough to work
 * out by hand.
 */
#ifndef LW_FIXTURE_H
#define LW_FIXTURE_H

#include "tmpdir.h"
#include <lampwick/lampwick.h>

static inline const char *write_flat_light(const char *extra)
{
    tmp_write("flat.ini", "[cell]\nname = flat\nchemistry = other\nnominal_v = 3.0\n"
                          "capacity_mah = 2000\nrated_ma = 400\ncutoff_v = 2.0\n"
                          "rechargeable = no\nmass_g = 10\ncurve = flat.csv\n");
    tmp_write("flat.csv", "depth_pct,open_circuit_v,resistance_ohm\n0,3.0,0.5\n100,3.0,0.5\n");
    tmp_write("slope.ini", "[cell]\nname = slope\nchemistry = alkaline\nnominal_v = 1.5\n"
                           "capacity_mah = 2300\nrated_ma = 100\npeukert = 1.2\n"
                           "max_capacity_mah = 2800\ncutoff_v = 0.9\nrechargeable = no\n"
                           "mass_g = 23\ncurve = slope.csv\n");
    tmp_write("slope.csv", "depth_pct,open_circuit_v,resistance_ohm\n0,1.58,0.15\n"
                           "20,1.40,0.17\n60,1.22,0.24\n90,1.06,0.45\n100,0.90,0.90\n");
    char text[2048];
    snprintf(text, sizeof text,
             "[light]\nname = fixture\n[pack]\ncell = flat\n[led]\nmodel = constant\n"
             "forward_v = 2.0\nflux_lm = 10\nflux_current_ma = 20\nmax_current_ma = 30\n"
             "forward_spread_pct = 5\ntc_forward_mv_k = 0\ntc_flux_pct_k = 0\n"
             "[drive]\nresistor_ohm = 49.5\n%s",
             extra ? extra : "");
    return tmp_write("fixture.ini", text);
}

static inline void load_fixture(const char *extra, lw_profile *p)
{
    const char *path = write_flat_light(extra);
    lw_error e;
    lw_error_clear(&e);
    if (lw_profile_load(path, NULL, p, &e) != LW_OK)
        fail_msg("%s:%d: %s", e.file, e.line, e.msg);
}

#endif
