/* fuzz_series.c - libFuzzer target: the series CSV reader `report` uses
 * (pb_report_series_read, bench/report/report_data.c). */
#include "tests/fuzz/fuzz_common.h"
#include "bench/report/report_data.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char dir[256], err[1024];
    const char *path = fuzz_file(data, size, "s.csv", dir, sizeof dir);
    pb_report_series s;
    if (path && pb_report_series_read(path, &s, err, sizeof err) == 0) {
        pb_report_series_col(&s, "t");
        pb_report_series_free(&s);
    }
    return 0;
}
