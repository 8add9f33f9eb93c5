/* revolving.h - Newton's revolving orbit (Principia I, Prop. 44): the Kepler
 * problem plus the potential -gamma/r^2, an exactly solvable precessing
 * orbit. Its exact flow in double and __float128, and the problem built on
 * it (force terms of forces.h, exact solution as truth). */
#ifndef PB_REVOLVING_H
#define PB_REVOLVING_H

#include "problem.h"

/* The exact state (r, v) at dt after (r0, v0) under -mu r/|r|^3 - 2 gamma
 * r/|r|^4 (any dt, any number of turns). PB_EINVAL for mu <= 0, r0 = 0,
 * zero angular momentum h, 2 gamma >= h^2, or an orbit whose radial motion
 * is not bounded (its auxiliary Kepler orbit not an ellipse). */
int pb_revolving_propagate(double mu, double gamma, const double *r0, const double *v0,
                           double dt, double *r, double *v);
int pb_revolving_propagate_q(__float128 mu, __float128 gamma, const __float128 *r0,
                             const __float128 *v0, __float128 dt, __float128 *r, __float128 *v);

/* Fill p (normalized units) with the revolving orbit whose radial motion is
 * that of the Kepler orbit (mu, a, e): it starts at periapsis r0 = a(1-e)
 * on +x and moves in the x-y plane with angular momentum
 * h = sqrt(mu a (1 - e^2) + 2 gamma). period is the radial period
 * 2 pi sqrt(a^3/mu); energy v^2/2 - mu/r - gamma/r^2 and |h| are its
 * invariants; exact and exact_q its closed form. PB_EINVAL for mu <= 0,
 * a <= 0, e outside [0, 1), or mu a (1 - e^2) + 2 gamma <= 0. */
int pb_problem_init_revolving(pb_problem *p, const char *name, const char *description,
                              double mu, double gamma, double a, double e);

#endif
