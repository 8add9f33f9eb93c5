/* test_catalogue.c - the named built-in problems: every entry builds, the
 * normalized Kepler set and the geostationary orbit match Kepler's third law,
 * the sun-synchronous inclination matches the J2 formula, lookups fail cleanly. */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "problems/catalogue.h"
#include "problems/summary.h"
#include "problems/twobody.h"

Test(catalogue, every_entry_builds_with_a_horizon)
{
    int n = 0;
    for (int k = 0; pb_problem_table[k].name; k++, n++) {
        pb_problem p;
        memset(&p, 0xff, sizeof p);
        cr_assert_eq(pb_problem_lookup(pb_problem_table[k].name, &p), PB_OK);
        cr_assert_str_eq(p.name, pb_problem_table[k].name);
        cr_assert(strlen(p.description) > 10, "%s has no description", p.name);
        cr_assert(p.dim == 3 && p.accel && p.energy && p.energy_label);
        if (p.period > 0)
            cr_assert(p.default_orbits > 0, "%s: no default orbits", p.name);
        else
            cr_assert(p.default_horizon_s > 0, "%s: no default horizon", p.name);
        pb_problem_facts f;
        cr_assert_eq(pb_problem_summary(&p, &f), PB_OK);
        cr_assert(f.horizon > 0 && isfinite(f.energy), "%s", p.name);
        double a[3];
        cr_assert_eq(p.accel(&p, p.t0, p.r0, p.v0, a), PB_OK);
        cr_assert(isfinite(a[0]) && isfinite(a[1]) && isfinite(a[2]));
    }
    cr_assert_geq(n, 17);
}

Test(catalogue, unknown_name_is_einval)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("no-such-orbit", &p), PB_EINVAL);
    cr_assert_eq(pb_problem_lookup(NULL, &p), PB_EINVAL);
}

/* Normalized Kepler problems: mu = 1, a = 1, so T = 2 pi (Kepler's third law,
 * REFERENCES.md) and E = -mu/(2a) = -1/2, |h| = sqrt(1 - e^2) (exact laws). */
Test(catalogue, kepler_set_matches_two_body_laws)
{
    const char *names[] = {"kepler-e0", "kepler-e0.1", "kepler-e0.5", "kepler-e0.6",
                           "kepler-e0.9", "kepler-e0.99"};
    const double es[] = {0.0, 0.1, 0.5, 0.6, 0.9, 0.99};
    for (int k = 0; k < 6; k++) {
        pb_problem p;
        cr_assert_eq(pb_problem_lookup(names[k], &p), PB_OK);
        pb_problem_facts f;
        cr_assert_eq(pb_problem_summary(&p, &f), PB_OK);
        cr_assert_float_eq(f.a, 1.0, 1e-12, "%s a = %.17g", names[k], f.a);
        cr_assert_float_eq(f.e, es[k], 1e-12, "%s e = %.17g", names[k], f.e);
        cr_assert_float_eq(f.period, 2.0 * M_PI, 1e-12);
        cr_assert_float_eq(f.energy, -0.5, 1e-12);
        cr_assert_float_eq(f.angmom, sqrt(1.0 - es[k] * es[k]), 1e-12);
        cr_assert(p.exact && p.exact_q && p.keplerian && p.units == PB_UNITS_NORMALIZED);
        cr_assert_eq(p.r0[1], 0.0);  /* periapsis on +x */
        cr_assert_eq(p.v0[0], 0.0);
    }
}

/* Geostationary a = 42164.17 km from the sidereal day 86164.0905 s
 * (common practice, REFERENCES.md), tolerance 0.01 km. */
Test(catalogue, geostationary_semi_major_axis)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("geo", &p), PB_OK);
    pb_problem_facts f;
    cr_assert_eq(pb_problem_summary(&p, &f), PB_OK);
    cr_assert_float_eq(f.a, 42164.17, 0.01, "a = %.4f", f.a);
    cr_assert_float_eq(f.period, 86164.0905, 1e-6, "T = %.6f", f.period);
    cr_assert_float_eq(f.e, 0.0, 1e-12);
}

/* Sun-synchronous 700 km circular orbit: the first-order J2 RAAN rate formula
 * gives i = 98.188 deg (REFERENCES.md, computed there; printed to 3 decimals). */
Test(catalogue, sso_700_inclination)
{
    const char *names[] = {"sso-700", "sso-700-j2"};
    for (int k = 0; k < 2; k++) {
        pb_problem p;
        cr_assert_eq(pb_problem_lookup(names[k], &p), PB_OK);
        pb_elements el;
        cr_assert_eq(pb_elements_from_state(p.mu, p.r0, p.v0, &el), PB_OK);
        cr_assert_float_eq(el.i * 180.0 / M_PI, 98.188, 0.0006, "i = %.5f", el.i * 180.0 / M_PI);
        cr_assert_float_eq(el.a, 6378.137 + 700.0, 1e-6);
    }
}

/* The near-circular LEO the CLI demo uses: period from Kepler's third law
 * T = 2 pi sqrt(a^3/mu) with mu = 398600.4418 (REFERENCES.md). */
Test(catalogue, leo_near_circular_period)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("leo-near-circular", &p), PB_OK);
    pb_problem_facts f;
    cr_assert_eq(pb_problem_summary(&p, &f), PB_OK);
    double T = 2.0 * M_PI * sqrt(f.a * f.a * f.a / 398600.4418);
    cr_assert_float_eq(f.period, T, 1e-9 * T);
    cr_assert_eq(p.force, PB_FORCE_TWO_BODY);
    cr_assert_eq(p.units, PB_UNITS_KM_S);
    /* E = -mu/(2a) (REFERENCES.md, exact law) */
    cr_assert_float_eq(f.energy, -398600.4418 / (2.0 * f.a), 1e-12 * fabs(f.energy));
}

/* Open orbit: no period (E > 0 means a < 0), so the horizon is a time. */
Test(catalogue, hyperbolic_flyby_has_time_horizon)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("hyperbolic-flyby", &p), PB_OK);
    pb_problem_facts f;
    cr_assert_eq(pb_problem_summary(&p, &f), PB_OK);
    cr_assert_eq(f.period, 0.0);
    cr_assert(f.e > 1.0 && f.a < 0.0 && f.energy > 0.0);
    cr_assert_float_eq(f.horizon, p.default_horizon_s, 0.0);
}

Test(catalogue, j2_and_cr3bp_entries_have_no_exact_solution)
{
    const char *names[] = {"leo-j2", "sso-700-j2", "molniya-j2", "arenstorf"};
    for (int k = 0; k < 4; k++) {
        pb_problem p;
        cr_assert_eq(pb_problem_lookup(names[k], &p), PB_OK);
        cr_assert(p.exact == NULL && p.exact_q == NULL, "%s", names[k]);
    }
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("arenstorf", &p), PB_OK);
    pb_problem_facts f;
    cr_assert_eq(pb_problem_summary(&p, &f), PB_OK);
    cr_assert(isnan(f.a) && isnan(f.e) && isnan(f.angmom));
}
