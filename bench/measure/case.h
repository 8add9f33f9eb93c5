/* case.h - one case (problem, method, step or tolerance, horizon) and what a
 * run of it yields: per-sample metrics and the case summary. */
#ifndef PB_CASE_H
#define PB_CASE_H

#include "integrators/method.h"

#define PB_CASE_ID_MAX 160

/* The longest horizon: 1e8 periods (the problem's, or without one the time
 * to cross its starting distance at its starting speed), as --orbits. */
#define PB_CASE_PERIODS_MAX 1e8
/* The tightest tolerance: 1e-20, four decades below double's unit
 * round-off (2^-53 = 1.1e-16), where a tighter one only asks the step
 * control for round-off: on kepler-e0.6, rkf45 at 1e-30 stops at the
 * minimum step on its first step, and at 2.5e-308 (atol near DBL_MIN) the
 * error ratio err/tol overflows and the state goes non-finite. */
#define PB_CASE_TOLERANCE_MIN 1e-20

typedef struct pb_case_spec {
    pb_problem problem;             /* copied */
    const pb_method_type *method;   /* borrowed from the method table */
    int steps_per_orbit;            /* fixed-step methods (0 when step_s is given) */
    double step_s;                  /* explicit step in time units (0: from steps_per_orbit) */
    double tolerance;               /* adaptive methods: rtol = atol = tolerance (scaled) */
    double orbits;                  /* horizon in periods (problems with a period) */
    double horizon_s;               /* horizon in time units (used when orbits == 0) */
    int compensated;
    int repeats;                    /* timing repeats (0: no timing pass) */
    double timing_min_cpu_s;        /* the timing pass's least CPU time (0: PB_TIMING_MIN_CPU_S) */
    int timing_uncalibrated;        /* 1: no calibration kernel after the repeats, for a
                                     * caller that never states a step in kernel units
                                     * (select): calib_ns, step_kernel_ratio stay NaN */
    double eval_cost_us;            /* user's cost of one force evaluation (0: none) */
    int linear_samples;             /* extra linear grid points for plots */
    long max_steps;                 /* 0: automatic budget */
    const char *cache_dir;          /* reference trajectories (may be NULL) */
    /* explicit sample times (absolute, increasing, all in the metric grid,
     * none on the log grid), used instead of the planned grid when set
     * (borrowed; `score` samples at an ephemeris's own epochs) */
    const double *sample_times;
    int nsample_times;
    /* called from the metric pass every 65536 steps with the share of the
     * horizon done and the steps so far (NULL: none); `run`'s progress line */
    void (*progress)(void *ctx, double done, long steps);
    void *progress_ctx;
} pb_case_spec;

/* The record that drives the case's workspace: the method itself, or, for
 * a regularised formulation (spec->problem.formulation), the adapter around
 * it (integrators/formulation.h); and that workspace (owner: the caller,
 * released with the record's free; NULL when memory runs out or the method
 * refuses the regularised state's dimension). */
const pb_method_type *pb_case_method(const pb_case_spec *spec);
void *pb_case_alloc(const pb_case_spec *spec);

/* One sample: errors against truth at time t; window maxima are the largest
 * invariant errors over every step since the previous sample. */
typedef struct pb_sample {
    double t, orbits;
    int on_log_grid;          /* 1: a log-spaced whole-period sample (used by the fits) */
    int in_metrics;           /* 1: on the metric grid (maxima, finals, fits); 0: plot only */
    double energy_rel, energy_rel_window;
    double angmom_rel, angmom_rel_window;
    double energy_rel_fitwin, angmom_rel_fitwin; /* log-grid samples: largest error over
                                                  * every step since the previous log-grid
                                                  * sample (NaN elsewhere): what the growth
                                                  * fits use, whatever the plot grid */
    double ecc_drift;         /* |e_num - e_true| */
    double apsis_angle;       /* rad, e_num's angle from e_true about h_true,
                               * unwrapped over the samples (may pass +-pi) */
    double pos_err, vel_err;  /* |dr|, |dv| in problem units */
    double radial, along, cross;  /* dr in the true orbit's RIC frame (signed) */
    double truth_floor;       /* estimated position error of the truth itself */
    double r[PB_DIM_MAX], v[PB_DIM_MAX];    /* the method's state at t (dense output) */
    double rt[PB_DIM_MAX], vt[PB_DIM_MAX];  /* the truth at t, rounded to double */
} pb_sample;

typedef struct pb_growth {
    double k, k_err;          /* slope of log(err) on log(t) and its standard error */
    int npoints;
    const char *cls;          /* "bounded", "sqrt", "linear", "quadratic", "other" */
    double from;              /* the fit used samples from this time on (10 periods, or 1
                               * when fewer than 3 samples lie past 10) */
} pb_growth;

typedef struct pb_case_result {
    char id[PB_CASE_ID_MAX];
    int status;               /* pb_status of the metric pass */
    const char *status_name;  /* "ok", "diverged", "max_steps", "crashed" */
    double t_end;             /* time actually reached */
    double t_final;           /* time of the "final" values: the horizon, or for a run
                               * that stopped early its last metric sample before t_end */
    double diverged_at;       /* time of failure (status != ok) */
    double h;                 /* step used (fixed-step) */
    int nsamples;
    pb_sample *samples;       /* owned */
    /* summary */
    double energy_rel_max, energy_rel_final;
    int energy_rel_to_parts; /* 1: relative to v0^2/2 + mu/r0, not |E0| (pb_energy_scale) */
    double angmom_rel_max, angmom_rel_final;
    double pos_err_max, pos_err_final, vel_err_max, vel_err_final;
    double radial_final, along_final, cross_final;
    double ecc_drift_max, apsidal_rate;   /* rad per orbit (NaN if undefined) */
    int below_floor;          /* position errors below 10x the reference floor */
    int saturated;            /* position error beyond a tenth of the orbit's size:
                               * the numbers describe another orbit */
    const char *status_detail;  /* why the run ended (static text) */
    double truth_floor_max;
    pb_growth g_pos, g_along, g_energy, g_angmom;
    long steps, evals, rejected, startup_steps;
    long output_cut; /* adaptive steps shortened to land on a sample time */
    double ns_per_step, ns_per_eval, timing_s;
    double projected_s;       /* evals x eval_cost_us (0 if no cost given) */
    char fingerprint[40];
    double final_r[PB_DIM_MAX], final_v[PB_DIM_MAX];
    /* the timing pass (timing.h; thread CPU time): the spread of its repeats'
     * times, (q75 - q25) / median (NaN when not timed), how many repeats it
     * made (0: none), the CPU time they took together, and the steps and
     * force evaluations of one repeat (those of the metric pass unless the
     * case was cut to the pass's first 200000 steps) */
    double ns_per_step_spread;
    /* the calibration kernel beside the repeats (timing.h): ns per chunk and
     * a step's time in chunks, medians (NaN when not timed) */
    double calib_ns, step_kernel_ratio;
    int timing_repeats;
    double timing_cpu_s;
    long timing_steps, timing_evals;
} pb_case_result;

#endif
