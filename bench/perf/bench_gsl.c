/* bench_gsl.c - section 2 of `make bench`: our rk4 against GSL's rk4, per
 * step at one h and at equal accuracy (ours at h/2, since GSL's rk4 step
 * doubles; GSL Reference Manual, odeiv2), with GSL's stepper both behind our
 * method interface and called directly in a plain loop. */
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include <stdio.h>
#include <string.h>
#include "bench/perf/bench.h"

/* ---- GSL's rk4 stepper called directly in a plain loop */

typedef struct bench_gsl_ctx {
    double mu;
    long evals;
} bench_gsl_ctx;

static int bench_gsl_rhs(double t, const double y[], double dydt[], void *params)
{
    (void)t;
    bench_gsl_ctx *c = params;
    c->evals++;
    dydt[0] = y[3];
    dydt[1] = y[4];
    dydt[2] = y[5];
    BENCH_KEPLER(c->mu, y[0], y[1], y[2], dydt[3], dydt[4], dydt[5]);
    return GSL_SUCCESS;
}

void bench_gsl_plain_once(bench_job *j, const pb_problem *p, int k)
{
    bench_gsl_ctx c = {p->mu, 0};
    gsl_odeiv2_system sys = {bench_gsl_rhs, NULL, 6, &c};
    /* the stepper's allocation stays outside the clock, as for our methods */
    gsl_odeiv2_step *st = gsl_odeiv2_step_alloc(gsl_odeiv2_step_rk4, 6);
    if (!st) {
        j->out.status = PB_ENOMEM;
        return;
    }
    double y[6], yerr[6], h = j->cfg.h;
    double t0 = bench_cpu_now();
    memcpy(y, p->r0, 3 * sizeof(double));
    memcpy(y + 3, p->v0, 3 * sizeof(double));
    for (long n = 0; n < j->nsteps; n++)
        if (gsl_odeiv2_step_apply(st, p->t0 + (double)n * h, h, y, yerr, NULL, NULL, &sys)) {
            j->out.status = PB_EFORCE;
            break;
        }
    double el = bench_cpu_now() - t0;
    gsl_odeiv2_step_free(st);
    if (k >= 0)
        j->dt[k] = el;
    j->out.steps = j->nsteps;
    j->out.evals = c.evals;
    memcpy(j->out.r, y, 3 * sizeof(double));
    memcpy(j->out.v, y + 3, 3 * sizeof(double));
}

/* ---- 2. our RK4 against GSL's rk4 */

void bench_rk4_vs_gsl(const pb_problem *p)
{
    const pb_method_type *ours = pb_method_find("rk4"), *peer = pb_method_find("gsl-rk4");
    if (!ours || !peer) {
        printf("== 2. skipped: rk4 or gsl-rk4 not in the method table ==\n\n");
        return;
    }
    double T = p->period, t_end = p->t0 + BENCH_ORBITS * T;
    int spo_gsl = BENCH_SPO / 2;
    double h = T / spo_gsl;
    long n = (long)(BENCH_ORBITS * spo_gsl);
    bench_job jobs[4];
    memset(jobs, 0, sizeof jobs);
    jobs[0].m = ours;
    bench_config(ours, p, h, 0, &jobs[0].cfg);
    jobs[1].m = ours;
    bench_config(ours, p, h / 2, 0, &jobs[1].cfg);
    jobs[2].m = peer;
    bench_config(peer, p, h, 0, &jobs[2].cfg);
    jobs[3].m = NULL;
    jobs[3].cfg.h = h;
    jobs[3].nsteps = n;
    for (int i = 0; i < 4; i++)
        jobs[i].t_end = t_end;
    bench_jobs_run(jobs, 4, p);
    const bench_timing o_h = jobs[0].out, o_h2 = jobs[1].out, g_h = jobs[2].out,
                       g_plain = jobs[3].out;
    printf("== 2. Our rk4 against GSL's rk4: %s, %g orbits, h = T/%d ==\n", p->name,
           BENCH_ORBITS, spo_gsl);
    printf("%-34s %9s %9s %9s %9s %10s\n", "run", "steps", "evals", "ns/step", "ms", "pos err");
    const struct { const char *label; const bench_timing *r; } rows[] = {
        {"ours rk4 at h", &o_h},
        {"ours rk4 at h/2", &o_h2},
        {"GSL gsl-rk4 peer at h", &g_h},
        {"GSL step_rk4 plain loop at h", &g_plain},
    };
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
        const bench_timing *r = rows[i].r;
        if (r->status) {
            printf("%-34s failed: %s\n", rows[i].label, pb_strerror(r->status));
            continue;
        }
        printf("%-34s %9ld %9ld %9.1f %9.2f %10.3e\n", rows[i].label, r->steps, r->evals,
               bench_ns(r->sec, r->steps), 1e3 * r->sec, r->pos_err);
    }
    printf("   per step at h:     GSL peer / ours = %.2f x time, %.2f x evals;"
           " GSL plain / ours = %.2f x time\n",
           bench_ns(g_h.sec, g_h.steps) / bench_ns(o_h.sec, o_h.steps),
           ((double)g_h.evals / (double)g_h.steps) / ((double)o_h.evals / (double)o_h.steps),
           bench_ns(g_plain.sec, g_plain.steps) / bench_ns(o_h.sec, o_h.steps));
    printf("   equal accuracy:    ours at h/2 / GSL peer at h = %.2f x time, %.2f x evals"
           " (errors %.3e vs %.3e, ratio %.3f)\n",
           o_h2.sec / g_h.sec, (double)o_h2.evals / (double)g_h.evals, o_h2.pos_err,
           g_h.pos_err, o_h2.pos_err / g_h.pos_err);
    printf("                      ours at h/2 / GSL plain at h = %.2f x time, %.2f x evals\n\n",
           o_h2.sec / g_plain.sec, (double)o_h2.evals / (double)g_plain.evals);
}
