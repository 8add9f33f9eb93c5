/* harness.h - drive one method on one problem: sample, measure, time. */
#ifndef PB_HARNESS_H
#define PB_HARNESS_H

#include "bench/measure/case.h"

/* The settings every case starts from, for run, select, sweep, the suites
 * and the public driver alike: 3 timing repeats (the median of three ignores
 * one outlier), 100 linear samples, automatic step budget, reference
 * trajectories cached in pb_cache_dir_default() (PB_CACHE_DIR, else the
 * user's XDG cache folder); the rest (problem, method,
 * step or tolerance, horizon, cost) is zero for the caller to fill. */
void pb_case_spec_default(pb_case_spec *spec);

/* Check a spec before running it (method and problem compatible, step or
 * tolerance and horizon sensible). Returns 0 or -1 with a message in err. */
int pb_case_validate(const pb_case_spec *spec, char *err, size_t errlen);

/* The case's identifier, e.g. "kepler-e0.6__rk4__n1000" (file-name safe). */
void pb_case_id(const pb_case_spec *spec, char *out, size_t outlen);

/* Horizon in time units. */
double pb_case_horizon(const pb_case_spec *spec);
/* Time scale that "steps per orbit" divides: the period, or the horizon. */
double pb_case_scale(const pb_case_spec *spec);
/* A fixed-step case's step in time units (0 when none is given). */
double pb_case_step(const pb_case_spec *spec);

/* Steps a fixed-step case takes to its horizon, or to its --max-steps if
 * that comes first (0 for an adaptive method, whose count is known only
 * after the run). */
double pb_case_fixed_steps(const pb_case_spec *spec);

/* Run the case: a metric pass (errors at every sample, invariant maxima over
 * every step) then, if spec->repeats > 0, a separate timing pass with no
 * metric work. The result's status says how the integration ended; the
 * return value is 0, or a pb_status when the case could not be set up (bad
 * spec, no memory, truth failed). Owner: the caller frees with
 * pb_case_result_free; spec is borrowed. */
int pb_case_run(const pb_case_spec *spec, pb_case_result *res);
/* Build the exact truth spec's run will compare against, so that the
 * process (and the workers it forks after) finds it in truth.c's memo;
 * nothing for a problem without an exact solution, or a case whose sample
 * times depend on its run (a step limit). Cheap to call for every case of
 * a sweep: cases that share a problem, horizon and samples share one. */
void pb_case_truth_warm(const pb_case_spec *spec);
void pb_case_result_free(pb_case_result *res);

/* The timing pass alone of a case whose metric pass already ran and took
 * steps_done steps (its steps and start-up steps): fills res's timing
 * fields (ns_per_step, ns_per_eval, timing_*), nothing else. A run is
 * deterministic, so this times what pb_case_run would have timed. 0, or
 * PB_EINVAL for a bad spec. */
int pb_case_time_only(const pb_case_spec *spec, long steps_done, pb_case_result *res);

/* "ok", "diverged", "max_steps" or "crashed" for a pb_status of an integration. */
const char *pb_case_status_name(int status);

#endif
