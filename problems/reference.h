/* reference.h - reference trajectories for problems without an exact
 * solution: an extrapolation integrator (Gragg-Bulirsch-Stoer) in __float128,
 * independent of the methods under test, run at two tolerances whose difference
 * is the reference's own error estimate; results cached on disk by a key
 * (reference_cache.h). */
#ifndef PB_REFERENCE_H
#define PB_REFERENCE_H

#include <stdint.h>
#include "problem.h"

/* States at the n increasing absolute times (>= p->t0) into r and v
 * (n x PB_DIM_MAX each, unused components 0) and the estimated position error
 * of each state into floor (problem length units). cache_dir may be NULL (no
 * cache); it is created if missing. Arrays are the caller's. */
int pb_reference_build(const pb_problem *p, const double *times, int n,
                       const char *cache_dir, long double *r, long double *v,
                       double *floor);

/* One propagation at the given local tolerance (relative, per step) from
 * p->t0 to the n times; steps (may be NULL) receives the accepted steps.
 * Exposed for tests of the integrator itself. */
int pb_reference_propagate(const pb_problem *p, const double *times, int n,
                           long double tol, long double *r, long double *v,
                           long *steps);

/* Cache key: a 64-bit FNV-1a hash of every problem field that affects the
 * trajectory, the sample times and the integrator's settings. */
uint64_t pb_reference_key(const pb_problem *p, const double *times, int n);

#endif
