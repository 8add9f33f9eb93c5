/* bench_main.c - `make bench`: the cost of every method on one problem
 * (bench_methods.c), evaluations to a 1e-9 error (bench_precision.c), our
 * RK4 against GSL's rk4 (bench_gsl.c), the harness's overhead against
 * hand-written RK4 loops (bench_overhead.c), peak memory
 * against horizon (bench_memory.c), the timing pass's spread under load
 * (bench_load.c), reference builds with mission-like forces
 * (bench_reference.c), the hot paths of gauss-jackson8 and leapfrog
 * against hand loops (bench_hotpaths.c) and select and the standard suite
 * as run (bench_study.c); this file runs them in order and prints the goals.
 * Reporting only: nothing here asserts a timing. */
#include <gsl/gsl_errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <unistd.h>
#include "bench/perf/bench.h"
#include "problems/catalogue.h"

#define BENCH_REF_GOAL_S 2.0   /* s: issue 12, a full-force one-day LEO reference */

/* PASS or MISS against an upper goal, FAILED when nothing was measured. */
static const char *bench_verdict(double v, double goal)
{
    return isnan(v) ? "FAILED" : v <= goal ? "PASS" : "MISS";
}

int main(void)
{
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
    double rk4_ns = nan, oh_pct = nan, oh_min_pct = nan, mem_pct = nan, od_pct = nan, od_min = nan;
    double load_pct = nan;
    bench_methods(&p, &rk4_ns);
    bench_precision(&p);
    bench_rk4_vs_gsl(&p);
    int oh_ok = bench_overhead(&p, &oh_pct, &oh_min_pct, &od_pct, &od_min) == 0;
    int mem_ok = bench_memory(&mem_pct) == 0;
    int load_ok = bench_load(&p, &load_pct) == 0;
    double ref_s = nan;
    int ref_ok = bench_reference(&ref_s) == 0;
    double gj_x = nan, lf_x = nan;
    int hot_ok = bench_hotpaths(&p, &gj_x, &lf_x) == 0;
    double s_lc = nan, s_lw = nan, s_k = nan, s_std = nan;
    bench_study(&s_lc, &s_lw, &s_k, &s_std);
    printf("== Goals ==\n");
    printf("   harness overhead <= %.0f%% against a hand-written RK4 loop calling the same force\n"
           "   function:                              %s (measured %+.1f%%, median of paired rounds;"
           " %+.1f%% best round)\n",
           BENCH_OVERHEAD_GOAL, oh_ok && od_pct <= BENCH_OVERHEAD_GOAL ? "PASS" : "MISS", od_pct, od_min);
    printf("   against a loop with the Kepler force inlined (no function call): %+.1f%% (median),"
           " %+.1f%% best round\n", oh_pct, oh_min_pct);
    printf("   memory independent of horizon (< %.0f%%): %s (measured %.2f%%, 10^5 vs 10^3 orbits)\n",
           BENCH_MEMORY_GOAL, mem_ok && mem_pct < BENCH_MEMORY_GOAL ? "PASS" : "MISS", mem_pct);
    printf("   timing pass under load, ns/step of rk4 and leapfrog within %.0f%% over %d reruns\n"
           "   ((max - min) / median):                %s (measured %.1f%%, the larger of the two)\n",
           BENCH_LOAD_GOAL, BENCH_LOAD_RERUNS, load_ok && load_pct <= BENCH_LOAD_GOAL ? "PASS" : "MISS",
           load_pct);
    printf("   full-force one-day LEO reference built in < %.0f s (both tolerances, the coarse one on a\n"
           "   second thread; slowest shadow model):  %s (measured %.2f s)\n",
           BENCH_REF_GOAL_S, ref_ok && ref_s < BENCH_REF_GOAL_S ? "PASS" : "MISS", ref_s);
    printf("   gauss-jackson8 per step <= %.1fx its one-evaluation floor (one force call a step through\n"
           "   the same pointer):                     %s (measured %.2fx, median of paired rounds)\n",
           BENCH_GJ_FLOOR_GOAL, hot_ok && gj_x <= BENCH_GJ_FLOOR_GOAL ? "PASS" : "MISS", gj_x);
    printf("   leapfrog per step <= %.2fx a hand loop calling the force through a pointer:\n"
           "                                          %s (measured %.3fx, median of paired rounds)\n",
           BENCH_LF_HAND_GOAL, hot_ok && lf_x <= BENCH_LF_HAND_GOAL ? "PASS" : "MISS", lf_x);
    printf("   select leo-j2 1 m, CPU s: cold <= %.1f %s (%.2f), warm <= %.1f %s (%.2f);\n"
           "   select kepler-e0.5 1e-6 <= %.1f: %s (%.2f); standard suite (--repeats 0, references\n"
           "   cached) <= %.0f: %s (%.1f)\n",
           BENCH_SELECT_LEO_COLD_GOAL, bench_verdict(s_lc, BENCH_SELECT_LEO_COLD_GOAL), s_lc,
           BENCH_SELECT_LEO_WARM_GOAL, bench_verdict(s_lw, BENCH_SELECT_LEO_WARM_GOAL), s_lw,
           BENCH_SELECT_K05_GOAL, bench_verdict(s_k, BENCH_SELECT_K05_GOAL), s_k,
           BENCH_SUITE_GOAL, bench_verdict(s_std, BENCH_SUITE_GOAL), s_std);
    printf("   total bench time %.1f s\n", bench_now() - t_start);
    return 0;
}
