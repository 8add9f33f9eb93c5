/* ephemeris_fit.c - Chebyshev interpolation of time-only body positions over
 * one reference step (ephemeris_fit.h). Barycentric formula at Chebyshev
 * points of the second kind, weights (-1)^j halved at both ends (Berrut &
 * Trefethen, SIAM Review 46 (2004) 501, eq. 5.1): stable at any t. */
#include <quadmath.h>
#include <string.h>
#include "ephemeris_fit.h"
#include "force_terms.h"

/* The fit must reproduce the series to this, relative to the body's
 * distance. The series themselves carry a rounding noise of about 1e-32
 * relative (arguments of thousands of degrees in __float128), so the check
 * cannot ask for less; a relative position error e moves a third body's pull
 * by about 3e of itself, and that pull is a small part of the total force, so
 * 1e-27 stays below the reference's fine step tolerance of 1e-26 of the
 * state. */
#define EPH_FIT_TOL 1e-27Q

void pb_ephemeris_fit_at(const pb_ephemeris_fit *fit, __float128 t, __float128 (*pos)[3])
{
    __float128 num[3][3] = {{0}}, den = 0;
    for (int j = 0; j < fit->n; j++) {
        __float128 d = t - fit->t[j];
        if (d == 0) {
            memcpy(pos, fit->pos[j], sizeof fit->pos[j]);
            return;
        }
        __float128 c = fit->w[j] / d;
        den += c;
        for (int b = 0; b < 3; b++)
            if (fit->used[b])
                for (int i = 0; i < 3; i++)
                    num[b][i] += c * fit->pos[j][b][i];
    }
    for (int b = 0; b < 3; b++)
        for (int i = 0; i < 3; i++)
            pos[b][i] = fit->used[b] ? num[b][i] / den : 0;
}

/* Fit with n nodes over [t0, t0 + H] and check it at a point off the
 * nodes; 1 when it holds. */
static int fit_try(pb_ephemeris_fit *fit, const pb_problem *p, __float128 t0, __float128 H, int n)
{
    const int m = n - 1;
    fit->n = n;
    for (int j = 0; j <= m; j++) {
        /* node 0 at t0 + H, node m at t0: both step ends are nodes */
        fit->t[j] = t0 + 0.5Q * H * (1 + cosq(M_PIq * j / m));
        fit->w[j] = (j % 2 ? -1 : 1) * ((j == 0 || j == m) ? 0.5Q : 1.0Q);
        pb_forces_bodies_q(p, fit->t[j], fit->pos[j]);
    }
    fit->t[m] = t0;
    fit->t[0] = t0 + H;
    __float128 tc = t0 + 0.3183098861837907Q * H, want[3][3] = {{0}}, got[3][3];
    pb_forces_bodies_q(p, tc, want);
    pb_ephemeris_fit_at(fit, tc, got);
    for (int b = 0; b < 3; b++) {
        __float128 d2 = 0, r2 = 0;
        for (int i = 0; i < 3; i++) {
            __float128 d = got[b][i] - want[b][i];
            d2 += d * d;
            r2 += want[b][i] * want[b][i];
        }
        if (fit->used[b] && d2 > EPH_FIT_TOL * EPH_FIT_TOL * r2)
            return 0;
    }
    return 1;
}

void pb_ephemeris_fit_make(pb_ephemeris_fit *fit, const pb_problem *p, __float128 t0,
                           __float128 H)
{
    const pb_forces *f = &p->forces;
    memset(fit, 0, sizeof *fit);
    fit->used[0] = f->sun || f->srp_area_mass_m2_kg > 0;
    fit->used[1] = f->moon;
    fit->used[2] = f->circular;
    fit->on = fit_try(fit, p, t0, H, PB_EPH_FIT_NODES_FEW)
           || fit_try(fit, p, t0, H, PB_EPH_FIT_NODES);
}
