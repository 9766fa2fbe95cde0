/*
 * cache.c - parsed input files, loaded once per path per process (see
 * cache.h).
 */
#include "lampwick/cache.h"

#include <pthread.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include "lampwick/alloc.h"
#include "lampwick/text.h"

/* What makes a file the same file. */
typedef struct ident {
    dev_t dev;
    ino_t ino;
    off_t size;
    struct timespec mtime;
} ident;

typedef struct entry {
    char path[LW_PATH_MAX];
    char kind[32];           /* "" for a cell */
    ident id;
    lw_interp *table;        /* a table, or */
    lw_cell cell;            /* a cell (kind ""), whose curve and temperature
                                table are checked too: */
    ident curve_id, temp_id;
} entry;

static pthread_mutex_t lock = PTHREAD_MUTEX_INITIALIZER;
static entry *entries;
static size_t n_entries, cap_entries;

static void drop(entry *e)
{
    if (e->kind[0])
        lw_interp_free(e->table);
    else
        lw_cell_clear(&e->cell);
}

static void clear_locked(void)
{
    for (size_t i = 0; i < n_entries; i++)
        drop(&entries[i]);
    free(entries);
    entries = NULL;
    n_entries = cap_entries = 0;
}

void lw_cache_clear(void)
{
    pthread_mutex_lock(&lock);
    clear_locked();
    pthread_mutex_unlock(&lock);
}

/* The identity of a regular file at path; all zero when there is none. */
static ident ident_of(const char *path)
{
    struct stat sb;
    ident id = {0};
    if (path[0] && stat(path, &sb) == 0 && S_ISREG(sb.st_mode))
        id = (ident){sb.st_dev, sb.st_ino, sb.st_size, sb.st_mtim};
    return id;
}

/* A file changed within this long of now may change again within the same
 * tick of the file system's clock (a few ms) and keep its identity (an
 * inode number reused by a rename, the same size and mtime): it is not
 * cached until it has aged (the "racily clean" problem of content caches). */
#define CACHE_RACY_S 2

static bool racy(const ident *id)
{
    struct timespec now;
    if (clock_gettime(CLOCK_REALTIME, &now) != 0)
        return true;
    return id->mtime.tv_sec >= now.tv_sec - CACHE_RACY_S;
}

static bool same_ident(ident a, ident b)
{
    return a.dev == b.dev && a.ino == b.ino && a.size == b.size &&
           a.mtime.tv_sec == b.mtime.tv_sec && a.mtime.tv_nsec == b.mtime.tv_nsec;
}

static bool same_file(const entry *e, const ident *id)
{
    if (!same_ident(e->id, *id))
        return false;
    if (e->kind[0])
        return true;
    return same_ident(e->curve_id, ident_of(e->cell.curve_path)) &&
           same_ident(e->temp_id, ident_of(e->cell.temperature_path));
}

/* The entry for (path, kind): its index, or n_entries when there is none.
 * An entry for a file that changed is dropped. */
static size_t find_locked(const char *path, const char *kind, const ident *id)
{
    for (size_t i = 0; i < n_entries; i++) {
        entry *e = &entries[i];
        if (strcmp(e->path, path) != 0 || strcmp(e->kind, kind) != 0)
            continue;
        if (id && same_file(e, id))
            return i;
        drop(e);
        entries[i] = entries[--n_entries];
        return n_entries;
    }
    return n_entries;
}

/* A new entry (filled by the caller), or NULL when out of memory; the
 * cache starts afresh when full. */
static entry *add_locked(const char *path, const char *kind, const ident *id)
{
    if (strlen(path) >= sizeof entries[0].path || strlen(kind) >= sizeof entries[0].kind ||
        racy(id))
        return NULL;
    if (n_entries == LW_CACHE_ENTRIES_MAX)
        clear_locked();
    if (n_entries == cap_entries) {
        size_t cap = cap_entries ? 2 * cap_entries : 16;
        entry *grown = lw_realloc(entries, cap * sizeof *grown);
        if (!grown)
            return NULL;
        entries = grown;
        cap_entries = cap;
    }
    entry *e = &entries[n_entries];
    memset(e, 0, sizeof *e);
    lw_text_copy(e->path, path, sizeof e->path);
    lw_text_copy(e->kind, kind, sizeof e->kind);
    e->id = *id;
    return e;
}

lw_status lw_cache_table(const char *path, const char *kind, lw_cache_table_fn load,
                         const void *ctx, lw_interp **out, lw_error *err)
{
    ident id = ident_of(path);
    bool known = id.ino != 0 || id.dev != 0;
    pthread_mutex_lock(&lock);
    size_t i = find_locked(path, kind, known ? &id : NULL);
    if (i < n_entries) {
        lw_interp_ref(entries[i].table);
        *out = entries[i].table;
        pthread_mutex_unlock(&lock);
        return LW_OK;
    }
    lw_interp *t = NULL;
    lw_status st = load(path, ctx, &t, err);
    if (st == LW_OK && known) {
        entry *e = add_locked(path, kind, &id);
        if (e) {
            lw_interp_ref(t);
            e->table = t;
            n_entries++;
        }
    }
    pthread_mutex_unlock(&lock);
    if (st == LW_OK)
        *out = t;
    return st;
}

lw_status lw_cache_cell(const char *path, lw_cache_cell_fn load, const void *ctx, lw_cell *out,
                        lw_error *err)
{
    ident id = ident_of(path);
    bool known = id.ino != 0 || id.dev != 0;
    pthread_mutex_lock(&lock);
    size_t i = find_locked(path, "", known ? &id : NULL);
    if (i < n_entries) {
        lw_cell_copy(out, &entries[i].cell);
        pthread_mutex_unlock(&lock);
        return LW_OK;
    }
    lw_cell cell;
    lw_status st = load(path, ctx, &cell, err);
    if (st == LW_OK && known) {
        ident curve = ident_of(cell.curve_path), temp = ident_of(cell.temperature_path);
        entry *e = racy(&curve) || racy(&temp) ? NULL : add_locked(path, "", &id);
        if (e) {
            lw_cell_copy(&e->cell, &cell);
            e->curve_id = curve;
            e->temp_id = temp;
            n_entries++;
        }
    }
    pthread_mutex_unlock(&lock);
    if (st == LW_OK)
        *out = cell;
    return st;
}
