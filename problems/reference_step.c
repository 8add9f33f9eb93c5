/* reference_step.c - one step of the reference integrator: Gragg's modified
 * midpoint rule with step numbers 2, 4, ..., 2K extrapolated in h^2
 * (Hairer, Norsett, Wanner, Solving ODEs I, Sec. II.9), all in __float128,
 * with the time of a step beside a shadow edge mapped (reference_step.h)
 * and the Sun and Moon interpolated over the step (ephemeris_fit.h). */
#include <quadmath.h>
#include <string.h>
#include "problems/reference_step.h"
#include "problems/force_terms.h"

static void ref_deriv(const ref_force *F, ref_real t, const ref_real *y, ref_real *dy)
{
    ref_real pos[3][3], dtds = 1;
    if (F->map) {
        ref_real s = t, u = 1 - s;
        ref_real phi = F->map == REF_MAP_START ? s * s
                     : F->map == REF_MAP_END ? 1 - u * u : s * s * (3 - 2 * s);
        dtds = F->mH * (F->map == REF_MAP_START ? 2 * s
                      : F->map == REF_MAP_END ? 2 * u : 6 * s * u);
        t = F->mt0 + F->mH * phi;
    }
    int fitted = F->fit && F->fit->on;
    if (fitted)
        pb_ephemeris_fit_at(F->fit, t, pos);
    /* pb_reference_propagate refuses a force with no __float128 form first */
    (void)pb_forces_deriv_q(F->p, t, y, F->region, F->band, fitted ? pos : NULL, dy);
    if (F->map)
        for (int i = 0; i < REF_N; i++)
            dy[i] *= dtds;
}

/* Gragg's modified midpoint rule: m substeps of size H/m from y0 (f0 = f(y0)). */
static void ref_midpoint(const ref_force *F, ref_real t0, const ref_real *y0, const ref_real *f0,
                         ref_real H, int m, ref_real *out)
{
    ref_real h = H / m, zp[REF_N], z[REF_N], zn[REF_N], f[REF_N];
    for (int i = 0; i < REF_N; i++) {
        zp[i] = y0[i];
        z[i] = y0[i] + h * f0[i];
    }
    for (int j = 1; j < m; j++) {
        ref_deriv(F, t0 + j * h, z, f);
        for (int i = 0; i < REF_N; i++) {
            zn[i] = zp[i] + 2.0Q * h * f[i];
            zp[i] = z[i];
            z[i] = zn[i];
        }
    }
    ref_deriv(F, t0 + H, z, f);
    for (int i = 0; i < REF_N; i++)
        out[i] = 0.5Q * (z[i] + zp[i] + h * f[i]);
}

ref_real pb_ref_norm3(const ref_real *x)
{
    return sqrtq(x[0] * x[0] + x[1] * x[1] + x[2] * x[2]);
}

/* The time-only bodies fitted over a window that holds [t0, t0 + H]: the
 * last window when it does (a rejected step, a trial, the short steps near
 * a shadow's edge), else a new one of at least REF_FIT_SPAN_S (problems with
 * such bodies are in seconds), whose fit checks itself (ephemeris_fit.h). */
#define REF_FIT_SPAN_S 120.0Q
static void ref_fit_cover(pb_ephemeris_fit *fit, const pb_problem *p, ref_real t0, ref_real H)
{
    if (fit->on && fit->n > 0 && t0 >= fit->t[fit->n - 1] && t0 + H <= fit->t[0])
        return;
    pb_ephemeris_fit_make(fit, p, t0, fmaxq(H, REF_FIT_SPAN_S));
}

/* One extrapolated step of size H, its time mapped by map (REF_MAP_*); y1
 * receives the result, the return value is the scaled error estimate
 * (relative to |r| and |v| separately). */
ref_real pb_ref_step(const ref_force *Fp, ref_real t0, const ref_real *y0, ref_real H,
                           int map, int K, ref_real *y1)
{
    ref_real T[REF_K][REF_N], f0[REF_N];
    ref_force Fm = *Fp, *F = &Fm;
    F->map = map;
    F->mt0 = t0;
    F->mH = H;
    if (F->fit)
        ref_fit_cover(F->fit, F->p, t0, H);
    /* in s the step runs over [0, 1] */
    ref_real s0 = map ? 0 : t0, S = map ? 1 : H;
    ref_deriv(F, s0, y0, f0);
    for (int j = 0; j < K; j++) {
        int nj = 2 * (j + 1);
        ref_midpoint(F, s0, y0, f0, S, nj, T[j]);
        /* Aitken-Neville in place: T[j-k] becomes the k-times extrapolated value. */
        for (int k = 1; k <= j; k++) {
            int nk = 2 * (j - k + 1);
            ref_real q = (ref_real)nj / nk;
            ref_real den = q * q - 1.0Q;
            for (int i = 0; i < REF_N; i++)
                T[j - k][i] = T[j - k + 1][i] + (T[j - k + 1][i] - T[j - k][i]) / den;
        }
    }
    /* T[0] is the fully extrapolated value, T[1] the one before it. */
    ref_real dr[3], dv[3];
    for (int i = 0; i < 3; i++) {
        dr[i] = T[0][i] - T[1][i];
        dv[i] = T[0][i + 3] - T[1][i + 3];
    }
    ref_real sr = fmaxq(pb_ref_norm3(y0), pb_ref_norm3(T[0]));
    ref_real sv = fmaxq(pb_ref_norm3(y0 + 3), pb_ref_norm3(T[0] + 3));
    memcpy(y1, T[0], sizeof T[0]);
    ref_real er = sr > 0 ? pb_ref_norm3(dr) / sr : pb_ref_norm3(dr);
    ref_real ev = sv > 0 ? pb_ref_norm3(dv) / sv : pb_ref_norm3(dv);
    return fmaxq(er, ev);
}


int pb_ref_finite(const ref_real *y)
{
    for (int i = 0; i < REF_N; i++)
        if (!finiteq(y[i]))
            return 0;
    return 1;
}
