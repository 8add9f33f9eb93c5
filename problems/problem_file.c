/* problem_file.c - reads user problem files (INI through inih, one case per
 * "[case NAME]" section) into problems, validating every key. Lines are
 * counted by our own reader so every message names file, line and key. */
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <ini.h>
#include "problem_file.h"
#include "bodies.h"
#include "j2.h"
#include "twobody.h"

#define DEG (M_PI / 180.0)

/* inih keeps at most MAX_SECTION - 1 = 49 characters between the brackets
 * (MAX_SECTION is 50 in inih's ini.c and not exported) and cuts the rest
 * silently, so "[case NAME]" allows a NAME of 49 - strlen("case ") = 44. */
#define PF_SECTION_MAX 49
#define PF_CASE_NAME_MAX (PF_SECTION_MAX - 5)

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

/* largest |angle| in degrees still reduced modulo 360 to better than 1e-7 deg */
#define PF_ANGLE_MAX 1e9

enum {
    K_UNITS, K_MU, K_BODY, K_FORCE, K_A, K_E, K_I, K_RAAN, K_ARGP, K_NU, K_R, K_V,
    K_ORBITS, K_HORIZON, K_RADIUS, K_J2, K_DESC, K_COUNT
};

static const char *const pf_keys[K_COUNT] = {
    "units", "mu", "body", "force", "a", "e", "i_deg", "raan_deg", "argp_deg", "nu_deg",
    "r", "v", "orbits", "horizon_s", "radius", "j2", "description"
};

typedef struct pf_case {
    char name[PB_NAME_MAX];
    int line;                 /* line of the section header */
    int kline[K_COUNT];       /* line of each key given (0: absent) */
    double num[K_COUNT];
    double vec[2][3];         /* r, v */
    char str[K_COUNT][160];   /* units, body, force, description */
} pf_case;

typedef struct pf_ctx {
    const char *path;
    FILE *f;
    int line;                 /* lines read so far = line of the current key */
    int section_line;         /* line of the latest "[...]" header */
    int failed;
    char *err;
    size_t errlen;
    void (*warn)(const char *msg);
    pf_case cur;
    int have_cur;
    pb_problem *out;
    int n, cap;
    int *case_lines;          /* header line of each finished case */
    int hdr_line;             /* line of the latest header seen by the reader */
    int hdr_keys;             /* keys handled since that header */
    char hdr_text[80];        /* its text between the brackets, for messages */
} pf_ctx;

static void pf_fail(pf_ctx *c, int line, const char *key, const char *fmt, ...)
{
    if (c->failed)
        return;
    c->failed = PB_EINVAL;
    char msg[512];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    if (key)
        snprintf(c->err, c->errlen, "%s:%d: key '%s': %s", c->path, line, key, msg);
    else
        snprintf(c->err, c->errlen, "%s:%d: %s", c->path, line, msg);
}

/* A section whose header is followed by no key would vanish without a trace
 * (inih reports only keys); say so at its header line. */
static void pf_check_empty_section(pf_ctx *c)
{
    if (!c->hdr_line || c->hdr_keys)
        return;
    const char *t = c->hdr_text;
    if (strncmp(t, "case", 4) == 0 && (t[4] == ' ' || t[4] == '\t')) {
        t += 4;
        while (*t == ' ' || *t == '\t')
            t++;
        pf_fail(c, c->hdr_line, NULL, "case '%s' has no keys", t);
    } else {
        pf_fail(c, c->hdr_line, NULL, "section '[%s]' has no keys", t);
    }
}

/* Checks that need the raw header text, before inih shortens it. */
static void pf_check_header(pf_ctx *c, const char *open)
{
    const char *close = strchr(open + 1, ']');
    size_t len = close ? (size_t)(close - open - 1) : strlen(open + 1);
    snprintf(c->hdr_text, sizeof c->hdr_text, "%.*s", (int)len, open + 1);
    c->hdr_line = c->line;
    c->hdr_keys = 0;
    if (!close || len <= PF_SECTION_MAX)
        return;  /* a missing ']' is inih's syntax error */
    const char *q = open + 1;
    if (strncmp(q, "case", 4) == 0 && (q[4] == ' ' || q[4] == '\t')) {
        q += 4;
        while (*q == ' ' || *q == '\t')
            q++;
        if ((size_t)(close - q) > PF_CASE_NAME_MAX) {
            pf_fail(c, c->line, NULL, "case name '%.*s' is longer than %d characters (%d given)",
                    (int)(close - q), q, PF_CASE_NAME_MAX, (int)(close - q));
            return;
        }
    }
    pf_fail(c, c->line, NULL, "section header is longer than %d characters between the brackets",
            PF_SECTION_MAX);
}

/* inih's line source: fgets, counting lines and noting section headers.
 * inih would join an indented line to the key above it (a continuation
 * line), which reads as that key "given twice"; indented keys, headers and
 * values are refused here instead (indented comments and blank lines pass). */
static char *pf_reader(char *str, int num, void *stream)
{
    pf_ctx *c = stream;
    if (c->failed)
        return NULL;
    char *s = fgets(str, num, c->f);
    if (!s) {
        pf_check_empty_section(c);
        return NULL;
    }
    c->line++;
    size_t len = strlen(s);
    if (len == (size_t)num - 1 && s[len - 1] != '\n' && !feof(c->f)) {
        /* inih's line buffer is fixed: say so rather than misparse the rest */
        pf_fail(c, c->line, NULL, "line longer than %d characters", num - 2);
        return NULL;
    }
    const char *q = s;
    while (*q == ' ' || *q == '\t')
        q++;
    if (q > s && *q && !strchr("\r\n;#", *q)) {
        pf_fail(c, c->line, NULL, "indented line: keys must start at the beginning of the line "
                "(continuation lines are not supported)");
        return NULL;
    }
    if (*q == '[') {
        pf_check_empty_section(c);
        pf_check_header(c, q);
        c->section_line = c->line;
        if (c->failed)
            return NULL;
    }
    return s;
}

static int pf_parse_number(pf_ctx *c, const char *key, const char *val, double *out)
{
    char *end;
    errno = 0;
    double x = strtod(val, &end);
    while (*end == ' ' || *end == '\t')
        end++;
    if (end == val || *end) {
        pf_fail(c, c->line, key, "not a number ('%s')", val);
        return -1;
    }
    if (!isfinite(x) || errno == ERANGE) {
        pf_fail(c, c->line, key, "value must be finite (got '%s')", val);
        return -1;
    }
    *out = x;
    return 0;
}

static int pf_parse_vec(pf_ctx *c, const char *key, const char *val, double *out)
{
    char buf[256];
    snprintf(buf, sizeof buf, "%s", val);
    char *save = NULL, *tok = strtok_r(buf, ",", &save);
    int k = 0;
    for (; tok && k < 3; k++, tok = strtok_r(NULL, ",", &save)) {
        while (*tok == ' ' || *tok == '\t')
            tok++;
        if (pf_parse_number(c, key, tok, &out[k]))
            return -1;
    }
    if (k != 3 || tok) {
        pf_fail(c, c->line, key, "needs three comma-separated numbers (got '%s')", val);
        return -1;
    }
    return 0;
}

static int pf_known_section(pf_ctx *c, const char *section, char *name)
{
    if (strncmp(section, "case", 4) != 0 || (section[4] && section[4] != ' ' && section[4] != '\t')) {
        pf_fail(c, c->section_line, NULL, "section '[%s]' is not of the form '[case NAME]'", section);
        return -1;
    }
    const char *q = section + 4;
    while (*q == ' ' || *q == '\t')
        q++;
    if (!*q) {
        pf_fail(c, c->section_line, NULL, "section '[%s]' has no case name", section);
        return -1;
    }
    /* the name becomes part of file names: letters, digits and . _ + - only */
    for (const char *p = q; *p; p++)
        if (!(isalnum((unsigned char)*p) || *p == '.' || *p == '_' || *p == '+' || *p == '-') ||
            (p == q && *p == '.')) {
            pf_fail(c, c->section_line, NULL, "case name '%s' may hold only letters, digits and "
                    ". _ + - (and may not start with '.')", q);
            return -1;
        }
    if (strlen(q) >= PB_NAME_MAX) {
        pf_fail(c, c->section_line, NULL, "case name '%s' is longer than %d characters",
                q, PB_NAME_MAX - 1);
        return -1;
    }
    for (int k = 0; k < c->n; k++)
        if (strcmp(c->out[k].name, q) == 0) {
            pf_fail(c, c->section_line, NULL, "duplicate case name '%s' (first at line %d)", q,
                    c->case_lines[k]);
            return -1;
        }
    snprintf(name, PB_NAME_MAX, "%s", q);
    return 0;
}

static int pf_finish(pf_ctx *c);

static int pf_handler(void *user, const char *section, const char *key, const char *val)
{
    pf_ctx *c = user;
    if (c->failed)
        return 1;
    c->hdr_keys++;
    if (!c->have_cur || c->cur.line != c->section_line) {
        if (c->have_cur && pf_finish(c))
            return 1;
        if (!*section) {
            pf_fail(c, c->line, key, "key outside a '[case NAME]' section");
            return 1;
        }
        memset(&c->cur, 0, sizeof c->cur);
        if (pf_known_section(c, section, c->cur.name))
            return 1;
        c->cur.line = c->section_line;
        c->have_cur = 1;
    }
    pf_case *cs = &c->cur;
    int k = 0;
    while (k < K_COUNT && strcmp(pf_keys[k], key) != 0)
        k++;
    if (k == K_COUNT) {
        pf_fail(c, c->line, key, "unknown key (known: units, mu, body, force, a, e, i_deg, "
                "raan_deg, argp_deg, nu_deg, r, v, orbits, horizon_s, radius, j2, description)");
        return 1;
    }
    if (cs->kline[k]) {
        pf_fail(c, c->line, key, "given twice in case '%s' (first at line %d)", cs->name,
                cs->kline[k]);
        return 1;
    }
    cs->kline[k] = c->line;
    switch (k) {
    case K_UNITS:
        if (strcmp(val, "km-s") && strcmp(val, "normalized"))
            pf_fail(c, c->line, key, "unknown units '%s' (known: km-s, normalized)", val);
        break;
    case K_FORCE:
        if (strcmp(val, "two-body") && strcmp(val, "j2"))
            pf_fail(c, c->line, key, "unknown force model '%s' (known: two-body, j2)", val);
        break;
    case K_BODY:
        if (!pb_body_find(val))
            pf_fail(c, c->line, key, "unknown body '%s' (known: earth)", val);
        break;
    case K_DESC:
        break;
    case K_R:
    case K_V:
        pf_parse_vec(c, key, val, cs->vec[k == K_V]);
        break;
    default:
        pf_parse_number(c, key, val, &cs->num[k]);
        break;
    }
    snprintf(cs->str[k], sizeof cs->str[k], "%s", val);
    return 1;
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

/* Validate the finished case and append it to c->out. */
static int pf_finish(pf_ctx *c)
{
    pf_case *cs = &c->cur;
    const int *L = cs->kline;
    c->have_cur = 0;
#define FAIL_K(k, ...) do { pf_fail(c, L[k] ? L[k] : cs->line, pf_keys[k], __VA_ARGS__); return -1; } while (0)
    const pb_body *body = L[K_BODY] ? pb_body_find(cs->str[K_BODY]) : NULL;
    pb_units units = PB_UNITS_KM_S;
    if (L[K_UNITS])
        units = strcmp(cs->str[K_UNITS], "km-s") == 0 ? PB_UNITS_KM_S : PB_UNITS_NORMALIZED;
    else if (!body)
        FAIL_K(K_UNITS, "missing in case '%s' (km-s or normalized)", cs->name);
    if (body && units != PB_UNITS_KM_S)
        FAIL_K(K_BODY, "a body needs units = km-s");
    if (body && L[K_MU])
        FAIL_K(pf_later(cs, K_MU, K_BODY), "give mu or body, not both");
    double mu = body ? body->mu : units == PB_UNITS_NORMALIZED ? 1.0 : 0.0;
    if (L[K_MU])
        mu = cs->num[K_MU];
    else if (!body && units == PB_UNITS_KM_S)
        FAIL_K(K_MU, "missing in case '%s' (give mu or body)", cs->name);
    if (!(mu > 0))
        FAIL_K(K_MU, "mu must be > 0 (got %g)", mu);
    if (!(mu >= PF_MU_MIN && mu <= PF_MU_MAX))
        FAIL_K(K_MU, "mu must be within [%g, %g] (got %g)", PF_MU_MIN, PF_MU_MAX, mu);
    double radius = body ? body->radius : 0.0, j2 = body ? body->j2 : 0.0;
    if (L[K_RADIUS]) {
        radius = cs->num[K_RADIUS];
        if (!(radius > 0))
            FAIL_K(K_RADIUS, "radius must be > 0 (got %g)", radius);
        if (!(radius >= PF_RADIUS_MIN && radius <= PF_RADIUS_MAX))
            FAIL_K(K_RADIUS, "radius must be within [%g, %g] (got %g)", PF_RADIUS_MIN,
                   PF_RADIUS_MAX, radius);
    }
    if (L[K_J2])
        j2 = cs->num[K_J2];
    int with_j2 = L[K_FORCE] && strcmp(cs->str[K_FORCE], "j2") == 0;
    if (with_j2 && !(radius > 0))
        FAIL_K(K_RADIUS, "missing in case '%s' (force = j2 needs body or radius and j2)", cs->name);
    if (with_j2 && !L[K_J2] && !body)
        FAIL_K(K_J2, "missing in case '%s' (force = j2 needs body or radius and j2)", cs->name);

    /* the reference length for the size checks */
    double len0 = radius > 0 ? radius : 1.0;
    const char *len0_what = radius > 0 ? "the body's radius" : "the unit length";
    int first_el = pf_first_element_key(cs);
    int has_state = L[K_R] || L[K_V];
    double r0[3], v0[3], rp = NAN;
    if (first_el >= 0 && has_state)
        FAIL_K(L[K_R] ? K_R : K_V, "both classical elements ('%s' at line %d) and a state given",
               pf_keys[first_el], L[first_el]);
    if (first_el < 0 && !has_state)
        FAIL_K(K_A, "missing in case '%s' (give elements a, e, ... or a state r, v)", cs->name);
    if (has_state) {
        if (!L[K_R] || !L[K_V])
            FAIL_K(L[K_R] ? K_V : K_R, "missing in case '%s' (a state needs both r and v)", cs->name);
        memcpy(r0, cs->vec[0], sizeof r0);
        memcpy(v0, cs->vec[1], sizeof v0);
        double rn = hypot(hypot(r0[0], r0[1]), r0[2]);  /* no underflow for tiny r */
        if (rn > 0 && !(rn >= PF_SIZE_MIN * len0 && rn <= PF_SIZE_MAX * len0))
            FAIL_K(K_R, "|r| = %g is outside [%g, %g] times %s (%g)", rn, PF_SIZE_MIN,
                   PF_SIZE_MAX, len0_what, len0);
        pb_elements el;
        if (pb_elements_from_state(mu, r0, v0, &el))
            FAIL_K(K_R, "degenerate state (zero position or angular momentum)");
        rp = el.p / (1.0 + el.e);
    } else {
        if (!L[K_A])
            FAIL_K(K_A, "missing in case '%s' (elements need a and e)", cs->name);
        if (!L[K_E])
            FAIL_K(K_E, "missing in case '%s' (elements need a and e)", cs->name);
        double a = cs->num[K_A], e = cs->num[K_E];
        if (e < 0)
            FAIL_K(K_E, "eccentricity must be >= 0 (got %g)", e);
        if (e == 1)
            FAIL_K(K_E, "a parabola (e = 1) cannot be given by a and e; give r and v");
        /* the margin keeps e = 1 +- 1e-6 as typed (1.000001 - 1 is below 1e-6 in doubles) */
        if (fabs(e - 1) < PF_PARABOLIC_GAP * (1 - 1e-9))
            FAIL_K(K_E, "e = %.12g is too close to parabolic for elements (|e - 1| < %g); "
                   "give a state vector r, v", e, PF_PARABOLIC_GAP);
        if (e < 1 && a <= 0)
            FAIL_K(K_A, "semi-major axis must be > 0 for an ellipse (got %g)", a);
        if (e > 1 && a >= 0)
            FAIL_K(K_A, "semi-major axis must be < 0 for a hyperbola (got %g)", a);
        if (!(fabs(a) >= PF_SIZE_MIN * len0 && fabs(a) <= PF_SIZE_MAX * len0))
            FAIL_K(K_A, "|a| = %g is outside [%g, %g] times %s (%g)", fabs(a), PF_SIZE_MIN,
                   PF_SIZE_MAX, len0_what, len0);
        /* Angles (common practice): i_deg must lie in [0, 180] (180 is a
         * retrograde equatorial orbit); raan_deg, argp_deg and nu_deg may be
         * any finite value and are taken modulo 360, up to |x| <= 1e9 deg,
         * beyond which a double holds the fraction of a turn to worse than
         * 1e-7 deg. There is no mean-anomaly key: the anomaly is true. */
        if (!(cs->num[K_I] >= 0 && cs->num[K_I] <= 180))
            FAIL_K(K_I, "inclination must be within [0, 180] deg (got %g)", cs->num[K_I]);
        for (int k = K_RAAN; k <= K_NU; k++) {
            if (fabs(cs->num[k]) > PF_ANGLE_MAX)
                FAIL_K(k, "angle %g deg is too large to take modulo 360 (|value| must be "
                       "<= %g deg)", cs->num[k], PF_ANGLE_MAX);
            cs->num[k] = fmod(cs->num[k], 360.0);
        }
        double nu = cs->num[K_NU] * DEG;
        if (e > 1 && 1.0 + e * cos(nu) <= 0)
            FAIL_K(K_NU, "true anomaly %g deg is beyond the hyperbola's asymptote (%.4f deg)",
                   cs->num[K_NU], acos(-1.0 / e) / DEG);
        pb_elements el = {a, e, cs->num[K_I] * DEG, cs->num[K_RAAN] * DEG,
                          cs->num[K_ARGP] * DEG, nu, a * (1.0 - e * e)};
        if (pb_state_from_elements(mu, &el, r0, v0))
            FAIL_K(K_A, "elements do not define an orbit");
        rp = a * (1.0 - e);
    }
    {
        /* (v / v_esc)^2 = v^2 |r| / (2 mu), vis-viva (REFERENCES.md) */
        double rr = sqrt(r0[0] * r0[0] + r0[1] * r0[1] + r0[2] * r0[2]);
        double vv = v0[0] * v0[0] + v0[1] * v0[1] + v0[2] * v0[2];
        double ratio = sqrt(vv * rr / (2.0 * mu));
        if (!(ratio <= PF_ESCAPE_MAX))
            FAIL_K(has_state ? K_V : K_E, "the speed %g is %.3g times the escape speed at |r| = %g "
                   "(at most %g)", sqrt(vv), ratio, rr, PF_ESCAPE_MAX);
    }

    pb_problem *p = &c->out[c->n];
    const char *desc = L[K_DESC] ? cs->str[K_DESC] : "user problem";
    if (with_j2) {
        pb_problem_init_j2(p, cs->name, desc, mu, radius, j2, r0, v0);
        p->units = units;
    } else {
        pb_problem_init_twobody(p, cs->name, desc, units, mu, r0, v0);
        p->body_radius = radius;
    }
    if (L[K_ORBITS] && L[K_HORIZON])
        FAIL_K(pf_later(cs, K_ORBITS, K_HORIZON), "give orbits or horizon_s, not both");
    if (L[K_ORBITS]) {
        if (!(p->period > 0))
            FAIL_K(K_ORBITS, "the orbit is open (no period); give horizon_s instead");
        if (!(cs->num[K_ORBITS] > 0))
            FAIL_K(K_ORBITS, "must be > 0 (got %g)", cs->num[K_ORBITS]);
        if (!(cs->num[K_ORBITS] >= PF_HORIZON_MIN && cs->num[K_ORBITS] <= PF_HORIZON_MAX))
            FAIL_K(K_ORBITS, "must be within [%g, %g] (got %g)", PF_HORIZON_MIN, PF_HORIZON_MAX,
                   cs->num[K_ORBITS]);
        p->default_orbits = cs->num[K_ORBITS];
        p->default_horizon_s = 0.0;
    } else if (L[K_HORIZON]) {
        if (!(cs->num[K_HORIZON] > 0))
            FAIL_K(K_HORIZON, "must be > 0 (got %g)", cs->num[K_HORIZON]);
        /* at least a little of the periapsis passage (the period of a circle
         * at the periapsis distance, which is below the period of any
         * ellipse: a near-escape ellipse's period is no guide to a short
         * horizon), at most as many periods as `orbits` allows */
        double tp = 2.0 * M_PI * sqrt(rp * rp * rp / mu), ts = p->period > 0 ? p->period : tp;
        double hs = cs->num[K_HORIZON];
        if (!(hs >= PF_HORIZON_MIN * tp))
            FAIL_K(K_HORIZON, "must be at least %g times the periapsis time scale %g (got %g)",
                   PF_HORIZON_MIN, tp, hs);
        if (!(hs <= PF_HORIZON_MAX * ts))
            FAIL_K(K_HORIZON, "must be at most %g times the %s %g (got %g)", PF_HORIZON_MAX,
                   p->period > 0 ? "period" : "periapsis time scale", ts, hs);
        /* a horizon given in seconds stays in seconds (ids read __s<seconds>) */
        p->default_horizon_s = cs->num[K_HORIZON];
        p->default_orbits = 0.0;
    } else if (!(p->period > 0)) {
        FAIL_K(K_HORIZON, "missing in case '%s' (an open orbit needs horizon_s)", cs->name);
    } else {
        p->default_orbits = 10.0;
    }
#undef FAIL_K
    if (radius > 0 && rp < radius && c->warn) {
        char msg[512];
        const char *lu = units == PB_UNITS_KM_S ? " km" : "";
        snprintf(msg, sizeof msg, "%s:%d: case '%s': periapsis %.3f%s is below the body's "
                 "surface (radius %.3f%s)", c->path, cs->line, cs->name, rp, lu, radius, lu);
        c->warn(msg);
    }
    /* J2 is about 1e-3 for the Earth and of that order for planets (common
     * practice); anything outside (0, 0.1) is most likely a typing error */
    if (with_j2 && !(j2 > 0 && j2 < 0.1) && c->warn) {
        char msg[512];
        snprintf(msg, sizeof msg, "%s:%d: case '%s': j2 = %g is outside (0, 0.1); is it "
                 "unnormalized?", c->path, L[K_J2] ? L[K_J2] : cs->line, cs->name, j2);
        c->warn(msg);
    }
    c->case_lines[c->n] = cs->line;
    c->n++;
    return 0;
}

/* Room for one more case before a section is finished. */
static int pf_grow(pf_ctx *c)
{
    if (c->n < c->cap)
        return 0;
    int cap = c->cap ? 2 * c->cap : 8;
    pb_problem *o = realloc(c->out, (size_t)cap * sizeof *o);
    if (!o)
        return -1;
    c->out = o;
    int *l = realloc(c->case_lines, (size_t)cap * sizeof *l);
    if (!l)
        return -1;
    c->case_lines = l;
    c->cap = cap;
    return 0;
}

static int pf_handler_grow(void *user, const char *section, const char *key, const char *val)
{
    pf_ctx *c = user;
    if (!c->failed && pf_grow(c)) {
        c->failed = PB_ENOMEM;
        snprintf(c->err, c->errlen, "%s: out of memory", c->path);
    }
    return pf_handler(user, section, key, val);
}

int pb_problem_file_read(const char *path, pb_problem **cases, int *ncases,
                         char *err, size_t errlen, void (*warn)(const char *msg))
{
    char dummy[8];
    if (!err || errlen == 0) {
        err = dummy;
        errlen = sizeof dummy;
    }
    err[0] = '\0';
    *cases = NULL;
    *ncases = 0;
    pf_ctx c;
    memset(&c, 0, sizeof c);
    c.path = path;
    c.err = err;
    c.errlen = errlen;
    c.warn = warn;
    c.f = fopen(path, "r");
    if (!c.f) {
        snprintf(err, errlen, "%s: cannot read the problem file: %s", path, strerror(errno));
        return PB_EINVAL;
    }
    struct stat st;
    if (!fstat(fileno(c.f), &st) && S_ISDIR(st.st_mode)) {
        fclose(c.f);
        snprintf(err, errlen, "%s: is a folder, not a problem file", path);
        return PB_EINVAL;
    }
    int r = ini_parse_stream(pf_reader, &c, pf_handler_grow, &c);
    fclose(c.f);
    if (!c.failed && r > 0)
        pf_fail(&c, r, NULL, "syntax error (expected '[case NAME]', 'key = value' or a comment)");
    if (!c.failed && r < 0) {
        c.failed = PB_ENOMEM;
        snprintf(err, errlen, "%s: out of memory", path);
    }
    if (!c.failed && c.have_cur && pf_grow(&c) == 0)
        pf_finish(&c);
    if (!c.failed && c.n == 0)
        pf_fail(&c, c.line, NULL, "no '[case NAME]' section with keys");
    free(c.case_lines);
    if (c.failed) {
        free(c.out);
        return c.failed;
    }
    *cases = c.out;
    *ncases = c.n;
    return PB_OK;
}
