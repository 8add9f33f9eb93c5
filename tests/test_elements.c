/* test_elements.c - classical elements <-> state: a textbook example, round
 * trips over a grid including circular, equatorial, retrograde-equatorial,
 * near-parabolic and hyperbolic orbits, and rejection of bad input. */
#include <criterion/criterion.h>
#include <math.h>
#include "problems/twobody.h"

#define TE_MU 398600.4418 /* km^3/s^2, WGS-84 (common practice) */
#define TE_DEG (M_PI / 180)

static double te_angdiff(double a, double b)
{
    return fabs(remainder(a - b, 2 * M_PI));
}

static double te_norm(const double *x)
{
    return sqrt(x[0] * x[0] + x[1] * x[1] + x[2] * x[2]);
}

static int te_finite(const pb_elements *el)
{
    return !isnan(el->a) && isfinite(el->e) && isfinite(el->i) && isfinite(el->raan) &&
           isfinite(el->argp) && isfinite(el->nu) && isfinite(el->p);
}

Test(elements, vallado_example_2_5)
{
    /* Vallado 4th ed. Example 2-5, from memory (REFERENCES.md): p and a within
     * 0.05 km, e within 1e-5, angles within 0.01 deg. */
    double r[3] = {6524.834, 6862.875, 6448.296}, v[3] = {4.901327, 5.533756, -1.976341};
    pb_elements el;
    cr_assert_eq(pb_elements_from_state(TE_MU, r, v, &el), PB_OK);
    cr_expect(fabs(el.p - 11067.79) < 0.05, "p = %.4f", el.p);
    cr_expect(fabs(el.a - 36127.34) < 0.05, "a = %.4f", el.a);
    cr_expect(fabs(el.e - 0.832853) < 1e-5, "e = %.7f", el.e);
    cr_expect(fabs(el.i / TE_DEG - 87.87) < 0.01, "i = %.4f", el.i / TE_DEG);
    cr_expect(fabs(el.raan / TE_DEG - 227.90) < 0.01, "raan = %.4f", el.raan / TE_DEG);
    cr_expect(fabs(el.argp / TE_DEG - 53.38) < 0.01, "argp = %.4f", el.argp / TE_DEG);
    cr_expect(fabs(el.nu / TE_DEG - 92.335) < 0.01, "nu = %.4f", el.nu / TE_DEG);
    /* and back: the state is reproduced to 1e-12 relative (REFERENCES.md) */
    double r2[3], v2[3];
    cr_assert_eq(pb_state_from_elements(TE_MU, &el, r2, v2), PB_OK);
    for (int k = 0; k < 3; k++) {
        cr_expect(fabs(r2[k] - r[k]) < 1e-12 * te_norm(r), "r[%d]", k);
        cr_expect(fabs(v2[k] - v[k]) < 1e-12 * te_norm(v), "v[%d]", k);
    }
}

Test(elements, round_trip_grid)
{
    /* Round trip elements -> state -> elements to 1e-12 relative (REFERENCES.md);
     * where an angle is undefined (e = 0, i = 0 or 180 deg) the angles are a
     * convention, so the state round trip is compared instead. */
    const double es[] = {0.0, 1e-4, 0.1, 0.5, 0.9, 0.999, 1.5, 4.0};
    const double is[] = {0.0, 1e-3, 0.4, M_PI / 2, 2.0, M_PI - 1e-3, M_PI};
    const double ang[] = {0.0, 0.3, 1.7, 3.0, 4.4, 6.0};
    int n = 0;
    double worst = 0;
    for (int ie = 0; ie < 8; ie++)
        for (int ii = 0; ii < 7; ii++)
            for (int ia = 0; ia < 6; ia++) {
                double e = es[ie];
                pb_elements el = {.a = e < 1 ? 8000.0 : -8000.0, .e = e, .i = is[ii],
                                  .raan = ang[ia], .argp = ang[(ia + 2) % 6],
                                  .nu = ang[(ia + 4) % 6]};
                if (1 + e * cos(el.nu) < 0.2)
                    el.nu = 0.5;   /* stay inside a hyperbola's asymptotes */
                double r[3], v[3], r2[3], v2[3];
                cr_assert_eq(pb_state_from_elements(TE_MU, &el, r, v), PB_OK);
                pb_elements b;
                cr_assert_eq(pb_elements_from_state(TE_MU, r, v, &b), PB_OK);
                cr_assert(te_finite(&b), "NaN for e=%g i=%g", e, el.i);
                /* da/a = 2 e de/(1 - e^2): the state's rounding (de ~ 1e-15) is
                 * amplified near e = 1, so beyond e = 0.99 the tolerance grows
                 * as 1/(1 - e^2) (error propagation, common practice). */
                double tol_a = 1e-12 * fmax(1.0, 2e-2 / fabs(1 - e * e));
                cr_expect(fabs(b.a / el.a - 1) < tol_a, "e=%g i=%g a=%.17g", e, el.i, b.a);
                cr_expect(fabs(b.p / (el.a * (1 - e * e)) - 1) < 1e-12, "e=%g p", e);
                cr_expect(fabs(b.e - e) < 1e-12 * (e > 0 ? e : 1) + 1e-15, "e=%g got %.17g",
                          e, b.e);
                int circ = e == 0, equ = el.i == 0 || el.i == M_PI;
                if (!circ && !equ) {
                    double d = fmax(fmax(te_angdiff(b.raan, el.raan), te_angdiff(b.argp, el.argp)),
                                    te_angdiff(b.nu, el.nu));
                    double tol = 1e-12 * 2 * M_PI / (e < 1e-3 ? e / 1e-3 : 1) /
                                 (el.i < 1e-2 || el.i > M_PI - 1e-2 ? 1e-3 : 1);
                    worst = fmax(worst, d);
                    cr_expect(d < tol, "e=%g i=%g angle error %g", e, el.i, d);
                    cr_expect(fabs(b.i - el.i) < 1e-12 * 2 * M_PI, "e=%g i=%g", e, el.i);
                } else {
                    /* the documented conventions */
                    if (circ)
                        cr_expect_eq(b.argp, 0.0);
                    if (equ)
                        cr_expect_eq(b.raan, 0.0);
                    cr_expect(fabs(b.i - el.i) < 1e-12, "i=%g got %.17g", el.i, b.i);
                }
                cr_assert_eq(pb_state_from_elements(TE_MU, &b, r2, v2), PB_OK);
                for (int k = 0; k < 3; k++) {
                    cr_expect(fabs(r2[k] - r[k]) < 1e-12 * te_norm(r), "e=%g i=%g r", e, el.i);
                    cr_expect(fabs(v2[k] - v[k]) < 1e-12 * te_norm(v), "e=%g i=%g v", e, el.i);
                }
                n++;
            }
    cr_log_info("elements round trip: %d cases, worst angle error %.3g rad", n, worst);
}

Test(elements, conventions_for_undefined_angles)
{
    /* Conventions documented in elements.c: circular -> argp = 0, nu is the
     * argument of latitude; circular equatorial -> nu is the true longitude in
     * the direction of motion (clockwise from +x seen from +z when i = 180 deg). */
    double L = 1.1, s = sqrt(TE_MU / 7000.0), r[3] = {7000 * cos(L), 7000 * sin(L), 0};
    double vpro[3] = {-s * sin(L), s * cos(L), 0}, vret[3] = {s * sin(L), -s * cos(L), 0};
    pb_elements el;
    cr_assert_eq(pb_elements_from_state(TE_MU, r, vpro, &el), PB_OK);
    cr_expect(el.e < 1e-15 && el.i == 0 && el.raan == 0 && el.argp == 0);
    cr_expect(te_angdiff(el.nu, L) < 1e-14, "nu = %.17g", el.nu);
    cr_assert_eq(pb_elements_from_state(TE_MU, r, vret, &el), PB_OK);
    cr_expect(fabs(el.i - M_PI) < 1e-15 && el.raan == 0 && el.argp == 0);
    cr_expect(te_angdiff(el.nu, -L) < 1e-14, "nu = %.17g", el.nu);
    /* inclined circular: nu = argument of latitude from the node */
    pb_elements c = {.a = 7000, .e = 0, .i = 0.9, .raan = 2.0, .argp = 0, .nu = 0.7};
    double rc[3], vc[3];
    cr_assert_eq(pb_state_from_elements(TE_MU, &c, rc, vc), PB_OK);
    cr_assert_eq(pb_elements_from_state(TE_MU, rc, vc, &el), PB_OK);
    cr_expect(te_angdiff(el.nu, 0.7) < 1e-13 && te_angdiff(el.raan, 2.0) < 1e-13 &&
              el.argp == 0);
}

Test(elements, bad_input_rejected)
{
    double r[3], v[3];
    pb_elements neg_e = {.a = 7000, .e = -0.1};
    pb_elements neg_a = {.a = -7000, .e = 0.5};
    pb_elements pos_a_hyp = {.a = 7000, .e = 1.5};
    pb_elements parab_a = {.a = 7000, .e = 1.0};
    pb_elements no_size = {.a = 0, .e = 0.5, .p = 0};
    pb_elements beyond = {.a = -7000, .e = 2.0, .nu = 2.5};  /* 1 + e cos nu < 0 */
    pb_elements nan_i = {.a = 7000, .e = 0.1, .i = NAN};
    cr_expect_eq(pb_state_from_elements(TE_MU, &neg_e, r, v), PB_EINVAL);
    cr_expect_eq(pb_state_from_elements(TE_MU, &neg_a, r, v), PB_EINVAL);
    cr_expect_eq(pb_state_from_elements(TE_MU, &pos_a_hyp, r, v), PB_EINVAL);
    cr_expect_eq(pb_state_from_elements(TE_MU, &parab_a, r, v), PB_EINVAL);
    cr_expect_eq(pb_state_from_elements(TE_MU, &no_size, r, v), PB_EINVAL);
    cr_expect_eq(pb_state_from_elements(TE_MU, &beyond, r, v), PB_EINVAL);
    cr_expect_eq(pb_state_from_elements(TE_MU, &nan_i, r, v), PB_EINVAL);
    /* a parabola given by p is fine: r_p = p/2, v_p = sqrt(2 mu/r_p) (conics) */
    pb_elements parab_p = {.a = 0, .e = 1.0, .p = 14000};
    cr_assert_eq(pb_state_from_elements(TE_MU, &parab_p, r, v), PB_OK);
    cr_expect(fabs(te_norm(r) - 7000) < 1e-9);
    cr_expect(fabs(te_norm(v) - sqrt(2 * TE_MU / 7000)) < 1e-12);
    pb_elements el;
    double zero[3] = {0, 0, 0}, rr[3] = {7000, 0, 0}, radial[3] = {1, 0, 0};
    cr_expect_eq(pb_elements_from_state(TE_MU, zero, radial, &el), PB_EINVAL);
    cr_expect_eq(pb_elements_from_state(TE_MU, rr, radial, &el), PB_EINVAL);
}
