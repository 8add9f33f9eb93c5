/* reference_dip.c - a suspected double crossing of a shadow boundary inside
 * one step of the reference (reference_dip.h). The sign test at a step's
 * ends misses an eclipse that begins and ends inside the step: a GEO step
 * of an hour spans a whole eclipse near the edges of the eclipse season,
 * and any step may span a grazing one. The step's trajectory is modelled by
 * the quintic Hermite of its ends' positions, velocities and accelerations
 * (propbench/dense.h; position error O(H^6)), and each shadow function is
 * sampled on it, in double, at DIP_SAMPLES + 1 points with its rate (a
 * central difference along the velocity, the Sun at its own time); between
 * two samples the function's cubic Hermite is searched for an interior
 * minimum. A function whose samples or minima come within DIP_MARGIN of
 * zero (its own unit: rad for the conical shadow's angles, km for the
 * cylinder's wall, scaled by |r|) plus the trajectory model's error marks
 * the step as suspect. A pass that dips less than that into the shadow
 * between two samples can still go unseen: by less than 1e-7 rad, a
 * ten-thousandth of a penumbra's depth (its visible fraction then differs
 * from 1 by about 1e-6, for seconds). */
#include <math.h>
#include "problems/reference_dip.h"
#include "problems/force_terms.h"
#include "propbench/dense.h"

#define DIP_SAMPLES 16
#define DIP_MARGIN 1e-7

/* Shadow function values g and rates at time t of the span (dt: the
 * central difference's half width). */
static int dip_sample(const pb_problem *p, const pb_dense_span *sp, double t, double dt, double *g,
                      double *rate)
{
    double r[3], v[3], rp[3], rm[3], gp[2], gm[2];
    if (pb_dense_eval(sp, t, r, v))
        return -1;
    for (int i = 0; i < 3; i++) {
        rp[i] = r[i] + dt * v[i];
        rm[i] = r[i] - dt * v[i];
    }
    int n = pb_forces_shadow_g(p, t, r, g);
    pb_forces_shadow_g(p, t + dt, rp, gp);
    pb_forces_shadow_g(p, t - dt, rm, gm);
    for (int j = 0; j < n; j++)
        rate[j] = (gp[j] - gm[j]) / (2 * dt);
    return n;
}

/* The interior minimum of the cubic Hermite through values a0, a1 and
 * slopes d0, d1 (per unit x) on (0, 1), when it lies below both ends and
 * below margin: where, else 0. */
static double dip_cubic(double a0, double d0, double a1, double d1, double margin)
{
    double c2 = 3 * (a1 - a0) - 2 * d0 - d1, c3 = 2 * (a0 - a1) + d0 + d1, x[2];
    int n = 0;
    /* p'(x) = d0 + 2 c2 x + 3 c3 x^2 */
    if (fabs(c3) < 1e-12 * (fabs(c2) + fabs(d0))) {
        if (c2 != 0)
            x[n++] = -d0 / (2 * c2);
    } else {
        double disc = c2 * c2 - 3 * c3 * d0;
        if (disc >= 0) {
            double sq = sqrt(disc);
            x[n++] = (-c2 - sq) / (3 * c3);
            x[n++] = (-c2 + sq) / (3 * c3);
        }
    }
    double best = 0;
    for (int k = 0; k < n; k++) {
        double xk = x[k];
        if (!(xk > 0 && xk < 1))
            continue;
        double v = a0 + xk * (d0 + xk * (c2 + xk * c3));
        if (v < margin && v < fmin(a0, a1) && (best == 0 || xk < best))
            best = xk;
    }
    return best;
}

__float128 pb_ref_shadow_dip(const pb_problem *p, int band, int nshadow, __float128 t0,
                             const __float128 *y0, __float128 H, const __float128 *y1)
{
    (void)band;
    if (nshadow <= 0 || !(H > 0))
        return 0;
    double r0[3], v0[3], r1[3], v1[3], a0[3], a1[3], t = (double)t0, h = (double)H;
    for (int i = 0; i < 3; i++) {
        r0[i] = (double)y0[i], v0[i] = (double)y0[i + 3];
        r1[i] = (double)y1[i], v1[i] = (double)y1[i + 3];
    }
    if (pb_forces_accel(p, t, r0, v0, a0) || pb_forces_accel(p, t + h, r1, v1, a1))
        return 0;
    pb_dense_span sp;
    pb_dense_start(&sp, 3, t, r0, v0, a0);
    pb_dense_push(&sp, t + h, r1, v1, a1);
    /* the quintic's position error, max |r^(6)| H^6 / 46080 with r^(6) of
     * order w^6 |r| (w = |v|/|r|), ten times over, as an angle */
    double rn = sqrt(r0[0] * r0[0] + r0[1] * r0[1] + r0[2] * r0[2]);
    double vn = sqrt(v0[0] * v0[0] + v0[1] * v0[1] + v0[2] * v0[2]), wh = rn > 0 ? vn / rn * h : 0;
    double ang = DIP_MARGIN + 10 * pow(wh, 6) / 46080;
    double unit = p->forces.shadow == PB_SHADOW_CONICAL ? 1 : rn;
    double hs = h / DIP_SAMPLES, dt = 1e-3 * hs, g[DIP_SAMPLES + 1][2], rate[DIP_SAMPLES + 1][2];
    for (int k = 0; k <= DIP_SAMPLES; k++)
        if (dip_sample(p, &sp, k == DIP_SAMPLES ? t + h : t + k * hs, dt, g[k], rate[k]) != nshadow)
            return 0;
    double cut = 0;
    for (int j = 0; j < nshadow; j++) {
        if ((g[0][j] > 0) != (g[DIP_SAMPLES][j] > 0))
            continue;  /* a crossing the caller's sign test sees (or noise at an edge) */
        double s = g[DIP_SAMPLES][j] > 0 ? 1 : -1, margin = ang * unit;
        /* a step that starts or ends on this function's boundary (off an
         * edge, or onto a located one) is near it by design: the edge's own
         * handling covers it, and its samples say nothing of a dip */
        if (s * g[0][j] < margin || s * g[DIP_SAMPLES][j] < margin)
            continue;
        for (int k = 0; k < DIP_SAMPLES; k++) {
            double x = 0;
            if (k > 0 && s * g[k][j] < margin)
                x = k;  /* a sample at, or in, the shadow's edge */
            else {
                double xi = dip_cubic(s * g[k][j], s * rate[k][j] * hs, s * g[k + 1][j],
                                      s * rate[k + 1][j] * hs, margin);
                if (xi > 0)
                    x = k + xi;
            }
            if (x > 0) {
                x /= DIP_SAMPLES;
                if (cut == 0 || x < cut)
                    cut = x;
                break;
            }
        }
    }
    /* cut inside the step, never at its very ends */
    return cut > 0 ? fmin(fmax(cut, 1.0 / (4 * DIP_SAMPLES)), 1 - 1.0 / (4 * DIP_SAMPLES)) : 0;
}

int pb_ref_event_rates(const pb_problem *p, int band, __float128 t, const __float128 *y, __float128 dt,
                       __float128 *g, __float128 *rate)
{
    __float128 rp[3], rm[3], gp[4], gm[4];
    int ns;
    for (int i = 0; i < 3; i++) {
        rp[i] = y[i] + dt * y[i + 3];
        rm[i] = y[i] - dt * y[i + 3];
    }
    int n = pb_forces_events_q(p, t + dt, rp, band, gp, &ns);
    pb_forces_events_q(p, t - dt, rm, band, gm, &ns);
    for (int j = 0; j < n; j++) {
        g[j] = 0.5Q * (gp[j] + gm[j]);
        rate[j] = (gp[j] - gm[j]) / (2 * dt);
    }
    return n;
}

__float128 pb_ref_shadow_root(const pb_problem *p, int band, int j, __float128 t0,
                              const __float128 *y0, __float128 H, const __float128 *y1)
{
    /* the Hermite cubic of g_j from its values and rates at the two ends */
    __float128 g0[4], g1[4], r0[4], r1[4], dt = 1e-3Q * H;
    if (pb_ref_event_rates(p, band, t0, y0, dt, g0, r0) <= j ||
        pb_ref_event_rates(p, band, t0 + H, y1, dt, g1, r1) <= j)
        return 0;
    if ((g0[j] > 0) == (g1[j] > 0))
        return 0;
    /* the cubic's sign change, by bisection: it has one in (0, 1) */
    __float128 a0 = g0[j], d0 = r0[j] * H, a1 = g1[j], d1 = r1[j] * H;
    __float128 c2 = 3 * (a1 - a0) - 2 * d0 - d1, c3 = 2 * (a0 - a1) + d0 + d1, lo = 0, hi = 1;
    for (int it = 0; it < 60; it++) {
        __float128 m = 0.5Q * (lo + hi), v = a0 + m * (d0 + m * (c2 + m * c3));
        if ((v > 0) == (a0 > 0))
            lo = m;
        else
            hi = m;
    }
    return 0.5Q * (lo + hi);
}
