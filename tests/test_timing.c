/* test_timing.c - the timing pass (bench/measure/timing.c): when it stops,
 * what it counts, what summary.json says about it. Machines are noisy, so
 * nothing here asserts a time or a speed: only the stop rule, the counts,
 * the keys and their types, and that timing leaves the metrics alone. */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "bench/measure/harness.h"
#include "bench/measure/timing.h"
#include "bench/store/case_json.h"
#include "problems/catalogue.h"

/* kepler-e0.5 (built in, exact solution: no reference trajectory) with a
 * fixed-step method at spo steps per orbit, or an adaptive one at tol. */
static pb_case_spec timing_spec(const char *method, int spo, double tol, double orbits, int repeats)
{
    pb_case_spec spec;
    pb_case_spec_default(&spec);
    cr_assert_eq(pb_problem_lookup("kepler-e0.5", &spec.problem), PB_OK);
    spec.method = pb_method_find(method);
    cr_assert_not_null(spec.method, "method %s", method);
    spec.steps_per_orbit = spo;
    spec.tolerance = tol;
    spec.orbits = orbits;
    spec.repeats = repeats;
    spec.cache_dir = NULL;
    return spec;
}

static void timing_run(const pb_case_spec *spec, pb_case_result *res)
{
    cr_assert_eq(pb_case_run(spec, res), PB_OK, "%s", spec->method->name);
    cr_assert_eq(res->status, PB_OK, "%s: %s", spec->method->name, res->status_name);
}

/* What every timed case shows: at least the repeats asked for, no more than
 * the cap, stopped by the cap or by the CPU-time floor, finite positive
 * medians and a finite non-negative spread. */
static void assert_timed(const pb_case_spec *spec, const pb_case_result *res)
{
    int cap = spec->repeats > PB_TIMING_MAX_REPEATS ? spec->repeats : PB_TIMING_MAX_REPEATS;
    cr_assert_geq(res->timing_repeats, spec->repeats);
    cr_assert_leq(res->timing_repeats, cap);
    cr_assert(res->timing_repeats == cap || res->timing_cpu_s >= PB_TIMING_MIN_CPU_S,
              "stopped after %d repeats and %g s", res->timing_repeats, res->timing_cpu_s);
    cr_assert(isfinite(res->ns_per_step) && res->ns_per_step > 0, "ns_per_step %g", res->ns_per_step);
    cr_assert(isfinite(res->ns_per_eval) && res->ns_per_eval > 0, "ns_per_eval %g", res->ns_per_eval);
    cr_assert(isfinite(res->ns_per_step_spread) && res->ns_per_step_spread >= 0,
              "spread %g", res->ns_per_step_spread);
    /* one median time divided by each count (identity, to rounding) */
    double a = res->ns_per_step * (double)res->timing_steps;
    double b = res->ns_per_eval * (double)res->timing_evals;
    cr_assert(fabs(a - b) <= 1e-12 * a, "%g vs %g", a, b);
}

/* A fixed-step method at 200 steps per orbit or an adaptive one at 1e-8,
 * over 5 orbits, timed for 3 repeats. */
static pb_case_spec timing_spec_either(const char *method)
{
    pb_case_spec spec = timing_spec(method, 200, 1e-8, 5, 3);
    if (spec.method->flags & PB_KIND_FIXED)
        spec.tolerance = 0;
    else
        spec.steps_per_orbit = 0;
    return spec;
}

/* The timing pass integrates the case the metric pass did (one advance to
 * its end; samples come from dense output), so it counts the metric pass's
 * steps and evaluations: fixed-step methods (Gauss-Jackson with start-up
 * steps), ours and GSL's adaptive ones, and a multistep one. */
Test(timing, counts_are_those_of_the_metric_pass)
{
    const char *methods[] = {"rk4", "leapfrog", "gauss-jackson8", "rkf45", "gsl-rk8pd", "gsl-msadams"};
    for (int i = 0; i < 6; i++) {
        pb_case_spec spec = timing_spec_either(methods[i]);
        pb_case_result res;
        timing_run(&spec, &res);
        assert_timed(&spec, &res);
        cr_assert_eq(res.timing_steps, res.steps + res.startup_steps, "%s", methods[i]);
        cr_assert_eq(res.timing_evals, res.evals, "%s", methods[i]);
        pb_case_result_free(&res);
    }
}

/* The timing pass alone (pb_case_time_only, what select uses for an answer
 * whose metric run it already has) integrates what pb_case_run's timing pass
 * does: the same counts, for fixed-step, adaptive and multistep methods. */
Test(timing, time_only_counts_what_the_full_run_times)
{
    const char *methods[] = {"rk4", "gauss-jackson8", "rkf45", "gsl-msadams"};
    for (int i = 0; i < 4; i++) {
        pb_case_spec spec = timing_spec_either(methods[i]);
        pb_case_result res, alone;
        timing_run(&spec, &res);
        memset(&alone, 0, sizeof alone);
        cr_assert_eq(pb_case_time_only(&spec, res.steps + res.startup_steps, &alone), PB_OK);
        assert_timed(&spec, &alone);
        cr_assert_eq(alone.timing_steps, res.timing_steps, "%s", methods[i]);
        cr_assert_eq(alone.timing_evals, res.timing_evals, "%s", methods[i]);
        pb_case_result_free(&res);
    }
    pb_case_spec bad = timing_spec("rk4", 0, 0, 5, 3);
    pb_case_result r;
    memset(&r, 0, sizeof r);
    cr_assert_eq(pb_case_time_only(&bad, 1000, &r), PB_EINVAL, "no step: a bad spec");
}

/* A case longer than the timing pass's 200000 steps is timed over its
 * first 200000 (timing.c's TIMING_STEPS), on the step grid: the counts of
 * the metric pass of the 200000-step case. */
Test(timing, long_case_is_cut_to_its_first_200000_steps)
{
    pb_case_spec spec = timing_spec("rk4", 1000, 0, 300, 1);
    pb_case_spec first = timing_spec("rk4", 1000, 0, 200, 0);
    pb_case_result res, ref;
    timing_run(&spec, &res);
    timing_run(&first, &ref);
    cr_assert_eq(res.steps, 300000);
    cr_assert_eq(ref.steps, 200000);
    assert_timed(&spec, &res);
    cr_assert_eq(res.timing_steps, ref.steps + ref.startup_steps);
    cr_assert_eq(res.timing_evals, ref.evals);
    pb_case_result_free(&res);
    pb_case_result_free(&ref);
}

/* repeats == 0: no timing pass at all, NaN medians and spread, and the
 * summary says so with nulls; the metrics are those of a timed run. */
Test(timing, no_pass_when_repeats_is_zero)
{
    pb_case_spec spec0 = timing_spec("rk4", 200, 0, 5, 0), spec3 = spec0;
    spec3.repeats = 3;
    pb_case_result r0, r3;
    timing_run(&spec0, &r0);
    timing_run(&spec3, &r3);
    cr_assert_eq(r0.timing_repeats, 0);
    cr_assert(isnan(r0.ns_per_step) && isnan(r0.ns_per_eval) && isnan(r0.ns_per_step_spread));
    cr_assert_eq(r0.timing_steps, 0);
    /* timing does not touch the metric pass: same fingerprint, same bits */
    cr_assert_str_eq(r0.fingerprint, r3.fingerprint);
    cr_assert_eq(memcmp(r0.final_r, r3.final_r, sizeof r0.final_r), 0);
    cr_assert_eq(r0.pos_err_max, r3.pos_err_max);
    cr_assert_eq(r0.energy_rel_max, r3.energy_rel_max);
    json_t *o = pb_case_to_json(&spec0, &r0);
    json_t *c = json_object_get(o, "cost");
    cr_assert(json_is_null(json_object_get(c, "ns_per_step")));
    cr_assert(json_is_null(json_object_get(c, "ns_per_step_spread")));
    cr_assert(json_is_integer(json_object_get(c, "timing_repeats")));
    cr_assert_eq(json_integer_value(json_object_get(c, "timing_repeats")), 0);
    cr_assert(json_is_null(json_object_get(c, "timing_clock")));
    json_decref(o);
    pb_case_result_free(&r0);
    pb_case_result_free(&r3);
}

/* A timed case's "cost": the old keys as before, the new ones typed. */
Test(timing, summary_keys_and_types)
{
    pb_case_spec spec = timing_spec("rk4", 200, 0, 5, 3);
    pb_case_result res;
    timing_run(&spec, &res);
    json_t *o = pb_case_to_json(&spec, &res);
    json_t *c = json_object_get(o, "cost");
    cr_assert(json_is_object(c));
    cr_assert_eq(json_integer_value(json_object_get(c, "steps")), res.steps);
    cr_assert_eq(json_integer_value(json_object_get(c, "evals")), res.evals);
    cr_assert(json_is_real(json_object_get(c, "ns_per_step")));
    cr_assert_eq(json_real_value(json_object_get(c, "ns_per_step")), res.ns_per_step);
    cr_assert(json_is_real(json_object_get(c, "ns_per_eval")));
    json_t *sp = json_object_get(c, "ns_per_step_spread");
    cr_assert(json_is_real(sp));
    cr_assert(isfinite(json_real_value(sp)) && json_real_value(sp) >= 0);
    json_t *n = json_object_get(c, "timing_repeats");
    cr_assert(json_is_integer(n));
    cr_assert_eq(json_integer_value(n), res.timing_repeats);
    cr_assert_geq(json_integer_value(n), 3);
    cr_assert_str_eq(json_string_value(json_object_get(c, "timing_clock")), "thread-cpu");
    json_decref(o);
    pb_case_result_free(&res);
}

/* The policy of a spec: its repeats as the floor; the cap never below them. */
Test(timing, policy_of_a_spec)
{
    pb_case_spec spec = timing_spec("rk4", 200, 0, 5, 3);
    pb_timing_policy pol = pb_timing_policy_for(&spec);
    cr_assert_eq(pol.min_repeats, 3);
    cr_assert_eq(pol.max_repeats, PB_TIMING_MAX_REPEATS);
    cr_assert_eq(pol.min_cpu_s, PB_TIMING_MIN_CPU_S);
    cr_assert_eq(pol.calibrate, 1);
    spec.repeats = PB_TIMING_MAX_REPEATS + 500;
    spec.timing_uncalibrated = 1;
    pol = pb_timing_policy_for(&spec);
    cr_assert_eq(pol.min_repeats, PB_TIMING_MAX_REPEATS + 500);
    cr_assert_eq(pol.max_repeats, PB_TIMING_MAX_REPEATS + 500);
    cr_assert_eq(pol.calibrate, 0);
}

/* pb_case_time_with on one orbit of rk4 at T/100, as the harness sets a
 * fixed-step case up (h, the period as time scale). */
static void time_one_orbit(const pb_timing_policy *pol, pb_case_result *res)
{
    pb_case_spec spec = timing_spec("rk4", 100, 0, 1, 1);
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = spec.problem.period / 100;
    cfg.time_scale = spec.problem.period;
    memset(res, 0, sizeof *res);
    res->ns_per_step = res->ns_per_eval = (double)NAN;
    pb_case_time_with(&spec, &cfg, spec.problem.t0 + 100 * cfg.h, 100, pol, res);
}

/* The calibration kernel runs only when the policy asks: with it, the
 * kernel's ns a chunk and a step's time in chunks are measured; without
 * it (select's answers) both stay NaN and the step's own time is kept. */
Test(timing, kernel_only_when_asked)
{
    pb_case_result res;
    pb_timing_policy with = {3, 3, 0, 1}, without = {3, 3, 0, 0};
    time_one_orbit(&with, &res);
    cr_assert_eq(res.timing_repeats, 3);
    cr_assert(res.calib_ns > 0 && res.step_kernel_ratio > 0, "calib_ns %g, ratio %g", res.calib_ns,
              res.step_kernel_ratio);
    time_one_orbit(&without, &res);
    cr_assert_eq(res.timing_repeats, 3);
    cr_assert(res.ns_per_step > 0);
    cr_assert(isnan(res.calib_ns) && isnan(res.step_kernel_ratio));
}

/* The stop rule without the clock's say: an unreachable CPU-time floor
 * stops at the cap, a zero floor at the minimum, exactly. Each repeat
 * counts what the metric pass of the same case does. */
Test(timing, stop_rule_cap_and_floor)
{
    pb_case_spec spec = timing_spec("rk4", 100, 0, 1, 0);
    pb_case_result ref, res;
    timing_run(&spec, &ref);
    cr_assert_eq(ref.steps, 100);
    pb_timing_policy unreachable = {2, 7, 1e9, 1};
    time_one_orbit(&unreachable, &res);
    cr_assert_eq(res.timing_repeats, 7);
    cr_assert_eq(res.timing_steps, ref.steps + ref.startup_steps);
    cr_assert_eq(res.timing_evals, ref.evals);
    pb_case_result_free(&ref);
    cr_assert(isfinite(res.ns_per_step_spread) && res.ns_per_step_spread >= 0);
    pb_timing_policy no_floor = {4, 1000, 0, 1};
    time_one_orbit(&no_floor, &res);
    cr_assert_eq(res.timing_repeats, 4);
    cr_assert(isfinite(res.ns_per_step) && res.ns_per_step > 0);
    pb_timing_policy one = {1, 1, 0, 1};
    time_one_orbit(&one, &res);
    cr_assert_eq(res.timing_repeats, 1);
    cr_assert_eq(res.ns_per_step_spread, 0); /* one repeat: no spread */
    pb_timing_policy none = {0, 1000, 0.2, 1};
    time_one_orbit(&none, &res);
    cr_assert_eq(res.timing_repeats, 0);
    cr_assert(isnan(res.ns_per_step) && isnan(res.ns_per_step_spread));
}
