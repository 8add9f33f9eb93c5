/* bench_study.c - section 8 of `make bench`: `select` and the standard suite
 * as a user runs them, the propbench program in a child process, its CPU
 * time and its workers' (user + system, from wait4) against the goals of
 * issue 16. Each reference is built first into a fresh cache (cold), then
 * read from it (warm). Reporting only. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>
#include "bench/perf/bench.h"
#include "problems/files.h"

#define STUDY_BIN "build/propbench"

/* Run argv (argv[0] = STUDY_BIN) with stdout and stderr to /dev/null; the
 * CPU seconds of it and everything it waited for, NaN when it failed. */
static double study_cpu(char *const argv[], int ok_status_max)
{
    fflush(NULL); /* else the child's freopen writes our buffered report again */
    pid_t pid = fork();
    if (pid < 0)
        return (double)NAN;
    if (pid == 0) {
        if (!freopen("/dev/null", "w", stdout) || !freopen("/dev/null", "w", stderr))
            _exit(127);
        execv(argv[0], argv);
        _exit(127);
    }
    int st = 0;
    struct rusage ru;
    if (wait4(pid, &st, 0, &ru) != pid || !WIFEXITED(st) || WEXITSTATUS(st) > ok_status_max)
        return (double)NAN;
    return (double)ru.ru_utime.tv_sec + 1e-6 * (double)ru.ru_utime.tv_usec +
           (double)ru.ru_stime.tv_sec + 1e-6 * (double)ru.ru_stime.tv_usec;
}

/* A fresh scratch folder for caches and outputs; 0 or -1. */
static int study_scratch(char *dir, size_t n)
{
    const char *tmp = getenv("TMPDIR");
    snprintf(dir, n, "%s/pb-bench-study.XXXXXX", tmp && *tmp ? tmp : "/tmp");
    return mkdtemp(dir) ? 0 : -1;
}

int bench_study(double *leo_cold, double *leo_warm, double *k05, double *suite_warm)
{
    *leo_cold = *leo_warm = *k05 = *suite_warm = (double)NAN;
    char dir[256], cache[300], out[300], suite[300], suite_cache[300];
    if (access(STUDY_BIN, X_OK) || study_scratch(dir, sizeof dir)) {
        printf("== 8. skipped: needs %s and a scratch folder ==\n\n", STUDY_BIN);
        return -1;
    }
    snprintf(cache, sizeof cache, "%s/cache", dir);
    snprintf(out, sizeof out, "%s/select.json", dir);
    snprintf(suite, sizeof suite, "%s/suite", dir);
    /* its own cache, so that its cold run builds every reference it needs
     * (the select runs have just built leo-j2's) */
    snprintf(suite_cache, sizeof suite_cache, "%s/suite-cache", dir);
    char *leo[] = {STUDY_BIN, "select", "--problem", "leo-j2", "--horizon-s", "86400", "--max-pos-err-m", "1",
                   "--cache", cache, "--out", out, "--quiet", NULL};
    char *kep[] = {STUDY_BIN, "select", "--problem", "kepler-e0.5", "--orbits", "100", "--max-pos-err", "1e-6",
                   "--cache", cache, "--out", out, "--quiet", NULL};
    char *std[] = {STUDY_BIN, "sweep", "--suite", "standard", "-j", "2", "--repeats", "0", "--cache", suite_cache,
                   "--out", suite, "--quiet", NULL};
    printf("== 8. select and the standard suite as run (CPU s of the process and its workers) ==\n");
    *leo_cold = study_cpu(leo, 0);
    *leo_warm = study_cpu(leo, 0);
    *k05 = study_cpu(kep, 0);
    printf("   select --problem leo-j2 --horizon-s 86400 --max-pos-err-m 1: cold %.2f, warm %.2f\n",
           *leo_cold, *leo_warm);
    printf("   select --problem kepler-e0.5 --orbits 100 --max-pos-err 1e-6: %.2f\n", *k05);
    double suite_cold = study_cpu(std, 1);
    *suite_warm = study_cpu(std, 1);
    printf("   sweep --suite standard -j 2 --repeats 0: cold %.1f, warm %.1f\n\n", suite_cold, *suite_warm);
    pb_rm_tree(dir);
    return 0;
}
