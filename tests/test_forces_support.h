/* test_forces_support.h - helpers for the force-term tests
 * (tests/test_forces_*.c): an Earth-centred problem with given terms, GSL's
 * rk8pd (Prince & Dormand 1981) driving pb_forces_accel as an independent
 * integrator, osculating quantities and small vector helpers. */
#ifndef PBTF_FORCES_SUPPORT_H
#define PBTF_FORCES_SUPPORT_H

#include <gsl/gsl_odeiv2.h>
#include "problems/force_terms.h"

/* GSL's rk8pd on y = (r, v) with the force pb_forces_accel(p, ...). The
 * driver keeps pointers into the struct: do not move it after init. */
typedef struct pbtf_ode {
    gsl_odeiv2_system sys;
    gsl_odeiv2_driver *d;
    double scale[6];
} pbtf_ode;

/* Error per step below tol relative to the orbit's size: positions against
 * |r0| tol (+ tol |y|), velocities against |v0| tol (+ tol |y|). */
void pbtf_ode_init(pbtf_ode *o, const pb_problem *p, double tol);
/* Advance from *t to t1 (y updated); asserts GSL's success. */
void pbtf_ode_to(pbtf_ode *o, double *t, double t1, double *y);
void pbtf_ode_free(pbtf_ode *o);

/* An Earth problem (pb_body_earth's mu and radius) with the terms f at
 * state (r0, v0). */
void pbtf_earth_problem(pb_problem *p, const pb_forces *f, const double *r0, const double *v0);

double pbtf_dot(const double *a, const double *b);
double pbtf_norm(const double *a);
void pbtf_cross(const double *a, const double *b, double *c);

/* Osculating semi-major axis from the Kepler energy, -mu/(2E). */
double pbtf_osc_a(double mu, const double *r, const double *v);
/* Osculating inclination (rad) from the angular momentum vector. */
double pbtf_osc_incl(const double *r, const double *v);

/* Days from J2000.0 (JD 2451545.0, 2000-01-01 12h) to 0h of the Gregorian
 * date y-m-d in the same time scale. */
double pbtf_days_from_j2000(int y, int m, int d);

#endif
