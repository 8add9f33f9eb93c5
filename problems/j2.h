/* j2.h - the J2 zonal perturbation of an oblate central body added to the
 * two-body force (axisymmetric about z): energy including the J2 potential
 * and the conserved h_z (force_terms.h evaluates them). */
#ifndef PB_J2_H
#define PB_J2_H

#include "problem.h"

/* Fill p with a J2 problem (km-s, dim 3) from a state. The period is the
 * osculating two-body period of the initial state (the time scale); there is
 * no exact solution (exact = NULL), so the harness builds a reference. The
 * acceleration is -grad(V), V = -mu/r + mu J2 R^2 (3 z^2/r^2 - 1)/(2 r^3). */
void pb_problem_init_j2(pb_problem *p, const char *name, const char *description,
                        double mu, double radius, double j2,
                        const double *r0, const double *v0);

#endif
