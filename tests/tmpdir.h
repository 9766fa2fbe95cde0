/*
 * tmpdir.h - a scratch folder per test program, and writing fixture files
 * into it from strings, so that the line numbers a test expects stand in the
 * test's own source.
 */
#ifndef LW_TMPDIR_H
#define LW_TMPDIR_H

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <lampwick/cache.h>

static char lw_tmp_root[256];

static inline const char *tmp_root(void)
{
    if (!lw_tmp_root[0]) {
        snprintf(lw_tmp_root, sizeof lw_tmp_root, "/tmp/lampwick-test-XXXXXX");
        if (!mkdtemp(lw_tmp_root))
            abort();
    }
    return lw_tmp_root;
}

/* Write `text` to tmp_root()/name; returns the full path (static buffer
 * rotation of 8). */
static inline const char *tmp_write(const char *name, const char *text)
{
    static char paths[8][512];
    static int k;
    char *p = paths[k++ % 8];
    snprintf(p, 512, "%s/%s", tmp_root(), name);
    FILE *fp = fopen(p, "wb");
    if (!fp)
        abort();
    fputs(text, fp);
    fclose(fp);
    /* a file rewritten within a timestamp tick can look unchanged to the
     * cache of parsed files (cache.h): start it afresh */
    lw_cache_clear();
    return p;
}

static inline void tmp_cleanup(void)
{
    if (!lw_tmp_root[0])
        return;
    char cmd[300];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", lw_tmp_root);
    if (system(cmd) != 0)
        fprintf(stderr, "could not remove %s\n", lw_tmp_root);
}

/* cmocka group teardown: remove the scratch folder. */
static inline int tmp_teardown(void **state)
{
    (void)state;
    tmp_cleanup();
    return 0;
}

#endif
