/* truth.h - what the harness compares against at its sample times: the exact
 * solution where the problem has one, else a reference trajectory computed
 * independently in extended precision (reference.c). */
#ifndef PB_TRUTH_H
#define PB_TRUTH_H

#include "problem.h"

typedef struct pb_truth pb_truth;

/* Truth at the n increasing sample times (absolute times, from p->t0).
 * cache_dir may be NULL (no caching). Owner: the caller (pb_truth_free);
 * p is copied. Returns PB_OK or a pb_status. */
int pb_truth_build(const pb_problem *p, const double *times, int n,
                   const char *cache_dir, pb_truth **out);
/* State at sample k, in long double. */
void pb_truth_state(const pb_truth *tr, int k, long double *r, long double *v);
/* Estimated position error of the truth itself at sample k (0: exact). A
 * measured error below 10 times this is "below the reference floor". */
double pb_truth_floor(const pb_truth *tr, int k);
int pb_truth_is_exact(const pb_truth *tr);
/* Move sample k's state (at time t) by dt (a few ulps of time, never more than a step's
 * round-off) with a second-order Taylor step on p's force: r += v dt +
 * a dt^2/2, v += a dt; the error, O(dt^3), is far below any floor. */
void pb_truth_shift(pb_truth *tr, int k, double t, double dt, const pb_problem *p);
void pb_truth_free(pb_truth *tr); /* accepts NULL */
/* How many exact truths this process's builds found in its memo (hits)
 * and computed (misses), for tests and diagnostics (see truth.c). */
void pb_truth_memo_counts(long *hits, long *misses);

#endif
