/*
 * fitreport.c - the reports of the fits: an LED's I-V and output fits, a
 * cell's fit from discharge logs (see fitreport.h).
 */
#include "lampwick/fitreport.h"

#include <math.h>
#include <stdio.h>
#include "lampwick/number.h"

/* The [led] section for the recommended model (sh: the Shockley fit when it
 * is the one, else NULL). */
static void led_section(FILE *fp, const lw_led_fit *lin, const lw_led_fit *sh,
                        const lw_flux_fit *fx, bool relative, const lw_fit_data *d,
                        double junction_c)
{
    fprintf(fp, "[led]\n");
    if (sh) {
        fprintf(fp, "model = shockley\nideality = %.5g\nsaturation_a = %.5g\nseries_ohm = %.5g\n",
                sh->ideality, sh->saturation_a, sh->series_ohm);
    } else if (lin) {
        fprintf(fp, "model = linear\nthreshold_v = %.5g\nslope_ohm = %.5g\n", lin->threshold_v,
                lin->slope_ohm);
    }
    fprintf(fp, "; the junction temperature of the bench data (not a heating setting)\n"
                "junction_c = %g\n",
            junction_c);
    if (fx && !relative)
        fprintf(fp, "flux_lm = %.5g\nflux_current_ma = %.5g\nflux_exponent = %.4g\n",
                fx->flux_lm, fx->ref_current_a * 1e3, fx->exponent);
    else if (fx)
        fprintf(fp, "; output was measured relative: flux_exponent = %.4g; set flux_lm at "
                    "flux_current_ma = %.5g from the LED's data\nflux_exponent = %.4g\n",
                fx->exponent, fx->ref_current_a * 1e3, fx->exponent);
    if (!d->i_a || d->n == 0)
        return;
    double imin = d->i_a[0], imax = d->i_a[0];
    for (size_t k = 1; k < d->n; k++) {
        imin = fmin(imin, d->i_a[k]);
        imax = fmax(imax, d->i_a[k]);
    }
    fprintf(fp, "; fitted by lampwick fit led; valid from %.4g to %.4g mA\n", imin * 1e3,
            imax * 1e3);
}

static void led_text(FILE *fp, const lw_led_fit *lin, const lw_led_fit *sh,
                     const lw_flux_fit *fx, bool relative, const lw_fit_data *d,
                     double junction_c)
{
    if (!d->i_a || d->n == 0)
        return;
    double lo = d->i_a[0], hi = d->i_a[0];
    for (size_t k = 1; k < d->n; k++) {
        lo = fmin(lo, d->i_a[k]);
        hi = fmax(hi, d->i_a[k]);
    }
    fprintf(fp, "%zu measurements from %.4g to %.4g mA\n\n", d->n, lo * 1e3, hi * 1e3);
    if (lin)
        fprintf(fp, "linear    threshold_v = %.5g V (+- %.2g)   slope_ohm = %.5g ohm (+- %.2g)\n"
               "          R^2 = %.6f   residual standard error %.3g mV\n\n",
               lin->threshold_v, lin->lsq.stderr_[0], lin->slope_ohm, lin->lsq.stderr_[1],
               lin->lsq.r_squared, lin->lsq.rse * 1e3);
    if (sh) {
        fprintf(fp, "shockley  ideality = %.5g   saturation_a = %.4g A   series_ohm = %.5g ohm "
               "(+- %.2g)\n"
               "          at %g C (n Vt = %.5g V +- %.2g)   R^2 = %.6f   residual standard "
               "error %.3g mV\n",
               sh->ideality, sh->saturation_a, sh->series_ohm, sh->lsq.stderr_[2],
               sh->junction_c, sh->lsq.coef[1], sh->lsq.stderr_[1], sh->lsq.r_squared,
               sh->lsq.rse * 1e3);
        if (sh->weak)
            fprintf(fp, "          WARNING: %s; the three parameters are poorly determined\n",
                   sh->series_ohm < 0 ? "the fitted series resistance is negative"
                                      : "fewer than 6 points or less than a decade of current");
        fprintf(fp, "\n");
    }
    if (fx)
        fprintf(fp, "flux      %s = %.5g at %.5g mA, exponent %.4g (+- %.2g), R^2 (log) = %.6f\n\n",
               relative ? "relative_pct" : "flux_lm", fx->flux_lm, fx->ref_current_a * 1e3,
               fx->exponent, fx->lsq.stderr_[1], fx->lsq.r_squared);
    fprintf(fp, "Paste into a profile:\n\n");
    const lw_led_fit *best = lw_fit_led_best(lin, sh);
    led_section(fp, lin, best == sh ? sh : NULL, fx, relative, d, junction_c);
}

static lw_status led_table(FILE *fp, const lw_led_fit *lin, const lw_led_fit *sh,
                           const lw_flux_fit *fx, lw_rtable_format fmt, lw_error *err)
{
    static const char *const head[] = {"model",        "threshold_v", "slope_ohm",
                                       "ideality",     "saturation_a", "series_ohm",
                                       "r_squared",    "rse_v",       "flux_lm",
                                       "flux_current_ma", "flux_exponent"};
    lw_rtable *t = lw_rtable_new(11, err);
    if (!t)
        return LW_ENOMEM;
    lw_status st = LW_OK;
    for (size_t k = 0; k < 11 && st == LW_OK; k++)
        st = lw_rtable_head(t, k, head[k], err);
    const lw_led_fit *fits[2] = {lin, sh};
    for (size_t m = 0; m < 2 && st == LW_OK; m++) {
        const lw_led_fit *f = fits[m];
        if (!f)
            continue;
        size_t r;
        st = lw_rtable_add_row(t, &r, err);
        if (st == LW_OK)
            st = lw_rtable_set(t, r, 0, m == 0 ? "linear" : "shockley", err);
        /* every number in full precision: a fit is data for another program */
        const double vals[] = {m == 0 ? f->threshold_v : NAN, m == 0 ? f->slope_ohm : NAN,
                               m == 1 ? f->ideality : NAN,    m == 1 ? f->saturation_a : NAN,
                               m == 1 ? f->series_ohm : NAN,  f->lsq.r_squared,
                               f->lsq.rse,
                               fx ? fx->flux_lm : NAN,        fx ? fx->ref_current_a * 1e3 : NAN,
                               fx ? fx->exponent : NAN};
        static const int sig[] = {8, 8, 8, 8, 8, 8, 6, 6, 6, 6};
        for (size_t k = 0; k < 10 && st == LW_OK; k++)
            st = lw_rtable_num(t, r, k + 1, vals[k], sig[k], err);
    }
    if (st == LW_OK)
        st = lw_rtable_write(t, fp, fmt, err);
    lw_rtable_free(t);
    return st;
}

lw_status lw_report_led_fit(FILE *fp, lw_rtable_format fmt, const lw_fit_data *d,
                           const lw_led_fit *lin, const lw_led_fit *sh, const lw_flux_fit *fx,
                           double junction_c, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    lw_status st = LW_OK;
    if (fmt == LW_FMT_TEXT)
        led_text(fp, lin, sh, fx, d->relative, d, junction_c);
    else
        st = led_table(fp, lin, sh, fx, fmt, err);
    lw_number_locale_end(saved);
    if (st == LW_OK && ferror(fp))
        st = lw_error_set(err, LW_EIO, NULL, 0, "write error");
    return st;
}

lw_status lw_report_led_section(FILE *fp, const lw_fit_data *d, const lw_led_fit *lin,
                                const lw_led_fit *sh, const lw_flux_fit *fx, double junction_c,
                                lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    const lw_led_fit *best = lw_fit_led_best(lin, sh);
    led_section(fp, best == sh ? NULL : lin, best == sh ? sh : NULL, fx, d->relative, d,
                junction_c);
    lw_number_locale_end(saved);
    return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
}

lw_status lw_report_cell_fit(FILE *fp, const lw_cellfit *fit, const char *const *log_names,
                             double cutoff_v, lw_error *err)
{
    locale_t saved = lw_number_locale_begin();
    const lw_cell *cl = &fit->cell;
    size_t nlogs = fit->nlogs;
    fprintf(fp, "cell %s from %zu log%s, end point %g V\n", cl->name, nlogs,
            nlogs > 1 ? "s" : "", cutoff_v);
    for (size_t k = 0; k < nlogs; k++)
        fprintf(fp, "  %s: %.5g mAh in %.4g h, mean %.5g mA\n", log_names[k],
                fit->capacity_ah[k] * 1e3, fit->hours[k], fit->mean_a[k] * 1e3);
    fprintf(fp, "  capacity_mah %.5g at rated_ma %.5g\n", cl->capacity_ah * 1e3,
            cl->rated_a * 1e3);
    if (fit->peukert_estimated)
        fprintf(fp, "  peukert %.4g from the two capacities%s\n", cl->peukert,
                fit->peukert_clamped ? " (clamped to 1..2: check the logs)" : "");
    else
        fprintf(fp, "  peukert 1 (one log: the rate effect is not measured)\n");
    double rmin = cl->res->y[0], rmax = rmin;
    for (size_t i = 1; i < cl->res->n; i++) {
        rmin = fmin(rmin, cl->res->y[i]);
        rmax = fmax(rmax, cl->res->y[i]);
    }
    fprintf(fp, "  internal resistance %.4g to %.4g ohm%s\n", rmin, rmax,
            nlogs == 1 ? " (as given by --resistance-ohm)" : " (from the two loads)");
    fprintf(fp, "  curve: %zu points kept of %zu, within %.2g mV of the logs' curve\n",
            cl->ocv->n, fit->dense_points, fit->max_dev_v * 1e3);
    if (fit->kinetic_fitted)
        fprintf(fp, "  kinetic model: available_pct %.4g, recovery_per_h %.4g (total %.5g mAh); "
                    "rate_model = kinetic to use it\n",
                100.0 * cl->kinetic_c, cl->kinetic_k_per_h, cl->max_capacity_ah * 1e3);
    else if (nlogs == 2)
        fprintf(fp, "  kinetic model: not fitted (give --total-mah, the charge at a very low "
                    "drain)\n");
    fputs("  each log's load through the fitted cell, hours to the end point:\n", fp);
    for (size_t k = 0; k < nlogs; k++) {
        fprintf(fp, "    %s: measured %.4g, Peukert %.4g (%+.2f %%)", log_names[k], fit->hours[k],
                fit->model_hours[0][k], 100.0 * (fit->model_hours[0][k] / fit->hours[k] - 1.0));
        if (fit->kinetic_fitted)
            fprintf(fp, ", kinetic %.4g (%+.2f %%)", fit->model_hours[1][k],
                    100.0 * (fit->model_hours[1][k] / fit->hours[k] - 1.0));
        fputc('\n', fp);
    }
    lw_number_locale_end(saved);
    return ferror(fp) ? lw_error_set(err, LW_EIO, NULL, 0, "write error") : LW_OK;
}
