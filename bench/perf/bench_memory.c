/* bench_memory.c - section 4 of `make bench`: peak memory against horizon,
 * the resident-set peak of a forked child running one case for 10^3 and for
 * 10^5 orbits, against a child that does nothing. */
#include <stdio.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/time.h>
#include <sys/wait.h>
#include <unistd.h>
#include "bench/perf/bench.h"
#include "problems/catalogue.h"

/* Peak resident set (KiB) of a child that runs the case, or does nothing
 * when spec is NULL; -1 on failure. */
static long bench_child_maxrss(const pb_case_spec *spec, double *sec, long *steps)
{
    int fd[2];
    if (pipe(fd))
        return -1;
    fflush(NULL);
    double t0 = bench_now();
    pid_t pid = fork();
    if (pid < 0)
        return -1;
    if (pid == 0) {
        close(fd[0]);
        long n = 0;
        int ok = 1;
        if (spec) {
            pb_case_result res;
            ok = pb_case_run(spec, &res) == 0 && res.status == PB_OK;
            n = res.steps;
            pb_case_result_free(&res);
        }
        ssize_t w = write(fd[1], &n, sizeof n);
        _exit(ok && w == (ssize_t)sizeof n ? 0 : 1);
    }
    close(fd[1]);
    long n = 0;
    if (read(fd[0], &n, sizeof n) != (ssize_t)sizeof n)
        n = -1;
    close(fd[0]);
    int st = 0;
    struct rusage ru;
    if (wait4(pid, &st, 0, &ru) < 0 || !WIFEXITED(st) || WEXITSTATUS(st) != 0)
        return -1;
    *sec = bench_now() - t0;
    *steps = n;
    return ru.ru_maxrss;
}

int bench_memory(double *diff_pct)
{
    pb_case_spec spec;
    memset(&spec, 0, sizeof spec);
    *diff_pct = (double)NAN;
    if (pb_problem_lookup("kepler-e0", &spec.problem) || !(spec.method = pb_method_find("leapfrog"))) {
        printf("== 4. skipped: kepler-e0 or leapfrog missing ==\n\n");
        return -1;
    }
    spec.steps_per_orbit = 100;
    spec.repeats = 1;
    double s0, s1, s2;
    long n0, n1, n2;
    long base = bench_child_maxrss(NULL, &s0, &n0);
    spec.orbits = 1e3;
    long m1 = bench_child_maxrss(&spec, &s1, &n1);
    spec.orbits = 1e5;
    long m2 = bench_child_maxrss(&spec, &s2, &n2);
    printf("== 4. Peak memory (ru_maxrss of a forked child running pb_case_run):"
           " leapfrog, kepler-e0, T/100 ==\n");
    if (base < 0 || m1 < 0 || m2 < 0) {
        printf("   failed to measure (child exited abnormally)\n\n");
        return -1;
    }
    printf("%-34s %10s %12s %9s\n", "run", "steps", "maxrss KiB", "wall s");
    printf("%-34s %10s %12ld %9.2f\n", "child doing nothing (baseline)", "-", base, s0);
    printf("%-34s %10ld %12ld %9.2f\n", "10^3 orbits", n1, m1, s1);
    printf("%-34s %10ld %12ld %9.2f\n", "10^5 orbits", n2, m2, s2);
    *diff_pct = 100.0 * fabs((double)(m2 - m1)) / (double)m1;
    printf("   10^5 vs 10^3 orbits: %+ld KiB (%.2f%% of the 10^3-orbit peak);"
           " above baseline: %ld vs %ld KiB\n\n", m2 - m1, *diff_pct, m2 - base, m1 - base);
    return 0;
}
