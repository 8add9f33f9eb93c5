/* test_rk4.c - RK4: observed order on the e = 0.6 Kepler problem and one step
 * against GSL's gsl_odeiv2 rk4 stepper. */
#include <criterion/criterion.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include <math.h>
#include <string.h>
#include "test_support.h"
#include "bench/measure/force_counter.h"
#include "problems/twobody.h"

extern const pb_method_type pb_method_rk4;

static double rk4t_error(const pb_problem *p, int steps_per_orbit, double orbits)
{
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = p->period / steps_per_orbit;
    pbt_result res = pbt_integrate(&pb_method_rk4, p, &cfg, orbits * p->period);
    cr_assert_eq(res.status, PB_OK, "rk4 failed: %s", pb_strerror(res.status));
    /* 4 a step, plus the last state's first stage (evaluated for dense output) */
    cr_assert_eq(res.evals, 4L * (long)(orbits * steps_per_orbit) + 1);
    return pbt_pos_error(p, &res);
}

/* Measured here on e = 0.6 by step halving 200 -> 3200 steps per orbit:
 * over 10 orbits the successive orders are 4.79, 4.65, 4.49, 4.32, still
 * falling toward 4 (pre-asymptotic: the accumulated phase error is not yet in
 * its leading-order regime), while over one orbit from periapsis they are
 * 4.29, 4.17, 4.09, settled. So the check uses one orbit at 800 -> 1600 steps,
 * the asymptotic end of that ladder. */
Test(rk4, observed_order_kepler_e06)
{
    pb_problem p;
    pbt_kepler(&p, 0.6);
    double e1 = rk4t_error(&p, 800, 1.0);
    double e2 = rk4t_error(&p, 1600, 1.0);
    double order = log(e1 / e2) / log(2.0);
    /* order 4 within 0.3 in the asymptotic range (common practice, REFERENCES.md
     * "Orders of accuracy"); test problem from Hairer, Lubich & Wanner (2006) Ch. I */
    cr_assert(fabs(order - 4.0) <= 0.3, "observed order %.3f (errors %.3e, %.3e)", order,
              e1, e2);
}

/* GSL side: y = (r, v), dy/dt = (v, -r/|r|^3) with mu = 1, counting calls. */
static int rk4t_gsl_rhs(double t, const double y[], double dydt[], void *params)
{
    (void)t;
    long *calls = params;
    (*calls)++;
    double r2 = y[0] * y[0] + y[1] * y[1] + y[2] * y[2];
    double ir3 = 1.0 / (r2 * sqrt(r2));
    for (int i = 0; i < 3; i++) {
        dydt[i] = y[3 + i];
        dydt[3 + i] = -y[i] * ir3;
    }
    return GSL_SUCCESS;
}

/* GSL's rk4 stepper is documented only by its header here (no manual on this
 * machine), so its behaviour is pinned by this test: gsl_odeiv2_step_apply
 * returns the step-doubled result (one full step for the error estimate, then
 * two half steps whose result it returns): 4 + 7 = 11 evaluations without
 * dydt_in/dydt_out. So one GSL step of h must equal two of our steps of h/2. */
Test(rk4, one_step_matches_gsl_rk4_two_half_steps)
{
    pb_problem p;
    pbt_kepler(&p, 0.6);
    double h = p.period / 100.0; /* from periapsis, where the force is largest */

    long calls = 0;
    gsl_odeiv2_system sys = {rk4t_gsl_rhs, NULL, 6, &calls};
    gsl_odeiv2_step *gs = gsl_odeiv2_step_alloc(gsl_odeiv2_step_rk4, 6);
    cr_assert_not_null(gs);
    double y[6], yerr[6];
    memcpy(y, p.r0, 3 * sizeof(double));
    memcpy(y + 3, p.v0, 3 * sizeof(double));
    cr_assert_eq(gsl_odeiv2_step_apply(gs, 0.0, h, y, yerr, NULL, NULL, &sys), GSL_SUCCESS);
    gsl_odeiv2_step_free(gs);
    cr_assert_eq(calls, 11, "GSL rk4 used %ld evaluations, expected 11 (step doubling)",
                 calls);

    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = 0.5 * h;
    pbt_result two = pbt_integrate(&pb_method_rk4, &p, &cfg, h);
    cr_assert_eq(two.status, PB_OK);
    cr_assert_eq(two.steps, 2);
    cfg.h = h;
    pbt_result one = pbt_integrate(&pb_method_rk4, &p, &cfg, h);
    cr_assert_eq(one.status, PB_OK);

    double dtwo = 0, done = 0;
    for (int i = 0; i < 3; i++) {
        dtwo = fmax(dtwo, fabs(two.r[i] - y[i]) / fmax(1.0, fabs(y[i])));
        dtwo = fmax(dtwo, fabs(two.v[i] - y[3 + i]) / fmax(1.0, fabs(y[3 + i])));
        done = fmax(done, fabs(one.r[i] - y[i]));
        done = fmax(done, fabs(one.v[i] - y[3 + i]));
    }
    /* Same tableau (Abramowitz & Stegun 25.5.10), so agreement to round-off:
     * a few ulps of O(1) values (common practice) */
    cr_assert(dtwo < 1e-14, "two half steps differ from GSL rk4 by %.3e", dtwo);
    /* ...and GSL's result is really not one full step: the two differ by the
     * local truncation error, far above round-off (measured here: 2.9e-5;
     * the two half steps agree with GSL to 1.1e-16) */
    cr_assert(done > 1e-10, "one full step differs from GSL rk4 by only %.3e", done);
}
