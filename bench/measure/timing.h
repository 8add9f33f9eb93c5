/* timing.h - the timing pass of a case, apart from its metric pass: thread
 * CPU time, repeated until enough time has been measured. */
#ifndef PB_TIMING_H
#define PB_TIMING_H

#include "bench/measure/case.h"

/* Repeats go on until at least this much thread CPU time is measured in
 * total, and at least spec->repeats are done. 0.2 s is tens of repeats
 * even for a case of a few ms a repeat, so one disturbed repeat moves the
 * median little (measured under load in `make bench`). It costs every
 * timed case up to 0.2 s: the 48-case quick suite took 5 to 10 s instead
 * of 0.3 s with two workers. */
#define PB_TIMING_MIN_CPU_S 0.2
/* ...but no more than this many repeats (or spec->repeats, if larger; the
 * CLI allows up to 1000): a case of a few microseconds a repeat stops here
 * instead of running 10^5 repeats to fill PB_TIMING_MIN_CPU_S, and 1000 are
 * plenty for a median. A long case is bounded anyway: each repeat
 * integrates at most 200000 steps, and no repeat starts once spec->repeats
 * are done and PB_TIMING_MIN_CPU_S is reached. */
#define PB_TIMING_MAX_REPEATS 1000

/* The calibration kernel timed after every repeat of a case (timing.c):
 * its name as summary.json gives it (a fixed case: rk4 on leo-near-circular
 * at 100 steps per orbit, 100 steps a chunk), and at most this many of its
 * chunks after one repeat. */
#define PB_CALIB_KERNEL "rk4-leo-near-circular-100x100"
#define PB_CALIB_MAX_CHUNKS 20000L

/* The name of the clock, as summary.json's "timing_clock" gives it. */
#define PB_TIMING_CLOCK "thread-cpu"

/* When the timing pass stops: after min_repeats repeats once min_cpu_s of
 * CPU time has been measured, or after max_repeats (>= min_repeats). */
typedef struct pb_timing_policy {
    int min_repeats, max_repeats;
    double min_cpu_s;
    int calibrate;       /* 1: time the calibration kernel after each repeat */
} pb_timing_policy;

/* The policy pb_case_time uses for spec: spec->repeats,
 * max(spec->repeats, PB_TIMING_MAX_REPEATS), spec->timing_min_cpu_s or
 * PB_TIMING_MIN_CPU_S, and the kernel unless spec->timing_uncalibrated. */
pb_timing_policy pb_timing_policy_for(const pb_case_spec *spec);

/* Time spec's integration from t0 towards t_end (the metric pass reached
 * t_end in steps_done steps) with cfg, no observer, on the calling thread's
 * CPU clock, under pol. Sets res->ns_per_step, ns_per_eval, timing_s (the
 * medians over repeats), ns_per_step_spread (the repeats' interquartile
 * range over their median), timing_repeats, timing_cpu_s, timing_steps and
 * timing_evals, and from the calibration kernel timed after each repeat,
 * calib_ns (the median ns of one chunk) and step_kernel_ratio (the median
 * over repeats of a step's time over a chunk's time just after it); with
 * nothing timed (pol->min_repeats <= 0, nothing to
 * integrate, or a failure) the spread is NaN, timing_repeats 0 and the
 * medians are left as they are. */
void pb_case_time_with(const pb_case_spec *spec, const pb_method_config *cfg, double t_end,
                       long steps_done, const pb_timing_policy *pol, pb_case_result *res);

/* pb_case_time_with under pb_timing_policy_for(spec); spec->repeats == 0
 * times nothing. */
void pb_case_time(const pb_case_spec *spec, const pb_method_config *cfg, double t_end,
                  long steps_done, pb_case_result *res);

#endif
