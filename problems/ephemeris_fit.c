/* ephemeris_fit.c - interpolation of time-only body positions at Chebyshev
 * points of the second kind over one reference step (ephemeris_fit.h),
 * evaluated in the power basis of the window's own variable in [-1, 1]
 * (degree 7 or 13: the check at a point off the nodes, made on that very
 * form, bounds what its conditioning costs). */
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

/* The interpolant in powers of x = (t - tc) / (H/2) by Horner's rule: 7
 * multiply-adds a coordinate for 8 nodes, against the barycentric form's
 * divisions at every node (the evaluation is a sixth of the reference's
 * work on a Sun-and-Moon problem). */
void pb_ephemeris_fit_at(const pb_ephemeris_fit *fit, __float128 t, __float128 (*pos)[3])
{
    __float128 x = (t - fit->tc) * fit->inv_half;
    for (int b = 0; b < 3; b++)
        for (int i = 0; i < 3; i++) {
            if (!fit->used[b]) {
                pos[b][i] = 0;
                continue;
            }
            __float128 acc = fit->coef[fit->n - 1][b][i];
            for (int k = fit->n - 2; k >= 0; k--)
                acc = acc * x + fit->coef[k][b][i];
            pos[b][i] = acc;
        }
}

/* The power-basis coefficients of the polynomial through (x[j], f[j]),
 * j < n: Newton's divided differences, then the nested form expanded
 * (both O(n^2), once a window). */
static void fit_powers(const __float128 *x, const __float128 *f, int n, __float128 *c)
{
    __float128 d[PB_EPH_FIT_NODES];
    for (int j = 0; j < n; j++)
        d[j] = f[j];
    for (int k = 1; k < n; k++)
        for (int j = n - 1; j >= k; j--)
            d[j] = (d[j] - d[j - 1]) / (x[j] - x[j - k]);
    for (int k = 0; k < n; k++)
        c[k] = 0;
    c[0] = d[n - 1];
    for (int k = n - 2; k >= 0; k--) {
        /* c <- c (x - x[k]) + d[k] */
        for (int m = n - 1; m >= 1; m--)
            c[m] = c[m - 1] - x[k] * c[m];
        c[0] = d[k] - x[k] * c[0];
    }
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
        pb_forces_bodies_q(p, fit->t[j], fit->pos[j]);
    }
    fit->t[m] = t0;
    fit->t[0] = t0 + H;
    fit->tc = t0 + 0.5Q * H;
    fit->inv_half = 2 / H;
    __float128 x[PB_EPH_FIT_NODES], f[PB_EPH_FIT_NODES], c[PB_EPH_FIT_NODES];
    for (int j = 0; j <= m; j++)
        x[j] = (fit->t[j] - fit->tc) * fit->inv_half;
    for (int b = 0; b < 3; b++)
        for (int i = 0; i < 3 && fit->used[b]; i++) {
            for (int j = 0; j <= m; j++)
                f[j] = fit->pos[j][b][i];
            fit_powers(x, f, n, c);
            for (int k = 0; k < n; k++)
                fit->coef[k][b][i] = c[k];
        }
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
