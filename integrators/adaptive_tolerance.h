/* adaptive_tolerance.h - the absolute tolerances every adaptive method of
 * ours derives from its configuration, in one place. */
#ifndef PB_ADAPTIVE_TOLERANCE_H
#define PB_ADAPTIVE_TOLERANCE_H

#include "propbench/method.h"

/* atol[0..2 dim) for the state (r, v) of dimension dim: cfg->atol where it is
 * given, else rtol times the initial size of the component's own vector.
 * PB_EINVAL for negative, non-finite or all-zero tolerances. */
int pb_adaptive_tolerances(const pb_method_config *cfg, int dim, const double *r0,
                           const double *v0, double *atol);

#endif
