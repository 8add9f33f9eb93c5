/* cr3bp.h - the circular restricted three-body problem in the rotating frame
 * (unit distance, unit angular rate, masses 1 - mu and mu on the x axis). */
#ifndef PB_CR3BP_H
#define PB_CR3BP_H

#include "problem.h"

/* Arenstorf's periodic orbit (Hairer, Norsett, Wanner, Solving ODEs I, Sec. II.0). */
#define PB_ARENSTORF_MU 0.012277471
#define PB_ARENSTORF_VY0 (-2.00158510637908252240537862224)
#define PB_ARENSTORF_PERIOD 17.0652165601579625588917206249

/* Rotating-frame acceleration including Coriolis and centrifugal terms. */
int pb_cr3bp_accel(const pb_problem *p, double t, const double *r, const double *v, double *a);
/* Jacobi constant C = x^2 + y^2 + 2(1-mu)/r1 + 2 mu/r2 - |v|^2. */
double pb_cr3bp_jacobi(const pb_problem *p, double t, const double *r, const double *v);

/* Fill p with a CR3BP problem (dim 3, normalized units); period is the time
 * scale "orbits" counts (0 if none). No exact solution. */
void pb_problem_init_cr3bp(pb_problem *p, const char *name, const char *description,
                           double mu, const double *r0, const double *v0, double period);

#endif
