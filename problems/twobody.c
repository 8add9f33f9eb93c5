/* twobody.c - the two-body problem: inverse-square force, its invariants
 * (energy, angular momentum, Laplace-Runge-Lenz vector, Kepler's third law),
 * the exact solution through universal variables, and the RIC frame.
 * Source: Bate, Mueller, White (1971) ch. 1-2; Vallado 4th ed. ch. 1-2. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "twobody.h"

static double tb_dot(const double *a, const double *b)
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

static void tb_cross(const double *a, const double *b, double *c)
{
    double c0 = a[1] * b[2] - a[2] * b[1];
    double c1 = a[2] * b[0] - a[0] * b[2];
    double c2 = a[0] * b[1] - a[1] * b[0];
    c[0] = c0;
    c[1] = c1;
    c[2] = c2;
}

double pb_twobody_energy(double mu, const double *r, const double *v)
{
    return 0.5 * tb_dot(v, v) - mu / sqrt(tb_dot(r, r));
}

void pb_twobody_angmom_vec(const double *r, const double *v, double *h)
{
    tb_cross(r, v, h);
}

void pb_twobody_eccvec(double mu, const double *r, const double *v, double *e)
{
    double rn = sqrt(tb_dot(r, r));
    double c1 = tb_dot(v, v) - mu / rn, c2 = tb_dot(r, v);
    for (int i = 0; i < 3; i++)
        e[i] = (c1 * r[i] - c2 * v[i]) / mu;
}

double pb_twobody_period(double mu, double a)
{
    return 2.0 * M_PI * sqrt(a * a * a / mu);
}

void pb_ric_frame(const double *r, const double *v, double *R, double *I, double *C)
{
    double rn = sqrt(tb_dot(r, r)), h[3];
    tb_cross(r, v, h);
    double hn = sqrt(tb_dot(h, h));
    for (int i = 0; i < 3; i++) {
        R[i] = r[i] / rn;
        C[i] = h[i] / hn;
    }
    tb_cross(C, R, I);
}

int pb_twobody_accel(const pb_problem *p, double t, const double *r, const double *v,
                     double *a)
{
    (void)t;
    (void)v;
    double r2 = tb_dot(r, r), rn = sqrt(r2);
    double k = -p->mu / (r2 * rn);
    for (int i = 0; i < 3; i++)
        a[i] = k * r[i];
    return isfinite(k) ? PB_OK : PB_ENONFINITE;
}

static double tb_energy(const pb_problem *p, double t, const double *r, const double *v)
{
    (void)t;
    return pb_twobody_energy(p->mu, r, v);
}

static double tb_angmom(const pb_problem *p, const double *r, const double *v)
{
    (void)p;
    double h[3];
    tb_cross(r, v, h);
    return sqrt(tb_dot(h, h));
}

static int tb_exact(const pb_problem *p, double t, double *r, double *v)
{
    return pb_universal_propagate(p->mu, p->r0, p->v0, t - p->t0, r, v);
}

/* The double initial state and times convert exactly to __float128, so the
 * quad truth is the exact flow of the very state the methods start from. */
static int tb_exact_q(const pb_problem *p, double t, __float128 *r, __float128 *v)
{
    __float128 r0[3], v0[3];
    for (int i = 0; i < 3; i++) {
        r0[i] = p->r0[i];
        v0[i] = p->v0[i];
    }
    return pb_universal_propagate_q(p->mu, r0, v0, (__float128)t - (__float128)p->t0, r, v);
}

void pb_problem_init_twobody(pb_problem *p, const char *name, const char *description,
                             pb_units units, double mu, const double *r0, const double *v0)
{
    memset(p, 0, sizeof *p);
    snprintf(p->name, sizeof p->name, "%s", name ? name : "");
    snprintf(p->description, sizeof p->description, "%s", description ? description : "");
    p->units = units;
    p->force = PB_FORCE_TWO_BODY;
    p->dim = 3;
    p->mu = mu;
    p->velocity_dependent = 0;
    p->t0 = 0;
    for (int i = 0; i < 3; i++) {
        p->r0[i] = r0[i];
        p->v0[i] = v0[i];
    }
    double rn = sqrt(tb_dot(r0, r0));
    double alpha = 2.0 / rn - tb_dot(v0, v0) / mu;  /* 1/a */
    p->period = alpha > 0 ? pb_twobody_period(mu, 1.0 / alpha) : 0.0;
    p->default_orbits = 10;
    /* Open conics have no period: default to ten circular periods at r0. */
    p->default_horizon_s = p->period > 0 ? 0.0 : 10.0 * pb_twobody_period(mu, rn);
    p->accel = pb_twobody_accel;
    p->energy = tb_energy;
    p->angmom = tb_angmom;
    p->energy_label = "energy";
    p->angmom_label = "|h|";
    p->keplerian = 1;
    p->exact = tb_exact;
    p->exact_q = tb_exact_q;
}
