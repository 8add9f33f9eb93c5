/* catalogue.c - the named built-in scenarios (our own invention, for demos and
 * benchmarks): normalized Kepler orbits and a revolving (precessing) one,
 * Earth orbits in km and s with and without J2, a hyperbolic flyby and the
 * Arenstorf orbit of the CR3BP; the mission scenarios with more force terms
 * are in catalogue_missions.c. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "catalogue.h"
#include "catalogue_missions.h"
#include "bodies.h"
#include "cr3bp.h"
#include "j2.h"
#include "revolving.h"
#include "twobody.h"

#define DEG (M_PI / 180.0)
#define SIDEREAL_DAY 86164.0905      /* s, common practice */
#define SUN_RATE (2.0 * M_PI / (365.2422 * 86400.0)) /* rad/s, mean solar motion */

/* Normalized Kepler problem: mu = 1, a = 1, periapsis on +x, motion in x-y. */
static int cat_kepler(pb_problem *out, double e, const char *name)
{
    double r0[3] = {1.0 - e, 0.0, 0.0};
    double v0[3] = {0.0, sqrt((1.0 + e) / (1.0 - e)), 0.0};
    char d[160];
    snprintf(d, sizeof d, "normalized two-body, mu = 1, a = 1, e = %g, from periapsis", e);
    pb_problem_init_twobody(out, name, d, PB_UNITS_NORMALIZED, 1.0, r0, v0);
    out->default_orbits = 100.0;
    return PB_OK;
}

static int cat_kepler_e0(pb_problem *o) { return cat_kepler(o, 0.0, "kepler-e0"); }
static int cat_kepler_e01(pb_problem *o) { return cat_kepler(o, 0.1, "kepler-e0.1"); }
static int cat_kepler_e05(pb_problem *o) { return cat_kepler(o, 0.5, "kepler-e0.5"); }
static int cat_kepler_e06(pb_problem *o) { return cat_kepler(o, 0.6, "kepler-e0.6"); }
static int cat_kepler_e09(pb_problem *o) { return cat_kepler(o, 0.9, "kepler-e0.9"); }
static int cat_kepler_e099(pb_problem *o) { return cat_kepler(o, 0.99, "kepler-e0.99"); }

/* Newton's revolving orbit: the radial motion of kepler-e0.5 under an added
 * potential -gamma/r^2, gamma = 0.01; its apse advances 0.0832 rad a turn. */
static int cat_revolving_e05(pb_problem *o)
{
    int s = pb_problem_init_revolving(o, "revolving-e0.5",
                                      "normalized Kepler + gamma/r^2 potential (Newton's revolving "
                                      "orbit), mu = 1, gamma = 0.01, a = 1, e = 0.5: exact, precessing",
                                      1.0, 0.01, 1.0, 0.5);
    o->default_orbits = 100.0;
    return s;
}

/* An Earth orbit from classical elements (km, degrees); with_j2 adds J2. */
static int cat_earth(pb_problem *out, const char *name, const char *desc, int with_j2,
                     double a, double e, double i_deg, double raan_deg, double argp_deg,
                     double nu_deg, double orbits)
{
    const pb_body *b = &pb_body_earth;
    pb_elements el = {a, e, i_deg * DEG, raan_deg * DEG, argp_deg * DEG, nu_deg * DEG,
                      a * (1.0 - e * e)};
    double r0[3], v0[3];
    int s = pb_state_from_elements(b->mu, &el, r0, v0);
    if (s)
        return s;
    if (with_j2)
        pb_problem_init_j2(out, name, desc, b->mu, b->radius, b->jn[2], r0, v0);
    else {
        pb_problem_init_twobody(out, name, desc, PB_UNITS_KM_S, b->mu, r0, v0);
        out->body_radius = b->radius;
    }
    out->default_orbits = orbits;
    return PB_OK;
}

/* Semi-major axis with period T (Kepler's third law). */
static double cat_a_from_period(double T)
{
    double n = 2.0 * M_PI / T;
    return cbrt(pb_body_earth.mu / (n * n));
}

/* Inclination making the J2 RAAN rate equal the Sun's mean motion
 * (Brouwer / Kozai first-order rate: dRAAN/dt = -1.5 n J2 (R/p)^2 cos i). */
static double cat_sso_inclination_deg(double a, double e)
{
    const pb_body *b = &pb_body_earth;
    double n = sqrt(b->mu / (a * a * a)), p = a * (1.0 - e * e);
    double c = -SUN_RATE / (1.5 * n * b->jn[2] * (b->radius / p) * (b->radius / p));
    return acos(c) / DEG;
}

#define LEO_A 6778.0
#define SSO_A (6378.137 + 700.0)
#define GTO_RP (6378.137 + 250.0)
#define CRIT_I 63.4349488  /* arccos(1/sqrt 5), deg */

static int cat_leo_circular(pb_problem *o)
{
    return cat_earth(o, "leo-circular", "circular LEO, 400 km altitude, i = 51.6 deg",
                     0, LEO_A, 0.0, 51.6, 0.0, 0.0, 0.0, 100.0);
}
static int cat_leo_near_circular(pb_problem *o)
{
    return cat_earth(o, "leo-near-circular",
                     "near-circular LEO, a = 6778 km, e = 0.001, i = 51.6 deg",
                     0, LEO_A, 0.001, 51.6, 0.0, 0.0, 0.0, 100.0);
}
static int cat_sso_700(pb_problem *o)
{
    return cat_earth(o, "sso-700", "circular sun-synchronous orbit, 700 km altitude",
                     0, SSO_A, 0.0, cat_sso_inclination_deg(SSO_A, 0.0), 0.0, 0.0, 0.0,
                     100.0);
}
static int cat_geo(pb_problem *o)
{
    return cat_earth(o, "geo", "geostationary: circular, equatorial, one sidereal day",
                     0, cat_a_from_period(SIDEREAL_DAY), 0.0, 0.0, 0.0, 0.0, 0.0, 100.0);
}
static int cat_gto(pb_problem *o)
{
    double ra = cat_a_from_period(SIDEREAL_DAY);
    double a = 0.5 * (GTO_RP + ra), e = (ra - GTO_RP) / (ra + GTO_RP);
    return cat_earth(o, "gto-transfer",
                     "transfer orbit, 250 km perigee to geostationary apogee, i = 27 deg",
                     0, a, e, 27.0, 0.0, 180.0, 0.0, 100.0);
}
static int cat_molniya(pb_problem *o)
{
    return cat_earth(o, "molniya-like",
                     "12-hour orbit, e = 0.74, critical inclination, apogee in the north",
                     0, cat_a_from_period(0.5 * SIDEREAL_DAY), 0.74, CRIT_I, 0.0, 270.0,
                     0.0, 100.0);
}
static int cat_leo_j2(pb_problem *o)
{
    return cat_earth(o, "leo-j2", "near-circular LEO (as leo-near-circular) with J2",
                     1, LEO_A, 0.001, 51.6, 0.0, 0.0, 0.0, 30.0);
}
static int cat_sso_700_j2(pb_problem *o)
{
    return cat_earth(o, "sso-700-j2", "700 km sun-synchronous orbit with J2",
                     1, SSO_A, 0.0, cat_sso_inclination_deg(SSO_A, 0.0), 0.0, 0.0, 0.0,
                     30.0);
}
static int cat_molniya_j2(pb_problem *o)
{
    return cat_earth(o, "molniya-j2", "12-hour critical-inclination orbit with J2",
                     1, cat_a_from_period(0.5 * SIDEREAL_DAY), 0.74, CRIT_I, 0.0, 270.0,
                     0.0, 30.0);
}
static int cat_hyperbolic(pb_problem *o)
{
    /* v_inf = 3 km/s, periapsis 7000 km; nu = -100 deg is about 40 minutes before periapsis. */
    double vinf = 3.0, rp = 7000.0, mu = pb_body_earth.mu;
    double a = -mu / (vinf * vinf), e = 1.0 - rp / a;
    int s = cat_earth(o, "hyperbolic-flyby",
                      "hyperbolic flyby, v_inf = 3 km/s, periapsis 7000 km, 2-hour horizon",
                      0, a, e, 30.0, 0.0, 0.0, -100.0, 0.0);
    o->default_horizon_s = 7200.0;
    return s;
}
static int cat_arenstorf(pb_problem *o)
{
    double r0[3] = {0.994, 0.0, 0.0}, v0[3] = {0.0, PB_ARENSTORF_VY0, 0.0};
    pb_problem_init_cr3bp(o, "arenstorf",
                          "Arenstorf periodic orbit, Earth-Moon CR3BP, rotating frame",
                          PB_ARENSTORF_MU, r0, v0, PB_ARENSTORF_PERIOD);
    o->default_orbits = 10.0;
    return PB_OK;
}

const pb_problem_entry pb_problem_table[] = {
    {"kepler-e0", cat_kepler_e0},
    {"kepler-e0.1", cat_kepler_e01},
    {"kepler-e0.5", cat_kepler_e05},
    {"kepler-e0.6", cat_kepler_e06},
    {"kepler-e0.9", cat_kepler_e09},
    {"kepler-e0.99", cat_kepler_e099},
    {"revolving-e0.5", cat_revolving_e05},
    {"leo-circular", cat_leo_circular},
    {"leo-near-circular", cat_leo_near_circular},
    {"sso-700", cat_sso_700},
    {"geo", cat_geo},
    {"gto-transfer", cat_gto},
    {"molniya-like", cat_molniya},
    {"hyperbolic-flyby", cat_hyperbolic},
    {"leo-j2", cat_leo_j2},
    {"sso-700-j2", cat_sso_700_j2},
    {"molniya-j2", cat_molniya_j2},
    {"leo-drag", pb_cat_leo_drag},
    {"geo-sun-moon-srp", pb_cat_geo_sun_moon_srp},
    {"heo-moon", pb_cat_heo_moon},
    {"leo-manoeuvre", pb_cat_leo_manoeuvre},
    {"lunar-orbiter", pb_cat_lunar_orbiter},
    {"arenstorf", cat_arenstorf},
    {NULL, NULL}
};

int pb_problem_lookup(const char *name, pb_problem *out)
{
    if (!name || !out)
        return PB_EINVAL;
    for (int k = 0; pb_problem_table[k].name; k++)
        if (strcmp(pb_problem_table[k].name, name) == 0)
            return pb_problem_table[k].make(out);
    return PB_EINVAL;
}
