/*
 * photometry.h - beam photometry of a specification table.
 *
 * Owns: the peak intensity of a uniform cone and the beam distance, as the
 * flashlight performance standard ANSI/PLATO FL 1 defines them.
 *   Uniform cone of full angle theta: solid angle 2 pi (1 - cos(theta/2)),
 *     peak intensity I = flux / solid angle (cd);
 *   beam distance: where the illuminance I / d^2 falls to 0.25 lx,
 *     d = sqrt(I / 0.25) (m).
 */
#ifndef LW_PHOTOMETRY_H
#define LW_PHOTOMETRY_H

/* layer 2, model (DEVELOPERS.md): only layers above may include this */
#if defined(LW_LAYER) && LW_LAYER < 2
#error "model-layer header included from a lower layer"
#endif

/* Illuminance at the FL 1 beam distance, lx. */
#define LW_BEAM_LUX 0.25

/* Peak beam intensity (cd) of a uniform cone of full angle beam_deg. */
double lw_photometry_cone_cd(double flux_lm, double beam_deg);

/* Distance (m) at which intensity i_cd gives 0.25 lx (FL 1 beam distance);
 * 0 for i_cd <= 0. */
double lw_photometry_beam_m(double i_cd);

#endif
