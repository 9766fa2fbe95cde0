/*
 * path.c - paths and opening input files (see path.h).
 */
#include "lampwick/path.h"

#include <errno.h>
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

lw_status lw_path_open_regular(const char *path, const char *mode, FILE **fp,
                               const char *what_file, int what_line, const char *what,
                               lw_error *err)
{
    *fp = NULL;
    const char *at = what_file ? what_file : path;
    int line = what_file ? what_line : 0;
    /* "[cell] curve: cannot open 'x.csv': ..." for a file named by a key;
     * "cannot open: ..." for the path itself, which the message names */
    char label[1024] = "", quoted[600] = "";
    if (what_file) {
        snprintf(label, sizeof label, "%s: ", what ? what : "file");
        snprintf(quoted, sizeof quoted, " '%s'", path);
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
    *fp = f;
    return LW_OK;
}

lw_status lw_path_check_readable(const char *path, const char *from_file, int from_line,
                            const char *what, lw_error *err)
{
    FILE *fp;
    lw_status st = lw_path_open_regular(path, "rb", &fp, from_file, from_line, what, err);
    if (fp)
        fclose(fp);
    return st;
}
