/* test_forces_ephemeris.c - the Sun and Moon of force_terms_impl.h
 * (Montenbruck & Gill's low-precision series) against the Astronomical
 * Almanac's low-precision Sun and Meeus's Moon example, the third-body term
 * (Battin's form) against the direct difference in long double, the
 * reference's per-step fit of both against their series, and the
 * yearly inclination growth of a geostationary orbit under Sun and Moon
 * (REFERENCES.md, "Force models"). */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "test_forces_support.h"
#include "problems/bodies.h"
#include "problems/ephemeris_fit.h"

#define DEG (M_PI / 180.0)
/* general precession in longitude, 5029.0966"/century (IAU 1976; common
 * practice, from memory) = 1.3970 deg; M&G's Moon series uses 1.3972 */
#define EPH_PRECESSION_DEG_CY 1.3972

/* Ecliptic longitude (deg, 0..360), latitude (deg) and distance of an
 * equatorial J2000 position: the inverse of the rotation by the J2000
 * obliquity, 23.43929111 deg (REFERENCES.md), that the series' output went
 * through. */
static void eph_ecliptic(const double *s, double *lon, double *lat, double *dist)
{
    double e = 23.43929111 * DEG;
    double x = s[0], y = cos(e) * s[1] + sin(e) * s[2], z = -sin(e) * s[1] + cos(e) * s[2];
    *dist = sqrt(x * x + y * y + z * z);
    *lon = fmod(atan2(y, x) / DEG + 360.0, 360.0);
    *lat = asin(z / *dist) / DEG;
}

/* a - b reduced to (-180, 180] degrees */
static double eph_angle_diff(double a, double b)
{
    double d = fmod(a - b, 360.0);
    return d > 180 ? d - 360 : d <= -180 ? d + 360 : d;
}

/* Montenbruck & Gill's Sun (REFERENCES.md) against the Astronomical
 * Almanac's low-precision Sun (REFERENCES.md, from memory; stated accuracy
 * 0.01 deg 1950-2050) at 17 epochs 934 days apart, 2000 to 2041, spread
 * over the seasons.
 * The two refer to different things, corrected before comparing:
 * - AA's lambda is of the equinox of date and apparent: "adjusted for
 *   aberration" (USNO, Computing Approximate Solar Coordinates,
 *   aa.usno.navy.mil/faq/sun_approx), i.e. 20.496" (the constant of
 *   aberration, common practice, from memory) behind the geometric one;
 * - M&G's lambda = 282.9400 + M + ... refers to the J2000 equinox with the
 *   perigee held at its J2000 longitude. To bring it to the equinox of date
 *   add the precession, 1.3972 T deg; and the perigee moves: AA's mean
 *   longitude and anomaly rates differ by 0.9856474 - 0.9856003 deg/day
 *   = 1.7203 deg/century against the equinox of date, so 1.7203 - 1.3972
 *   = 0.3231 deg/century against J2000's, which the M&G series leaves out
 *   (0.13 deg by 2040: the series' own error, logged).
 * After both corrections: within 0.01 deg (AA's accuracy; the M&G series'
 * truncated equation of centre and neglected planetary and lunar terms are
 * below 0.005 deg, from memory). Distance: the two formulae agree within
 * 1e-4 AU (the Earth-Moon barycentre offset, 4671 km = 3e-5 AU, which both
 * neglect, bounds either's error). */
Test(forces_ephemeris, sun_matches_almanac)
{
    double worst_lon = 0, worst_r = 0, drift = 0;
    for (int k = 0; k <= 16; k++) {
        double n = 934.0 * k, T = n / 36525.0, s[3], lon, lat, dist;
        pb_sun_position(n, s);
        eph_ecliptic(s, &lon, &lat, &dist);
        cr_assert_lt(fabs(lat), 1e-9, "Sun off the ecliptic by %g deg", lat);
        double L = 280.460 + 0.9856474 * n, g = (357.528 + 0.9856003 * n) * DEG;
        double lam_aa = L + 1.915 * sin(g) + 0.020 * sin(2 * g) + 20.496 / 3600.0;
        double R_aa = 1.00014 - 0.01671 * cos(g) - 0.00014 * cos(2 * g);
        double perigee = (0.9856474 - 0.9856003) * n - EPH_PRECESSION_DEG_CY * T;
        double d_prec = eph_angle_diff(lon + EPH_PRECESSION_DEG_CY * T, lam_aa);
        double d = d_prec + perigee;
        cr_log_info("Sun T = %.3f: M&G - AA %+.5f deg after precession, %+.5f after the perigee; "
                    "distance %+.2e AU", T, d_prec, d, dist / PB_AU_KM - R_aa);
        worst_lon = fmax(worst_lon, fabs(d));
        worst_r = fmax(worst_r, fabs(dist / PB_AU_KM - R_aa));
        drift = d_prec;
    }
    cr_log_info("Sun: worst %.5f deg, %.2e AU; the fixed perigee costs %.4f deg by 2041", worst_lon,
                worst_r, drift);
    cr_assert_lt(worst_lon, 0.01, "Sun longitude off the Almanac by %.5f deg", worst_lon);
    cr_assert_lt(worst_r, 1e-4, "Sun distance off the Almanac by %.3g AU", worst_r);
}

/* Meeus, Astronomical Algorithms (2nd ed.), Example 47.a (from memory):
 * 1992 April 12, 0h TD (JD 2448724.5): geocentric longitude 133.162655
 * deg, latitude -3.229126 deg (mean equinox and ecliptic of date, before
 * nutation), distance 368409.7 km. M&G's L0 subtracts 1.3972 T to refer
 * the longitude to J2000, so 1.3972 T is added back (T < 0 here: -0.108
 * deg; the other sign misses by 0.2 deg). The ecliptic of date and of
 * J2000 differ by 47" T ~ 4", below the latitude tolerance. Tolerances
 * from the low-precision series' accuracy, a few arcminutes in position
 * (from memory): 0.1 deg in longitude, 0.05 deg in latitude, 500 km. */
Test(forces_ephemeris, moon_matches_meeus_example)
{
    double days = pbtf_days_from_j2000(1992, 4, 12), m[3], lon, lat, dist;
    cr_assert_eq(days, 2448724.5 - 2451545.0, "date to days: %.3f", days);
    pb_moon_position(days, m);
    eph_ecliptic(m, &lon, &lat, &dist);
    double T = days / 36525.0, lon_date = lon + EPH_PRECESSION_DEG_CY * T;
    double dl = eph_angle_diff(lon_date, 133.162655), db = lat - -3.229126, dr = dist - 368409.7;
    cr_log_info("Moon 1992-04-12: lon %.6f (of date), lat %.6f deg, %.1f km: off by %+.4f deg, "
                "%+.4f deg, %+.1f km", lon_date, lat, dist, dl, db, dr);
    cr_assert_lt(fabs(dl), 0.1, "Moon longitude off by %.4f deg", dl);
    cr_assert_lt(fabs(db), 0.05, "Moon latitude off by %.4f deg", db);
    cr_assert_lt(fabs(dr), 500.0, "Moon distance off by %.1f km", dr);
}

/* The third body's acceleration by the direct difference (textbook,
 * REFERENCES.md), mu_b ((s - r)/|s - r|^3 - s/|s|^3), in long double (64-bit
 * significand: the cancellation of the two terms, r/s ~ 3e-4 for the Sun
 * seen from GEO, leaves ~1e-16). */
static void eph_direct(double mu_b, const double *s, const double *r, double *a)
{
    long double d[3], dd = 0, ss = 0;
    for (int i = 0; i < 3; i++) {
        d[i] = (long double)s[i] - (long double)r[i];
        dd += d[i] * d[i];
        ss += (long double)s[i] * s[i];
    }
    long double d3 = dd * sqrtl(dd), s3 = ss * sqrtl(ss);
    for (int i = 0; i < 3; i++)
        a[i] = (double)((long double)mu_b * (d[i] / d3 - (long double)s[i] / s3));
}

/* Battin's form of the third-body term (the code's) equals the direct
 * difference within 1e-12 of its size (the brief's bound; both are
 * round-off apart): Sun and Moon separately, at LEO, GEO, and half-way to
 * the Moon (where Battin's q is not small), at two epochs. The central
 * attraction is switched off (mu = 0) so the term is seen alone. */
Test(forces_ephemeris, third_body_battin_equals_direct)
{
    static const double pts[][3] = {
        {6778.0, 0, 0}, {-3000.0, 5000.0, 4000.0}, {42164.17, 0, 0}, {0, -30000.0, 29000.0},
    };
    double worst = 0;
    for (int body = 0; body < 2; body++) {
        for (int e = 0; e < 2; e++) {
            pb_forces f;
            memset(&f, 0, sizeof f);
            f.sun = body == 0;
            f.moon = body == 1;
            f.epoch_days = e ? pbtf_days_from_j2000(2031, 7, 19) : pbtf_days_from_j2000(2026, 1, 1);
            f.has_epoch = 1;
            double s[3], v[3] = {0, 0, 0}, acc[3], ex[3];
            (body ? pb_moon_position : pb_sun_position)(f.epoch_days, s);
            double mu_b = body ? PB_GM_MOON : PB_GM_SUN;
            pb_problem p;
            pbtf_earth_problem(&p, &f, pts[2], v);
            p.mu = 0;
            for (int k = 0; k < 5; k++) {
                double r[3];
                for (int i = 0; i < 3; i++)
                    r[i] = k < 4 ? pts[k][i] : 0.5 * s[i] + (i == 2 ? 20000.0 : 0.0);
                cr_assert_eq(pb_forces_accel(&p, 0, r, v, acc), PB_OK);
                eph_direct(mu_b, s, r, ex);
                double d[3] = {acc[0] - ex[0], acc[1] - ex[1], acc[2] - ex[2]};
                worst = fmax(worst, pbtf_norm(d) / pbtf_norm(ex));
            }
        }
    }
    cr_log_info("third body: Battin vs direct (long double) %.3g relative", worst);
    cr_assert_lt(worst, 1e-12, "Battin's form off the direct difference by %.3g", worst);
}

/* Inclination (deg) of an initially equatorial circular orbit at
 * a = 42164.17 km (geostationary, REFERENCES.md) after one Julian year
 * under Sun and Moon from the series, starting at 0h TT of the date;
 * rk8pd at 1e-10. */
static double eph_geo_inclination_after_year(int y, int m, int d)
{
    pb_forces f;
    memset(&f, 0, sizeof f);
    f.sun = 1;
    f.moon = 1;
    f.epoch_days = pbtf_days_from_j2000(y, m, d);
    f.has_epoch = 1;
    const double a = 42164.17;
    double r0[3] = {a, 0, 0}, v0[3] = {0, sqrt(pb_body_earth.mu / a), 0}, yy[6], t = 0;
    pb_problem p;
    pbtf_earth_problem(&p, &f, r0, v0);
    memcpy(yy, r0, sizeof r0);
    memcpy(yy + 3, v0, sizeof v0);
    pbtf_ode o;
    pbtf_ode_init(&o, &p, 1e-10);
    pbtf_ode_to(&o, &t, 365.25 * 86400.0, yy);
    pbtf_ode_free(&o);
    return pbtf_osc_incl(yy, yy + 3) / DEG;
}

/* An uncontrolled geostationary orbit's inclination grows by about 0.75 to
 * 0.95 deg per year under Sun and Moon, depending on the epoch within the
 * 18.6-year lunar cycle (common practice, REFERENCES.md): most when the
 * Moon's ascending node is at the equinox, its orbit then tilted 28.6 deg
 * to the equator (early 2025, from memory), least half a cycle later
 * (2034). One Julian year from equatorial and circular (the Sun's
 * half-yearly and the Moon's fortnightly terms average out over it).
 * Criteria: (1) from 2030-01-01, mid-cycle, the growth lies in 0.75 .. 0.95
 * deg; (2) the growth from 2026-01-01 (near the maximum) exceeds that from
 * 2034-01-01 (near the minimum) by 0.1 to 0.3 deg (the band's width, 0.2,
 * give or take half; a Moon kept in the ecliptic would make it ~0). The
 * extremes themselves are not held to the band's ends, which are "about"
 * (measured here: 0.950 from 2026, 0.764 from 2034). J2 is left out: it
 * turns the tilt by ~5 deg a year and changes a year's growth by 0.2%
 * (measured). */
Test(forces_ephemeris, geo_inclination_grows_under_sun_and_moon)
{
    cr_assert_eq(pbtf_days_from_j2000(2026, 1, 1), 9496.5, "2026-01-01 0h is JD 2461041.5");
    double mid = eph_geo_inclination_after_year(2030, 1, 1);
    double hi = eph_geo_inclination_after_year(2026, 1, 1);
    double lo = eph_geo_inclination_after_year(2034, 1, 1);
    cr_log_info("GEO inclination after a year: %.4f deg from 2030, %.4f from 2026, %.4f from 2034",
                mid, hi, lo);
    cr_assert(mid >= 0.75 && mid <= 0.95, "inclination after a year from 2030: %.4f deg", mid);
    cr_assert(hi - lo >= 0.1 && hi - lo <= 0.3, "lunar-cycle spread %.4f deg", hi - lo);
}

/* The reference's Chebyshev fit of the Sun and Moon over one step
 * (problems/ephemeris_fit.c) against the series it replaces, at 40 points
 * off its nodes: within 1e-27 of each body's distance (the fit's own
 * acceptance bound, below the reference's step tolerance of 1e-28 of the
 * state scaled by the third bodies' share of the force). 8 nodes hold over
 * a LEO reference step (about 170 s); a GEO-length step (3000 s) needs the
 * second try's 14; over 20 days no fit of 14 nodes holds and the reference
 * sums the series at every evaluation instead. */
static double eph_fit_worst(const pb_problem *p, __float128 t0, __float128 H,
                            const pb_ephemeris_fit *fit)
{
    double worst = 0;
    for (int k = 0; k < 40; k++) {
        __float128 t = t0 + H * (k + 0.37Q) / 40, want[3][3] = {{0}}, got[3][3];
        pb_forces_bodies_q(p, t, want);
        pb_ephemeris_fit_at(fit, t, got);
        for (int b = 0; b < 2; b++) {
            __float128 d2 = 0, r2 = 0;
            for (int i = 0; i < 3; i++) {
                d2 += (got[b][i] - want[b][i]) * (got[b][i] - want[b][i]);
                r2 += want[b][i] * want[b][i];
            }
            worst = fmax(worst, sqrt((double)(d2 / r2)));
        }
    }
    return worst;
}

Test(forces_ephemeris, step_fit_matches_series)
{
    pb_forces f;
    memset(&f, 0, sizeof f);
    f.sun = f.moon = 1;
    f.has_epoch = 1;
    f.epoch_days = 9564.5; /* 2026-03-10 TT, a scenario epoch (invented: only a date) */
    double r0[3] = {6778, 0, 0}, v0[3] = {0, 7.67, 0};
    pb_problem p;
    pbtf_earth_problem(&p, &f, r0, v0);
    pb_ephemeris_fit fit;
    pb_ephemeris_fit_make(&fit, &p, 1000, 170);
    cr_assert(fit.on && fit.n == PB_EPH_FIT_NODES_FEW, "LEO step: on %d, %d nodes", fit.on, fit.n);
    cr_expect_lt(eph_fit_worst(&p, 1000, 170, &fit), 1e-27);
    pb_ephemeris_fit_make(&fit, &p, 5000, 3000);
    cr_assert(fit.on && fit.n == PB_EPH_FIT_NODES, "GEO step: on %d, %d nodes", fit.on, fit.n);
    cr_expect_lt(eph_fit_worst(&p, 5000, 3000, &fit), 1e-27);
    pb_ephemeris_fit_make(&fit, &p, 0, 20 * 86400.0);
    cr_expect_eq(fit.on, 0, "a 20-day fit of 14 nodes must be refused");
}

/* Montenbruck & Gill (2000) eqs. 3.43-3.49 written out term by term in long
 * double, each sine and cosine of its own argument (as REFERENCES.md gives
 * them): the code takes those sines and cosines from the fundamental
 * arguments' by the addition theorems, and must give the same positions.
 * Over 2000-2100 (T in [0, 1]) they differ by the double arguments'
 * rounding (l ~ 8e3 rad at T = 1: 1e-12 rad, 4e-7 km at the Moon; 1e-5 km
 * at the Sun); the smallest term, 11" in the Moon's latitude, is 20 km: a
 * slip in any term fails by far more than the 2e-6 and 1e-4 km allowed. */
/* pi to long double precision (M_PI is a double) */
#define EPH_PI_L 3.141592653589793238462643383279502884L

static void eph_direct_moon(long double days, long double *s)
{
    long double T = days / 36525.0L, d = EPH_PI_L / 180.0L, as = EPH_PI_L / 648000.0L;
    long double L0 = (218.31617L + 481267.88088L * T - 1.3972L * T) * d;
    long double l = (134.96292L + 477198.86753L * T) * d, lp = (357.52543L + 35999.04944L * T) * d;
    long double F = (93.27283L + 483202.01873L * T) * d, D = (297.85027L + 445267.11135L * T) * d;
    long double dl = 22640 * sinl(l) + 769 * sinl(2 * l) - 4586 * sinl(l - 2 * D) + 2370 * sinl(2 * D)
                     - 668 * sinl(lp) - 412 * sinl(2 * F) - 212 * sinl(2 * l - 2 * D)
                     - 206 * sinl(l + lp - 2 * D) + 192 * sinl(l + 2 * D) - 165 * sinl(lp - 2 * D)
                     + 148 * sinl(l - lp) - 125 * sinl(D) - 110 * sinl(l + lp) - 55 * sinl(2 * F - 2 * D);
    long double lon = L0 + dl * as;
    long double lat = 18520 * sinl(F + lon - L0 + (412 * sinl(2 * F) + 541 * sinl(lp)) * as)
                      - 526 * sinl(F - 2 * D) + 44 * sinl(l + F - 2 * D) - 31 * sinl(-l + F - 2 * D)
                      - 25 * sinl(-2 * l + F) - 23 * sinl(lp + F - 2 * D) + 21 * sinl(-l + F)
                      + 11 * sinl(-lp + F - 2 * D);
    long double dist = 385000 - 20905 * cosl(l) - 3699 * cosl(2 * D - l) - 2956 * cosl(2 * D)
                       - 570 * cosl(2 * l) + 246 * cosl(2 * l - 2 * D) - 205 * cosl(lp - 2 * D)
                       - 171 * cosl(l + 2 * D) - 152 * cosl(l + lp - 2 * D);
    lat *= as;
    long double eps = PB_OBLIQUITY_J2000_DEG * d, x = dist * cosl(lon) * cosl(lat);
    long double y = dist * sinl(lon) * cosl(lat), z = dist * sinl(lat);
    s[0] = x;
    s[1] = cosl(eps) * y - sinl(eps) * z;
    s[2] = sinl(eps) * y + cosl(eps) * z;
}

static void eph_direct_sun(long double days, long double *s)
{
    long double T = days / 36525.0L, d = EPH_PI_L / 180.0L, as = EPH_PI_L / 648000.0L;
    long double M = (357.5256L + 35999.049L * T) * d;
    long double lon = 282.9400L * d + M + (6892 * sinl(M) + 72 * sinl(2 * M)) * as;
    long double dist = (149.619L - 2.499L * cosl(M) - 0.021L * cosl(2 * M)) * 1e6L;
    long double eps = PB_OBLIQUITY_J2000_DEG * d;
    s[0] = dist * cosl(lon);
    s[1] = cosl(eps) * dist * sinl(lon);
    s[2] = sinl(eps) * dist * sinl(lon);
}

Test(forces_ephemeris, series_by_addition_theorems_match_the_terms_written_out)
{
    double worst_moon = 0, worst_sun = 0;
    for (int k = 0; k <= 4000; k++) {
        double days = 36525.0 * k / 4000.0 + 0.37; /* 2000-2100, off whole days */
        double m[3], s[3];
        long double mq[3], sq[3];
        pb_moon_position(days, m);
        pb_sun_position(days, s);
        eph_direct_moon(days, mq);
        eph_direct_sun(days, sq);
        for (int i = 0; i < 3; i++) {
            worst_moon = fmax(worst_moon, (double)fabsl(m[i] - mq[i]));
            worst_sun = fmax(worst_sun, (double)fabsl(s[i] - sq[i]));
        }
    }
    cr_log_info("2000-2100: Moon within %.3g km, Sun within %.3g km of the terms written out", worst_moon,
                worst_sun);
    cr_expect_lt(worst_moon, 2e-6, "Moon off by %.3g km", worst_moon);
    cr_expect_lt(worst_sun, 1e-4, "Sun off by %.3g km", worst_sun);
}
