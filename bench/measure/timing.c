/* timing.c - the timing pass of a case: the same integration as the metric
 * pass (or its first TIMING_STEPS steps), with no observer and no metric
 * work, repeated on the thread's CPU clock until enough time is measured;
 * the median time per step and per force evaluation and the spread. Each
 * repeat is followed by a fixed calibration kernel on the same thread, so
 * a step's time can be stated in kernel units, which a loaded or slower
 * machine changes far less than it changes nanoseconds. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include "bench/measure/timing.h"
#include "bench/measure/force_counter.h"
#include "bench/measure/segments.h"
#include "problems/catalogue.h"

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

/* The calibration kernel (PB_CALIB_KERNEL): a fixed case integrated
 * through the path every case takes (method workspace, counting force
 * wrapper, the force model's terms): rk4 on leo-near-circular (J2) at 100
 * steps per orbit, one chunk being 100 steps from the start. A pure
 * arithmetic loop was tried first: under two busy loops it slowed by 1.07
 * while the cases slowed by up to 1.8, since it touches no memory and
 * calls nothing; this one shares what the cases share. */
typedef struct timing_calib {
    pb_case_spec spec;
    pb_method_config cfg;
    void *ws;
} timing_calib;

static int timing_calib_init(timing_calib *k)
{
    memset(k, 0, sizeof *k);  /* spec: no cache, no compensation, the problem's own form */
    if (pb_problem_lookup("leo-near-circular", &k->spec.problem) ||
        !(k->spec.method = pb_method_find("rk4")))
        return -1;
    k->spec.steps_per_orbit = 100;
    k->cfg.time_scale = k->spec.problem.period;
    k->cfg.h = k->spec.problem.period / 100;
    k->cfg.mu = pb_problem_kepler_mu(&k->spec.problem);
    k->cfg.max_steps = 200;
    k->ws = pb_case_alloc(&k->spec);
    return k->ws ? 0 : -1;
}

static void timing_calib_free(timing_calib *k)
{
    if (k->ws)
        k->spec.method->free(k->ws);
    k->ws = NULL;
}

/* chunks chunks of the kernel; 0, or -1 when it failed */
static int timing_kernel(timing_calib *k, long chunks)
{
    const pb_problem *p = &k->spec.problem;
    for (long c = 0; c < chunks; c++) {
        pb_force_counter n;
        pb_force f;
        pb_force_counter_init(&n, p, &f);
        pb_method_stats st;
        if (pb_case_integrate(&k->spec, &k->cfg, k->ws, &f, p->t0 + 100 * k->cfg.h, NULL, NULL,
                              &st, NULL))
            return -1;
    }
    return 0;
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
    pol.min_cpu_s = spec->timing_min_cpu_s > 0 ? spec->timing_min_cpu_s : PB_TIMING_MIN_CPU_S;
    pol.calibrate = !spec->timing_uncalibrated;
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

/* The kernel's CPU time per chunk over chunks chunks (0 if it fails). */
static double timing_kernel_time(timing_calib *k, long chunks)
{
    if (!k->ws)
        return 0;
    double t0 = timing_now();
    int s = timing_kernel(k, chunks);
    double sec = (timing_now() - t0) / (double)chunks;
    return !s && isfinite(sec) && sec > 0 ? sec : 0;
}

/* How many chunks follow each repeat: about half the repeat's time (so the
 * kernel samples the machine's state as long as the case does, at half the
 * cost), at least one, at most PB_CALIB_MAX_CHUNKS. A warm-up chunk tells
 * the kernel's speed. */
static long timing_chunks(timing_calib *k, double repeat_s)
{
    double one = timing_kernel_time(k, 1);
    if (!(one > 0))
        return 1;
    double n = ceil(0.5 * repeat_s / one);
    return n < 1 ? 1 : n > PB_CALIB_MAX_CHUNKS ? PB_CALIB_MAX_CHUNKS : (long)n;
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
#ifdef PB_TEST_SLOWDOWN
    /* test builds only (never the product): the case integrates
     * PB_TEST_SLOWDOWN times in each repeat, so the timing gate can be shown
     * to catch a method that became that many times slower */
    for (int k = 1; !s && k < PB_TEST_SLOWDOWN; k++)
        s = pb_case_integrate(spec, cfg, ws, &f, t_stop, NULL, NULL, &st, NULL);
    if (!s)
        c.evals /= PB_TEST_SLOWDOWN;
#endif
    *sec = timing_now() - t0;
    if (s)
        return s;
    if (!isfinite(*sec))
        return PB_EINVAL;
    res->timing_steps = st.steps + st.startup_steps;
    res->timing_evals = c.evals;
    return 0;
}

/* The median of x[0..n) (sorted here). */
static double timing_median(double *x, int n)
{
    qsort(x, (size_t)n, sizeof(double), timing_cmp_double);
    return timing_quantile(x, n, 0.5);
}

/* The kernel's time per chunk after each repeat, kc[i], and a step's time
 * in chunks in that repeat, q[i] (both sorted here): their medians. */
static void timing_calibrated(const double *dt, double *kc, int ok, pb_case_result *res)
{
    double *q = malloc((size_t)ok * sizeof(double));
    if (!q)
        return;
    int n = 0;
    for (int i = 0; i < ok; i++)
        if (kc[i] > 0)
            q[n++] = dt[i] / (double)res->timing_steps / kc[i];
    if (n == ok) {
        res->step_kernel_ratio = timing_median(q, n);
        res->calib_ns = 1e9 * timing_median(kc, n);
    }
    free(q);
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
    res->calib_ns = res->step_kernel_ratio = (double)NAN;
    if (!(t_end - p->t0 > 0) || steps_done <= 0 || pol->min_repeats <= 0 ||
        pol->max_repeats < pol->min_repeats)
        return;
    double t_stop = timing_stop(spec, cfg, t_end, steps_done);
    double *dt = malloc(2 * (size_t)pol->max_repeats * sizeof(double));
    void *ws = pb_case_alloc(spec);
    if (!dt || !ws)
        goto done;
    double *kc = dt + pol->max_repeats;
    long chunks = 0;
    timing_calib kern;
    memset(&kern, 0, sizeof kern);
    /* no kernel (not asked for, or it cannot run): calib_ns stays NaN */
    if (!pol->calibrate || timing_calib_init(&kern))
        timing_calib_free(&kern);
    int ok = 0;
    double total = 0;
    while (ok < pol->max_repeats && (ok < pol->min_repeats || total < pol->min_cpu_s)) {
        if (timing_once(spec, cfg, ws, t_stop, &dt[ok], res))
            break;
        if (!chunks)
            chunks = timing_chunks(&kern, dt[ok]);
        kc[ok] = timing_kernel_time(&kern, chunks);
        total += dt[ok++];
    }
    if (ok > 0 && res->timing_steps > 0) {
        timing_calibrated(dt, kc, ok, res);
        timing_summarise(dt, ok, total, res);
    }
    timing_calib_free(&kern);
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
