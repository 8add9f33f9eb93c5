/* test_reliability.c - nothing lost, nothing mixed: a failed in-place merge
 * keeps its shard, a full disk fails a sweep with the system's reason, one
 * writer per run folder, workers die with their sweep, a stopped run leaves
 * nothing, and kill -9 at random moments leaves the old run or the new one.
 * Each runs the CLI ($PB_BIN) in scratch folders. */
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

static char out_buf[1 << 14], err_buf[1 << 14];

static int cli(const char *const *args)
{
    return pbt_run_cli(args, out_buf, sizeof out_buf, err_buf, sizeof err_buf);
}

static int rel_sh(const char *fmt, ...) __attribute__((format(printf, 1, 2)));

static int rel_sh(const char *fmt, ...)
{
    char cmd[4096];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(cmd, sizeof cmd, fmt, ap);
    va_end(ap);
    int st = system(cmd);
    return WIFEXITED(st) ? WEXITSTATUS(st) : -1;
}

static void rel_sleep_ms(long ms)
{
    nanosleep(&(struct timespec){ms / 1000, (ms % 1000) * 1000000L}, NULL);
}

/* The entries of dir, sorted, as one space-separated line ("" if none). */
static void rel_list(const char *dir, char *buf, size_t len)
{
    char f[600];
    snprintf(f, sizeof f, "%.500s.list", dir);
    rel_sh("ls -A '%s' 2>/dev/null | tr '\\n' ' ' > '%s'", dir, f);
    pbt_read_into(f, buf, len);
    unlink(f);
}

/* 1 if dir holds an entry whose name starts with prefix. */
static int rel_has_entry(const char *dir, const char *prefix)
{
    DIR *d = opendir(dir);
    if (!d)
        return 0;
    struct dirent *e;
    int found = 0;
    while ((e = readdir(d)))
        found |= strcmp(e->d_name, ".") && strcmp(e->d_name, "..") &&
                 !strncmp(e->d_name, prefix, strlen(prefix));
    closedir(d);
    return found;
}

/* Poll (up to 20 s) until dir holds an entry starting with prefix ("": any
 * entry). */
static int rel_wait_entry(const char *dir, const char *prefix)
{
    for (int i = 0; i < 20000 && !rel_has_entry(dir, prefix); i++)
        rel_sleep_ms(1);
    return rel_has_entry(dir, prefix);
}

/* Start $PB_BIN with args (NULL-terminated, no argv[0]) in a process group
 * of its own (its pid), output to /dev/null. */
static pid_t rel_spawn(const char *const *args)
{
    const char *bin = getenv("PB_BIN");
    cr_assert_not_null(bin, "PB_BIN is not set");
    const char *argv[48];
    int n = 0;
    argv[n++] = bin;
    for (int i = 0; args[i] && n < 47; i++)
        argv[n++] = args[i];
    argv[n] = NULL;
    fflush(NULL);
    pid_t pid = fork();
    if (pid == 0) {
        setpgid(0, 0);
        int fd = open("/dev/null", O_WRONLY);
        dup2(fd, 1);
        dup2(fd, 2);
        execv(bin, (char *const *)argv);
        _exit(127);
    }
    cr_assert(pid > 0);
    setpgid(pid, pid);
    return pid;
}

/* How many processes of group pgid are alive (zombies, which have ended,
 * do not count). */
static int rel_alive_in_group(pid_t pgid)
{
    DIR *d = opendir("/proc");
    if (!d)
        return 0;
    struct dirent *e;
    int n = 0;
    while ((e = readdir(d))) {
        char p[300], st[1024];
        if (e->d_name[0] < '0' || e->d_name[0] > '9')
            continue;
        snprintf(p, sizeof p, "/proc/%s/stat", e->d_name);
        pbt_read_into(p, st, sizeof st);
        const char *rp = strrchr(st, ')');
        char state;
        long ppid, pgrp;
        if (rp && sscanf(rp + 1, " %c %ld %ld", &state, &ppid, &pgrp) == 3 && pgrp == pgid &&
            state != 'Z' && state != 'X')
            n++;
    }
    closedir(d);
    return n;
}

/* Poll (up to 10 s) until no process of group pgid is alive; how many are. */
static int rel_wait_group_gone(pid_t pgid)
{
    for (int i = 0; i < 1000 && rel_alive_in_group(pgid); i++)
        rel_sleep_ms(10);
    return rel_alive_in_group(pgid);
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
    if (rel_sh("unshare -m true 2>/dev/null") != 0)
        cr_skip_test("no mount namespace here (unshare -m fails): the full-disk test needs one");
    const char *bin = getenv("PB_BIN");
    cr_assert_not_null(bin);
    int rc = rel_sh(
        "cd '%s' && unshare -m sh -c '"
        "mkdir D && mount -t tmpfs -o size=3m tmpfs D || exit 90; "
        "%s sweep --problems kepler-e0 --methods rk4 --steps-per-orbit 100 --orbits 2 --repeats 0 --quiet --out D/run || exit 91; "
        "cat D/run/summary.json D/run/series/*.csv | md5sum > sum.before; "
        "avail=$(df -k --output=avail D | tail -1); "
        "dd if=/dev/zero of=D/fill bs=1k count=$((avail - %d)) 2>/dev/null; "
        "%s sweep --problems kepler-e0.6,kepler-e0.9 --methods rk4,leapfrog,yoshida4,rkf45 --steps-per-orbit 2000 "
        "--tolerances 1e-9 --orbits 20 --repeats 0 --quiet -j 2 --out D/run 2> err; echo $? > rc; "
        "cat D/run/summary.json D/run/series/*.csv | md5sum | cmp -s - sum.before && echo same > intact; "
        "ls -A D | tr \"\\n\" \" \" > left'",
        dir, bin, free_kb, bin);
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

/* The folder that holds dir, and ".NAME." + what, the prefix of the
 * entries a writer of dir keeps beside it (run_swap.h). */
static void rel_beside(const char *dir, const char *what, char *parent, size_t plen, char *prefix,
                       size_t flen)
{
    snprintf(parent, plen, "%s", dir);
    *strrchr(parent, '/') = 0;
    snprintf(prefix, flen, ".%s.%s", strrchr(dir, '/') + 1, what);
}

Test(reliability, second_writer_is_refused_naming_the_first)
{
    char dir[256], d[300], parent[300], stage[300], want[64], left[1024];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    rel_beside(d, "new.", parent, sizeof parent, stage, sizeof stage);
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
    rel_beside(d, "lock", parent, sizeof parent, lock, sizeof lock);
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

/* ---- 5. workers die with their sweep; the next sweep clears up ---- */

Test(reliability, workers_die_with_a_killed_sweep_and_the_next_sweep_clears_up)
{
    char dir[256], d[300], parent[300], stage[300], left[1024], f[400];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    rel_beside(d, "new.", parent, sizeof parent, stage, sizeof stage);
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
 * (with a user's note among its run's files) under .D.old.<pid>. The next
 * writer keeps the note and removes the rest. */
Test(reliability, next_writer_finishes_a_swap_killed_after_the_exchange)
{
    char dir[256], d[300], old[400], left[1024];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    snprintf(old, sizeof old, "%s/.D.old.%ld", dir, rel_dead_pid());
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
 * exchange: no D, the earlier run under .D.old.<pid> and the new one under
 * .D.new.<pid>. The next writer puts the earlier run back first: stopped
 * before it writes anything itself, it leaves the earlier run in D. */
Test(reliability, next_writer_undoes_a_swap_killed_between_two_renames)
{
    char dir[256], d[300], old[400], stage[400], sum[400], left[1024];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    long dead = rel_dead_pid();
    snprintf(old, sizeof old, "%s/.D.old.%ld", dir, dead);
    snprintf(stage, sizeof stage, "%s/.D.new.%ld", dir, dead);
    rel_small_sweep("rk4", old);
    cr_assert_eq(rel_sh("echo mine > '%s/notes.txt'", old), 0);
    rel_small_sweep("leapfrog", stage);
    pid_t pid = rel_long_sweep(d);
    char parent[300], mine[300];
    snprintf(mine, sizeof mine, ".D.new.%ld", (long)pid);
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

/* ---- kill -9 at random moments: the old run or the new one, never a mix ---- */

/* t and energy_rel (columns 1 and 5) of the CSV's last row; 0 or -1. */
static int rel_csv_last(const char *path, double *t, double *e)
{
    char *s = pbt_slurp_file(path, NULL);
    if (!s)
        return -1;
    size_t n = strlen(s);
    while (n && s[n - 1] == '\n')
        s[--n] = 0;
    char *row = strrchr(s, '\n');
    double col[5];
    int k = row && sscanf(row + 1, "%lf,%lf,%lf,%lf,%lf", &col[0], &col[1], &col[2], &col[3], &col[4]) == 5;
    free(s);
    *t = col[0];
    *e = col[4];
    return k ? 0 : -1;
}

static int rel_close(double a, double b, double rel)
{
    return fabs(a - b) <= rel * fmax(fabs(a), fabs(b));
}

/* 1 if the run folder d holds, whole and alone, the run of the reference
 * folder ref: the same cases in the same order with the same final energy
 * error (results are identical on reruns), each case's series there with a
 * last row that agrees with its summary, and nothing else in d. */
static int rel_run_is(const char *d, const char *ref, char *why, size_t wlen)
{
    char p[600], list[4096];
    snprintf(p, sizeof p, "%s/summary.json", d);
    json_t *got = json_load_file(p, 0, NULL);
    snprintf(p, sizeof p, "%s/summary.json", ref);
    json_t *want = json_load_file(p, 0, NULL);
    json_t *gc = json_object_get(got, "cases"), *wc = json_object_get(want, "cases");
    int ok = json_is_array(gc) && json_is_array(wc) && json_array_size(gc) == json_array_size(wc);
    snprintf(why, wlen, "%s", ok ? "" : "no summary, or another number of cases");
    char names[4096] = "";
    for (size_t i = 0; ok && i < json_array_size(gc); i++) {
        json_t *g = json_array_get(gc, i), *w = json_array_get(wc, i);
        const char *id = json_string_value(json_object_get(g, "id"));
        const char *series = json_string_value(json_object_get(g, "series"));
        double ef = json_number_value(json_object_get(json_object_get(g, "metrics"), "energy_rel_final"));
        double ew = json_number_value(json_object_get(json_object_get(w, "metrics"), "energy_rel_final"));
        double tf = json_number_value(json_object_get(g, "t_final")), t, e;
        snprintf(p, sizeof p, "%s/%s", d, series ? series : "-");
        if (!id || strcmp(id, json_string_value(json_object_get(w, "id"))) || !rel_close(ef, ew, 1e-12)) {
            snprintf(why, wlen, "case %zu is %s, not the reference's", i, id ? id : "?");
            ok = 0;
        } else if (!series || rel_csv_last(p, &t, &e)) {
            snprintf(why, wlen, "%s: no series", id);
            ok = 0;
        } else if (!rel_close(t, tf, 1e-15) || !rel_close(e, ef, 1e-8)) {
            /* the CSV holds 10 significant digits (%.9e), the summary 17 */
            snprintf(why, wlen, "%s: last row t=%.17g energy_rel=%.9e, summary %.17g %.9e", id, t, e, tf, ef);
            ok = 0;
        } else {
            size_t k = strlen(names);
            snprintf(names + k, sizeof names - k, "%s ", series + strlen("series/"));
        }
    }
    if (ok) {
        rel_list(d, list, sizeof list);
        if (strcmp(list, "series summary.json ")) {
            snprintf(why, wlen, "the run folder holds %.300s", list);
            ok = 0;
        }
        snprintf(p, sizeof p, "%s/series", d);
        rel_list(p, list, sizeof list);
        if (ok && strcmp(list, names)) { /* ls sorts as the grid's order here does not: compare sorted */
            char cmd[8400];
            snprintf(cmd, sizeof cmd, "test \"$(printf '%%s\\n' %s | sort | tr '\\n' ' ')\" = '%s'", names, list);
            if (rel_sh("%s", cmd)) {
                snprintf(why, wlen, "series/ holds %.300s; the summary names %.300s", list, names);
                ok = 0;
            }
        }
    }
    json_decref(got);
    json_decref(want);
    return ok;
}

static double rel_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* The two sweeps that take turns in the folder: 2 and 4 cases. */
static void rel_grid(int which, const char *out, const char **a)
{
    static const char *const g[] = {"sweep", "--problems", "kepler-e0.6", "--methods", "rk4,leapfrog",
                                    "--steps-per-orbit", NULL, "--orbits", NULL, "--repeats", "0",
                                    "--quiet", "-j", "2", "--out", NULL, NULL};
    memcpy(a, g, sizeof g);
    a[6] = which ? "2000,4000" : "100";
    a[8] = which ? "50" : "5";
    a[15] = out;
}

Test(reliability, kill_9_at_random_moments_leaves_the_old_run_or_the_new_one)
{
    char dir[256], refs[256], ref[2][300], d[300], why[1024], left[1024];
    const char *a[17];
    pbt_tmpdir(dir, sizeof dir);
    pbt_tmpdir(refs, sizeof refs);
    snprintf(d, sizeof d, "%s/D", dir);
    double took[2];
    for (int w = 0; w < 2; w++) {
        snprintf(ref[w], sizeof ref[w], "%s/ref%d", refs, w);
        rel_grid(w, ref[w], a);
        double t0 = rel_now();
        cr_assert_eq(cli(a), 0, "%s", err_buf);
        took[w] = rel_now() - t0; /* only to spread the kills over a sweep's life */
    }
    rel_grid(0, d, a);
    cr_assert_eq(cli(a), 0, "%s", err_buf);
    int cur = 0, outcome[2] = {0, 0};
    unsigned long long x = 19; /* the seed: the same kill moments on every run */
    for (int k = 0; k < 12; k++) {
        x = x * 6364136223846793005ULL + 1442695040888963407ULL; /* Knuth's MMIX LCG */
        double u = (double)(x >> 11) / 9007199254740992.0;
        rel_grid(!cur, d, a);
        pid_t pid = rel_spawn(a);
        double at = 1.5 * u * took[!cur];
        if (k % 2) {
            /* every other kill aims at the swap: 0 to 8 ms after the first
             * series reaches the staging folder (the cases are all done then,
             * and the summary, the swap and the clean-up follow) */
            char staged[400];
            snprintf(staged, sizeof staged, "%s/.D.new.%ld/series", dir, (long)pid);
            double t0 = rel_now();
            while (!rel_has_entry(staged, "kepler") && rel_now() - t0 < 20 * took[!cur] + 5)
                nanosleep(&(struct timespec){0, 50000}, NULL);
            at = 8e-3 * u;
        }
        nanosleep(&(struct timespec){(time_t)at, (long)(1e9 * (at - floor(at)))}, NULL);
        kill(pid, SIGKILL);
        int st;
        cr_assert_eq(waitpid(pid, &st, 0), pid);
        cr_assert_eq(rel_wait_group_gone(pid), 0, "kill %d (at %.3f s): workers outlived their sweep", k, at);
        char w0[512], w1[512];
        int is_old = rel_run_is(d, ref[cur], w0, sizeof w0), is_new = rel_run_is(d, ref[!cur], w1, sizeof w1);
        cr_assert(is_old || is_new, "kill %d (at %.3f s): neither the old run (%s) nor the new one (%s)", k, at,
                  w0, w1);
        outcome[is_new]++;
        cur = is_new ? !cur : cur;
    }
    cr_log_info("12 kills: %d left the old run, %d the new one", outcome[0], outcome[1]);
    /* the next sweep clears what the killed ones left beside the folder */
    rel_grid(!cur, d, a);
    cr_assert_eq(cli(a), 0, "%s", err_buf);
    cr_assert(rel_run_is(d, ref[!cur], why, sizeof why), "%s", why);
    rel_list(dir, left, sizeof left);
    cr_assert_str_eq(left, "D ", "left beside the run folder: %s", left);
    cr_assert_eq(rel_sh("rm -rf '%s' '%s'", dir, refs), 0);
}
