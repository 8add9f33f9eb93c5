/* bench_jobs.c - the timing machinery of `make bench`: medians, the exact
 * error, the harness's method settings, and the job runner that drives a
 * method through start + advance with the counting force wrapper. */
#include <stdlib.h>
#include <string.h>
#include "bench/perf/bench.h"
#include "bench/measure/force_counter.h"

static int bench_cmp(const void *a, const void *b)
{
    double d = *(const double *)a - *(const double *)b;
    return (d > 0) - (d < 0);
}

double bench_median(double *x, int n)
{
    qsort(x, (size_t)n, sizeof(double), bench_cmp);
    return n % 2 ? x[n / 2] : 0.5 * (x[n / 2 - 1] + x[n / 2]);
}

double bench_min(const double *x, int n)
{
    double m = x[0];
    for (int i = 1; i < n; i++)
        m = fmin(m, x[i]);
    return m;
}

double bench_pos_err(const pb_problem *p, double t, const double *r)
{
    __float128 rq[PB_DIM_MAX], vq[PB_DIM_MAX];
    if (!p->exact_q || p->exact_q(p, t, rq, vq))
        return (double)NAN;
    __float128 s = 0;
    for (int i = 0; i < p->dim; i++) {
        __float128 d = (__float128)r[i] - rq[i];
        s += d * d;
    }
    return sqrt((double)s);
}

void bench_config(const pb_method_type *m, const pb_problem *p, double h, double tol,
                  pb_method_config *cfg)
{
    memset(cfg, 0, sizeof *cfg);
    cfg->time_scale = p->period;
    cfg->mu = pb_problem_kepler_mu(p);
    if (m->flags & PB_KIND_FIXED) {
        cfg->h = h;
    } else {
        cfg->rtol = cfg->atol = tol;
        cfg->min_step = 1e-13 * p->period;
        cfg->max_steps = 50000000L;
    }
}

double bench_ns(double sec, long n)
{
    return n > 0 && isfinite(sec) ? 1e9 * sec / (double)n : (double)NAN;
}

static void bench_job_once(bench_job *j, const pb_problem *p, int k)
{
    if (!j->m) {
        bench_gsl_plain_once(j, p, k);
        return;
    }
    const pb_method_type *m = j->m;
    pb_force_counter c;
    pb_force f;
    pb_force_counter_init(&c, p, &f);
    double t0 = bench_cpu_now();
    int s = m->start(j->ws, &f, &j->cfg, p->t0, p->r0, p->v0);
    if (!s)
        s = m->advance(j->ws, j->t_end, NULL, NULL);
    double el = bench_cpu_now() - t0;
    if (s) {
        j->out.status = s;
        return;
    }
    if (k >= 0)
        j->dt[k] = el;
    pb_method_stats st;
    m->get_stats(j->ws, &st);
    j->out.steps = st.steps + st.startup_steps;
    j->out.rejected = st.rejected;
    j->out.evals = c.evals;
}

void bench_jobs_run(bench_job *jobs, int n, const pb_problem *p)
{
    for (int i = 0; i < n; i++) {
        memset(&jobs[i].out, 0, sizeof jobs[i].out);
        jobs[i].out.sec = jobs[i].out.pos_err = (double)NAN;
        if (jobs[i].m && !(jobs[i].ws = jobs[i].m->alloc(p->dim)))
            jobs[i].out.status = PB_ENOMEM;
    }
    for (int k = -1; k < BENCH_REPEATS; k++)
        for (int i = 0; i < n; i++)
            if (!jobs[i].out.status)
                bench_job_once(&jobs[i], p, k);
    for (int i = 0; i < n; i++) {
        bench_job *j = &jobs[i];
        if (!j->out.status) {
            j->out.sec = bench_median(j->dt, BENCH_REPEATS);
            double t = j->t_end;
            if (j->m)
                j->m->get_state(j->ws, &t, j->out.r, j->out.v);
            j->out.pos_err = bench_pos_err(p, t, j->out.r);
        }
        if (j->m)
            j->m->free(j->ws);
        j->ws = NULL;
    }
}
