/* test_reliability.c - nothing lost, nothing mixed: a failed in-place merge
 * keeps its shard, a full disk fails a sweep with the system's reason, one
 * writer per run folder, workers die with their sweep, a stopped run leaves
 * nothing, and a swap killed halfway is finished or undone by the next
 * writer (kill -9 at random moments: test_reliability_kill.c). Each runs
 * the CLI ($PB_BIN) in scratch folders. */
#include <criterion/criterion.h>
#include <dirent.h>
#include <fcntl.h>
#include <jansson.h>
#include <math.h>
#include <signal.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>
#include "test_support.h"
#include "test_reliability_support.h"

static char out_buf[1 << 14], err_buf[1 << 14];

static int cli(const char *const *args)
{
    return pbt_run_cli(args, out_buf, sizeof out_buf, err_buf, sizeof err_buf);
}

/* ---- 1. an in-place merge that fails keeps the shard's data ---- */

static const char *const shard_grid[] = {"sweep", "--problems", "kepler-e0.6", "--methods", "rk4,leapfrog",
                                         "--steps-per-orbit", "100,200", "--orbits", "5", "--repeats", "0",
                                         "--quiet", "--shard", NULL, "--out", NULL, NULL};

static void rel_shard(const char *k, const char *out)
{
    const char *a[sizeof shard_grid / sizeof *shard_grid];
    memcpy(a, shard_grid, sizeof a);
    a[13] = k;
    a[15] = out;
    cr_assert_eq(cli(a), 0, "%s", err_buf);
}

Test(reliability, failed_in_place_merge_keeps_the_shard)
{
    char dir[256], a[300], b[300], before[1024], after[1024];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(a, sizeof a, "%s/A", dir);
    snprintf(b, sizeof b, "%s/B", dir);
    rel_shard("1/2", a);
    rel_shard("2/2", b);
    /* one of B's series made unreadable as a file: the copy fails midway */
    cr_assert_eq(rel_sh("cd '%s' && f=$(ls B/series/*.csv | head -1) && rm $f && mkdir $f", dir), 0);
    cr_assert_eq(rel_sh("cd '%s' && cat A/summary.json A/series/*.csv | md5sum > sum.before", dir), 0);
    rel_list(a, before, sizeof before);
    int rc = cli((const char *[]){"merge", "--out", a, a, b, NULL});
    cr_assert_eq(rc, 2, "merge exit %d: %s", rc, err_buf);
    cr_assert_eq(rel_sh("cd '%s' && cat A/summary.json A/series/*.csv | md5sum | cmp -s - sum.before", dir), 0,
                 "A's summary or series changed after the failed merge");
    cr_assert(strstr(err_buf, "Is a directory"), "the reason is not given: %s", err_buf);
    rel_list(a, after, sizeof after);
    cr_assert_str_eq(after, before);
    rel_list(dir, after, sizeof after);
    cr_assert_str_eq(after, "A B sum.before ", "left beside the shards: %s", after);
    cr_assert_eq(rel_sh("rm -rf '%s'", dir), 0);
}

/* ---- 2. a full disk fails the sweep, with the system's reason ---- */

/* A sweep into a 3 MB tmpfs (its own mount namespace, so nothing needs
 * unmounting) holding an earlier run, filled to leave `free_kb`: exit
 * status, stderr and whether the earlier run is intact, written to files
 * in dir. Skips where no mount namespace can be had. */
static void rel_full_disk(const char *dir, int free_kb)
{
    /* as root a mount namespace is enough; otherwise a user namespace too */
    const char *ns = rel_sh("unshare -m true 2>/dev/null") == 0 ? "unshare -m"
                   : rel_sh("unshare -rm true 2>/dev/null") == 0 ? "unshare -rm" : NULL;
    if (!ns)
        cr_skip_test("no mount namespace here (unshare -m and -rm fail): the full-disk test needs one");
    const char *bin = getenv("PB_BIN");
    cr_assert_not_null(bin);
    int rc = rel_sh(
        "cd '%s' && %s sh -c '"
        "mkdir D && mount -t tmpfs -o size=3m tmpfs D || exit 90; "
        "%s sweep --problems kepler-e0 --methods rk4 --steps-per-orbit 100 --orbits 2 --repeats 0 --quiet --out D/run || exit 91; "
        "cat D/run/summary.json D/run/series/*.csv | md5sum > sum.before; "
        "avail=$(df -k --output=avail D | tail -1); "
        "dd if=/dev/zero of=D/fill bs=1k count=$((avail - %d)) 2>/dev/null; "
        "%s sweep --problems kepler-e0.6,kepler-e0.9 --methods rk4,leapfrog,yoshida4,rkf45 --steps-per-orbit 2000 "
        "--tolerances 1e-9 --orbits 20 --repeats 0 --quiet -j 2 --out D/run 2> err; echo $? > rc; "
        "cat D/run/summary.json D/run/series/*.csv | md5sum | cmp -s - sum.before && echo same > intact; "
        "ls -A D | tr \"\\n\" \" \" > left'",
        dir, ns, bin, free_kb, bin);
    cr_assert_eq(rc, 0, "setting up the full disk failed (%d)", rc);
}

static void rel_full_disk_check(int free_kb)
{
    char dir[256], f[400], buf[4096];
    pbt_tmpdir(dir, sizeof dir);
    rel_full_disk(dir, free_kb);
    snprintf(f, sizeof f, "%s/rc", dir);
    pbt_read_into(f, buf, sizeof buf);
    cr_assert_str_eq(buf, "2\n", "a sweep on a full disk (%d kB free) exits %s", free_kb, buf);
    snprintf(f, sizeof f, "%s/err", dir);
    pbt_read_into(f, buf, sizeof buf);
    cr_assert(strstr(buf, "No space left on device"), "the disk is not named: %s", buf);
    cr_assert(strstr(buf, "was left as it was"), "%s", buf);
    snprintf(f, sizeof f, "%s/intact", dir);
    cr_assert(pbt_exists(f), "the earlier run changed");
    snprintf(f, sizeof f, "%s/left", dir);
    pbt_read_into(f, buf, sizeof buf);
    cr_assert_str_eq(buf, "fill run ", "left on the disk: %s", buf);
    cr_assert_eq(rel_sh("rm -rf '%s'", dir), 0);
}

Test(reliability, sweep_on_a_full_disk_fails_with_the_reason)
{
    rel_full_disk_check(0);
}

/* Room for some cases' results and not for the others' (each series is
 * about 20 kB): the workers that could not write fail the sweep. */
Test(reliability, sweep_on_a_nearly_full_disk_fails_with_the_reason)
{
    rel_full_disk_check(60);
}

/* ---- 3. one writer per run folder ---- */

/* A sweep of long cases (minutes), started in the background. */
static pid_t rel_long_sweep(const char *out)
{
    return rel_spawn((const char *[]){"sweep", "--problems", "kepler-e0.6", "--methods", "rk4,leapfrog",
                                      "--steps-per-orbit", "20000,40000", "--orbits", "3000", "--repeats",
                                      "0", "--quiet", "-j", "2", "--out", out, NULL});
}

Test(reliability, second_writer_is_refused_naming_the_first)
{
    char dir[256], d[300], parent[300], stage[300], want[64], left[1024];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    rel_beside(d, "pb-new.", parent, sizeof parent, stage, sizeof stage);
    pid_t first = rel_long_sweep(d);
    cr_assert(rel_wait_entry(parent, stage) || rel_has_entry(dir, ""), "the first sweep never started");
    snprintf(want, sizeof want, "(process %ld)", (long)first);
    int rc = cli((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit",
                                  "100", "--orbits", "2", "--quiet", "--out", d, NULL});
    cr_assert_eq(rc, 2, "a second sweep into the same folder: exit %d, %s", rc, err_buf);
    cr_assert(strstr(err_buf, want), "the holder is not named %s: %s", want, err_buf);
    rc = cli((const char *[]){"run", "--problem", "kepler-e0", "--method", "rk4", "--steps-per-orbit", "100",
                              "--orbits", "2", "--quiet", "--out", d, NULL});
    cr_assert_eq(rc, 2, "a run into the folder being swept: exit %d, %s", rc, err_buf);
    cr_assert(strstr(err_buf, want), "the holder is not named %s: %s", want, err_buf);
    char shard[300];
    snprintf(shard, sizeof shard, "%s/S", dir);
    rel_shard("1/2", shard);
    rc = cli((const char *[]){"merge", "--allow-partial", "--out", d, shard, NULL});
    cr_assert_eq(rc, 2, "a merge into the folder being swept: exit %d, %s", rc, err_buf);
    cr_assert(strstr(err_buf, want), "the holder is not named %s: %s", want, err_buf);
    cr_assert_eq(rel_sh("rm -rf '%s'", shard), 0);
    kill(first, SIGTERM);
    int st;
    cr_assert_eq(waitpid(first, &st, 0), first);
    cr_assert(WIFEXITED(st) && WEXITSTATUS(st) == 128 + SIGTERM);
    rel_list(dir, left, sizeof left);
    cr_assert_str_eq(left, "", "left after the stopped sweep: %s", left);
    /* the lock went with its holder */
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit",
                                      "100", "--orbits", "2", "--quiet", "--out", d, NULL}), 0, "%s", err_buf);
    rel_list(dir, left, sizeof left);
    cr_assert_str_eq(left, "D ", "%s", left);
    cr_assert_eq(rel_sh("rm -rf '%s'", dir), 0);
}

/* ---- 13. a run stopped by SIGINT or SIGTERM leaves nothing ---- */

static void rel_stop_run(int sig)
{
    char dir[256], d[300], parent[300], lock[300], left[1024];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    rel_beside(d, "pb-lock", parent, sizeof parent, lock, sizeof lock);
    pid_t pid = rel_spawn((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rk4",
                                           "--steps-per-orbit", "40000", "--orbits", "20000", "--quiet",
                                           "--out", d, NULL});
    /* the lock file is the first thing a run writes, after its handlers
     * (waiting for any entry, the test sees a run that writes otherwise) */
    (void)lock;
    int started = rel_wait_entry(parent, "");
    kill(pid, sig);
    int st;
    cr_assert_eq(waitpid(pid, &st, 0), pid);
    cr_assert(started, "the run never started");
    cr_assert(WIFEXITED(st) && WEXITSTATUS(st) == 128 + sig, "signal %d: status %s %d", sig,
              WIFEXITED(st) ? "exit" : "killed by", WIFEXITED(st) ? WEXITSTATUS(st) : WTERMSIG(st));
    rel_list(dir, left, sizeof left);
    cr_assert_str_eq(left, "", "a run stopped by signal %d left: %s", sig, left);
    cr_assert_eq(rel_sh("rm -rf '%s'", dir), 0);
}

Test(reliability, run_stopped_by_sigterm_leaves_nothing)
{
    rel_stop_run(SIGTERM);
}

Test(reliability, run_interrupted_by_sigint_leaves_nothing)
{
    rel_stop_run(SIGINT);
}

Test(reliability, run_stopped_by_sighup_leaves_nothing)
{
    rel_stop_run(SIGHUP);
}

/* A closed terminal (SIGHUP) or ^\ (SIGQUIT) stops a sweep as ^C does:
 * exit 128+signal, the earlier run as it was, no worker, nothing beside. */
static void rel_stop_sweep(int sig)
{
    char dir[256], d[300], parent[300], stage[300], left[1024], f[400];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    rel_beside(d, "pb-new.", parent, sizeof parent, stage, sizeof stage);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit",
                                      "100", "--orbits", "2", "--quiet", "--out", d, NULL}), 0, "%s", err_buf);
    snprintf(f, sizeof f, "%s/summary.json", d);
    char *before = pbt_slurp_file(f, NULL);
    pid_t pid = rel_long_sweep(d);
    /* its staging folder, or the work folder inside D of an older propbench */
    for (int i = 0; i < 20000 && !rel_has_entry(parent, stage) && !rel_has_entry(d, ".work."); i++)
        rel_sleep_ms(1);
    int started = rel_has_entry(parent, stage) || rel_has_entry(d, ".work.");
    kill(pid, sig);
    int st;
    cr_assert_eq(waitpid(pid, &st, 0), pid);
    cr_assert(started, "the sweep never started");
    cr_assert(WIFEXITED(st) && WEXITSTATUS(st) == 128 + sig, "signal %d: status %s %d", sig,
              WIFEXITED(st) ? "exit" : "killed by", WIFEXITED(st) ? WEXITSTATUS(st) : WTERMSIG(st));
    cr_assert_eq(rel_alive_in_group(pid), 0, "workers outlived their sweep");
    char *after = pbt_slurp_file(f, NULL);
    cr_assert(before && after && !strcmp(before, after), "the earlier summary changed");
    free(before);
    free(after);
    rel_list(dir, left, sizeof left);
    cr_assert_str_eq(left, "D ", "left beside the run folder: %s", left);
    cr_assert_eq(rel_sh("rm -rf '%s'", dir), 0);
}

Test(reliability, sweep_stopped_by_sighup_leaves_the_folder_as_it_was)
{
    rel_stop_sweep(SIGHUP);
}

Test(reliability, sweep_stopped_by_sigquit_leaves_the_folder_as_it_was)
{
    rel_stop_sweep(SIGQUIT);
}

/* ---- 5. workers die with their sweep; the next sweep clears up ---- */

Test(reliability, workers_die_with_a_killed_sweep_and_the_next_sweep_clears_up)
{
    char dir[256], d[300], parent[300], stage[300], left[1024], f[400];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    rel_beside(d, "pb-new.", parent, sizeof parent, stage, sizeof stage);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit",
                                      "100", "--orbits", "2", "--quiet", "--out", d, NULL}), 0, "%s", err_buf);
    /* what an earlier propbench left in the folder when it was killed */
    cr_assert_eq(rel_sh("mkdir -p '%s/.work.999999/series' && echo x > '%s/.work.999999/series/a.csv'", d, d), 0);
    pid_t pid = rel_long_sweep(d);
    /* both workers started: each case takes minutes */
    for (int i = 0; i < 2000 && rel_alive_in_group(pid) < 3; i++)
        rel_sleep_ms(5);
    cr_assert_eq(rel_alive_in_group(pid), 3, "the sweep and its two workers");
    kill(pid, SIGKILL);
    int st;
    cr_assert_eq(waitpid(pid, &st, 0), pid);
    cr_assert_eq(rel_wait_group_gone(pid), 0, "workers outlived their sweep");
    rel_list(dir, left, sizeof left);
    cr_assert(strstr(left, stage), "expected the killed sweep's staging folder: %s", left);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "leapfrog",
                                      "--steps-per-orbit", "100", "--orbits", "2", "--quiet", "--out", d, NULL}),
                 0, "%s", err_buf);
    rel_list(dir, left, sizeof left);
    cr_assert_str_eq(left, "D ", "left beside the run folder: %s", left);
    rel_list(d, left, sizeof left);
    cr_assert_str_eq(left, "series summary.json ", "in the run folder: %s", left);
    snprintf(f, sizeof f, "%s/series/kepler-e0__leapfrog__n100__o2.csv", d);
    cr_assert(pbt_exists(f));
    cr_assert_eq(rel_sh("rm -rf '%s'", dir), 0);
}

/* What a killed sweep left beside its folder is cleared by a sweep into
 * another folder of the same parent too (its lock is free: no writer). */
Test(reliability, a_sweep_clears_what_a_killed_one_left_beside_another_folder)
{
    char dir[256], d1[300], d2[300], parent[300], stage[300], left[1024];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d1, sizeof d1, "%s/D1", dir);
    snprintf(d2, sizeof d2, "%s/D2", dir);
    rel_beside(d1, "pb-new.", parent, sizeof parent, stage, sizeof stage);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit",
                                      "100", "--orbits", "2", "--quiet", "--out", d1, NULL}), 0, "%s", err_buf);
    pid_t pid = rel_long_sweep(d1);
    cr_assert(rel_wait_entry(parent, stage), "the sweep never started");
    kill(pid, SIGKILL);
    int st;
    cr_assert_eq(waitpid(pid, &st, 0), pid);
    cr_assert_eq(rel_wait_group_gone(pid), 0, "workers outlived their sweep");
    rel_list(dir, left, sizeof left);
    cr_assert(strstr(left, ".D1.pb-lock") && strstr(left, stage), "the killed sweep left %s", left);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "leapfrog",
                                      "--steps-per-orbit", "100", "--orbits", "2", "--quiet", "--out", d2, NULL}),
                 0, "%s", err_buf);
    rel_list(dir, left, sizeof left);
    cr_assert_str_eq(left, "D1 D2 ", "left beside the run folders: %s", left);
    rel_list(d1, left, sizeof left);
    cr_assert_str_eq(left, "series summary.json ", "in D1: %s", left);
    cr_assert_eq(rel_sh("rm -rf '%s'", dir), 0);
}

/* ---- 3. a swap killed halfway is finished or undone by the next writer ---- */

/* A pid that has ended (a child reaped at once). */
static long rel_dead_pid(void)
{
    pid_t p = fork();
    if (p == 0)
        _exit(0);
    waitpid(p, NULL, 0);
    return (long)p;
}

static const char *const small_sweep[] = {"sweep", "--problems", "kepler-e0", "--methods", NULL,
                                          "--steps-per-orbit", "100", "--orbits", "2", "--quiet",
                                          "--out", NULL, NULL};

static void rel_small_sweep(const char *method, const char *out)
{
    const char *a[sizeof small_sweep / sizeof *small_sweep];
    memcpy(a, small_sweep, sizeof a);
    a[4] = method;
    a[11] = out;
    cr_assert_eq(cli(a), 0, "%s", err_buf);
}

/* Killed just after the exchange: the new run in place, the earlier folder
 * (with a user's note among its run's files) under .D.pb-old.<pid>. The next
 * writer keeps the note and removes the rest. */
Test(reliability, next_writer_finishes_a_swap_killed_after_the_exchange)
{
    char dir[256], d[300], old[400], left[1024];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    snprintf(old, sizeof old, "%s/.D.pb-old.%ld", dir, rel_dead_pid());
    rel_small_sweep("rk4", old);
    cr_assert_eq(rel_sh("echo mine > '%s/notes.txt' && echo mine > '%s/series/notes.csv'", old, old), 0);
    rel_small_sweep("leapfrog", d);
    rel_small_sweep("yoshida4", d);
    rel_list(dir, left, sizeof left);
    cr_assert_str_eq(left, "D ", "%s", left);
    rel_list(d, left, sizeof left);
    cr_assert_str_eq(left, "notes.txt series summary.json ", "%s", left);
    snprintf(old, sizeof old, "%s/series", d);
    rel_list(old, left, sizeof left);
    cr_assert_str_eq(left, "kepler-e0__yoshida4__n100__o2.csv notes.csv ", "%s", left);
    cr_assert_eq(rel_sh("rm -rf '%s'", dir), 0);
}

/* Killed between the two renames of a swap on a file system without
 * exchange: no D, the earlier run under .D.pb-old.<pid> and the new one under
 * .D.pb-new.<pid>. The next writer puts the earlier run back first: stopped
 * before it writes anything itself, it leaves the earlier run in D. */
Test(reliability, next_writer_undoes_a_swap_killed_between_two_renames)
{
    char dir[256], d[300], old[400], stage[400], sum[400], left[1024];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    long dead = rel_dead_pid();
    snprintf(old, sizeof old, "%s/.D.pb-old.%ld", dir, dead);
    snprintf(stage, sizeof stage, "%s/.D.pb-new.%ld", dir, dead);
    rel_small_sweep("rk4", old);
    cr_assert_eq(rel_sh("echo mine > '%s/notes.txt'", old), 0);
    rel_small_sweep("leapfrog", stage);
    pid_t pid = rel_long_sweep(d);
    char parent[300], mine[300];
    snprintf(mine, sizeof mine, ".D.pb-new.%ld", (long)pid);
    rel_beside(d, "", parent, sizeof parent, sum, sizeof sum);
    cr_assert(rel_wait_entry(parent, mine), "the sweep never started");
    kill(pid, SIGTERM);
    int st;
    cr_assert_eq(waitpid(pid, &st, 0), pid);
    rel_list(dir, left, sizeof left);
    cr_assert_str_eq(left, "D ", "%s", left);
    rel_list(d, left, sizeof left);
    cr_assert_str_eq(left, "notes.txt series summary.json ", "%s", left);
    snprintf(sum, sizeof sum, "%s/series/kepler-e0__rk4__n100__o2.csv", d);
    cr_assert(pbt_exists(sum), "the earlier run was not put back");
    cr_assert_eq(rel_sh("rm -rf '%s'", dir), 0);
}
