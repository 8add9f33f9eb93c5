/* fuzz_oem.c - libFuzzer target: the CCSDS OEM reader (bench/store/
 * oem_read.c). The first byte picks the problem the ephemeris is read
 * against (its units and frame), the rest is the file. */
#include <string.h>
#include "tests/fuzz/fuzz_common.h"
#include "bench/store/oem_read.h"
#include "problems/catalogue.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    static const char *const probs[] = {"leo-circular", "kepler-e0.5", "arenstorf"};
    if (size < 1)
        return 0;
    char dir[256], err[1024];
    const char *path = fuzz_file(data + 1, size - 1, "e.oem", dir, sizeof dir);
    pb_problem p;
    if (!path || pb_problem_lookup(probs[data[0] % 3], &p) != PB_OK)
        return 0;
    pb_oem o;
    memset(&o, 0, sizeof o);
    if (pb_oem_read(path, &p, &o, err, sizeof err) == 0)
        pb_oem_free(&o);
    return 0;
}
