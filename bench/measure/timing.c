/* timing.c - the timing pass of a case: the same integration as the metric
 * pass (or its first TIMING_STEPS steps), with no observer and no metric
 * work, repeated on the thread's CPU clock until enough time is measured;
 * the median time per step and per force evaluation and the spread. */
#include <math.h>
#include <stdlib.h>
#include <time.h>
#include "bench/measure/timing.h"
#include "bench/measure/force_counter.h"
#include "bench/measure/segments.h"

/* The timing pass integrates at most this many steps of the case. */
#define TIMING_STEPS 200000.0

/* CPU time of the calling thread: time the thread was descheduled for
 * (other processes, other workers of a sweep) does not count, which wall
 * time would (wall-clock rk4 gave 107.8 and 241.6 ns/step in two demo runs;
 * `make bench` compares both clocks under load). NaN if the clock is
 * unavailable. */
static double timing_now(void)
{
    struct timespec ts;
    if (clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts))
        return (double)NAN;
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static int timing_cmp_double(const void *a, const void *b)
{
    double d = *(const double *)a - *(const double *)b;
    return (d > 0) - (d < 0);
}

/* The q-quantile of sorted x[0..n), linear between order statistics. */
static double timing_quantile(const double *x, int n, double q)
{
    double pos = q * (double)(n - 1);
    int i = (int)floor(pos);
    if (i >= n - 1)
        return x[n - 1];
    return x[i] + (pos - (double)i) * (x[i + 1] - x[i]);
}

pb_timing_policy pb_timing_policy_for(const pb_case_spec *spec)
{
    pb_timing_policy pol;
    pol.min_repeats = spec->repeats;
    pol.max_repeats = spec->repeats > PB_TIMING_MAX_REPEATS ? spec->repeats : PB_TIMING_MAX_REPEATS;
    pol.min_cpu_s = PB_TIMING_MIN_CPU_S;
    return pol;
}

/* Where the timing pass stops: where the metric pass did (t_end, reached
 * in steps_done steps), or, past TIMING_STEPS steps, the grid point
 * TIMING_STEPS steps in (fixed step) or that share of the time (adaptive). */
static double timing_stop(const pb_case_spec *spec, const pb_method_config *cfg, double t_end,
                          long steps_done)
{
    const pb_problem *p = &spec->problem;
    if ((double)steps_done <= TIMING_STEPS)
        return t_end;
    if (spec->method->flags & PB_KIND_FIXED)
        return p->t0 + TIMING_STEPS * cfg->h;
    return p->t0 + TIMING_STEPS / (double)steps_done * (t_end - p->t0);
}

/* One repeat from t0 to t_stop: its CPU time in *sec, its counts in res.
 * 0, or the status of the failed integration. */
static int timing_once(const pb_case_spec *spec, const pb_method_config *cfg, void *ws,
                       double t_stop, double *sec, pb_case_result *res)
{
    const pb_problem *p = &spec->problem;
    pb_force_counter c;
    pb_force f;
    pb_force_counter_init(&c, p, &f);
    pb_method_stats st;
    double t0 = timing_now();
    int s = pb_case_integrate(spec, cfg, ws, &f, t_stop, NULL, NULL, &st, NULL);
    *sec = timing_now() - t0;
    if (s)
        return s;
    if (!isfinite(*sec))
        return PB_EINVAL;
    res->timing_steps = st.steps + st.startup_steps;
    res->timing_evals = c.evals;
    return 0;
}

/* Medians and spread of the ok repeats' times dt (sorted here). */
static void timing_summarise(double *dt, int ok, double total, pb_case_result *res)
{
    qsort(dt, (size_t)ok, sizeof(double), timing_cmp_double);
    double med = timing_quantile(dt, ok, 0.5);
    double iqr = timing_quantile(dt, ok, 0.75) - timing_quantile(dt, ok, 0.25);
    res->timing_s = med;
    res->ns_per_step = 1e9 * med / (double)res->timing_steps;
    res->ns_per_eval = res->timing_evals > 0 ? 1e9 * med / (double)res->timing_evals : (double)NAN;
    res->ns_per_step_spread = med > 0 ? iqr / med : (double)NAN;
    res->timing_repeats = ok;
    res->timing_cpu_s = total;
}

void pb_case_time_with(const pb_case_spec *spec, const pb_method_config *cfg, double t_end,
                       long steps_done, const pb_timing_policy *pol, pb_case_result *res)
{
    const pb_problem *p = &spec->problem;
    const pb_method_type *m = pb_case_method(spec);
    res->ns_per_step_spread = (double)NAN;
    res->timing_repeats = 0;
    res->timing_cpu_s = 0;
    res->timing_steps = res->timing_evals = 0;
    if (!(t_end - p->t0 > 0) || steps_done <= 0 || pol->min_repeats <= 0 ||
        pol->max_repeats < pol->min_repeats)
        return;
    double t_stop = timing_stop(spec, cfg, t_end, steps_done);
    double *dt = malloc((size_t)pol->max_repeats * sizeof(double));
    void *ws = pb_case_alloc(spec);
    if (!dt || !ws)
        goto done;
    int ok = 0;
    double total = 0;
    while (ok < pol->max_repeats && (ok < pol->min_repeats || total < pol->min_cpu_s)) {
        if (timing_once(spec, cfg, ws, t_stop, &dt[ok], res))
            break;
        total += dt[ok++];
    }
    if (ok > 0 && res->timing_steps > 0)
        timing_summarise(dt, ok, total, res);
done:
    if (ws)
        m->free(ws);
    free(dt);
}

void pb_case_time(const pb_case_spec *spec, const pb_method_config *cfg, double t_end,
                  long steps_done, pb_case_result *res)
{
    pb_timing_policy pol = pb_timing_policy_for(spec);
    pb_case_time_with(spec, cfg, t_end, steps_done, &pol, res);
}
