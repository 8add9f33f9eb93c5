/* bench.h - what the parts of `make bench` share: the settings of the
 * measured cases, the clock, medians, and timed jobs that run a method (or
 * GSL's rk4 in a plain loop) round after round. Reporting only: nothing in
 * bench/perf/ asserts a timing. */
#ifndef PB_BENCH_H
#define PB_BENCH_H

#include <math.h>
#include <time.h>
#include "bench/measure/harness.h"

#define BENCH_REPEATS 7         /* timed repeats after one warm-up */
#define BENCH_PROBLEM "kepler-e0.5"
#define BENCH_ORBITS 100.0      /* horizon of the per-method table */
#define BENCH_SPO 1000          /* fixed-step methods: steps per orbit */
#define BENCH_TOL 1e-10         /* adaptive methods: rtol = atol */
#define BENCH_OH_ORBITS 50.0    /* overhead case: 5e4 steps a round, all in the timing pass */
#define BENCH_OH_ROUNDS 31
#define BENCH_OVERHEAD_GOAL 10.0  /* percent */
#define BENCH_MEMORY_GOAL 5.0     /* percent */
#define BENCH_LOAD_RERUNS 5       /* reruns of the timing pass under load */
#define BENCH_LOAD_ORBITS 100.0   /* 1e5 steps a repeat (some ms, longer than a time slice) */
#define BENCH_LOAD_GOAL 10.0      /* percent: (max - min) / median over the reruns */
#define BENCH_GJ_FLOOR_GOAL 2.0   /* gauss-jackson8: x its one-evaluation floor a step */
#define BENCH_LF_HAND_GOAL 1.15   /* leapfrog: x a hand loop calling the force by pointer */

/* Inline, so that reading the clock costs the same in every part. Wall
 * time, for what a user waits (the whole bench, a forked child's run). */
static inline double bench_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* CPU time of the calling thread, the timing pass's clock (timing.c): every
 * loop timed in this process uses it, so they compare with the pass. */
static inline double bench_cpu_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

/* The two-body acceleration written out, for the hand-written loops and the
 * GSL right-hand side: the same arithmetic as the problem's own force, so
 * their results agree with the harness's to the last bit. */
#define BENCH_KEPLER(mu, x, y, z, ax, ay, az)                                   \
    do {                                                                        \
        double r2_ = (x) * (x) + (y) * (y) + (z) * (z), rn_ = sqrt(r2_);        \
        double k_ = -(mu) / (r2_ * rn_);                                        \
        ax = k_ * (x);                                                          \
        ay = k_ * (y);                                                          \
        az = k_ * (z);                                                          \
    } while (0)

typedef struct bench_timing {
    int status;
    long steps, evals, rejected;
    double sec;          /* median thread CPU time of one run */
    double pos_err;      /* at t_end */
    double r[PB_DIM_MAX], v[PB_DIM_MAX];
} bench_timing;

/* One timed thing: a method driven directly (start + advance through the
 * counting force wrapper, no observer; alloc outside the clock), or, with
 * m == NULL, GSL's rk4 stepper in a plain loop. */
typedef struct bench_job {
    const pb_method_type *m;
    pb_method_config cfg;
    double t_end;
    long nsteps;             /* plain GSL loop */
    void *ws;
    double dt[BENCH_REPEATS];
    bench_timing out;
} bench_job;

/* Median of x[0..n) (sorts x). */
double bench_median(double *x, int n);
double bench_min(const double *x, int n);
/* Nanoseconds per item, or NaN when there is nothing to divide. */
double bench_ns(double sec, long n);
/* |r - r_exact(t)| with the exact solution in __float128. */
double bench_pos_err(const pb_problem *p, double t, const double *r);
/* The harness's configuration for a fixed step h or an adaptive tolerance
 * (the same settings harness.c gives a case). */
void bench_config(const pb_method_type *m, const pb_problem *p, double h, double tol,
                  pb_method_config *cfg);
/* Run every job once per round, round after round (so a burst of load from
 * other processes hits all of them alike); round -1 is the warm-up. Fills
 * each job's median time, counts and final error. */
void bench_jobs_run(bench_job *jobs, int n, const pb_problem *p);
/* One round of a job with m == NULL (bench_gsl.c); k < 0 is the warm-up. */
void bench_gsl_plain_once(bench_job *j, const pb_problem *p, int k);

/* The four sections of the report, in the order main prints them. */
void bench_methods(const pb_problem *p, double *rk4_ns_step);
void bench_rk4_vs_gsl(const pb_problem *p);
int bench_overhead(const pb_problem *p, double *timing_pct, double *timing_min_pct,
                   double *direct_pct, double *direct_min_pct);
int bench_memory(double *diff_pct);
int bench_load(const pb_problem *p, double *worst_spread_pct);

/* bench_reference.c: reference builds with mission-like forces; the
 * slowest build's CPU seconds into *worst_s. 0, or -1 when a build failed. */
int bench_reference(double *worst_s);

/* bench_precision.c: evaluations of each adaptive method to a 1e-9 position
 * error on p; and the share of each job's time per step beyond the force. */
void bench_precision(const pb_problem *p);
void bench_overhead_beyond_force(const pb_problem *p, const bench_job *jobs, int n);

/* bench_hotpaths.c: gauss-jackson8 against its one-evaluation floor and
 * leapfrog against a hand loop calling the force through a pointer (median
 * ratios into *gj_x, *lf_x). 0, or -1 when a run failed. */
int bench_hotpaths(const pb_problem *p, double *gj_x, double *lf_x);

/* Section 8: select on leo-j2 (cold and warm) and kepler-e0.5, and the
 * standard suite without timing, as run by build/propbench: CPU seconds
 * of each (NaN when it failed); -1 when it could not run at all. */
#define BENCH_SELECT_LEO_COLD_GOAL 1.5   /* s of CPU: issue 16 */
#define BENCH_SELECT_LEO_WARM_GOAL 0.3
#define BENCH_SELECT_K05_GOAL 0.5
#define BENCH_SUITE_GOAL 20.0
int bench_study(double *leo_cold, double *leo_warm, double *k05, double *suite_warm);

#endif
