/* test_truth_memo.c - the memo of exact truths (problems/truth.c): a truth
 * built again for the same problem and times is the exact solution's values
 * (what the memo hands back), a truth the harness shifted afterwards does not
 * change what the next build gets, and a problem or times that differ by
 * one ulp get their own exact values, never the memo's. Checked against the
 * problem's exact_q evaluated directly (universal variables in __float128). */
#include <criterion/criterion.h>
#include <math.h>
#include <quadmath.h>
#include <string.h>
#include <sys/wait.h>
#include <unistd.h>
#include "bench/measure/harness.h"
#include "bench/measure/case.h"
#include "problems/catalogue.h"
#include "problems/truth.h"

#define MEMO_N 5

/* 1 when every sample of tr equals p's exact state at times, to the bit of
 * the long double the truth stores. */
static int memo_matches_exact(const pb_truth *tr, const pb_problem *p, const double *times, int n)
{
    for (int k = 0; k < n; k++) {
        __float128 rq[PB_DIM_MAX] = {0}, vq[PB_DIM_MAX] = {0};
        if (p->exact_q(p, times[k], rq, vq))
            return 0;
        long double r[PB_DIM_MAX], v[PB_DIM_MAX];
        pb_truth_state(tr, k, r, v);
        for (int i = 0; i < 3; i++)
            if (r[i] != (long double)rq[i] || v[i] != (long double)vq[i])
                return 0;
    }
    return 1;
}

/* The named problem and MEMO_N sample times over its first 36.5 orbits. */
static void memo_problem(const char *name, pb_problem *p, double *t)
{
    cr_assert_eq(pb_problem_lookup(name, p), PB_OK);
    for (int k = 0; k < MEMO_N; k++)
        t[k] = p->t0 + (k + 1) * 7.3 * p->period;
}

Test(truth_memo, a_second_build_is_the_exact_solution)
{
    pb_problem p;
    double t[MEMO_N];
    memo_problem("kepler-e0.6", &p, t);
    pb_truth *a = NULL, *b = NULL;
    long hits, misses;
    cr_assert_eq(pb_truth_build(&p, t, MEMO_N, NULL, &a), PB_OK);
    pb_truth_memo_counts(&hits, &misses);
    cr_expect(hits == 0 && misses == 1, "%ld hits, %ld misses", hits, misses);
    cr_assert_eq(pb_truth_build(&p, t, MEMO_N, NULL, &b), PB_OK);
    pb_truth_memo_counts(&hits, &misses);
    cr_expect(hits == 1 && misses == 1, "%ld hits, %ld misses: the second build missed", hits, misses);
    cr_assert_neq(a, b); /* a copy each: the caller owns and may shift it */
    cr_expect(memo_matches_exact(a, &p, t, MEMO_N));
    cr_expect(memo_matches_exact(b, &p, t, MEMO_N));
    pb_truth_free(a);
    pb_truth_free(b);
}

Test(truth_memo, a_shifted_copy_leaves_the_memo_as_built)
{
    pb_problem p;
    double t[MEMO_N];
    memo_problem("kepler-e0.5", &p, t);
    pb_truth *a = NULL, *b = NULL;
    cr_assert_eq(pb_truth_build(&p, t, MEMO_N, NULL, &a), PB_OK);
    pb_truth_shift(a, MEMO_N - 1, t[MEMO_N - 1], -1e-9, &p);
    cr_expect(!memo_matches_exact(a, &p, t, MEMO_N));
    cr_assert_eq(pb_truth_build(&p, t, MEMO_N, NULL, &b), PB_OK);
    cr_expect(memo_matches_exact(b, &p, t, MEMO_N));
    pb_truth_free(a);
    pb_truth_free(b);
}

/* mu, an initial component, one time and the revolving orbit's gamma each
 * moved by an ulp after the first truth is in the memo: each build is its
 * own problem's */
Test(truth_memo, one_ulp_apart_is_another_truth)
{
    pb_problem p;
    double t[MEMO_N];
    memo_problem("kepler-e0.9", &p, t);
    pb_truth *tr = NULL;
    cr_assert_eq(pb_truth_build(&p, t, MEMO_N, NULL, &tr), PB_OK);
    pb_truth_free(tr);

    pb_problem q = p;
    q.mu = nextafter(p.mu, INFINITY);
    cr_assert_eq(pb_truth_build(&q, t, MEMO_N, NULL, &tr), PB_OK);
    cr_expect(memo_matches_exact(tr, &q, t, MEMO_N));
    cr_expect(!memo_matches_exact(tr, &p, t, MEMO_N));
    pb_truth_free(tr);

    q = p;
    q.v0[1] = nextafter(p.v0[1], INFINITY);
    cr_assert_eq(pb_truth_build(&q, t, MEMO_N, NULL, &tr), PB_OK);
    cr_expect(memo_matches_exact(tr, &q, t, MEMO_N));
    cr_expect(!memo_matches_exact(tr, &p, t, MEMO_N));
    pb_truth_free(tr);

    double u[MEMO_N];
    memcpy(u, t, sizeof u);
    u[2] = nextafter(t[2], INFINITY);
    cr_assert_eq(pb_truth_build(&p, u, MEMO_N, NULL, &tr), PB_OK);
    cr_expect(memo_matches_exact(tr, &p, u, MEMO_N));
    cr_expect(!memo_matches_exact(tr, &p, t, MEMO_N));
    pb_truth_free(tr);
    /* the revolving orbit's exact solution reads its force's gamma */
    pb_problem rv, rw;
    double tv[MEMO_N];
    memo_problem("revolving-e0.5", &rv, tv);
    cr_assert_eq(pb_truth_build(&rv, tv, MEMO_N, NULL, &tr), PB_OK);
    pb_truth_free(tr);
    rw = rv;
    rw.forces.inverse_cube_gamma = nextafter(rv.forces.inverse_cube_gamma, INFINITY);
    cr_assert_eq(pb_truth_build(&rw, tv, MEMO_N, NULL, &tr), PB_OK);
    cr_expect(memo_matches_exact(tr, &rw, tv, MEMO_N));
    cr_expect(!memo_matches_exact(tr, &rv, tv, MEMO_N));
    pb_truth_free(tr);
    /* six builds, six problems or time sets: no hit */
    long hits, misses;
    pb_truth_memo_counts(&hits, &misses);
    cr_expect(hits == 0 && misses == 6, "%ld hits, %ld misses", hits, misses);
}

/* What the sweep's parent does before it forks: pb_case_truth_warm builds
 * the case's truth (each test is a process of its own: the memo starts
 * empty), and the run after it finds it there and measures the same error
 * to the bit as a second process's run that had to build it (a fork). */
Test(truth_memo, a_warmed_case_finds_its_truth)
{
    pb_case_spec s;
    pb_case_spec_default(&s);
    cr_assert_eq(pb_problem_lookup("kepler-e0", &s.problem), PB_OK);
    s.method = pb_method_find("rk4");
    cr_assert_not_null(s.method);
    s.steps_per_orbit = 40;
    s.orbits = 3;
    s.repeats = 0;
    int fd[2];
    cr_assert_eq(pipe(fd), 0);
    pid_t pid = fork();
    cr_assert_geq(pid, 0);
    if (pid == 0) {
        /* a cold run: nothing warmed, the truth built in the run */
        pb_case_result r;
        double e = pb_case_run(&s, &r) == PB_OK ? r.pos_err_max : -1;
        _exit(write(fd[1], &e, sizeof e) == (ssize_t)sizeof e ? 0 : 1);
    }
    double cold = -2;
    cr_assert_eq(read(fd[0], &cold, sizeof cold), (ssize_t)sizeof cold);
    waitpid(pid, NULL, 0);
    long hits, misses;
    pb_case_truth_warm(&s);
    pb_truth_memo_counts(&hits, &misses);
    cr_expect(hits == 0 && misses == 1, "warm: %ld hits, %ld misses", hits, misses);
    pb_case_result warm;
    cr_assert_eq(pb_case_run(&s, &warm), PB_OK);
    pb_truth_memo_counts(&hits, &misses);
    cr_expect(hits == 1 && misses == 1, "run after the warm: %ld hits, %ld misses", hits, misses);
    cr_expect_gt(cold, 0);
    cr_expect_eq(warm.pos_err_max, cold);
    pb_case_result_free(&warm);
}
