/* fuzz_readers.c - libFuzzer target for the readers of outside input: the
 * first byte picks the reader (CCSDS OEM, problem file, summary.json, baseline),
 * the rest is the file. Each reader must return an error or a result, never
 * crash, hang or leak (built with ASan + UBSan by `make fuzz`). */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <jansson.h>
#include "bench/gate/baseline.h"
#include "bench/store/oem_read.h"
#include "bench/store/summary_read.h"
#include "problems/catalogue.h"
#include "problems/problem_file.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static char fuzz_path[64];

static void fuzz_quiet(const char *msg)
{
    (void)msg;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    if (size < 1)
        return 0;
    if (!fuzz_path[0])
        snprintf(fuzz_path, sizeof fuzz_path, "/tmp/pb-fuzz-%d.in", (int)getpid());
    FILE *f = fopen(fuzz_path, "wb");
    if (!f)
        return 0;
    fwrite(data + 1, 1, size - 1, f);
    fclose(f);
    char err[1024];
    switch (data[0] % 4) {
    case 0: {
        static const char *const probs[] = {"leo-circular", "kepler-e0.5", "arenstorf"};
        pb_problem p;
        pb_problem_lookup(probs[(data[0] / 4) % 3], &p);
        pb_oem o;
        memset(&o, 0, sizeof o);
        if (pb_oem_read(fuzz_path, &p, &o, err, sizeof err) == 0)
            pb_oem_free(&o);
        break;
    }
    case 1: {
        pb_problem *cases = NULL;
        int n = 0;
        if (pb_problem_file_read(fuzz_path, &cases, &n, err, sizeof err, fuzz_quiet) == PB_OK)
            free(cases);
        break;
    }
    case 2: {
        json_t *d = NULL;
        if (pb_summary_load(fuzz_path, &d, err, sizeof err) == 0)
            pb_summary_complete(fuzz_path, d, err, sizeof err);
        json_decref(d);
        break;
    }
    default: {
        json_t *d = NULL;
        if (pb_baseline_load(fuzz_path, &d, err, sizeof err) == 0)
            json_decref(d);
        break;
    }
    }
    return 0;
}
