/* bench_load.c - section 5 of `make bench`: how far the timing pass's
 * ns/step moves between reruns while other processes keep every core busy.
 * Per method, BENCH_LOAD_RERUNS reruns of pb_case_run (its timing pass:
 * thread CPU time, repeated to PB_TIMING_MIN_CPU_S) and, beside each, the
 * same integration timed as the pass used to be (wall clock, median of the
 * spec's repeats), so the two clocks face the same load. */
#include <signal.h>
#include <stdio.h>
#include <string.h>
#include <sys/prctl.h>
#include <sys/wait.h>
#include <unistd.h>
#include "bench/perf/bench.h"
#include "bench/measure/force_counter.h"
#include "bench/measure/timing.h"

#define BENCH_LOAD_MAX_HOGS 64
#define BENCH_LOAD_HOG_LIFE_S 120.0  /* a hog left behind stops itself after this */

/* A child that spins until killed (or its parent dies, or its life ends). */
static void load_hog(pid_t parent)
{
    prctl(PR_SET_PDEATHSIG, SIGKILL);
    if (getppid() != parent)
        _exit(0);
    double t0 = bench_now();
    volatile double x = 1;
    for (;;) {
        for (int i = 0; i < 10000000; i++)
            x = x * 0.999999 + 1.0; /* settles near 1e6: no overflow, no denormals */
        if (bench_now() - t0 > BENCH_LOAD_HOG_LIFE_S)
            _exit(0);
    }
}

/* One busy child per online CPU; how many started. */
static int load_start(pid_t *pids, int want)
{
    int n = 0;
    pid_t me = getpid();
    fflush(NULL);
    for (; n < want && n < BENCH_LOAD_MAX_HOGS; n++) {
        pid_t pid = fork();
        if (pid < 0)
            break;
        if (pid == 0)
            load_hog(me);
        pids[n] = pid;
    }
    struct timespec ts = {0, 100000000L}; /* let them reach full speed */
    nanosleep(&ts, NULL);
    return n;
}

static void load_stop(const pid_t *pids, int n)
{
    for (int i = 0; i < n; i++)
        kill(pids[i], SIGKILL);
    for (int i = 0; i < n; i++)
        waitpid(pids[i], NULL, 0);
}

/* The old timing pass: the whole case `repeats` times on the wall clock,
 * median ns per step. */
static double load_wall_ns(const pb_case_spec *spec, void *ws)
{
    const pb_problem *p = &spec->problem;
    const pb_method_type *m = spec->method;
    pb_method_config cfg;
    double h = p->period / spec->steps_per_orbit;
    bench_config(m, p, h, 0, &cfg);
    double t_end = p->t0 + spec->orbits * (double)spec->steps_per_orbit * h;
    double dt[BENCH_REPEATS];
    int n = spec->repeats < BENCH_REPEATS ? spec->repeats : BENCH_REPEATS;
    long steps = 0;
    for (int k = 0; k < n; k++) {
        pb_force_counter c;
        pb_force f;
        pb_force_counter_init(&c, p, &f);
        double t0 = bench_now();
        int s = m->start(ws, &f, &cfg, p->t0, p->r0, p->v0);
        if (!s)
            s = m->advance(ws, t_end, NULL, NULL);
        dt[k] = bench_now() - t0;
        if (s)
            return (double)NAN;
        pb_method_stats st;
        m->get_stats(ws, &st);
        steps = st.steps + st.startup_steps;
    }
    return bench_ns(bench_median(dt, n), steps);
}

/* Lowest, highest, median and (max - min) / median in percent of x[0..n). */
typedef struct load_stats {
    double lo, hi, med, spread_pct;
} load_stats;

static load_stats load_stats_of(const double *x, int n)
{
    double y[BENCH_LOAD_RERUNS];
    memcpy(y, x, (size_t)n * sizeof(double));
    load_stats s = {bench_min(y, n), y[0], bench_median(y, n), 0};
    for (int i = 1; i < n; i++)
        s.hi = fmax(s.hi, y[i]);
    s.spread_pct = 100 * (s.hi - s.lo) / s.med;
    return s;
}

/* One method's reruns: the timing pass's ns/step, its repeats and their
 * spread, and the old pass's wall-clock ns/step beside it. */
typedef struct load_reruns {
    double cpu[BENCH_LOAD_RERUNS], wall[BENCH_LOAD_RERUNS], in_pass[BENCH_LOAD_RERUNS];
    int reps[BENCH_LOAD_RERUNS];
    double share_pct;      /* CPU time this thread got over wall time, during the reruns */
} load_reruns;

static int load_rerun(const pb_case_spec *spec, void *ws, load_reruns *r)
{
    double w0 = bench_now(), c0 = bench_cpu_now();
    for (int k = 0; k < BENCH_LOAD_RERUNS; k++) {
        pb_case_result res;
        int bad = pb_case_run(spec, &res) || res.status || res.timing_repeats < 1;
        r->cpu[k] = res.ns_per_step, r->reps[k] = res.timing_repeats;
        r->in_pass[k] = 100 * res.ns_per_step_spread;
        pb_case_result_free(&res);
        r->wall[k] = load_wall_ns(spec, ws);
        if (bad || !isfinite(r->wall[k]))
            return -1;
    }
    r->share_pct = 100 * (bench_cpu_now() - c0) / (bench_now() - w0);
    return 0;
}

static void load_print(const char *name, const load_reruns *r, double *spread)
{
    for (int k = 0; k < BENCH_LOAD_RERUNS; k++)
        printf("%-10s %5d %12.1f %8d %8.1f%% %12.1f\n", name, k + 1, r->cpu[k], r->reps[k],
               r->in_pass[k], r->wall[k]);
    load_stats c = load_stats_of(r->cpu, BENCH_LOAD_RERUNS);
    load_stats w = load_stats_of(r->wall, BENCH_LOAD_RERUNS);
    *spread = c.spread_pct;
    printf("%-10s thread CPU: median %.1f ns/step, spread %.1f%% (goal <= %.0f%%: %s)\n", name,
           c.med, c.spread_pct, BENCH_LOAD_GOAL, c.spread_pct <= BENCH_LOAD_GOAL ? "met" : "MISSED");
    printf("%-10s wall clock: median %.1f ns/step, spread %.1f%%; this thread got %.0f%% of a CPU\n",
           "", w.med, w.spread_pct, r->share_pct);
}

/* One method's reruns under load; its spread (percent) in *spread, -1 if a
 * run failed. */
static int load_method(const pb_problem *p, const char *name, double *spread)
{
    pb_case_spec spec;
    pb_case_spec_default(&spec);
    spec.problem = *p;
    spec.method = pb_method_find(name);
    spec.steps_per_orbit = BENCH_SPO;
    spec.orbits = BENCH_LOAD_ORBITS;
    spec.cache_dir = NULL;
    void *ws = spec.method ? spec.method->alloc(p->dim) : NULL;
    if (!ws)
        return -1;
    load_reruns r;
    int rc = load_rerun(&spec, ws, &r);
    spec.method->free(ws);
    if (!rc)
        load_print(name, &r, spread);
    return rc;
}

int bench_load(const pb_problem *p, double *worst_pct)
{
    static const char *const methods[] = {"rk4", "leapfrog"};
    long ncpu = sysconf(_SC_NPROCESSORS_ONLN);
    pid_t pids[BENCH_LOAD_MAX_HOGS];
    *worst_pct = (double)NAN;
    printf("== 5. The timing pass under load: %s, T/%d, %g orbits, %d reruns ==\n", p->name,
           BENCH_SPO, BENCH_LOAD_ORBITS, BENCH_LOAD_RERUNS);
    int nh = load_start(pids, ncpu > 0 ? (int)ncpu : 1);
    pb_case_spec d;
    pb_case_spec_default(&d);
    printf("   %d busy-loop processes keep all %ld CPUs busy throughout. Each rerun: pb_case_run\n"
           "   with the default %d repeats (its ns/step, the repeats it made, their interquartile\n"
           "   range over their median), then the same integration timed as the pass was before\n"
           "   (wall clock, median of %d)\n",
           nh, ncpu, d.repeats, d.repeats);
    printf("%-10s %5s %12s %8s %9s %12s\n", "method", "rerun", "ns/step CPU", "repeats",
           "IQR/med", "ns/step wall");
    int rc = 0;
    double worst = 0;
    for (int i = 0; i < 2 && !rc; i++) {
        double s = (double)NAN;
        rc = load_method(p, methods[i], &s);
        worst = fmax(worst, s);
    }
    load_stop(pids, nh);
    if (rc) {
        printf("   failed\n\n");
        return -1;
    }
    printf("   spread: (max - min) / median over the reruns; the timing pass uses thread CPU\n"
           "   time (%s), at least %.1f s of it over at least the spec's repeats\n\n",
           PB_TIMING_CLOCK, PB_TIMING_MIN_CPU_S);
    *worst_pct = worst;
    return 0;
}
