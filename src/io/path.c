/*
 * path.c - paths and opening input files (see path.h).
 */
#include "lampwick/path.h"

#include <errno.h>
#include <pthread.h>
#include <fcntl.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

bool lw_path_join(char *out, size_t size, const char *dir, const char *rel)
{
    int n;
    if (rel[0] == '/' || !dir[0] || !strcmp(dir, "."))
        n = snprintf(out, size, "%s", rel);
    else
        n = snprintf(out, size, "%s/%s", dir, rel);
    return n >= 0 && (size_t)n < size;
}

void lw_path_dir(char *out, size_t size, const char *path)
{
    const char *slash = strrchr(path, '/');
    if (!slash) {
        snprintf(out, size, ".");
        return;
    }
    size_t n = (size_t)(slash - path);
    if (n == 0)
        n = 1; /* "/" */
    if (n >= size)
        n = size - 1;
    memcpy(out, path, n);
    out[n] = '\0';
}

/* Opens per path, for tests (lw_path_opens): the first LW_PATH_COUNTED
 * paths opened since the last reset. */
static pthread_mutex_t count_lock = PTHREAD_MUTEX_INITIALIZER;
static struct {
    char path[LW_PATH_MAX];
    size_t n;
} counted[LW_PATH_COUNTED];
static size_t n_counted;

static void count_open(const char *path)
{
    pthread_mutex_lock(&count_lock);
    size_t i = 0;
    while (i < n_counted && strcmp(counted[i].path, path) != 0)
        i++;
    if (i == n_counted && n_counted < LW_PATH_COUNTED && strlen(path) < LW_PATH_MAX) {
        memcpy(counted[i].path, path, strlen(path) + 1);
        counted[i].n = 0;
        n_counted++;
    }
    if (i < n_counted)
        counted[i].n++;
    pthread_mutex_unlock(&count_lock);
}

size_t lw_path_opens(const char *path)
{
    size_t n = 0;
    pthread_mutex_lock(&count_lock);
    for (size_t i = 0; i < n_counted; i++)
        if (!strcmp(counted[i].path, path))
            n = counted[i].n;
    pthread_mutex_unlock(&count_lock);
    return n;
}

void lw_path_opens_reset(void)
{
    pthread_mutex_lock(&count_lock);
    n_counted = 0;
    pthread_mutex_unlock(&count_lock);
}

const char *lw_path_display(const char *path)
{
    return strcmp(path, "-") ? path : LW_PATH_STDIN_NAME;
}

lw_status lw_path_open_regular(const char *path, const char *mode, const lw_path_ref *ref,
                               FILE **fp, lw_error *err)
{
    *fp = NULL;
    const char *at = ref ? ref->file : path;
    int line = ref ? ref->line : 0;
    /* "[cell] curve: cannot open 'x.csv': ..." for a file named by a key;
     * "cannot open: ..." for the path itself, which the message names */
    char label[1024] = "", quoted[600] = "";
    if (ref) {
        snprintf(label, sizeof label, "%s: ", ref->what ? ref->what : "file");
        snprintf(quoted, sizeof quoted, " '%s'", path);
    }
    if (!ref && !strcmp(path, "-") && mode[0] == 'r') {
        int in = dup(STDIN_FILENO);
        *fp = in >= 0 ? fdopen(in, mode) : NULL;
        if (!*fp) {
            if (in >= 0)
                close(in);
            return lw_error_set(err, LW_EINPUT, LW_PATH_STDIN_NAME, 0, "cannot read: %s",
                                strerror(errno));
        }
        return LW_OK;
    }
    /* opened without blocking and judged by what was opened (not by a
     * stat before the open, which a FIFO put in its place would pass) */
    int fd = open(path, O_RDONLY | O_NONBLOCK | O_CLOEXEC);
    if (fd < 0)
        return lw_error_set(err, LW_EINPUT, at, line, "%scannot open%s: %s", label, quoted,
                            strerror(errno));
    struct stat sb;
    const char *why = NULL;
    if (fstat(fd, &sb) != 0)
        why = strerror(errno);
    else if (S_ISDIR(sb.st_mode))
        why = "it is a folder";
    else if (!S_ISREG(sb.st_mode))
        why = "not a regular file (a device, pipe or socket)";
    int flags = why ? 0 : fcntl(fd, F_GETFL);
    if (!why && (flags < 0 || fcntl(fd, F_SETFL, flags & ~O_NONBLOCK) != 0))
        why = strerror(errno);
    FILE *f = why ? NULL : fdopen(fd, mode);
    if (!f) {
        if (!why)
            why = strerror(errno);
        close(fd);
        return lw_error_set(err, LW_EINPUT, at, line, "%scannot open%s: %s", label, quoted,
                            why);
    }
    count_open(path);
    *fp = f;
    return LW_OK;
}
