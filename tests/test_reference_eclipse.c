/* test_reference_eclipse.c - the reference never steps over an eclipse:
 * a step whose two ends are sunlit but which spans a whole eclipse is
 * flagged and cut inside it (reference_dip.c), and on the GEO mission
 * scenario the coarse build (whose hour-long steps once spanned the
 * eclipse of the first day, and whose far-side boundary values sat at
 * the trial states' noise) agrees with the fine one across the eclipses. */
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
