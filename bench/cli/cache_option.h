/* cache_option.h - `--cache DIR`, accepted by every verb that builds
 * reference trajectories (run, sweep, select, score, selftest). */
#ifndef PB_CACHE_OPTION_H
#define PB_CACHE_OPTION_H

/* Take `--cache DIR` (or `--cache=DIR`) out of argv[2..] and make DIR the
 * reference cache of this process and its workers (PB_CACHE_DIR, which
 * reference_cache.h reads). 0, or -1 after a message naming the problem
 * (no value, a value too long for a path, the option given twice). */
int pb_cache_option_take(const char *verb, int *argc, char **argv);

#endif
