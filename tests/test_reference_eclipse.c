/* test_reference_eclipse.c - the reference does not step over an eclipse:
 * a step whose two ends are sunlit but which spans a whole or a grazing
 * eclipse is flagged and cut inside it (reference_dip.c); on the GEO
 * mission scenario the coarse build (whose hour-long steps once spanned the
 * eclipse of the first day, and whose far-side boundary values sat at the
 * trial states' noise) agrees with the fine one across the eclipses, and a
 * reference sampled once agrees with one sampled every 600 s (which no
 * eclipse can hide from). */
#include <criterion/criterion.h>
#include <math.h>
#include <quadmath.h>
#include "problems/catalogue.h"
#include "problems/forces.h"
#include "problems/reference.h"
#include "problems/reference_dip.h"

/* A state of geo-sun-moon-srp at time t from the reference at a tight
 * tolerance (the test needs states on the trajectory, not their last digit). */
static void ecl_state(const pb_problem *p, double t, __float128 *y)
{
    long double r[PB_DIM_MAX], v[PB_DIM_MAX];
    cr_assert_eq(pb_reference_propagate(p, &t, 1, 1e-20L, r, v, NULL), PB_OK);
    for (int i = 0; i < 3; i++) {
        y[i] = r[i];
        y[i + 3] = v[i];
    }
}

/* The visible fraction of the Sun at t on the trajectory, by the methods'
 * double geometry (an independent code path from the dip test's). */
static double ecl_nu(const pb_problem *p, double t)
{
    __float128 y[6];
    ecl_state(p, t, y);
    double s[3], r[3] = {(double)y[0], (double)y[1], (double)y[2]};
    pb_sun_position(p->forces.epoch_days + t / 86400.0, s);
    return pb_shadow_fraction(p->forces.shadow, p->body_radius, s, r);
}

/* On the first day the eclipse lies between t = 38,850 s and 42,670 s
 * (about 64 minutes, measured by the reference's located boundaries): a
 * step from 37,000 s to 44,000 s has both ends sunlit, and the dip test
 * cuts it at a time inside the shadow; a step on the day side is left
 * alone. */
Test(reference_eclipse, step_over_a_whole_eclipse_is_cut_inside_it)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("geo-sun-moon-srp", &p), PB_OK);
    double t0 = 37000, t1 = 44000;
    cr_assert_eq(ecl_nu(&p, t0), 1.0);
    cr_assert_eq(ecl_nu(&p, t1), 1.0);
    __float128 y0[6], y1[6];
    ecl_state(&p, t0, y0);
    ecl_state(&p, t1, y1);
    double x = (double)pb_ref_shadow_dip(&p, -1, 2, t0, y0, t1 - t0, y1);
    double tc = t0 + x * (t1 - t0);
    cr_log_info("dip test: cut at %.1f s, visible fraction there %.3g", tc, ecl_nu(&p, tc));
    cr_assert(x > 0, "a step over the whole eclipse is not flagged");
    cr_assert_lt(ecl_nu(&p, tc), 1.0, "the cut at %.1f s is not in the shadow", tc);
    /* the day side, half an orbit away */
    double u0 = 37000 + 43082, u1 = 44000 + 43082;
    ecl_state(&p, u0, y0);
    ecl_state(&p, u1, y1);
    cr_assert_eq(pb_ref_shadow_dip(&p, -1, 2, u0, y0, u1 - u0, y1), 0.0Q, "the day side is flagged");
}

/* The two tolerances the harness builds with agree over two days of GEO
 * (two eclipses) to the storage's round-off: before the dip test the
 * coarse build stepped over the first eclipse and the two parted by
 * 0.024 km at the end of the first day. */
Test(reference_eclipse, coarse_and_fine_builds_agree_across_geo_eclipses)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("geo-sun-moon-srp", &p), PB_OK);
    double t[2] = {p.period, 2 * p.period};
    long double rc[2 * PB_DIM_MAX], vc[2 * PB_DIM_MAX], rf[2 * PB_DIM_MAX], vf[2 * PB_DIM_MAX];
    cr_assert_eq(pb_reference_propagate(&p, t, 2, 1e-24L, rc, vc, NULL), PB_OK);
    cr_assert_eq(pb_reference_propagate(&p, t, 2, 1e-26L, rf, vf, NULL), PB_OK);
    for (int k = 0; k < 2; k++) {
        double d2 = 0;
        for (int i = 0; i < 3; i++) {
            double d = (double)(rc[k * PB_DIM_MAX + i] - rf[k * PB_DIM_MAX + i]);
            d2 += d * d;
        }
        cr_log_info("GEO day %d: coarse - fine = %.3g km", k + 1, sqrt(d2));
        /* 1e-18 of the radius: the floor the harness never claims below */
        cr_assert_lt(sqrt(d2), 4.3e-14, "day %d: builds part by %g km", k + 1, sqrt(d2));
    }
}

/* A circular GEO orbit whose closest approach to the anti-Sun direction is
 * beta rad (the Sun at its place at the middle of the step; states by the
 * circular motion, which the test needs only near the trajectory): grazing
 * passes (beta from 0.151 to 0.1565, the sum of the Sun's and the Earth's
 * apparent radii there; at beta = 0.1565 the Sun stays 99.7% visible) are
 * each flagged within a step of 3600 s or 5000 s centred on them, which a
 * cubic model of the shadow function from the step's ends alone missed
 * (measured in review: beta >= 0.151 at 3600 s); beyond the shadow, beta
 * = 0.157 and 0.2, nothing is flagged. */
static void ecl_circle(const pb_problem *p, double beta, double tm, double tau, __float128 *y)
{
    double s[3], u[3], e1[3], e2[3], z[3] = {0, 0, 1};
    pb_sun_position(p->forces.epoch_days + tm / 86400.0, s);
    double sn = sqrt(s[0] * s[0] + s[1] * s[1] + s[2] * s[2]);
    for (int i = 0; i < 3; i++)
        u[i] = -s[i] / sn;
    e1[0] = u[1] * z[2] - u[2] * z[1], e1[1] = u[2] * z[0] - u[0] * z[2], e1[2] = u[0] * z[1] - u[1] * z[0];
    double en = sqrt(e1[0] * e1[0] + e1[1] * e1[1] + e1[2] * e1[2]);
    for (int i = 0; i < 3; i++)
        e1[i] /= en;
    e2[0] = u[1] * e1[2] - u[2] * e1[1], e2[1] = u[2] * e1[0] - u[0] * e1[2], e2[2] = u[0] * e1[1] - u[1] * e1[0];
    double R = 42164.0, w = sqrt(p->mu / (R * R * R)), c = cos(w * tau), sw = sin(w * tau);
    for (int i = 0; i < 3; i++) {
        double a = cos(beta) * u[i] + sin(beta) * e1[i];
        y[i] = R * (c * a + sw * e2[i]);
        y[i + 3] = R * w * (-sw * a + c * e2[i]);
    }
}

Test(reference_eclipse, grazing_pass_inside_a_step_is_cut)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("geo-sun-moon-srp", &p), PB_OK);
    const double tm = 40000, betas[] = {0.151, 0.153, 0.156, 0.1565}, steps[] = {3600, 5000};
    for (int b = 0; b < 4; b++)
        for (int k = 0; k < 2; k++) {
            __float128 y0[6], y1[6], ym[6];
            double H = steps[k];
            ecl_circle(&p, betas[b], tm, -H / 2, y0);
            ecl_circle(&p, betas[b], tm, H / 2, y1);
            ecl_circle(&p, betas[b], tm, 0, ym);
            double s[3], rm[3] = {(double)ym[0], (double)ym[1], (double)ym[2]};
            pb_sun_position(p.forces.epoch_days + tm / 86400.0, s);
            double nu = pb_shadow_fraction(p.forces.shadow, p.body_radius, s, rm);
            cr_assert_lt(nu, 1.0, "beta %g: not a grazing pass", betas[b]);
            double x = (double)pb_ref_shadow_dip(&p, -1, 2, tm - H / 2, y0, H, y1);
            cr_assert(x > 0.25 && x < 0.75, "beta %g, H %g s: a pass with visible fraction %.4f "
                      "not flagged (cut %g)", betas[b], H, nu, x);
        }
    const double clear[] = {0.157, 0.2};
    for (int b = 0; b < 2; b++) {
        __float128 y0[6], y1[6];
        ecl_circle(&p, clear[b], tm, -2500, y0);
        ecl_circle(&p, clear[b], tm, 2500, y1);
        cr_assert_eq((double)pb_ref_shadow_dip(&p, -1, 2, tm - 2500, y0, 5000, y1), 0.0,
                     "beta %g: sunlit throughout, yet flagged", clear[b]);
    }
}

/* Two days of geo-sun-moon-srp at the coarse tolerance: the state at the
 * end from a reference sampled only there and from one sampled every 600 s
 * (steps of at most 600 s, against eclipses of over 40 minutes) agree to
 * the storage's round-off, so neither build stepped over an eclipse. */
Test(reference_eclipse, sparse_and_dense_samples_agree, .timeout = 120)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("geo-sun-moon-srp", &p), PB_OK);
    enum { N = 288 };
    static double t[N];
    static long double r[N * PB_DIM_MAX], v[N * PB_DIM_MAX];
    for (int k = 0; k < N; k++)
        t[k] = 600.0 * (k + 1);
    long double r1[PB_DIM_MAX], v1[PB_DIM_MAX];
    cr_assert_eq(pb_reference_propagate(&p, t, N, 1e-24L, r, v, NULL), PB_OK);
    cr_assert_eq(pb_reference_propagate(&p, &t[N - 1], 1, 1e-24L, r1, v1, NULL), PB_OK);
    double d2 = 0;
    for (int i = 0; i < 3; i++) {
        double d = (double)(r1[i] - r[(N - 1) * PB_DIM_MAX + i]);
        d2 += d * d;
    }
    cr_log_info("GEO, 2 days: one sample against 288: %.3g km", sqrt(d2));
    cr_assert_lt(sqrt(d2), 4.3e-14, "the sparse reference parts from the dense by %g km", sqrt(d2));
}
