/* j2.h - the J2 zonal perturbation of an oblate central body added to the
 * two-body force (axisymmetric about z): acceleration, energy including the
 * J2 potential, and the conserved h_z. */
#ifndef PB_J2_H
#define PB_J2_H

#include "problem.h"

/* Acceleration -grad(V), V = -mu/r + mu J2 R^2 (3 z^2/r^2 - 1)/(2 r^3). */
int pb_j2_accel(const pb_problem *p, double t, const double *r, const double *v, double *a);
/* v^2/2 + V: conserved by the exact flow. */
double pb_j2_energy(const pb_problem *p, double t, const double *r, const double *v);
/* z component of r x v: conserved because the field is axisymmetric. */
double pb_j2_hz(const pb_problem *p, const double *r, const double *v);

/* Fill p with a J2 problem (km-s, dim 3) from a state. The period is the
 * osculating two-body period of the initial state (the time scale); there is
 * no exact solution (exact = NULL), so the harness builds a reference. */
void pb_problem_init_j2(pb_problem *p, const char *name, const char *description,
                        double mu, double radius, double j2,
                        const double *r0, const double *v0);

#endif
