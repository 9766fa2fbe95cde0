/*
 * lampwick.h - public interface of liblampwick.
 *
 * liblampwick estimates how long a battery-powered LED light runs and how its
 * light output falls as the cells discharge.  Include this one header
 * (`#include <lampwick/lampwick.h>`, with pkg-config's Cflags); it brings in
 * every module.  Modules are in five layers; each may use only the layers
 * above it in this list (the build enforces it, DEVELOPERS.md):
 *
 * 1 base - no I/O but what a caller asks for, no model
 *   alloc.h      allocation wrappers with a failure hook for tests
 *   error.h      lw_error (file, line, message), status codes, LW_MUST_CHECK
 *   number.h     the number grammar, locale-independent formatting, memoized logs
 *   text.h       bounded copies, UTF-8 validation, escaping, edit distance
 *   interp.h     monotone interpolation tables (linear, monotone cubic), corners
 *   roots.h      Brent's root finder, the Wright omega function
 *   quadrature.h Gauss and Lobatto rules, Legendre series, their error estimate
 *   eseries.h    IEC 60063 preferred values, resistance parsing
 *   pool.h       parallel-for over POSIX threads
 *   random.h     xoshiro256** streams, the normal quantile
 *   stats.h      moments, percentiles and their intervals, Wilson, rank regression
 * 2 model - the physics; no files
 *   cell.h       cells: OCV and R against depth, Peukert's law, temperature
 *   led.h        LED I-V models and light output
 *   drive.h      the drive elements (resistor, linear, converter) and their laws
 *   thermal.h    the heat path: junctions, board, body, ambient
 *   light.h      the whole light and its operating point
 *   engine.h     the discharge run and its energy ledger
 *   transient.h  runs in time (heat capacities): Radau IIA, events
 *   trace.h      the time series of a run
 *   photometry.h beam photometry (ANSI/PLATO FL 1 definitions)
 * 3 io - reading and writing files
 *   path.h       paths and opening inputs safely
 *   inifile.h    INI reading with line numbers
 *   keys.h       keyed schemas of INI sections
 *   csvio.h      CSV reading and writing (libcsv)
 *   search.h     the cell search path
 *   cache.h      parsed inputs, loaded once per path per process
 *   cellfile.h   cell files
 *   profile.h    light profiles, modes, variants (--mode, --set)
 *   outfile.h    output files that are whole or absent
 * 4 study - many runs answering a design question
 *   batch.h      many variants of a profile, on all cores
 *   vary.h       one varied key of a sweep
 *   sweep.h      grids of runs
 *   resistor.h   the series resistor as a part: ratings, targets, safe minimum
 *   corner.h     the corners of a design: nominal, worst hot, cold, end of run
 *   pick.h       choosing the series resistor
 *   size.h       sizing the pack
 *   spec.h       the runtime table of a product specification
 *   fit.h        least squares; LED I-V and flux fits
 *   cellfit.h    cell models from discharge logs
 *   montecarlo.h the spread over the units shipped: samples, percentiles, yield, ranking
 * 5 report - what people and documents read
 *   rtable.h     tables in text, CSV, Markdown and JSON
 *   report.h     the run report, hours, warnings, cautions
 *   pickreport.h, sizereport.h, specreport.h, sweepreport.h, fitreport.h,
 *                mcreport.h
 *                the tables of each study
 *   plot.h       standalone SVG charts
 *   jsondoc.h    a command's tables as one JSON document
 *   htmlreport.h the design review in one HTML file
 *   api.h        whole answers as JSON text, for other languages
 *
 * Conventions: SI units inside (V, A, ohm, h, Ah, W, lm, deg C), the unit in
 * every name; functions that can fail take `lw_error *err` last and return an
 * lw_status that must be checked; the library never prints unless given a
 * FILE, never exits, and formats numbers in the C locale whatever the
 * process's locale.
 */
#ifndef LAMPWICK_H
#define LAMPWICK_H

/* 1 base */
#include "alloc.h"
#include "error.h"
#include "number.h"
#include "text.h"
#include "interp.h"
#include "roots.h"
#include "quadrature.h"
#include "eseries.h"
#include "pool.h"
#include "random.h"
#include "stats.h"
/* 2 model */
#include "cell.h"
#include "led.h"
#include "drive.h"
#include "thermal.h"
#include "chain.h"
#include "schedule.h"
#include "light.h"
#include "engine.h"
#include "transient.h"
#include "trace.h"
#include "photometry.h"
/* 3 io */
#include "path.h"
#include "inifile.h"
#include "keys.h"
#include "csvio.h"
#include "search.h"
#include "cache.h"
#include "cellfile.h"
#include "profile.h"
#include "outfile.h"
/* 4 study */
#include "batch.h"
#include "vary.h"
#include "sweep.h"
#include "resistor.h"
#include "corner.h"
#include "pick.h"
#include "size.h"
#include "spec.h"
#include "fit.h"
#include "cellfit.h"
#include "montecarlo.h"
/* 5 report */
#include "rtable.h"
#include "report.h"
#include "pickreport.h"
#include "sizereport.h"
#include "specreport.h"
#include "sweepreport.h"
#include "fitreport.h"
#include "mcreport.h"
#include "plot.h"
#include "jsondoc.h"
#include "htmlreport.h"
#include "api.h"

#endif
