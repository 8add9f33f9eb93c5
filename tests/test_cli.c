/* test_cli.c - the command line end to end: bad input gives exit 2, a message
 * naming the bad value and no files; sweeps are the same for every -j and
 * for shards merged; a crashing case is recorded; select finds an answer
 * known by construction. */
#include <criterion/criterion.h>
#include <criterion/redirect.h>
#include <dirent.h>
#include <signal.h>
#include <sys/wait.h>
#include <time.h>
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <fcntl.h>
#include <unistd.h>
#include "test_support.h"
#include "bench/cli/cli.h"

static char out_buf[1 << 16], err_buf[1 << 16];

static int cli(const char *const *args)
{
    return pbt_run_cli(args, out_buf, sizeof out_buf, err_buf, sizeof err_buf);
}

/* Each bad input: exit status 2, the bad value named, nothing written. */
static void expect_bad(const char *const *args, const char *named)
{
    char dir[256], out[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(out, sizeof out, "%s/run", dir);
    const char *a[32];
    int n = 0;
    for (; args[n]; n++)
        a[n] = args[n];
    a[n++] = "--out";
    a[n++] = out;
    a[n] = NULL;
    int rc = cli(a);
    cr_assert_eq(rc, 2, "exit %d for %s; stderr: %s", rc, named, err_buf);
    cr_assert(strstr(err_buf, named) != NULL, "message does not name '%s': %s", named, err_buf);
    cr_assert(!pbt_exists(out), "a run directory was written for bad input %s", named);
    rmdir(dir);
}

Test(cli, bad_input_exits_2_and_writes_nothing)
{
    expect_bad((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rk5", "--steps-per-orbit", "100", NULL}, "rk5");
    expect_bad((const char *[]){"run", "--problem", "kepler-e7", "--method", "rk4", "--steps-per-orbit", "100", NULL}, "kepler-e7");
    expect_bad((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rk4", "--steps-per-orbit", "0", NULL}, "'0'");
    expect_bad((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rk4", "--steps-per-orbit", "-5", NULL}, "-5");
    expect_bad((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rk4", "--steps-per-orbit", "100", "--orbits", "-3", NULL}, "-3");
    expect_bad((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rk4", "--steps-per-orbit", "100", "--orbits", "0", NULL}, "--orbits");
    expect_bad((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rk4", "--steps-per-orbit", "ten", NULL}, "ten");
    expect_bad((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rk4", "--steps-per-orbit", "100", "--orbits", "1e", NULL}, "1e");
    expect_bad((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rkf45", "--tolerance", "-1e-9", NULL}, "-1e-9");
    expect_bad((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rkf45", "--steps-per-orbit", "100", NULL}, "adaptive");
    expect_bad((const char *[]){"run", "--problem", "arenstorf", "--method", "leapfrog", "--steps-per-orbit", "100", NULL}, "velocity");
    expect_bad((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rk4", "--steps-per-orbit", "100", "--bogus", NULL}, "--bogus");
    expect_bad((const char *[]){"run", "--problem-file", "/nonexistent/p.ini", "--method", "rk4", "--steps-per-orbit", "100", NULL}, "/nonexistent/p.ini");
    cr_assert_eq(cli((const char *[]){"frobnicate", NULL}), 2);
    cr_assert(strstr(err_buf, "frobnicate"));
}

static int cli_count(const char *hay, const char *needle)
{
    int n = 0;
    for (const char *s = hay; (s = strstr(s, needle)); s += strlen(needle))
        n++;
    return n;
}

/* Lists: an empty list or item is bad input, not an empty grid or a
 * requirement "not met"; one mistake gives one message. */
Test(cli, bad_lists_and_ranges_exit_2_with_one_message)
{
    expect_bad((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "", "--steps-per-orbit", "100", NULL}, "--methods");
    expect_bad((const char *[]){"sweep", "--problems", ",", "--methods", "rk4", "--steps-per-orbit", "100", NULL}, "--problems");
    expect_bad((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4,,leapfrog", "--steps-per-orbit", "100", NULL}, "rk4,,leapfrog");
    expect_bad((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit", "100,abc", NULL}, "abc");
    cr_assert_eq(cli_count(err_buf, "error:"), 1, "%s", err_buf);
    expect_bad((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rkf45", "--tolerances", "nan", NULL}, "nan");
    cr_assert_eq(cli_count(err_buf, "error:"), 1, "%s", err_buf);
    expect_bad((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit", "99999999999999999999999", NULL}, "out of range");
    expect_bad((const char *[]){"sweep", "--problems", "hyperbolic-flyby", "--methods", "rk4", "--steps-per-orbit", "100", "--orbits", "2", NULL}, "no period");
    expect_bad((const char *[]){"select", "--problem", "kepler-e0.5", "--orbits", "10", "--methods", "", "--max-pos-err", "1e-3", NULL}, "--methods");
    expect_bad((const char *[]){"select", "--problem", "kepler-e0.5", "--orbits", "1e300", "--max-pos-err", "1e-3", NULL}, "(0, 1e+08]");
    /* one range for --orbits in every verb; select's own step budget is usage, not "not met" */
    expect_bad((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit", "100", "--orbits", "1e9", NULL}, "(0, 1e+08]");
    expect_bad((const char *[]){"run", "--problem", "kepler-e0", "--method", "rk4", "--steps-per-orbit", "100", "--orbits", "1e9", NULL}, "(0, 1e+08]");
    expect_bad((const char *[]){"select", "--problem", "kepler-e0.5", "--orbits", "1e7", "--max-pos-err", "1e-3", "--methods", "rk4", NULL}, "past its budget");
    expect_bad((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit", "100000000", "--orbits", "1e8", NULL}, "case kepler-e0__rk4__n100000000");
    /* an empty value never names a path: "" + "/plots" would be the root's */
    expect_bad((const char *[]){"report", "results/runs/none", "--out", "", NULL}, "an empty value after --out");
    /* a folder where a file belongs is called a folder, not an empty or corrupt file */
    char dir[256];
    pbt_tmpdir(dir, sizeof dir);
    expect_bad((const char *[]){"run", "--problem-file", dir, "--method", "rk4", "--steps-per-orbit", "100", NULL}, "is a folder");
    cr_assert_eq(cli((const char *[]){"check", "--baseline", dir, dir, NULL}), 2);
    cr_assert(strstr(err_buf, dir) && strstr(err_buf, "is a folder"), "%s", err_buf);
    char sj[300], mo[300];
    snprintf(sj, sizeof sj, "%s/summary.json", dir);
    snprintf(mo, sizeof mo, "%s/m", dir);
    cr_assert_eq(mkdir(sj, 0755), 0);
    cr_assert_eq(cli((const char *[]){"merge", "--out", mo, dir, NULL}), 2);
    cr_assert(strstr(err_buf, sj) && strstr(err_buf, "is a folder"), "%s", err_buf);
    cr_assert(!pbt_exists(mo));
    rmdir(sj);
    rmdir(dir);
}

Test(cli, help_on_every_verb)
{
    const char *verbs[] = {"list", "run", "sweep", "merge", "select", NULL};
    for (int i = 0; verbs[i]; i++) {
        cr_assert_eq(cli((const char *[]){verbs[i], "--help", NULL}), 0, "%s --help", verbs[i]);
        cr_assert(strstr(out_buf, "usage: propbench") != NULL, "%s --help: %s", verbs[i], out_buf);
    }
}

Test(cli, run_writes_summary_with_fixed_keys)
{
    char dir[256], out[300], path[400];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(out, sizeof out, "%s/run", dir);
    int rc = cli((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "leapfrog",
                                 "--steps-per-orbit", "200", "--orbits", "20", "--out", out, NULL});
    cr_assert_eq(rc, 0, "%s", err_buf);
    snprintf(path, sizeof path, "%s/summary.json", out);
    json_t *doc = json_load_file(path, 0, NULL);
    cr_assert_not_null(doc);
    cr_assert_eq(json_integer_value(json_object_get(doc, "format")), 1);
    json_t *c = json_array_get(json_object_get(doc, "cases"), 0);
    const char *keys[] = {"problem", "method", "steps_per_orbit", "orbits", "status", "metrics", "cost", NULL};
    for (int i = 0; keys[i]; i++)
        cr_assert_not_null(json_object_get(c, keys[i]), "key %s", keys[i]);
    const char *mk[] = {"energy_rel_max", "energy_rel_final", "angmom_rel_max", "pos_err_max", "pos_err_final",
                        "growth_exponent_pos", "growth_class_energy", NULL};
    for (int i = 0; mk[i]; i++)
        cr_assert_not_null(json_object_get(json_object_get(c, "metrics"), mk[i]), "metrics.%s", mk[i]);
    const char *ck[] = {"steps", "evals", "rejected", "ns_per_step", NULL};
    for (int i = 0; ck[i]; i++)
        cr_assert_not_null(json_object_get(json_object_get(c, "cost"), ck[i]), "cost.%s", ck[i]);
    cr_assert_eq(json_integer_value(json_object_get(json_object_get(c, "cost"), "steps")), 4000);
    snprintf(path, sizeof path, "%s/%s", out, json_string_value(json_object_get(c, "series")));
    cr_assert(pbt_exists(path), "series %s", path);
    json_decref(doc);
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

/* The summary without what legitimately differs between runs (timing). */
static json_t *load_cases(const char *dir)
{
    char path[400];
    snprintf(path, sizeof path, "%s/summary.json", dir);
    json_t *doc = json_load_file(path, 0, NULL);
    cr_assert_not_null(doc, "%s", path);
    json_t *cases = json_incref(json_object_get(doc, "cases"));
    json_decref(doc);
    size_t i;
    json_t *c;
    json_array_foreach(cases, i, c) {
        /* the timing pass's numbers are the machine's, never the same twice */
        json_t *cost = json_object_get(c, "cost");
        const char *key;
        json_t *val;
        void *tmp;
        json_object_foreach_safe(cost, tmp, key, val) {
            if (!strncmp(key, "ns_per_", 7) || !strncmp(key, "timing", 6) ||
                !strcmp(key, "calib_ns") || !strcmp(key, "step_kernel_ratio"))
                json_object_del(cost, key);
        }
    }
    return cases;
}

static const char *grid[] = {"sweep", "--problems", "kepler-e0.6,kepler-e0", "--methods",
                             "rk4,leapfrog,rkf45", "--steps-per-orbit", "100,200", "--tolerances",
                             "1e-8", "--orbits", "20", "--quiet", "--repeats", "1"};

static int run_grid(const char *out, const char *extra1, const char *extra2)
{
    const char *a[32];
    int n = 0;
    for (size_t i = 0; i < sizeof grid / sizeof *grid; i++)
        a[n++] = grid[i];
    a[n++] = "--out";
    a[n++] = out;
    if (extra1) a[n++] = extra1;
    if (extra2) a[n++] = extra2;
    a[n] = NULL;
    return cli(a);
}

Test(cli, sweep_identical_for_every_j_and_for_merged_shards)
{
    char dir[256], d1[300], d2[300], s1[300], s2[300], s3[300], m[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d1, sizeof d1, "%s/j1", dir);
    snprintf(d2, sizeof d2, "%s/j2", dir);
    snprintf(s1, sizeof s1, "%s/s1", dir);
    snprintf(s2, sizeof s2, "%s/s2", dir);
    snprintf(s3, sizeof s3, "%s/s3", dir);
    snprintf(m, sizeof m, "%s/merged", dir);
    cr_assert_eq(run_grid(d1, "-j", "1"), 0, "%s", err_buf);
    cr_assert_eq(run_grid(d2, "-j", "2"), 0, "%s", err_buf);
    cr_assert_eq(run_grid(s1, "--shard", "1/3"), 0, "%s", err_buf);
    { int rc2 = run_grid(s2, "--shard", "2/3"); cr_assert_eq(rc2, 0, "exit %d: %s", rc2, err_buf); }
    cr_assert_eq(run_grid(s3, "--shard", "3/3"), 0, "%s", err_buf);
    cr_assert_eq(cli((const char *[]){"merge", "--out", m, s3, s1, s2, NULL}), 0, "%s", err_buf);
    json_t *a = load_cases(d1), *b = load_cases(d2), *c = load_cases(m);
    cr_assert_eq(json_array_size(a), 10);
    cr_assert(json_equal(a, b), "-j1 and -j2 summaries differ");
    cr_assert(json_equal(a, c), "merged shards differ from the unsharded run");
    json_decref(a);
    json_decref(b);
    json_decref(c);
    /* merging a shard twice is an error */
    cr_assert_eq(cli((const char *[]){"merge", "--out", m, s1, s1, NULL}), 2);
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

Test(cli, crashed_case_is_recorded_and_sweep_completes)
{
    char dir[256];
    pbt_tmpdir(dir, sizeof dir);
    setenv("PB_TEST_CRASH_CASE", "kepler-e0__leapfrog__n100__o20", 1);
    int rc = run_grid(dir, "-j", "2");
    unsetenv("PB_TEST_CRASH_CASE");
    cr_assert_eq(rc, 0, "%s", err_buf);
    json_t *cases = load_cases(dir);
    cr_assert_eq(json_array_size(cases), 10);
    int crashed = 0, ok = 0;
    size_t i;
    json_t *c;
    json_array_foreach(cases, i, c) {
        const char *st = json_string_value(json_object_get(c, "status"));
        if (!strcmp(st, "crashed")) {
            crashed++;
            cr_assert_str_eq(json_string_value(json_object_get(c, "id")), "kepler-e0__leapfrog__n100__o20");
        } else if (!strcmp(st, "ok")) {
            ok++;
        }
    }
    cr_assert_eq(crashed, 1);
    cr_assert_eq(ok, 9);
    json_decref(cases);
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

/* Selection on a case whose answer is known by construction: the
 * requirement is RK4's own maximum position error at 300 steps per orbit
 * (measured by a run first), so the answer is at most 300 and, since the
 * error falls like h^4, above 300 / 1.1. */
Test(cli, select_finds_answer_known_by_construction)
{
    char dir[256], run[300], sel[300], path[400];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(run, sizeof run, "%s/run", dir);
    snprintf(sel, sizeof sel, "%s/sel.json", dir);
    cr_assert_eq(cli((const char *[]){"run", "--problem", "kepler-e0.5", "--method", "rk4", "--steps-per-orbit",
                                     "300", "--orbits", "10", "--samples", "20", "--repeats", "0", "--out", run, NULL}), 0);
    snprintf(path, sizeof path, "%s/summary.json", run);
    json_t *doc = json_load_file(path, 0, NULL);
    double err = json_real_value(json_object_get(json_object_get(json_array_get(json_object_get(doc, "cases"), 0), "metrics"), "pos_err_max"));
    json_decref(doc);
    char req[64];
    snprintf(req, sizeof req, "%.17g", err * (1 + 1e-9));
    cr_assert_eq(cli((const char *[]){"select", "--problem", "kepler-e0.5", "--orbits", "10", "--max-pos-err", req,
                                     "--methods", "rk4,rkf45", "--out", sel, "--quiet", NULL}), 0, "%s", err_buf);
    doc = json_load_file(sel, 0, NULL);
    cr_assert_not_null(doc);
    json_t *rank = json_object_get(doc, "ranking");
    int seen = 0;
    size_t i;
    json_t *e;
    json_array_foreach(rank, i, e) {
        if (strcmp(json_string_value(json_object_get(e, "method")), "rk4"))
            continue;
        seen = 1;
        cr_assert(json_is_true(json_object_get(e, "meets_requirement")));
        json_int_t n = json_integer_value(json_object_get(e, "steps_per_orbit"));
        cr_assert(n <= 300 && n >= 273, "rk4 answer %lld steps per orbit", (long long)n);
        cr_assert_leq(json_real_value(json_object_get(e, "pos_err_max")), err * (1 + 1e-9));
    }
    cr_assert(seen);
    json_decref(doc);
    /* an impossible requirement: exit 1 and a plain statement */
    cr_assert_eq(cli((const char *[]){"select", "--problem", "kepler-e0.5", "--orbits", "10", "--max-pos-err", "1e-30",
                                     "--methods", "leapfrog", "--out", sel, NULL}), 1);
    cr_assert(strstr(out_buf, "NO METHOD meets the requirement"), "%s", out_buf);
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

/* The README's multi-machine recipe, with local workers: GNU parallel runs
 * the shards, merge joins them, and the result equals the unsharded sweep. */
Test(cli, gnu_parallel_shards_equal_unsharded)
{
    cr_assert_eq(system("command -v parallel >/dev/null 2>&1"), 0,
                 "GNU parallel is missing (scripts/install-deps.sh installs it)");
    const char *bin = getenv("PB_BIN");
    cr_assert_not_null(bin);
    char dir[256], cmd[2048], all[300], ref[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(cmd, sizeof cmd,
             "cd '%s' && parallel -j 2 '%s' sweep --problems kepler-e0.6 --methods rk4,yoshida4,rkf45 "
             "--steps-per-orbit 100,200 --tolerances 1e-8,1e-9 --orbits 10 --repeats 0 --quiet "
             "--shard {}/3 --out shard-{} ::: 1 2 3 >/dev/null 2>&1", dir, bin);
    cr_assert_eq(system(cmd), 0);
    snprintf(all, sizeof all, "%s/all", dir);
    snprintf(ref, sizeof ref, "%s/ref", dir);
    char s1[300], s2[300], s3[300];
    snprintf(s1, sizeof s1, "%s/shard-1", dir);
    snprintf(s2, sizeof s2, "%s/shard-2", dir);
    snprintf(s3, sizeof s3, "%s/shard-3", dir);
    cr_assert_eq(cli((const char *[]){"merge", "--out", all, s1, s2, s3, NULL}), 0, "%s", err_buf);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0.6", "--methods", "rk4,yoshida4,rkf45",
                                     "--steps-per-orbit", "100,200", "--tolerances", "1e-8,1e-9", "--orbits", "10",
                                     "--repeats", "0", "--quiet", "--out", ref, NULL}), 0, "%s", err_buf);
    json_t *a = load_cases(all), *b = load_cases(ref);
    cr_assert_eq(json_array_size(a), 6);
    cr_assert(json_equal(a, b), "GNU parallel shards merged differ from the unsharded sweep");
    json_decref(a);
    json_decref(b);
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}


/* 1 if dir holds an entry whose name starts with prefix. */
static int cli_has_entry(const char *dir, const char *prefix)
{
    DIR *d = opendir(dir);
    if (!d)
        return 0;
    struct dirent *e;
    int found = 0;
    while ((e = readdir(d)))
        if (!strncmp(e->d_name, prefix, strlen(prefix)))
            found = 1;
    closedir(d);
    return found;
}

/* An interrupted sweep stops its workers, exits 128+signal as a shell
 * reports it, and leaves the run directory as it was: the earlier summary
 * untouched, no work files. The signal is sent the moment the staging
 * folder beside it appears (.NAME.pb-new.<pid>, run_swap.h), the earliest
 * instant a user could see the sweep. */
static void cli_interrupt_sweep(int sig)
{
    char dir[256], path[400];
    pbt_tmpdir(dir, sizeof dir);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4",
                                     "--steps-per-orbit", "100", "--orbits", "5", "--repeats", "0",
                                     "--quiet", "--out", dir, NULL}), 0, "%s", err_buf);
    snprintf(path, sizeof path, "%s/summary.json", dir);
    char *before = pbt_slurp_file(path, NULL);
    cr_assert_not_null(before);
    const char *bin = getenv("PB_BIN");
    cr_assert_not_null(bin);
    fflush(NULL);
    pid_t pid = fork();
    if (pid == 0) {
        int fd = open("/dev/null", O_WRONLY);
        dup2(fd, 1);
        dup2(fd, 2);
        execl(bin, bin, "sweep", "--problems", "kepler-e0.6", "--methods", "rk4,leapfrog",
              "--steps-per-orbit", "20000,40000", "--orbits", "1000", "-j", "2", "--quiet",
              "--out", dir, (char *)NULL);
        _exit(127);
    }
    char parent[256], stage[300];
    snprintf(parent, sizeof parent, "%s", dir);
    *strrchr(parent, '/') = 0;
    snprintf(stage, sizeof stage, ".%s.pb-new.", strrchr(dir, '/') + 1);
    for (int i = 0; i < 5000 && !cli_has_entry(parent, stage); i++)
        nanosleep(&(struct timespec){0, 1000000}, NULL);
    int started = cli_has_entry(parent, stage);
    kill(pid, sig);
    int st;
    cr_assert_eq(waitpid(pid, &st, 0), pid);
    cr_assert(started, "the sweep never started");
    cr_assert(WIFEXITED(st) && WEXITSTATUS(st) == 128 + sig, "signal %d: status %s %d", sig,
              WIFEXITED(st) ? "exit" : "killed by", WIFEXITED(st) ? WEXITSTATUS(st) : WTERMSIG(st));
    cr_assert(!cli_has_entry(dir, ".work.") && !cli_has_entry(parent, stage), "work files left behind");
    char *after = pbt_slurp_file(path, NULL);
    cr_assert(after && !strcmp(before, after), "the earlier summary changed");
    free(before);
    free(after);
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

Test(cli, interrupted_sweep_leaves_run_dir_as_it_was)
{
    cli_interrupt_sweep(SIGINT);
}

Test(cli, terminated_sweep_leaves_run_dir_as_it_was)
{
    cli_interrupt_sweep(SIGTERM);
}

/* merge refuses shards of different sweeps and, unless asked, partial sets. */
Test(cli, merge_refuses_foreign_and_partial_shards)
{
    char dir[256], a[300], b[300], m[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(a, sizeof a, "%s/a", dir);
    snprintf(b, sizeof b, "%s/b", dir);
    snprintf(m, sizeof m, "%s/m", dir);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0.6", "--methods", "rk4,leapfrog",
                                     "--steps-per-orbit", "100,200", "--orbits", "5", "--repeats", "0",
                                     "--quiet", "--shard", "1/2", "--out", a, NULL}), 0);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0.9", "--methods", "yoshida4,rk4",
                                     "--steps-per-orbit", "400,800", "--orbits", "5", "--repeats", "0",
                                     "--quiet", "--shard", "2/2", "--out", b, NULL}), 0);
    cr_assert_eq(cli((const char *[]){"merge", "--out", m, a, b, NULL}), 2);
    cr_assert(strstr(err_buf, "different sweep"), "%s", err_buf);
    cr_assert(!pbt_exists(m) || !cli_has_entry(m, "summary.json"));
    cr_assert_eq(cli((const char *[]){"merge", "--out", m, a, NULL}), 2);
    cr_assert(strstr(err_buf, "2 of 4 cases are missing"), "%s", err_buf);
    cr_assert_eq(cli((const char *[]){"merge", "--out", m, "--allow-partial", a, NULL}), 0, "%s", err_buf);
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

/* A run summary with a metric that is not a number is bad input for check,
 * baseline and report alike: exit 2 naming the file and the case. */
Test(cli, corrupt_run_summary_is_bad_input)
{
    char dir[256], path[400], base[400];
    pbt_tmpdir(dir, sizeof dir);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "rk4",
                                     "--steps-per-orbit", "100", "--orbits", "5", "--repeats", "0",
                                     "--quiet", "--out", dir, NULL}), 0);
    snprintf(path, sizeof path, "%s/summary.json", dir);
    snprintf(base, sizeof base, "%s/base.json", dir);
    cr_assert_eq(cli((const char *[]){"baseline", dir, "--out", base, NULL}), 0, "%s", err_buf);
    json_t *doc = json_load_file(path, 0, NULL);
    json_t *m = json_object_get(json_array_get(json_object_get(doc, "cases"), 0), "metrics");
    json_object_set_new(m, "pos_err_max", json_string("abc"));
    cr_assert_eq(json_dump_file(doc, path, 0), 0);
    json_decref(doc);
    cr_assert_eq(cli((const char *[]){"check", "--baseline", base, dir, NULL}), 2);
    cr_assert(strstr(err_buf, path) && strstr(err_buf, "not a number"), "%s", err_buf);
    cr_assert_eq(cli((const char *[]){"baseline", dir, "--out", base, NULL}), 2);
    cr_assert_eq(cli((const char *[]){"report", dir, "--no-plots", NULL}), 2);
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

/* A sweep over the cases of a problem file: one case per file case, method
 * and setting, the file's horizons kept (problems/examples, our own demo). */
Test(cli, sweep_over_a_problem_file)
{
    char dir[256], ini[600];
    pbt_tmpdir(dir, sizeof dir);
    const char *root = getenv("PB_ROOT");
    snprintf(ini, sizeof ini, "%s/problems/examples/transfer-demo.ini", root ? root : ".");
    cr_assert_eq(cli((const char *[]){"sweep", "--problem-file", ini, "--case", "leo-j2-state",
                                     "--problems", "kepler-e0", "--methods", "rk4,rkf45",
                                     "--steps-per-orbit", "100", "--tolerances", "1e-8", "--repeats", "0",
                                     "--quiet", "--out", dir, NULL}), 0, "%s", err_buf);
    json_t *cases = load_cases(dir);
    cr_assert_eq(json_array_size(cases), 4);
    const char *last = json_string_value(json_object_get(json_array_get(cases, 3), "id"));
    cr_assert_str_eq(last, "leo-j2-state__rkf45__tol1e-08__s86400");
    json_decref(cases);
    cr_assert_eq(cli((const char *[]){"sweep", "--problem-file", ini, "--case", "nope", "--methods", "rk4",
                                     "--steps-per-orbit", "100", "--out", dir, NULL}), 2);
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

/* A second sweep into the same directory replaces the first whole: no series
 * or report of the first is left to contradict the new summary. */
Test(cli, rerun_replaces_earlier_run)
{
    char dir[256], path[600];
    pbt_tmpdir(dir, sizeof dir);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0.5,kepler-e0", "--methods", "rk4",
                                     "--steps-per-orbit", "100,200", "--orbits", "10", "--repeats", "0",
                                     "--quiet", "--report", "--out", dir, NULL}), 0, "%s", err_buf);
    snprintf(path, sizeof path, "%s/report.md", dir);
    cr_assert(pbt_exists(path));
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0", "--methods", "leapfrog",
                                     "--steps-per-orbit", "100", "--orbits", "10", "--repeats", "0",
                                     "--quiet", "--out", dir, NULL}), 0, "%s", err_buf);
    cr_assert(!pbt_exists(path), "the earlier report is still there");
    snprintf(path, sizeof path, "%s/plots", dir);
    cr_assert(!pbt_exists(path), "the earlier report's plots/ folder is still there");
    snprintf(path, sizeof path, "%s/series/kepler-e0.5__rk4__n100__o10.csv", dir);
    cr_assert(!pbt_exists(path), "an earlier series is still there");
    snprintf(path, sizeof path, "%s/series/kepler-e0__leapfrog__n100__o10.csv", dir);
    cr_assert(pbt_exists(path));
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

/* A diverging case is a result, not an error: exit 0, and the table says
 * when it diverged, in the problem's time unit and in orbits. At 8 steps per
 * orbit RK4 leaves kepler-e0.9 on its first step (t = T/8 = pi/4 TU). */
Test(cli, divergence_reported_with_time_unit_and_orbits)
{
    char dir[256], path[400];
    pbt_tmpdir(dir, sizeof dir);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0.9,leo-near-circular", "--methods",
                                     "rk4", "--steps-per-orbit", "8", "--orbits", "100", "--repeats", "0",
                                     "--out", dir, NULL}), 0, "%s", err_buf);
    snprintf(path, sizeof path, "%s/summary.json", dir);
    json_t *doc = json_load_file(path, 0, NULL);
    cr_assert_not_null(doc);
    size_t i;
    json_t *c;
    int seen = 0;
    json_array_foreach(json_object_get(doc, "cases"), i, c) {
        cr_assert_str_eq(json_string_value(json_object_get(c, "status")), "diverged");
        double at = json_number_value(json_object_get(c, "diverged_at"));
        double orbits = json_number_value(json_object_get(c, "diverged_at_orbits"));
        int km = !strcmp(json_string_value(json_object_get(c, "units")), "km-s");
        if (!km)
            cr_assert_float_eq(at, atan(1.0), 1e-12);
        char want[200];
        snprintf(want, sizeof want, "%s: diverged at t = %.6g %s (%.4g orbits)",
                 json_string_value(json_object_get(c, "id")), at, km ? "s" : "TU", orbits);
        cr_assert(strstr(out_buf, want), "missing \"%s\" in:\n%s", want, out_buf);
        seen++;
    }
    cr_assert_eq(seen, 2);
    json_decref(doc);
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

/* An output folder that cannot take a run is found before any case runs:
 * exit 2 naming the path, and the folder is left exactly as it was (no
 * series behind a summary that could not be written, no empty folders). */
static void cli_unwritable_out(const char *verb, const char *setup, const char *want_msg,
                               const char *want_left)
{
    char dir[256], d[300], cmd[800];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(d, sizeof d, "%s/D", dir);
    snprintf(cmd, sizeof cmd, "cd '%s' && %s", dir, setup);
    cr_assert_eq(system(cmd), 0);
    const char *run[] = {"run", "--problem", "kepler-e0", "--method", "rk4", "--steps-per-orbit", "100",
                         "--orbits", "2", "--quiet", "--out", d, NULL};
    const char *sweep[] = {"sweep", "--problems", "kepler-e0", "--methods", "rk4", "--steps-per-orbit",
                           "100", "--orbits", "2", "--quiet", "--out", d, NULL};
    cr_assert_eq(cli(strcmp(verb, "run") ? sweep : run), 2, "%s after '%s': %s", verb, setup, err_buf);
    cr_assert(strstr(err_buf, want_msg), "%s after '%s': %s", verb, setup, err_buf);
    snprintf(cmd, sizeof cmd, "cd '%s' && find D | sort | tr '\\n' ' ' > list.txt", dir);
    cr_assert_eq(system(cmd), 0);
    snprintf(cmd, sizeof cmd, "%s/list.txt", dir);
    char got[512];
    pbt_read_into(cmd, got, sizeof got);
    cr_assert_str_eq(got, want_left, "%s after '%s'", verb, setup);
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

Test(cli, unwritable_out_found_before_running)
{
    for (int k = 0; k < 2; k++) {
        const char *verb = k ? "sweep" : "run";
        cli_unwritable_out(verb, "mkdir -p D/summary.json", "D/summary.json is there and is not a file",
                           "D D/summary.json ");
        cli_unwritable_out(verb, "mkdir D && echo x > D/series", "cannot create the folder",
                           "D D/series ");
    }
}

/* merge refuses a shard whose series path leaves its series/ folder, and a
 * copy that fails midway takes back what it copied: exit 2, no output. */
Test(cli, merge_failure_leaves_no_output)
{
    char dir[256], a[300], b[300], m[300], cmd[1200];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(a, sizeof a, "%s/a", dir);
    snprintf(b, sizeof b, "%s/b", dir);
    snprintf(m, sizeof m, "%s/m", dir);
    const char *shard_sweep[] = {"sweep", "--problems", "kepler-e0.6", "--methods", "rk4,leapfrog", "--steps-per-orbit",
                          "100,200", "--orbits", "5", "--repeats", "0", "--quiet", "--shard", "1/2", "--out", a, NULL};
    cr_assert_eq(cli(shard_sweep), 0, "%s", err_buf);
    shard_sweep[13] = "2/2";
    shard_sweep[15] = b;
    cr_assert_eq(cli(shard_sweep), 0, "%s", err_buf);
    /* the last series of shard b becomes a folder: its copy fails after others succeeded */
    snprintf(cmd, sizeof cmd, "f=$(ls '%s'/series/*.csv | tail -1) && rm \"$f\" && mkdir \"$f\"", b);
    cr_assert_eq(system(cmd), 0);
    cr_assert_eq(cli((const char *[]){"merge", "--out", m, a, b, NULL}), 2);
    cr_assert(strstr(err_buf, "cannot copy"), "%s", err_buf);
    cr_assert(!pbt_exists(m), "merge left %s behind", m);
    /* a doctored series path is refused before anything is written */
    snprintf(cmd, sizeof cmd, "rm -rf '%s'/series/*.csv && sed -i 's|\"series/|\"series/../../|' '%s'/summary.json", b, b);
    cr_assert_eq(system(cmd), 0);
    cr_assert_eq(cli((const char *[]){"merge", "--out", m, a, b, NULL}), 2);
    cr_assert(strstr(err_buf, "not a file below series/"), "%s", err_buf);
    cr_assert(!pbt_exists(m));
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

/* A case of more than 1e9 fixed steps is announced with the time it may
 * take; a --max-steps budget below that silences it (the run stops there). */
Test(cli, long_fixed_step_run_is_announced)
{
    char dir[256];
    pbt_tmpdir(dir, sizeof dir);
    cr_assert_eq(cli((const char *[]){"run", "--problem", "kepler-e0.6", "--method", "rk4", "--steps-per-orbit",
                                     "100000000", "--orbits", "100", "--max-steps", "1000", "--repeats", "0",
                                     "--quiet", "--out", dir, NULL}), 0, "%s", err_buf);
    cr_assert(!strstr(err_buf, "steps of fixed-step integration"), "%s", err_buf);
    cr_assert(strstr(err_buf, "maximum number of steps reached"), "%s", err_buf);
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
    /* 1e10 steps at 50 and 500 ns: 8.33 and 83.3 minutes (arithmetic) */
    cr_redirect_stderr();
    pb_cli_warn_long("run", 1e10);
    pb_cli_warn_long("run", 1e9);
    fflush(stderr);
    cr_assert_stderr_eq_str("propbench run: warning: 1e+10 steps of fixed-step integration: at 50 to 500 ns "
                            "a step that is 8.33 to 83.3 minutes of one core; --max-steps N ends a case early\n");
}

/* The fingerprint of the first case of dir/summary.json into fp. */
static void cli_first_fingerprint(const char *dir, char *fp, size_t len)
{
    char path[400];
    snprintf(path, sizeof path, "%s/summary.json", dir);
    json_t *doc = json_load_file(path, 0, NULL);
    cr_assert_not_null(doc, "no %s", path);
    const char *s = json_string_value(json_object_get(json_array_get(json_object_get(doc, "cases"), 0),
                                                      "fingerprint"));
    cr_assert_not_null(s);
    snprintf(fp, len, "%s", s);
    json_decref(doc);
}

/* Rows of the first case's series CSV in run folder dir. */
static int cli_series_rows(const char *dir)
{
    char path[600];
    snprintf(path, sizeof path, "%s/summary.json", dir);
    json_t *doc = json_load_file(path, 0, NULL);
    cr_assert_not_null(doc, "no %s", path);
    const char *rel = json_string_value(json_object_get(json_array_get(json_object_get(doc, "cases"), 0),
                                                        "series"));
    cr_assert_not_null(rel);
    snprintf(path, sizeof path, "%s/%s", dir, rel);
    json_decref(doc);
    size_t len = 0;
    char *text = pbt_slurp_file(path, &len);
    cr_assert_not_null(text, "no %s", path);
    int rows = -1; /* the header is not a row */
    for (size_t i = 0; i < len; i++)
        rows += text[i] == '\n';
    free(text);
    return rows;
}

/* One case-spec default for every verb, each verb keeping its numbers:
 * run's default is --samples 100 (stated by --help; the same rows); a
 * sweep's case (50 plot points) is run's to the bit, since its plot points
 * lie on the fixed metric grid, so even an adaptive method, which shortens
 * steps to land on sample times, takes the same steps; select's printed run
 * command (run's defaults) reproduces its answer exactly. */
Test(cli, case_spec_default_kept_by_each_verb)
{
    cr_assert_eq(cli((const char *[]){"run", "--help", NULL}), 0);
    cr_assert(strstr(out_buf, "(default 3; 0: no timing)"), "%s", out_buf);
    cr_assert(strstr(out_buf, "linear samples for plots (default 100)"), "%s", out_buf);

    char dir[256], d[5][300], fp[4][64], sel[300];
    pbt_tmpdir(dir, sizeof dir);
    for (int i = 0; i < 5; i++)
        snprintf(d[i], sizeof d[i], "%s/d%d", dir, i);
    snprintf(sel, sizeof sel, "%s/sel.json", dir);
    const char *run[] = {"run", "--problem", "kepler-e0.5", "--method", "rkf45", "--tolerance", "1e-8",
                         "--orbits", "10", "--repeats", "0", "--quiet", "--out", d[0], NULL, NULL, NULL};
    cr_assert_eq(cli(run), 0, "%s", err_buf);
    run[13] = d[1];
    run[14] = "--samples";
    run[15] = "100";
    cr_assert_eq(cli(run), 0, "%s", err_buf);
    run[13] = d[2];
    run[15] = "50";
    cr_assert_eq(cli(run), 0, "%s", err_buf);
    cr_assert_eq(cli((const char *[]){"sweep", "--problems", "kepler-e0.5", "--methods", "rkf45", "--tolerances",
                                     "1e-8", "--orbits", "10", "--repeats", "0", "--quiet", "--out", d[3], NULL}),
                 0, "%s", err_buf);
    for (int i = 0; i < 4; i++)
        cli_first_fingerprint(d[i], fp[i], sizeof fp[i]);
    cr_assert_eq(cli_series_rows(d[0]), cli_series_rows(d[1]), "run's default is not --samples 100");
    /* 50 plot points lie on the 100-point metric grid: nothing is added */
    cr_assert_eq(cli_series_rows(d[1]), cli_series_rows(d[2]));
    cr_assert_eq(cli_series_rows(d[3]), cli_series_rows(d[2]), "a sweep's case is not run's with --samples 50");
    cr_assert_str_eq(fp[0], fp[1]);
    cr_assert_str_eq(fp[3], fp[2], "a sweep's case is not run's with --samples 50");

    cr_assert_eq(cli((const char *[]){"select", "--problem", "kepler-e0.5", "--orbits", "10", "--max-pos-err", "1e-4",
                                     "--methods", "rkf45", "--out", sel, "--quiet", NULL}), 0, "%s", err_buf);
    json_t *doc = json_load_file(sel, 0, NULL);
    cr_assert_not_null(doc);
    json_t *first = json_array_get(json_object_get(doc, "ranking"), 0);
    char command[768], want[64];
    snprintf(command, sizeof command, "%s", json_string_value(json_object_get(first, "run_command")));
    snprintf(want, sizeof want, "%s", json_string_value(json_object_get(first, "fingerprint")));
    json_decref(doc);
    const char *a[32];
    int n = 0;
    char *save = NULL;
    strtok_r(command, " ", &save); /* "propbench" */
    for (char *t = strtok_r(NULL, " ", &save); t && n < 24; t = strtok_r(NULL, " ", &save))
        a[n++] = t;
    const char *tail[] = {"--repeats", "0", "--quiet", "--out", d[4], NULL};
    for (int i = 0; tail[i]; i++)
        a[n++] = tail[i];
    a[n] = NULL;
    cr_assert_eq(cli(a), 0, "%s", err_buf);
    char got[64];
    cli_first_fingerprint(d[4], got, sizeof got);
    cr_assert_str_eq(got, want, "select's run command does not reproduce its answer");
    char cmd[600];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

/* select leaves out the methods written for r'' = a(r) on a drag problem
 * and says which, rather than printing a shorter table without a word. */
Test(cli, select_names_the_methods_it_leaves_out)
{
    char dir[256], out[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(out, sizeof out, "%s/sel.json", dir);
    cr_assert_eq(cli((const char *[]){"select", "--problem", "leo-drag", "--horizon-s", "3000",
                                      "--max-pos-err-m", "1000", "--methods", "rk4,rkf45",
                                      "--out", out, NULL}), 0, "%s", err_buf);
    cr_assert_null(strstr(out_buf, "not searched"), "%s", out_buf);
    cr_assert_eq(cli((const char *[]){"select", "--problem", "leo-drag", "--horizon-s", "3000",
                                      "--max-pos-err-m", "1000", "--out", out, NULL}), 0, "%s", err_buf);
    cr_assert_not_null(strstr(out_buf, "not searched: leapfrog"), "%s", out_buf);
    cr_assert_not_null(strstr(out_buf, "not searched: gauss-jackson8"), "%s", out_buf);
    cr_assert_null(strstr(out_buf, "not searched: rk4"), "%s", out_buf);
}
