/* catalogue_missions.c - built-in mission scenarios (our own invention, for
 * benchmarks): a decaying LEO with drag and J2..J6, a GEO under Sun, Moon
 * and radiation pressure, a highly eccentric orbit under the Moon, a LEO
 * raised by a burn each orbit, and a polar lunar orbiter with the Earth as a
 * third body on a circular orbit. Their truth is the
 * quad-precision reference trajectory (no closed form). */
#include <math.h>
#include "catalogue_missions.h"
#include "bodies.h"
#include "force_terms.h"
#include "twobody.h"

#define MS_DEG (M_PI / 180.0)
#define MS_DAY 86400.0
#define MS_SIDEREAL_DAY 86164.0905  /* s, common practice (REFERENCES.md) */

/* The epoch 2026-03-10T00:00:00 TT as TT days from J2000.0 = JD 2451545.0
 * (2000-01-01T12:00 TT): 2000-01-01 .. 2026-01-01 is 26 x 365 days plus 7
 * leap days (2000, 2004, .., 2024) = 9497 days, then 31 (January) + 28
 * (February; 2026 is not a leap year) + 9 = 68 days to March 10, so 9565
 * days after 2000-01-01T00:00, less the half day: 9564.5 (JD 2461109.5). */

/* The number of periods in a horizon of `seconds`, to six significant
 * digits (as listings print it, so that the printed horizon is the horizon;
 * within 5e-6 relative of the span: 1.3 s in three days). */
static double ms_orbits_in(double seconds, double period)
{
    /* k is an exact power of ten for spans under 1e6 periods, as here */
    double x = seconds / period, k = pow(10.0, 5.0 - floor(log10(x)));
    return nearbyint(x * k) / k;
}

/* The zonal terms J2 .. J_degree of body b into f. */
static void ms_zonal(pb_forces *f, const pb_body *b, int degree)
{
    f->zonal_degree = degree;
    for (int n = 2; n <= degree; n++)
        f->jn[n] = b->jn[n];
}

/* A scenario about body b from classical elements (km, degrees) with the
 * force terms f. */
static int ms_build(pb_problem *out, const char *name, const char *desc, const pb_body *b,
                    const pb_forces *f, double a, double e, double i_deg, double raan_deg,
                    double argp_deg, double nu_deg)
{
    pb_elements el = {a, e, i_deg * MS_DEG, raan_deg * MS_DEG, argp_deg * MS_DEG,
                      nu_deg * MS_DEG, a * (1.0 - e * e)};
    double r0[3], v0[3];
    int s = pb_state_from_elements(b->mu, &el, r0, v0);
    if (s)
        return s;
    pb_problem_init_forces(out, name, desc, PB_UNITS_KM_S, b->mu, b->radius, f, r0, v0);
    return PB_OK;
}

/* LEO at 425 km (a = R + 425 km, e = 0.0005), i = 51.6 deg; J2..J6 and
 * drag with B = C_D A/m = 0.01 m^2/kg (C_D 2.2, A/m about 0.0045 m^2/kg);
 * three days. The height |r| - R stays inside the 400-450 km row of the
 * exponential atmosphere: 416.5 to 421.6 km on the reference trajectory
 * (J2's short-period terms lower the osculating start; drag takes about
 * 0.3 km in three days). */
int pb_cat_leo_drag(pb_problem *out)
{
    const pb_body *b = &pb_body_earth;
    pb_forces f = {0};
    ms_zonal(&f, b, 6);
    f.drag = PB_DRAG_EXPONENTIAL;
    f.ballistic_m2_kg = 0.01;
    f.body_rate = b->rate;
    int s = ms_build(out, "leo-drag",
                     "LEO at 425 km, e = 0.0005, i = 51.6 deg: J2..J6 + drag (exponential "
                     "atmosphere, C_D A/m = 0.01 m^2/kg), 3 days",
                     b, &f, b->radius + 425.0, 0.0005, 51.6, 0.0, 0.0, 0.0);
    if (!s)
        out->default_orbits = ms_orbits_in(3.0 * MS_DAY, out->period);
    return s;
}

/* GEO (one sidereal day by Kepler's third law), i = 0.05 deg, at the
 * 2026 March epoch (the eclipse season around the equinox: the conical
 * shadow is crossed once a day); J2 + Sun + Moon + radiation pressure with
 * A/m = 0.02 m^2/kg, C_R = 1.3; 30 sidereal days. */
int pb_cat_geo_sun_moon_srp(pb_problem *out)
{
    const pb_body *b = &pb_body_earth;
    pb_forces f = {0};
    ms_zonal(&f, b, 2);
    f.sun = f.moon = 1;
    f.srp_area_mass_m2_kg = 0.02;
    f.cr = 1.3;
    f.shadow = PB_SHADOW_CONICAL;
    f.has_epoch = 1;
    f.epoch_days = PB_MISSION_EPOCH_DAYS;
    double n = 2.0 * M_PI / MS_SIDEREAL_DAY, a = cbrt(b->mu / (n * n));
    int s = ms_build(out, "geo-sun-moon-srp",
                     "GEO, i = 0.05 deg, from 2026-03-10 TT (eclipse season): J2 + Sun + Moon + "
                     "SRP (A/m 0.02 m^2/kg, C_R 1.3, conical shadow), 30 days",
                     b, &f, a, 0.0, 0.05, 0.0, 0.0, 0.0);
    if (!s)
        out->default_orbits = 30.0;
    return s;
}

/* Highly eccentric orbit: perigee 500 km, apogee 120,000 km above the
 * equatorial radius (e = 0.897, period about 1.98 days), i = 28.5 deg, from
 * perigee at the 2026 March epoch; Earth J2 + the Moon; 10 orbits. */
int pb_cat_heo_moon(pb_problem *out)
{
    const pb_body *b = &pb_body_earth;
    pb_forces f = {0};
    ms_zonal(&f, b, 2);
    f.moon = 1;
    f.has_epoch = 1;
    f.epoch_days = PB_MISSION_EPOCH_DAYS;
    double rp = b->radius + 500.0, ra = b->radius + 120000.0;
    int s = ms_build(out, "heo-moon",
                     "highly eccentric orbit, perigee 500 km, apogee 120,000 km, i = 28.5 deg, "
                     "from 2026-03-10 TT: J2 + Moon, 10 orbits",
                     b, &f, 0.5 * (rp + ra), (ra - rp) / (ra + rp), 28.5, 0.0, 0.0, 0.0);
    if (!s)
        out->default_orbits = 10.0;
    return s;
}

#define MS_BURNS 15
#define MS_BURN_DV 5e-4  /* km/s: +0.5 m/s along-track */

/* Circular LEO at 500 km, i = 51.6 deg, J2, raised by an along-track burn of
 * +0.5 m/s a quarter orbit after the start of each of its first 15 orbits
 * (the two-body period of the initial state); one day. */
int pb_cat_leo_manoeuvre(pb_problem *out)
{
    const pb_body *b = &pb_body_earth;
    double a = b->radius + 500.0, T = pb_twobody_period(b->mu, a);
    pb_forces f = {0};
    ms_zonal(&f, b, 2);
    f.n_manoeuvres = MS_BURNS;
    for (int k = 0; k < MS_BURNS; k++) {
        f.manoeuvres[k].t = (k + 0.25) * T;
        f.manoeuvres[k].dv[1] = MS_BURN_DV;
    }
    int s = ms_build(out, "leo-manoeuvre",
                     "circular LEO at 500 km, i = 51.6 deg, J2, +0.5 m/s along-track burn a "
                     "quarter orbit into each of the first 15 orbits, 1 day",
                     b, &f, a, 0.0, 51.6, 0.0, 0.0, 0.0);
    if (!s)
        out->default_orbits = ms_orbits_in(MS_DAY, out->period);
    return s;
}

/* Polar lunar orbiter, circular at 100 km above the Moon's radius, lunar J2
 * and the Earth as a third body on a circular orbit as the user states one
 * (the force terms have no Moon-centred Earth ephemeris): radius 384400 km
 * and the sidereal month 27.321661 days (common practice; rate^2 r^3 =
 * 4.03e5 km^3/s^2 = GM of Earth plus Moon, as a circular orbit needs), in a
 * plane 6.68 deg from the lunar equator (common practice); one day (about 12
 * orbits). */
int pb_cat_lunar_orbiter(pb_problem *out)
{
    const pb_body *b = &pb_body_moon;
    pb_forces f = {0};
    ms_zonal(&f, b, 2);
    f.circular = 1;
    f.circ = (pb_circular_body){pb_body_earth.mu, 384400.0, 2.0 * M_PI / (27.321661 * MS_DAY),
                                6.68 * MS_DEG, 0.0, 0.0};
    int s = ms_build(out, "lunar-orbiter",
                     "polar lunar orbit, circular at 100 km altitude, lunar J2 and the Earth on a "
                     "circular orbit about the Moon, 1 day",
                     b, &f, b->radius + 100.0, 0.0, 90.0, 0.0, 0.0, 0.0);
    if (!s)
        out->default_orbits = ms_orbits_in(MS_DAY, out->period);
    return s;
}
