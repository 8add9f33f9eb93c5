/* forces.h - the force terms a problem composes on top of its central body's
 * inverse-square attraction (zonal harmonics J2..J6, a -gamma/r^2 potential,
 * drag in an exponential atmosphere, third bodies, solar radiation pressure
 * with shadow) and its impulsive manoeuvres. Plain data inside pb_problem;
 * every term is evaluated from one source (force_terms_impl.h) in double for
 * the methods and in __float128 for the reference trajectory. */
#ifndef PB_FORCES_H
#define PB_FORCES_H

#include <stdint.h>

#define PB_ZONAL_MAX 6
#define PB_MANOEUVRES_MAX 64

enum { PB_DRAG_NONE = 0, PB_DRAG_EXPONENTIAL = 1 };
enum { PB_SHADOW_NONE = 0, PB_SHADOW_CYLINDRICAL = 1, PB_SHADOW_CONICAL = 2 };

/* An impulsive velocity change at time t, in the radial, along-track and
 * cross-track directions of the state just before it (problem speed units). */
typedef struct pb_manoeuvre {
    double t;
    double dv[3];
} pb_manoeuvre;

/* A third body on a circular orbit about the central body, as the user states
 * it: position radius (cos u, sin u, 0) rotated by i about x, then by raan
 * about z, u = u0 + rate t. Angles in radians. */
typedef struct pb_circular_body {
    double mu, radius, rate, i, raan, u0;
} pb_circular_body;

typedef struct pb_forces {
    int zonal_degree;                 /* 0: none; 2..6: J2 .. J_degree */
    double jn[PB_ZONAL_MAX + 1];      /* unnormalized J_n by n; 0 and 1 unused */
    double inverse_cube_gamma;        /* potential -gamma/r^2 (force -2 gamma r/r^4) */
    int drag;                         /* PB_DRAG_* */
    double ballistic_m2_kg;           /* C_D A / m */
    double body_rate;                 /* rad/s: the atmosphere turns with the body about z */
    int sun, moon;                    /* third bodies from the low-precision series */
    int circular;                     /* 1: the circular third body below */
    pb_circular_body circ;
    double epoch_days;                /* TT days from J2000.0 (JD 2451545.0) at t = 0 */
    int has_epoch;
    double srp_area_mass_m2_kg, cr;   /* cannonball radiation pressure (0: none) */
    int shadow;                       /* PB_SHADOW_* */
    int n_manoeuvres;
    pb_manoeuvre manoeuvres[PB_MANOEUVRES_MAX];  /* in time order */
} pb_forces;

/* Published constants every term shares (REFERENCES.md; from memory where it
 * says so there). */
#define PB_GM_SUN 1.32712440018e11     /* km^3/s^2 */
#define PB_GM_MOON 4902.800066         /* km^3/s^2 */
#define PB_AU_KM 149597870.7           /* IAU 2012, exact */
#define PB_SUN_RADIUS_KM 696000.0      /* Montenbruck & Gill Sec. 3.4.2 (from memory) */
#define PB_SRP_1AU_N_M2 4.56e-6        /* solar pressure at 1 AU (common practice) */
#define PB_OBLIQUITY_J2000_DEG 23.43929111

/* Whether any term other than the central attraction and conservative
 * central or zonal terms is present: drag, third bodies, radiation
 * pressure or manoeuvres make energy and angular momentum change. */
int pb_forces_dissipative(const pb_forces *f);
/* Whether the force depends on velocity (drag). */
int pb_forces_velocity_dependent(const pb_forces *f);
/* Whether any term is present at all. */
int pb_forces_any(const pb_forces *f);
/* A one-line description of the terms ("J2..J4 + drag + Sun, Moon"), into buf. */
void pb_forces_describe(const pb_forces *f, char *buf, unsigned len);

/* FNV-1a of every field of f that changes a trajectory, continuing from h
 * (field by field: padding bytes are indeterminate). */
uint64_t pb_forces_hash(uint64_t h, const pb_forces *f);

/* Sun and Moon positions (km, equatorial, mean equator and equinox of J2000
 * as the series give it) at TT days from J2000; double precision. */
void pb_sun_position(double days, double *s);
void pb_moon_position(double days, double *s);
/* The fraction of the Sun's disc seen at r (0 in umbra, 1 in sunlight) for a
 * central body of radius R and Sun position s. */
double pb_shadow_fraction(int model, double R, const double *s, const double *r);

#endif
