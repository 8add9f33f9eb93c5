/* twobody.h - two-body mechanics: invariants, classical elements <-> state,
 * Kepler's equation, and the exact flow by universal variables in double and
 * __float128. Angles are radians. */
#ifndef PB_TWOBODY_H
#define PB_TWOBODY_H

#include "problem.h"

/* Classical elements. Undefined angles follow one convention (documented in
 * elements.c): circular orbits put periapsis at the ascending node (argp = 0),
 * equatorial orbits put the node on +x (raan = 0). */
typedef struct pb_elements {
    double a;     /* semi-major axis (negative for hyperbolas) */
    double e;
    double i, raan, argp, nu;
    double p;     /* semi-latus rectum */
} pb_elements;

/* -mu r/|r|^3: the problem's force when nothing else acts (force_terms.c
 * recognises it as having a __float128 form). */
int pb_twobody_accel(const pb_problem *p, double t, const double *r, const double *v, double *a);
double pb_twobody_energy(double mu, const double *r, const double *v);
void pb_twobody_angmom_vec(const double *r, const double *v, double *h);
void pb_twobody_eccvec(double mu, const double *r, const double *v, double *e);
/* Kepler's third law; a > 0 */
double pb_twobody_period(double mu, double a);

/* Elements from a state; PB_EINVAL for a degenerate state (r = 0, h = 0). */
int pb_elements_from_state(double mu, const double *r, const double *v, pb_elements *el);
/* State from elements; PB_EINVAL for nonsense (e < 0, p <= 0, a parabola given by a). */
int pb_state_from_elements(double mu, const pb_elements *el, double *r, double *v);

/* Eccentric anomaly E from mean anomaly M, 0 <= e < 1, to machine precision. */
double pb_kepler_solve(double M, double e);
/* Hyperbolic anomaly H from M = e sinh H - H, e > 1. */
double pb_kepler_solve_hyperbolic(double M, double e);

/* The exact two-body flow over dt by universal variables (any conic). */
int pb_universal_propagate(double mu, const double *r0, const double *v0, double dt,
                           double *r, double *v);
int pb_universal_propagate_q(__float128 mu, const __float128 *r0, const __float128 *v0,
                             __float128 dt, __float128 *r, __float128 *v);

/* Unit radial R = r/|r|, cross-track C = r x v/|r x v| and in-track I = C x R. */
void pb_ric_frame(const double *r, const double *v, double *R, double *I, double *C);

/* Fill p with a two-body problem from a state (dim 3): force, invariants,
 * period (0 if not elliptic) and the exact solution. */
void pb_problem_init_twobody(pb_problem *p, const char *name, const char *description,
                             pb_units units, double mu, const double *r0, const double *v0);

#endif
