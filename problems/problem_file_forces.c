/* problem_file_forces.c - the force-term keys of a problem-file case: each
 * value parsed and checked, the needs of each term checked (an atmosphere
 * for drag, an epoch and the Earth for the Sun and Moon series, km-s units
 * where a term is written in km and s), and the pb_forces they make. Every
 * failure names the file, the line and the key. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include "problem_file_forces.h"
#include "bodies.h"
#include "force_terms.h"

#define DEG (M_PI / 180.0)

/* Our own limits, to catch typing slips (no outside source): one manoeuvre
 * changes the velocity by at most 100 speed units, i.e. 100 km/s in km-s
 * units, more than twice the escape speed from the Sun at 1 AU (42 km/s,
 * from memory), so a larger value is a slip (m/s written for km/s); an
 * epoch's year lies within 1900..2100, since the Sun and Moon series are
 * written for dates near J2000 (REFERENCES.md, "Force models"). */
#define PFF_DV_MAX 100.0
#define PFF_YEAR_MIN 1900
#define PFF_YEAR_MAX 2100

/* What the terms need to know of the central body, from the case and the
 * two-body problem made of it. */
typedef struct pff_central {
    const pb_body *body;      /* NULL: none named */
    pb_units units;
    double radius;            /* 0: none known */
} pff_central;

/* The keys that add a term: beside `force = two-body` they contradict it. */
static const int pff_term_keys[] = {K_ZONAL, K_GAMMA, K_DRAG, K_THIRD, K_CIRC, K_SRP, K_MAN};

static int pff_blank(char c) { return c == ' ' || c == '\t'; }

/* The numbers in s[0..len), separated by commas (comma = 1) or blanks; the
 * first max go into x. Their count (which may exceed max), or -1 with the
 * reason in why. */
static int pff_numbers(const char *s, size_t len, int comma, double *x, int max, char *why,
                       size_t whylen)
{
    char buf[PF_VALUE_MAX];
    if (len >= sizeof buf) {
        snprintf(why, whylen, "longer than %d characters", PF_VALUE_MAX - 1);
        return -1;
    }
    memcpy(buf, s, len);
    buf[len] = '\0';
    int n = 0;
    char *save = NULL;
    for (char *tok = strtok_r(buf, comma ? "," : " \t", &save); tok;
         tok = strtok_r(NULL, comma ? "," : " \t", &save), n++) {
        while (pff_blank(*tok))
            tok++;
        char *end;
        errno = 0;
        double v = strtod(tok, &end);
        while (pff_blank(*end))
            end++;
        if (end == tok || *end) {
            snprintf(why, whylen, "'%s' is not a number", tok);
            return -1;
        }
        if (!isfinite(v) || errno == ERANGE) {
            snprintf(why, whylen, "'%s' is not finite", tok);
            return -1;
        }
        if (n < max)
            x[n] = v;
    }
    return n;
}

/* force = two-body promises the plain two-body problem and its exact
 * solution: a term key beside it is a contradiction, named at both lines. */
static int pff_two_body_contradiction(pf_build *b)
{
    const pf_case *cs = b->cs;
    if (!cs->kline[K_FORCE] || strcmp(cs->str[K_FORCE], "two-body") != 0)
        return 0;
    for (size_t j = 0; j < sizeof pff_term_keys / sizeof pff_term_keys[0]; j++)
        if (cs->kline[pff_term_keys[j]])
            return pf_fail_key(b, pff_term_keys[j], "contradicts 'force = two-body' at line %d "
                               "(leave force out when the case has force terms)",
                               cs->kline[K_FORCE]);
    return 0;
}

/* Zonal harmonics J2..J_degree: the degree from zonal_degree (or 2 for
 * force = j2), each J_n from its key or else the body's table. */
static int pff_zonal(pf_build *b, const pff_central *cb, pb_forces *f)
{
    const pf_case *cs = b->cs;
    const int *L = cs->kline;
    int force_j2 = L[K_FORCE] && strcmp(cs->str[K_FORCE], "j2") == 0;
    int deg = force_j2 ? 2 : 0;
    if (L[K_ZONAL]) {
        double d = cs->num[K_ZONAL];
        if (!(d == floor(d) && d >= 2 && d <= PB_ZONAL_MAX))
            return pf_fail_key(b, K_ZONAL, "must be a whole number within 2..%d (got %g)",
                               PB_ZONAL_MAX, d);
        if (force_j2 && d != 2)
            return pf_fail_key(b, K_ZONAL, "zonal_degree = %g contradicts 'force = j2' at line %d "
                               "(J2 alone; leave force out for a higher degree)", d, L[K_FORCE]);
        deg = (int)d;
    }
    /* a coefficient of a term the case does not have would silently do nothing */
    for (int n = deg < 2 ? 2 : deg + 1; n <= PB_ZONAL_MAX; n++)
        if (L[K_J2 + n - 2])
            return pf_fail_key(b, K_J2 + n - 2, "j%d without a zonal term of degree %d or more "
                               "(the case's zonal degree is %d; set zonal_degree)", n, n, deg);
    if (!deg)
        return 0;
    char what[40];
    snprintf(what, sizeof what, force_j2 && !L[K_ZONAL] ? "force = j2" : "zonal_degree = %d", deg);
    if (!(cb->radius > 0))
        return pf_fail_key(b, K_RADIUS, "missing in case '%s' (%s needs body or radius and j2%s)",
                           cs->name, what, deg > 2 ? "..jN" : "");
    for (int n = 2; n <= deg; n++) {
        int k = K_J2 + n - 2;
        if (L[k])
            f->jn[n] = cs->num[k];
        else if (cb->body && cb->body->zonal_known >= n)
            f->jn[n] = cb->body->jn[n];
        else if (cb->body)
            return pf_fail_key(b, k, "missing in case '%s' (%s needs j%d; body '%s' gives J2..J%d "
                               "only)", cs->name, what, n, cb->body->name, cb->body->zonal_known);
        else
            return pf_fail_key(b, k, "missing in case '%s' (%s needs body or radius and j2%s)",
                               cs->name, what, deg > 2 ? "..jN" : "");
    }
    f->zonal_degree = deg;
    return 0;
}

/* The potential -gamma/r^2: the radial motion obeys r'' = (h^2 - 2 gamma)/r^3
 * - mu/r^2, a Kepler radial motion only while h^2 > 2 gamma; otherwise
 * nothing holds the orbit off the centre. */
static int pff_gamma(pf_build *b, const double *r0, const double *v0, pb_forces *f)
{
    const pf_case *cs = b->cs;
    if (!cs->kline[K_GAMMA])
        return 0;
    double g = cs->num[K_GAMMA];
    double h[3] = {r0[1] * v0[2] - r0[2] * v0[1], r0[2] * v0[0] - r0[0] * v0[2],
                   r0[0] * v0[1] - r0[1] * v0[0]};
    double h2 = h[0] * h[0] + h[1] * h[1] + h[2] * h[2];
    if (!(h2 > 2.0 * g))
        return pf_fail_key(b, K_GAMMA, "the initial state's h^2 = %g must exceed 2 gamma = %g, or the "
                           "orbit has no Keplerian radial motion (it falls into the centre)", h2, 2.0 * g);
    f->inverse_cube_gamma = g;
    return 0;
}

/* Drag in the body's exponential atmosphere, which turns with the body. */
static int pff_drag(pf_build *b, const pff_central *cb, pb_forces *f)
{
    const pf_case *cs = b->cs;
    const int *L = cs->kline;
    if (L[K_BALLISTIC] && !(cs->num[K_BALLISTIC] > 0))
        return pf_fail_key(b, K_BALLISTIC, "must be > 0 (C_D A/m in m^2/kg; got %g)",
                           cs->num[K_BALLISTIC]);
    if (!L[K_DRAG]) {
        if (L[K_BALLISTIC])
            return pf_fail_key(b, K_BALLISTIC, "ballistic_m2_kg without drag (add drag = exponential)");
        return 0;
    }
    if (strcmp(cs->str[K_DRAG], "exponential") != 0)
        return pf_fail_key(b, K_DRAG, "unknown drag model '%s' (known: exponential)", cs->str[K_DRAG]);
    if (!cb->body || !cb->body->atmosphere) {
        char why[80];
        if (cb->body)
            snprintf(why, sizeof why, "body '%s' has none", cb->body->name);
        else
            snprintf(why, sizeof why, "the case names no body");
        return pf_fail_key(b, K_DRAG, "drag without an atmosphere model: %s (the exponential "
                           "atmosphere is the Earth's: body = earth, units km-s)", why);
    }
    if (!L[K_BALLISTIC])
        return pf_fail_key(b, K_BALLISTIC, "missing in case '%s' (drag needs ballistic_m2_kg = "
                           "C_D A/m in m^2/kg)", cs->name);
    f->drag = PB_DRAG_EXPONENTIAL;
    f->ballistic_m2_kg = cs->num[K_BALLISTIC];
    f->body_rate = cb->body->rate;
    return 0;
}

static int pff_epoch(pf_build *b, pb_forces *f)
{
    const pf_case *cs = b->cs;
    if (!cs->kline[K_EPOCH])
        return 0;
    char why[200];
    if (pb_problem_file_epoch(cs->str[K_EPOCH], &f->epoch_days, why, sizeof why))
        return pf_fail_key(b, K_EPOCH, "%s", why);
    f->has_epoch = 1;
    return 0;
}

/* The Sun and the Moon from the series: a list of either or both. */
static int pff_third_bodies(pf_build *b, const pff_central *cb, pb_forces *f)
{
    const pf_case *cs = b->cs;
    if (!cs->kline[K_THIRD])
        return 0;
    const char *s = cs->str[K_THIRD];
    for (int item = 1;; item++) {
        const char *comma = strchr(s, ',');
        size_t len = comma ? (size_t)(comma - s) : strlen(s);
        while (len && pff_blank(*s))
            s++, len--;
        while (len && pff_blank(s[len - 1]))
            len--;
        int *flag = len == 3 && strncasecmp(s, "sun", 3) == 0 ? &f->sun
                    : len == 4 && strncasecmp(s, "moon", 4) == 0 ? &f->moon : NULL;
        if (!flag)
            return pf_fail_key(b, K_THIRD, "unknown third body '%.*s' (item %d; known: sun, moon)",
                               (int)len, s, item);
        if (*flag)
            return pf_fail_key(b, K_THIRD, "names '%.*s' twice", (int)len, s);
        *flag = 1;
        if (!comma)
            break;
        s = comma + 1;
    }
    if (!cs->kline[K_EPOCH])
        return pf_fail_key(b, K_THIRD, "a third body without an epoch: the Sun and Moon series need "
                           "the date of t = 0 (add epoch = YYYY-MM-DDThh:mm:ss, TT)");
    if (!cb->body || strcmp(cb->body->name, "earth") != 0)
        return pf_fail_key(b, K_THIRD, "the Sun and Moon series are geocentric: third_bodies needs "
                           "body = earth (units km-s; the case's body is %s)",
                           cb->body ? cb->body->name : "not named");
    return 0;
}

/* A third body on a circular orbit, in the case's own units. */
static int pff_circular(pf_build *b, pb_forces *f)
{
    const pf_case *cs = b->cs;
    if (!cs->kline[K_CIRC])
        return 0;
    static const char *const what = "mu, radius, rate_rad_s, i_deg, raan_deg, u0_deg";
    const char *s = cs->str[K_CIRC];
    double x[6];
    char why[200];
    int n = pff_numbers(s, strlen(s), 1, x, 6, why, sizeof why);
    if (n < 0)
        return pf_fail_key(b, K_CIRC, "%s (six comma-separated numbers %s)", why, what);
    if (n != 6)
        return pf_fail_key(b, K_CIRC, "needs six comma-separated numbers %s (got %d)", what, n);
    if (!(x[0] > 0))
        return pf_fail_key(b, K_CIRC, "mu must be > 0 (got %g)", x[0]);
    if (!(x[1] > 0))
        return pf_fail_key(b, K_CIRC, "radius must be > 0 (got %g)", x[1]);
    if (!(x[3] >= 0 && x[3] <= 180))
        return pf_fail_key(b, K_CIRC, "i_deg must be within [0, 180] (got %g)", x[3]);
    if (!(fabs(x[4]) <= PF_ANGLE_MAX && fabs(x[5]) <= PF_ANGLE_MAX))
        return pf_fail_key(b, K_CIRC, "raan_deg and u0_deg must be within +-%g deg to be taken "
                           "modulo 360", PF_ANGLE_MAX);
    f->circular = 1;
    f->circ = (pb_circular_body){x[0], x[1], x[2], x[3] * DEG, fmod(x[4], 360.0) * DEG,
                                 fmod(x[5], 360.0) * DEG};
    return 0;
}

/* Radiation pressure on a cannonball, with the body's shadow. */
static int pff_srp(pf_build *b, const pff_central *cb, pb_forces *f)
{
    const pf_case *cs = b->cs;
    const int *L = cs->kline;
    if (!L[K_SRP]) {
        if (L[K_CR])
            return pf_fail_key(b, K_CR, "cr without srp_area_mass_m2_kg (cr scales radiation pressure)");
        if (L[K_SHADOW])
            return pf_fail_key(b, K_SHADOW, "shadow without srp_area_mass_m2_kg (the shadow dims "
                               "radiation pressure)");
        return 0;
    }
    double am = cs->num[K_SRP];
    if (!(am > 0))
        return pf_fail_key(b, K_SRP, "must be > 0 (A/m in m^2/kg; got %g)", am);
    if (!L[K_CR])
        return pf_fail_key(b, K_CR, "missing in case '%s' (srp_area_mass_m2_kg needs cr, the "
                           "radiation pressure coefficient in [0, 3]; there is no default)", cs->name);
    /* 1 for a body that absorbs all light, 2 for a perfect mirror facing
     * the Sun (common practice); 3 bounds any plausible value */
    if (!(cs->num[K_CR] >= 0 && cs->num[K_CR] <= 3))
        return pf_fail_key(b, K_CR, "must be within [0, 3] (got %g)", cs->num[K_CR]);
    if (!L[K_EPOCH])
        return pf_fail_key(b, K_SRP, "radiation pressure needs the Sun's position: add epoch = "
                           "YYYY-MM-DDThh:mm:ss (TT)");
    if (cb->units != PB_UNITS_KM_S || !(cb->radius > 0))
        return pf_fail_key(b, K_SRP, "radiation pressure needs units = km-s and the central body's "
                           "radius (body or radius)");
    static const char *const shadows[] = {"none", "cylindrical", "conical"};
    int model = PB_SHADOW_NONE;
    if (L[K_SHADOW]) {
        while (model < 3 && strcmp(cs->str[K_SHADOW], shadows[model]) != 0)
            model++;
        if (model == 3)
            return pf_fail_key(b, K_SHADOW, "unknown shadow model '%s' (known: none, cylindrical, "
                               "conical)", cs->str[K_SHADOW]);
    }
    f->srp_area_mass_m2_kg = am;
    f->cr = cs->num[K_CR];
    f->shadow = model;
    return 0;
}

static int pff_manoeuvres(pf_build *b, pb_forces *f)
{
    const pf_case *cs = b->cs;
    if (!cs->kline[K_MAN])
        return 0;
    char why[300];
    if (pb_problem_file_manoeuvres(cs->str[K_MAN], f, why, sizeof why))
        return pf_fail_key(b, K_MAN, "%s", why);
    return 0;
}

/* The terms of the case into *f; -1 after a failure. */
static int pff_terms(pf_build *b, const pff_central *cb, const double *r0, const double *v0, pb_forces *f)
{
    memset(f, 0, sizeof *f);
    if (pff_two_body_contradiction(b) || pff_zonal(b, cb, f) || pff_gamma(b, r0, v0, f) ||
        pff_drag(b, cb, f) || pff_epoch(b, f) || pff_third_bodies(b, cb, f) || pff_circular(b, f) ||
        pff_srp(b, cb, f) || pff_manoeuvres(b, f))
        return -1;
    if (b->cs->kline[K_EPOCH] && !f->sun && !f->moon && !(f->srp_area_mass_m2_kg > 0))
        return pf_fail_key(b, K_EPOCH, "epoch without a term that uses it (third_bodies = sun or "
                           "moon, srp_area_mass_m2_kg)");
    return 0;
}

/* Every manoeuvre inside the case's horizon (default_orbits periods or
 * default_horizon_s): one beyond it would silently never happen. */
static int pff_manoeuvres_within(pf_build *b, const pb_problem *p)
{
    const pb_forces *f = &p->forces;
    const char *su = p->units == PB_UNITS_KM_S ? " s" : "";
    double horizon = p->default_horizon_s > 0 ? p->default_horizon_s : p->default_orbits * p->period;
    for (int k = 0; k < f->n_manoeuvres; k++)
        if (f->manoeuvres[k].t > horizon)
            return pf_fail_key(b, K_MAN, "entry %d at t = %g%s is beyond the case's horizon %g%s "
                               "(%s)", k + 1, f->manoeuvres[k].t, su, horizon, su,
                               p->default_horizon_s > 0 ? "horizon_s" : "orbits times the period");
    return 0;
}

/* J2 is about 1e-3 for the Earth and of that order for planets (common
 * practice); anything outside (0, 0.1) is most likely a typing error. */
static void pff_warn_suspicious(pf_build *b, const pb_forces *f)
{
    const pf_case *cs = b->cs;
    if (!b->warn || f->zonal_degree < 2 || (f->jn[2] > 0 && f->jn[2] < 0.1))
        return;
    char msg[512];
    snprintf(msg, sizeof msg, "%s:%d: case '%s': j2 = %g is outside (0, 0.1); is it unnormalized?", b->path,
             cs->kline[K_J2] ? cs->kline[K_J2] : cs->line, cs->name, f->jn[2]);
    b->warn(msg);
}

int pb_problem_file_forces(pf_case *cs, const char *path, pb_problem *p, char *err, size_t errlen,
                           void (*warn)(const char *msg))
{
    pf_build b = {cs, path, err, errlen, warn};
    pff_central cb = {cs->kline[K_BODY] ? pb_body_find(cs->str[K_BODY]) : NULL, p->units, p->body_radius};
    pb_forces f;
    if (pff_terms(&b, &cb, p->r0, p->v0, &f))
        return PB_EINVAL;
    if (pb_forces_any(&f)) {
        /* the problem made again with its terms (force = j2 alone stays
         * PB_FORCE_J2); copies first, since it is written over p */
        char name[PB_NAME_MAX], desc[sizeof p->description];
        double r0[3], v0[3], orbits = p->default_orbits, horizon_s = p->default_horizon_s;
        snprintf(name, sizeof name, "%s", p->name);
        snprintf(desc, sizeof desc, "%s", p->description);
        memcpy(r0, p->r0, sizeof r0);
        memcpy(v0, p->v0, sizeof v0);
        pb_problem_init_forces(p, name, desc, p->units, p->mu, p->body_radius, &f, r0, v0);
        p->default_orbits = orbits;
        p->default_horizon_s = horizon_s;
        if (pff_manoeuvres_within(&b, p))
            return PB_EINVAL;
    }
    pff_warn_suspicious(&b, &f);
    return PB_OK;
}

/* Days from 1970-01-01 to the proleptic Gregorian date y-m-d, in integers
 * (the days-from-civil algorithm of H. Hinnant's public-domain date
 * algorithms: years begin in March, so the leap day ends a year, and eras
 * of 400 years repeat). */
static long pff_days_from_civil(long y, int m, int d)
{
    y -= m <= 2;
    long era = (y >= 0 ? y : y - 399) / 400;
    long yoe = y - era * 400;
    long doy = (153L * (m > 2 ? m - 3 : m + 9) + 2) / 5 + d - 1;
    long doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    return era * 146097 + doe - 719468;
}

/* n decimal digits at s into *out; -1 if any is not a digit. */
static int pff_digits(const char *s, int n, int *out)
{
    int v = 0;
    for (int i = 0; i < n; i++) {
        if (s[i] < '0' || s[i] > '9')
            return -1;
        v = 10 * v + (s[i] - '0');
    }
    *out = v;
    return 0;
}

int pb_problem_file_epoch(const char *text, double *days, char *why, size_t whylen)
{
    int Y, M, D, h, mi, sec;
    const char *s = text;
    int bad = strlen(s) < 19 || pff_digits(s, 4, &Y) || s[4] != '-' || pff_digits(s + 5, 2, &M) ||
              s[7] != '-' || pff_digits(s + 8, 2, &D) || s[10] != 'T' || pff_digits(s + 11, 2, &h) ||
              s[13] != ':' || pff_digits(s + 14, 2, &mi) || s[16] != ':' || pff_digits(s + 17, 2, &sec);
    double frac = 0;
    if (!bad && s[19]) {
        /* ".d..." to the end: fractional seconds */
        bad = s[19] != '.' || !s[20] || strspn(s + 20, "0123456789") != strlen(s + 20);
        if (!bad)
            frac = strtod(s + 19, NULL);
    }
    if (bad) {
        snprintf(why, whylen, "malformed epoch '%s' (YYYY-MM-DDThh:mm:ss, TT, optional fractional seconds)",
                 text);
        return -1;
    }
    static const int month_days[12] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    int leap = (Y % 4 == 0 && Y % 100 != 0) || Y % 400 == 0;
    const char *field = NULL;
    if (Y < PFF_YEAR_MIN || Y > PFF_YEAR_MAX)
        field = "year outside 1900..2100";
    else if (M < 1 || M > 12)
        field = "month outside 1..12";
    else if (D < 1 || D > month_days[M - 1] + (M == 2 && leap))
        field = "no such day in that month";
    else if (h > 23)
        field = "hour outside 0..23";
    else if (mi > 59)
        field = "minute outside 0..59";
    else if (sec > 59)
        field = "seconds not below 60 (TT has no leap seconds)";
    if (field) {
        snprintf(why, whylen, "malformed epoch '%s': %s", text, field);
        return -1;
    }
    /* whole seconds from J2000.0 in integers, so a whole-second epoch is
     * one correctly rounded division away from its day count */
    long long secs = (long long)(pff_days_from_civil(Y, M, D) - pff_days_from_civil(2000, 1, 1)) * 86400LL +
                     h * 3600LL + mi * 60LL + sec - 43200LL;
    *days = ((double)secs + frac) / 86400.0;
    return 0;
}

int pb_problem_file_manoeuvres(const char *text, pb_forces *f, char *why, size_t whylen)
{
    const char *form = "an entry is 't_s dv_r dv_t dv_n', entries separated by ';'";
    int n = 0;
    const char *s = text;
    for (int entry = 1;; entry++) {
        const char *semi = strchr(s, ';');
        size_t len = semi ? (size_t)(semi - s) : strlen(s);
        while (len && pff_blank(*s))
            s++, len--;
        while (len && pff_blank(s[len - 1]))
            len--;
        if (!len && !semi && entry > 1)
            break;  /* a ';' after the last entry */
        if (!len) {
            snprintf(why, whylen, "entry %d is empty (%s)", entry, form);
            return -1;
        }
        if (n == PB_MANOEUVRES_MAX) {
            snprintf(why, whylen, "more than %d manoeuvres (the most one case may hold)", PB_MANOEUVRES_MAX);
            return -1;
        }
        double x[4];
        char sub[240];
        int got = pff_numbers(s, len, 0, x, 4, sub, sizeof sub);
        if (got != 4) {
            if (got >= 0)
                snprintf(sub, sizeof sub, "%d number%s", got, got == 1 ? "" : "s");
            snprintf(why, whylen, "entry %d ('%.*s') is malformed: %s (%s)", entry, (int)len, s, sub, form);
            return -1;
        }
        pb_manoeuvre *m = &f->manoeuvres[n];
        *m = (pb_manoeuvre){x[0], {x[1], x[2], x[3]}};
        double dv = sqrt(x[1] * x[1] + x[2] * x[2] + x[3] * x[3]);
        if (!(m->t > 0)) {
            snprintf(why, whylen, "entry %d: time %g must be > 0 (a change at t = 0 belongs in the initial "
                     "state)", entry, m->t);
            return -1;
        }
        if (n > 0 && !(m->t > m[-1].t)) {
            snprintf(why, whylen, "entry %d (t = %g) is out of time order: entry %d is at t = %g (times must "
                     "strictly increase)", entry, m->t, entry - 1, m[-1].t);
            return -1;
        }
        if (!(dv <= PFF_DV_MAX)) {
            snprintf(why, whylen, "entry %d: |dv| = %g is above %g (our limit for one manoeuvre, km/s in "
                     "km-s units)", entry, dv, PFF_DV_MAX);
            return -1;
        }
        n++;
        if (!semi)
            break;
        s = semi + 1;
    }
    f->n_manoeuvres = n;
    return 0;
}
