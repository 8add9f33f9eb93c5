/* reference_dip.c - a suspected double crossing of a shadow boundary inside
 * one step of the reference (reference_dip.h). The sign test at a step's
 * ends misses an eclipse that begins and ends inside the step: a GEO step of
 * an hour spans a whole eclipse near the edges of the eclipse season, and
 * any step may span a grazing one. Each shadow function g is modelled over
 * the step by the cubic Hermite interpolant of its values and rates at both
 * ends (the rates by central differences along the velocity, the Sun at
 * its own time); the interpolant differs from g by at most
 * max|g''''| H^4 / 384 (Hairer, Norsett & Wanner, Solving ODEs I, Sec.
 * II.6, the Hermite remainder), and g's fourth derivative is of order
 * |g'| w^3 with w the orbital angular rate |v|/|r|, so an interior minimum
 * of the interpolant within four times that of zero marks the step as
 * suspect. */
#include <quadmath.h>
#include "problems/reference_dip.h"
#include "problems/force_terms.h"

typedef __float128 dip_real;

/* The boundary functions at t + dt of the state moved by dt along its
 * velocity (dt of a thousandth of the step: the acceleration's part cancels
 * in a central difference). */
static void dip_g(const pb_problem *p, int band, dip_real t, const dip_real *y, dip_real dt, dip_real *g)
{
    dip_real r[3] = {y[0] + dt * y[3], y[1] + dt * y[4], y[2] + dt * y[5]};
    int ns;
    pb_forces_events_q(p, t + dt, r, band, g, &ns);
}

static void dip_end(const pb_problem *p, int band, dip_real t, const dip_real *y, dip_real dt,
                    dip_real *g, dip_real *rate)
{
    dip_real gp[4], gm[4];
    dip_g(p, band, t, y, 0, g);
    dip_g(p, band, t, y, dt, gp);
    dip_g(p, band, t, y, -dt, gm);
    for (int j = 0; j < 4; j++)
        rate[j] = (gp[j] - gm[j]) / (2 * dt);
}

/* The interior critical points of p(x) = a0 + d0 x + c2 x^2 + c3 x^3 on
 * (0.05, 0.95) where p falls below margin: the first of them, or 0. */
static dip_real dip_cubic(dip_real a0, dip_real d0, dip_real a1, dip_real d1, dip_real margin)
{
    dip_real c2 = 3 * (a1 - a0) - 2 * d0 - d1, c3 = 2 * (a0 - a1) + d0 + d1;
    dip_real x[2];
    int n = 0;
    /* p'(x) = d0 + 2 c2 x + 3 c3 x^2 */
    if (fabsq(c3) < 1e-30Q * (fabsq(c2) + fabsq(d0))) {
        if (c2 != 0)
            x[n++] = -d0 / (2 * c2);
    } else {
        dip_real disc = c2 * c2 - 3 * c3 * d0;
        if (disc >= 0) {
            dip_real sq = sqrtq(disc);
            x[n++] = (-c2 - sq) / (3 * c3);
            x[n++] = (-c2 + sq) / (3 * c3);
        }
    }
    dip_real best = 0;
    for (int k = 0; k < n; k++) {
        dip_real xk = x[k];
        if (!(xk > 0.05Q && xk < 0.95Q))
            continue;
        dip_real v = a0 + xk * (d0 + xk * (c2 + xk * c3));
        if (v < margin && (best == 0 || xk < best))
            best = xk;
    }
    return best;
}

__float128 pb_ref_shadow_dip(const pb_problem *p, int band, int nshadow, __float128 t0,
                             const __float128 *y0, __float128 H, const __float128 *y1)
{
    if (nshadow <= 0 || !(H > 0))
        return 0;
    dip_real g0[4], g1[4], r0[4], r1[4], dt = 1e-3Q * H;
    dip_end(p, band, t0, y0, dt, g0, r0);
    dip_end(p, band, t0 + H, y1, dt, g1, r1);
    dip_real rn = sqrtq(y0[0] * y0[0] + y0[1] * y0[1] + y0[2] * y0[2]);
    dip_real vn = sqrtq(y0[3] * y0[3] + y0[4] * y0[4] + y0[5] * y0[5]);
    dip_real wH = rn > 0 ? vn / rn * H : 0, rel = wH * wH * wH / 96;
    if (rel < 1e-9Q)
        rel = 1e-9Q;
    dip_real cut = 0;
    for (int j = 0; j < nshadow; j++) {
        if ((g0[j] > 0) != (g1[j] > 0))
            continue;  /* a crossing the caller's sign test sees */
        dip_real s = g1[j] > 0 ? 1 : -1;
        dip_real d0 = s * r0[j] * H, d1 = s * r1[j] * H;
        dip_real margin = fmaxq(fabsq(d0), fabsq(d1)) * rel;
        dip_real x = dip_cubic(s * g0[j], d0, s * g1[j], d1, margin);
        if (x > 0 && (cut == 0 || x < cut))
            cut = x;
    }
    return cut;
}

__float128 pb_ref_shadow_root(const pb_problem *p, int band, int j, __float128 t0,
                              const __float128 *y0, __float128 H, const __float128 *y1)
{
    dip_real g0[4], g1[4], r0[4], r1[4], dt = 1e-3Q * H;
    dip_end(p, band, t0, y0, dt, g0, r0);
    dip_end(p, band, t0 + H, y1, dt, g1, r1);
    if ((g0[j] > 0) == (g1[j] > 0))
        return 0;
    /* the Hermite cubic's sign change, by bisection: it has one in (0, 1) */
    dip_real a0 = g0[j], d0 = r0[j] * H, a1 = g1[j], d1 = r1[j] * H;
    dip_real c2 = 3 * (a1 - a0) - 2 * d0 - d1, c3 = 2 * (a0 - a1) + d0 + d1, lo = 0, hi = 1;
    for (int it = 0; it < 60; it++) {
        dip_real m = 0.5Q * (lo + hi), v = a0 + m * (d0 + m * (c2 + m * c3));
        if ((v > 0) == (a0 > 0))
            lo = m;
        else
            hi = m;
    }
    return 0.5Q * (lo + hi);
}

