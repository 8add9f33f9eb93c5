/* test_reference_cache.c - where the reference cache lives (PB_CACHE_DIR,
 * the XDG base-directory rule, --cache on the command line) and its size
 * cap: the least recently used entries go first, the one just written and
 * one just read stay. The XDG rule: $XDG_CACHE_HOME if absolute, else
 * $HOME/.cache (XDG Base Directory Specification; common practice). */
#include <criterion/criterion.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include "test_support.h"
#include "problems/reference_cache.h"

Test(reference_cache, folder_from_environment)
{
    setenv("PB_CACHE_DIR", "/some/where", 1);
    cr_expect_str_eq(pb_cache_dir_default(), "/some/where");
    unsetenv("PB_CACHE_DIR");
    setenv("XDG_CACHE_HOME", "/xdg/cache", 1);
    setenv("HOME", "/home/analyst", 1);
    cr_expect_str_eq(pb_cache_dir_default(), "/xdg/cache/propbench");
    setenv("XDG_CACHE_HOME", "relative/cache", 1); /* invalid by the rule: ignored */
    cr_expect_str_eq(pb_cache_dir_default(), "/home/analyst/.cache/propbench");
    unsetenv("XDG_CACHE_HOME");
    unsetenv("HOME");
    cr_expect_null(pb_cache_dir_default(), "no folder to use: no cache, never the working one");
}

#define RC_N 4000 /* states per entry: 8 + 8 + 4 + 104 n bytes, 416,020 bytes */

static void rc_entry(const char *dir, uint64_t key, time_t used)
{
    static long double r[RC_N * 3], v[RC_N * 3];
    static double fl[RC_N];
    for (int i = 0; i < RC_N * 3; i++)
        r[i] = (long double)key + i, v[i] = -(long double)i;
    pb_ref_cache_write(dir, key, RC_N, r, v, fl);
    char path[4200];
    snprintf(path, sizeof path, "%s/ref-%016llx.bin", dir, (unsigned long long)key);
    struct timespec ts[2] = {{used, 0}, {used, 0}};
    cr_assert_eq(utimensat(AT_FDCWD, path, ts, 0), 0, "%s", path);
}

static int rc_has(const char *dir, uint64_t key)
{
    char path[4200];
    snprintf(path, sizeof path, "%s/ref-%016llx.bin", dir, (unsigned long long)key);
    return pbt_exists(path);
}

Test(reference_cache, least_recently_used_pruned_to_the_cap)
{
    char dir[4096];
    pbt_tmpdir(dir, sizeof dir);
    setenv("PB_CACHE_MAX_MB", "1", 1); /* room for two entries, not three */
    time_t now = time(NULL);
    rc_entry(dir, 1, now - 300);
    rc_entry(dir, 2, now - 200);
    /* entry 2's build lock, left behind by its build, goes with it */
    pb_ref_cache_unlock(pb_ref_cache_lock(dir, 2));
    char lock2[4200];
    snprintf(lock2, sizeof lock2, "%s/lock-%016llx", dir, 2ULL);
    cr_assert(pbt_exists(lock2), "%s", lock2);
    /* reading entry 1 makes it the most recently used */
    static long double r[RC_N * 3], v[RC_N * 3];
    static double fl[RC_N];
    cr_assert_eq(pb_ref_cache_read(dir, 1, RC_N, r, v, fl), 1);
    cr_expect_eq(r[5], 6.0L);
    rc_entry(dir, 3, now);  /* over the cap: entry 2, the least recently used, goes */
    cr_expect(rc_has(dir, 1), "entry 1 was just read");
    cr_expect(!rc_has(dir, 2), "entry 2 was the least recently used");
    cr_expect(!pbt_exists(lock2), "entry 2's lock stayed behind");
    cr_expect(rc_has(dir, 3), "entry 3 was just written");
    /* a wrong key or count is a miss, never a misread */
    cr_expect_eq(pb_ref_cache_read(dir, 3, RC_N - 1, r, v, fl), 0);
    cr_expect_eq(pb_ref_cache_read(dir, 4, RC_N, r, v, fl), 0);
}

static long rc_count(const char *dir)
{
    char cmd[4300], out[64] = "";
    snprintf(cmd, sizeof cmd, "ls %s 2>/dev/null | grep -c '^ref-.*\\.bin$'", dir);
    FILE *f = popen(cmd, "r");
    cr_assert_not_null(f);
    if (!fgets(out, sizeof out, f))
        out[0] = 0;
    pclose(f);
    return atol(out);
}

/* --cache DIR and PB_CACHE_DIR through the command line: the reference of a
 * J2 problem lands in the folder named, and nowhere in the working one. */
Test(reference_cache, cli_option_and_environment, .timeout = 120)
{
    char dir[4096], a[4200], b[4200], out[4096], err[4096];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(a, sizeof a, "%s/by-option", dir);
    snprintf(b, sizeof b, "%s/by-env", dir);
    const char *run[] = {"run", "--problem", "leo-j2", "--method", "rk4", "--steps-per-orbit",
                         "64", "--orbits", "1", "--repeats", "0", "--cache", a, "--out", dir, NULL};
    cr_assert_eq(pbt_run_cli(run, out, sizeof out, err, sizeof err), 0, "%s", err);
    cr_expect_eq(rc_count(a), 1);
    setenv("PB_CACHE_DIR", b, 1);
    const char *run2[] = {"run", "--problem", "leo-j2", "--method", "rk4", "--steps-per-orbit",
                          "64", "--orbits", "1", "--repeats", "0", "--out", dir, NULL};
    cr_assert_eq(pbt_run_cli(run2, out, sizeof out, err, sizeof err), 0, "%s", err);
    cr_expect_eq(rc_count(b), 1);
    const char *twice[] = {"run", "--cache", a, "--problem", "leo-j2", "--cache", b, NULL};
    cr_expect_eq(pbt_run_cli(twice, out, sizeof out, err, sizeof err), 2);
    cr_expect(strstr(err, "--cache is given twice"), "%s", err);
    const char *none[] = {"run", "--problem", "leo-j2", "--cache", NULL};
    cr_expect_eq(pbt_run_cli(none, out, sizeof out, err, sizeof err), 2);
    cr_expect(strstr(err, "--cache expects a folder"), "%s", err);
}

/* One build per entry: while a process holds an entry's build lock, another
 * that needs the entry waits, then reads what the first wrote instead of
 * building it. The parent takes the lock for leo-j2's one-sample reference
 * and writes an entry of its own making (positions of 1, 2, 3 km, marked so
 * that a build could never produce them); a child asks for the reference
 * meanwhile and must return exactly those values, and only after the lock
 * was released (its pipe stays empty while the parent holds the lock). */
#include <sys/wait.h>
#include <poll.h>
#include <unistd.h>
#include "problems/catalogue.h"
#include "problems/reference.h"

Test(reference_cache, a_build_in_progress_is_waited_for_not_repeated, .timeout = 60)
{
    char dir[256];
    pbt_tmpdir(dir, sizeof dir);
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("leo-j2", &p), PB_OK);
    double t[1] = {600};
    uint64_t key = pb_reference_key(&p, t, 1);
    int lock = pb_ref_cache_lock(dir, key);
    cr_assert_geq(lock, 0, "no lock in %s", dir);
    int fds[2];
    cr_assert_eq(pipe(fds), 0);
    pid_t pid = fork();
    cr_assert_geq(pid, 0);
    if (pid == 0) {
        /* the inherited descriptor shares the parent's lock: a flock lasts
         * until every descriptor of its open file is closed */
        close(lock);
        close(fds[0]);
        long double r[PB_DIM_MAX], v[PB_DIM_MAX];
        double fl[1];
        int s = pb_reference_build(&p, t, 1, dir, r, v, fl);
        char msg[200];
        int n = snprintf(msg, sizeof msg, "%d %.3Lf %.3Lf %.3Lf %.3g", s, r[0], r[1], r[2], fl[0]);
        _exit(write(fds[1], msg, (size_t)n) == n ? 0 : 1);
    }
    close(fds[1]);
    struct pollfd pf = {fds[0], POLLIN, 0};
    cr_assert_eq(poll(&pf, 1, 500), 0, "the child did not wait for the lock");
    long double r[PB_DIM_MAX] = {1, 2, 3}, v[PB_DIM_MAX] = {0, 0, 0};
    double fl[1] = {4.5e-9};
    pb_ref_cache_write(dir, key, 1, r, v, fl);
    pb_ref_cache_unlock(lock);
    char got[200] = {0};
    ssize_t k = read(fds[0], got, sizeof got - 1);
    int st = 0;
    waitpid(pid, &st, 0);
    close(fds[0]);
    cr_assert(k > 0 && WIFEXITED(st) && WEXITSTATUS(st) == 0, "child: %s", got);
    cr_assert_str_eq(got, "0 1.000 2.000 3.000 4.5e-09", "the child built instead of reading: %s", got);
}
