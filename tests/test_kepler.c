/* test_kepler.c - Kepler's equation, elliptic and hyperbolic: a textbook
 * example, and machine-precision accuracy over a dense (e, M) grid checked
 * against a __float128 refinement of each root. */
#include <criterion/criterion.h>
#include <float.h>
#include <math.h>
#include <quadmath.h>
#include "problems/twobody.h"

/* Quad Newton refinement of a root of E - e sin E = M (exact double inputs). */
static __float128 tk_ref_elliptic(double M, double e, double E)
{
    __float128 x = E, mq = M, eq = e;
    for (int i = 0; i < 6; i++)
        x -= (x - eq * sinq(x) - mq) / (1 - eq * cosq(x));
    return x;
}

static __float128 tk_ref_hyperbolic(double M, double e, double H)
{
    __float128 x = H, mq = M, eq = e;
    for (int i = 0; i < 6; i++)
        x -= (eq * sinhq(x) - x - mq) / (eq * coshq(x) - 1);
    return x;
}

Test(kepler, vallado_example_2_1)
{
    /* Vallado 4th ed. Example 2-1, from memory: M = 235.4 deg, e = 0.4 ->
     * E = 220.512074767522 deg; tolerance 1e-10 deg (REFERENCES.md). */
    double E = pb_kepler_solve(235.4 * M_PI / 180, 0.4) * 180 / M_PI;
    cr_expect(fabs(E - 220.512074767522) < 1e-10, "E = %.12f deg", E);
}

Test(kepler, dense_grid_machine_precision)
{
    /* Definition of Kepler's equation (REFERENCES.md): the root must agree
     * with a quad refinement to 2 ulp relative and leave a residual at
     * machine precision, for every e in [0, 0.999999] and M in [0, 2 pi],
     * including M -> 0 (common practice for a machine-precision solver). */
    const double es_extra[] = {0.99, 0.999, 0.9999, 0.99999, 0.999999};
    const double ms_small[] = {0.0, 1e-300, 1e-200, 1e-30, 1e-15, 1e-10, 1e-8, 1e-6, 1e-4,
                               1e-3, 1e-2, 2 * M_PI - 1e-12, M_PI, M_PI - 1e-12, M_PI + 1e-12};
    double worst = 0;
    int n = 0;
    for (int ie = 0; ie < 106; ie++) {
        double e = ie < 101 ? 0.0099 * ie : es_extra[ie - 101];
        for (int im = 0; im < 615; im++) {
            double M = im < 600 ? 2 * M_PI * im / 599.0 : ms_small[im - 600];
            double E = pb_kepler_solve(M, e);
            cr_assert(isfinite(E), "e=%.17g M=%.17g", e, M);
            __float128 Er = tk_ref_elliptic(M, e, E);
            double err = (double)fabsq(E - Er), scale = (double)fabsq(Er);
            double rel = scale > 0 ? err / scale : err;
            if (rel > worst)
                worst = rel;
            cr_expect(err <= 2 * DBL_EPSILON * scale, "e=%.17g M=%.17g E=%.17g rel=%g", e, M, E,
                      rel);
            /* the residual evaluated in double: a few rounding units of the terms */
            double res = fabs(E - e * sin(E) - M);
            cr_expect(res <= 4 * DBL_EPSILON * (fabs(E) + fabs(M)) + DBL_MIN, "e=%g M=%g res=%g",
                      e, M, res);
            n++;
        }
    }
    cr_log_info("kepler grid: %d roots, worst relative error %.3g (eps = %.3g)", n, worst,
                DBL_EPSILON);
}

Test(kepler, other_branches_and_negative_M)
{
    /* E - e sin E - M is odd and 2 pi-periodic in (E, M) (definition). */
    const double Ms[] = {-0.3, -7.0, 13.0, 100.5, -1e4};
    for (int k = 0; k < 5; k++) {
        double E = pb_kepler_solve(Ms[k], 0.7);
        __float128 Er = tk_ref_elliptic(Ms[k], 0.7, E);
        cr_expect((double)fabsq(E - Er) <= 4 * DBL_EPSILON * fabs(E), "M=%g", Ms[k]);
    }
    cr_expect(isnan(pb_kepler_solve(1.0, 1.0)));
    cr_expect(isnan(pb_kepler_solve(1.0, -0.1)));
}

Test(kepler, hyperbolic_grid)
{
    /* Hyperbolic Kepler equation M = e sinh H - H (definition, REFERENCES.md
     * conics): 2 ulp against a quad refinement over e in (1, 20], M to 1e4. */
    const double es[] = {1 + 1e-8, 1 + 1e-4, 1.01, 1.1, 1.5, 2.0, 3.0, 5.0, 20.0};
    const double Ms[] = {1e-300, 1e-12, 1e-6, 1e-3, 0.1, 0.5, 1.0, 3.0, 10.0, 100.0, 1e4, -2.0};
    for (int ie = 0; ie < 9; ie++) {
        for (int im = 0; im < 12; im++) {
            double e = es[ie], M = Ms[im];
            double H = pb_kepler_solve_hyperbolic(M, e);
            cr_assert(isfinite(H));
            __float128 Hr = tk_ref_hyperbolic(M, e, H);
            double err = (double)fabsq(H - Hr), scale = (double)fabsq(Hr);
            cr_expect(err <= 2 * DBL_EPSILON * scale, "e=%.17g M=%g H=%.17g rel=%g", e, M, H,
                      err / scale);
            double res = fabs(e * sinh(H) - H - M);
            cr_expect(res <= 4 * DBL_EPSILON * (e * fabs(sinh(H)) + fabs(M)) + DBL_MIN,
                      "e=%g M=%g res=%g", e, M, res);
        }
    }
    cr_expect_eq(pb_kepler_solve_hyperbolic(0.0, 2.0), 0.0);
    cr_expect(isnan(pb_kepler_solve_hyperbolic(1.0, 1.0)));
}
