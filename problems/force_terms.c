/* force_terms.c - the force terms of forces.h in double precision (the
 * methods' force), their composition into a problem, and the conservative
 * part of the energy that the metrics track. The terms themselves are in
 * force_terms_impl.h, shared with the reference's __float128 copy. */
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "forces.h"
#include "force_terms.h"
#include "hash.h"
#include "cr3bp.h"

#define FT_REAL double
#define FT_SUF _d
#define FT_SQRT sqrt
#define FT_EXP exp
#define FT_SIN sin
#define FT_COS cos
#define FT_ASIN asin
#define FT_ACOS acos
#define FT_FABS fabs
#define FT_PI M_PI
#include "force_terms_impl.h"

int pb_forces_accel(const pb_problem *p, double t, const double *r, const double *v, double *a)
{
    ft_accel_d(p, t, r, v, FT_REGION_GEOMETRY, -1, a);
    return isfinite(a[0]) && isfinite(a[1]) && isfinite(a[2]) ? PB_OK : PB_ENONFINITE;
}

int pb_cr3bp_accel(const pb_problem *p, double t, const double *r, const double *v, double *a)
{
    (void)t;
    ft_cr3bp_d(p, r, v, a);
    return PB_OK;
}

/* v^2/2 - mu/r - gamma/r^2 + V_zonal: the energy of the conservative terms
 * (all of it when nothing dissipative or time-dependent is present). */
double pb_forces_energy(const pb_problem *p, double t, const double *r, const double *v)
{
    (void)t;
    double r2 = ft_dot_d(r, r), rn = sqrt(r2), e = 0.5 * ft_dot_d(v, v) - p->mu / rn;
    e -= p->forces.inverse_cube_gamma / r2;
    if (p->forces.zonal_degree >= 2) {
        double a[3] = {0, 0, 0}, V = 0;
        ft_zonal_d(p, r, rn, a, &V);
        e += V;
    }
    return e;
}

double pb_forces_hz(const pb_problem *p, const double *r, const double *v)
{
    (void)p;
    return r[0] * v[1] - r[1] * v[0];
}

double pb_forces_h(const pb_problem *p, const double *r, const double *v)
{
    (void)p;
    double h[3] = {r[1] * v[2] - r[2] * v[1], r[2] * v[0] - r[0] * v[2], r[0] * v[1] - r[1] * v[0]};
    return sqrt(ft_dot_d(h, h));
}

int pb_forces_dissipative(const pb_forces *f)
{
    return f->drag || f->sun || f->moon || f->circular || f->srp_area_mass_m2_kg > 0 ||
           f->n_manoeuvres > 0;
}

int pb_forces_velocity_dependent(const pb_forces *f) { return f->drag != PB_DRAG_NONE; }

int pb_forces_any(const pb_forces *f)
{
    return f->zonal_degree >= 2 || f->inverse_cube_gamma != 0 || pb_forces_dissipative(f);
}

void pb_forces_describe(const pb_forces *f, char *buf, unsigned len)
{
    static const char *const shadow[] = {"no shadow", "cylindrical shadow", "conical shadow"};
    size_t n = 0;
    buf[0] = 0;
#define FT_ADD(...) \
    do { if (n < len) n += (size_t)snprintf(buf + n, len - n, __VA_ARGS__); } while (0)
    FT_ADD("two-body");
    if (f->zonal_degree == 2)
        FT_ADD(" + J2");
    else if (f->zonal_degree > 2)
        FT_ADD(" + J2..J%d", f->zonal_degree);
    if (f->inverse_cube_gamma != 0)
        FT_ADD(" + gamma/r^2 potential");
    if (f->drag)
        FT_ADD(" + drag (exponential atmosphere, B = %g m^2/kg)", f->ballistic_m2_kg);
    if (f->sun && f->moon)
        FT_ADD(" + Sun, Moon");
    else if (f->sun || f->moon)
        FT_ADD(" + %s", f->sun ? "Sun" : "Moon");
    if (f->circular)
        FT_ADD(" + circular third body");
    if (f->srp_area_mass_m2_kg > 0)
        FT_ADD(" + SRP (%s)", shadow[f->shadow]);
    if (f->n_manoeuvres > 0)
        FT_ADD(" + %d manoeuvre%s", f->n_manoeuvres, f->n_manoeuvres == 1 ? "" : "s");
#undef FT_ADD
}

void pb_sun_position(double days, double *s) { ft_sun_d(days, s); }

void pb_moon_position(double days, double *s) { ft_moon_d(days, s); }

int pb_forces_shadow_g(const pb_problem *p, double t, const double *r, double *g)
{
    const pb_forces *f = &p->forces;
    if (!(f->srp_area_mass_m2_kg > 0) || f->shadow == PB_SHADOW_NONE)
        return 0;
    double sun[3], nu;
    ft_sun_d(f->epoch_days + t / 86400.0, sun);
    return ft_shadow_d(f->shadow, p->body_radius, sun, r, FT_REGION_GEOMETRY, g, &nu);
}

double pb_shadow_fraction(int model, double R, const double *s, const double *r)
{
    double g[2], nu = 1;
    ft_shadow_d(model, R, s, r, FT_REGION_GEOMETRY, g, &nu);
    return nu;
}

void pb_problem_init_forces(pb_problem *p, const char *name, const char *description,
                            pb_units units, double mu, double radius, const pb_forces *f,
                            const double *r0, const double *v0)
{
    pb_problem_init_twobody(p, name, description, units, mu, r0, v0);
    p->body_radius = radius;
    if (!pb_forces_any(f))
        return;
    p->forces = *f;
    int zonal_only = f->zonal_degree >= 2 && !pb_forces_dissipative(f) && f->inverse_cube_gamma == 0;
    p->force = zonal_only && f->zonal_degree == 2 ? PB_FORCE_J2 : PB_FORCE_PERTURBED;
    p->velocity_dependent = pb_forces_velocity_dependent(f);
    p->invariants_from_truth = pb_forces_dissipative(f);
    p->accel = pb_forces_accel;
    p->energy = pb_forces_energy;
    /* zonal terms keep only the polar component of h; central ones all of it */
    p->angmom = f->zonal_degree >= 2 ? pb_forces_hz : pb_forces_h;
    p->energy_label = "energy";
    p->angmom_label = f->zonal_degree >= 2 ? "h_z" : "|h|";
    p->keplerian = 1;
    p->exact = NULL;
    p->exact_q = NULL;
}

/* Every field of the force terms, one by one: a struct's padding bytes are
 * indeterminate and must not enter the key. */
uint64_t pb_forces_hash(uint64_t h, const pb_forces *f)
{
    const pb_circular_body *c = &f->circ;
    int ints[] = {f->zonal_degree, f->drag, f->sun, f->moon, f->circular, f->has_epoch,
                  f->shadow, f->n_manoeuvres};
    double nums[] = {f->inverse_cube_gamma, f->ballistic_m2_kg, f->body_rate, c->mu, c->radius,
                     c->rate, c->i, c->raan, c->u0, f->epoch_days, f->srp_area_mass_m2_kg, f->cr};
    h = pb_fnv1a64(h, ints, sizeof ints);
    h = pb_fnv1a64(h, nums, sizeof nums);
    h = pb_fnv1a64(h, f->jn, sizeof f->jn);
    for (int k = 0; k < f->n_manoeuvres && k < PB_MANOEUVRES_MAX; k++) {
        h = pb_fnv1a64(h, &f->manoeuvres[k].t, sizeof f->manoeuvres[k].t);
        h = pb_fnv1a64(h, f->manoeuvres[k].dv, sizeof f->manoeuvres[k].dv);
    }
    return h;
}

