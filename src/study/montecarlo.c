/*
 * montecarlo.c - sampled units of a design and their statistics (see
 * montecarlo.h; statistics in stats.h, random streams in random.h).
 * Values in the keys' file units; quantities as `run --format csv`.
 */
#include "lampwick/montecarlo.h"
#include "lampwick/number.h"
#include "lampwick/random.h"
#include "lampwick/stats.h"
#include "lampwick/text.h"

#include <math.h>
#include <pthread.h>
#include <stdatomic.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"

const char *const lw_mc_dist_names[] = {"normal", "uniform", "tolerance", "bin", NULL};

const char *const lw_mc_quantity_names[LW_MC_QCOUNT + 1] = {
    "runtime_h",      "flux_30s_lm",     "lumen_hours",     "time_to_half_h",
    "initial_led_ma", "peak_resistor_w", "peak_junction_c", NULL};

const char *const lw_mc_quantity_words[LW_MC_QCOUNT] = {
    "runtime (h)",           "output at 30 s (lm)",   "lumen-hours (lm h)",
    "time to half (h)",      "LED current at switch-on (mA)",
    "peak resistor power (W)", "peak junction temperature (°C)"};

const double lw_mc_percentiles[LW_MC_NPCT] = {0.01, 0.05, 0.50, 0.95, 0.99};

double lw_mc_quantity_of(lw_mc_quantity q, const lw_result *r)
{
    switch (q) {
    case LW_MC_RUNTIME: return r->runtime_h;
    case LW_MC_FLUX30: return r->flux_30s_lm;
    case LW_MC_LUMEN_HOURS: return r->lumen_hours;
    case LW_MC_HALF: return r->time_to_half_h;
    case LW_MC_LED_MA: return 1e3 * r->initial.led_a;
    case LW_MC_RESISTOR_W: return r->peak_resistor_w;
    case LW_MC_JUNCTION_C: return r->peak_junction_c;
    default: return NAN;
    }
}

/* ---- keys and their distributions ---- */

/* The numbers of a form: "a", "a..b" or a list "a[:w],b[:w],...". */
static bool parse_number(const char *s, size_t len, double *v)
{
    char buf[64];
    if (len == 0 || len >= sizeof buf)
        return false;
    memcpy(buf, s, len);
    buf[len] = '\0';
    return lw_number_parse(buf, v);
}

static lw_status form_error(const lw_mc_key *k, lw_error *err, const char *why)
{
    return lw_error_set(err, LW_EINPUT, k->file, k->line, "[spread] %s = %s: %s; %s", k->key,
                        k->form, why,
                        "the forms are: normal SIGMA, normal SIGMA%, uniform LOW..HIGH, "
                        "tolerance PCT, bin A,B,C (or A:W,B:W weighted)");
}

/* The key's range in file units, open ends moved inside by one ulp. */
static void key_range(const lw_keydef *d, double *lo, double *hi)
{
    *lo = d->flags & LW_KF_MIN_OPEN ? nextafter(d->min, INFINITY) : d->min;
    *hi = d->flags & LW_KF_MAX_OPEN ? nextafter(d->max, -INFINITY) : d->max;
}

lw_status lw_mc_key_parse(const lw_profile *prof, const char *key, const char *form,
                          const char *file, int line, lw_mc_key *out, lw_error *err)
{
    memset(out, 0, sizeof *out);
    lw_text_copy(out->file, file ? file : "--spread", sizeof out->file);
    out->line = line;
    if (!lw_text_copy(out->key, key, sizeof out->key) ||
        !lw_text_copy(out->form, form, sizeof out->form))
        return lw_error_set(err, LW_EINPUT, out->file, line, "[spread] %.64s: too long", key);
    char sec[LW_INI_NAME_MAX];
    const char *dot = strchr(key, '.');
    if (!dot || (size_t)(dot - key) >= sizeof sec)
        return lw_error_set(err, LW_EINPUT, out->file, line,
                            "[spread] %s: a spread key is written section.key "
                            "(drive.resistor_ohm)", key);
    memcpy(sec, key, (size_t)(dot - key));
    sec[dot - key] = '\0';
    const lw_keydef *d = lw_key_find(lw_profile_keys, lw_profile_nkeys, sec, dot + 1);
    if (!d)
        return lw_key_unknown(lw_profile_keys, lw_profile_nkeys, sec, dot + 1, out->file, line,
                              err);
    if (d->type != LW_K_NUM)
        return lw_error_set(err, LW_EINPUT, out->file, line,
                            "[spread] %s: only keys that take any number may be spread (this "
                            "one takes %s)", key,
                            d->type == LW_K_INT ? "a whole number" : "a name or choice");
    double stored; /* the key's value as the profile holds it, SI */
    memcpy(&stored, (const char *)prof + d->offset, sizeof stored);
    out->nominal = stored / d->scale;
    double rlo, rhi;
    key_range(d, &rlo, &rhi);
    /* the form's word, then its numbers */
    const char *p = form;
    while (*p == ' ' || *p == '\t')
        p++;
    size_t w = strcspn(p, " \t");
    int kind = -1;
    for (int i = 0; lw_mc_dist_names[i]; i++)
        if (strlen(lw_mc_dist_names[i]) == w && !strncmp(p, lw_mc_dist_names[i], w))
            kind = i;
    if (kind < 0)
        return form_error(out, err, "unknown distribution");
    out->dist = (lw_mc_dist)kind;
    p += w;
    while (*p == ' ' || *p == '\t')
        p++;
    size_t len = strlen(p);
    while (len && (p[len - 1] == ' ' || p[len - 1] == '\t'))
        len--;
    if (out->dist != LW_MC_BIN && !isfinite(out->nominal))
        return lw_error_set(err, LW_EINPUT, out->file, line,
                            "[spread] %s: the profile gives no value of %s to spread about",
                            key, key);
    switch (out->dist) {
    case LW_MC_NORMAL:
    case LW_MC_TOLERANCE: {
        bool pct = len && p[len - 1] == '%';
        double v;
        if (!parse_number(p, len - (pct ? 1 : 0), &v) || !(v >= 0.0))
            return form_error(out, err, "give one number, not negative");
        if (out->dist == LW_MC_TOLERANCE) {
            if (!(v < 100.0))
                return form_error(out, err, "a tolerance is under 100 %");
            double a = out->nominal * (1.0 - v / 100.0), b = out->nominal * (1.0 + v / 100.0);
            out->lo = fmax(fmin(a, b), rlo);
            out->hi = fmin(fmax(a, b), rhi);
        } else {
            out->sigma = pct ? fabs(out->nominal) * v / 100.0 : v;
            out->lo = rlo, out->hi = rhi;
            if (!(out->nominal >= rlo && out->nominal <= rhi))
                return form_error(out, err, "the profile's value is outside the key's range");
            out->p_lo = out->sigma > 0.0 ? lw_normal_cdf((rlo - out->nominal) / out->sigma) : 0.0;
            out->p_hi = out->sigma > 0.0 ? lw_normal_cdf((rhi - out->nominal) / out->sigma) : 1.0;
        }
        break;
    }
    case LW_MC_UNIFORM: {
        const char *dots = strstr(p, "..");
        double a, b;
        if (!dots || !parse_number(p, (size_t)(dots - p), &a) ||
            !parse_number(dots + 2, len - (size_t)(dots + 2 - p), &b) || !(a <= b))
            return form_error(out, err, "give LOW..HIGH with LOW <= HIGH");
        out->lo = fmax(a, rlo);
        out->hi = fmin(b, rhi);
        break;
    }
    case LW_MC_BIN: {
        double total = 0.0;
        for (const char *s = p; s < p + len;) {
            size_t n = strcspn(s, ",");
            if (s + n > p + len)
                n = (size_t)(p + len - s);
            const char *colon = memchr(s, ':', n);
            double v, wgt = 1.0;
            if (out->nbins == LW_MC_BINS_MAX)
                return form_error(out, err, "too many bins (at most 64)");
            if (!parse_number(s, colon ? (size_t)(colon - s) : n, &v) ||
                (colon && (!parse_number(colon + 1, n - (size_t)(colon + 1 - s), &wgt) ||
                           !(wgt > 0.0))))
                return form_error(out, err, "bins are numbers, each with an optional :WEIGHT > 0");
            if (!(v >= rlo && v <= rhi))
                return form_error(out, err, "a bin is outside the key's range");
            total += wgt;
            out->bins[out->nbins] = v;
            out->cum[out->nbins++] = total;
            s += n + 1;
        }
        if (out->nbins == 0)
            return form_error(out, err, "give at least one bin");
        for (size_t i = 0; i < out->nbins; i++)
            out->cum[i] /= total;
        out->cum[out->nbins - 1] = 1.0;
        out->lo = out->hi = out->bins[0];
        for (size_t i = 0; i < out->nbins; i++)
            out->lo = fmin(out->lo, out->bins[i]), out->hi = fmax(out->hi, out->bins[i]);
        break;
    }
    }
    if (!(out->lo <= out->hi))
        return form_error(out, err, "no value of it lies in the key's range");
    return LW_OK;
}

lw_status lw_mc_keys_of_profile(const lw_profile *prof, lw_mc_key *keys, size_t *n,
                                lw_error *err)
{
    *n = 0;
    for (size_t i = 0; prof->ini && i < prof->ini->n; i++) {
        const lw_ini_entry *e = &prof->ini->entries[i];
        if (strcmp(e->section, "spread") != 0)
            continue;
        if (*n == LW_MC_KEYS_MAX)
            return lw_error_set(err, LW_EINPUT, prof->path, e->line,
                                "[spread] at most %d keys", LW_MC_KEYS_MAX);
        for (size_t j = 0; j < *n; j++)
            if (!strcmp(keys[j].key, e->key))
                return lw_error_set(err, LW_EINPUT, prof->path, e->line,
                                    "[spread] %s is given twice", e->key);
        lw_status st = lw_mc_key_parse(prof, e->key, e->value, prof->path, e->line, &keys[*n], err);
        if (st != LW_OK)
            return st;
        ++*n;
    }
    return LW_OK;
}

double lw_mc_draw(const lw_mc_key *k, double u)
{
    switch (k->dist) {
    case LW_MC_NORMAL: {
        if (!(k->sigma > 0.0))
            return k->nominal;
        double x = k->nominal + k->sigma * lw_normal_quantile(k->p_lo + u * (k->p_hi - k->p_lo));
        return fmin(fmax(x, k->lo), k->hi); /* rounding at a cut end */
    }
    case LW_MC_UNIFORM:
    case LW_MC_TOLERANCE:
        return k->lo + u * (k->hi - k->lo);
    case LW_MC_BIN:
    default: {
        size_t i = 0;
        while (i + 1 < k->nbins && u > k->cum[i])
            i++;
        return k->bins[i];
    }
    }
}

/* ---- the units ---- */

struct mc_job {
    const lw_profile *base;
    const lw_mc_key *keys;
    size_t nkeys;
    uint64_t seed;
    bool sobol;
    lw_sobol sb;                /* sobol: the direction numbers */
    double shift[LW_MC_KEYS_MAX]; /* sobol: the shift modulo 1 */
    lw_mc_result *out;
    atomic_size_t stop;      /* the lowest failing unit so far (n: none) */
    pthread_mutex_t lock;
    lw_status status;
    lw_error err;
};

static void run_unit(size_t i, void *vctx)
{
    struct mc_job *j = vctx;
    lw_mc_result *r = j->out;
    if (i > atomic_load(&j->stop))
        return;
    double u[LW_MC_KEYS_MAX];
    if (j->sobol) {
        lw_sobol_point(&j->sb, (uint32_t)i, (int)j->nkeys, u);
        for (size_t k = 0; k < j->nkeys; k++) {
            u[k] += j->shift[k];
            u[k] -= u[k] >= 1.0 ? 1.0 : 0.0;
            u[k] = u[k] > 0.0 ? u[k] : 0x1.0p-54; /* the open interval */
        }
    } else {
        lw_rng rng;
        lw_rng_seed(&rng, j->seed, i);
        for (size_t k = 0; k < j->nkeys; k++)
            u[k] = lw_rng_uniform(&rng);
    }
    lw_case c;
    memset(&c, 0, sizeof c);
    lw_error_clear(&c.err);
    c.status = LW_OK;
    for (size_t k = 0; k < j->nkeys && c.status == LW_OK; k++) {
        double v = lw_mc_draw(&j->keys[k], u[k]);
        r->x[k * r->n + i] = v;
        c.status = lw_profile_variant_number(&c.variant, j->keys[k].key, v, &c.err);
    }
    if (c.status == LW_OK)
        lw_batch_run_case(j->base, &c, "--spread");
    if (c.status == LW_OK) {
        for (int q = 0; q < LW_MC_QCOUNT; q++)
            r->y[(size_t)q * r->n + i] = lw_mc_quantity_of((lw_mc_quantity)q, &c.res);
        r->warnings[i] = c.res.warnings;
    } else {
        pthread_mutex_lock(&j->lock);
        if (i < atomic_load(&j->stop)) {
            atomic_store(&j->stop, i);
            j->status = c.status;
            j->err = c.err;
        }
        pthread_mutex_unlock(&j->lock);
    }
    lw_batch_clear(&c, 1);
}

void lw_mc_result_clear(lw_mc_result *r)
{
    if (!r)
        return;
    free(r->x);
    free(r->y);
    free(r->warnings);
    memset(r, 0, sizeof *r);
}

lw_status lw_mc_run(const lw_profile *base, const lw_mc_key *keys, size_t nkeys,
                    const lw_mc_options *opt, lw_pool_progress_fn progress, void *progress_ctx,
                    lw_mc_result *out, lw_error *err)
{
    memset(out, 0, sizeof *out);
    const size_t n = opt->samples;
    if (n < 2 || n > LW_MC_SAMPLES_MAX)
        return lw_error_set(err, LW_EINPUT, "--samples", 0, "give 2 to %d samples",
                            LW_MC_SAMPLES_MAX);
    if (nkeys == 0 || nkeys > LW_MC_KEYS_MAX)
        return lw_error_set(err, LW_EINPUT, base->path, 0,
                            "nothing to spread: give a [spread] section or --spread KEY=FORM "
                            "(1 to %d keys)", LW_MC_KEYS_MAX);
    /* the nominal unit */
    lw_case nom;
    memset(&nom, 0, sizeof nom);
    lw_batch_run_case(base, &nom, "--spread");
    if (nom.status != LW_OK) {
        if (err)
            *err = nom.err;
        lw_status st = nom.status;
        lw_batch_clear(&nom, 1);
        return st;
    }
    for (int q = 0; q < LW_MC_QCOUNT; q++)
        out->nominal[q] = lw_mc_quantity_of((lw_mc_quantity)q, &nom.res);
    out->nominal_warnings = nom.res.warnings;
    lw_batch_clear(&nom, 1);
    out->n = n;
    out->nkeys = nkeys;
    out->x = lw_calloc(nkeys * n, sizeof *out->x);
    out->y = lw_calloc((size_t)LW_MC_QCOUNT * n, sizeof *out->y);
    out->warnings = lw_calloc(n, sizeof *out->warnings);
    if (!out->x || !out->y || !out->warnings) {
        lw_mc_result_clear(out);
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for %zu samples", n);
    }
    struct mc_job j = {.base = base, .keys = keys, .nkeys = nkeys, .seed = opt->seed,
                       .sobol = opt->sobol, .out = out, .status = LW_OK};
    if (j.sobol) {
        if (n > UINT32_MAX) {
            lw_mc_result_clear(out);
            return lw_error_set(err, LW_EINPUT, "--samples", 0, "Sobol points: at most 2^32");
        }
        lw_sobol_init(&j.sb);
        lw_rng r;
        lw_rng_seed(&r, opt->seed, UINT64_MAX); /* a stream no unit draws from */
        for (size_t k = 0; k < nkeys; k++)
            j.shift[k] = lw_rng_uniform(&r);
    }
    atomic_init(&j.stop, n);
    lw_error_clear(&j.err);
    pthread_mutex_init(&j.lock, NULL);
    lw_pool_for(n, lw_batch_workers(n, opt->threads), run_unit, &j, progress, progress_ctx);
    pthread_mutex_destroy(&j.lock);
    if (j.status == LW_OK)
        return LW_OK;
    /* the failing unit, its values in the message */
    size_t i = atomic_load(&j.stop);
    char vals[512] = "";
    for (size_t k = 0; k < nkeys; k++) {
        char num[40];
        lw_number_format(num, sizeof num, out->x[k * n + i]);
        size_t used = strlen(vals);
        snprintf(vals + used, sizeof vals - used, "%s%s=%s", k ? ", " : "", keys[k].key, num);
    }
    lw_error_set(err, j.status, j.err.file[0] ? j.err.file : NULL, j.err.line,
                 "sample %zu (%s): %s", i, vals, j.err.msg);
    lw_mc_result_clear(out);
    return j.status;
}

/* ---- what the units say ---- */

lw_status lw_mc_summarise(const lw_mc_result *r, lw_mc_quantity q, lw_mc_summary *s,
                          lw_error *err)
{
    memset(s, 0, sizeof *s);
    s->nominal = r->nominal[q];
    double *v = lw_malloc((r->n ? r->n : 1) * sizeof *v);
    if (!v)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the percentiles");
    size_t m = 0;
    for (size_t i = 0; i < r->n; i++) {
        double y = r->y[(size_t)q * r->n + i];
        if (!isnan(y))
            v[m++] = y;
    }
    s->n_finite = m;
    lw_stats_moments(v, m, &s->mean, &s->sd);
    lw_stats_sort(v, m);
    for (int k = 0; k < LW_MC_NPCT; k++) {
        double p = lw_mc_percentiles[k];
        size_t lo, hi;
        s->pct[k] = lw_stats_percentile(v, m, p);
        lw_stats_order_ranks(m, p, LW_MC_CONFIDENCE, &lo, &hi);
        s->pct_lo[k] = lo >= 1 && m ? v[lo - 1] : NAN;
        s->pct_hi[k] = hi <= m && m ? v[hi - 1] : NAN;
    }
    free(v);
    return LW_OK;
}

lw_status lw_mc_target_parse(const char *text, lw_mc_target *t, lw_error *err)
{
    memset(t, 0, sizeof *t);
    lw_text_copy(t->text, text, sizeof t->text);
    size_t n = strcspn(text, "<>");
    const char *op = text + n;
    int q = -1;
    for (int i = 0; i < LW_MC_QCOUNT; i++)
        if (strlen(lw_mc_quantity_names[i]) == n && !strncmp(text, lw_mc_quantity_names[i], n))
            q = i;
    const char *num = op + (op[0] && op[1] == '=' ? 2 : 1);
    if (q < 0 || !*op || !lw_number_parse_double(num, &t->value)) {
        char names[256] = "";
        for (int i = 0; i < LW_MC_QCOUNT; i++) {
            strncat(names, i ? ", " : "", sizeof names - strlen(names) - 1);
            strncat(names, lw_mc_quantity_names[i], sizeof names - strlen(names) - 1);
        }
        return lw_error_set(err, LW_EINPUT, "--target", 0,
                            "'%s': write QUANTITY>=VALUE (or >, <=, <), the quantities being %s",
                            text, names);
    }
    t->q = (lw_mc_quantity)q;
    t->op = op[1] == '=' ? (op[0] == '>' ? 'G' : 'L') : op[0];
    return LW_OK;
}

bool lw_mc_meets(const lw_mc_result *r, size_t i, const lw_mc_target *t)
{
    double y = r->y[(size_t)t->q * r->n + i];
    switch (t->op) {
    case 'G': return y >= t->value;
    case '>': return y > t->value;
    case 'L': return y <= t->value;
    default: return y < t->value; /* NAN meets none */
    }
}

void lw_mc_yield(const lw_mc_result *r, const lw_mc_target *t, size_t nt, size_t *k, double *lo,
                 double *hi)
{
    size_t ok = 0;
    for (size_t i = 0; i < r->n; i++) {
        bool all = true;
        for (size_t j = 0; j < nt && all; j++)
            all = lw_mc_meets(r, i, &t[j]);
        ok += all;
    }
    *k = ok;
    lw_stats_wilson(ok, r->n, LW_MC_Z95, lo, hi);
}

lw_status lw_mc_rank(const lw_mc_result *r, lw_mc_quantity q, double *beta, double *se,
                     double *r2, lw_error *err)
{
    const double *cols[LW_MC_KEYS_MAX];
    for (size_t k = 0; k < r->nkeys; k++)
        cols[k] = r->x + k * r->n;
    /* a unit without the quantity (never at half) ranks above every other */
    const double *y = r->y + (size_t)q * r->n;
    double *yy = NULL;
    for (size_t i = 0; i < r->n && !yy; i++)
        if (isnan(y[i])) {
            yy = lw_malloc(r->n * sizeof *yy);
            if (!yy)
                return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory for the ranking");
            for (size_t t = 0; t < r->n; t++)
                yy[t] = isnan(y[t]) ? INFINITY : y[t];
        }
    lw_status st = lw_stats_srrc(cols, r->nkeys, yy ? yy : y, r->n, beta, se, r2, err);
    free(yy);
    return st;
}
