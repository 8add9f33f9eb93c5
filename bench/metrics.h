/* metrics.h - errors of a numerical state against truth at one sample:
 * invariant drift, eccentricity-vector drift and apsidal angle, position and
 * velocity error, and the position error split in the true orbit's RIC frame. */
#ifndef PB_METRICS_H
#define PB_METRICS_H

#include "case.h"

/* Fill the pointwise fields of s (window maxima are the caller's). E0, H0 are
 * the initial invariants (NaN when the problem has none). */
void pb_metrics_sample(const pb_problem *p, double t, const double *r, const double *v,
                       const long double *rt, const long double *vt,
                       double E0, double H0, pb_sample *s);

/* Relative error |x - x0| / |x0| (absolute when x0 == 0). */
double pb_rel_err(double x, double x0);

/* Angle (rad) from vector e0 to e1 about the axis n, in (-pi, pi]. */
double pb_angle_about(const double *e0, const double *e1, const double *n);

#endif
