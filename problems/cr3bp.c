/* cr3bp.c - circular restricted three-body problem, rotating frame, as
 * written in Hairer, Norsett, Wanner, Solving ODEs I (2nd ed.), Sec. II.0,
 * extended to three dimensions; the Jacobi integral is its energy-like invariant.
 * The force itself is in force_terms_impl.h, shared with the reference. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "cr3bp.h"

double pb_cr3bp_jacobi(const pb_problem *p, double t, const double *r, const double *v)
{
    (void)t;
    double mu = p->mu, mu1 = 1.0 - mu;
    double x1 = r[0] + mu, x2 = r[0] - mu1, yz2 = r[1] * r[1] + r[2] * r[2];
    double r1 = sqrt(x1 * x1 + yz2), r2 = sqrt(x2 * x2 + yz2);
    double v2 = v[0] * v[0] + v[1] * v[1] + v[2] * v[2];
    return r[0] * r[0] + r[1] * r[1] + 2.0 * mu1 / r1 + 2.0 * mu / r2 - v2;
}

void pb_problem_init_cr3bp(pb_problem *p, const char *name, const char *description,
                           double mu, const double *r0, const double *v0, double period)
{
    memset(p, 0, sizeof *p);
    snprintf(p->name, sizeof p->name, "%s", name);
    snprintf(p->description, sizeof p->description, "%s", description ? description : "");
    p->units = PB_UNITS_NORMALIZED;
    p->force = PB_FORCE_CR3BP;
    p->dim = 3;
    p->mu = mu;
    p->velocity_dependent = 1;
    p->t0 = 0.0;
    memcpy(p->r0, r0, 3 * sizeof(double));
    memcpy(p->v0, v0, 3 * sizeof(double));
    p->period = period;
    p->accel = pb_cr3bp_accel;
    p->energy = pb_cr3bp_jacobi;
    p->angmom = NULL;
    p->energy_label = "Jacobi constant";
    p->angmom_label = NULL;
    p->keplerian = 0;
    p->exact = NULL;
    p->exact_q = NULL;
}
