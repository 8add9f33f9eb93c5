/* test_reliability_support.h - helpers of the reliability tests: shell
 * commands, folder listings, background CLI processes and their groups. */
#ifndef PB_TEST_RELIABILITY_SUPPORT_H
#define PB_TEST_RELIABILITY_SUPPORT_H

#include <stddef.h>
#include <sys/types.h>

/* Run a shell command (printf-style); its exit status, or -1. */
int rel_sh(const char *fmt, ...) __attribute__((format(printf, 1, 2)));

void rel_sleep_ms(long ms);

/* The entries of dir, sorted, as one space-separated line ("" if none). */
void rel_list(const char *dir, char *buf, size_t len);

/* 1 if dir holds an entry whose name starts with prefix ("": any entry). */
int rel_has_entry(const char *dir, const char *prefix);

/* Poll (up to 20 s) until dir holds an entry starting with prefix. */
int rel_wait_entry(const char *dir, const char *prefix);

/* Start $PB_BIN with args (NULL-terminated, no argv[0]) in a process group
 * of its own (its pid), output to /dev/null. */
pid_t rel_spawn(const char *const *args);

/* How many processes of group pgid are alive (zombies do not count). */
int rel_alive_in_group(pid_t pgid);

/* Poll (up to 10 s) until no process of group pgid is alive; how many are. */
int rel_wait_group_gone(pid_t pgid);

/* The folder that holds dir, and ".NAME." + what, the prefix of the
 * entries a writer of dir keeps beside it (bench/store/run_swap.h). */
void rel_beside(const char *dir, const char *what, char *parent, size_t plen, char *prefix, size_t flen);

/* A monotonic clock, in seconds. */
double rel_now(void);

#endif
