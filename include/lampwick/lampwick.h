/*
 * lampwick.h - public interface of liblampwick.
 *
 * liblampwick estimates how long a battery-powered LED light runs and how its
 * light output falls as the cells discharge.  Include this one header; it
 * brings in every module a user needs:
 *
 *   alloc.h     allocation wrappers with a failure hook for tests
 *   error.h     lw_error, status codes, the number grammar
 *   table.h     monotone interpolation tables
 *   roots.h     Brent's root finder, Wright omega function
 *   cell.h      cell model (OCV and R against depth, Peukert's law, temperature)
 *   led.h       LED I-V models and flux
 *   drive.h     the drive elements and their laws
 *   light.h     the whole light and its operating point
 *   engine.h    the discharge run, energy ledger, trace
 *   inifile.h   INI reading and key schemas
 *   cellfile.h  cell files and the cell search path
 *   profile.h   light profiles, modes, --set overrides
 *   csvio.h     CSV reading and writing
 *   outfile.h   output files that are whole or absent
 *   report.h    text, CSV and Markdown summaries
 *   plot.h      standalone SVG plots
 *   eseries.h   IEC 60063 preferred values, resistance parsing
 *   pool.h      parallel-for over POSIX threads
 *   batch.h     many variants of a profile, on all cores
 *   sweep.h     --vary grids
 *   resistor.h  the series resistor as a part: ratings, targets, safe minimum
 *   corner.h    the corners of a design: nominal, worst hot, cold, end of run
 *   pick.h      choosing the series resistor
 *   size.h      sizing the pack
 *   photometry.h  beam photometry (FL 1 definitions)
 *   spec.h      the runtime table of a product specification
 *   fit.h       least squares; LED I-V and flux fits
 *   cellfit.h   cell models from discharge logs
 *
 * Conventions: SI units inside (V, A, ohm, h, Ah, W, lm, deg C), the unit in
 * every name; functions that can fail take `lw_error *err` last and return an
 * lw_status; the library never prints and never exits.
 */
#ifndef LAMPWICK_H
#define LAMPWICK_H

#include "alloc.h"
#include "error.h"
#include "number.h"
#include "text.h"
#include "path.h"
#include "interp.h"
#include "roots.h"
#include "cell.h"
#include "led.h"
#include "drive.h"
#include "light.h"
#include "engine.h"
#include "trace.h"
#include "inifile.h"
#include "keys.h"
#include "search.h"
#include "cache.h"
#include "cellfile.h"
#include "profile.h"
#include "csvio.h"
#include "outfile.h"
#include "rtable.h"
#include "report.h"
#include "pickreport.h"
#include "sizereport.h"
#include "specreport.h"
#include "sweepreport.h"
#include "fitreport.h"
#include "plot.h"
#include "eseries.h"
#include "pool.h"
#include "batch.h"
#include "vary.h"
#include "sweep.h"
#include "resistor.h"
#include "corner.h"
#include "pick.h"
#include "size.h"
#include "photometry.h"
#include "spec.h"
#include "fit.h"
#include "cellfit.h"

#endif
