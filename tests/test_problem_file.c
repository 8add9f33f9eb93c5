/* test_problem_file.c - the INI problem-file reader: every validation error
 * names file, line and key; a periapsis below the surface only warns; several
 * cases in one file; the shipped examples parse. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include "problems/bodies.h"
#include "problems/problem_file.h"
#include "problems/problem_file_case.h"
#include "problems/twobody.h"
#include "test_support.h"

static char pft_dir[64];
static char pft_path[128];
static char pft_err[512];
static int pft_nwarn;
static char pft_warn_msg[512];

static void pft_warn(const char *msg)
{
    pft_nwarn++;
    snprintf(pft_warn_msg, sizeof pft_warn_msg, "%s", msg);
}

static void pft_setup(void)
{
    pbt_tmpdir(pft_dir, sizeof pft_dir);
    cr_assert(pft_dir[0]);
    snprintf(pft_path, sizeof pft_path, "%s/orbit.ini", pft_dir);
    pft_nwarn = 0;
    pft_warn_msg[0] = '\0';
}

static void pft_teardown(void)
{
    remove(pft_path);
    rmdir(pft_dir);
}

/* Write text to orbit.ini and read it; cases are freed unless wanted. */
static int pft_read(const char *text, pb_problem **cases, int *n)
{
    FILE *f = fopen(pft_path, "w");
    cr_assert_not_null(f);
    fputs(text, f);
    fclose(f);
    pb_problem *c = NULL;
    int m = 0;
    int s = pb_problem_file_read(pft_path, &c, &m, pft_err, sizeof pft_err, pft_warn);
    if (cases) {
        *cases = c;
        *n = m;
    } else {
        free(c);
    }
    return s;
}

/* The message names the file, the line and the key. */
static void pft_expect_error(const char *text, int line, const char *key, const char *phrase)
{
    int s = pft_read(text, NULL, NULL);
    cr_assert_eq(s, PB_EINVAL, "accepted: %s", text);
    cr_log_info("%s", pft_err);
    char where[200], k[80];
    snprintf(where, sizeof where, "%s:%d: ", pft_path, line);
    cr_assert(strstr(pft_err, where) == pft_err, "'%s' does not start with '%s'", pft_err, where);
    if (key) {
        snprintf(k, sizeof k, "key '%s'", key);
        cr_assert_not_null(strstr(pft_err, k), "'%s' does not name %s", pft_err, k);
    }
    cr_assert_not_null(strstr(pft_err, phrase), "'%s' lacks '%s'", pft_err, phrase);
}

#define HEAD "[case demo]\nunits = km-s\nbody = earth\n"   /* lines 1-3 */

TestSuite(problem_file, .init = pft_setup, .fini = pft_teardown);

Test(problem_file, negative_eccentricity)
{
    pft_expect_error(HEAD "a = 7000\ne = -0.1\n", 5, "e", "eccentricity must be >= 0 (got -0.1)");
}

Test(problem_file, unknown_key)
{
    pft_expect_error(HEAD "a = 7000\ne = 0.1\ninclination = 3\n", 6, "inclination", "unknown key");
}

Test(problem_file, missing_required_key)
{
    pft_expect_error("[case demo]\nunits = km-s\na = 7000\ne = 0.1\n", 1, "mu", "missing");
    pft_expect_error(HEAD "a = 7000\n", 1, "e", "missing");
    pft_expect_error(HEAD "r = 7000, 0, 0\n", 1, "v", "missing");
}

Test(problem_file, elements_and_state_both_given)
{
    pft_expect_error(HEAD "a = 7000\ne = 0.1\nr = 7000, 0, 0\nv = 0, 7.5, 0\n", 6, "r",
                     "both classical elements");
}

Test(problem_file, non_positive_a_for_ellipse)
{
    pft_expect_error(HEAD "a = -7000\ne = 0.1\n", 4, "a", "must be > 0 for an ellipse");
    pft_expect_error(HEAD "a = 0\ne = 0.1\n", 4, "a", "must be > 0 for an ellipse");
}

Test(problem_file, parabola_by_elements)
{
    pft_expect_error(HEAD "a = 7000\ne = 1\n", 5, "e", "parabola");
}

Test(problem_file, non_numeric_value)
{
    pft_expect_error(HEAD "a = seven thousand\ne = 0.1\n", 4, "a", "not a number");
    pft_expect_error(HEAD "a = 7000km\ne = 0.1\n", 4, "a", "not a number");
    pft_expect_error(HEAD "r = 7000, 0\nv = 0, 7.5, 0\n", 4, "r", "three");
}

Test(problem_file, non_finite_value)
{
    pft_expect_error(HEAD "a = inf\ne = 0.1\n", 4, "a", "finite");
    pft_expect_error(HEAD "a = 7000\ne = nan\n", 5, "e", "finite");
    pft_expect_error(HEAD "a = 1e999\ne = 0.1\n", 4, "a", "finite");
}

Test(problem_file, unknown_units)
{
    pft_expect_error("[case demo]\nunits = furlongs\nmu = 1\na = 1\ne = 0\n", 2, "units", "unknown units");
}

Test(problem_file, unknown_force_model)
{
    pft_expect_error(HEAD "force = drag\na = 7000\ne = 0.1\n", 4, "force", "unknown force model");
}

Test(problem_file, unknown_body)
{
    pft_expect_error("[case demo]\nunits = km-s\nbody = vulcan\na = 7000\ne = 0\n", 3, "body", "unknown body");
}

Test(problem_file, unreadable_file)
{
    pb_problem *c = (pb_problem *)1;
    int n = 7;
    char missing[200];
    snprintf(missing, sizeof missing, "%s/does-not-exist.ini", pft_dir);
    cr_assert_eq(pb_problem_file_read(missing, &c, &n, pft_err, sizeof pft_err, NULL), PB_EINVAL);
    cr_assert_null(c);
    cr_assert_eq(n, 0);
    cr_assert_not_null(strstr(pft_err, missing));
    cr_assert_not_null(strstr(pft_err, "cannot read"));
}

Test(problem_file, case_without_name)
{
    pft_expect_error("[case]\nunits = normalized\na = 1\ne = 0\n", 1, NULL, "no case name");
    pft_expect_error("[orbit one]\nunits = normalized\na = 1\ne = 0\n", 1, NULL, "[case NAME]");
}

/* The case name becomes part of file names (series/<case>.csv): a name that
 * could leave the run directory is refused. */
Test(problem_file, case_name_with_path_characters)
{
    pft_expect_error("[case ../../escaped]\nunits = normalized\na = 1\ne = 0\n", 1, NULL,
                     "may hold only letters");
    pft_expect_error("[case a/b]\nunits = normalized\na = 1\ne = 0\n", 1, NULL, "may hold only");
    pft_expect_error("[case .hidden]\nunits = normalized\na = 1\ne = 0\n", 1, NULL, "may not start");
}

/* A line longer than the reader's buffer is named as such, at its own line,
 * instead of being misread as two lines. */
Test(problem_file, line_too_long)
{
    char text[1024];
    char desc[301];
    memset(desc, 'x', 300);
    desc[300] = 0;
    snprintf(text, sizeof text, "[case d]\nunits = normalized\ndescription = %s\na = 1\ne = 0\n", desc);
    pft_expect_error(text, 3, NULL, "line longer than");
}

Test(problem_file, duplicate_case_names)
{
    pft_expect_error("[case x]\nunits = normalized\na = 1\ne = 0\n\n[case x]\nunits = normalized\na = 2\ne = 0\n",
                     6, NULL, "duplicate case name 'x' (first at line 1)");
}

Test(problem_file, key_given_twice)
{
    pft_expect_error(HEAD "a = 7000\na = 8000\ne = 0\n", 5, "a", "given twice");
}

Test(problem_file, orbits_for_open_orbit)
{
    pft_expect_error(HEAD "a = -40000\ne = 1.2\norbits = 3\n", 6, "orbits", "no period");
}

/* Inclination is restricted to [0, 180] deg, the other angles are taken
 * modulo 360 (common practice for classical elements). */
Test(problem_file, inclination_out_of_range)
{
    pft_expect_error(HEAD "a = 7000\ne = 0.1\ni_deg = 1000\n", 6, "i_deg",
                     "inclination must be within [0, 180] deg (got 1000)");
    pft_expect_error(HEAD "a = 7000\ne = 0.1\ni_deg = -1\n", 6, "i_deg", "within [0, 180]");
    pft_expect_error(HEAD "a = 7000\ne = 0.1\ni_deg = 180.001\n", 6, "i_deg", "within [0, 180]");
    pb_problem *c;
    int n;
    cr_assert_eq(pft_read(HEAD "a = 7000\ne = 0.1\ni_deg = 180\n", &c, &n), PB_OK, "%s", pft_err);
    pb_elements el;
    cr_assert_eq(pb_elements_from_state(c[0].mu, c[0].r0, c[0].v0, &el), PB_OK);
    cr_assert_float_eq(el.i, M_PI, 1e-12);  /* round trip to 1e-12 (REFERENCES.md) */
    free(c);
}

/* raan/argp/nu of 370, 540 and -340 deg give the same state as 10, 180 and
 * 20 deg (modulo 360, common practice), to 1e-12 relative; absurdly large
 * values whose fraction of a turn is lost are refused. */
Test(problem_file, angles_taken_modulo_360)
{
    pb_problem *c, *d;
    int n;
    cr_assert_eq(pft_read(HEAD "a = 24396\ne = 0.7283\ni_deg = 27\nraan_deg = 370\nargp_deg = 540\n"
                          "nu_deg = -340\n", &c, &n), PB_OK, "%s", pft_err);
    cr_assert_eq(pft_read(HEAD "a = 24396\ne = 0.7283\ni_deg = 27\nraan_deg = 10\nargp_deg = 180\n"
                          "nu_deg = 20\n", &d, &n), PB_OK, "%s", pft_err);
    for (int k = 0; k < 3; k++) {
        cr_assert_float_eq(c[0].r0[k], d[0].r0[k], 1e-12 * 24396.0);
        cr_assert_float_eq(c[0].v0[k], d[0].v0[k], 1e-12 * 10.0);
    }
    free(c);
    free(d);
    pft_expect_error(HEAD "a = 7000\ne = 0.1\nraan_deg = 1e12\n", 6, "raan_deg", "too large");
    pft_expect_error(HEAD "a = 7000\ne = 0.1\nargp_deg = -2e9\n", 6, "argp_deg", "too large");
    pft_expect_error(HEAD "a = 7000\ne = 0.1\nnu_deg = 1e300\n", 6, "nu_deg", "too large");
}

/* inih would read an indented line as a continuation of the key above it
 * ("given twice"); it is refused at its own line instead, while indented
 * comments and blank lines stay allowed. */
Test(problem_file, indented_line_refused)
{
    pft_expect_error("[case d]\nunits = normalized\ndescription = x\n    a = 1\ne = 0\n", 4, NULL,
                     "indented line: keys must start at the beginning of the line");
    pft_expect_error("[case d]\nunits = normalized\na = 1\ne = 0\n\t[case e]\n", 5, NULL,
                     "indented line");
    pb_problem *c;
    int n;
    cr_assert_eq(pft_read("[case d]\nunits = normalized\n   ; note\n  \na = 1\ne = 0\n", &c, &n),
                 PB_OK, "%s", pft_err);
    cr_assert_eq(n, 1);
    free(c);
}

/* inih keeps 49 characters between the brackets, so a name longer than 44
 * would be cut short (and two names sharing 44 characters would clash). */
Test(problem_file, case_name_too_long)
{
    const char *n44 = "abcdefghijabcdefghijabcdefghijabcdefghijabcd";
    char text[512];
    snprintf(text, sizeof text, "[case %se]\nunits = normalized\na = 1\ne = 0\n", n44);
    pft_expect_error(text, 1, NULL, "is longer than 44 characters (45 given)");
    snprintf(text, sizeof text, "[case %sX]\nunits = normalized\na = 1\ne = 0\n\n"
             "[case %sY]\nunits = normalized\na = 2\ne = 0\n", n44, n44);
    pft_expect_error(text, 1, NULL, "longer than 44 characters");
    /* exactly 44 characters is kept whole */
    snprintf(text, sizeof text, "[case %s]\nunits = normalized\na = 1\ne = 0\n", n44);
    pb_problem *c;
    int n;
    cr_assert_eq(pft_read(text, &c, &n), PB_OK, "%s", pft_err);
    cr_assert_str_eq(c[0].name, n44);
    free(c);
}

/* A header with no key under it is an error at its own line, not a case
 * that silently does not exist. */
Test(problem_file, empty_case_section)
{
    pft_expect_error("[case c0]\n[case c1]\nunits = normalized\na = 1\ne = 0\n", 1, NULL,
                     "case 'c0' has no keys");
    pft_expect_error("[case c1]\nunits = normalized\na = 1\ne = 0\n\n[case c2]\n; later\n", 6, NULL,
                     "case 'c2' has no keys");
}

#define NORM "[case n]\nunits = normalized\n"   /* lines 1-2 */

/* The horizon keys are checked when read: 1e-3 .. 1e8 orbits, or that many
 * periods in seconds (our limits, common practice), named by key instead of
 * "1e+302 steps are too many for one case" at run time. */
Test(problem_file, horizon_out_of_range)
{
    pft_expect_error(NORM "a = 1\ne = 0.1\norbits = 1e300\n", 5, "orbits", "must be within [0.001, 1e+08]");
    pft_expect_error(NORM "a = 1\ne = 0.1\norbits = 1e-9\n", 5, "orbits", "must be within");
    /* period 2 pi for a = 1, mu = 1 (Kepler's third law, REFERENCES.md) */
    pft_expect_error(NORM "a = 1\ne = 0.1\nhorizon_s = 1e300\n", 5, "horizon_s",
                     "times the period 6.28319");
    /* open orbit: the period of a circle at rp = |a|(e - 1) = 0.5 is 2 pi 0.5^1.5 = 2.22144 */
    pft_expect_error(NORM "a = -1\ne = 1.5\nhorizon_s = 1e300\n", 5, "horizon_s",
                     "periapsis time scale 2.22144");
    pb_problem *c;
    int n;
    cr_assert_eq(pft_read(NORM "a = 1\ne = 0.1\norbits = 1e8\n", &c, &n), PB_OK, "%s", pft_err);
    cr_assert_eq(c[0].default_orbits, 1e8);
    free(c);
}

/* mu and radius within physical ranges (1e-20 .. 1e20, 1e-6 .. 1e10; our
 * limits, common practice): mu = 1e-300 used to end as "horizon must be
 * positive" at run time. */
Test(problem_file, mu_and_radius_out_of_range)
{
    pft_expect_error(NORM "mu = 1e-300\na = 1\ne = 0.1\n", 3, "mu", "mu must be within [1e-20, 1e+20]");
    pft_expect_error(NORM "mu = 1e30\na = 1\ne = 0.1\n", 3, "mu", "within");
    pft_expect_error(NORM "radius = 1e-300\na = 1\ne = 0.1\n", 3, "radius", "radius must be within");
}

/* A hyperbola a hair from parabolic is refused by elements (it failed to
 * converge at run time); |e - 1| = 1e-6 itself is still accepted. */
Test(problem_file, near_parabolic_elements)
{
    pft_expect_error(HEAD "a = -44289\ne = 1.0000000001\nhorizon_s = 1000\n", 5, "e",
                     "too close to parabolic for elements");
    pft_expect_error(HEAD "a = 44289\ne = 0.9999999999\n", 5, "e", "give a state vector");
    pb_problem *c;
    int n;
    cr_assert_eq(pft_read(NORM "a = -1\ne = 1.000001\nhorizon_s = 1e-3\n", &c, &n), PB_OK, "%s", pft_err);
    free(c);
}

/* (v / v_esc)^2 = v^2 r / (2 mu) (vis-viva, REFERENCES.md): r = 1, v = 1e10
 * is 7.07e9 times the escape speed sqrt(2); at most 1e3 is accepted. */
Test(problem_file, speed_far_beyond_escape)
{
    pft_expect_error(NORM "r = 1,0,0\nv = 0,1e10,0\nhorizon_s = 10\n", 4, "v",
                     "7.07e+09 times the escape speed");
    /* elements: at periapsis (v/v_esc)^2 = (1 + e)/2, so e = 1e7 is 2.24e3 */
    pft_expect_error(NORM "a = -1e-3\ne = 1e7\nhorizon_s = 1\n", 4, "e", "2.24e+03 times the escape");
    pb_problem *c;
    int n;
    cr_assert_eq(pft_read(NORM "r = 1,0,0\nv = 0,14,0\nhorizon_s = 1\n", &c, &n), PB_OK, "%s", pft_err);
    free(c);
}

/* a = 1e-300 or 1e300 (normalized) used to read "the orbit is open (no
 * period)"; sizes are bounded to 1e-6 .. 1e12 times the radius or unit. */
Test(problem_file, orbit_size_out_of_range)
{
    pft_expect_error(NORM "a = 1e-300\ne = 0.1\norbits = 1\n", 3, "a",
                     "|a| = 1e-300 is outside [1e-06, 1e+12] times the unit length");
    pft_expect_error(NORM "a = 1e300\ne = 0.1\norbits = 1\n", 3, "a", "outside");
    pft_expect_error(HEAD "a = 1e17\ne = 0.1\n", 4, "a", "times the body's radius (6378.14)");
    pft_expect_error(NORM "r = 1e-200, 0, 0\nv = 0, 1, 0\nhorizon_s = 1\n", 3, "r", "|r| = 1e-200 is outside");
}

/* A periapsis below the surface is a warning, not an error (rp = a(1-e) = 3500
 * km < R = 6378.137 km); the message names file and line of the case. */
Test(problem_file, periapsis_below_surface_warns)
{
    pb_problem *c;
    int n;
    cr_assert_eq(pft_read(HEAD "a = 7000\ne = 0.5\n", &c, &n), PB_OK, "%s", pft_err);
    cr_assert_eq(n, 1);
    cr_assert_eq(pft_nwarn, 1);
    char where[200];
    snprintf(where, sizeof where, "%s:1: ", pft_path);
    cr_assert(strstr(pft_warn_msg, where) == pft_warn_msg, "%s", pft_warn_msg);
    cr_assert_not_null(strstr(pft_warn_msg, "below the body's surface"));
    free(c);
}

/* A J2 outside (0, 0.1) (the Earth's is 1.08e-3, common practice) is read
 * but warned about, naming the line of the key. */
Test(problem_file, implausible_j2_warns)
{
    pb_problem *c;
    int n;
    cr_assert_eq(pft_read("[case j]\nunits = km-s\nmu = 398600.4418\nradius = 6378.137\n"
                          "j2 = -5\nforce = j2\na = 7000\ne = 0.001\n", &c, &n), PB_OK, "%s", pft_err);
    cr_assert_eq(pft_nwarn, 1);
    char where[200];
    snprintf(where, sizeof where, "%s:5: ", pft_path);
    cr_assert(strstr(pft_warn_msg, where) == pft_warn_msg, "%s", pft_warn_msg);
    cr_assert_not_null(strstr(pft_warn_msg, "outside (0, 0.1)"));
    free(c);
    pft_nwarn = 0;
    cr_assert_eq(pft_read("[case j]\nunits = km-s\nbody = earth\nforce = j2\na = 7000\ne = 0.001\n",
                          &c, &n), PB_OK, "%s", pft_err);
    cr_assert_eq(pft_nwarn, 0);
    free(c);
}

/* Several cases: elements -> state -> elements round trip to 1e-12 relative
 * (REFERENCES.md), a state case copied exactly, J2 constants from the body
 * (WGS-84/EGM96 common practice), horizons as given. */
Test(problem_file, several_cases)
{
    const char *text =
        "; three cases\n"
        "[case ell]\nunits = km-s\nmu = 398600.4418\na = 24396.0\ne = 0.7283\n"
        "i_deg = 27\nraan_deg = 10\nargp_deg = 180\nnu_deg = 20 ; inline comment\norbits = 50\n"
        "\n[case st]\nbody = earth\nforce = j2\nr = 6778, 0, 0\nv = 0, 4.7556, 5.9983\nhorizon_s = 86400\n"
        "\n[case hyp]\nunits = normalized\na = -2\ne = 1.5\nnu_deg = -60\nhorizon_s = 30\n"
        "description = an open orbit\n";
    pb_problem *c;
    int n;
    cr_assert_eq(pft_read(text, &c, &n), PB_OK, "%s", pft_err);
    cr_assert_eq(n, 3);
    cr_assert_eq(pft_nwarn, 0, "%s", pft_warn_msg);
    cr_assert_str_eq(c[0].name, "ell");
    cr_assert_str_eq(c[1].name, "st");
    cr_assert_str_eq(c[2].name, "hyp");

    pb_elements el;
    cr_assert_eq(pb_elements_from_state(c[0].mu, c[0].r0, c[0].v0, &el), PB_OK);
    cr_assert_float_eq(el.a, 24396.0, 1e-12 * 24396.0);
    cr_assert_float_eq(el.e, 0.7283, 1e-12);
    cr_assert_float_eq(el.i, 27 * M_PI / 180, 1e-12);
    cr_assert_float_eq(el.raan, 10 * M_PI / 180, 1e-12);
    cr_assert_float_eq(el.argp, M_PI, 1e-12);
    cr_assert_float_eq(el.nu, 20 * M_PI / 180, 1e-12);
    cr_assert_eq(c[0].force, PB_FORCE_TWO_BODY);
    cr_assert_eq(c[0].default_orbits, 50.0);
    cr_assert_not_null(c[0].exact_q);

    cr_assert_eq(c[1].force, PB_FORCE_J2);
    cr_assert_eq(c[1].mu, 398600.4418);
    cr_assert_eq(c[1].body_radius, 6378.137);
    cr_assert_eq(c[1].forces.jn[2], pb_body_earth.jn[2]);
    cr_assert_eq(c[1].r0[0], 6778.0);
    cr_assert_eq(c[1].v0[2], 5.9983);
    cr_assert_null(c[1].exact);
    cr_assert_str_eq(c[1].angmom_label, "h_z");
    cr_assert_eq(c[1].default_horizon_s, 86400.0);
    cr_assert_eq(c[1].default_orbits, 0.0); /* the horizon stays in seconds */

    cr_assert_eq(c[2].units, PB_UNITS_NORMALIZED);
    cr_assert_eq(c[2].mu, 1.0);
    cr_assert_eq(c[2].period, 0.0);
    cr_assert_eq(c[2].default_horizon_s, 30.0);
    cr_assert_str_eq(c[2].description, "an open orbit");
    /* hyperbola: E = -mu/(2a) = 1/4 (REFERENCES.md, vis-viva) */
    cr_assert_float_eq(c[2].energy(&c[2], 0, c[2].r0, c[2].v0), 0.25, 1e-14);
    free(c);
}

/* The examples shipped in problems/examples parse without error or warning. */
Test(problem_file, shipped_examples_parse)
{
    const char *root = getenv("PB_ROOT");
    char path[512];
    snprintf(path, sizeof path, "%s/problems/examples/transfer-demo.ini", root ? root : ".");
    pb_problem *c = NULL;
    int n = 0;
    cr_assert_eq(pb_problem_file_read(path, &c, &n, pft_err, sizeof pft_err, pft_warn), PB_OK,
                 "%s", pft_err);
    cr_assert_eq(n, 3);
    cr_assert_eq(pft_nwarn, 0);
    /* transfer-demo: rp = a(1-e) = 6628.8 km (above R = 6378.137 km) */
    pb_elements el;
    cr_assert_eq(pb_elements_from_state(c[0].mu, c[0].r0, c[0].v0, &el), PB_OK);
    cr_assert_float_eq(el.a * (1 - el.e), 24396.0 * (1 - 0.7283), 1e-6);
    free(c);
}

/* An ellipse one ulp below escape speed (r = 1, v = 1.414213562373095) has a
 * period near 1e24 TU, but a short horizon is still a question about its
 * periapsis passage: horizon_s is bounded below by the periapsis time scale
 * 2 pi sqrt(rp^3/mu) (Kepler's third law for the circle at rp), not the
 * period. */
Test(problem_file, near_escape_ellipse_short_horizon)
{
    pb_problem *c;
    int n;
    cr_assert_eq(pft_read(NORM "r = 1,0,0\nv = 0,1.414213562373095,0\nhorizon_s = 10\n", &c, &n), PB_OK,
                 "%s", pft_err);
    cr_assert_gt(c[0].period, 1e20);
    cr_assert_eq(c[0].default_horizon_s, 10.0);
    free(c);
    cr_assert_eq(pft_read(NORM "r = 1,0,0\nv = 0,1.41421,0\nhorizon_s = 10\n", &c, &n), PB_OK, "%s", pft_err);
    free(c);
    pft_expect_error(NORM "r = 1,0,0\nv = 0,1.41421,0\nhorizon_s = 1e-4\n", 5, "horizon_s",
                     "at least 0.001 times the periapsis time scale 6.28319");
}

/* The "unknown key" message lists exactly the keys of the reader's table,
 * and the reader accepts each of them: walking the table, not a copy of it,
 * makes this fail when a key is added and the message would miss it. */
Test(problem_file, unknown_key_message_lists_every_accepted_key)
{
    FILE *f = fopen(pft_path, "w");
    cr_assert_not_null(f);
    fputs("[case demo]\nunits = normalized\nno_such_key = 1\n", f);
    fclose(f);
    pb_problem *c = NULL;
    int n = 0;
    char err[4096]; /* room to see the message whole, however long the table grows */
    cr_assert_eq(pb_problem_file_read(pft_path, &c, &n, err, sizeof err, pft_warn), PB_EINVAL);
    const char *open = strstr(err, "unknown key (known: ");
    cr_assert_not_null(open, "%s", err);
    open += strlen("unknown key (known: ");
    const char *close = strchr(open, ')');
    cr_assert_not_null(close, "the key list is cut short: %s", err);
    char list[4096], padded[4200];
    snprintf(list, sizeof list, "%.*s", (int)(close - open), open);
    /* ", a, e," finds each key as a whole item, not inside another ("a" in "raan_deg") */
    snprintf(padded, sizeof padded, ", %s,", list);
    int listed = 0;
    char *save = NULL;
    for (char *tok = strtok_r(list, ",", &save); tok; tok = strtok_r(NULL, ",", &save))
        listed++;
    int nkeys = 0;
    for (const char *const *k = pb_problem_file_keys; *k; k++, nkeys++) {
        char word[100];
        snprintf(word, sizeof word, ", %s,", *k);
        cr_assert_not_null(strstr(padded, word), "key '%s' missing from '%s'", *k, err);
        char text[200];
        snprintf(text, sizeof text, "[case demo]\n%s = 1\n", *k);
        pft_read(text, NULL, NULL);
        cr_assert_null(strstr(pft_err, "unknown key"), "the reader refuses its own key '%s': %s", *k, pft_err);
    }
    cr_assert_gt(nkeys, 0);
    cr_assert_eq(listed, nkeys, "the message lists %d keys, the table holds %d: %s", listed, nkeys, err);
}
