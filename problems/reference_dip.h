/* reference_dip.h - whether a step of the reference trajectory whose two
 * ends lie on the same side of every shadow boundary may still have passed
 * through the shadow between them (a short or grazing eclipse inside one
 * long step), judged from the shadow functions sampled along a model of the
 * step's trajectory (reference_dip.c). */
#ifndef PB_REFERENCE_DIP_H
#define PB_REFERENCE_DIP_H

#include "problem.h"

/* For the step of length H from (t0, y0) to y1 (y = r, v), with band the
 * atmosphere row and nshadow the number of shadow functions
 * (pb_forces_events_q): 0 when no shadow function can have dipped through
 * zero inside the step, else the fraction of the step (within 1/64 of its
 * ends) where the first suspected dip lies, to which the step is to be cut. */
__float128 pb_ref_shadow_dip(const pb_problem *p, int band, int nshadow, __float128 t0,
                             const __float128 *y0, __float128 H, const __float128 *y1);

/* The boundary functions (pb_forces_events_q) at t, as the mean of their
 * values at t +- dt along the state's velocity, and their rates by that
 * central difference (the acceleration's part cancels); how many. */
int pb_ref_event_rates(const pb_problem *p, int band, __float128 t, const __float128 *y, __float128 dt,
                       __float128 *g, __float128 *rate);

/* Where shadow function j, whose sign differs at the step's two ends,
 * crosses zero by the same Hermite model: the fraction of the step in
 * (0, 1), a first guess for the root finder (0: no sign change). */
__float128 pb_ref_shadow_root(const pb_problem *p, int band, int j, __float128 t0,
                              const __float128 *y0, __float128 H, const __float128 *y1);

#endif
