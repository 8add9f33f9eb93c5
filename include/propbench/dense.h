/* propbench/dense.h - dense output from the ends of a step (public): the
 * quintic Hermite interpolant of positions, velocities and accelerations at
 * both ends, or the cubic one of positions and velocities where the
 * accelerations are not known, for any method that has no continuous
 * extension of its own. */
#ifndef PB_PUBLIC_DENSE_H
#define PB_PUBLIC_DENSE_H

#include "status.h"

#ifdef __cplusplus
extern "C" {
#endif

#define PB_DENSE_DIM_MAX 6   /* PB_STATE_DIM_MAX (method.h) */

/* The last step's two ends in two slots: slot `end` holds the newer one, so
 * a new end overwrites the older slot and nothing is shifted (this runs
 * after every step). Plain data, no allocation. */
typedef struct pb_dense_span {
    int dim, points;      /* points recorded so far: 0, 1 (a start), 2 (a step) */
    int end;              /* slot of the newer end (0 or 1) */
    double t[2];
    double r[2][PB_DENSE_DIM_MAX], v[2][PB_DENSE_DIM_MAX], a[2][PB_DENSE_DIM_MAX];
    int has_a[2];
} pb_dense_span;

/* The state a run starts from; a may be NULL (not known yet). */
PB_API void pb_dense_start(pb_dense_span *s, int dim, double t, const double *r, const double *v,
                           const double *a);

/* The end of a step just accepted: the previous end becomes its start. a may
 * be NULL. */
PB_API void pb_dense_push(pb_dense_span *s, double t, const double *r, const double *v,
                          const double *a);

/* The acceleration at the newest point, once it is known (a method that
 * evaluates it lazily at the start of its next step). */
PB_API void pb_dense_set_a(pb_dense_span *s, const double *a);

/* The state at t in [t[0], t[1]]: quintic Hermite when both ends have an
 * acceleration (position error O(h^6), velocity O(h^5)), else cubic Hermite
 * of positions and velocities (position O(h^4), velocity O(h^3)). The ends
 * themselves are returned exactly. PB_EINVAL when no step is recorded or t
 * lies outside it. */
PB_API int pb_dense_eval(const pb_dense_span *s, double t, double *r, double *v);

#ifdef __cplusplus
}
#endif

#endif
