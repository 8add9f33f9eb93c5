/* test_cr3bp.c - the circular restricted three-body problem: Arenstorf's
 * orbit returns to its initial state after one period and the Jacobi constant
 * is conserved (Hairer, Norsett, Wanner, Solving ODEs I, Sec. II.0). */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "problems/catalogue.h"
#include "problems/cr3bp.h"
#include "problems/reference.h"

static pb_problem cr3t_arenstorf(void)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("arenstorf", &p), PB_OK);
    return p;
}

Test(cr3bp, arenstorf_fields)
{
    pb_problem p = cr3t_arenstorf();
    cr_assert_eq(p.force, PB_FORCE_CR3BP);
    cr_assert_eq(p.velocity_dependent, 1);
    cr_assert_eq(p.keplerian, 0);
    cr_assert_null(p.angmom);
    cr_assert_str_eq(p.energy_label, "Jacobi constant");
    /* HNW Sec. II.0 (from memory): mu, initial state and period */
    cr_assert_eq(p.mu, 0.012277471);
    cr_assert_eq(p.r0[0], 0.994);
    cr_assert_eq(p.v0[1], -2.00158510637908252240537862224);
    cr_assert_eq(p.period, 17.0652165601579625588917206249);
}

/* HNW Sec. II.0 (from memory): periodic with T = 17.0652165601579625588917206249;
 * a high-accuracy integration returns within 1e-8 (REFERENCES.md). Our
 * reference integrator (GBS order 20, __float128) at tolerance 1e-28. */
Test(cr3bp, arenstorf_returns_after_one_period)
{
    pb_problem p = cr3t_arenstorf();
    double t = p.period;
    long double r[3], v[3];
    long steps = 0;
    cr_assert_eq(pb_reference_propagate(&p, &t, 1, 1e-28L, r, v, &steps), PB_OK);
    double dr = sqrt((double)((r[0] - 0.994L) * (r[0] - 0.994L) + r[1] * r[1] + r[2] * r[2]));
    double dv = sqrt((double)(v[0] * v[0] + (v[1] - p.v0[1]) * (v[1] - p.v0[1]) + v[2] * v[2]));
    cr_assert_lt(dr, 1e-8, "position misses by %g", dr);
    cr_assert_lt(dv, 1e-7, "velocity misses by %g", dv);
    cr_assert_gt(steps, 50L);
}

/* The Jacobi integral is conserved by the exact flow (HNW Sec. II.0; any
 * CR3BP text). Evaluated in double on the reference states at 50 times over
 * one period; the orbit passes near the Moon, where the terms are large, so
 * the relative spread allowed is 1e-12 (round-off of the double evaluation). */
Test(cr3bp, jacobi_constant_conserved)
{
    pb_problem p = cr3t_arenstorf();
    enum { N = 50 };
    double t[N];
    long double r[3 * N], v[3 * N];
    for (int k = 0; k < N; k++)
        t[k] = p.period * (k + 1) / N;
    cr_assert_eq(pb_reference_propagate(&p, t, N, 1e-26L, r, v, NULL), PB_OK);
    double c0 = pb_cr3bp_jacobi(&p, 0.0, p.r0, p.v0), worst = 0;
    for (int k = 0; k < N; k++) {
        double rd[3], vd[3];
        for (int i = 0; i < 3; i++) {
            rd[i] = (double)r[3 * k + i];
            vd[i] = (double)v[3 * k + i];
        }
        double d = fabs(pb_cr3bp_jacobi(&p, t[k], rd, vd) - c0) / fabs(c0);
        if (d > worst)
            worst = d;
    }
    cr_assert_lt(worst, 1e-12, "Jacobi constant varies by %g", worst);
}

/* At v = 0 the acceleration is the gradient of the effective potential
 * Omega = C/2 (definition of the Jacobi integral); central differences of the
 * Jacobi function must match pb_cr3bp_accel (tolerance: difference-quotient
 * truncation, ~1e-8 relative at step 1e-5). Also the Coriolis term 2 (v_y, -v_x). */
Test(cr3bp, acceleration_is_gradient_plus_coriolis)
{
    pb_problem p = cr3t_arenstorf();
    double r[3] = {0.5, 0.3, 0.1}, zero[3] = {0, 0, 0}, a[3], h = 1e-5;
    cr_assert_eq(pb_cr3bp_accel(&p, 0.0, r, zero, a), PB_OK);
    for (int i = 0; i < 3; i++) {
        double rp[3], rm[3];
        memcpy(rp, r, sizeof r);
        memcpy(rm, r, sizeof r);
        rp[i] += h;
        rm[i] -= h;
        double g = 0.5 * (pb_cr3bp_jacobi(&p, 0, rp, zero) - pb_cr3bp_jacobi(&p, 0, rm, zero)) / (2 * h);
        cr_assert_float_eq(a[i], g, 1e-8 * (1 + fabs(g)), "component %d: %g vs %g", i, a[i], g);
    }
    double v[3] = {0.2, -0.7, 0.0}, av[3];
    cr_assert_eq(pb_cr3bp_accel(&p, 0.0, r, v, av), PB_OK);
    cr_assert_float_eq(av[0] - a[0], 2.0 * v[1], 1e-15);
    cr_assert_float_eq(av[1] - a[1], -2.0 * v[0], 1e-15);
    cr_assert_float_eq(av[2] - a[2], 0.0, 1e-15);
}
