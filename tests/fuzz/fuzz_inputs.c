/*
 * fuzz_inputs.c - libFuzzer harness for everything lampwick reads: the
 * input bytes are written as a light profile, a cell file, a cell curve, an
 * LED table, a discharge log or a --vary argument (the first byte chooses),
 * and loaded.  Any outcome but a crash, a hang or a sanitizer report is
 * fine; errors must come back as lw_error.
 *
 * Build and run (clang):
 *   clang -g -O1 -fsanitize=fuzzer,address,undefined -Isrc -Ibuild \
 *       tests/fuzz/fuzz_inputs.c src/[a-z]*.c -o /tmp/fuzz -linih -lcsv -lm -lpthread
 *   /tmp/fuzz -max_total_time=60 tests/fuzz/corpus
 * (src/[a-z]*.c takes the library without cli*.c and main.c: exclude them.)
 */
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "lampwick.h"

static char dir[64];

static const char *put(const char *name, const uint8_t *data, size_t size)
{
    static char path[128];
    snprintf(path, sizeof path, "%s/%s", dir, name);
    FILE *fp = fopen(path, "wb");
    if (!fp)
        abort();
    fwrite(data, 1, size, fp);
    fclose(fp);
    return path;
}

static void put_text(const char *name, const char *text)
{
    (void)put(name, (const uint8_t *)text, strlen(text));
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    if (!dir[0]) {
        snprintf(dir, sizeof dir, "/tmp/lampwick-fuzz-XXXXXX");
        if (!mkdtemp(dir))
            abort();
    }
    if (size < 1)
        return 0;
    int what = data[0] % 5;
    data++;
    size--;
    put_text("c.curve.csv", "depth_pct,open_circuit_v,resistance_ohm\n0,1.4,0.03\n100,1.0,0.05\n");
    put_text("c.ini", "[cell]\nname = c\nchemistry = nimh\nnominal_v = 1.2\ncapacity_mah = 2000\n"
                      "rated_ma = 400\ncutoff_v = 0.9\nrechargeable = yes\ncurve = c.curve.csv\n");
    lw_error e;
    lw_error_clear(&e);
    if (what == 0) { /* a light profile; run it when it loads */
        lw_profile p;
        if (lw_profile_load(put("p.ini", data, size), NULL, &p, &e) == LW_OK) {
            lw_result r;
            lw_run_options o = lw_run_options_default();
            if (lw_run(&p.light, &o, &r, &e) == LW_OK)
                lw_result_clear(&r);
        }
        lw_profile_clear(&p);
    } else if (what == 1 || what == 2) { /* a cell file, or its curve */
        lw_cell c;
        if (what == 1)
            put("c.ini", data, size);
        else
            put("c.curve.csv", data, size);
        char path[128];
        snprintf(path, sizeof path, "%s/c.ini", dir);
        if (lw_cell_load(path, &c, &e) == LW_OK)
            lw_cell_clear(&c);
    } else if (what == 3) { /* a discharge log */
        lw_dlog log;
        if (lw_dlog_read(put("log.csv", data, size), 3.9, 0, &log, &e) == LW_OK) {
            lw_cellfit_options opt = {.cutoff_v = 1.0, .resistance_ohm = 0.05,
                                      .tolerance_v = 0.005, .nominal_v = NAN};
            lw_cellfit fit;
            if (lw_fit_cell(&log, 1, &opt, &fit, &e) == LW_OK)
                lw_cell_clear(&fit.cell);
            lw_dlog_clear(&log);
        }
    } else { /* a --vary argument */
        char arg[256];
        size_t n = size < sizeof arg - 1 ? size : sizeof arg - 1;
        memcpy(arg, data, n);
        arg[n] = '\0';
        lw_vary v;
        if (lw_vary_parse(arg, NULL, &v, &e) == LW_OK)
            lw_vary_clear(&v);
    }
    return 0;
}
