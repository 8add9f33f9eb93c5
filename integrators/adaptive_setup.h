/* adaptive_setup.h - what our adaptive methods set up alike, in one place:
 * the absolute tolerances they derive from the configuration and the
 * automatic first step. */
#ifndef PB_ADAPTIVE_SETUP_H
#define PB_ADAPTIVE_SETUP_H

#include "propbench/method.h"

/* atol[0..2 dim) for the state (r, v) of dimension dim: cfg->atol where it is
 * given, else rtol times the initial size of the component's own vector.
 * PB_EINVAL for negative, non-finite or all-zero tolerances. */
int pb_adaptive_tolerances(const pb_method_config *cfg, int dim, const double *r0,
                           const double *v0, double *atol);

/* The automatic first step (Hairer, Norsett & Wanner I, Sec. II.4), in two
 * parts around the one force evaluation it needs. d0 and d1 are the scaled
 * norms of y0 and f(y0); scale is the problem's time scale (used when either
 * is tiny). First the trial step h0 at which f is evaluated; then, with d2 =
 * ||f(y0 + h0 f(y0)) - f(y0)|| / h0, the step for a method whose local error
 * is O(h^k): min(100 h0, (0.01 / max(d1, d2))^(1/k)). */
double pb_first_step_trial(double d0, double d1, double scale);
double pb_first_step(double h0, double d1, double d2, double k, double scale);

#endif
