/* fuzz_summary.c - libFuzzer target: a run's summary.json as `check`,
 * `baseline` and `merge` read it (bench/store/summary_read.c) and as
 * `report` reads it (bench/report/report_data.c, the run folder's
 * summary; its series are absent). */
#include <jansson.h>
#include "tests/fuzz/fuzz_common.h"
#include "bench/report/report_data.h"
#include "bench/store/summary_read.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char dir[256], err[1024];
    const char *path = fuzz_file(data, size, "summary.json", dir, sizeof dir);
    if (!path)
        return 0;
    json_t *d = NULL;
    if (pb_summary_load(path, &d, err, sizeof err) == 0)
        pb_summary_complete(path, d, err, sizeof err);
    json_decref(d);
    pb_report_run run;
    if (pb_report_load(dir, &run, err, sizeof err) == 0)
        pb_report_free(&run);
    return 0;
}
