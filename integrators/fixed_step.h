/* fixed_step.h - the one advance loop of the fixed-step methods (rk4, the
 * leapfrog family, gsl-rk4, Gauss-Jackson): the grid t0 + n*h, the step
 * budget, the observer and the failure bookkeeping around a method's own
 * "one step from index n". Internal to integrators/. */
#ifndef PB_FIXED_STEP_H
#define PB_FIXED_STEP_H

#include "integrators/method.h"

/* A method's one-step function is inlined into a 3-dimensional and a
 * general call (PB_STEP_INLINE; gcc otherwise keeps one out-of-line copy
 * with the dimension unknown), and its loops over the components unroll
 * (PB_UNROLL_COMPONENTS; gcc -O2 keeps a 3-trip loop of several statements
 * as a loop). Unrolling changes no arithmetic: the same bits (as long as
 * the compiler fuses no multiply-add, which the project's -std=c11 asks of
 * gcc; clang with -march=native would, before and after alike). */
#define PB_STEP_INLINE inline __attribute__((always_inline))
#define PB_UNROLL_COMPONENTS _Pragma("GCC unroll 6")

/* One step of a method from grid index n, at time t = t0 + n*h, to the grid
 * time t1 = t0 + (n+1)*h on which it must end. On success (PB_OK) the method
 * has committed the new state where the grid's r and v point. On failure it
 * returns a non-zero pb_status (PB_ENONFINITE for a non-finite new state)
 * and leaves the state of index n in place. A method with a lazy start
 * (first force, multistep start-up) does it in here: it is only called when
 * a step is due. */
typedef int (*pb_fixed_step_fn)(void *ctx, long n, double t, double t1);

/* A fixed-step method's position on its grid. Time is always t0 + n*h from
 * the integer index, never a running sum of h, so the clock carries no
 * round-off over millions of steps and a caller's t_out is found again. */
typedef struct pb_fixed_grid {
    double t0, h;          /* the grid: t_n = t0 + n*h */
    long n;                /* grid index of the current state */
    long max_steps;        /* budget of steps since start (0: unlimited) */
    const double *r, *v;   /* the method's committed state, as the observer sees it */
    pb_method_stats *st;   /* the method's counters: steps counted, t_fail set here */
} pb_fixed_grid;

/* Put g at index 0 of the grid t0 + n*h (h > 0 and finite: the method's start
 * checks it). r, v and st are borrowed from the method's workspace, which
 * outlives g; st->steps and st->t_fail are the method's own, reset by it. */
void pb_fixed_grid_init(pb_fixed_grid *g, double t0, double h, long max_steps,
                        const double *r, const double *v, pb_method_stats *st);

/* The time of grid index n: t0 + n*h, the one expression every fixed-step
 * method uses, so that every caller gets the same bits. */
static inline double pb_fixed_grid_time(const pb_fixed_grid *g, long n)
{
    return g->t0 + (double)n * g->h;
}

/* Step with `step` (ctx passed on) until the grid time t_out. PB_EINVAL,
 * before any step, when t_out is off the grid or behind the current state.
 * Before each step: PB_EMAXSTEPS once st->steps has reached max_steps. A
 * failing step: its status, with st->t_fail the time of the state kept.
 * After each step obs (may be NULL) sees (t1, r, v); its non-zero return
 * stops the loop and is returned. PB_OK on reaching t_out. */
int pb_fixed_grid_advance(pb_fixed_grid *g, double t_out, pb_fixed_step_fn step, void *ctx,
                          pb_step_observer obs, void *obs_ctx);

#endif
