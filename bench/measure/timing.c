/* timing.c - the timing pass of a case: the same integration as the metric
 * pass (or its first TIMING_STEPS steps), with no observer and no metric
 * work, repeated; the median time per step and per force evaluation. */
#include <math.h>
#include <stdlib.h>
#include <time.h>
#include "bench/measure/timing.h"
#include "bench/measure/force_counter.h"

/* The timing pass integrates at most this many steps of the case. */
#define TIMING_STEPS 200000.0

static double timing_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static int timing_cmp_double(const void *a, const void *b)
{
    double d = *(const double *)a - *(const double *)b;
    return (d > 0) - (d < 0);
}

/* Timing pass: the same method and settings, no observer, no metrics; the
 * median over repeats of the wall time per step. */
void pb_case_time(const pb_case_spec *spec, const pb_method_config *cfg,
                  double t_end, long steps_done, pb_case_result *res)
{
    const pb_problem *p = &spec->problem;
    const pb_method_type *m = spec->method;
    double span = t_end - p->t0;
    if (!(span > 0) || steps_done <= 0 || spec->repeats <= 0)
        return;
    double frac = fmin(1.0, TIMING_STEPS / (double)steps_done);
    double t_stop = p->t0 + frac * span;
    if (m->flags & PB_KIND_FIXED) {
        long n = (long)floor(frac * (double)steps_done);
        if (n < 1)
            n = 1;
        t_stop = p->t0 + (double)n * cfg->h;
    }
    double *dt = malloc((size_t)spec->repeats * sizeof(double));
    void *ws = m->alloc(p->dim);
    if (!dt || !ws)
        goto done;
    long steps = 0, evals = 0;
    int ok = 0;
    for (int k = 0; k < spec->repeats; k++) {
        pb_force_counter c;
        pb_force f;
        pb_force_counter_init(&c, p, &f);
        double t0 = timing_now();
        int s = m->start(ws, &f, cfg, p->t0, p->r0, p->v0);
        if (!s)
            s = m->advance(ws, t_stop, NULL, NULL);
        dt[ok] = timing_now() - t0;
        if (s)
            break;
        pb_method_stats st;
        m->get_stats(ws, &st);
        steps = st.steps + st.startup_steps;
        evals = c.evals;
        ok++;
    }
    if (ok > 0 && steps > 0) {
        qsort(dt, (size_t)ok, sizeof(double), timing_cmp_double);
        double med = ok % 2 ? dt[ok / 2] : 0.5 * (dt[ok / 2 - 1] + dt[ok / 2]);
        res->timing_s = med;
        res->ns_per_step = 1e9 * med / (double)steps;
        res->ns_per_eval = evals > 0 ? 1e9 * med / (double)evals : (double)NAN;
    }
done:
    m->free(ws);
    free(dt);
}

