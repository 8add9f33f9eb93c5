/* test_revolving.c - Newton's revolving orbit (Principia I, Prop. 44;
 * REFERENCES.md "An exact perturbed Kepler problem"): the exact solution's
 * apsidal advance, the equation of motion along it, an independent GSL rk8pd
 * integration, double against __float128, invariants, and the catalogue
 * entry revolving-e0.5. */
#include <criterion/criterion.h>
#include <criterion/logging.h>
#include <float.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include <math.h>
#include <quadmath.h>
#include "problems/catalogue.h"
#include "problems/force_terms.h"
#include "problems/revolving.h"

/* REFERENCES.md (computed there): mu = 1, gamma = 0.01, a = 1, e = 0.5 gives
 * an apsidal advance of 2 pi (1/k - 1) = 0.083224623632307 rad per radial
 * period. */
#define TR_ADVANCE 0.083224623632307

static pb_problem tr_problem(void)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("revolving-e0.5", &p), PB_OK);
    return p;
}

static double tr_dist_q(const __float128 *a, const double *b)
{
    double s = 0;
    for (int i = 0; i < 3; i++) {
        double d = (double)(a[i] - b[i]);
        s += d * d;
    }
    return sqrt(s);
}

Test(revolving, catalogue_entry_is_exact_and_conservative)
{
    pb_problem p = tr_problem();
    cr_assert(p.exact && p.exact_q && p.keplerian);
    cr_assert_eq(p.invariants_from_truth, 0);
    cr_assert_eq(p.velocity_dependent, 0);
    cr_assert_eq(p.units, PB_UNITS_NORMALIZED);
    cr_assert_eq(p.forces.inverse_cube_gamma, 0.01);
    cr_assert_str_eq(p.angmom_label, "|h|");
    /* the radial period is the auxiliary orbit's, 2 pi sqrt(a^3/mu) with
     * a = mu = 1 (Kepler's third law, REFERENCES.md) */
    cr_assert_float_eq(p.period, 2.0 * M_PI, 1e-15);
    cr_assert_eq(p.default_orbits, 100.0);
    /* periapsis r0 = a (1 - e) on +x; h^2 = mu a (1 - e^2) + 2 gamma = 0.77,
     * so the energy v^2/2 - mu/r - gamma/r^2 is the auxiliary orbit's
     * -mu/(2a) = -1/2 (two-body energy law) */
    cr_assert_eq(p.r0[0], 0.5);
    cr_assert_float_eq(p.angmom(&p, p.r0, p.v0), sqrt(0.77), 1e-15);
    cr_assert_float_eq(p.energy(&p, 0, p.r0, p.v0), -0.5, 1e-15);
}

/* The time of the periapsis nearest t (a root of r . v, by Newton with
 * d(r.v)/dt = v.v + r.a), on the quad exact solution; its polar angle. */
static double tr_periapsis_angle(const pb_problem *p, double t)
{
    __float128 r[3], v[3];
    for (int it = 0; it < 8; it++) {
        cr_assert_eq(p->exact_q(p, t, r, v), PB_OK);
        double rd[3] = {(double)r[0], (double)r[1], (double)r[2]};
        double vd[3] = {(double)v[0], (double)v[1], (double)v[2]}, a[3];
        cr_assert_eq(pb_forces_accel(p, t, rd, vd, a), PB_OK);
        __float128 rv = r[0] * v[0] + r[1] * v[1] + r[2] * v[2];
        double slope = vd[0] * vd[0] + vd[1] * vd[1] + rd[0] * a[0] + rd[1] * a[1];
        t -= (double)rv / slope;
    }
    cr_assert_eq(p->exact_q(p, t, r, v), PB_OK);
    return (double)atan2q(r[1], r[0]);
}

/* (a) The apse advances 0.083224623632307 rad per radial period
 * (REFERENCES.md, computed there; = 2 pi (1/k - 1)), measured on the exact
 * solution as the polar angle of periapsis after N = 1 and 10 radial
 * periods, to 1e-12 (the brief's tolerance; measured 1.4e-15 and 4.5e-16:
 * the periapsis time rounded to a double, times the angular rate 3.5). The
 * periapsis is located (r . v = 0), not assumed at N T: the double initial
 * state's radial period differs from 2 pi by rounding. */
Test(revolving, apsidal_advance_per_radial_period)
{
    pb_problem p = tr_problem();
    const int Ns[] = {1, 10};
    for (int k = 0; k < 2; k++) {
        double ang = tr_periapsis_angle(&p, Ns[k] * p.period), per = ang / Ns[k];
        cr_log_info("revolving: periapsis after %d radial periods at %.17g rad, %.17g per period",
                    Ns[k], ang, per);
        cr_expect(fabs(per - TR_ADVANCE) <= 1e-12, "N = %d: %.17g per period", Ns[k], per);
    }
    /* the same number from the law itself: k from the initial |h| */
    double h = p.angmom(&p, p.r0, p.v0), kk = sqrt(1.0 - 2.0 * 0.01 / (h * h));
    cr_expect(fabs(2.0 * M_PI * (1.0 / kk - 1.0) - TR_ADVANCE) <= 1e-14);
}

/* (b) The exact solution satisfies the equation of motion: the central
 * difference (v(t+d) - v(t-d))/(2d) of the quad exact velocity against the
 * force at several times over a radial period. Times are dyadic and
 * d = 2^-30, so t +- d are exact doubles. Tolerances: the truncation
 * d^2/6 |a''| with |a''| <= 200 on this orbit (its largest, at periapsis,
 * is |a| w^2 + |d^2(mu/r^2)/dt^2| ~ 4.2 * 3.5^2 + 32 ~ 84: w = h/r^2,
 * r'' = h'^2/r^3 - mu/r^2), plus, for the double force pb_forces_accel,
 * 16 eps |a| (its rounding and that of the double state it is given); for
 * the force written out here in __float128 (d = 2^-40) the quad solution's
 * rounding, ~1e-32 |v|/d ~ 2e-20, so 1e-18. */
Test(revolving, exact_solution_satisfies_the_equation_of_motion)
{
    pb_problem p = tr_problem();
    const double d = ldexp(1.0, -30), dq = ldexp(1.0, -40);
    double worst = 0, worst_q = 0;
    for (int k = 0; k <= 8; k++) {
        double t = 0.75 * k;  /* 0 .. 6, the last near the next periapsis */
        __float128 r[3], v[3], rp[3], vp[3], rm[3], vm[3];
        cr_assert_eq(p.exact_q(&p, t, r, v), PB_OK);
        cr_assert_eq(p.exact_q(&p, t + d, rp, vp), PB_OK);
        cr_assert_eq(p.exact_q(&p, t - d, rm, vm), PB_OK);
        double rd[3] = {(double)r[0], (double)r[1], (double)r[2]};
        double vd[3] = {(double)v[0], (double)v[1], (double)v[2]}, a[3];
        cr_assert_eq(pb_forces_accel(&p, t, rd, vd, a), PB_OK);
        double an = sqrt(a[0] * a[0] + a[1] * a[1] + a[2] * a[2]), err = 0;
        for (int i = 0; i < 3; i++) {
            double e = (double)((vp[i] - vm[i]) / (2 * (__float128)d) - a[i]);
            err += e * e;
        }
        err = sqrt(err);
        double tol = d * d / 6 * 200 + 16 * DBL_EPSILON * an;
        cr_expect(err <= tol, "t = %g: |fd - a| = %.3g > %.3g", t, err, tol);
        worst = fmax(worst, err / an);
        /* the same in quad against the force of the potential written out
         * here: -mu r/r^3 - 2 gamma r/r^4 (REFERENCES.md) */
        __float128 aq[3], rr = sqrtq(r[0] * r[0] + r[1] * r[1] + r[2] * r[2]);
        for (int i = 0; i < 3; i++)
            aq[i] = -r[i] / (rr * rr * rr) - 2 * (__float128)0.01 * r[i] / (rr * rr * rr * rr);
        cr_assert_eq(p.exact_q(&p, t + dq, rp, vp), PB_OK);
        cr_assert_eq(p.exact_q(&p, t - dq, rm, vm), PB_OK);
        double eq = 0;
        for (int i = 0; i < 3; i++) {
            double e = (double)((vp[i] - vm[i]) / (2 * (__float128)dq) - aq[i]);
            eq += e * e;
        }
        eq = sqrt(eq);
        cr_expect(eq <= dq * dq / 6 * 200 + 1e-18, "t = %g: quad |fd - a| = %.3g", t, eq);
        worst_q = fmax(worst_q, eq);
    }
    cr_log_info("revolving: finite-difference acceleration, worst relative %.3g (double force), "
                "worst absolute %.3g (quad)", worst, worst_q);
}

static int tr_gsl_rhs(double t, const double *y, double *dy, void *par)
{
    const pb_problem *p = par;
    dy[0] = y[3], dy[1] = y[4], dy[2] = y[5];
    return pb_forces_accel(p, t, y, y + 3, dy + 3) == PB_OK ? GSL_SUCCESS : GSL_EBADFUNC;
}

/* (c) An independent integration: GSL's rk8pd (Prince & Dormand 8(7); GSL,
 * REFERENCES.md "reference libraries") at absolute and relative tolerance
 * 1e-14 with the same force matches the exact solution after 10 radial
 * periods to 1e-11. REFERENCES.md reports 3e-14 for an 8th-order method at
 * 1e-14; GSL's driver (its own error norm and step control) lands at
 * 3.9e-13 here (4.6e-12 at 1e-13), so 1e-11 leaves a factor 25. */
Test(revolving, gsl_rk8pd_matches_the_exact_solution)
{
    pb_problem p = tr_problem();
    gsl_odeiv2_system sys = {tr_gsl_rhs, NULL, 6, &p};
    gsl_odeiv2_driver *dr =
        gsl_odeiv2_driver_alloc_y_new(&sys, gsl_odeiv2_step_rk8pd, 1e-3, 1e-14, 1e-14);
    cr_assert_not_null(dr);
    double y[6] = {p.r0[0], p.r0[1], p.r0[2], p.v0[0], p.v0[1], p.v0[2]}, t = 0;
    double T10 = 10 * p.period;
    cr_assert_eq(gsl_odeiv2_driver_apply(dr, &t, T10, y), GSL_SUCCESS);
    gsl_odeiv2_driver_free(dr);
    __float128 r[3], v[3];
    cr_assert_eq(p.exact_q(&p, T10, r, v), PB_OK);
    double err = tr_dist_q(r, y);
    cr_log_info("revolving: GSL rk8pd at 1e-14 after 10 radial periods: %.3g from exact", err);
    cr_expect(err <= 1e-11, "rk8pd %.3g from the exact solution", err);
}

/* (d) The double and __float128 exact solutions agree over 10 radial
 * periods: position to 1e-13 (the brief's tolerance; measured 3.4e-14 here,
 * 4.2e-14 on a scan of 2000 times per turn).
 * The double flow's error is a phase error (its auxiliary orbit's velocity
 * and period rounded to double: ~1.6 eps T of timing per turn, growing
 * linearly: 3.8e-15 in position and 9.1e-15 in velocity per turn, measured),
 * so the velocity error is the position error times acceleration over speed
 * at periapsis, 4.16/1.755 (two-body laws at r = 0.5): 1e-13 x 2.4 (measured
 * 1.0e-13 at the tenth turn). */
Test(revolving, double_and_quad_agree)
{
    pb_problem p = tr_problem();
    double wr = 0, wv = 0;
    for (int k = 0; k <= 400; k++) {
        double t = 10 * p.period * k / 400.0 * 0.987654321, r[3], v[3];
        __float128 rq[3], vq[3];
        cr_assert_eq(p.exact(&p, t, r, v), PB_OK);
        cr_assert_eq(p.exact_q(&p, t, rq, vq), PB_OK);
        wr = fmax(wr, tr_dist_q(rq, r));
        wv = fmax(wv, tr_dist_q(vq, v));
    }
    cr_log_info("revolving: double vs quad exact over 10 periods: position %.3g, velocity %.3g",
                wr, wv);
    cr_expect(wr <= 1e-13, "double and quad positions differ by %.3g", wr);
    cr_expect(wv <= 1e-13 * 4.16 / 1.755, "double and quad velocities differ by %.3g", wv);
}

/* (e) Energy v^2/2 - mu/r - gamma/r^2 and |h| are conserved along the exact
 * solution (REFERENCES.md: a central conservative force), to 1e-14 over
 * 100 radial periods (measured 1.7e-15 and 3.8e-16). */
Test(revolving, invariants_along_the_exact_solution)
{
    pb_problem p = tr_problem();
    double E0 = p.energy(&p, 0, p.r0, p.v0), H0 = p.angmom(&p, p.r0, p.v0), dE = 0, dH = 0;
    for (int k = 1; k <= 1000; k++) {
        double t = 100 * p.period * k / 1000.0 * 0.98765, r[3], v[3];
        cr_assert_eq(p.exact(&p, t, r, v), PB_OK);
        dE = fmax(dE, fabs(p.energy(&p, t, r, v) - E0) / fabs(E0));
        dH = fmax(dH, fabs(p.angmom(&p, r, v) - H0) / H0);
    }
    cr_log_info("revolving: invariants along the exact solution: energy %.3g, |h| %.3g", dE, dH);
    cr_expect(dE <= 1e-14 && dH <= 1e-14, "energy %.3g, |h| %.3g", dE, dH);
}

/* The flow is a flow: the state at t1 carried on by t2 is the state at
 * t1 + t2, and carried back by -t2 it returns (whole turns counted across
 * many periods, both signs of dt). Quad; 1e-28 (measured 1.8e-30). */
Test(revolving, flow_composes_over_many_turns)
{
    pb_problem p = tr_problem();
    /* dyadic, so that t1 + t2 is an exact double */
    const double t1s[] = {0.25, 17.25, 200.5}, t2s[] = {3.125, 41.0, 333.375, -12.5};
    double worst = 0;
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 4; b++) {
            __float128 r1[3], v1[3], r2[3], v2[3], r12[3], v12[3];
            cr_assert_eq(p.exact_q(&p, t1s[a], r1, v1), PB_OK);
            cr_assert_eq(pb_revolving_propagate_q(p.mu, p.forces.inverse_cube_gamma, r1, v1,
                                                  t2s[b], r2, v2), PB_OK);
            cr_assert_eq(p.exact_q(&p, t1s[a] + t2s[b], r12, v12), PB_OK);
            __float128 d = 0;
            for (int i = 0; i < 3; i++)
                d += (r2[i] - r12[i]) * (r2[i] - r12[i]) + (v2[i] - v12[i]) * (v2[i] - v12[i]);
            cr_expect((double)sqrtq(d) <= 1e-28, "t1 %g t2 %g: %.3g", t1s[a], t2s[b],
                      (double)sqrtq(d));
            worst = fmax(worst, (double)sqrtq(d));
        }
    cr_log_info("revolving: flow composition, worst %.3g", worst);
}

Test(revolving, bad_input_is_einval)
{
    pb_problem p;
    cr_assert_eq(pb_problem_init_revolving(&p, "x", "x", 1.0, 0.01, 1.0, 1.0), PB_EINVAL);
    cr_assert_eq(pb_problem_init_revolving(&p, "x", "x", 1.0, 0.01, -1.0, 0.5), PB_EINVAL);
    cr_assert_eq(pb_problem_init_revolving(&p, "x", "x", 0.0, 0.01, 1.0, 0.5), PB_EINVAL);
    /* 2 gamma <= -h'^2: h^2 <= 0, the orbit falls in */
    cr_assert_eq(pb_problem_init_revolving(&p, "x", "x", 1.0, -0.5, 1.0, 0.0), PB_EINVAL);
    double r0[3] = {1, 0, 0}, v0[3] = {0, 0.1, 0}, r[3], v[3];
    /* h^2 = 0.01 < 2 gamma = 0.02: no real k */
    cr_assert_eq(pb_revolving_propagate(1.0, 0.01, r0, v0, 1.0, r, v), PB_EINVAL);
    /* radial motion unbounded: the auxiliary orbit is a hyperbola */
    double v1[3] = {2.0, 0.5, 0};
    cr_assert_eq(pb_revolving_propagate(1.0, 0.01, r0, v1, 1.0, r, v), PB_EINVAL);
    /* gamma = 0 is the Kepler flow */
    double v2[3] = {0.1, 1.1, 0.2}, rk[3], vk[3];
    cr_assert_eq(pb_revolving_propagate(1.0, 0.0, r0, v2, 7.5, r, v), PB_OK);
    cr_assert_eq(pb_universal_propagate(1.0, r0, v2, 7.5, rk, vk), PB_OK);
    for (int i = 0; i < 3; i++)
        cr_expect(fabs(r[i] - rk[i]) < 1e-13 && fabs(v[i] - vk[i]) < 1e-13);
}
