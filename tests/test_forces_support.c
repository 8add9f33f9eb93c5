/* test_forces_support.c - see test_forces_support.h. */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include <gsl/gsl_errno.h>
#include "test_forces_support.h"
#include "problems/bodies.h"
#include "problems/twobody.h"

static int ode_rhs(double t, const double y[], double dydt[], void *params)
{
    const pb_problem *p = params;
    double a[3];
    if (pb_forces_accel(p, t, y, y + 3, a) != PB_OK)
        return GSL_EBADFUNC;
    for (int i = 0; i < 3; i++) {
        dydt[i] = y[i + 3];
        dydt[i + 3] = a[i];
    }
    return GSL_SUCCESS;
}

void pbtf_ode_init(pbtf_ode *o, const pb_problem *p, double tol)
{
    double rn = pbtf_norm(p->r0), vn = pbtf_norm(p->v0);
    o->sys = (gsl_odeiv2_system){ode_rhs, NULL, 6, (void *)p};
    for (int i = 0; i < 3; i++) {
        o->scale[i] = 1.0;
        o->scale[i + 3] = vn / rn;
    }
    o->d = gsl_odeiv2_driver_alloc_scaled_new(&o->sys, gsl_odeiv2_step_rk8pd, 1.0, tol * rn, tol,
                                              1.0, 0.0, o->scale);
    cr_assert(o->d);
    gsl_odeiv2_driver_set_nmax(o->d, 0);
}

void pbtf_ode_to(pbtf_ode *o, double *t, double t1, double *y)
{
    int st = gsl_odeiv2_driver_apply(o->d, t, t1, y);
    cr_assert_eq(st, GSL_SUCCESS, "rk8pd failed (%d) at t = %g", st, *t);
}

void pbtf_ode_free(pbtf_ode *o)
{
    gsl_odeiv2_driver_free(o->d);
    o->d = NULL;
}

void pbtf_earth_problem(pb_problem *p, const pb_forces *f, const double *r0, const double *v0)
{
    const pb_body *b = &pb_body_earth;
    pb_problem_init_forces(p, "forces-test", "force-term test", PB_UNITS_KM_S, b->mu, b->radius, f,
                           r0, v0);
}

double pbtf_dot(const double *a, const double *b) { return a[0] * b[0] + a[1] * b[1] + a[2] * b[2]; }

double pbtf_norm(const double *a) { return sqrt(pbtf_dot(a, a)); }

void pbtf_cross(const double *a, const double *b, double *c)
{
    c[0] = a[1] * b[2] - a[2] * b[1];
    c[1] = a[2] * b[0] - a[0] * b[2];
    c[2] = a[0] * b[1] - a[1] * b[0];
}

double pbtf_osc_a(double mu, const double *r, const double *v)
{
    return -mu / (2.0 * pb_twobody_energy(mu, r, v));
}

double pbtf_osc_incl(const double *r, const double *v)
{
    double h[3];
    pbtf_cross(r, v, h);
    return acos(h[2] / pbtf_norm(h));
}

/* Days from 1970-01-01 of a proleptic Gregorian date (the civil-from-days
 * inverse of common practice: years counted from March). */
static long days_from_civil(long y, long m, long d)
{
    y -= m <= 2;
    long era = (y >= 0 ? y : y - 399) / 400, yoe = y - era * 400;
    long doy = (153 * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1;
    long doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    return era * 146097 + doe - 719468;
}

double pbtf_days_from_j2000(int y, int m, int d)
{
    return (double)(days_from_civil(y, m, d) - days_from_civil(2000, 1, 1)) - 0.5;
}
