/* test_forces_memo.c - the Sun, Moon and circular-body places that
 * pb_forces_accel remembers for the last few times asked on a thread
 * (force_terms.c): an answer from the memo is the value a thread with an
 * empty memo computes, bit for bit, whatever other problems (another
 * epoch, other bodies) asked at the same times in between. */
#include <criterion/criterion.h>
#include <pthread.h>
#include <string.h>
#include "test_forces_support.h"

#define MEMO_PROBLEMS 5
#define MEMO_TIMES 11   /* more than the memo's slots: every slot is reused */

/* Five Earth problems that differ only in what the memo's key holds: Sun
 * and Moon at two epochs, radiation pressure alone (the Sun's place), and
 * a circular body on two orbits (invented values). */
static void memo_problems(pb_problem p[MEMO_PROBLEMS])
{
    const double r0[3] = {42164.0, 0, 0}, v0[3] = {0, 3.0747, 0.05};
    pb_forces f;
    memset(&f, 0, sizeof f);
    f.sun = f.moon = 1;
    f.epoch_days = 9497.5; /* 2026-01-01 12:00 TT, an invented epoch */
    f.has_epoch = 1;
    pbtf_earth_problem(&p[0], &f, r0, v0);
    f.epoch_days += 13.7;
    pbtf_earth_problem(&p[1], &f, r0, v0);
    f.sun = f.moon = 0;
    f.srp_area_mass_m2_kg = 0.02;
    f.cr = 1.3;
    pbtf_earth_problem(&p[2], &f, r0, v0);
    memset(&f, 0, sizeof f);
    f.circular = 1;
    f.circ.mu = 4902.8, f.circ.radius = 384400, f.circ.rate = 2.66e-6;
    pbtf_earth_problem(&p[3], &f, r0, v0);
    f.circ.radius = 300000;
    pbtf_earth_problem(&p[4], &f, r0, v0);
}

typedef struct memo_table {
    pb_problem p[MEMO_PROBLEMS];
    double a[MEMO_PROBLEMS][MEMO_TIMES][3];
} memo_table;

static double memo_time(int k) { return 600.0 * (k % 7) + 0.25 * k; }

/* Every problem at every time, problems inner, so that each time is asked
 * by five keys in a row. */
static void memo_fill(memo_table *m)
{
    const double r[3] = {41000.0, 9000.0, 800.0}, v[3] = {-0.6, 3.0, 0.04};
    for (int k = 0; k < MEMO_TIMES; k++)
        for (int j = 0; j < MEMO_PROBLEMS; j++)
            cr_assert_eq(pb_forces_accel(&m->p[j], memo_time(k), r, v, m->a[j][k]), PB_OK);
}

typedef struct memo_one {
    const pb_problem *p;
    double t, a[3];
} memo_one;

/* One acceleration on a thread of its own: a memo that has seen nothing. */
static void *memo_fresh_thread(void *arg)
{
    memo_one *o = arg;
    const double r[3] = {41000.0, 9000.0, 800.0}, v[3] = {-0.6, 3.0, 0.04};
    cr_assert_eq(pb_forces_accel(o->p, o->t, r, v, o->a), PB_OK);
    return NULL;
}

Test(forces_memo, answers_equal_a_fresh_threads)
{
    static memo_table warm;
    memo_problems(warm.p);
    /* this thread's memo: filled twice, each time asked again in an order
     * that makes the memo answer some and recompute the rest */
    memo_fill(&warm);
    memo_fill(&warm);
    for (int j = 0; j < MEMO_PROBLEMS; j++)
        for (int k = 0; k < MEMO_TIMES; k++) {
            memo_one o = {&warm.p[j], memo_time(k), {0, 0, 0}};
            pthread_t th;
            cr_assert_eq(pthread_create(&th, NULL, memo_fresh_thread, &o), 0);
            cr_assert_eq(pthread_join(th, NULL), 0);
            cr_assert_eq(memcmp(o.a, warm.a[j][k], sizeof o.a), 0, "problem %d, time %d", j, k);
        }
    /* and the key tells the problems apart: the two epochs and the other
     * bodies give other accelerations at the same time and place */
    for (int j = 1; j < MEMO_PROBLEMS; j++)
        cr_assert(memcmp(warm.a[0][3], warm.a[j][3], sizeof warm.a[0][3]) != 0, "problem %d", j);
}
