/* test_catalogue_missions.c - the mission scenarios built on the force
 * terms: each is what its definition says (bodies, terms, epoch, horizon),
 * with the published constants where REFERENCES.md has them; the epoch's
 * day count against an independent calendar formula. */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "problems/bodies.h"
#include "problems/catalogue.h"
#include "problems/catalogue_missions.h"
#include "problems/twobody.h"

#define TM_DEG (M_PI / 180.0)
#define TM_MU_EARTH 398600.4418  /* REFERENCES.md, WGS-84 (common practice) */
#define TM_R_EARTH 6378.137

static pb_problem tm_get(const char *name)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup(name, &p), PB_OK, "%s", name);
    cr_assert_str_eq(p.name, name);
    cr_assert(strlen(p.description) > 20 && strlen(p.description) < sizeof p.description);
    cr_assert(p.exact == NULL && p.exact_q == NULL, "%s: the reference is its truth", name);
    cr_assert_eq(p.units, PB_UNITS_KM_S);
    return p;
}

static pb_elements tm_elements(const pb_problem *p)
{
    pb_elements el;
    cr_assert_eq(pb_elements_from_state(p->mu, p->r0, p->v0, &el), PB_OK);
    return el;
}

/* The Julian date at 0h of a Gregorian date, 1901-2099: the Astronomical
 * Almanac's / USNO's short form of Fliegel & Van Flandern (1968), from
 * memory: JD = 367 Y - [7 (Y + [(M + 9)/12])/4] + [275 M/9] + D + 1721013.5. */
static double tm_julian_date(int y, int m, int d)
{
    return 367.0 * y - (7 * (y + (m + 9) / 12)) / 4 + (275 * m) / 9 + d + 1721013.5;
}

Test(missions, epoch_is_2026_03_10_tt)
{
    /* J2000.0 = JD 2451545.0 (REFERENCES.md: T in Julian centuries TT since J2000) */
    cr_assert_eq(tm_julian_date(2000, 1, 1) + 0.5, 2451545.0);
    cr_assert_eq(PB_MISSION_EPOCH_DAYS, tm_julian_date(2026, 3, 10) - 2451545.0);
    const char *names[] = {"geo-sun-moon-srp", "heo-moon"};
    for (int k = 0; k < 2; k++) {
        pb_problem p = tm_get(names[k]);
        cr_assert(p.forces.has_epoch && p.forces.epoch_days == 9564.5, "%s", names[k]);
    }
}

/* leo-drag: a = R + 425 km, e = 0.0005, i = 51.6 deg (definition); J2..J6
 * of the Earth, drag with B = 0.01 m^2/kg in an atmosphere turning at
 * 7.292115e-5 rad/s (WGS-84, REFERENCES.md); three days. */
Test(missions, leo_drag)
{
    pb_problem p = tm_get("leo-drag");
    pb_elements el = tm_elements(&p);
    cr_assert_float_eq(el.a, TM_R_EARTH + 425.0, 1e-6);
    cr_assert_float_eq(el.e, 0.0005, 1e-12);
    cr_assert_float_eq(el.i, 51.6 * TM_DEG, 1e-12);
    cr_assert_eq(p.forces.zonal_degree, 6);
    /* EGM96 J2 and J6 (REFERENCES.md, NIMA TR8350.2) */
    cr_assert_eq(p.forces.jn[2], 1.082626683553e-3);
    cr_assert_eq(p.forces.jn[6], 5.406812391071e-7);
    cr_assert_eq(p.forces.drag, PB_DRAG_EXPONENTIAL);
    cr_assert_eq(p.forces.ballistic_m2_kg, 0.01);
    cr_assert_eq(p.forces.body_rate, 7.292115e-5);
    cr_assert(p.velocity_dependent && p.invariants_from_truth);
    /* perigee and apogee heights a (1 -+ e) - R inside the 400-450 km row
     * of Vallado's Table 8-4 (REFERENCES.md) */
    double hp = el.a * (1 - el.e) - TM_R_EARTH, ha = el.a * (1 + el.e) - TM_R_EARTH;
    cr_assert(hp > 400 && ha < 450, "heights %.3f .. %.3f km", hp, ha);
    /* three days, the orbits to six digits (within 5e-6 relative) */
    cr_assert_float_eq(p.default_orbits * p.period, 3 * 86400.0, 5e-6 * 3 * 86400.0);
}

/* geo-sun-moon-srp: one sidereal day, so a = 42164.17 km within 0.01 km
 * (REFERENCES.md, common practice); i = 0.05 deg; J2 + Sun + Moon + SRP
 * with A/m 0.02 m^2/kg, C_R 1.3 and the conical shadow; 30 orbits. */
Test(missions, geo_sun_moon_srp)
{
    pb_problem p = tm_get("geo-sun-moon-srp");
    pb_elements el = tm_elements(&p);
    cr_assert_float_eq(el.a, 42164.17, 0.01, "a = %.4f", el.a);
    cr_assert_float_eq(p.period, 86164.0905, 1e-6);
    cr_assert_float_eq(el.e, 0.0, 1e-12);
    cr_assert_float_eq(el.i, 0.05 * TM_DEG, 1e-12);
    const pb_forces *f = &p.forces;
    cr_assert(f->zonal_degree == 2 && f->sun && f->moon && !f->drag && !f->circular);
    cr_assert(f->srp_area_mass_m2_kg == 0.02 && f->cr == 1.3 && f->shadow == PB_SHADOW_CONICAL);
    cr_assert(p.invariants_from_truth);
    cr_assert_eq(p.default_orbits, 30.0);
}

/* heo-moon: perigee 500 km and apogee 120,000 km above R, i = 28.5 deg,
 * from perigee; J2 and the Moon; 10 orbits. */
Test(missions, heo_moon)
{
    pb_problem p = tm_get("heo-moon");
    pb_elements el = tm_elements(&p);
    cr_assert_float_eq(el.a * (1 - el.e) - TM_R_EARTH, 500.0, 1e-6);
    cr_assert_float_eq(el.a * (1 + el.e) - TM_R_EARTH, 120000.0, 1e-6);
    cr_assert_float_eq(el.i, 28.5 * TM_DEG, 1e-12);
    cr_assert(fabs(remainder(el.nu, 2 * M_PI)) < 1e-9, "nu = %.17g", el.nu);
    const pb_forces *f = &p.forces;
    cr_assert(f->zonal_degree == 2 && f->moon && !f->sun && f->srp_area_mass_m2_kg == 0);
    cr_assert_eq(p.default_orbits, 10.0);
    /* Kepler's third law with the WGS-84 mu (REFERENCES.md) */
    cr_assert_float_eq(p.period, 2 * M_PI * sqrt(pow(el.a, 3) / TM_MU_EARTH), 1e-9 * p.period);
}

/* leo-manoeuvre: circular at 500 km, J2, 15 along-track burns of +0.5 m/s,
 * each a quarter period after an orbit's start, all within the one-day
 * horizon, in time order. */
Test(missions, leo_manoeuvre)
{
    pb_problem p = tm_get("leo-manoeuvre");
    pb_elements el = tm_elements(&p);
    cr_assert_float_eq(el.a, TM_R_EARTH + 500.0, 1e-6);
    cr_assert_float_eq(el.e, 0.0, 1e-12);
    const pb_forces *f = &p.forces;
    cr_assert_eq(f->zonal_degree, 2);
    cr_assert_eq(f->n_manoeuvres, 15);
    double horizon = p.default_orbits * p.period;
    cr_assert_float_eq(horizon, 86400.0, 5e-6 * 86400.0);
    for (int k = 0; k < f->n_manoeuvres; k++) {
        const pb_manoeuvre *m = &f->manoeuvres[k];
        cr_assert_float_eq(m->t, (k + 0.25) * p.period, 1e-9);
        cr_assert(m->t < horizon && (k == 0 || m->t > f->manoeuvres[k - 1].t));
        cr_assert(m->dv[0] == 0 && m->dv[1] == 5e-4 && m->dv[2] == 0);
    }
    cr_assert(p.invariants_from_truth);
}

/* lunar-orbiter: the Moon (GM 4902.800066 km^3/s^2, radius 1737.4 km, J2
 * 2.033e-4: REFERENCES.md, from memory), circular polar at 100 km; the Earth
 * (GM of the body table) on a circular orbit of 384400 km with the sidereal
 * month 27.321661 d (common practice), inclined 6.68 deg; one day. */
Test(missions, lunar_orbiter)
{
    pb_problem p = tm_get("lunar-orbiter");
    cr_assert_eq(p.mu, 4902.800066);
    cr_assert_eq(p.body_radius, 1737.4);
    cr_assert_eq(p.forces.zonal_degree, 2);
    cr_assert_eq(p.forces.jn[2], 2.033e-4);
    cr_assert(!p.forces.sun && !p.forces.moon && !p.forces.drag && p.invariants_from_truth);
    cr_assert(p.forces.circular);
    cr_assert_eq(p.forces.circ.mu, pb_body_earth.mu);
    cr_assert_eq(p.forces.circ.radius, 384400.0);
    cr_assert_float_eq(p.forces.circ.rate * 27.321661 * 86400.0, 2 * M_PI, 1e-12);
    cr_assert_float_eq(p.forces.circ.i * 180 / M_PI, 6.68, 1e-12);
    /* nearly a Keplerian circle about Earth + Moon: rate^2 r^3 = GM_E + GM_M
     * within 0.5% (computed here: 0.27% low, since the mean distance 384400
     * km is not the Keplerian radius of the sidereal month) */
    double gm = p.forces.circ.rate * p.forces.circ.rate * pow(384400.0, 3);
    cr_assert(fabs(gm / (pb_body_earth.mu + p.mu) - 1) < 5e-3, "rate^2 r^3 = %g", gm);
    pb_elements el = tm_elements(&p);
    cr_assert_float_eq(el.a, 1837.4, 1e-6);
    cr_assert_float_eq(el.e, 0.0, 1e-12);
    cr_assert_float_eq(el.i, 90.0 * TM_DEG, 1e-12);
    cr_assert_float_eq(p.default_orbits * p.period, 86400.0, 5e-6 * 86400.0);
}
