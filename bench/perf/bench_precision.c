/* bench_precision.c - section of `make bench` for adaptive methods: the
 * force evaluations each needs to reach a position error of 1e-9 (of a = 1)
 * on kepler-e0.5 over 100 orbits, side by side, read off a tolerance ladder
 * (log-log interpolation between the two rungs around 1e-9); and, for every
 * method, the share of its time per step that is not the force's own cost
 * (time per step minus evaluations x the cost of one evaluation of the same
 * force, timed alone). Reporting only. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "bench/perf/bench.h"

#define PREC_TARGET 1e-9
#define PREC_RUNGS 23                /* tolerances 1e-5 .. 1e-16, half decades */

/* pos_err_max and evaluations of one metric pass (no timing). */
static int prec_case(const pb_problem *p, const pb_method_type *m, double tol, double *err,
                     double *evals)
{
    pb_case_spec s;
    pb_case_spec_default(&s);
    s.problem = *p;
    s.method = m;
    s.tolerance = tol;
    s.orbits = BENCH_ORBITS;
    s.repeats = 0;
    s.linear_samples = 0;
    s.cache_dir = NULL;
    pb_case_result res;
    if (pb_case_run(&s, &res) || res.status) {
        pb_case_result_free(&res);
        return -1;
    }
    *err = res.pos_err_max;
    *evals = (double)res.evals;
    pb_case_result_free(&res);
    return 0;
}

/* Evaluations at error PREC_TARGET, interpolated in log-log between the
 * ladder's rungs on either side; NaN if the ladder does not bracket it. */
static double prec_evals_at_target(const pb_problem *p, const pb_method_type *m)
{
    double e0 = NAN, n0 = NAN;
    for (int k = 0; k < PREC_RUNGS; k++) {
        double tol = pow(10.0, -5.0 - 0.5 * k), e, n;
        if (prec_case(p, m, tol, &e, &n))
            continue;
        if (e <= PREC_TARGET) {
            if (!(e0 > PREC_TARGET))
                return k == 0 ? n : (double)NAN;
            double f = (log(PREC_TARGET) - log(e0)) / (log(e) - log(e0));
            return exp(log(n0) + f * (log(n) - log(n0)));
        }
        e0 = e, n0 = n;
    }
    return NAN;
}

/* CPU seconds of one evaluation of p's force, timed alone. */
static double prec_force_cost(const pb_problem *p)
{
    double r[3] = {p->r0[0], p->r0[1], p->r0[2]}, a[3], sink = 0;
    const long n = 2000000;
    double c0 = bench_cpu_now();
    for (long i = 0; i < n; i++) {
        r[0] += 1e-12;   /* a new point each time: nothing to hoist */
        p->accel(p, 0.0, r, p->v0, a);
        sink += a[0];
    }
    double sec = (bench_cpu_now() - c0) / (double)n;
    return sink == 12345.0 ? 0 : sec;
}

void bench_precision(const pb_problem *p)
{
    printf("== Adaptive methods: evaluations to a %.0e position error, %s, %g orbits ==\n",
           PREC_TARGET, p->name, BENCH_ORBITS);
    printf("   (tolerance ladder 1e-5 .. 1e-16 in half decades, log-log interpolation; '-':\n"
           "    the ladder does not reach it)\n");
    printf("   %-16s %14s\n", "method", "evals at 1e-9");
    for (const pb_method_type *const *mp = pb_method_table; *mp; mp++) {
        if (!((*mp)->flags & PB_KIND_ADAPTIVE))
            continue;
        double n = prec_evals_at_target(p, *mp);
        if (isfinite(n))
            printf("   %-16s %14.0f\n", (*mp)->name, n);
        else
            printf("   %-16s %14s\n", (*mp)->name, "-");
    }
    printf("\n");
}

void bench_overhead_beyond_force(const pb_problem *p, const bench_job *jobs, int n)
{
    double ns_force = 1e9 * prec_force_cost(p);
    printf("== Time per step beyond the force: %s (one evaluation alone: %.1f ns) ==\n", p->name,
           ns_force);
    printf("   %-16s %9s %9s %12s\n", "method", "ns/step", "ev/step", "beyond force");
    for (int i = 0; i < n; i++) {
        const bench_timing *r = &jobs[i].out;
        if (r->status || r->steps <= 0)
            continue;
        double nss = bench_ns(r->sec, r->steps), eps = (double)r->evals / (double)r->steps;
        printf("   %-16s %9.1f %9.2f %11.0f%%\n", jobs[i].m->name, nss, eps,
               100.0 * (nss - eps * ns_force) / nss);
    }
    printf("   (beyond force: the share of a step's time spent outside the force function:\n"
           "    the method's own arithmetic, the counting wrapper and the driver)\n\n");
}
