/* elements.c - classical orbital elements <-> Cartesian state for any conic.
 * Source: Vallado 4th ed. Algorithms 9 (RV2COE) and 10 (COE2RV), with angles
 * from atan2 of projections on in-plane axes, so no quadrant ambiguity.
 *
 * Convention for undefined angles (so no NaN ever comes out):
 * - circular (e < PB_EL_SMALL): argp = 0 and nu is the argument of latitude,
 *   measured from the ascending node in the direction of motion;
 * - equatorial (sin i < PB_EL_SMALL, i = 0 or 180 deg): raan = 0, the node is
 *   taken on +x and argp is measured from +x in the direction of motion;
 * - circular and equatorial: raan = argp = 0 and nu is the true longitude
 *   (from +x in the direction of motion; for i = 180 deg that is clockwise
 *   seen from +z).
 * Input: for e != 1 the conic size is a (a > 0 ellipse, a < 0 hyperbola) or,
 * when a == 0, p; a parabola (e == 1) is given by p only. */
#include <math.h>
#include "twobody.h"

#define PB_EL_SMALL 1e-11

static double el_dot(const double *a, const double *b)
{
    return a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
}

static void el_cross(const double *a, const double *b, double *c)
{
    c[0] = a[1] * b[2] - a[2] * b[1];
    c[1] = a[2] * b[0] - a[0] * b[2];
    c[2] = a[0] * b[1] - a[1] * b[0];
}

static double el_wrap(double x)
{
    double y = fmod(x, 2 * M_PI);
    if (y < 0)
        y += 2 * M_PI;
    return y >= 2 * M_PI ? 0.0 : y;
}

/* Contract: elements of (r, v) about mu with the conventions above; a is
 * +inf for an exact parabola. PB_EINVAL for r = 0, h = 0, mu <= 0 or
 * non-finite input; el untouched then. */
int pb_elements_from_state(double mu, const double *r, const double *v, pb_elements *el)
{
    double h[3], rn = sqrt(el_dot(r, r)), v2 = el_dot(v, v);
    el_cross(r, v, h);
    double hn = sqrt(el_dot(h, h));
    if (!(mu > 0) || !(rn > 0) || !(hn > 0) || !isfinite(rn) || !isfinite(v2) || !isfinite(hn))
        return PB_EINVAL;
    double hh[3] = {h[0] / hn, h[1] / hn, h[2] / hn};
    double ev[3], rv = el_dot(r, v), c1 = v2 - mu / rn;
    for (int k = 0; k < 3; k++)
        ev[k] = (c1 * r[k] - rv * v[k]) / mu;
    double e = sqrt(el_dot(ev, ev));
    double nxy = hypot(hh[0], hh[1]);          /* sin i; |k x h_hat| */

    pb_elements out;
    out.e = e;
    out.p = hn * hn / mu;
    /* a from p and e rather than from 2/r - v^2/mu: near e = 1 the latter
     * cancels (by ~2/(1-e) at periapsis), while e itself is well conditioned. */
    out.a = e != 1 ? out.p / ((1 - e) * (1 + e)) : HUGE_VAL;
    out.i = atan2(nxy, hh[2]);
    /* node unit vector, or +x by convention for an equatorial orbit */
    double nh[3] = {1, 0, 0};
    if (nxy >= PB_EL_SMALL) {
        nh[0] = -hh[1] / nxy;
        nh[1] = hh[0] / nxy;
        out.raan = el_wrap(atan2(nh[1], nh[0]));
    } else {
        out.raan = 0;
    }
    double q[3], pa[3];    /* in-plane axes: pa (reference), q = h x pa */
    if (e >= PB_EL_SMALL) {
        double eh[3] = {ev[0] / e, ev[1] / e, ev[2] / e};
        el_cross(hh, nh, q);
        out.argp = el_wrap(atan2(el_dot(eh, q), el_dot(eh, nh)));
        for (int k = 0; k < 3; k++)
            pa[k] = eh[k];
    } else {
        out.argp = 0;
        for (int k = 0; k < 3; k++)
            pa[k] = nh[k];
    }
    el_cross(hh, pa, q);
    out.nu = el_wrap(atan2(el_dot(r, q), el_dot(r, pa)));
    *el = out;
    return PB_OK;
}

/* Contract: state of the conic el about mu. PB_EINVAL for e < 0, non-finite
 * elements, a <= 0 with e < 1, a >= 0 with e > 1 (when a is given), a
 * parabola without p > 0, or a hyperbolic nu beyond the asymptotes. */
int pb_state_from_elements(double mu, const pb_elements *el, double *r, double *v)
{
    double e = el->e;
    if (!(mu > 0) || !(e >= 0) || !isfinite(e) || !isfinite(el->i) || !isfinite(el->raan) ||
        !isfinite(el->argp) || !isfinite(el->nu))
        return PB_EINVAL;
    double p;
    if (e == 1) {
        p = el->p;
    } else if (el->a != 0) {
        if (!isfinite(el->a) || (e < 1 && el->a < 0) || (e > 1 && el->a > 0))
            return PB_EINVAL;
        p = el->a * (1 - e) * (1 + e);
    } else {
        p = el->p;
    }
    if (!(p > 0) || !isfinite(p))
        return PB_EINVAL;
    double cn = cos(el->nu), sn = sin(el->nu), den = 1 + e * cn;
    if (!(den > 0))
        return PB_EINVAL;
    double rn = p / den, s = sqrt(mu / p);
    double rp[2] = {rn * cn, rn * sn}, vp[2] = {-s * sn, s * (e + cn)};
    double cO = cos(el->raan), sO = sin(el->raan), ci = cos(el->i), si = sin(el->i);
    double cw = cos(el->argp), sw = sin(el->argp);
    /* columns of R3(-raan) R1(-i) R3(-argp): perifocal P and Q axes */
    double P[3] = {cO * cw - sO * sw * ci, sO * cw + cO * sw * ci, sw * si};
    double Q[3] = {-cO * sw - sO * cw * ci, -sO * sw + cO * cw * ci, cw * si};
    for (int k = 0; k < 3; k++) {
        r[k] = P[k] * rp[0] + Q[k] * rp[1];
        v[k] = P[k] * vp[0] + Q[k] * vp[1];
    }
    return PB_OK;
}
