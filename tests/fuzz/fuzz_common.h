/* fuzz_common.h - shared by the libFuzzer targets (one per reader of
 * outside input; `make fuzz`): the readers take paths, so each input is
 * written to a file in a folder of the fuzzing process's own. */
#ifndef PB_FUZZ_COMMON_H
#define PB_FUZZ_COMMON_H

#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <sys/stat.h>
#include <unistd.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

/* The folder (made once) and name's path in it, holding data; NULL when
 * the file cannot be written. */
static inline const char *fuzz_file(const uint8_t *data, size_t size, const char *name,
                                    char *dir, size_t dirlen)
{
    static char path[512];
    snprintf(dir, dirlen, "%s/pb-fuzz-%d", getenv("TMPDIR") ? getenv("TMPDIR") : "/tmp",
             (int)getpid());
    mkdir(dir, 0700);
    snprintf(path, sizeof path, "%s/%s", dir, name);
    FILE *f = fopen(path, "wb");
    if (!f)
        return NULL;
    int bad = fwrite(data, 1, size, f) != size;
    bad |= fclose(f) != 0;
    return bad ? NULL : path;
}

#endif
