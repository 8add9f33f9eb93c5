/* force_terms.h - a problem made of the central attraction and the terms of
 * forces.h: its acceleration, energy and angular momentum in double, and the
 * same force in __float128 for the reference trajectory
 * (force_terms_quad.c). */
#ifndef PB_FORCE_TERMS_H
#define PB_FORCE_TERMS_H

#include "problem.h"
#include "twobody.h"

int pb_forces_accel(const pb_problem *p, double t, const double *r, const double *v, double *a);
/* Energy of the conservative terms (two-body, zonal, gamma/r^2). */
double pb_forces_energy(const pb_problem *p, double t, const double *r, const double *v);
double pb_forces_hz(const pb_problem *p, const double *r, const double *v);
double pb_forces_h(const pb_problem *p, const double *r, const double *v);

/* Fill p with a central-body problem (dim 3) of parameter mu and body radius
 * radius plus the terms f (copied); with no terms it is the plain two-body
 * problem with its exact solution. Terms make the exact solution NULL (a
 * reference is built), the force velocity-dependent with drag, and the
 * invariants measured against the truth with dissipative terms. */
void pb_problem_init_forces(pb_problem *p, const char *name, const char *description,
                            pb_units units, double mu, double radius, const pb_forces *f,
                            const double *r0, const double *v0);

/* The acceleration of p in __float128 into dy[3..5] (dy[0..2] = v), y = (r, v).
 * pos (may be NULL) holds the time-only bodies' positions at t.
 * region (pb_forces_region_q; -1: from the geometry at y) fixes the shadow
 * formula used, and band (pb_forces_band_q; -1: from the altitude) the row of
 * the atmosphere table, so that a step between located boundaries sees a
 * smooth force. PB_EINVAL when p's force has no __float128 form (a force this file
 * does not know is refused, never integrated as two-body). */
int pb_forces_deriv_q(const pb_problem *p, __float128 t, const __float128 *y, int region,
                      int band, __float128 (*pos)[3], __float128 *dy);
/* Whether p has bodies whose positions depend on time alone (Sun, Moon, a
 * circular body); their positions at t (pb_forces_deriv_q's pos, which
 * NULL computes afresh; the reference interpolates them over a step). */
int pb_forces_timed_bodies(const pb_problem *p);
void pb_forces_bodies_q(const pb_problem *p, __float128 t, __float128 (*pos)[3]);
/* The shadow region (sunlight, penumbra, umbra) that the boundary functions
 * g (pb_forces_events_q) put a state in; -1 without a shadow model. */
int pb_forces_region_q(const pb_problem *p, const __float128 *g);
/* Whether region's formula has terms in (t - t_b)^(3/2) at its edges: the
 * conical penumbra, where the visible part of the Sun's disc is the overlap
 * of two discs (an area that grows as depth^(3/2)). */
int pb_forces_region_has_edge_terms(const pb_problem *p, int region);
/* The shadow boundary functions of pb_forces_events_q in double at (t, r),
 * positive in sunlight; how many (0: no shadow model). */
int pb_forces_shadow_g(const pb_problem *p, double t, const double *r, double *g);
/* sqrt(x) in __float128, faster than sqrtq and within 2 ulp of it. */
__float128 pb_sqrt_q(__float128 x);
/* Whether p's force has a __float128 form. */
int pb_forces_have_quad(const pb_problem *p);
/* The functions whose zeros are jumps in the force at (t, r), positive on
 * the current side: shadow boundaries (*nshadow of them, first), then with
 * drag the two bounds of atmosphere row band (-1: the row of r); at most 4.
 * Returns how many. */
int pb_forces_events_q(const pb_problem *p, __float128 t, const __float128 *r, int band,
                       __float128 *g, int *nshadow);
/* The atmosphere row of the altitude of r; -1 without drag. */
int pb_forces_band_q(const pb_problem *p, const __float128 *r);

#endif
