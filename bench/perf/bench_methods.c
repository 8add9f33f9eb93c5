/* bench_methods.c - section 1 of `make bench`: the cost per step and per
 * force evaluation of every method in the table on one problem, fixed-step
 * methods at one step, adaptive ones at one tolerance, no observer. */
#include <stdio.h>
#include <string.h>
#include "bench/perf/bench.h"

void bench_methods(const pb_problem *p, double *rk4_ns_step)
{
    double T = p->period, t_end = p->t0 + BENCH_ORBITS * T, h = T / BENCH_SPO;
    printf("== 1. Cost per step and per evaluation: %s, %g orbits, no observer ==\n",
           p->name, BENCH_ORBITS);
    printf("   fixed-step methods at %d steps per orbit; adaptive at tolerance %g (rtol = atol)\n",
           BENCH_SPO, BENCH_TOL);
    printf("   each: start + advance through the counting force wrapper; median of %d after a warm-up\n\n",
           BENCH_REPEATS);
    printf("%-16s %-5s %-10s %9s %9s %6s %9s %9s %8s %10s\n", "method", "from", "setting",
           "steps", "evals", "ev/st", "ns/step", "ns/eval", "x rk4", "pos err");
    bench_job jobs[64];
    memset(jobs, 0, sizeof jobs);
    int nm = 0;
    for (const pb_method_type *const *mp = pb_method_table; *mp && nm < 64; mp++, nm++) {
        jobs[nm].m = *mp;
        jobs[nm].t_end = t_end;
        bench_config(*mp, p, h, BENCH_TOL, &jobs[nm].cfg);
    }
    bench_jobs_run(jobs, nm, p);
    for (int i = 0; i < nm; i++)
        if (strcmp(jobs[i].m->name, "rk4") == 0)
            *rk4_ns_step = bench_ns(jobs[i].out.sec, jobs[i].out.steps);
    for (int i = 0; i < nm; i++) {
        const pb_method_type *m = jobs[i].m;
        const bench_timing *r = &jobs[i].out;
        char setting[32];
        if (m->flags & PB_KIND_FIXED)
            snprintf(setting, sizeof setting, "n%d", BENCH_SPO);
        else
            snprintf(setting, sizeof setting, "tol%g", BENCH_TOL);
        const char *from = (m->flags & PB_FROM_GSL) ? "GSL" : "ours";
        if (r->status) {
            printf("%-16s %-5s %-10s  failed: %s\n", m->name, from, setting, pb_strerror(r->status));
            continue;
        }
        double nss = bench_ns(r->sec, r->steps);
        printf("%-16s %-5s %-10s %9ld %9ld %6.2f %9.1f %9.2f %8.2f %10.2e\n", m->name, from,
               setting, r->steps, r->evals, (double)r->evals / (double)r->steps, nss,
               bench_ns(r->sec, r->evals), nss / *rk4_ns_step, r->pos_err);
    }
    printf("   (x rk4: ns per step relative to our rk4; GSL's peers run behind our method\n"
           "    interface, gsl-rk4 step-doubles: 11 evaluations a step)\n\n");
    bench_overhead_beyond_force(p, jobs, nm);
}
