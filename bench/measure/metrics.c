/* metrics.c - pointwise error metrics against truth (see metrics.h).
 * Differences are taken in long double against a long double truth so that
 * errors far below 1e-13 are not swamped by the truth's own rounding. */
#include <math.h>
#include "bench/measure/metrics.h"
#include "problems/force_terms.h"
#include "problems/twobody.h"

static void cross3(const double *a, const double *b, double *c)
{
    c[0] = a[1] * b[2] - a[2] * b[1];
    c[1] = a[2] * b[0] - a[0] * b[2];
    c[2] = a[0] * b[1] - a[1] * b[0];
}

static double dot3(const double *a, const double *b)
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

static double norm3(const double *a) { return sqrt(dot3(a, a)); }

double pb_energy_scale(const pb_problem *p, double E0)
{
    double r2 = 0, v2 = 0;
    for (int i = 0; i < p->dim; i++) {
        r2 += p->r0[i] * p->r0[i];
        v2 += p->v0[i] * p->v0[i];
    }
    double parts = 0.5 * v2 + (r2 > 0 ? p->mu / sqrt(r2) : 0);
    if (fabs(E0) >= 1e-6 * parts || !(parts > 0))
        return E0 != 0 ? fabs(E0) : 1.0;
    return parts;
}

double pb_angmom_scale(const pb_problem *p, double H0)
{
    if (p->angmom != pb_forces_hz)
        return fabs(H0);
    double h[3];
    pb_twobody_angmom_vec(p->r0, p->v0, h);
    double hn = sqrt(dot3(h, h));
    /* a (nearly) polar orbit's h_z is round-off: relative to |h| instead */
    return fabs(H0) < 1e-3 * hn ? hn : fabs(H0);
}

double pb_rel_err(double x, double x0)
{
    return x0 != 0 ? fabs(x - x0) / fabs(x0) : fabs(x - x0);
}

double pb_angle_about(const double *e0, const double *e1, const double *n)
{
    double c[3];
    cross3(e0, e1, c);
    double nn = norm3(n);
    return atan2(dot3(c, n) / nn, dot3(e0, e1));
}

void pb_metrics_sample(const pb_problem *p, double t, const double *r, const double *v,
                       const long double *rt, const long double *vt,
                       double E0, double E_scale, double H0, pb_sample *s)
{
    double r3[3] = {0}, v3[3] = {0}, rt3[3] = {0}, vt3[3] = {0};
    long double dr[3] = {0}, dv[3] = {0};
    for (int i = 0; i < p->dim && i < 3; i++) {
        r3[i] = r[i];
        v3[i] = v[i];
        rt3[i] = (double)rt[i];
        vt3[i] = (double)vt[i];
        dr[i] = (long double)r[i] - rt[i];
        dv[i] = (long double)v[i] - vt[i];
    }
    s->t = t;
    /* a force that changes the invariants itself (drag, third bodies, ...):
     * the error is against the truth's own value at t, not the start's */
    if (p->invariants_from_truth) {
        if (p->energy)
            E0 = p->energy(p, t, rt3, vt3);
        if (p->angmom)
            H0 = p->angmom(p, rt3, vt3);
    }
    s->energy_rel = p->energy ? fabs(p->energy(p, t, r, v) - E0) / E_scale : (double)NAN;
    double hs = p->angmom ? pb_angmom_scale(p, H0) : 0;
    s->angmom_rel = !p->angmom ? (double)NAN
                  : hs > 0 ? fabs(p->angmom(p, r, v) - H0) / hs : fabs(p->angmom(p, r, v) - H0);
    double d3[3] = {(double)dr[0], (double)dr[1], (double)dr[2]};
    s->pos_err = (double)sqrtl(dr[0] * dr[0] + dr[1] * dr[1] + dr[2] * dr[2]);
    s->vel_err = (double)sqrtl(dv[0] * dv[0] + dv[1] * dv[1] + dv[2] * dv[2]);
    double R[3], I[3], C[3];
    pb_ric_frame(rt3, vt3, R, I, C);
    s->radial = dot3(d3, R);
    s->along = dot3(d3, I);
    s->cross = dot3(d3, C);
    s->ecc_drift = NAN;
    s->apsis_angle = NAN;
    if (p->keplerian) {
        double en[3], et[3], h[3];
        pb_twobody_eccvec(p->mu, r3, v3, en);
        pb_twobody_eccvec(p->mu, rt3, vt3, et);
        double de[3] = {en[0] - et[0], en[1] - et[1], en[2] - et[2]};
        s->ecc_drift = norm3(de);
        cross3(rt3, vt3, h);
        /* the apsidal angle is undefined for a (nearly) circular orbit */
        if (norm3(et) > 1e-6)
            s->apsis_angle = pb_angle_about(et, en, h);
    }
}
