/* test_problem_file_forces.c - the force-term keys of problem files: each
 * value lands in pb_problem.forces, each bad input is refused with a message
 * naming file, line and key, the epoch converts to days from J2000.0 exactly,
 * and the shipped mission-forces example reads back the terms it sets. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "problems/bodies.h"
#include "problems/problem_file.h"
#include "problems/problem_file_forces.h"
#include "test_support.h"

#define DEG (M_PI / 180.0)

static char pfft_dir[64];
static char pfft_path[128];
static char pfft_err[1024];
static int pfft_nwarn;

static void pfft_warn(const char *msg)
{
    (void)msg;
    pfft_nwarn++;
}

static void pfft_setup(void)
{
    pbt_tmpdir(pfft_dir, sizeof pfft_dir);
    cr_assert(pfft_dir[0]);
    snprintf(pfft_path, sizeof pfft_path, "%s/forces.ini", pfft_dir);
    pfft_nwarn = 0;
}

static void pfft_teardown(void)
{
    remove(pfft_path);
    rmdir(pfft_dir);
}

/* Write text to forces.ini and read it. */
static int pfft_read(const char *text, pb_problem **cases, int *n)
{
    FILE *f = fopen(pfft_path, "w");
    cr_assert_not_null(f);
    fputs(text, f);
    fclose(f);
    pb_problem *c = NULL;
    int m = 0;
    int s = pb_problem_file_read(pfft_path, &c, &m, pfft_err, sizeof pfft_err, pfft_warn);
    if (cases) {
        *cases = c;
        *n = m;
    } else {
        free(c);
    }
    return s;
}

/* The one case of text, which must be accepted (owner: the caller, free()). */
static pb_problem *pfft_one(const char *text)
{
    pb_problem *c = NULL;
    int n = 0;
    cr_assert_eq(pfft_read(text, &c, &n), PB_OK, "%s", pfft_err);
    cr_assert_eq(n, 1);
    return c;
}

/* Refused, with "path:line: key 'key': ..." holding phrase. */
static void pfft_refused(const char *text, int line, const char *key, const char *phrase)
{
    cr_assert_eq(pfft_read(text, NULL, NULL), PB_EINVAL, "accepted: %s", text);
    char where[200];
    snprintf(where, sizeof where, "%s:%d: key '%s': ", pfft_path, line, key);
    cr_assert(strstr(pfft_err, where) == pfft_err, "'%s' does not start with '%s'", pfft_err, where);
    cr_assert_not_null(strstr(pfft_err, phrase), "'%s' lacks '%s'", pfft_err, phrase);
}

/* A 430 km LEO about the Earth, lines 1-5; the next key is line 6. */
#define LEO "[case leo]\nbody = earth\na = 6808.137\ne = 0.001\ni_deg = 51.6\n"
/* A normalized orbit, lines 1-4; the next key is line 5. */
#define NORM "[case n]\nunits = normalized\na = 1\ne = 0.1\n"

TestSuite(problem_file_forces, .init = pfft_setup, .fini = pfft_teardown);

/* J2..J6 from the body table (EGM96 as bodies.c lists them, REFERENCES.md)
 * unless a key overrides one; force = j2 stays the J2 problem. */
Test(problem_file_forces, zonal_degree_and_overrides)
{
    pb_problem *c = pfft_one(LEO "zonal_degree = 6\nj4 = -1.6e-6\n");
    cr_assert_eq(c->forces.zonal_degree, 6);
    cr_assert_eq(c->force, PB_FORCE_PERTURBED);
    for (int n = 2; n <= 6; n++)
        cr_assert_eq(c->forces.jn[n], n == 4 ? -1.6e-6 : pb_body_earth.jn[n], "J%d", n);
    cr_assert_str_eq(c->angmom_label, "h_z");
    free(c);
    c = pfft_one(LEO "force = j2\nzonal_degree = 2\n");
    cr_assert_eq(c->force, PB_FORCE_J2);
    cr_assert_eq(c->forces.zonal_degree, 2);
    cr_assert_eq(c->forces.jn[2], pb_body_earth.jn[2]);
    free(c);
    /* no body: radius and every coefficient given */
    c = pfft_one("[case z]\nunits = km-s\nmu = 398600.4418\nradius = 6378.137\na = 7000\ne = 0.01\n"
                 "zonal_degree = 3\nj2 = 1.08e-3\nj3 = -2.5e-6\n");
    cr_assert_eq(c->forces.zonal_degree, 3);
    cr_assert_eq(c->forces.jn[3], -2.5e-6);
    cr_assert_eq(c->body_radius, 6378.137);
    free(c);
}

Test(problem_file_forces, zonal_degree_refused)
{
    pfft_refused(LEO "zonal_degree = 7\n", 6, "zonal_degree", "whole number within 2..6 (got 7)");
    pfft_refused(LEO "zonal_degree = 1\n", 6, "zonal_degree", "within 2..6");
    pfft_refused(LEO "zonal_degree = 2.5\n", 6, "zonal_degree", "whole number");
    pfft_refused(LEO "force = j2\nzonal_degree = 4\n", 7, "zonal_degree", "contradicts 'force = j2' at line 6");
    pfft_refused(LEO "zonal_degree = 2\nj3 = 1e-6\n", 7, "j3", "j3 without a zonal term of degree 3");
    pfft_refused(LEO "j2 = 1e-3\n", 6, "j2", "without a zonal term");
    /* the Moon's table has J2 only */
    pfft_refused("[case m]\nbody = moon\na = 1900\ne = 0\nzonal_degree = 3\n", 1, "j3",
                 "body 'moon' gives J2..J2 only");
    pfft_refused(NORM "zonal_degree = 2\nj2 = 1e-3\n", 1, "radius", "zonal_degree = 2 needs body or radius");
    pfft_refused("[case z]\nunits = km-s\nmu = 398600.4418\nradius = 6378.137\na = 7000\ne = 0.01\n"
                 "zonal_degree = 3\nj2 = 1.08e-3\n", 1, "j3", "needs body or radius and j2..jN");
}

/* force = two-body promises no terms: a term key beside it is named with
 * the line of force. */
Test(problem_file_forces, two_body_with_terms_refused)
{
    pfft_refused(LEO "force = two-body\ndrag = exponential\nballistic_m2_kg = 0.02\n", 7, "drag",
                 "contradicts 'force = two-body' at line 6");
    pfft_refused(NORM "r2_potential_gamma = 0.01\nforce = two-body\n", 5, "r2_potential_gamma",
                 "at line 6");
    pfft_refused("[case b]\nbody = earth\nforce = drag\na = 7000\ne = 0\n", 3, "force",
                 "unknown force model 'drag' (known: two-body, j2)");
}

/* Drag: the Earth's exponential atmosphere, turning at 7.292115e-5 rad/s
 * (WGS-84, bodies.c). */
Test(problem_file_forces, drag_accepted)
{
    pb_problem *c = pfft_one(LEO "drag = exponential\nballistic_m2_kg = 0.022\n");
    cr_assert_eq(c->forces.drag, PB_DRAG_EXPONENTIAL);
    cr_assert_eq(c->forces.ballistic_m2_kg, 0.022);
    cr_assert_eq(c->forces.body_rate, 7.292115e-5);
    cr_assert_eq(c->forces.zonal_degree, 0);
    cr_assert_eq(c->velocity_dependent, 1);
    cr_assert_eq(c->invariants_from_truth, 1);
    cr_assert_null(c->exact);
    free(c);
}

Test(problem_file_forces, drag_refused)
{
    pfft_refused(LEO "drag = jacchia\nballistic_m2_kg = 0.02\n", 6, "drag",
                 "unknown drag model 'jacchia' (known: exponential)");
    pfft_refused(LEO "drag = exponential\nballistic_m2_kg = -0.02\n", 7, "ballistic_m2_kg",
                 "must be > 0 (C_D A/m in m^2/kg; got -0.02)");
    pfft_refused(LEO "drag = exponential\nballistic_m2_kg = 0\n", 7, "ballistic_m2_kg", "must be > 0");
    pfft_refused(LEO "drag = exponential\n", 1, "ballistic_m2_kg", "drag needs ballistic_m2_kg");
    pfft_refused(LEO "ballistic_m2_kg = 0.02\n", 6, "ballistic_m2_kg", "ballistic_m2_kg without drag");
    pfft_refused("[case m]\nbody = moon\na = 1900\ne = 0\ndrag = exponential\nballistic_m2_kg = 0.02\n", 5,
                 "drag", "drag without an atmosphere model: body 'moon' has none");
    pfft_refused("[case k]\nunits = km-s\nmu = 398600.4418\nradius = 6378.137\na = 7000\ne = 0\n"
                 "drag = exponential\nballistic_m2_kg = 0.02\n", 7, "drag",
                 "drag without an atmosphere model: the case names no body");
}

/* 2024-03-01T00:00:00 TT is 8825.5 days after 2000-01-01T12:00:00 TT
 * (checked independently with Python's datetime: (datetime(2024,3,1) -
 * datetime(2000,1,1,12)).total_seconds() / 86400 = 8825.5). */
Test(problem_file_forces, epoch_days_from_j2000)
{
    struct { const char *text; double days; } ok[] = {
        {"2000-01-01T12:00:00", 0.0},
        {"2000-01-02T00:00:00", 0.5},
        {"2024-03-01T00:00:00", 8825.5},
        {"2000-01-01T12:00:00.5", 0.5 / 86400.0},
        {"2000-02-29T12:00:00", 59.0},   /* 2000 is a leap year (divisible by 400) */
        {"1999-12-31T12:00:00", -1.0},
    };
    char why[200];
    for (size_t k = 0; k < sizeof ok / sizeof ok[0]; k++) {
        double d = NAN;
        cr_assert_eq(pb_problem_file_epoch(ok[k].text, &d, why, sizeof why), 0, "%s: %s", ok[k].text, why);
        cr_assert_eq(d, ok[k].days, "%s: %.17g, not %.17g", ok[k].text, d, ok[k].days);
    }
    struct { const char *text, *why; } bad[] = {
        {"2024-3-01T00:00:00", "YYYY-MM-DDThh:mm:ss"},
        {"2024-03-01 00:00:00", "YYYY-MM-DDThh:mm:ss"},
        {"2024-03-01T00:00:00Z", "YYYY-MM-DDThh:mm:ss"},
        {"2024-03-01T00:00:00.", "YYYY-MM-DDThh:mm:ss"},
        {"2024-03-01", "YYYY-MM-DDThh:mm:ss"},
        {"2024-13-01T00:00:00", "month outside 1..12"},
        {"2024-00-01T00:00:00", "month outside 1..12"},
        {"2023-02-29T00:00:00", "no such day"},
        {"1900-02-29T00:00:00", "no such day"},  /* 1900 is no leap year */
        {"2024-04-31T00:00:00", "no such day"},
        {"2024-01-01T24:00:00", "hour outside 0..23"},
        {"2024-01-01T00:60:00", "minute outside 0..59"},
        {"2024-01-01T00:00:60", "seconds not below 60"},
        {"1850-01-01T00:00:00", "year outside 1900..2100"},
    };
    for (size_t k = 0; k < sizeof bad / sizeof bad[0]; k++) {
        double d = NAN;
        cr_assert_eq(pb_problem_file_epoch(bad[k].text, &d, why, sizeof why), -1, "%s accepted", bad[k].text);
        cr_assert_not_null(strstr(why, bad[k].why), "%s: '%s' lacks '%s'", bad[k].text, why, bad[k].why);
    }
    double d;
    cr_assert_eq(pb_problem_file_epoch("2024-02-29T23:59:59.75", &d, why, sizeof why), 0, "%s", why);
}

Test(problem_file_forces, third_bodies_accepted)
{
    pb_problem *c = pfft_one(LEO "third_bodies = sun, moon\nepoch = 2024-03-01T00:00:00\n");
    cr_assert_eq(c->forces.sun, 1);
    cr_assert_eq(c->forces.moon, 1);
    cr_assert_eq(c->forces.has_epoch, 1);
    cr_assert_eq(c->forces.epoch_days, 8825.5);
    cr_assert_eq(c->invariants_from_truth, 1);
    free(c);
    c = pfft_one(LEO "epoch = 2000-01-02T00:00:00\nthird_bodies = Moon\n");
    cr_assert_eq(c->forces.sun, 0);
    cr_assert_eq(c->forces.moon, 1);
    cr_assert_eq(c->forces.epoch_days, 0.5);
    free(c);
}

Test(problem_file_forces, third_bodies_refused)
{
    pfft_refused(LEO "third_bodies = sun, moon\n", 6, "third_bodies", "a third body without an epoch");
    pfft_refused(LEO "third_bodies = sun, jupiter\nepoch = 2024-03-01T00:00:00\n", 6, "third_bodies",
                 "unknown third body 'jupiter' (item 2; known: sun, moon)");
    pfft_refused(LEO "third_bodies = sun, sun\nepoch = 2024-03-01T00:00:00\n", 6, "third_bodies", "twice");
    pfft_refused(LEO "third_bodies = sun\nepoch = 2024-02-30T00:00:00\n", 7, "epoch",
                 "malformed epoch '2024-02-30T00:00:00': no such day");
    pfft_refused(LEO "third_bodies = sun\nepoch = 2024/03/01 00:00\n", 7, "epoch", "malformed epoch");
    pfft_refused("[case m]\nbody = moon\na = 1900\ne = 0\nthird_bodies = sun\nepoch = 2024-03-01T00:00:00\n",
                 5, "third_bodies", "geocentric: third_bodies needs body = earth");
    pfft_refused(LEO "epoch = 2024-03-01T00:00:00\n", 6, "epoch", "epoch without a term that uses it");
}

/* Angles in degrees become radians. */
Test(problem_file_forces, circular_third_body)
{
    pb_problem *c = pfft_one(NORM "third_body_circular = 1e-3, 5, 0.0894, 90, -30, 400\n");
    const pb_circular_body *b = &c->forces.circ;
    cr_assert_eq(c->forces.circular, 1);
    cr_assert_eq(b->mu, 1e-3);
    cr_assert_eq(b->radius, 5.0);
    cr_assert_eq(b->rate, 0.0894);
    cr_assert_float_eq(b->i, M_PI / 2, 1e-15);
    cr_assert_float_eq(b->raan, -30 * DEG, 1e-15);
    cr_assert_float_eq(b->u0, 40 * DEG, 1e-15);  /* 400 deg modulo 360 */
    cr_assert_eq(c->units, PB_UNITS_NORMALIZED);
    free(c);
    pfft_refused(NORM "third_body_circular = 1e-3, 5, 0.0894, 90, 0\n", 5, "third_body_circular",
                 "needs six comma-separated numbers mu, radius, rate_rad_s, i_deg, raan_deg, u0_deg (got 5)");
    pfft_refused(NORM "third_body_circular = -1, 5, 0.1, 0, 0, 0\n", 5, "third_body_circular", "mu must be > 0");
    pfft_refused(NORM "third_body_circular = 1, 0, 0.1, 0, 0, 0\n", 5, "third_body_circular",
                 "radius must be > 0");
    pfft_refused(NORM "third_body_circular = 1, 5, x, 0, 0, 0\n", 5, "third_body_circular", "'x' is not a number");
    pfft_refused(NORM "third_body_circular = 1, 5, 0.1, 0, inf, 0\n", 5, "third_body_circular", "not finite");
    pfft_refused(NORM "third_body_circular = 1, 5, 0.1, 200, 0, 0\n", 5, "third_body_circular",
                 "i_deg must be within [0, 180]");
}

Test(problem_file_forces, radiation_pressure)
{
    pb_problem *c = pfft_one(LEO "srp_area_mass_m2_kg = 0.02\ncr = 1.3\nshadow = conical\n"
                             "epoch = 2026-03-20T00:00:00\n");
    cr_assert_eq(c->forces.srp_area_mass_m2_kg, 0.02);
    cr_assert_eq(c->forces.cr, 1.3);
    cr_assert_eq(c->forces.shadow, PB_SHADOW_CONICAL);
    cr_assert_eq(c->forces.epoch_days, 9574.5);  /* Python's datetime, as above */
    free(c);
    c = pfft_one(LEO "srp_area_mass_m2_kg = 0.02\ncr = 1\nepoch = 2026-03-20T00:00:00\n");
    cr_assert_eq(c->forces.shadow, PB_SHADOW_NONE);
    free(c);
    const char *ep = "epoch = 2026-03-20T00:00:00\n";
    char t[400];
    snprintf(t, sizeof t, LEO "srp_area_mass_m2_kg = 0.02\n%s", ep);
    pfft_refused(t, 1, "cr", "srp_area_mass_m2_kg needs cr");
    snprintf(t, sizeof t, LEO "srp_area_mass_m2_kg = 0.02\ncr = 3.5\n%s", ep);
    pfft_refused(t, 7, "cr", "must be within [0, 3] (got 3.5)");
    snprintf(t, sizeof t, LEO "srp_area_mass_m2_kg = -1\ncr = 1\n%s", ep);
    pfft_refused(t, 6, "srp_area_mass_m2_kg", "must be > 0");
    snprintf(t, sizeof t, LEO "srp_area_mass_m2_kg = 0.02\ncr = 1\nshadow = penumbral\n%s", ep);
    pfft_refused(t, 8, "shadow", "unknown shadow model 'penumbral' (known: none, cylindrical, conical)");
    pfft_refused(LEO "shadow = conical\n", 6, "shadow", "shadow without srp_area_mass_m2_kg");
    pfft_refused(LEO "cr = 1.2\n", 6, "cr", "cr without srp_area_mass_m2_kg");
    pfft_refused(LEO "srp_area_mass_m2_kg = 0.02\ncr = 1\n", 6, "srp_area_mass_m2_kg", "add epoch");
    pfft_refused(NORM "srp_area_mass_m2_kg = 0.02\ncr = 1\nepoch = 2026-03-20T00:00:00\n", 5,
                 "srp_area_mass_m2_kg", "needs units = km-s");
}

/* The LEO's period 2 pi sqrt(a^3/mu) is 5590.5 s (Kepler's third law), so
 * 2 orbits end at 11181 s. */
Test(problem_file_forces, manoeuvres_accepted)
{
    pb_problem *c = pfft_one(LEO "manoeuvres = 1000 0 0.01 0; 2500.5 -0.001 0.02 0.003;\norbits = 2\n");
    cr_assert_eq(c->forces.n_manoeuvres, 2);
    cr_assert_eq(c->forces.manoeuvres[0].t, 1000.0);
    cr_assert_eq(c->forces.manoeuvres[0].dv[1], 0.01);
    cr_assert_eq(c->forces.manoeuvres[1].t, 2500.5);
    cr_assert_eq(c->forces.manoeuvres[1].dv[0], -0.001);
    cr_assert_eq(c->forces.manoeuvres[1].dv[2], 0.003);
    cr_assert_eq(c->invariants_from_truth, 1);
    free(c);
    c = pfft_one(LEO "manoeuvres = 11000 0 0.01 0\norbits = 2\n");
    cr_assert_eq(c->forces.n_manoeuvres, 1);
    free(c);
}

Test(problem_file_forces, manoeuvres_refused)
{
    pfft_refused(LEO "manoeuvres = 100 0 0.01\n", 6, "manoeuvres",
                 "entry 1 ('100 0 0.01') is malformed: 3 numbers");
    pfft_refused(LEO "manoeuvres = 100 0 0.01 0; 200 0 x 0\n", 6, "manoeuvres",
                 "entry 2 ('200 0 x 0') is malformed: 'x' is not a number");
    pfft_refused(LEO "manoeuvres = 100 0 0.01 0;; 200 0 0.01 0\n", 6, "manoeuvres", "entry 2 is empty");
    pfft_refused(LEO "manoeuvres =\n", 6, "manoeuvres", "entry 1 is empty");
    pfft_refused(LEO "manoeuvres = 200 0 0.01 0; 100 0 0.01 0\n", 6, "manoeuvres",
                 "entry 2 (t = 100) is out of time order: entry 1 is at t = 200");
    pfft_refused(LEO "manoeuvres = 200 0 0.01 0; 200 0 0.01 0\n", 6, "manoeuvres", "out of time order");
    pfft_refused(LEO "manoeuvres = 0 0 0.01 0\n", 6, "manoeuvres", "entry 1: time 0 must be > 0");
    pfft_refused(LEO "manoeuvres = 100 0 150 0\n", 6, "manoeuvres", "entry 1: |dv| = 150 is above 100");
    /* 2 orbits of 5590.5 s end at 11181 s */
    pfft_refused(LEO "manoeuvres = 100 0 0.01 0; 12000 0 0.01 0\norbits = 2\n", 6, "manoeuvres",
                 "entry 2 at t = 12000 s is beyond the case's horizon 11181");
    pfft_refused(LEO "manoeuvres = 100 0 0.01 0; 4000 0 0.01 0\nhorizon_s = 3600\n", 6, "manoeuvres",
                 "beyond the case's horizon 3600 s (horizon_s)");
    /* " ;" starts an INI comment, which would silently drop entry 2 */
    pfft_refused(LEO "manoeuvres = 100 0 0.01 0 ; 200 0 0.01 0\n", 6, "manoeuvres",
                 "' ;' starts a comment, which would drop the entries after it ('200 0 0.01 0')");
    pfft_refused(LEO "force = two-body\nmanoeuvres = 100 0 0.01 0\n", 7, "manoeuvres", "contradicts");
}

/* A line holds at most 198 characters, so the count limit is checked on the
 * parser itself: 64 entries pass, a 65th is refused. */
Test(problem_file_forces, manoeuvre_count_limit)
{
    char text[2048] = "";
    size_t n = 0;
    for (int k = 1; k <= PB_MANOEUVRES_MAX; k++)
        n += (size_t)snprintf(text + n, sizeof text - n, "%d 0 0.001 0;", k);
    pb_forces f;
    memset(&f, 0, sizeof f);
    char why[300];
    cr_assert_eq(pb_problem_file_manoeuvres(text, &f, why, sizeof why), 0, "%s", why);
    cr_assert_eq(f.n_manoeuvres, PB_MANOEUVRES_MAX);
    cr_assert_eq(f.manoeuvres[PB_MANOEUVRES_MAX - 1].t, (double)PB_MANOEUVRES_MAX);
    snprintf(text + n, sizeof text - n, "%d 0 0.001 0", PB_MANOEUVRES_MAX + 1);
    cr_assert_eq(pb_problem_file_manoeuvres(text, &f, why, sizeof why), -1);
    cr_assert_not_null(strstr(why, "more than 64 manoeuvres"), "%s", why);
}

/* r'' = (h^2 - 2 gamma)/r^3 - mu/r^2: for a = 1, e = 0.1, mu = 1 at
 * periapsis h^2 = a (1 - e^2) = 0.99 (two-body laws, REFERENCES.md). */
Test(problem_file_forces, r2_potential_gamma)
{
    pb_problem *c = pfft_one(NORM "r2_potential_gamma = 0.01\n");
    cr_assert_eq(c->forces.inverse_cube_gamma, 0.01);
    cr_assert_eq(c->force, PB_FORCE_PERTURBED);
    cr_assert_eq(c->invariants_from_truth, 0);  /* conservative: energy and |h| kept */
    cr_assert_str_eq(c->angmom_label, "|h|");
    free(c);
    c = pfft_one(NORM "r2_potential_gamma = -2\n");
    cr_assert_eq(c->forces.inverse_cube_gamma, -2.0);
    free(c);
    pfft_refused(NORM "r2_potential_gamma = 0.5\n", 5, "r2_potential_gamma",
                 "h^2 = 0.99 must exceed 2 gamma = 1");
    pfft_refused(NORM "r2_potential_gamma = nan\n", 5, "r2_potential_gamma", "finite");
}

/* The Moon: GM 4902.800066 km^3/s^2, radius 1737.4 km, J2 2.033e-4
 * (bodies.c, REFERENCES.md, from memory there). */
Test(problem_file_forces, lunar_orbiter)
{
    pb_problem *c = pfft_one("[case lo]\nbody = moon\na = 1837.4\ne = 0.01\ni_deg = 90\nzonal_degree = 2\n");
    cr_assert_eq(c->mu, 4902.800066);
    cr_assert_eq(c->body_radius, 1737.4);
    cr_assert_eq(c->forces.zonal_degree, 2);
    cr_assert_eq(c->forces.jn[2], 2.033e-4);
    cr_assert_eq(c->force, PB_FORCE_J2);
    cr_assert_eq(c->units, PB_UNITS_KM_S);
    cr_assert_eq(pfft_nwarn, 0);
    free(c);
    pfft_refused("[case v]\nbody = vulcan\na = 1837.4\ne = 0\n", 2, "body",
                 "unknown body 'vulcan' (known: earth, moon)");
}

/* The shipped example exercises every term; each case reads back what it
 * sets (epoch 2026-03-20T00:00:00 is 9574.5 days from J2000.0 by Python's
 * datetime). */
Test(problem_file_forces, shipped_mission_example)
{
    const char *root = getenv("PB_ROOT");
    char path[512];
    snprintf(path, sizeof path, "%s/problems/examples/mission-forces.ini", root ? root : ".");
    pb_problem *c = NULL;
    int n = 0;
    cr_assert_eq(pb_problem_file_read(path, &c, &n, pfft_err, sizeof pfft_err, pfft_warn), PB_OK, "%s",
                 pfft_err);
    cr_assert_eq(n, 7);
    cr_assert_eq(pfft_nwarn, 0);
    cr_assert_str_eq(c[0].name, "leo430-j6-drag");
    cr_assert_eq(c[0].forces.zonal_degree, 6);
    cr_assert_eq(c[0].forces.drag, PB_DRAG_EXPONENTIAL);
    cr_assert_eq(c[0].forces.ballistic_m2_kg, 0.022);
    cr_assert(c[1].forces.sun && c[1].forces.moon);
    cr_assert_eq(c[1].forces.epoch_days, 9574.5);
    cr_assert_eq(c[1].forces.shadow, PB_SHADOW_CONICAL);
    cr_assert_eq(c[1].forces.cr, 1.3);
    cr_assert(!c[2].forces.sun && c[2].forces.moon);
    cr_assert_eq(c[3].forces.n_manoeuvres, 2);
    cr_assert_eq(c[3].forces.manoeuvres[0].t, 3000.0);
    cr_assert_eq(c[3].forces.manoeuvres[1].dv[1], 0.03);
    cr_assert_eq(c[4].mu, pb_body_moon.mu);
    cr_assert_eq(c[4].forces.jn[2], pb_body_moon.jn[2]);
    cr_assert_eq(c[5].forces.circular, 1);
    cr_assert_float_eq(c[5].forces.circ.i, 10 * DEG, 1e-15);
    cr_assert_eq(c[6].forces.inverse_cube_gamma, 0.01);
    free(c);
}
