/*
 * fuzz_replay.c - the fuzz corpus as a regression test: every file of
 * CORPUS/<target>/ is fed to that target once (no fuzzing engine needed, so
 * it runs in every build, and under gcov for the coverage figure).
 * Usage: fuzz_replay CORPUS_FOLDER.  Exit 0 when every input was run.
 */
#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "fuzz_targets.h"

static int replay_file(const char *path, fuzz_fn fn)
{
    FILE *fp = fopen(path, "rb");
    if (!fp)
        return -1;
    size_t cap = 1 << 16, n = 0;
    unsigned char *buf = malloc(cap);
    size_t got;
    while (buf && (got = fread(buf + n, 1, cap - n, fp)) > 0) {
        n += got;
        if (n == cap) {
            unsigned char *b = realloc(buf, cap *= 2);
            if (!b) {
                free(buf);
                buf = NULL;
            }
            buf = b;
        }
    }
    fclose(fp);
    if (!buf)
        return -1;
    fn(buf, n);
    free(buf);
    return 0;
}

int main(int argc, char **argv)
{
    if (argc != 2) {
        fprintf(stderr, "usage: fuzz_replay CORPUS_FOLDER\n");
        return 2;
    }
    int total = 0;
    for (size_t t = 0; t < fuzz_ntargets; t++) {
        char sub[1024];
        snprintf(sub, sizeof sub, "%s/%s", argv[1], fuzz_targets[t].name);
        DIR *d = opendir(sub);
        if (!d) {
            fprintf(stderr, "fuzz_replay: no corpus for %s\n", fuzz_targets[t].name);
            return 1;
        }
        int count = 0;
        struct dirent *de;
        while ((de = readdir(d)) != NULL) {
            if (de->d_name[0] == '.')
                continue;
            char path[2048];
            snprintf(path, sizeof path, "%s/%s", sub, de->d_name);
            if (replay_file(path, fuzz_targets[t].fn) != 0) {
                fprintf(stderr, "fuzz_replay: cannot read %s\n", path);
                closedir(d);
                return 1;
            }
            count++;
        }
        closedir(d);
        fprintf(stderr, "%-8s %d inputs\n", fuzz_targets[t].name, count);
        total += count;
    }
    fprintf(stderr, "%d inputs replayed\n", total);
    return total > 0 ? 0 : 1;
}
