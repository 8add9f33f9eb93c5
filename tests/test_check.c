/* test_check.c - the regression gate end to end: propbench baseline and
 * check on a small sweep, with doctored summaries (regressions, improvements,
 * count, status, timing and bit changes), broken baselines (exit 2), JUnit
 * XML parsed by xmllint, and bit-for-bit reproducible fingerprints. */
#include <criterion/criterion.h>
#include <jansson.h>
#include <errno.h>
#include <fcntl.h>
#include <spawn.h>
#include <stdio.h>
#include <stdlib.h>
#include <math.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>
#include "test_support.h"
#include "bench/gate/baseline.h"
#include "bench/gate/compare.h"
#include "bench/store/summary_read.h"
#include "bench/measure/harness.h"
#include "bench/gate/junit.h"
#include "problems/catalogue.h"

extern char **environ;

typedef struct {
    char dir[64];            /* scratch directory */
    char run[128], base[128];
    char out[1 << 16], err[1 << 14];
} pbc_ctx;

static const char *pbc_bin(void)
{
    const char *b = getenv("PB_BIN");
    return b && *b ? b : "build/propbench";
}

/* Run argv (argv[0] is the program) with stdout and stderr into files under
 * c->dir, read back into c->out and c->err; returns the exit status. */
static int pbc_spawn(pbc_ctx *c, char *const argv[])
{
    char o[128], e[128];
    snprintf(o, sizeof o, "%s/stdout.txt", c->dir);
    snprintf(e, sizeof e, "%s/stderr.txt", c->dir);
    posix_spawn_file_actions_t fa;
    posix_spawn_file_actions_init(&fa);
    posix_spawn_file_actions_addopen(&fa, 1, o, O_WRONLY | O_CREAT | O_TRUNC, 0644);
    posix_spawn_file_actions_addopen(&fa, 2, e, O_WRONLY | O_CREAT | O_TRUNC, 0644);
    pid_t pid;
    int s = posix_spawnp(&pid, argv[0], &fa, NULL, argv, environ);
    posix_spawn_file_actions_destroy(&fa);
    cr_assert_eq(s, 0, "cannot start %s", argv[0]);
    int st;
    cr_assert_eq(waitpid(pid, &st, 0), pid);
    pbt_read_into(o, c->out, sizeof c->out);
    pbt_read_into(e, c->err, sizeof c->err);
    cr_assert(WIFEXITED(st), "%s died: %s", argv[0], c->err);
    return WEXITSTATUS(st);
}

/* A three-case sweep (fixed-step, symplectic, adaptive) and its baseline. */
static void pbc_setup(pbc_ctx *c)
{
    pbt_tmpdir(c->dir, sizeof c->dir);
    cr_assert(c->dir[0]);
    snprintf(c->run, sizeof c->run, "%s/run", c->dir);
    snprintf(c->base, sizeof c->base, "%s/base.json", c->dir);
    char *sweep[] = {(char *)pbc_bin(), "sweep", "--problems", "kepler-e0.6", "--methods",
                     "rk4,leapfrog,rkf45", "--steps-per-orbit", "200", "--tolerances", "1e-8",
                     "--orbits", "10", "--quiet", "--out", c->run, NULL};
    cr_assert_eq(pbc_spawn(c, sweep), 0, "sweep failed: %s", c->err);
    char *base[] = {(char *)pbc_bin(), "baseline", c->run, "--out", c->base, NULL};
    cr_assert_eq(pbc_spawn(c, base), 0, "baseline failed: %s", c->err);
}

static void pbc_teardown(pbc_ctx *c)
{
    char *rm[] = {"rm", "-rf", c->dir, NULL};
    pbc_spawn(c, rm);
}

/* Copy the run's summary.json to c->dir/name/summary.json after edit(). */
static const char *pbc_doctor(pbc_ctx *c, const char *name, void (*edit)(json_t *cases))
{
    static char dst[160];
    char src[200], path[200];
    snprintf(src, sizeof src, "%s/summary.json", c->run);
    snprintf(dst, sizeof dst, "%s/%s", c->dir, name);
    snprintf(path, sizeof path, "%s/summary.json", dst);
    cr_assert_eq(mkdir(dst, 0755), 0);
    json_t *d = json_load_file(src, 0, NULL);
    cr_assert_not_null(d);
    edit(json_object_get(d, "cases"));
    cr_assert_eq(json_dump_file(d, path, JSON_INDENT(1)), 0);
    json_decref(d);
    return dst;
}

static json_t *pbc_case(json_t *cases, const char *method)
{
    size_t i;
    json_t *c;
    json_array_foreach(cases, i, c)
        if (!strcmp(json_string_value(json_object_get(c, "method")), method))
            return c;
    cr_assert_fail("no %s case", method);
    return NULL;
}

static void pbc_scale(json_t *cases, const char *method, const char *group, const char *key,
                      double f)
{
    json_t *g = json_object_get(pbc_case(cases, method), group);
    json_object_set_new(g, key, json_real(f * json_number_value(json_object_get(g, key))));
}

static int pbc_check(pbc_ctx *c, const char *run_dir, const char *a1, const char *a2,
                     const char *a3)
{
    char *argv[] = {(char *)pbc_bin(), "check", "--baseline", c->base, (char *)run_dir,
                    (char *)a1, (char *)a2, (char *)a3, NULL};
    return pbc_spawn(c, argv);
}

static pbc_ctx ctx;
static void pbc_init(void) { pbc_setup(&ctx); }
static void pbc_fini(void) { pbc_teardown(&ctx); }

TestSuite(check, .init = pbc_init, .fini = pbc_fini, .timeout = 60);

Test(check, unchanged_run_passes_bit_for_bit)
{
    /* a run compared with its own baseline: every value equal (jansson
     * round-trips doubles exactly), so nothing may flag */
    cr_assert_eq(pbc_check(&ctx, ctx.run, "--strict", NULL, NULL), 0, "%s%s", ctx.out, ctx.err);
    cr_assert(strstr(ctx.out, "3 cases compared: 0 regressions, 0 improvements, 0 fingerprint changes"),
              "%s", ctx.out);
}

static void edit_pos_worse(json_t *cs) { pbc_scale(cs, "rk4", "metrics", "pos_err_max", 1.25); }

Test(check, injected_regression_fails_naming_case_and_metric)
{
    /* issue 7: worse by more than 10% (default) is a regression; 25% worse */
    const char *d = pbc_doctor(&ctx, "worse", edit_pos_worse);
    cr_assert_eq(pbc_check(&ctx, d, NULL, NULL, NULL), 1, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.out, "kepler-e0.6__rk4__n200__o10", "pos_err_max", "REGRESSION"),
              "%s", ctx.out);
    cr_assert(pbt_line_has(ctx.out, "pos_err_max", "+25.0%", "REGRESSION"), "%s", ctx.out);
    cr_assert(strstr(ctx.out, "1 regressions"), "%s", ctx.out);
    /* a per-metric tolerance of 30% (issue 7: configurable per metric) accepts it */
    cr_assert_eq(pbc_check(&ctx, d, "--metric-tolerance", "pos_err_max=0.3", NULL), 0, "%s", ctx.out);
    /* and a global 20% does not (25% > 20%) */
    cr_assert_eq(pbc_check(&ctx, d, "--tolerance", "0.2", NULL), 1, "%s", ctx.out);
}

static void edit_pos_slightly(json_t *cs) { pbc_scale(cs, "rk4", "metrics", "pos_err_max", 1.09); }

Test(check, within_tolerance_passes)
{
    /* issue 7: 9% worse is inside the default 10% tolerance */
    const char *d = pbc_doctor(&ctx, "slight", edit_pos_slightly);
    cr_assert_eq(pbc_check(&ctx, d, NULL, NULL, NULL), 0, "%s", ctx.out);
    cr_assert(strstr(ctx.out, "0 regressions, 0 improvements"), "%s", ctx.out);
    /* the 5% tolerance makes the same 9% a regression */
    cr_assert_eq(pbc_check(&ctx, d, "--tolerance", "0.05", NULL), 1, "%s", ctx.out);
}

static void edit_energy_better(json_t *cs) { pbc_scale(cs, "rkf45", "metrics", "energy_rel_max", 0.5); }

Test(check, improvement_passes_and_is_reported)
{
    /* issue 7: improvements are reported, never fail; halved energy error */
    const char *d = pbc_doctor(&ctx, "better", edit_energy_better);
    cr_assert_eq(pbc_check(&ctx, d, NULL, NULL, NULL), 0, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.out, "kepler-e0.6__rkf45__tol1e-08__o10", "energy_rel_max", "improved"),
              "%s", ctx.out);
    cr_assert(pbt_line_has(ctx.out, "energy_rel_max", "-50.0%", "improved"), "%s", ctx.out);
    cr_assert(strstr(ctx.out, "0 regressions, 1 improvements"), "%s", ctx.out);
}

static void edit_roundoff(json_t *cs) { pbc_scale(cs, "leapfrog", "metrics", "angmom_rel_max", 2.0); }

Test(check, roundoff_noise_below_floor_does_not_flag)
{
    /* leapfrog conserves angular momentum exactly (Hairer, Lubich, Wanner 2006,
     * from memory), so its |h| error at the steps is round-off; at the samples,
     * taken between steps on dense output, the interpolant adds its own, and
     * the largest is ~1e-14 here. Twice it stays within (1 + 10%) of it plus
     * the 1e-14 floor and must pass; with no floor it fails */
    const char *d = pbc_doctor(&ctx, "noise", edit_roundoff);
    cr_assert_eq(pbc_check(&ctx, d, NULL, NULL, NULL), 0, "%s", ctx.out);
    cr_assert_eq(pbc_check(&ctx, d, "--floor", "0", NULL), 1, "%s", ctx.out);
    cr_assert(pbt_line_has(ctx.out, "leapfrog", "angmom_rel_max", "REGRESSION"), "%s", ctx.out);
}

static void edit_counts(json_t *cs)
{
    json_t *c = json_object_get(pbc_case(cs, "rk4"), "cost");
    json_object_set_new(c, "evals", json_integer(json_integer_value(json_object_get(c, "evals")) - 1));
    json_object_set_new(pbc_case(cs, "leapfrog"), "status", json_string("diverged"));
}

Test(check, count_and_status_changes_fail)
{
    /* issue 7: counts compared exactly (one evaluation fewer is still a
     * change), a status change is a regression */
    const char *d = pbc_doctor(&ctx, "counts", edit_counts);
    cr_assert_eq(pbc_check(&ctx, d, NULL, NULL, NULL), 1, "%s", ctx.out);
    cr_assert(pbt_line_has(ctx.out, "kepler-e0.6__rk4__n200__o10", "evals", "-1"), "%s", ctx.out);
    cr_assert(pbt_line_has(ctx.out, "kepler-e0.6__leapfrog__n200__o10", "status", "REGRESSION"),
              "%s", ctx.out);
    cr_assert(strstr(ctx.out, "2 regressions"), "%s", ctx.out);
}

static void edit_missing_new(json_t *cs)
{
    json_object_set_new(pbc_case(cs, "rkf45"), "id", json_string("kepler-e0.6__rkf45__renamed"));
}

Test(check, missing_and_new_cases_listed)
{
    /* issue 7: a case missing from the run is a regression, a new one is listed */
    const char *d = pbc_doctor(&ctx, "renamed", edit_missing_new);
    cr_assert_eq(pbc_check(&ctx, d, NULL, NULL, NULL), 1, "%s", ctx.out);
    cr_assert(pbt_line_has(ctx.out, "kepler-e0.6__rkf45__tol1e-08__o10", "missing", "MISSING"), "%s", ctx.out);
    cr_assert(pbt_line_has(ctx.out, "kepler-e0.6__rkf45__renamed", "new", "new"), "%s", ctx.out);
    cr_assert(strstr(ctx.out, "1 missing, 1 new: FAIL"), "%s", ctx.out);
}

static void edit_bits(json_t *cs)
{
    json_object_set_new(pbc_case(cs, "rk4"), "fingerprint", json_string("fnv1a64:0123456789abcdef"));
}

Test(check, changed_fingerprint_reported_and_strict_fails)
{
    /* issue 7: bits changed within tolerance are reported; --strict fails */
    const char *d = pbc_doctor(&ctx, "bits", edit_bits);
    cr_assert_eq(pbc_check(&ctx, d, NULL, NULL, NULL), 0, "%s", ctx.out);
    cr_assert(pbt_line_has(ctx.out, "kepler-e0.6__rk4__n200__o10", "fingerprint", "bits changed"), "%s", ctx.out);
    cr_assert(strstr(ctx.out, "0 regressions, 0 improvements, 1 fingerprint changes"), "%s", ctx.out);
    cr_assert_eq(pbc_check(&ctx, d, "--strict", NULL, NULL), 1, "%s", ctx.out);
    cr_assert(pbt_line_has(ctx.out, "kepler-e0.6__rk4__n200__o10", "fingerprint", "REGRESSION"), "%s", ctx.out);
}

static void edit_slow(json_t *cs) { pbc_scale(cs, "rkf45", "cost", "step_kernel_ratio", 2.0); }

Test(check, timing_only_when_asked_as_a_ratio)
{
    /* issue 7: timing compared only when asked, as a ratio; 2x slower */
    const char *d = pbc_doctor(&ctx, "slow", edit_slow);
    cr_assert_eq(pbc_check(&ctx, d, NULL, NULL, NULL), 0, "%s", ctx.out);
    cr_assert_eq(pbc_check(&ctx, d, "--timing", NULL, NULL), 1, "%s", ctx.out);
    cr_assert(pbt_line_has(ctx.out, "rkf45", "ns_per_step", "x2.00"), "%s", ctx.out);
    cr_assert_eq(pbc_check(&ctx, d, "--timing-ratio", "2.5", NULL), 0, "%s", ctx.out);
}

static void edit_compiler(json_t *cs) { (void)cs; }

Test(check, build_difference_warns)
{
    /* issue 7: a different compiler, flags or machine is a warning, not a failure */
    const char *d = pbc_doctor(&ctx, "compiler", edit_compiler);
    char path[200];
    snprintf(path, sizeof path, "%s/summary.json", d);
    json_t *doc = json_load_file(path, 0, NULL);
    json_object_set_new(json_object_get(doc, "build"), "compiler", json_string("other-cc 1.0"));
    json_object_set_new(json_object_get(doc, "machine"), "arch", json_string("riscv64"));
    cr_assert_eq(json_dump_file(doc, path, 0), 0);
    json_decref(doc);
    cr_assert_eq(pbc_check(&ctx, d, NULL, NULL, NULL), 0, "%s", ctx.err);
    cr_assert(strstr(ctx.err, "warning: compiler differs") && strstr(ctx.err, "other-cc 1.0"), "%s", ctx.err);
    cr_assert(strstr(ctx.err, "warning: machine arch differs"), "%s", ctx.err);
}

/* ---- broken inputs: exit 2 with the file named ---- */

static void pbc_write(const char *path, const char *data, size_t n)
{
    FILE *f = fopen(path, "wb");
    cr_assert_not_null(f);
    cr_assert_eq(fwrite(data, 1, n, f), n);
    fclose(f);
}

Test(check, truncated_or_corrupt_baseline_exit_2)
{
    char buf[1 << 15];
    pbt_read_into(ctx.base, buf, sizeof buf);
    size_t n = strlen(buf);
    cr_assert_gt(n, 1000u);
    pbc_write(ctx.base, buf, n / 2); /* an interrupted copy */
    cr_assert_eq(pbc_check(&ctx, ctx.run, NULL, NULL, NULL), 2);
    cr_assert(strstr(ctx.err, ctx.base) && strstr(ctx.err, "truncated"), "%s", ctx.err);
    pbc_write(ctx.base, "\x7f" "ELF garbage", 12);
    cr_assert_eq(pbc_check(&ctx, ctx.run, NULL, NULL, NULL), 2);
    cr_assert(strstr(ctx.err, ctx.base) && strstr(ctx.err, "corrupt"), "%s", ctx.err);
    /* well-formed JSON but a case without its fields */
    const char *bad = "{\"format\": 1, \"kind\": \"propbench-baseline\", \"cases\": [{\"id\": \"x\", \"status\": \"ok\"}]}";
    pbc_write(ctx.base, bad, strlen(bad));
    cr_assert_eq(pbc_check(&ctx, ctx.run, NULL, NULL, NULL), 2);
    cr_assert(strstr(ctx.err, "cases[0] (x)"), "%s", ctx.err);
    /* a run summary passed as the baseline */
    char summary[200];
    snprintf(summary, sizeof summary, "%s/summary.json", ctx.run);
    char *argv[] = {(char *)pbc_bin(), "check", "--baseline", summary, ctx.run, NULL};
    cr_assert_eq(pbc_spawn(&ctx, argv), 2);
    cr_assert(strstr(ctx.err, "not a propbench baseline"), "%s", ctx.err);
    /* and a missing run directory */
    char *argv2[] = {(char *)pbc_bin(), "check", "--baseline", summary, "/nonexistent-run", NULL};
    cr_assert_eq(pbc_spawn(&ctx, argv2), 2);
}

Test(check, future_format_baseline_exit_2)
{
    json_t *b = json_load_file(ctx.base, 0, NULL);
    cr_assert_not_null(b);
    json_object_set_new(b, "format", json_integer(PB_BASELINE_FORMAT + 1));
    cr_assert_eq(json_dump_file(b, ctx.base, 0), 0);
    json_decref(b);
    cr_assert_eq(pbc_check(&ctx, ctx.run, NULL, NULL, NULL), 2);
    cr_assert(strstr(ctx.err, ctx.base) && strstr(ctx.err, "format 2 is newer"), "%s", ctx.err);
    cr_assert_eq(ctx.out[0], 0, "nothing compared, nothing printed: %s", ctx.out);
}

static void edit_no_cases(json_t *cs) { json_array_clear(cs); }

Test(check, empty_cases_exit_2_in_baseline_and_check)
{
    /* a gate that compares nothing must not pass: a run with "cases": []
     * makes no baseline, and a baseline with none is refused by check */
    const char *d = pbc_doctor(&ctx, "empty", edit_no_cases);
    char out[200], summary[200];
    snprintf(out, sizeof out, "%s/empty.json", ctx.dir);
    snprintf(summary, sizeof summary, "%s/summary.json", d);
    char *argv[] = {(char *)pbc_bin(), "baseline", (char *)d, "--out", out, NULL};
    cr_assert_eq(pbc_spawn(&ctx, argv), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, "propbench baseline: error:", summary,
                           "has no cases: nothing to compare"), "%s", ctx.err);
    cr_assert_not(pbt_exists(out), "no baseline may be written");
    json_t *b = json_load_file(ctx.base, 0, NULL);
    cr_assert_not_null(b);
    json_array_clear(json_object_get(b, "cases"));
    cr_assert_eq(json_dump_file(b, ctx.base, 0), 0);
    json_decref(b);
    cr_assert_eq(pbc_check(&ctx, ctx.run, NULL, NULL, NULL), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, "propbench check: error:", ctx.base,
                           "has no cases: nothing to compare"), "%s", ctx.err);
    cr_assert_eq(ctx.out[0], 0, "nothing compared, nothing printed: %s", ctx.out);
}

static void edit_no_pos_err(json_t *cs)
{
    json_object_del(json_object_get(pbc_case(cs, "rk4"), "metrics"), "pos_err_max");
}

static void edit_crashed(json_t *cs)
{
    /* what pb_case_crashed_json writes: settings and status, no results */
    json_t *c = pbc_case(cs, "leapfrog");
    json_object_set_new(c, "status", json_string("crashed"));
    json_object_del(c, "metrics");
    json_object_del(c, "cost");
    json_object_del(c, "fingerprint");
}

/* Edit the baseline file in place. */
static void pbc_base_edit(const char *path, void (*edit)(json_t *case0))
{
    json_t *b = json_load_file(path, 0, NULL);
    cr_assert_not_null(b);
    edit(json_array_get(json_object_get(b, "cases"), 0));
    cr_assert_eq(json_dump_file(b, path, 0), 0);
    json_decref(b);
}

static void base_no_energy(json_t *c) { json_object_del(json_object_get(c, "metrics"), "energy_rel_max"); }
static void base_no_scale(json_t *c) { json_object_del(c, "scale"); }
static void base_zero_scale(json_t *c)
{
    json_object_set_new(json_object_get(c, "scale"), "length", json_real(0));
}

Test(check, missing_keys_exit_2_naming_file_case_and_key)
{
    char id0[200];
    json_t *b = json_load_file(ctx.base, 0, NULL);
    cr_assert_not_null(b);
    snprintf(id0, sizeof id0, "%s",
             json_string_value(json_object_get(json_array_get(json_object_get(b, "cases"), 0), "id")));
    json_decref(b);
    const char *rk4 = "kepler-e0.6__rk4__n200__o10";

    /* a run summary without pos_err_max: baseline, check and merge refuse it */
    const char *d = pbc_doctor(&ctx, "nopos", edit_no_pos_err);
    char summary[200], out[200];
    snprintf(summary, sizeof summary, "%s/summary.json", d);
    snprintf(out, sizeof out, "%s/nopos.json", ctx.dir);
    char *bl[] = {(char *)pbc_bin(), "baseline", (char *)d, "--out", out, NULL};
    cr_assert_eq(pbc_spawn(&ctx, bl), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, summary, rk4, "key 'pos_err_max' missing"), "%s", ctx.err);
    cr_assert_not(pbt_exists(out));
    cr_assert_eq(pbc_check(&ctx, d, NULL, NULL, NULL), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, summary, rk4, "key 'pos_err_max' missing"), "%s", ctx.err);
    snprintf(out, sizeof out, "%s/merged", ctx.dir);
    char *mg[] = {(char *)pbc_bin(), "merge", "--out", out, (char *)d, NULL};
    cr_assert_eq(pbc_spawn(&ctx, mg), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, summary, rk4, "key 'pos_err_max' missing"), "%s", ctx.err);

    /* a crashed case has no results at all and is still a valid run */
    d = pbc_doctor(&ctx, "crashed", edit_crashed);
    snprintf(out, sizeof out, "%s/crashed.json", ctx.dir);
    char *bc[] = {(char *)pbc_bin(), "baseline", (char *)d, "--out", out, NULL};
    cr_assert_eq(pbc_spawn(&ctx, bc), 0, "%s", ctx.err);

    /* a baseline without a metric, without a scale, with a zero scale */
    pbc_base_edit(ctx.base, base_no_energy);
    cr_assert_eq(pbc_check(&ctx, ctx.run, NULL, NULL, NULL), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, ctx.base, id0, "key 'energy_rel_max' missing"), "%s", ctx.err);
    char *rb[] = {(char *)pbc_bin(), "baseline", ctx.run, "--out", ctx.base, NULL};
    cr_assert_eq(pbc_spawn(&ctx, rb), 0, "%s", ctx.err);
    pbc_base_edit(ctx.base, base_no_scale);
    cr_assert_eq(pbc_check(&ctx, ctx.run, NULL, NULL, NULL), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, ctx.base, id0, "key 'scale' missing"), "%s", ctx.err);
    cr_assert_eq(pbc_spawn(&ctx, rb), 0, "%s", ctx.err);
    pbc_base_edit(ctx.base, base_zero_scale);
    cr_assert_eq(pbc_check(&ctx, ctx.run, NULL, NULL, NULL), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, ctx.base, id0, "key 'scale.length' must be a positive finite number, got 0"),
              "%s", ctx.err);
}

Test(check, options_beyond_sane_limits_exit_2)
{
    /* limits from baseline.h (our choice): a tolerance above 100 (101 times
     * worse) or a floor above 1e-3 of the orbit's size passes anything */
    static const char *const bad[][3] = {
        {"--tolerance", "1e300", "--tolerance must be from 0 to 100, got '1e300'"},
        {"--tolerance", "100.5", "--tolerance must be from 0 to 100, got '100.5'"},
        {"--metric-tolerance", "energy_rel_max=1e300",
         "--metric-tolerance energy_rel_max: expects a relative tolerance from 0 to 100, got '1e300'"},
        {"--floor", "1e300", "--floor must be from 0 to 0.001, got '1e300'"},
        {"--floor", "0.002", "--floor must be from 0 to 0.001, got '0.002'"},
        {"--timing-ratio", "1e300", "--timing-ratio must be from 1 to 100, got '1e300'"},
    };
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        cr_assert_eq(pbc_check(&ctx, ctx.run, bad[i][0], bad[i][1], NULL), 2, "%s %s: %s%s",
                     bad[i][0], bad[i][1], ctx.out, ctx.err);
        cr_assert(pbt_line_has(ctx.err, "propbench check: error:", bad[i][2], ""), "%s", ctx.err);
        cr_assert_eq(ctx.out[0], 0, "nothing compared: %s", ctx.out);
    }
    /* the limits themselves are accepted */
    cr_assert_eq(pbc_check(&ctx, ctx.run, "--tolerance", "100", NULL), 0, "%s", ctx.err);
    cr_assert_eq(pbc_check(&ctx, ctx.run, "--floor", "1e-3", NULL), 0, "%s", ctx.err);
    cr_assert_eq(pbc_check(&ctx, ctx.run, "--metric-tolerance", "pos_err_max=0", NULL), 0, "%s", ctx.err);
}

Test(check, merge_names_a_missing_shard_without_a_line)
{
    /* a shard directory without summary.json: the file and the system's
     * reason (ENOENT), no line number (there is none) */
    char shard[200], out[200], msg[600];
    snprintf(shard, sizeof shard, "%s/empty-shard", ctx.dir);
    snprintf(out, sizeof out, "%s/merged", ctx.dir);
    cr_assert_eq(mkdir(shard, 0755), 0);
    char *mg[] = {(char *)pbc_bin(), "merge", "--out", out, shard, NULL};
    cr_assert_eq(pbc_spawn(&ctx, mg), 2, "%s%s", ctx.out, ctx.err);
    snprintf(msg, sizeof msg, "propbench merge: error: %s/summary.json: cannot open: %s\n", shard,
             strerror(ENOENT));
    cr_assert_str_eq(ctx.err, msg);
    cr_assert_not(strstr(ctx.err, ":-1"), "%s", ctx.err);
}

/* ---- JUnit XML and Markdown ---- */

static void edit_for_junit(json_t *cs)
{
    edit_pos_worse(cs);
    /* markup and a control character in an id must still give valid XML */
    json_object_set_new(pbc_case(cs, "leapfrog"), "id", json_string("odd<&>\"'\x01id"));
}

Test(check, junit_is_well_formed_one_testcase_per_case_and_metric)
{
    const char *d = pbc_doctor(&ctx, "junit", edit_for_junit);
    char xml[200], md[200];
    snprintf(xml, sizeof xml, "%s/check.xml", ctx.dir);
    snprintf(md, sizeof md, "%s/check.md", ctx.dir);
    char *argv[] = {(char *)pbc_bin(), "check", "--baseline", ctx.base, (char *)d, "--junit", xml,
                    "--markdown", md, NULL};
    cr_assert_eq(pbc_spawn(&ctx, argv), 1, "%s", ctx.err);
    /* well-formedness per W3C XML 1.0, judged by libxml2's parser */
    char *lint[] = {"xmllint", "--noout", xml, NULL};
    cr_assert_eq(pbc_spawn(&ctx, lint), 0, "xmllint: %s", ctx.err);
    /* two matched cases x 18 items (status, settings, 9 metrics, 2 growth
     * classes, 4 counts, fingerprint), plus one missing and one new case */
    char *count[] = {"xmllint", "--xpath", "count(//testcase)", xml, NULL};
    cr_assert_eq(pbc_spawn(&ctx, count), 0, "%s", ctx.err);
    cr_assert_eq(atoi(ctx.out), 2 * 18 + 2, "testcases: %s", ctx.out);
    /* failures: pos_err_max and the missing leapfrog case */
    char *fails[] = {"xmllint", "--xpath", "count(//testcase/failure)", xml, NULL};
    cr_assert_eq(pbc_spawn(&ctx, fails), 0);
    cr_assert_eq(atoi(ctx.out), 2, "failures: %s", ctx.out);
    char *named[] = {"xmllint", "--xpath",
                     "string(//testcase[failure][@name='pos_err_max']/@classname)", xml, NULL};
    cr_assert_eq(pbc_spawn(&ctx, named), 0);
    ctx.out[strcspn(ctx.out, "\n")] = 0; /* xmllint ends the string with a newline */
    cr_assert_str_eq(ctx.out, "kepler-e0.6__rk4__n200__o10");
    char *odd[] = {"xmllint", "--xpath", "string(//testcase[@name='case'][not(failure)]/@classname)",
                   xml, NULL};
    cr_assert_eq(pbc_spawn(&ctx, odd), 0);
    ctx.out[strcspn(ctx.out, "\n")] = 0;
    cr_assert_str_eq(ctx.out, "odd<&>\"'?id");
    char text[8192];
    pbt_read_into(md, text, sizeof text);
    cr_assert(strstr(text, "## propbench check: FAIL"), "%s", text);
    cr_assert(strstr(text, "| kepler-e0.6__rk4__n200__o10 | pos_err_max |"), "%s", text);
}

/* Number of entries of dir other than . and .. */
static int pbc_entries(const char *dir)
{
    char *ls[] = {"ls", "-A", (char *)dir, NULL};
    cr_assert_eq(pbc_spawn(&ctx, ls), 0, "%s", ctx.err);
    int n = 0;
    for (const char *p = ctx.out; *p; p++)
        n += *p == '\n';
    return n;
}

Test(check, failed_report_leaves_no_output_file)
{
    /* on exit 2 nothing this invocation wrote may stay: the JUnit file is not
     * left when the Markdown one cannot be written, nor the other way round */
    char d[200], xml[240], md[240], badxml[240], badmd[240];
    snprintf(d, sizeof d, "%s/reports", ctx.dir);
    cr_assert_eq(mkdir(d, 0755), 0);
    snprintf(xml, sizeof xml, "%s/j.xml", d);
    snprintf(md, sizeof md, "%s/x.md", d);
    snprintf(badxml, sizeof badxml, "%s/no-such-dir/j.xml", ctx.dir);
    snprintf(badmd, sizeof badmd, "%s/no-such-dir/x.md", ctx.dir);
    char *a1[] = {(char *)pbc_bin(), "check", "--baseline", ctx.base, ctx.run, "--junit", xml,
                  "--markdown", badmd, NULL};
    cr_assert_eq(pbc_spawn(&ctx, a1), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, "propbench check: error:", badmd,
                           "cannot write the Markdown summary"), "%s", ctx.err);
    cr_assert_not(pbt_exists(xml), "%s was left", xml);
    cr_assert_eq(pbc_entries(d), 0, "a temporary file was left: %s", ctx.out);
    char *a2[] = {(char *)pbc_bin(), "check", "--baseline", ctx.base, ctx.run, "--junit", badxml,
                  "--markdown", md, NULL};
    cr_assert_eq(pbc_spawn(&ctx, a2), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, "propbench check: error:", badxml,
                           "cannot write the JUnit report"), "%s", ctx.err);
    cr_assert_eq(pbc_entries(d), 0, "a file was left: %s", ctx.out);
    /* both writable: both written */
    char *a3[] = {(char *)pbc_bin(), "check", "--baseline", ctx.base, ctx.run, "--junit", xml,
                  "--markdown", md, NULL};
    cr_assert_eq(pbc_spawn(&ctx, a3), 0, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_exists(xml) && pbt_exists(md));
    cr_assert_eq(pbc_entries(d), 2, "%s", ctx.out);
}

Test(check, junit_escape_unit)
{
    char out[64];
    /* the five XML 1.0 predefined entities (W3C XML 1.0, sec. 4.6) */
    size_t n = pb_junit_escape("a<b&\"c'>\x02", out, sizeof out);
    cr_assert_str_eq(out, "a&lt;b&amp;&quot;c&apos;&gt;?");
    cr_assert_eq(n, strlen("a&lt;b&amp;&quot;c&apos;&gt;?"));
    /* truncation stops at an entity boundary and reports the full length */
    n = pb_junit_escape("ab&cd", out, 5);
    cr_assert_str_eq(out, "ab");
    cr_assert_eq(n, 9u);
}

/* ---- bit-for-bit reproducibility ---- */

Test(check, same_case_twice_gives_identical_fingerprints)
{
    /* IEEE-754 arithmetic is deterministic for the same code and inputs
     * (common practice), so the same build must reproduce every bit */
    const char *methods[] = {"rk4", "yoshida4", "rkf45", "gauss-jackson8"};
    for (int k = 0; k < 4; k++) {
        pb_case_spec s;
        memset(&s, 0, sizeof s);
        cr_assert_eq(pb_problem_lookup("kepler-e0.6", &s.problem), PB_OK);
        s.method = pb_method_find(methods[k]);
        cr_assert_not_null(s.method);
        s.steps_per_orbit = 200;
        s.tolerance = 1e-8;
        s.orbits = 5;
        pb_case_result a, b;
        cr_assert_eq(pb_case_run(&s, &a), 0);
        cr_assert_eq(pb_case_run(&s, &b), 0);
        cr_assert_str_eq(a.fingerprint, b.fingerprint, "%s", methods[k]);
        cr_assert_eq(memcmp(a.final_r, b.final_r, sizeof a.final_r), 0, "%s", methods[k]);
        cr_assert_eq(a.evals, b.evals);
        /* and the fingerprint sees a change: one more step per orbit */
        s.steps_per_orbit = 201;
        s.tolerance = 1.01e-8;
        pb_case_result c;
        cr_assert_eq(pb_case_run(&s, &c), 0);
        cr_assert_str_neq(a.fingerprint, c.fingerprint, "%s", methods[k]);
        pb_case_result_free(&a);
        pb_case_result_free(&b);
        pb_case_result_free(&c);
    }
    /* end to end: a second sweep with another worker count gives the same bits */
    char again[160];
    snprintf(again, sizeof again, "%s/again", ctx.dir);
    char *sweep[] = {(char *)pbc_bin(), "sweep", "--problems", "kepler-e0.6", "--methods",
                     "rk4,leapfrog,rkf45", "--steps-per-orbit", "200", "--tolerances", "1e-8",
                     "--orbits", "10", "--quiet", "-j", "3", "--out", again, NULL};
    cr_assert_eq(pbc_spawn(&ctx, sweep), 0, "%s", ctx.err);
    cr_assert_eq(pbc_check(&ctx, again, "--strict", NULL, NULL), 0, "%s", ctx.out);
    cr_assert(strstr(ctx.out, "0 fingerprint changes (strict)"), "%s", ctx.out);
}

static void edit_no_scales(json_t *cs) { json_object_del(pbc_case(cs, "rk4"), "scales"); }

/* The gate's floor for positions and velocities scales with the case's own
 * orbit, whatever its name: a problem-file case (not in the catalogue) of a
 * circular 6778 km orbit gets |r0| = a = 6778 km and |v0| = sqrt(mu/a)
 * (two-body law, REFERENCES.md; mu from the body table, 398600.4418), where
 * a lookup by name in the catalogue used to give it 1.0. */
Test(check, problem_file_case_keeps_its_own_scale)
{
    char ini[200], run[200], base[200];
    snprintf(ini, sizeof ini, "%s/team.ini", ctx.dir);
    snprintf(run, sizeof run, "%s/team-run", ctx.dir);
    snprintf(base, sizeof base, "%s/team-base.json", ctx.dir);
    const char *text = "[case team-orbit]\nunits = km-s\nbody = earth\nforce = two-body\n"
                       "a = 6778\ne = 0\ni_deg = 51.6\nraan_deg = 0\nargp_deg = 0\nnu_deg = 0\n";
    pbc_write(ini, text, strlen(text));
    char *rn[] = {(char *)pbc_bin(), "run", "--problem-file", ini, "--method", "rk4",
                  "--steps-per-orbit", "100", "--orbits", "2", "--repeats", "0", "--quiet",
                  "--out", run, NULL};
    cr_assert_eq(pbc_spawn(&ctx, rn), 0, "%s", ctx.err);
    char *bl[] = {(char *)pbc_bin(), "baseline", run, "--out", base, NULL};
    cr_assert_eq(pbc_spawn(&ctx, bl), 0, "%s", ctx.err);
    json_t *b = json_load_file(base, 0, NULL);
    cr_assert_not_null(b);
    json_t *sc = json_object_get(json_array_get(json_object_get(b, "cases"), 0), "scale");
    double len = json_number_value(json_object_get(sc, "length"));
    double speed = json_number_value(json_object_get(sc, "speed"));
    json_decref(b);
    cr_assert(fabs(len - 6778.0) < 1e-9 * 6778.0, "length scale %.12g", len);
    cr_assert(fabs(speed - sqrt(398600.4418 / 6778.0)) < 1e-12 * speed, "speed scale %.15g", speed);

    /* a summary whose case lacks its scales is refused, not given 1.0 */
    const char *d = pbc_doctor(&ctx, "noscales", edit_no_scales);
    char summary[200];
    snprintf(summary, sizeof summary, "%s/summary.json", d);
    char *bs[] = {(char *)pbc_bin(), "baseline", (char *)d, "--out", base, NULL};
    cr_assert_eq(pbc_spawn(&ctx, bs), 2, "%s%s", ctx.out, ctx.err);
    cr_assert(pbt_line_has(ctx.err, summary, "key 'scales' missing", "rk4"), "%s", ctx.err);
}
