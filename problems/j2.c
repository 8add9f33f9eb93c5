/* j2.c - two-body plus the J2 zonal term of the body's potential (second zonal
 * harmonic, e.g. Vallado 4th ed. Sec. 8.6); the secular rates it causes are
 * those of Brouwer (1959) and Kozai (1959). */
#include <math.h>
#include <stddef.h>
#include "j2.h"
#include "twobody.h"

int pb_j2_accel(const pb_problem *p, double t, const double *r, const double *v, double *a)
{
    (void)t; (void)v;
    double r2 = r[0] * r[0] + r[1] * r[1] + r[2] * r[2];
    double rn = sqrt(r2);
    double z2 = r[2] * r[2] / r2;
    double k = 1.5 * p->j2 * p->body_radius * p->body_radius / r2;
    double c = -p->mu / (r2 * rn);
    double cxy = c * (1.0 + k * (1.0 - 5.0 * z2));
    a[0] = cxy * r[0];
    a[1] = cxy * r[1];
    a[2] = c * (1.0 + k * (3.0 - 5.0 * z2)) * r[2];
    return PB_OK;
}

double pb_j2_energy(const pb_problem *p, double t, const double *r, const double *v)
{
    (void)t;
    double r2 = r[0] * r[0] + r[1] * r[1] + r[2] * r[2];
    double rn = sqrt(r2);
    double v2 = v[0] * v[0] + v[1] * v[1] + v[2] * v[2];
    double R = p->body_radius;
    double vj2 = p->mu * p->j2 * R * R * (3.0 * r[2] * r[2] / r2 - 1.0) / (2.0 * r2 * rn);
    return 0.5 * v2 - p->mu / rn + vj2;
}

double pb_j2_hz(const pb_problem *p, const double *r, const double *v)
{
    (void)p;
    return r[0] * v[1] - r[1] * v[0];
}

void pb_problem_init_j2(pb_problem *p, const char *name, const char *description,
                        double mu, double radius, double j2,
                        const double *r0, const double *v0)
{
    pb_problem_init_twobody(p, name, description, PB_UNITS_KM_S, mu, r0, v0);
    p->force = PB_FORCE_J2;
    p->body_radius = radius;
    p->j2 = j2;
    p->velocity_dependent = 0;
    p->accel = pb_j2_accel;
    p->energy = pb_j2_energy;
    p->angmom = pb_j2_hz;
    p->energy_label = "energy";
    p->angmom_label = "h_z";
    p->keplerian = 1;
    p->exact = NULL;
    p->exact_q = NULL;
}
