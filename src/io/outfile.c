/*
 * outfile.c - output files that are whole or absent (see outfile.h).
 */
#define _XOPEN_SOURCE 700 /* realpath */
#include "lampwick/outfile.h"

#include <errno.h>
#include <fcntl.h>
#include <limits.h>
#include <pthread.h>
#include <signal.h>
#include <stdatomic.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

/* Temporary files open at the moment, for lw_outfile_remove_all.  A command
 * has a few outputs open at once; a slot is claimed (free -> taking), filled,
 * published (-> ready) and released by the thread that writes the file, and
 * read by a signal handler, which unlinks only ready slots.  Lock-free
 * atomics are safe in a signal handler (C17 7.14.1.1). */
#define SLOTS 16
enum { SLOT_FREE, SLOT_TAKING, SLOT_READY };
static char slot_path[SLOTS][LW_OUTFILE_PATH_MAX + 32];
static atomic_int slot_state[SLOTS];

static int claim_slot(const char *tmp)
{
    for (int i = 0; i < SLOTS; i++) {
        int want = SLOT_FREE;
        if (atomic_compare_exchange_strong(&slot_state[i], &want, SLOT_TAKING)) {
            memcpy(slot_path[i], tmp, strlen(tmp) + 1);
            atomic_store(&slot_state[i], SLOT_READY);
            return i;
        }
    }
    return -1; /* not registered: an interrupt would leave it (very many open) */
}

static void release_slot(int i)
{
    if (i >= 0 && i < SLOTS)
        atomic_store(&slot_state[i], SLOT_FREE);
}

/* Signals held off across the steps that create or rename a registered
 * file, so that a handler never finds a file that is made but not yet
 * registered (or renamed but still registered).  Worker threads run with
 * every signal blocked (pool.c), so the handler runs on this thread. */
static bool hold_signals(sigset_t *old)
{
    sigset_t all;
    sigfillset(&all);
    return pthread_sigmask(SIG_SETMASK, &all, old) == 0;
}

static void release_signals(bool held, const sigset_t *old)
{
    if (held)
        pthread_sigmask(SIG_SETMASK, old, NULL);
}

int lw_outfile_guard(const char *path)
{
    if (strlen(path) >= sizeof slot_path[0])
        return -1;
    return claim_slot(path);
}

void lw_outfile_unguard(int guard)
{
    release_slot(guard);
}

void lw_outfile_remove_all(void)
{
    for (int i = 0; i < SLOTS; i++)
        if (atomic_load(&slot_state[i]) == SLOT_READY)
            unlink(slot_path[i]);
}

/* The file to replace: path itself, or the target of a link. */
static lw_status destination(const char *path, char *dest, size_t size, lw_error *err)
{
    struct stat sb;
    if (lstat(path, &sb) != 0) {
        if (errno == ENOENT) {
            memcpy(dest, path, strlen(path) + 1);
            return LW_OK;
        }
        return lw_error_set(err, LW_EIO, path, 0, "cannot write: %s", strerror(errno));
    }
    if (S_ISLNK(sb.st_mode)) {
        char real[PATH_MAX];
        if (!realpath(path, real))
            return lw_error_set(err, LW_EINPUT, path, 0,
                                "cannot write: a symbolic link whose target is missing");
        if (strlen(real) >= size)
            return lw_error_set(err, LW_EINPUT, path, 0,
                                "cannot write: the link's target path is too long");
        memcpy(dest, real, strlen(real) + 1);
        if (stat(dest, &sb) != 0)
            return lw_error_set(err, LW_EIO, path, 0, "cannot write: %s", strerror(errno));
    } else {
        memcpy(dest, path, strlen(path) + 1);
    }
    if (S_ISDIR(sb.st_mode))
        return lw_error_set(err, LW_EINPUT, path, 0, "cannot write: it is a folder");
    if (!S_ISREG(sb.st_mode))
        return lw_error_set(err, LW_EINPUT, path, 0,
                            "cannot write: not a regular file (a device, pipe or socket is "
                            "never replaced)");
    return LW_OK;
}

lw_status lw_outfile_open(lw_outfile *out, const char *path, lw_error *err)
{
    memset(out, 0, sizeof *out);
    out->slot = -1;
    out->release_on_commit = -1;
    if (strlen(path) > LW_OUTFILE_PATH_MAX)
        return lw_error_set(err, LW_EINPUT, NULL, 0,
                            "the output path '%.60s...' is longer than %d bytes", path,
                            LW_OUTFILE_PATH_MAX);
    memcpy(out->path, path, strlen(path) + 1);
    if (!strcmp(path, "-")) {
        out->fp = stdout;
        out->is_stdout = true;
        return LW_OK;
    }
    lw_status st = destination(path, out->dest, sizeof out->dest, err);
    if (st != LW_OK)
        return st;
    snprintf(out->tmp, sizeof out->tmp, "%s.tmpXXXXXX", out->dest);
    sigset_t mask_old;
    bool held = hold_signals(&mask_old);
    int fd = mkstemp(out->tmp);
    int e = errno;
    if (fd >= 0)
        out->slot = claim_slot(out->tmp);
    release_signals(held, &mask_old);
    if (fd < 0) {
        out->tmp[0] = '\0';
        return lw_error_set(err, LW_EIO, path, 0, "cannot write: %s", strerror(e));
    }
    /* mkstemp makes the file private; give it the usual mode */
    mode_t mask = umask(0);
    umask(mask);
    (void)fchmod(fd, 0666 & ~mask);
    out->fp = fdopen(fd, "wb");
    if (!out->fp) {
        e = errno;
        close(fd);
        lw_outfile_abort(out);
        return lw_error_set(err, LW_EIO, path, 0, "cannot write: %s", strerror(e));
    }
    return LW_OK;
}

/* The reason a stream has its error flag set: the failed write is tried
 * again (the data is lost either way) to learn the system's errno. */
static int write_errno(FILE *fp)
{
    int e = errno;
    clearerr(fp);
    errno = 0;
    if (fflush(fp) != 0 && errno)
        e = errno;
    return e;
}

/* fsync the folder of path, so that a rename into it survives a crash. */
static int sync_folder(const char *path)
{
    char dir[LW_OUTFILE_PATH_MAX + 1];
    const char *slash = strrchr(path, '/');
    if (!slash)
        snprintf(dir, sizeof dir, ".");
    else if (slash == path)
        snprintf(dir, sizeof dir, "/");
    else
        snprintf(dir, sizeof dir, "%.*s", (int)(slash - path), path);
    int fd = open(dir, O_RDONLY | O_DIRECTORY);
    if (fd < 0)
        return -1;
    int rc = fsync(fd);
    close(fd);
    return rc;
}

lw_status lw_outfile_commit(lw_outfile *out, lw_error *err)
{
    if (!out->fp)
        return lw_error_set(err, LW_EIO, out->path, 0, "not open");
    if (out->is_stdout) {
        out->fp = NULL;
        return fflush(stdout) == 0 && !ferror(stdout)
                   ? LW_OK
                   : lw_error_set(err, LW_EIO, "-", 0, "cannot write: %s", strerror(errno));
    }
    int e = 0;
    bool bad = ferror(out->fp) != 0;
    if (bad)
        e = write_errno(out->fp);
    else if (fflush(out->fp) != 0 || (out->durable && fsync(fileno(out->fp)) != 0)) {
        bad = true;
        e = errno;
    }
    if (fclose(out->fp) != 0 && !bad) {
        bad = true;
        e = errno;
    }
    out->fp = NULL;
    sigset_t mask_old;
    bool held = false;
    if (!bad) {
        held = hold_signals(&mask_old);
        if (rename(out->tmp, out->dest) != 0) {
            bad = true;
            e = errno;
        } else {
            release_slot(out->slot);
            release_slot(out->release_on_commit);
            out->slot = -1;
            out->release_on_commit = -1;
            out->tmp[0] = '\0';
        }
        release_signals(held, &mask_old);
    }
    if (bad) {
        lw_outfile_abort(out);
        return lw_error_set(err, LW_EIO, out->path, 0, "cannot write: %s",
                            e ? strerror(e) : "write error");
    }
    if (out->durable && sync_folder(out->dest) != 0)
        return lw_error_set(err, LW_EIO, out->path, 0, "cannot sync the folder: %s",
                            strerror(errno));
    return LW_OK;
}

void lw_outfile_abort(lw_outfile *out)
{
    if (!out)
        return;
    if (out->fp && !out->is_stdout)
        fclose(out->fp);
    out->fp = NULL;
    if (out->tmp[0])
        unlink(out->tmp);
    release_slot(out->slot);
    out->slot = -1;
    out->tmp[0] = '\0';
}

/* Do a and b name the same file (both existing: the same inode; else the
 * same absolute path of their folders and the same name)? */
static bool same_file(const char *a, const char *b)
{
    struct stat sa, sb;
    if (stat(a, &sa) == 0 && stat(b, &sb) == 0)
        return sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
    char ra[PATH_MAX], rb[PATH_MAX];
    char da[LW_OUTFILE_PATH_MAX + 1], db[LW_OUTFILE_PATH_MAX + 1];
    const char *na = strrchr(a, '/'), *nb = strrchr(b, '/');
    snprintf(da, sizeof da, "%.*s", na ? (int)(na - a) : 1, na ? a : ".");
    snprintf(db, sizeof db, "%.*s", nb ? (int)(nb - b) : 1, nb ? b : ".");
    if (na == a)
        snprintf(da, sizeof da, "/");
    if (nb == b)
        snprintf(db, sizeof db, "/");
    if (!realpath(da, ra) || !realpath(db, rb))
        return !strcmp(a, b);
    return !strcmp(ra, rb) && !strcmp(na ? na + 1 : a, nb ? nb + 1 : b);
}

lw_status lw_outfile_check(const char *path, const char *what, const char *const *others,
                           size_t n, lw_error *err)
{
    if (!path || !strcmp(path, "-"))
        return LW_OK;
    for (size_t i = 0; i < n; i++)
        if (others[i] && others[i][0] && strcmp(others[i], "-") != 0 &&
            same_file(path, others[i]))
            return lw_error_set(err, LW_EINPUT, what, 0,
                                "'%s' is the same file as '%s': refusing to write over it",
                                path, others[i]);
    return LW_OK;
}

static lw_status write_whole(const char *path, bool durable, int guard, lw_outfile_fn fn,
                             const void *ctx, lw_error *err)
{
    lw_outfile out;
    lw_status st = lw_outfile_open(&out, path, err);
    if (st != LW_OK)
        return st;
    out.durable = durable;
    out.release_on_commit = guard;
    st = fn(out.fp, ctx, err);
    if (st == LW_EIO && !out.is_stdout) {
        /* a writer knows only that the stream failed: name the file and
         * the reason */
        int e = write_errno(out.fp);
        lw_outfile_abort(&out);
        lw_error_clear(err);
        return lw_error_set(err, LW_EIO, path, 0, "cannot write: %s",
                            e ? strerror(e) : "write error");
    }
    if (st != LW_OK) {
        lw_outfile_abort(&out);
        return st;
    }
    return lw_outfile_commit(&out, err);
}

lw_status lw_outfile_write(const char *path, lw_outfile_fn fn, const void *ctx, lw_error *err)
{
    return write_whole(path, false, -1, fn, ctx, err);
}

lw_status lw_outfile_write_durable(const char *path, int guard, lw_outfile_fn fn,
                                   const void *ctx, lw_error *err)
{
    return write_whole(path, true, guard, fn, ctx, err);
}
