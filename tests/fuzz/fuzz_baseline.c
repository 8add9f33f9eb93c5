/* fuzz_baseline.c - libFuzzer target: the regression baseline reader
 * (bench/gate/baseline.c) `check --baseline` uses. */
#include <jansson.h>
#include "tests/fuzz/fuzz_common.h"
#include "bench/gate/baseline.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char dir[256], err[1024];
    const char *path = fuzz_file(data, size, "baseline.json", dir, sizeof dir);
    json_t *d = NULL;
    if (path && pb_baseline_load(path, &d, err, sizeof err) == 0)
        json_decref(d);
    return 0;
}
