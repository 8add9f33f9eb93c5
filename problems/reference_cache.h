/* reference_cache.h - where reference trajectories are kept between runs,
 * and how big that folder may grow: one file per problem, horizon and
 * sample times (reference.c's key), read back whole or not at all. */
#ifndef PB_REFERENCE_CACHE_H
#define PB_REFERENCE_CACHE_H

#include <stdint.h>

/* The default folder: $PB_CACHE_DIR, else $XDG_CACHE_HOME/propbench, else
 * $HOME/.cache/propbench (the XDG base-directory rule), never the working
 * directory; NULL (no cache) when none of those is set or the path does not
 * fit. The string is static: valid until the environment changes. */
const char *pb_cache_dir_default(void);

/* The cap on the folder's reference files, in bytes: $PB_CACHE_MAX_MB
 * megabytes (a whole number >= 1), else 512 MB. */
uint64_t pb_cache_cap_bytes(void);

/* Read entry key with n states into r, v and floor: 1 when it was there
 * whole and matches (its time of last use is then renewed), else 0. */
int pb_ref_cache_read(const char *dir, uint64_t key, int n, long double *r, long double *v,
                      double *floor);

/* An exclusive lock on entry key while one process builds it: another that
 * needs the same entry waits, then reads it, instead of building it too
 * (a sweep's workers start cases of one problem side by side). The lock is
 * a file beside the entry, lock-<key>, removed with the entry when the cap
 * prunes it; the kernel drops the lock if its holder dies. Returns its
 * descriptor, or -1 (no cache folder, or no lock to be had: build anyway). */
int pb_ref_cache_lock(const char *dir, uint64_t key);
void pb_ref_cache_unlock(int fd);

/* Write the entry (temporary name, then rename: an interrupted run never
 * leaves half an entry), then remove the least recently used entries until
 * the folder's reference files fit the cap. A failure only loses the
 * entry, never the result. */
void pb_ref_cache_write(const char *dir, uint64_t key, int n, const long double *r,
                        const long double *v, const double *floor);

#endif
