/* test_reference_forces.c - the reference follows every force term (issue
 * 12): per term, GSL's rk8pd (Prince & Dormand 1981) on the methods' double
 * force, stopping at shadow boundaries and burns, agrees with it to GSL's
 * measured accuracy, and without the term it moves over 100 times that; its
 * floor across boundaries and burns; a force it does not know is refused. */
#include <criterion/criterion.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include <math.h>
#include <string.h>
#include "bench/measure/harness.h"
#include "test_support.h"
#include "problems/bodies.h"
#include "problems/force_terms.h"
#include "problems/reference.h"
#include "problems/truth.h"

#define RF_DEG (M_PI / 180.0)
/* 2026-03-20 0h TT (the March equinox; the Sun near +x): 26 whole years
 * from 2000-01-01 with 7 leap days (2000 .. 2024) are 9497 days, then 31 +
 * 28 + 19 days to March 20, 9575 days after 2000-01-01 0h, which is
 * J2000.0 (2000-01-01 12h, JD 2451545.0) less half a day: JD 2461119.5
 * (the 9575 days checked with Python's datetime date difference). */
#define RF_EPOCH_DAYS 9574.5
/* GSL's per-step tolerance (scaled to |r0| and |v0|) and the 10x tighter
 * one whose difference from it measures GSL's own error. */
#define RF_GSL_TOL 1e-14
#define RF_GSL_TOL_CHECK 1e-15
/* How closely a shadow boundary is located in GSL's run (s): the force's
 * jump (below 2e-10 km/s^2 here) over it moves the end by < 1e-14 km. */
#define RF_BISECT_S 1e-8
/* Agreement of the reference with GSL over one LEO orbit (5578 s at
 * 420 km), km. Measured over this file's terms: |ref - GSL at 1e-14| from
 * 3e-11 to 5.0e-10, GSL's own error |GSL 1e-14 - GSL 1e-15| from 3e-11 to
 * 5.6e-10 (largest with the cylindrical shadow's jumps); tighter, double
 * round-off stops GSL's convergence near 1e-10 km. 2e-9 km is 3.6 times
 * the largest GSL error measured. */
#define RF_AGREE_KM 2e-9
/* Item 4: the reference's floor (coarse-fine difference) stays below this. */
#define RF_FLOOR_MAX_KM 1e-9

enum { RF_NS = 12 };

/* ---- GSL's independent integration ---- */

typedef struct rf_gsl {
    const pb_problem *p;
    gsl_odeiv2_system sys;
    gsl_odeiv2_step *s;
    gsl_odeiv2_control *c;
    gsl_odeiv2_evolve *e;
    double scale[6];
    int crossings;     /* shadow boundaries stopped at */
    int seen[3];       /* shadow classes visited (sunlight, penumbra, umbra) */
} rf_gsl;

static int rf_rhs(double t, const double y[], double dydt[], void *params)
{
    const pb_problem *p = params;
    double a[3];
    if (pb_forces_accel(p, t, y, y + 3, a) != PB_OK)
        return GSL_EBADFUNC;
    for (int i = 0; i < 3; i++) {
        dydt[i] = y[i + 3];
        dydt[i + 3] = a[i];
    }
    return GSL_SUCCESS;
}

static double rf_norm(const double *x) { return sqrt(x[0] * x[0] + x[1] * x[1] + x[2] * x[2]); }

static double rf_dist(const double *a, const double *b)
{
    double d[3] = {a[0] - b[0], a[1] - b[1], a[2] - b[2]};
    return rf_norm(d);
}

/* 0 in sunlight (nu = 1), 1 in penumbra, 2 in umbra (nu = 0) by
 * pb_shadow_fraction at (t, r); 0 without radiation pressure or shadow. */
static int rf_shadow_class(const pb_problem *p, double t, const double *r)
{
    const pb_forces *f = &p->forces;
    if (!(f->srp_area_mass_m2_kg > 0) || f->shadow == PB_SHADOW_NONE)
        return 0;
    double s[3];
    pb_sun_position(f->epoch_days + t / 86400.0, s);
    double nu = pb_shadow_fraction(f->shadow, p->body_radius, s, r);
    return nu >= 1 ? 0 : nu <= 0 ? 2 : 1;
}

/* From *t to t1 exactly, without looking at the shadow. */
static void rf_plain(rf_gsl *g, double *t, double t1, double *y)
{
    double h = t1 - *t;
    gsl_odeiv2_evolve_reset(g->e);
    while (*t < t1)
        cr_assert_eq(gsl_odeiv2_evolve_apply(g->e, g->c, g->s, &g->sys, t, t1, &h, y),
                     GSL_SUCCESS, "GSL failed at t = %g", *t);
    gsl_odeiv2_evolve_reset(g->e);
}

/* From *t to t1 by GSL's own steps; a step that ends in another shadow class
 * is redone to just past the boundary, found by bisection on the class of
 * states integrated from the step's start, so that no step straddles the
 * force's jump (cylindrical) or kink (conical) by more than RF_BISECT_S. */
static void rf_segment(rf_gsl *g, double *t, double t1, double *y, double *h)
{
    int cls = rf_shadow_class(g->p, *t, y);
    g->seen[cls] = 1;
    while (*t < t1) {
        double ta = *t, ya[6], yb[6];
        memcpy(ya, y, sizeof ya);
        cr_assert_eq(gsl_odeiv2_evolve_apply(g->e, g->c, g->s, &g->sys, t, t1, h, y),
                     GSL_SUCCESS, "GSL failed at t = %g", *t);
        int next = rf_shadow_class(g->p, *t, y);
        if (next == cls)
            continue;
        double lo = ta, hi = *t;
        while (hi - lo > RF_BISECT_S) {
            double mid = 0.5 * (lo + hi), tm = ta;
            memcpy(yb, ya, sizeof yb);
            rf_plain(g, &tm, mid, yb);
            if (rf_shadow_class(g->p, mid, yb) == cls)
                lo = mid;
            else
                hi = mid;
        }
        memcpy(y, ya, sizeof ya);
        *t = ta;
        rf_plain(g, t, hi, y);
        cls = rf_shadow_class(g->p, *t, y);
        g->seen[cls] = 1;
        g->crossings++;
    }
}

/* The burn in this test's own frame: R along r, C along r x v, and the
 * along-track direction built as v's part perpendicular to r (equal to
 * C x R, the frame reference.c and the harness state, for any v not along r). */
static void rf_burn(const pb_manoeuvre *m, double *y)
{
    const double *r = y;
    double *v = y + 3, R[3], C[3], I[3];
    double rn = rf_norm(r), vr = 0;
    for (int i = 0; i < 3; i++)
        R[i] = r[i] / rn;
    C[0] = r[1] * v[2] - r[2] * v[1];
    C[1] = r[2] * v[0] - r[0] * v[2];
    C[2] = r[0] * v[1] - r[1] * v[0];
    double cn = rf_norm(C);
    for (int i = 0; i < 3; i++) {
        C[i] /= cn;
        vr += v[i] * R[i];
    }
    for (int i = 0; i < 3; i++)
        I[i] = v[i] - vr * R[i];
    double in = rf_norm(I);
    for (int i = 0; i < 3; i++)
        v[i] += m->dv[0] * R[i] + m->dv[1] * I[i] / in + m->dv[2] * C[i];
}

/* The state at t_end (y = r, v) by rk8pd at per-step tolerance tol on
 * positions scaled by |r0| and velocities by |v0|, burns applied at their
 * times (the state at a burn's time is the one before it). info (may be
 * NULL) receives the shadow crossings and classes seen. */
static void rf_gsl_run(const pb_problem *p, double tol, double t_end, double *y, rf_gsl *info)
{
    rf_gsl g = {.p = p};
    g.sys = (gsl_odeiv2_system){rf_rhs, NULL, 6, (void *)p};
    for (int i = 0; i < 3; i++) {
        g.scale[i] = rf_norm(p->r0);
        g.scale[i + 3] = rf_norm(p->v0);
        y[i] = p->r0[i];
        y[i + 3] = p->v0[i];
    }
    g.s = gsl_odeiv2_step_alloc(gsl_odeiv2_step_rk8pd, 6);
    g.c = gsl_odeiv2_control_scaled_new(tol, 0.0, 1.0, 0.0, g.scale, 6);
    g.e = gsl_odeiv2_evolve_alloc(6);
    cr_assert(g.s && g.c && g.e);
    double t = p->t0, h = p->period > 0 ? 1e-3 * p->period : 1e-3 * t_end;
    for (int k = 0; k < p->forces.n_manoeuvres; k++) {
        rf_segment(&g, &t, p->forces.manoeuvres[k].t, y, &h);
        rf_burn(&p->forces.manoeuvres[k], y);
        gsl_odeiv2_evolve_reset(g.e);
    }
    rf_segment(&g, &t, t_end, y, &h);
    gsl_odeiv2_evolve_free(g.e);
    gsl_odeiv2_control_free(g.c);
    gsl_odeiv2_step_free(g.s);
    g.e = NULL, g.c = NULL, g.s = NULL;
    if (info)
        *info = g;
}

/* ---- the reference ---- */

typedef struct rf_ref {
    double t[RF_NS], floor_max;
    long double r[RF_NS * PB_DIM_MAX], v[RF_NS * PB_DIM_MAX];
    double fl[RF_NS];
} rf_ref;

/* The reference as the harness builds it (both passes, no cache) at RF_NS
 * samples evenly spread to t_end. */
static void rf_reference(const pb_problem *p, double t_end, rf_ref *out)
{
    for (int k = 0; k < RF_NS; k++)
        out->t[k] = t_end * (k + 1) / RF_NS;
    out->t[RF_NS - 1] = t_end;
    cr_assert_eq(pb_reference_build(p, out->t, RF_NS, NULL, out->r, out->v, out->fl), PB_OK);
    out->floor_max = 0;
    for (int k = 0; k < RF_NS; k++)
        out->floor_max = fmax(out->floor_max, out->fl[k]);
}

static void rf_sample_pos(const rf_ref *R, int k, double *r)
{
    for (int i = 0; i < 3; i++)
        r[i] = (double)R->r[k * PB_DIM_MAX + i];
}

/* ---- problems ---- */

static pb_forces rf_none(void)
{
    pb_forces f;
    memset(&f, 0, sizeof f);
    return f;
}

/* A circular LEO at 420 km (inside the 400-450 km row of the atmosphere
 * table: no row's base, where the density is not smooth, is crossed),
 * inclination 51.6 deg, starting at its ascending node on +x: at the March
 * equinox the Sun is near +x, so the orbit plane holds the Sun (beta near
 * 0) and the orbit passes through the Earth's shadow on its far side. */
static pb_problem rf_leo(const pb_forces *f)
{
    const pb_body *E = &pb_body_earth;
    double a = E->radius + 420.0, vc = sqrt(E->mu / a), inc = 51.6 * RF_DEG;
    double r0[3] = {a, 0, 0}, v0[3] = {0, vc * cos(inc), vc * sin(inc)};
    pb_problem p;
    pb_problem_init_forces(&p, "leo-terms", "test", PB_UNITS_KM_S, E->mu, E->radius, f, r0, v0);
    return p;
}

static pb_forces rf_srp(int shadow)
{
    pb_forces f = rf_none();
    f.srp_area_mass_m2_kg = 0.02;
    f.cr = 1.3;
    f.shadow = shadow;
    f.has_epoch = 1;
    f.epoch_days = RF_EPOCH_DAYS;
    return f;
}

/* ---- the check ---- */

/* What one check measured: the reference with and without the term at the
 * end, GSL's run (tolerance RF_GSL_TOL) and its shadow bookkeeping. */
typedef struct rf_follow {
    rf_ref with;
    double gsl[6], ref_gsl, ref_gsl_check, gsl_err, effect;
    rf_gsl info;
} rf_follow;

/* The reference of `with` against GSL: GSL's own error (its run against one
 * 10x tighter) below agree, the reference within agree of GSL's run, and
 * the reference of `without` (the term taken away) over 100 times agree
 * away from `with`'s. Every build's floor below RF_FLOOR_MAX_KM. */
static void rf_check(const char *term, const pb_problem *with, const pb_problem *without,
                     double t_end, double agree, rf_follow *out)
{
    rf_ref *A = &out->with, B;
    rf_reference(with, t_end, A);
    rf_reference(without, t_end, &B);
    double check[6], ra[3], rb[3];
    rf_gsl_run(with, RF_GSL_TOL, t_end, out->gsl, &out->info);
    rf_gsl_run(with, RF_GSL_TOL_CHECK, t_end, check, NULL);
    rf_sample_pos(A, RF_NS - 1, ra);
    rf_sample_pos(&B, RF_NS - 1, rb);
    out->ref_gsl = rf_dist(ra, out->gsl);
    out->ref_gsl_check = rf_dist(ra, check);
    out->gsl_err = rf_dist(out->gsl, check);
    out->effect = rf_dist(ra, rb);
    cr_log_info("%s: |ref - gsl| %.3g (gsl 10x tighter %.3g), gsl's own error %.3g, "
                "term moves the reference %.4g (%.3g x agree), floors %.3g / %.3g, "
                "%d shadow crossings", term, out->ref_gsl, out->ref_gsl_check, out->gsl_err,
                out->effect, out->effect / agree, A->floor_max, B.floor_max,
                out->info.crossings);
    cr_assert_lt(out->gsl_err, agree, "%s: GSL's own error %g", term, out->gsl_err);
    cr_assert_lt(out->ref_gsl, agree, "%s: reference - GSL %g", term, out->ref_gsl);
    cr_assert_gt(out->effect, 100 * agree, "%s: the term moves the reference only %g", term,
                 out->effect);
    cr_assert_lt(A->floor_max, RF_FLOOR_MAX_KM, "%s: floor %g", term, A->floor_max);
    cr_assert_lt(B.floor_max, RF_FLOOR_MAX_KM, "%s: floor %g", term, B.floor_max);
}

/* The orbit passes through the shadow: by pb_shadow_fraction, the
 * reference's first and last samples are in sunlight and some between in
 * umbra; GSL's run stopped at `crossings` boundaries and saw the penumbra
 * exactly when the model has one. */
static void rf_expect_eclipse(const pb_problem *p, const rf_follow *o, int crossings)
{
    double s[3], r[3], nu_min = 1;
    for (int k = 0; k < RF_NS; k++) {
        rf_sample_pos(&o->with, k, r);
        pb_sun_position(p->forces.epoch_days + o->with.t[k] / 86400.0, s);
        double nu = pb_shadow_fraction(p->forces.shadow, p->body_radius, s, r);
        if (k == 0 || k == RF_NS - 1)
            cr_assert_eq(nu, 1.0, "sample %d at t = %g not in sunlight", k, o->with.t[k]);
        nu_min = fmin(nu_min, nu);
    }
    cr_assert_eq(nu_min, 0.0, "no sample in umbra");
    cr_assert_eq(o->info.crossings, crossings);
    cr_assert(o->info.seen[0] && o->info.seen[2]);
    cr_assert_eq(o->info.seen[1], p->forces.shadow == PB_SHADOW_CONICAL);
}

/* Zonal J2..J6 with pb_body_earth's EGM96 values: the degree-6 reference
 * against GSL, J6 taken away, then each lower degree n against n - 1
 * (two-body below J2), all over 100 times the agreement. */
Test(reference_forces, zonal_degree_6)
{
    pb_forces f = rf_none(), g;
    f.zonal_degree = 6;
    for (int n = 2; n <= 6; n++)
        f.jn[n] = pb_body_earth.jn[n];
    g = f;
    g.zonal_degree = 5;
    pb_problem p = rf_leo(&f), q = rf_leo(&g);
    rf_follow o;
    rf_check("zonal J2..J6 (J6 away)", &p, &q, p.period, RF_AGREE_KM, &o);
    rf_ref hi, lo;
    rf_reference(&q, p.period, &hi);
    for (int n = 5; n >= 2; n--) {
        g.zonal_degree = n - 1 >= 2 ? n - 1 : 0;
        q = rf_leo(&g);
        rf_reference(&q, p.period, &lo);
        double ra[3], rb[3];
        rf_sample_pos(&hi, RF_NS - 1, ra);
        rf_sample_pos(&lo, RF_NS - 1, rb);
        double d = rf_dist(ra, rb);
        cr_log_info("zonal: J%d moves the reference %.4g km", n, d);
        cr_assert_gt(d, 100 * RF_AGREE_KM, "J%d moves the reference only %g", n, d);
        hi = lo;
    }
}

/* Drag at 420 km, B = C_D A/m = 0.02 m^2/kg, the atmosphere turning with
 * the Earth (pb_body_earth's rate). */
Test(reference_forces, drag)
{
    pb_forces f = rf_none(), none = rf_none();
    f.drag = PB_DRAG_EXPONENTIAL;
    f.ballistic_m2_kg = 0.02;
    f.body_rate = pb_body_earth.rate;
    pb_problem p = rf_leo(&f), q = rf_leo(&none);
    rf_follow o;
    rf_check("drag", &p, &q, p.period, RF_AGREE_KM, &o);
}

Test(reference_forces, sun)
{
    pb_forces f = rf_none(), none = rf_none();
    f.sun = 1;
    f.has_epoch = 1;
    f.epoch_days = RF_EPOCH_DAYS;
    pb_problem p = rf_leo(&f), q = rf_leo(&none);
    rf_follow o;
    rf_check("Sun", &p, &q, p.period, RF_AGREE_KM, &o);
}

Test(reference_forces, moon)
{
    pb_forces f = rf_none(), none = rf_none();
    f.moon = 1;
    f.has_epoch = 1;
    f.epoch_days = RF_EPOCH_DAYS;
    pb_problem p = rf_leo(&f), q = rf_leo(&none);
    rf_follow o;
    rf_check("Moon", &p, &q, p.period, RF_AGREE_KM, &o);
}

/* A circular third body in normalized units (mu = 1, r = 1 circular): a
 * body of mu 1e-3 at radius 5 on its own Kepler rate, inclined 0.3 rad,
 * node 0.5 rad, starting 1 rad along; two periods. Agreement 3e-13 (lengths
 * of order 1; RF_AGREE_KM relative to the LEO's radius): measured
 * |ref - GSL| 6.2e-14, GSL's own error 6.3e-14. */
Test(reference_forces, circular_third_body)
{
    pb_forces f = rf_none(), none = rf_none();
    f.circular = 1;
    f.circ = (pb_circular_body){1e-3, 5.0, sqrt(1.001 / 125.0), 0.3, 0.5, 1.0};
    double r0[3] = {1, 0, 0}, v0[3] = {0, 1, 0};
    pb_problem p, q;
    pb_problem_init_forces(&p, "circ", "test", PB_UNITS_NORMALIZED, 1.0, 0.0, &f, r0, v0);
    pb_problem_init_forces(&q, "two-body", "test", PB_UNITS_NORMALIZED, 1.0, 0.0, &none, r0, v0);
    rf_follow o;
    rf_check("circular third body", &p, &q, 2 * p.period, 3e-13, &o);
}

/* Radiation pressure, A/m = 0.02 m^2/kg, C_R = 1.3, never shadowed. */
Test(reference_forces, srp_without_shadow)
{
    pb_forces f = rf_srp(PB_SHADOW_NONE), none = rf_none();
    pb_problem p = rf_leo(&f), q = rf_leo(&none);
    rf_follow o;
    rf_check("SRP, no shadow", &p, &q, p.period, RF_AGREE_KM, &o);
}

/* The cylindrical shadow is the term: the same radiation pressure never
 * shadowed is the reference without it. */
Test(reference_forces, srp_cylindrical_shadow)
{
    pb_forces f = rf_srp(PB_SHADOW_CYLINDRICAL), g = rf_srp(PB_SHADOW_NONE);
    pb_problem p = rf_leo(&f), q = rf_leo(&g);
    rf_follow o;
    rf_check("SRP, cylindrical shadow (shadow away)", &p, &q, p.period, RF_AGREE_KM, &o);
    rf_expect_eclipse(&p, &o, 2);
}

/* The conical shadow against no shadow. Then against the cylindrical one:
 * the penumbra alone (about 9 s at each end of the eclipse, where the
 * cylinder's wall lies inside it, so its effect cancels to first order)
 * moves the reference 6.2e-8 km, 31 times the agreement: asserted above 10
 * times, so the check tells the two shadow models apart. Item 4: the floor
 * of this one-orbit build across the four boundaries is below 1e-9 km. */
Test(reference_forces, srp_conical_shadow)
{
    pb_forces f = rf_srp(PB_SHADOW_CONICAL), g = rf_srp(PB_SHADOW_NONE);
    pb_problem p = rf_leo(&f), q = rf_leo(&g);
    rf_follow o;
    rf_check("SRP, conical shadow (shadow away)", &p, &q, p.period, RF_AGREE_KM, &o);
    rf_expect_eclipse(&p, &o, 4);
    for (int k = 0; k < RF_NS; k++)
        cr_log_info("SRP conical: floor at t = %.0f s: %.3g km", o.with.t[k], o.with.fl[k]);
    g = rf_srp(PB_SHADOW_CYLINDRICAL);
    q = rf_leo(&g);
    rf_ref cyl;
    rf_reference(&q, p.period, &cyl);
    double ra[3], rb[3];
    rf_sample_pos(&o.with, RF_NS - 1, ra);
    rf_sample_pos(&cyl, RF_NS - 1, rb);
    double d = rf_dist(ra, rb);
    cr_log_info("SRP: the penumbra moves the reference %.4g km", d);
    cr_assert_gt(d, 10 * RF_AGREE_KM, "the penumbra moves the reference only %g", d);
}

/* J2 LEO with two burns of our own choosing: +10 m/s along-track at 1500 s,
 * then 2 m/s radial and 3 m/s cross-track at 4000 s; GSL stops at each and
 * applies it in this file's own frame (rf_burn). Item 4: the floor across
 * the burns is below 1e-9 km (rf_check). */
Test(reference_forces, manoeuvres)
{
    pb_forces f = rf_none();
    f.zonal_degree = 2;
    f.jn[2] = pb_body_earth.jn[2];
    pb_forces g = f;
    f.n_manoeuvres = 2;
    f.manoeuvres[0] = (pb_manoeuvre){1500.0, {0, 0.010, 0}};
    f.manoeuvres[1] = (pb_manoeuvre){4000.0, {0.002, 0, 0.003}};
    pb_problem p = rf_leo(&f), q = rf_leo(&g);
    rf_follow o;
    rf_check("manoeuvres (burns away)", &p, &q, q.period, RF_AGREE_KM, &o);
    for (int k = 0; k < RF_NS; k++)
        cr_log_info("manoeuvres: floor at t = %.0f s: %.3g km", o.with.t[k], o.with.fl[k]);
}

static pb_forces rf_j2(void)
{
    pb_forces f = rf_none();
    f.zonal_degree = 2;
    f.jn[2] = pb_body_earth.jn[2];
    return f;
}

/* A test adds a term and the reference follows it: a J2 LEO, then the same
 * with the Moon added. The reference's final position moves by the vector
 * GSL's two runs move by, within 2 RF_AGREE_KM (each run carries up to
 * RF_AGREE_KM); the move is over 100 times that. */
Test(reference_forces, adding_the_moon_moves_the_reference_as_gsl_says)
{
    pb_forces f = rf_j2(), g = rf_j2();
    g.moon = 1;
    g.has_epoch = 1;
    g.epoch_days = RF_EPOCH_DAYS;
    pb_problem p = rf_leo(&f), q = rf_leo(&g);
    rf_ref A, B;
    rf_reference(&p, p.period, &A);
    rf_reference(&q, p.period, &B);
    double ya[6], yb[6], ra[3], rb[3], dref[3], dgsl[3];
    rf_gsl_run(&p, RF_GSL_TOL, p.period, ya, NULL);
    rf_gsl_run(&q, RF_GSL_TOL, p.period, yb, NULL);
    rf_sample_pos(&A, RF_NS - 1, ra);
    rf_sample_pos(&B, RF_NS - 1, rb);
    for (int i = 0; i < 3; i++) {
        dref[i] = rb[i] - ra[i];
        dgsl[i] = yb[i] - ya[i];
    }
    double miss = rf_dist(dref, dgsl), move = rf_norm(dref);
    cr_log_info("adding the Moon moves the reference (%.9f, %.9f, %.9f) km, GSL (%.9f, "
                "%.9f, %.9f) km: they differ by %.3g km", dref[0], dref[1], dref[2],
                dgsl[0], dgsl[1], dgsl[2], miss);
    cr_assert_lt(miss, 2 * RF_AGREE_KM, "the move differs from GSL's by %g km", miss);
    cr_assert_gt(move, 200 * RF_AGREE_KM, "the Moon moves the reference only %g km", move);
}

/* The same force as the force layer's, under a function it does not know:
 * nothing can say it has a __float128 form, so it is refused. */
static int rf_unknown_accel(const pb_problem *p, double t, const double *r, const double *v,
                            double *a)
{
    return pb_forces_accel(p, t, r, v, a);
}

/* A force the reference does not know is refused by the reference, by the
 * truth, and by the harness's check with a message; the same problem with
 * the force layer's own function passes each (so the refusal is the
 * function's). */
Test(reference_forces, unknown_accel_is_refused)
{
    pb_forces f = rf_j2();
    pb_problem known = rf_leo(&f), p = known;
    p.accel = rf_unknown_accel;
    double t[1] = {600.0};
    long double r[3], v[3];
    long steps = -1;
    cr_assert_eq(pb_reference_propagate(&p, t, 1, 1e-24L, r, v, &steps), PB_EINVAL);
    cr_assert_eq(pb_reference_propagate(&known, t, 1, 1e-24L, r, v, &steps), PB_OK);
    pb_truth *tr = NULL;
    cr_assert_eq(pb_truth_build(&p, t, 1, NULL, &tr), PB_EINVAL);
    cr_assert_null(tr);
    cr_assert_eq(pb_truth_build(&known, t, 1, NULL, &tr), PB_OK);
    pb_truth_free(tr);
    pb_case_spec spec;
    pb_case_spec_default(&spec);
    spec.problem = p;
    spec.method = pb_method_find("rk4");
    spec.steps_per_orbit = 100;
    spec.orbits = 1;
    spec.cache_dir = NULL;
    cr_assert_not_null(spec.method);
    char err[512] = "";
    cr_assert_eq(pb_case_validate(&spec, err, sizeof err), -1);
    cr_assert_not_null(strstr(err, "no extended-precision form"), "message: %s", err);
    spec.problem = known;
    err[0] = 0;
    cr_assert_eq(pb_case_validate(&spec, err, sizeof err), 0, "message: %s", err);
}

/* The cache cannot tell two force functions apart (its key holds the force
 * terms, not the function): a cached reference of the known force must not
 * be handed out for an unknown one. */
Test(reference_forces, unknown_accel_is_refused_even_with_a_cached_reference)
{
    pb_forces f = rf_j2();
    pb_problem known = rf_leo(&f), p = known;
    p.accel = rf_unknown_accel;
    char dir[4096];
    pbt_tmpdir(dir, sizeof dir);
    cr_assert(dir[0]);
    double t[1] = {600.0}, floor[1];
    long double r[3], v[3];
    cr_assert_eq(pb_reference_build(&known, t, 1, dir, r, v, floor), PB_OK);
    cr_assert_eq(pb_reference_build(&p, t, 1, dir, r, v, floor), PB_EINVAL);
    pb_truth *tr = NULL;
    cr_assert_eq(pb_truth_build(&p, t, 1, dir, &tr), PB_EINVAL);
    cr_assert_null(tr);
}
