/* metrics.h - errors of a numerical state against truth at one sample:
 * invariant drift, eccentricity-vector drift and apsidal angle, position and
 * velocity error, and the position error split in the true orbit's RIC frame. */
#ifndef PB_METRICS_H
#define PB_METRICS_H

#include "bench/measure/case.h"

/* Fill the pointwise fields of s (window maxima are the caller's). E0, H0 are
 * the initial invariants (NaN when the problem has none); the energy error
 * is relative to E_scale (pb_energy_scale). */
void pb_metrics_sample(const pb_problem *p, double t, const double *r, const double *v,
                       const long double *rt, const long double *vt,
                       double E0, double E_scale, double H0, pb_sample *s);

/* What an energy error is relative to: |E0|, except for a nearly parabolic
 * start (|E0| below 1e-6 of v0^2/2 + mu/|r0|), where |E0| is a small
 * difference of two large energies (at a parabola, pure round-off) and an
 * error relative to it measures that cancellation more than the method;
 * there it is v0^2/2 + mu/|r0|, the size of the two energies that cancel
 * (common practice). */
double pb_energy_scale(const pb_problem *p, double E0);

/* Relative error |x - x0| / |x0| (absolute when x0 == 0). */
double pb_rel_err(double x, double x0);
/* What an angular-momentum error is relative to: |H0|, except for h_z of a
 * (nearly) polar orbit (|h_z| under 1e-3 of |h|), where |h| is used, since
 * h_z is then a round-off residue. */
double pb_angmom_scale(const pb_problem *p, double H0);

/* Angle (rad) from vector e0 to e1 about the axis n, in (-pi, pi]. */
double pb_angle_about(const double *e0, const double *e1, const double *n);

#endif
