/* reference_step.h - one extrapolated step of the reference integrator
 * (reference_step.c), internal to problems/reference*.c: the force as the
 * reference evaluates it and the map of a step's time near a shadow edge. */
#ifndef PB_REFERENCE_STEP_H
#define PB_REFERENCE_STEP_H

#include "problems/problem.h"
#include "problems/ephemeris_fit.h"

typedef __float128 ref_real;

#define REF_N 6                 /* state (r, v), 3 + 3 */
#define REF_K 10                /* extrapolation columns: order 2K */

/* How a step's time is stretched near a located boundary. At a penumbra's
 * edges the visible fraction goes as depth^(3/2) (the overlap of two discs),
 * so the force has a (t - t_b)^(3/2) term there that no extrapolation step
 * resolves without shrinking towards the edge. A step [t0, t0 + H] with an
 * edge at one end is therefore taken in s in [0, 1] with t = t0 + H phi(s),
 * phi(s) = s^2 (edge at the start), 1 - (1 - s)^2 (at the end) or
 * 3s^2 - 2s^3 (both): along the trajectory the edge term becomes a power of
 * s of degree 3 (a change of variables of the kind used for integrable
 * end-point singularities in quadrature; common practice). The substeps'
 * states stray from the trajectory, across the boundary, so the step's
 * error still goes as H^(5/2), but about 100 times smaller than unmapped
 * (measured; reference.c, ref_edge_step). */
enum { REF_MAP_NONE = 0, REF_MAP_START = 1, REF_MAP_END = 2, REF_MAP_BOTH = 3 };

/* The force as the reference evaluates it: the problem, the shadow region
 * whose formula holds until the next located boundary, and the time map of
 * the step being taken. */
typedef struct ref_force {
    const pb_problem *p;
    int region;             /* shadow region (-1: none) */
    int band;               /* atmosphere row (-1: no drag) */
    pb_ephemeris_fit *fit;  /* the time-only bodies over the current step (NULL: none) */
    int map;                /* REF_MAP_*: then the derivative is taken in s */
    ref_real mt0, mH;       /* the mapped step's physical start and length */
} ref_force;

/* One extrapolated step of size H from (t0, y0) with K columns (order 2K),
 * its time mapped by map (REF_MAP_*); y1 receives the result, the return
 * value is the scaled error estimate (relative to |r| and |v| separately). */
ref_real pb_ref_step(const ref_force *F, ref_real t0, const ref_real *y0, ref_real H, int map,
                     int K, ref_real *y1);
ref_real pb_ref_norm3(const ref_real *x);
/* Whether all REF_N components of y are finite. */
int pb_ref_finite(const ref_real *y);

#endif
