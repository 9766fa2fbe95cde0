/*
 * profschedule.c - use schedules in profiles (see profschedule.h).
 *
 * Units: hours, as written.  The sessions file is read through libcsv
 * (csvio.h); the mode column is its one text column.
 */
#include "profschedule.h"
#include "profchain.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "lampwick/alloc.h"
#include "lampwick/csvio.h"
#include "lampwick/path.h"
#include "lampwick/text.h"

/* The index of mode name among the schedule's lights, deriving its light
 * (base + the mode + v, without a schedule) the first time. */
static lw_status session_light(const lw_profile *base, const lw_profile_variant *v,
                               const char *origin, const lw_profile *out, lw_schedule *s,
                               const char *name, const char *file, int line, int *index,
                               lw_error *err)
{
    if (!name[0] || (out->mode[0] && !strcmp(name, out->mode))) {
        *index = -1;
        return LW_OK;
    }
    for (size_t i = 0; i < s->nlights; i++)
        if (!strcmp(s->names[i], name)) {
            *index = (int)i;
            return LW_OK;
        }
    bool known = false;
    for (size_t i = 0; i < lw_profile_mode_count(base) && !known; i++)
        known = !strcmp(lw_profile_mode_name(base, i), name);
    if (!known)
        return lw_error_set(err, LW_EINPUT, file, line,
                            "column 'mode': the profile has no [mode %s]", name);
    lw_light **lights = lw_realloc(s->lights, (s->nlights + 1) * sizeof(lw_light *));
    if (lights)
        s->lights = lights;
    char(*names)[LW_NAME_MAX] = lights ? lw_realloc(s->names, (s->nlights + 1) * sizeof *names)
                                       : NULL;
    if (names)
        s->names = names;
    lw_light *l = names ? lw_calloc(1, sizeof *l) : NULL;
    if (!l)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    lw_profile_variant w = *v;
    w.mode = name;
    w.without_use = true;
    lw_profile q;
    lw_status st = lw_profile_derive(base, &w, origin, &q, err);
    if (st == LW_OK)
        st = lw_profchain_same_pack(out, &q, name, line, err);
    if (st == LW_OK)
        lw_light_copy(l, &q.light);
    lw_profile_clear(&q);
    if (st != LW_OK) {
        free(l);
        return st;
    }
    s->lights[s->nlights] = l;
    lw_text_copy(s->names[s->nlights], name, LW_NAME_MAX);
    *index = (int)s->nlights++;
    return LW_OK;
}

/* The sessions of a sessions file into s. */
static lw_status read_sessions(const lw_profile *base, const lw_profile_variant *v,
                               const char *origin, const lw_profile *out, lw_schedule *s,
                               lw_error *err)
{
    const char *kfile;
    int kline;
    lw_profile_key_where(out, "use", "sessions_file", &kfile, &kline);
    char path[LW_PATH_MAX];
    if (!lw_path_join(path, sizeof path, out->dir, out->use_file))
        return lw_error_set(err, LW_EINPUT, kfile, kline,
                            "[use] sessions_file: the path is too long (at most %d bytes)",
                            LW_PATH_MAX - 1);
    lw_path_ref ref = {kfile, kline, "[use] sessions_file"};
    lw_csv csv;
    lw_status st = lw_csv_read_text(path, &ref, "mode", &csv, err);
    if (st != LW_OK)
        return st;
    static const char *const req[] = {"start_h", "duration_h", NULL};
    static const char *const opt[] = {"mode", NULL};
    st = lw_csv_expect(&csv, req, opt, err);
    s->plan = st == LW_OK ? lw_calloc(csv.nrow, sizeof *s->plan) : NULL;
    if (st == LW_OK && !s->plan)
        st = lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    int cs = lw_csv_column(&csv, "start_h"), cd = lw_csv_column(&csv, "duration_h");
    double end = 0.0;
    for (size_t i = 0; i < csv.nrow && st == LW_OK; i++) {
        double t0 = lw_csv_at(&csv, i, cs), dur = lw_csv_at(&csv, i, cd);
        int line = csv.line[i];
        if (!(t0 >= 0.0 && t0 <= 1e7))
            st = lw_error_set(err, LW_EINPUT, path, line,
                              "column 'start_h': %g is outside 0 to 1e7 hours", t0);
        else if (!(dur > 0.0 && dur <= 1e6))
            st = lw_error_set(err, LW_EINPUT, path, line,
                              "column 'duration_h': %g is not above 0 (at most 1e6 hours)", dur);
        else if (t0 < end)
            st = lw_error_set(err, LW_EINPUT, path, line,
                              "column 'start_h': the session starts at %g h, before the one "
                              "above it ends at %g h (sessions in time order, not overlapping)",
                              t0, end);
        int light = -1;
        if (st == LW_OK)
            st = session_light(base, v, origin, out, s, lw_csv_text(&csv, i), path, line, &light,
                               err);
        if (st == LW_OK) {
            s->plan[s->n++] = (lw_session_plan){t0, dur, light};
            end = t0 + dur;
        }
    }
    lw_csv_clear(&csv);
    return st;
}

lw_status lw_profschedule_build(const lw_profile *base, const lw_profile_variant *v,
                                const char *origin, lw_profile *out, lw_error *err)
{
    if (v->without_use)
        return LW_OK;
    bool on = lw_profile_given(out, "use.on_h"), off = lw_profile_given(out, "use.off_h");
    bool file = out->use_file[0] != '\0';
    if (!on && !off && !file)
        return LW_OK;
    const char *kfile;
    int kline;
    if (file && (on || off)) {
        lw_profile_key_where(out, "use", "sessions_file", &kfile, &kline);
        return lw_error_set(err, LW_EINPUT, kfile, kline,
                            "[use] give either sessions_file or on_h (with off_h), not both");
    }
    if (off && !on) {
        lw_profile_key_where(out, "use", "off_h", &kfile, &kline);
        return lw_error_set(err, LW_EINPUT, kfile, kline,
                            "[use] off_h needs on_h (the hours of use per session)");
    }
    lw_schedule *s = lw_schedule_new();
    if (!s)
        return lw_error_set(err, LW_ENOMEM, NULL, 0, "out of memory");
    lw_status st = LW_OK;
    if (on) {
        s->on_h = out->use_on_h;
        s->off_h = off ? out->use_off_h : 0.0;
    } else {
        st = read_sessions(base, v, origin, out, s, err);
    }
    if (st != LW_OK) {
        lw_schedule_unref(s);
        return st;
    }
    lw_schedule_unref(out->light.use);
    out->light.use = s;
    return LW_OK;
}
