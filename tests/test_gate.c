/* test_gate.c - the CI gate beyond the baseline comparison of test_check.c:
 * the calibration kernel's fields and the calibrated timing comparison,
 * count tolerances, absolute requirements (--require, with and without a
 * baseline, filtered by --methods/--problems, in JUnit and Markdown),
 * --only-failures and the column that names what decided a verdict. Runs
 * are doctored copies of one small sweep; nothing asserts a time. */
#include <criterion/criterion.h>
#include <jansson.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include "test_support.h"

typedef struct {
    char dir[200], run[260], base[260];
    char out[1 << 16], err[1 << 14];
} gate_ctx;

static gate_ctx g;

static int gate_cli(const char *const *args)
{
    return pbt_run_cli(args, g.out, sizeof g.out, g.err, sizeof g.err);
}

/* A three-case sweep (rk4, leapfrog, rkf45 on kepler-e0.6; rk4 on
 * leo-near-circular, whose errors have metres) and its baseline. */
static void gate_init(void)
{
    pbt_tmpdir(g.dir, sizeof g.dir);
    cr_assert(g.dir[0]);
    snprintf(g.run, sizeof g.run, "%s/run", g.dir);
    snprintf(g.base, sizeof g.base, "%s/base.json", g.dir);
    const char *sweep[] = {"sweep", "--problems", "kepler-e0.6,leo-near-circular", "--methods",
                           "rk4,rkf45", "--steps-per-orbit", "200", "--tolerances", "1e-8",
                           "--orbits", "5", "--quiet", "--out", g.run, NULL};
    cr_assert_eq(gate_cli(sweep), 0, "sweep: %s", g.err);
    const char *base[] = {"baseline", g.run, "--out", g.base, NULL};
    cr_assert_eq(gate_cli(base), 0, "baseline: %s", g.err);
}

static void gate_fini(void)
{
    char cmd[300];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", g.dir);
    cr_assert_eq(system(cmd), 0);
}

TestSuite(gate, .init = gate_init, .fini = gate_fini, .timeout = 120);

static json_t *gate_case(json_t *doc, const char *problem, const char *method)
{
    size_t i;
    json_t *c;
    json_array_foreach(json_object_get(doc, "cases"), i, c)
        if (!strcmp(json_string_value(json_object_get(c, "method")), method) &&
            !strcmp(json_string_value(json_object_get(c, "problem")), problem))
            return c;
    cr_assert_fail("no case %s %s", problem, method);
    return NULL;
}

static void gate_scale(json_t *c, const char *group, const char *key, double f)
{
    json_t *o = json_object_get(c, group);
    json_t *v = json_object_get(o, key);
    if (json_is_integer(v))
        json_object_set_new(o, key, json_integer((json_int_t)llround(f * (double)json_integer_value(v))));
    else
        json_object_set_new(o, key, json_real(f * json_number_value(v)));
}

/* The run copied into g.dir/name with edit applied to its summary. */
static const char *gate_doctor(const char *name, void (*edit)(json_t *doc))
{
    static char dst[300];
    char src[300], path[330];
    snprintf(src, sizeof src, "%s/summary.json", g.run);
    snprintf(dst, sizeof dst, "%s/%s", g.dir, name);
    snprintf(path, sizeof path, "%s/summary.json", dst);
    cr_assert_eq(mkdir(dst, 0755), 0);
    json_t *d = json_load_file(src, 0, NULL);
    cr_assert_not_null(d);
    edit(d);
    cr_assert_eq(json_dump_file(d, path, JSON_INDENT(1)), 0);
    json_decref(d);
    return dst;
}

/* ---- item 1: the calibration kernel ---- */

Test(gate, calibration_recorded_in_summary_and_baseline)
{
    char path[300];
    snprintf(path, sizeof path, "%s/summary.json", g.run);
    json_t *s = json_load_file(path, 0, NULL), *b = json_load_file(g.base, 0, NULL);
    cr_assert(s && b);
    json_t *cal = json_object_get(s, "calibration");
    cr_assert_str_eq(json_string_value(json_object_get(cal, "kernel")), "rk4-leo-near-circular-100x100");
    cr_assert_eq(json_integer_value(json_object_get(cal, "cases_timed")), 4);
    cr_assert(json_number_value(json_object_get(cal, "ns")) > 0);
    cr_assert(json_equal(cal, json_object_get(b, "calibration")), "the baseline keeps the run's");
    size_t i;
    json_t *c;
    json_array_foreach(json_object_get(s, "cases"), i, c) {
        json_t *k = json_object_get(c, "cost");
        double cn = json_number_value(json_object_get(k, "calib_ns"));
        double q = json_number_value(json_object_get(k, "step_kernel_ratio"));
        cr_assert(cn > 0 && q > 0, "case %zu: calib_ns %g, step_kernel_ratio %g", i, cn, q);
        json_t *t = json_object_get(json_array_get(json_object_get(b, "cases"), i), "timing");
        cr_assert(json_equal(json_object_get(t, "step_kernel_ratio"), json_object_get(k, "step_kernel_ratio")));
    }
    json_decref(s);
    json_decref(b);
}

/* the machine twice as slow: ns and the kernel both doubled */
static void edit_slow_machine(json_t *d)
{
    size_t i;
    json_t *c;
    json_array_foreach(json_object_get(d, "cases"), i, c) {
        gate_scale(c, "cost", "ns_per_step", 2.0);
        gate_scale(c, "cost", "calib_ns", 2.0);
    }
}

/* one method twice as slow on the same machine */
static void edit_slow_method(json_t *d)
{
    json_t *c = gate_case(d, "kepler-e0.6", "rkf45");
    gate_scale(c, "cost", "ns_per_step", 2.0);
    gate_scale(c, "cost", "step_kernel_ratio", 2.0);
}

Test(gate, timing_compares_steps_in_kernel_units)
{
    const char *slow_m = gate_doctor("slow-machine", edit_slow_machine);
    const char *a1[] = {"check", "--baseline", g.base, slow_m, "--timing", NULL};
    cr_assert_eq(gate_cli(a1), 0, "a slower machine is no regression: %s", g.out);
    cr_assert(!strstr(g.out, "ns_per_step"), "no timing row differs: %s", g.out);
    const char *slow = gate_doctor("slow-method", edit_slow_method);
    const char *a2[] = {"check", "--baseline", g.base, slow, "--timing", NULL};
    cr_assert_eq(gate_cli(a2), 1, "%s", g.out);
    cr_assert(pbt_line_has(g.out, "kepler-e0.6__rkf45", "ns_per_step", "x2.00 calibrated"), "%s", g.out);
    /* the deciding row names the timing, not a metric that moved less */
    cr_assert(pbt_line_has(g.out, "kepler-e0.6__rkf45", "ns_per_step", "REGRESSION"), "%s", g.out);
}

static void base_without_kernel(json_t *d)
{
    size_t i;
    json_t *c;
    json_array_foreach(json_object_get(d, "cases"), i, c)
        json_object_del(json_object_get(c, "timing"), "step_kernel_ratio");
}

Test(gate, baseline_without_kernel_compares_raw_cpu_with_a_warning)
{
    json_t *b = json_load_file(g.base, 0, NULL);
    base_without_kernel(b);
    char old[300];
    snprintf(old, sizeof old, "%s/old-base.json", g.dir);
    cr_assert_eq(json_dump_file(b, old, 0), 0);
    json_decref(b);
    const char *slow_m = gate_doctor("slow-machine-raw", edit_slow_machine);
    const char *a[] = {"check", "--baseline", old, slow_m, "--timing", NULL};
    cr_assert_eq(gate_cli(a), 1, "%s", g.out);
    cr_assert(pbt_line_has(g.out, "rk4", "ns_per_step", "x2.00 raw CPU"), "%s", g.out);
    cr_assert(strstr(g.err, "warning: 4 cases compared on raw CPU time"), "%s", g.err);
}

/* ---- item 2: count tolerances ---- */

static void edit_more_steps(json_t *d)
{
    json_t *c = gate_case(d, "kepler-e0.6", "rkf45");
    gate_scale(c, "cost", "steps", 1.03);
    gate_scale(c, "cost", "evals", 1.08);
}

Test(gate, count_tolerance_reported_like_metrics)
{
    const char *d = gate_doctor("more-steps", edit_more_steps);
    const char *exact[] = {"check", "--baseline", g.base, d, NULL};
    cr_assert_eq(gate_cli(exact), 1, "counts exact by default: %s", g.out);
    const char *loose[] = {"check", "--baseline", g.base, d, "--count-tolerance",
                           "steps=0.05,evals=0.05", NULL};
    cr_assert_eq(gate_cli(loose), 1, "evals +8%% > 5%%: %s", g.out);
    cr_assert(pbt_line_has(g.out, "kepler-e0.6__rkf45", "evals", "REGRESSION"), "%s", g.out);
    cr_assert(pbt_line_has(g.out, "kepler-e0.6__rkf45", "evals", "(+8.0%)"), "%s", g.out);
    cr_assert(!pbt_line_has(g.out, "kepler-e0.6__rkf45", "steps ", "REGRESSION"), "%s", g.out);
    const char *looser[] = {"check", "--baseline", g.base, d, "--count-tolerance",
                            "steps=0.05,evals=0.1", NULL};
    cr_assert_eq(gate_cli(looser), 0, "%s", g.out);
    const char *bad[][2] = {{"--count-tolerance", "stepz=0.05"}, {"--count-tolerance", "steps=-1"},
                            {"--count-tolerance", "steps=0.05,"}, {"--count-tolerance", "steps"}};
    for (int i = 0; i < 4; i++) {
        const char *a[] = {"check", "--baseline", g.base, d, bad[i][0], bad[i][1], NULL};
        cr_assert_eq(gate_cli(a), 2, "%s %s", bad[i][0], bad[i][1]);
        cr_assert(strstr(g.err, "--count-tolerance"), "%s", g.err);
    }
}

/* ---- item 3: absolute requirements ---- */

Test(gate, require_without_baseline_per_case)
{
    /* rk4 at 200 steps per orbit over 5 LEO orbits is metres off, rkf45 at
     * 1e-8 less; the bound between them comes from the run itself */
    char path[300];
    snprintf(path, sizeof path, "%s/summary.json", g.run);
    json_t *s = json_load_file(path, 0, NULL);
    double e4 = json_number_value(json_object_get(json_object_get(gate_case(s, "leo-near-circular", "rk4"), "metrics"), "pos_err_max_m"));
    double e45 = json_number_value(json_object_get(json_object_get(gate_case(s, "leo-near-circular", "rkf45"), "metrics"), "pos_err_max_m"));
    json_decref(s);
    cr_assert(e4 > 0 && e45 > 0 && e4 != e45, "%g %g", e4, e45);
    char req[80], md[300], xml[300];
    snprintf(req, sizeof req, "pos_err_max_m<=%.17g", sqrt(e4 * e45));
    snprintf(md, sizeof md, "%s/req.md", g.dir);
    snprintf(xml, sizeof xml, "%s/req.xml", g.dir);
    const char *a[] = {"check", "--require", req, "--problems", "leo-near-circular", g.run,
                       "--markdown", md, "--junit", xml, NULL};
    cr_assert_eq(gate_cli(a), 1, "%s%s", g.out, g.err);
    const char *worse = e4 > e45 ? "leo-near-circular__rk4" : "leo-near-circular__rkf45";
    const char *better = e4 > e45 ? "leo-near-circular__rkf45" : "leo-near-circular__rk4";
    cr_assert(pbt_line_has(g.out, worse, "pos_err_max_m<=", "UNMET"), "%s", g.out);
    cr_assert(pbt_line_has(g.out, better, "-", "ok"), "%s", g.out);
    cr_assert(!strstr(g.out, "kepler-e0.6"), "filtered out: %s", g.out);
    cr_assert(strstr(g.out, "2 requirements checked: 1 unmet; 2 cases checked"), "%s", g.out);
    char *m = pbt_slurp_file(md, NULL), *x = pbt_slurp_file(xml, NULL);
    cr_assert(m && x);
    cr_assert(strstr(m, "(no baseline)") && strstr(m, "| 1 of 2 |") && strstr(m, "UNMET"), "%s", m);
    cr_assert(strstr(x, "<failure") && strstr(x, "not met"), "%s", x);
    free(m);
    free(x);
}

Test(gate, require_with_baseline_and_energy)
{
    const char *a[] = {"check", "--baseline", g.base, "--require", "energy_rel_max<=1e300",
                       "--require", "evals >= 1", g.run, NULL};
    cr_assert_eq(gate_cli(a), 0, "%s%s", g.out, g.err);
    cr_assert(strstr(g.out, "8 requirements checked: 0 unmet; 4 cases compared"), "%s", g.out);
    const char *b[] = {"check", "--baseline", g.base, "--require", "energy_rel_max<0", g.run, NULL};
    cr_assert_eq(gate_cli(b), 1, "%s", g.out);
}

Test(gate, require_bad_expressions_exit_2)
{
    const char *bad[] = {"pos_err_maxx<=10", "pos_err_max_m=10", "pos_err_max_m<=", "pos_err_max_m<=1e999",
                         "<=10", "pos_err_max_m<=10m"};
    const char *why[] = {"unknown metric 'pos_err_maxx'", "expects METRIC<=VALUE", "not a finite number",
                         "not a finite number", "unknown metric ''", "not a finite number"};
    for (int i = 0; i < 6; i++) {
        const char *a[] = {"check", "--require", bad[i], g.run, NULL};
        cr_assert_eq(gate_cli(a), 2, "%s", bad[i]);
        cr_assert(strstr(g.err, why[i]), "%s: %s", bad[i], g.err);
        cr_assert(strstr(g.err, bad[i]), "names the expression: %s", g.err);
    }
    const char *nomatch[] = {"check", "--require", "steps<=1", "--methods", "rk5", g.run, NULL};
    cr_assert_eq(gate_cli(nomatch), 2);
    cr_assert(strstr(g.err, "no case of method 'rk5'"), "%s", g.err);
    const char *neither[] = {"check", g.run, NULL};
    cr_assert_eq(gate_cli(neither), 2);
    const char *filter_alone[] = {"check", "--baseline", g.base, "--methods", "rk4", g.run, NULL};
    cr_assert_eq(gate_cli(filter_alone), 2);
}

/* ---- item 4: output for CI logs ---- */

static void edit_one_regression(json_t *d)
{
    /* a count that changed decides; a better velocity error on the same
     * case (the only metric that moved) must not be named instead */
    json_t *c = gate_case(d, "kepler-e0.6", "rk4");
    gate_scale(c, "cost", "evals", 1.5);
    gate_scale(c, "metrics", "vel_err_max", 0.5);
}

Test(gate, only_failures_and_the_deciding_item)
{
    const char *d = gate_doctor("one-regression", edit_one_regression);
    const char *a[] = {"check", "--baseline", g.base, d, "--only-failures", NULL};
    cr_assert_eq(gate_cli(a), 1, "%s", g.out);
    /* the table's line (the details say DIFFER nowhere) */
    cr_assert(pbt_line_has(g.out, "kepler-e0.6__rk4", "evals", "DIFFER"), "%s", g.out);
    cr_assert(!strstr(g.out, "rkf45"), "passing cases left out: %s", g.out);
    cr_assert(!pbt_line_has(g.out, "kepler-e0.6__rk4", "vel_err_max", "improved"),
              "improvements left out of the details: %s", g.out);
    /* the summary is the last line */
    const char *last = strrchr(g.out, '\n');
    while (last && last > g.out && last[-1] != '\n')
        last--;
    cr_assert(last && strstr(last, "4 cases compared: 1 regressions") && strstr(last, "FAIL"), "%s", g.out);
    const char *all[] = {"check", "--baseline", g.base, d, NULL};
    cr_assert_eq(gate_cli(all), 1);
    cr_assert(pbt_line_has(g.out, "leo-near-circular__rkf45", "same", "ok"), "%s", g.out);
}

/* ---- item 6: the CI script a team runs (scripts/ci-gate.sh) ---- */

/* exit status of scripts/ci-gate.sh with args, run in PB_ROOT */
static int gate_script(const char *args)
{
    const char *root = getenv("PB_ROOT"), *bin = getenv("PB_BIN");
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "cd '%s' && PB_INCLUDE=include scripts/ci-gate.sh --propbench '%s' "
             "%s >'%s/ci.out' 2>&1", root ? root : ".", bin ? bin : "build/propbench", args, g.dir);
    int st = system(cmd);
    return WIFEXITED(st) ? WEXITSTATUS(st) : -1;
}

Test(gate, ci_script_builds_sweeps_checks_and_publishes)
{
    /* the example plug-in built from source, swept, held to requirements on
     * either side of its measured error (ralston3, 200 steps per orbit, 5
     * orbits of kepler-e0.6), checked against a baseline of its own first run */
    char args[1500], out[300], path[400];
    snprintf(out, sizeof out, "%s/ci", g.dir);
    const char *common = "--plugin-source examples/plugins/ralston3.c --methods ralston3,rk4 "
                         "--problems kepler-e0.6 --steps-per-orbit 200 --orbits 5";
    snprintf(args, sizeof args, "%s --require 'evals>=1' --out '%s'", common, out);
    cr_assert_eq(gate_script(args), 0);
    snprintf(path, sizeof path, "%s/run/summary.json", out);
    json_t *s = json_load_file(path, 0, NULL);
    cr_assert_not_null(s);
    double e = json_number_value(json_object_get(json_object_get(gate_case(s, "kepler-e0.6", "ralston3"), "metrics"), "pos_err_max"));
    json_decref(s);
    char base[300];
    snprintf(base, sizeof base, "%s/ci-base.json", g.dir);
    const char *mk[] = {"baseline", out, "--out", base, NULL};
    char run_dir[320];
    snprintf(run_dir, sizeof run_dir, "%s/run", out);
    mk[1] = run_dir;
    cr_assert_eq(gate_cli(mk), 0, "%s", g.err);
    snprintf(args, sizeof args, "%s --baseline '%s' --require 'pos_err_max<=%.17g' "
             "--out '%s'", common, base, 2 * e, out);
    cr_assert_eq(gate_script(args), 0, "met at twice the error (%s/ci.out)", g.dir);
    snprintf(path, sizeof path, "%s/check.xml", out);
    cr_assert(pbt_exists(path));
    snprintf(path, sizeof path, "%s/check.md", out);
    char *md = pbt_slurp_file(path, NULL);
    cr_assert(md && strstr(md, "PASS") && strstr(md, "0 of 2"), "%s", md);
    free(md);
    snprintf(args, sizeof args, "%s --baseline '%s' --require 'pos_err_max<=%.17g' --out '%s'",
             common, base, 0.5 * e, out);
    cr_assert_eq(gate_script(args), 1, "unmet at half the error");
    cr_assert_eq(gate_script("--suite quick"), 2, "neither a baseline nor a requirement");
    cr_assert_eq(gate_script("--bogus"), 2);
}
