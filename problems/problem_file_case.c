/* problem_file_case.c - the checks that make one case of a problem file a
 * problem: its central body, its initial state (classical elements or r and
 * v) and its horizon, each failure naming the file, the line and the key;
 * its force terms are problem_file_forces.c's. */
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>
#include "problem_file_case.h"
#include "bodies.h"
#include "twobody.h"

#define DEG (M_PI / 180.0)

/* Ranges that keep every derived quantity (period, speeds, a^3/mu) far from
 * overflow and refuse typing errors with a message naming the key instead of
 * a failure deep in the run (our limits, common practice where no source):
 * mu: 1e-20 .. 1e20 (in km^3/s^2, G times 0.15 kg to 7.5e8 Suns); radius:
 * 1e-6 .. 1e10 (the largest stars are ~1e9 km); sizes |a| and |r|: 1e-6 ..
 * 1e12 times the reference length (the radius if known, else 1 unit); the
 * speed at most 1e3 times the local escape speed; |e - 1| >= 1e-6 for
 * elements (closer is a near-parabola that a and e describe badly); the
 * horizon 1e-3 .. 1e8 orbits, or that many times the time scale. */
#define PF_MU_MIN 1e-20
#define PF_MU_MAX 1e20
#define PF_RADIUS_MIN 1e-6
#define PF_RADIUS_MAX 1e10
#define PF_SIZE_MIN 1e-6
#define PF_SIZE_MAX 1e12
#define PF_ESCAPE_MAX 1e3
#define PF_PARABOLIC_GAP 1e-6
#define PF_HORIZON_MIN 1e-3
#define PF_HORIZON_MAX 1e8

/* Shared with problem_file_forces.c, hence not static. */
int pf_fail_key(pf_build *b, int k, const char *fmt, ...)
{
    const pf_case *cs = b->cs;
    char msg[512];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    snprintf(b->err, b->errlen, "%s:%d: key '%s': %s", b->path, cs->kline[k] ? cs->kline[k] : cs->line,
             pb_problem_file_keys[k], msg);
    return -1;
}

/* The later of two given keys, for messages about conflicting keys. */
static int pf_later(const pf_case *cs, int k1, int k2)
{
    return cs->kline[k1] > cs->kline[k2] ? k1 : k2;
}

static int pf_first_element_key(const pf_case *cs)
{
    for (int k = K_A; k <= K_NU; k++)
        if (cs->kline[k])
            return k;
    return -1;
}

/* What a case says about its central body, and the reference length its
 * sizes are checked against. */
typedef struct pf_central {
    const pb_body *body;      /* NULL: none named */
    pb_units units;
    double mu, radius;        /* radius 0: none known */
    double len0;              /* the radius if known, else 1 unit */
    const char *len0_what;
} pf_central;

/* Units, mu and radius of the case being finished, from its body or its
 * own keys; -1 after a failure. (Its zonal terms are problem_file_forces.c's.) */
static int pf_finish_central(pf_build *b, pf_central *cb)
{
    const pf_case *cs = b->cs;
    const int *L = cs->kline;
    memset(cb, 0, sizeof *cb);
    cb->body = L[K_BODY] ? pb_body_find(cs->str[K_BODY]) : NULL;
    cb->units = PB_UNITS_KM_S;
    if (L[K_UNITS])
        cb->units = strcmp(cs->str[K_UNITS], "km-s") == 0 ? PB_UNITS_KM_S : PB_UNITS_NORMALIZED;
    else if (!cb->body)
        return pf_fail_key(b, K_UNITS, "missing in case '%s' (km-s or normalized)", cs->name);
    if (cb->body && cb->units != PB_UNITS_KM_S)
        return pf_fail_key(b, K_BODY, "a body needs units = km-s");
    if (cb->body && L[K_MU])
        return pf_fail_key(b, pf_later(cs, K_MU, K_BODY), "give mu or body, not both");
    cb->mu = cb->body ? cb->body->mu : cb->units == PB_UNITS_NORMALIZED ? 1.0 : 0.0;
    if (L[K_MU])
        cb->mu = cs->num[K_MU];
    else if (!cb->body && cb->units == PB_UNITS_KM_S)
        return pf_fail_key(b, K_MU, "missing in case '%s' (give mu or body)", cs->name);
    if (!(cb->mu > 0))
        return pf_fail_key(b, K_MU, "mu must be > 0 (got %g)", cb->mu);
    if (!(cb->mu >= PF_MU_MIN && cb->mu <= PF_MU_MAX))
        return pf_fail_key(b, K_MU, "mu must be within [%g, %g] (got %g)", PF_MU_MIN, PF_MU_MAX, cb->mu);
    cb->radius = cb->body ? cb->body->radius : 0.0;
    if (L[K_RADIUS]) {
        cb->radius = cs->num[K_RADIUS];
        if (!(cb->radius > 0))
            return pf_fail_key(b, K_RADIUS, "radius must be > 0 (got %g)", cb->radius);
        if (!(cb->radius >= PF_RADIUS_MIN && cb->radius <= PF_RADIUS_MAX))
            return pf_fail_key(b, K_RADIUS, "radius must be within [%g, %g] (got %g)", PF_RADIUS_MIN,
                               PF_RADIUS_MAX, cb->radius);
    }
    cb->len0 = cb->radius > 0 ? cb->radius : 1.0;
    cb->len0_what = cb->radius > 0 ? "the body's radius" : "the unit length";
    return 0;
}

/* The initial state from keys r and v, and its periapsis distance; -1 after
 * a failure. */
static int pf_state_from_rv(pf_build *b, const pf_central *cb, double *r0, double *v0, double *rp)
{
    const pf_case *cs = b->cs;
    const int *L = cs->kline;
    if (!L[K_R] || !L[K_V])
        return pf_fail_key(b, L[K_R] ? K_V : K_R, "missing in case '%s' (a state needs both r and v)", cs->name);
    memcpy(r0, cs->vec[0], 3 * sizeof *r0);
    memcpy(v0, cs->vec[1], 3 * sizeof *v0);
    double rn = hypot(hypot(r0[0], r0[1]), r0[2]);  /* no underflow for tiny r */
    if (rn > 0 && !(rn >= PF_SIZE_MIN * cb->len0 && rn <= PF_SIZE_MAX * cb->len0))
        return pf_fail_key(b, K_R, "|r| = %g is outside [%g, %g] times %s (%g)", rn, PF_SIZE_MIN,
                           PF_SIZE_MAX, cb->len0_what, cb->len0);
    pb_elements el;
    if (pb_elements_from_state(cb->mu, r0, v0, &el))
        return pf_fail_key(b, K_R, "degenerate state (zero position or angular momentum)");
    *rp = el.p / (1.0 + el.e);
    return 0;
}

/* Checks of a and e: an orbit of known kind and a size within range; -1
 * after a failure. */
static int pf_check_a_e(pf_build *b, const pf_central *cb, double a, double e)
{
    if (e < 0)
        return pf_fail_key(b, K_E, "eccentricity must be >= 0 (got %g)", e);
    if (e == 1)
        return pf_fail_key(b, K_E, "a parabola (e = 1) cannot be given by a and e; give r and v");
    /* the margin keeps e = 1 +- 1e-6 as typed (1.000001 - 1 is below 1e-6 in doubles) */
    if (fabs(e - 1) < PF_PARABOLIC_GAP * (1 - 1e-9))
        return pf_fail_key(b, K_E, "e = %.12g is too close to parabolic for elements (|e - 1| < %g); "
                           "give a state vector r, v", e, PF_PARABOLIC_GAP);
    if (e < 1 && a <= 0)
        return pf_fail_key(b, K_A, "semi-major axis must be > 0 for an ellipse (got %g)", a);
    if (e > 1 && a >= 0)
        return pf_fail_key(b, K_A, "semi-major axis must be < 0 for a hyperbola (got %g)", a);
    if (!(fabs(a) >= PF_SIZE_MIN * cb->len0 && fabs(a) <= PF_SIZE_MAX * cb->len0))
        return pf_fail_key(b, K_A, "|a| = %g is outside [%g, %g] times %s (%g)", fabs(a), PF_SIZE_MIN,
                           PF_SIZE_MAX, cb->len0_what, cb->len0);
    return 0;
}

/* The initial state from classical elements, and its periapsis distance;
 * -1 after a failure. */
static int pf_state_from_elements(pf_build *b, const pf_central *cb, double *r0, double *v0, double *rp)
{
    pf_case *cs = b->cs;
    const int *L = cs->kline;
    if (!L[K_A])
        return pf_fail_key(b, K_A, "missing in case '%s' (elements need a and e)", cs->name);
    if (!L[K_E])
        return pf_fail_key(b, K_E, "missing in case '%s' (elements need a and e)", cs->name);
    double a = cs->num[K_A], e = cs->num[K_E];
    if (pf_check_a_e(b, cb, a, e))
        return -1;
    /* Angles (common practice): i_deg must lie in [0, 180] (180 is a
     * retrograde equatorial orbit); raan_deg, argp_deg and nu_deg may be
     * any finite value and are taken modulo 360, up to |x| <= 1e9 deg,
     * beyond which a double holds the fraction of a turn to worse than
     * 1e-7 deg. There is no mean-anomaly key: the anomaly is true. */
    if (!(cs->num[K_I] >= 0 && cs->num[K_I] <= 180))
        return pf_fail_key(b, K_I, "inclination must be within [0, 180] deg (got %g)", cs->num[K_I]);
    for (int k = K_RAAN; k <= K_NU; k++) {
        if (fabs(cs->num[k]) > PF_ANGLE_MAX)
            return pf_fail_key(b, k, "angle %g deg is too large to take modulo 360 (|value| must be "
                               "<= %g deg)", cs->num[k], PF_ANGLE_MAX);
        cs->num[k] = fmod(cs->num[k], 360.0);
    }
    double nu = cs->num[K_NU] * DEG;
    if (e > 1 && 1.0 + e * cos(nu) <= 0)
        return pf_fail_key(b, K_NU, "true anomaly %g deg is beyond the hyperbola's asymptote (%.4f deg)",
                           cs->num[K_NU], acos(-1.0 / e) / DEG);
    pb_elements el = {a, e, cs->num[K_I] * DEG, cs->num[K_RAAN] * DEG,
                      cs->num[K_ARGP] * DEG, nu, a * (1.0 - e * e)};
    if (pb_state_from_elements(cb->mu, &el, r0, v0))
        return pf_fail_key(b, K_A, "elements do not define an orbit");
    *rp = a * (1.0 - e);
    return 0;
}

/* The initial state, from elements or from r and v (one of the two), and
 * its periapsis distance; -1 after a failure. */
static int pf_finish_state(pf_build *b, const pf_central *cb, double *r0, double *v0, double *rp)
{
    const pf_case *cs = b->cs;
    const int *L = cs->kline;
    int first_el = pf_first_element_key(cs);
    int has_state = L[K_R] || L[K_V];
    if (first_el >= 0 && has_state)
        return pf_fail_key(b, L[K_R] ? K_R : K_V, "both classical elements ('%s' at line %d) and a state given",
                           pb_problem_file_keys[first_el], L[first_el]);
    if (first_el < 0 && !has_state)
        return pf_fail_key(b, K_A, "missing in case '%s' (give elements a, e, ... or a state r, v)", cs->name);
    if (has_state ? pf_state_from_rv(b, cb, r0, v0, rp) : pf_state_from_elements(b, cb, r0, v0, rp))
        return -1;
    /* (v / v_esc)^2 = v^2 |r| / (2 mu), vis-viva (REFERENCES.md) */
    double rr = sqrt(r0[0] * r0[0] + r0[1] * r0[1] + r0[2] * r0[2]);
    double vv = v0[0] * v0[0] + v0[1] * v0[1] + v0[2] * v0[2];
    double ratio = sqrt(vv * rr / (2.0 * cb->mu));
    if (!(ratio <= PF_ESCAPE_MAX))
        return pf_fail_key(b, has_state ? K_V : K_E, "the speed %g is %.3g times the escape speed at |r| = %g "
                           "(at most %g)", sqrt(vv), ratio, rr, PF_ESCAPE_MAX);
    return 0;
}

/* The default horizon of problem p from orbits or horizon_s (10 orbits when
 * neither is given and the orbit is closed); -1 after a failure. */
static int pf_finish_horizon(pf_build *b, pb_problem *p, double mu, double rp)
{
    const pf_case *cs = b->cs;
    const int *L = cs->kline;
    if (L[K_ORBITS] && L[K_HORIZON])
        return pf_fail_key(b, pf_later(cs, K_ORBITS, K_HORIZON), "give orbits or horizon_s, not both");
    if (L[K_ORBITS]) {
        if (!(p->period > 0))
            return pf_fail_key(b, K_ORBITS, "the orbit is open (no period); give horizon_s instead");
        if (!(cs->num[K_ORBITS] > 0))
            return pf_fail_key(b, K_ORBITS, "must be > 0 (got %g)", cs->num[K_ORBITS]);
        if (!(cs->num[K_ORBITS] >= PF_HORIZON_MIN && cs->num[K_ORBITS] <= PF_HORIZON_MAX))
            return pf_fail_key(b, K_ORBITS, "must be within [%g, %g] (got %g)", PF_HORIZON_MIN,
                               PF_HORIZON_MAX, cs->num[K_ORBITS]);
        p->default_orbits = cs->num[K_ORBITS];
        p->default_horizon_s = 0.0;
    } else if (L[K_HORIZON]) {
        if (!(cs->num[K_HORIZON] > 0))
            return pf_fail_key(b, K_HORIZON, "must be > 0 (got %g)", cs->num[K_HORIZON]);
        /* at least a little of the periapsis passage (the period of a circle
         * at the periapsis distance, which is below the period of any
         * ellipse: a near-escape ellipse's period is no guide to a short
         * horizon), at most as many periods as `orbits` allows */
        double tp = 2.0 * M_PI * sqrt(rp * rp * rp / mu), ts = p->period > 0 ? p->period : tp;
        double hs = cs->num[K_HORIZON];
        if (!(hs >= PF_HORIZON_MIN * tp))
            return pf_fail_key(b, K_HORIZON, "must be at least %g times the periapsis time scale %g (got %g)",
                               PF_HORIZON_MIN, tp, hs);
        if (!(hs <= PF_HORIZON_MAX * ts))
            return pf_fail_key(b, K_HORIZON, "must be at most %g times the %s %g (got %g)", PF_HORIZON_MAX,
                               p->period > 0 ? "period" : "periapsis time scale", ts, hs);
        /* a horizon given in seconds stays in seconds (ids read __s<seconds>) */
        p->default_horizon_s = cs->num[K_HORIZON];
        p->default_orbits = 0.0;
    } else if (!(p->period > 0)) {
        return pf_fail_key(b, K_HORIZON, "missing in case '%s' (an open orbit needs horizon_s)", cs->name);
    } else {
        p->default_orbits = 10.0;
    }
    return 0;
}

/* Accepted input that is probably a mistake: said through b->warn. */
static void pf_warn_suspicious(pf_build *b, const pf_central *cb, double rp)
{
    const pf_case *cs = b->cs;
    if (!b->warn)
        return;
    if (cb->radius > 0 && rp < cb->radius) {
        char msg[512];
        const char *lu = cb->units == PB_UNITS_KM_S ? " km" : "";
        snprintf(msg, sizeof msg, "%s:%d: case '%s': periapsis %.3f%s is below the body's "
                 "surface (radius %.3f%s)", b->path, cs->line, cs->name, rp, lu, cb->radius, lu);
        b->warn(msg);
    }
}

int pb_problem_file_case(pf_case *cs, const char *path, pb_problem *p, char *err, size_t errlen,
                         void (*warn)(const char *msg))
{
    pf_build b = {cs, path, err, errlen, warn};
    pf_central cb;
    double r0[3], v0[3], rp = NAN;
    if (pf_finish_central(&b, &cb) || pf_finish_state(&b, &cb, r0, v0, &rp))
        return PB_EINVAL;
    const char *desc = cs->kline[K_DESC] ? cs->str[K_DESC] : "user problem";
    pb_problem_init_twobody(p, cs->name, desc, cb.units, cb.mu, r0, v0);
    p->body_radius = cb.radius;
    /* checked as it was read (problem_file.c); the methods' concern, never the truth's */
    if (cs->kline[K_FORM])
        p->formulation = (pb_formulation)cs->num[K_FORM];
    if (pf_finish_horizon(&b, p, cb.mu, rp))
        return PB_EINVAL;
    pf_warn_suspicious(&b, &cb, rp);
    return PB_OK;
}
