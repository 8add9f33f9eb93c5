/* test_list_detail.c - `propbench list problems --detail` end to end: every
 * built-in problem's printed constants, elements and state against the
 * catalogue's own definitions, outside values (REFERENCES.md) and the
 * two-body laws recomputed here from the printed state. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "problems/catalogue.h"
#include "test_support.h"

#define LD_COLS 17
#define LD_MU_EARTH 398600.4418 /* km^3/s^2, WGS-84 (REFERENCES.md, common practice) */
#define LD_R_EARTH 6378.137     /* km, WGS-84 (REFERENCES.md, common practice) */
#define LD_DEG (M_PI / 180.0)

enum { C_NAME, C_UNITS, C_MU, C_R, C_J2, C_FORCE, C_A, C_E, C_I, C_RAAN, C_ARGP, C_NU, C_R0,
       C_V0, C_PERIOD, C_HORIZON, C_T0 };

static char ld_out[1 << 16], ld_err[1 << 12];

/* One table row, split into its cells (trimmed). */
typedef struct ld_row {
    char cell[LD_COLS][128];
} ld_row;

static void ld_list(void)
{
    const char *args[] = {"list", "problems", "--detail", NULL};
    int rc = pbt_run_cli(args, ld_out, sizeof ld_out, ld_err, sizeof ld_err);
    cr_assert_eq(rc, 0, "exit %d: %s", rc, ld_err);
}

/* The row of problem `name` in ld_out; fails the test if absent or malformed. */
static ld_row ld_find(const char *name)
{
    char key[96];
    snprintf(key, sizeof key, "\n| %s |", name);
    const char *s = strstr(ld_out, key);
    cr_assert_not_null(s, "no row for %s", name);
    s += 2; /* past "\n|" */
    ld_row r;
    memset(&r, 0, sizeof r);
    for (int c = 0; c < LD_COLS; c++) {
        const char *bar = strchr(s, '|'), *nl = strchr(s, '\n');
        cr_assert(bar && (!nl || bar < nl), "%s: %d cells, want %d", name, c, LD_COLS);
        while (*s == ' ')
            s++;
        size_t n = (size_t)(bar - s);
        while (n > 0 && s[n - 1] == ' ')
            n--;
        cr_assert_lt(n, sizeof r.cell[c]);
        memcpy(r.cell[c], s, n);
        s = bar + 1;
    }
    cr_assert(*s == '\n', "%s: more than %d cells", name, LD_COLS);
    return r;
}

/* A number cell; "-" is NAN. */
static double ld_num(const ld_row *r, int c)
{
    if (!strcmp(r->cell[c], "-"))
        return NAN;
    char *end;
    double x = strtod(r->cell[c], &end);
    cr_assert(end != r->cell[c] && *end == '\0', "cell '%s' is not a number", r->cell[c]);
    return x;
}

static void ld_vec(const ld_row *r, int c, double *x)
{
    cr_assert_eq(sscanf(r->cell[c], "(%lf, %lf, %lf)", &x[0], &x[1], &x[2]), 3, "'%s'",
                 r->cell[c]);
}

static double ld_dot(const double *a, const double *b)
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

Test(list_detail, every_problem_has_a_row_matching_the_catalogue)
{
    /* The printed state is the catalogue's initial state (15 digits), the
     * epoch is 0 and the horizon is the catalogue's default. */
    ld_list();
    int n = 0;
    for (const pb_problem_entry *e = pb_problem_table; e->name; e++, n++) {
        pb_problem p;
        cr_assert_eq(e->make(&p), PB_OK);
        ld_row r = ld_find(p.name);
        double r0[3], v0[3];
        ld_vec(&r, C_R0, r0);
        ld_vec(&r, C_V0, v0);
        double rs = sqrt(ld_dot(p.r0, p.r0)), vs = sqrt(ld_dot(p.v0, p.v0));
        for (int i = 0; i < 3; i++) {
            cr_expect(fabs(r0[i] - p.r0[i]) <= 1e-14 * rs, "%s r0[%d]", p.name, i);
            cr_expect(fabs(v0[i] - p.v0[i]) <= 1e-14 * vs, "%s v0[%d]", p.name, i);
        }
        cr_expect(fabs(ld_num(&r, C_MU) - p.mu) <= 1e-9 * p.mu, "%s mu", p.name);
        /* "t0", or "t0 (J2000.0 + D d TT)" for a problem with an epoch */
        double t0 = NAN, days = NAN;
        int got = sscanf(r.cell[C_T0], "%lf (J2000.0 + %lf d TT)", &t0, &days);
        cr_expect_eq(t0, p.t0, "%s t0", p.name);
        cr_expect_eq(got, p.forces.has_epoch ? 2 : 1, "%s epoch cell '%s'", p.name, r.cell[C_T0]);
        if (p.forces.has_epoch)
            cr_expect_float_eq(days, p.forces.epoch_days, 1e-9, "%s epoch", p.name);
        double orbits, horizon;
        if (p.period > 0) {
            cr_assert_eq(sscanf(r.cell[C_HORIZON], "%lf orbits = %lf", &orbits, &horizon), 2);
            cr_expect_eq(orbits, p.default_orbits, "%s", p.name);
            cr_expect(fabs(horizon - orbits * p.period) <= 1e-9 * horizon, "%s", p.name);
        } else {
            cr_expect_eq(ld_num(&r, C_HORIZON), p.default_horizon_s, "%s", p.name);
        }
    }
    cr_assert_geq(n, 17);
}

/* Elements recomputed from the printed state by the laws of REFERENCES.md
 * (two-body mechanics): a = -mu/(2E), e = |e vector| (Laplace-Runge-Lenz),
 * cos i = h_z/|h|, T = 2 pi sqrt(a^3/mu); the printed values must agree
 * (to their 10 printed digits). */
static void ld_check_laws(const char *name)
{
    ld_row r = ld_find(name);
    double mu = ld_num(&r, C_MU), x[3], v[3], h[3], ev[3];
    ld_vec(&r, C_R0, x);
    ld_vec(&r, C_V0, v);
    double rn = sqrt(ld_dot(x, x)), E = ld_dot(v, v) / 2 - mu / rn, a = -mu / (2 * E);
    h[0] = x[1] * v[2] - x[2] * v[1];
    h[1] = x[2] * v[0] - x[0] * v[2];
    h[2] = x[0] * v[1] - x[1] * v[0];
    for (int k = 0; k < 3; k++)
        ev[k] = ((ld_dot(v, v) - mu / rn) * x[k] - ld_dot(x, v) * v[k]) / mu;
    double e = sqrt(ld_dot(ev, ev)), i = acos(h[2] / sqrt(ld_dot(h, h))) / LD_DEG;
    cr_expect(fabs(ld_num(&r, C_A) - a) <= 1e-9 * fabs(a), "%s a %s vs %.12g", name,
              r.cell[C_A], a);
    cr_expect(fabs(ld_num(&r, C_E) - e) <= 1e-9 * (1 + e), "%s e %s vs %.12g", name,
              r.cell[C_E], e);
    cr_expect(fabs(ld_num(&r, C_I) - i) <= 1e-7, "%s i %s vs %.12g", name, r.cell[C_I], i);
    if (a > 0) {
        double T = 2 * M_PI * sqrt(a * a * a / mu);
        cr_expect(fabs(ld_num(&r, C_PERIOD) - T) <= 1e-9 * T, "%s period", name);
    } else {
        cr_expect(isnan(ld_num(&r, C_PERIOD)), "%s: an open orbit has no period", name);
    }
}

Test(list_detail, printed_elements_obey_two_body_laws)
{
    ld_list();
    const char *names[] = {"kepler-e0", "kepler-e0.5", "kepler-e0.99", "leo-circular",
                           "leo-near-circular", "sso-700", "geo", "gto-transfer",
                           "molniya-like", "hyperbolic-flyby", "leo-j2", "molniya-j2"};
    for (size_t k = 0; k < sizeof names / sizeof names[0]; k++)
        ld_check_laws(names[k]);
}

Test(list_detail, earth_orbits_against_their_definitions)
{
    ld_list();
    /* leo-circular: the catalogue's definition (a = 6778 km, 400 km above
     * R = 6378.137 km, e = 0, i = 51.6 deg, node, periapsis and anomaly 0);
     * mu and R are WGS-84 (REFERENCES.md). Its state follows: r0 = (a, 0, 0),
     * v0 = sqrt(mu/a) (0, cos i, sin i) (circular speed, vis-viva). */
    ld_row r = ld_find("leo-circular");
    cr_expect_eq(ld_num(&r, C_MU), LD_MU_EARTH);
    cr_expect_eq(ld_num(&r, C_R), LD_R_EARTH);
    cr_expect(isnan(ld_num(&r, C_J2)));
    cr_expect_str_eq(r.cell[C_FORCE], "two-body");
    cr_expect_eq(ld_num(&r, C_A), 6778.0);
    cr_expect_eq(ld_num(&r, C_E), 0.0);
    cr_expect_eq(ld_num(&r, C_I), 51.6);
    cr_expect(ld_num(&r, C_RAAN) == 0 && ld_num(&r, C_ARGP) == 0 && ld_num(&r, C_NU) == 0);
    double x[3], v[3], vc = sqrt(LD_MU_EARTH / 6778.0);
    ld_vec(&r, C_R0, x);
    ld_vec(&r, C_V0, v);
    cr_expect(x[0] == 6778.0 && x[1] == 0 && x[2] == 0);
    cr_expect(fabs(v[0]) < 1e-14 && fabs(v[1] - vc * cos(51.6 * LD_DEG)) < 1e-13 &&
              fabs(v[2] - vc * sin(51.6 * LD_DEG)) < 1e-13, "v0 %s", r.cell[C_V0]);
    /* geo: one sidereal day, 86164.0905 s, and a = 42164.17 km within 0.01 km
     * (REFERENCES.md, common practice); circular and equatorial */
    r = ld_find("geo");
    cr_expect(fabs(ld_num(&r, C_PERIOD) - 86164.0905) < 1e-6, "T %s", r.cell[C_PERIOD]);
    cr_expect(fabs(ld_num(&r, C_A) - 42164.17) < 0.01, "a %s", r.cell[C_A]);
    cr_expect(ld_num(&r, C_E) == 0 && ld_num(&r, C_I) == 0);
    /* sso-700: a = R + 700 km (definition), i = 98.188 deg (REFERENCES.md,
     * computed there from the J2 RAAN-rate formula; printed to 3 decimals) */
    r = ld_find("sso-700");
    cr_expect_eq(ld_num(&r, C_A), LD_R_EARTH + 700.0);
    cr_expect(fabs(ld_num(&r, C_I) - 98.188) < 0.0006, "i %s", r.cell[C_I]);
    /* molniya-like: half a sidereal day (definition), e = 0.74, argp = 270 deg,
     * the critical inclination arccos(1/sqrt 5) = 63.4349488 deg (REFERENCES.md) */
    r = ld_find("molniya-like");
    cr_expect(fabs(ld_num(&r, C_PERIOD) - 86164.0905 / 2) < 1e-6, "T %s", r.cell[C_PERIOD]);
    cr_expect(fabs(ld_num(&r, C_E) - 0.74) < 1e-9 && fabs(ld_num(&r, C_ARGP) - 270) < 1e-7);
    cr_expect(fabs(ld_num(&r, C_I) - 63.4349488) < 1e-7, "i %s", r.cell[C_I]);
    /* gto-transfer: perigee 250 km above R (definition), apogee at the
     * geostationary radius 42164.17 km (REFERENCES.md), i = 27, argp = 180 */
    r = ld_find("gto-transfer");
    double a = ld_num(&r, C_A), e = ld_num(&r, C_E);
    cr_expect(fabs(a * (1 - e) - (LD_R_EARTH + 250.0)) < 1e-5, "perigee %.9g", a * (1 - e));
    cr_expect(fabs(a * (1 + e) - 42164.17) < 0.01, "apogee %.9g", a * (1 + e));
    cr_expect(fabs(ld_num(&r, C_I) - 27) < 1e-7 && fabs(ld_num(&r, C_ARGP) - 180) < 1e-7);
}

Test(list_detail, flyby_j2_and_normalized_problems)
{
    ld_list();
    /* hyperbolic-flyby (definition): v_inf = 3 km/s, so a = -mu/v_inf^2
     * (energy law, REFERENCES.md), periapsis a (1 - e) = 7000 km, start at
     * true anomaly -100 deg, i = 30 deg, horizon 7200 s, no period */
    ld_row r = ld_find("hyperbolic-flyby");
    double a = ld_num(&r, C_A), e = ld_num(&r, C_E);
    cr_expect(fabs(a + LD_MU_EARTH / 9.0) < 1e-5, "a %s", r.cell[C_A]);
    cr_expect(fabs(a * (1 - e) - 7000.0) < 1e-5, "periapsis %.9g", a * (1 - e));
    cr_expect(fabs(ld_num(&r, C_NU) + 100.0) < 1e-7, "nu %s", r.cell[C_NU]);
    cr_expect(fabs(ld_num(&r, C_I) - 30.0) < 1e-7);
    cr_expect(isnan(ld_num(&r, C_PERIOD)));
    cr_expect_eq(ld_num(&r, C_HORIZON), 7200.0);
    /* the J2 problems: J2 = 1.08262668e-3, R = 6378.137 km (REFERENCES.md,
     * EGM96 / WGS-84 common practice), over 30 orbits (definition) */
    const char *j2s[] = {"leo-j2", "sso-700-j2", "molniya-j2"};
    for (int k = 0; k < 3; k++) {
        r = ld_find(j2s[k]);
        cr_expect_eq(ld_num(&r, C_J2), 1.08262668e-3, "%s J2 %s", j2s[k], r.cell[C_J2]);
        cr_expect_eq(ld_num(&r, C_R), LD_R_EARTH);
        cr_expect_str_eq(r.cell[C_FORCE], "two-body + J2");
        cr_expect(!strncmp(r.cell[C_HORIZON], "30 orbits", 9), "%s", r.cell[C_HORIZON]);
    }
    /* kepler-e0.5: mu = 1, a = 1, periapsis start r0 = (1 - e, 0, 0),
     * v0 = (0, sqrt((1 + e)/(1 - e)), 0) = (0, sqrt 3, 0) (vis-viva,
     * REFERENCES.md), T = 2 pi (Kepler's third law) */
    r = ld_find("kepler-e0.5");
    double x[3], v[3];
    ld_vec(&r, C_R0, x);
    ld_vec(&r, C_V0, v);
    cr_expect(x[0] == 0.5 && x[1] == 0 && x[2] == 0 && v[0] == 0 && v[2] == 0);
    cr_expect(fabs(v[1] - sqrt(3.0)) < 1e-14, "v0 %s", r.cell[C_V0]);
    cr_expect(ld_num(&r, C_A) == 1 && ld_num(&r, C_E) == 0.5 && ld_num(&r, C_MU) == 1);
    cr_expect(fabs(ld_num(&r, C_PERIOD) - 2 * M_PI) < 1e-9);
    /* arenstorf: mu = 0.012277471, x(0) = 0.994, y'(0) = -2.00158510637908...,
     * T = 17.0652165601579625... (Hairer, Norsett, Wanner, Sec. II.0, from
     * memory, REFERENCES.md); no Keplerian elements in a rotating frame */
    r = ld_find("arenstorf");
    ld_vec(&r, C_R0, x);
    ld_vec(&r, C_V0, v);
    cr_expect_eq(ld_num(&r, C_MU), 0.012277471);
    cr_expect(x[0] == 0.994 && x[1] == 0 && v[0] == 0);
    cr_expect(fabs(v[1] + 2.00158510637908252) < 1e-14, "v0 %s", r.cell[C_V0]);
    cr_expect(fabs(ld_num(&r, C_PERIOD) - 17.0652165601579625) < 1e-8);
    cr_expect(isnan(ld_num(&r, C_A)) && isnan(ld_num(&r, C_E)) && isnan(ld_num(&r, C_NU)));
    cr_expect_str_eq(r.cell[C_FORCE], "CR3BP, rotating frame");
}

Test(list_detail, detail_is_for_problems_only)
{
    /* bad input: exit 2 and a message naming the option (DEVELOPERS.md) */
    const char *a1[] = {"list", "methods", "--detail", NULL};
    cr_expect_eq(pbt_run_cli(a1, ld_out, sizeof ld_out, ld_err, sizeof ld_err), 2);
    cr_expect(strstr(ld_err, "--detail") != NULL, "%s", ld_err);
    const char *a2[] = {"list", "problems", "--details", NULL};
    cr_expect_eq(pbt_run_cli(a2, ld_out, sizeof ld_out, ld_err, sizeof ld_err), 2);
    cr_expect(strstr(ld_err, "--details") != NULL, "%s", ld_err);
    cr_expect_eq(ld_out[0], '\0');
}
