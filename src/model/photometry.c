/*
 * photometry.c - beam photometry (see photometry.h for the definitions).
 */
#include "lampwick/photometry.h"

#include <math.h>

double lw_photometry_cone_cd(double flux_lm, double beam_deg)
{
    const double pi = 3.14159265358979323846;
    double half = 0.5 * beam_deg * pi / 180.0;
    return flux_lm / (2.0 * pi * (1.0 - cos(half)));
}

double lw_photometry_beam_m(double i_cd)
{
    return i_cd > 0 ? sqrt(i_cd / LW_BEAM_LUX) : 0.0;
}
