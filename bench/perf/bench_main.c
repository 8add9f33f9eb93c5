/* bench_main.c - `make bench`: the cost of every method on one problem
 * (bench_methods.c), evaluations to a 1e-9 error (bench_precision.c), our
 * RK4 against GSL's rk4 (bench_gsl.c), the harness's overhead against
 * hand-written RK4 loops (bench_overhead.c), peak memory
 * against horizon (bench_memory.c), the timing pass's spread under load
 * (bench_load.c), reference builds with mission-like forces
 * (bench_reference.c), the hot paths of gauss-jackson8 and leapfrog
 * against hand loops (bench_hotpaths.c) and select and the standard suite
 * as run (bench_study.c); this file runs them in order and prints the goals
 * (`bench_main hot`: sections 3 and 6 alone). Reporting only: nothing here
 * asserts a timing. */
#include <gsl/gsl_errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "bench/perf/bench.h"
#include "problems/catalogue.h"

#define BENCH_REF_GOAL_S 2.0   /* s: issue 12, a full-force one-day LEO reference */

/* PASS or MISS against an upper goal, FAILED when nothing was measured. */
static const char *bench_verdict(double v, double goal)
{
    return isnan(v) ? "FAILED" : v <= goal ? "PASS" : "MISS";
}

/* What the sections measured (NaN: not measured). */
typedef struct bench_results {
    double oh_pct, oh_min_pct, od_pct, od_min;  /* section 3 */
    double mem_pct, load_pct, ref_s;            /* sections 4, 5, 7 */
    double gj_x, lf_x;                          /* section 6 */
    double s_lc, s_lw, s_k, s_std;              /* section 8 */
} bench_results;

/* The goals of sections 3 and 6, the hot paths. */
static void bench_goals_hot(const bench_results *r)
{
    printf("   harness overhead <= %.0f%% against a hand-written RK4 loop calling the same force\n"
           "   function:                              %s (measured %+.1f%%, median of paired rounds;"
           " %+.1f%% best round)\n",
           BENCH_OVERHEAD_GOAL, bench_verdict(r->od_pct, BENCH_OVERHEAD_GOAL), r->od_pct, r->od_min);
    printf("   against a loop with the Kepler force inlined (no function call): %+.1f%% (median),"
           " %+.1f%% best round\n", r->oh_pct, r->oh_min_pct);
    printf("   gauss-jackson8 per step <= %.1fx its one-evaluation floor (one force call a step through\n"
           "   the same pointer):                     %s (measured %.2fx, median of paired rounds)\n",
           BENCH_GJ_FLOOR_GOAL, bench_verdict(r->gj_x, BENCH_GJ_FLOOR_GOAL), r->gj_x);
    printf("   leapfrog per step <= %.2fx a hand loop calling the force through a pointer:\n"
           "                                          %s (measured %.3fx, median of paired rounds)\n",
           BENCH_LF_HAND_GOAL, bench_verdict(r->lf_x, BENCH_LF_HAND_GOAL), r->lf_x);
}

/* The goals of the other sections. */
static void bench_goals_rest(const bench_results *r)
{
    printf("   memory independent of horizon (< %.0f%%): %s (measured %.2f%%, 10^5 vs 10^3 orbits)\n",
           BENCH_MEMORY_GOAL, r->mem_pct < BENCH_MEMORY_GOAL ? "PASS" : isnan(r->mem_pct) ? "FAILED" : "MISS",
           r->mem_pct);
    printf("   timing pass under load, ns/step of rk4 and leapfrog within %.0f%% over %d reruns\n"
           "   ((max - min) / median):                %s (measured %.1f%%, the larger of the two)\n",
           BENCH_LOAD_GOAL, BENCH_LOAD_RERUNS, bench_verdict(r->load_pct, BENCH_LOAD_GOAL), r->load_pct);
    printf("   full-force one-day LEO reference built in < %.0f s (both tolerances, the coarse one on a\n"
           "   second thread; slowest shadow model):  %s (measured %.2f s)\n",
           BENCH_REF_GOAL_S, bench_verdict(r->ref_s, BENCH_REF_GOAL_S), r->ref_s);
    printf("   select leo-j2 1 m, CPU s: cold <= %.1f %s (%.2f), warm <= %.1f %s (%.2f);\n"
           "   select kepler-e0.5 1e-6 <= %.1f: %s (%.2f); standard suite (--repeats 0, references\n"
           "   cached) <= %.0f: %s (%.1f)\n",
           BENCH_SELECT_LEO_COLD_GOAL, bench_verdict(r->s_lc, BENCH_SELECT_LEO_COLD_GOAL), r->s_lc,
           BENCH_SELECT_LEO_WARM_GOAL, bench_verdict(r->s_lw, BENCH_SELECT_LEO_WARM_GOAL), r->s_lw,
           BENCH_SELECT_K05_GOAL, bench_verdict(r->s_k, BENCH_SELECT_K05_GOAL), r->s_k,
           BENCH_SUITE_GOAL, bench_verdict(r->s_std, BENCH_SUITE_GOAL), r->s_std);
}

/* `bench_main` runs every section; `bench_main hot` only sections 3 and 6
 * (about 10 s), to compare the hot paths across runs or stack layouts. */
int main(int argc, char **argv)
{
    int hot_only = argc == 2 && !strcmp(argv[1], "hot");
    if (argc > 2 || (argc == 2 && !hot_only)) {
        fprintf(stderr, "usage: bench_main [hot]\n");
        return 2;
    }
    pb_problem p;
    if (pb_problem_lookup(BENCH_PROBLEM, &p) || !(p.period > 0)) {
        fprintf(stderr, "bench: problem %s not found\n", BENCH_PROBLEM);
        return 2;
    }
    gsl_set_error_handler_off();
    double t_start = bench_now();
    double load[1] = {(double)NAN};
    if (getloadavg(load, 1) != 1)
        load[0] = (double)NAN;
    printf("propbench bench (thread CPU time, warm-up first, medians; reporting only)\n");
    printf("   load average at start %.2f on %ld CPUs: timings shift with other processes' load\n\n",
           load[0], sysconf(_SC_NPROCESSORS_ONLN));
    const double nan = (double)NAN;
    bench_results r = {nan, nan, nan, nan, nan, nan, nan, nan, nan, nan, nan, nan, nan};
    double rk4_ns = nan;
    if (!hot_only) {
        bench_methods(&p, &rk4_ns);
        bench_precision(&p);
        bench_rk4_vs_gsl(&p);
    }
    /* a section that fails measured nothing: its goals say FAILED */
    if (bench_overhead(&p, &r.oh_pct, &r.oh_min_pct, &r.od_pct, &r.od_min))
        r.oh_pct = r.oh_min_pct = r.od_pct = r.od_min = nan;
    if (!hot_only) {
        if (bench_memory(&r.mem_pct))
            r.mem_pct = nan;
        if (bench_load(&p, &r.load_pct))
            r.load_pct = nan;
        if (bench_reference(&r.ref_s))
            r.ref_s = nan;
    }
    if (bench_hotpaths(&p, &r.gj_x, &r.lf_x))
        r.gj_x = r.lf_x = nan;
    if (!hot_only)
        bench_study(&r.s_lc, &r.s_lw, &r.s_k, &r.s_std);
    printf("== Goals ==\n");
    bench_goals_hot(&r);
    if (!hot_only)
        bench_goals_rest(&r);
    printf("   total bench time %.1f s\n", bench_now() - t_start);
    return 0;
}
