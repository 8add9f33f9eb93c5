/* cache_option.c - `--cache DIR` for every verb (cache_option.h). It goes
 * through the environment so that sweep's workers, forked or started anew,
 * see the same folder as the verb that started them. */
#include <limits.h>
#include <stdlib.h>
#include <string.h>
#include "bench/cli/cache_option.h"
#include "bench/cli/cli.h"

int pb_cache_option_take(const char *verb, int *argc, char **argv)
{
    const char *dir = NULL;
    int out = 2;
    for (int i = 2; i < *argc; i++) {
        const char *val = NULL;
        if (!strcmp(argv[i], "--cache")) {
            if (i + 1 >= *argc)
                return pb_cli_error(verb, "--cache expects a folder"), -1;
            val = argv[++i];
        } else if (!strncmp(argv[i], "--cache=", 8)) {
            val = argv[i] + 8;
        } else {
            argv[out++] = argv[i];
            continue;
        }
        if (dir)
            return pb_cli_error(verb, "--cache is given twice ('%s' and '%s')", dir, val), -1;
        if (!*val || strlen(val) + 32 >= PATH_MAX)
            return pb_cli_error(verb, "--cache: '%s' cannot name a folder here (empty, or over "
                                "%d bytes with the cache's file names)", val, PATH_MAX - 33), -1;
        dir = val;
    }
    argv[out] = NULL;
    *argc = out;
    if (dir && setenv("PB_CACHE_DIR", dir, 1))
        return pb_cli_error(verb, "--cache: cannot set the cache folder '%s'", dir), -1;
    return 0;
}
