/* fuzz_problem_file.c - libFuzzer target: the INI problem-file reader
 * (problems/problem_file.c) must return cases or an error, never crash,
 * hang or leak. */
#include <stdlib.h>
#include "tests/fuzz/fuzz_common.h"
#include "problems/problem_file.h"

static void fuzz_quiet(const char *msg)
{
    (void)msg;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char dir[256], err[1024];
    const char *path = fuzz_file(data, size, "p.ini", dir, sizeof dir);
    pb_problem *cases = NULL;
    int n = 0;
    if (path && pb_problem_file_read(path, &cases, &n, err, sizeof err, fuzz_quiet) == PB_OK)
        free(cases);
    return 0;
}
