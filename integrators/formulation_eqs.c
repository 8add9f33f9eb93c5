/* formulation_eqs.c - the regularised equations: the Sundman transformation
 * dt = c r^n ds with q = (x, t), and the Kustaanheimo-Stiefel one with
 * q = (u1..u4, t, tau), q' = (u', t', h), dt = r ds (Kustaanheimo & Stiefel
 * 1965; Stiefel & Scheifele 1971, "Linear and Regular Celestial Mechanics",
 * Ch. II and IV: u'' + (h/2) u = (r/2) L(u)^T P, h' = -2 u'.L(u)^T P). */
#include <math.h>
#include <string.h>
#include "integrators/formulation.h"

/* The KS matrix L(u) times y (4-vectors). x = L(u) u is the position with a
 * zero 4th component; L^T L = L L^T = |u|^2 I. */
static void ks_L(const double *u, const double *y, double *o)
{
    o[0] = u[0] * y[0] - u[1] * y[1] - u[2] * y[2] + u[3] * y[3];
    o[1] = u[1] * y[0] + u[0] * y[1] - u[3] * y[2] - u[2] * y[3];
    o[2] = u[2] * y[0] + u[3] * y[1] + u[0] * y[2] + u[1] * y[3];
    o[3] = u[3] * y[0] - u[2] * y[1] + u[1] * y[2] - u[0] * y[3];
}

static void ks_LT(const double *u, const double *y, double *o)
{
    o[0] = u[0] * y[0] + u[1] * y[1] + u[2] * y[2] + u[3] * y[3];
    o[1] = -u[1] * y[0] + u[0] * y[1] + u[3] * y[2] - u[2] * y[3];
    o[2] = -u[2] * y[0] - u[3] * y[1] + u[0] * y[2] + u[1] * y[3];
    o[3] = u[3] * y[0] - u[2] * y[1] + u[1] * y[2] - u[0] * y[3];
}

static double form_norm(const double *x, int n)
{
    double s = 0;
    for (int i = 0; i < n; i++)
        s += x[i] * x[i];
    return sqrt(s);
}

int pb_formulation_qdim(pb_formulation form, int dim)
{
    return form == PB_FORMULATION_KS ? 6 : form == PB_FORMULATION_SUNDMAN ? dim + 1 : dim;
}

/* u from x with the fourth component zero: of the two branches
 * (Stiefel & Scheifele's u4 = 0 for x1 >= 0, u3 = 0 otherwise) the one that
 * never divides by a small number. */
static void ks_from_x(const double *x, double r, double *u)
{
    if (x[0] >= 0) {
        u[0] = sqrt(0.5 * (r + x[0]));
        u[1] = x[1] / (2 * u[0]);
        u[2] = x[2] / (2 * u[0]);
        u[3] = 0;
    } else {
        u[1] = sqrt(0.5 * (r - x[0]));
        u[0] = x[1] / (2 * u[1]);
        u[3] = x[2] / (2 * u[1]);
        u[2] = 0;
    }
}

int pb_form_to_reg(const pb_form_eqs *e, double t, const double *x, const double *v, double *q,
                   double *qp)
{
    int d = e->dim;
    double r = form_norm(x, d);
    if (!(r > 0) || !isfinite(r))
        return PB_EINVAL;
    if (e->form == PB_FORMULATION_SUNDMAN) {
        double g = e->c * pow(r, e->n);
        for (int i = 0; i < d; i++) {
            q[i] = x[i];
            qp[i] = g * v[i];
        }
        q[d] = t;
        qp[d] = g;
        return PB_OK;
    }
    double x4[4] = {0}, v4[4] = {0}, v2 = 0;
    for (int i = 0; i < d; i++) {
        x4[i] = x[i];
        v4[i] = v[i];
        v2 += v[i] * v[i];
    }
    ks_from_x(x4, r, q);
    ks_LT(q, v4, qp);
    for (int i = 0; i < 4; i++)
        qp[i] *= 0.5;             /* u' = L(u)^T v / 2 */
    q[4] = t;
    q[5] = 0;                     /* tau: its velocity slot carries h */
    qp[4] = r;                    /* t' = r */
    qp[5] = e->mu / r - 0.5 * v2; /* h, the Kepler binding energy */
    return PB_OK;
}

void pb_form_to_phys(const pb_form_eqs *e, const double *q, const double *qp, double *t, double *x,
                     double *v)
{
    int d = e->dim;
    if (e->form == PB_FORMULATION_SUNDMAN) {
        double g = e->c * pow(form_norm(q, d), e->n);
        for (int i = 0; i < d; i++) {
            x[i] = q[i];
            v[i] = qp[i] / g;
        }
        *t = q[d];
        return;
    }
    double x4[4], w4[4], r = q[0] * q[0] + q[1] * q[1] + q[2] * q[2] + q[3] * q[3];
    ks_L(q, q, x4);
    ks_L(q, qp, w4);
    for (int i = 0; i < d; i++) {
        x[i] = x4[i];
        v[i] = 2 * w4[i] / r;     /* v = 2 L(u) u' / r */
    }
    *t = q[4];
}

/* x'' = g (g_t v + g a) and t'' = g g_t, with g = c r^n, g_t = dg/dt =
 * c n r^(n-1) rdot, v = x'/g: the derivative of x' = g v along s. */
static int sundman_accel(const pb_form_eqs *e, const double *q, const double *qp, double *qpp)
{
    int d = e->dim, s;
    double r = form_norm(q, d), g = e->c * pow(r, e->n), v[3], a[3], xv = 0;
    for (int i = 0; i < d; i++) {
        v[i] = qp[i] / g;
        xv += q[i] * v[i];
    }
    if ((s = e->phys.accel(e->phys.ctx, q[d], q, v, a)))
        return s;
    double gt = e->c * e->n * pow(r, e->n - 2) * xv;  /* c n r^(n-1) (x.v / r) */
    for (int i = 0; i < d; i++)
        qpp[i] = g * (gt * v[i] + g * a[i]);
    qpp[d] = g * gt;
    return PB_OK;
}

/* Stiefel & Scheifele's KS equations with the perturbation P = a + mu x/r^3
 * (the whole force less its Kepler term) at the physical (t, x, v). */
static int ks_accel(const pb_form_eqs *e, const double *q, const double *qp, double *qpp)
{
    int d = e->dim, s;
    double x4[4], w4[4], P4[4] = {0}, LP[4], a[3];
    double r = q[0] * q[0] + q[1] * q[1] + q[2] * q[2] + q[3] * q[3], h = qp[5];
    ks_L(q, q, x4);
    ks_L(q, qp, w4);
    double v[3];
    for (int i = 0; i < d; i++)
        v[i] = 2 * w4[i] / r;
    if ((s = e->phys.accel(e->phys.ctx, q[4], x4, v, a)))
        return s;
    double k = e->mu / (r * r * r);
    for (int i = 0; i < d; i++)
        P4[i] = a[i] + k * x4[i];
    ks_LT(q, P4, LP);
    double uu = 0, hp = 0;
    for (int i = 0; i < 4; i++) {
        qpp[i] = -0.5 * h * q[i] + 0.5 * r * LP[i];
        uu += q[i] * qp[i];
        hp += qp[i] * LP[i];
    }
    qpp[4] = 2 * uu;      /* t'' = (|u|^2)' */
    qpp[5] = -2 * hp;     /* h' = -2 u'.L^T P: the perturbation's power times r */
    return PB_OK;
}

int pb_form_accel(void *ctx, double s, const double *q, const double *qp, double *qpp)
{
    const pb_form_eqs *e = ctx;
    (void)s;  /* autonomous in s: physical time is a state component */
    return e->form == PB_FORMULATION_KS ? ks_accel(e, q, qp, qpp) : sundman_accel(e, q, qp, qpp);
}

/* Semi-major axis and eccentricity of the osculating Kepler orbit. */
static void form_elements(double mu, const double *x, const double *v, int d, double *a, double *ecc)
{
    double r = form_norm(x, d), v2 = 0, xv = 0, ev[3];
    for (int i = 0; i < d; i++) {
        v2 += v[i] * v[i];
        xv += x[i] * v[i];
    }
    *a = 1.0 / (2.0 / r - v2 / mu);
    for (int i = 0; i < d; i++)
        ev[i] = ((v2 - mu / r) * x[i] - xv * v[i]) / mu;
    *ecc = form_norm(ev, d);
}

#define FORM_TRAPEZOID_POINTS 4096

double pb_form_sundman_c(double mu, const double *x, const double *v, int dim, double n)
{
    double a, ecc;
    form_elements(mu, x, v, dim, &a, &ecc);
    /* dt = r dE / (a nm) with nm = sqrt(mu/a^3) (Kepler's equation), so
     * int r^-n dt = a^(1-n) / (a nm) int_0^2pi (1 - e cos E)^(1-n) dE */
    double sum = 0;
    for (int k = 0; k < FORM_TRAPEZOID_POINTS; k++)
        sum += pow(1 - ecc * cos(2 * M_PI * k / FORM_TRAPEZOID_POINTS), 1 - n);
    double integral = 2 * M_PI * sum / FORM_TRAPEZOID_POINTS;
    double nm = sqrt(mu / (a * a * a));
    return pow(a, 1 - n) / (a * nm) * integral / (2 * M_PI);
}

int pb_form_orbit(const pb_form_eqs *e, const double *x, const double *v, double *T, double *S)
{
    double a, ecc;
    form_elements(e->mu, x, v, e->dim, &a, &ecc);
    if (!(a > 0) || !isfinite(a) || !(ecc < 1))
        return PB_EINVAL;
    *T = 2 * M_PI * sqrt(a * a * a / e->mu);
    /* Sundman's c makes an orbit 2 pi long; KS's dt = r ds makes it T/a */
    *S = e->form == PB_FORMULATION_KS ? *T / a : 2 * M_PI;
    return PB_OK;
}
