/* reference.c - reference trajectories by Gragg-Bulirsch-Stoer extrapolation
 * (Hairer, Norsett, Wanner, Solving ODEs I, Sec. II.9): the modified midpoint
 * rule with step numbers 2, 4, ..., 20 extrapolated in h^2 (order 20), step
 * control from the last two tableau entries, all in __float128; the force
 * models are re-evaluated here in __float128, never the problem's double accel. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <quadmath.h>
#include "problems/reference.h"
#include "problems/reference_dip.h"
#include "problems/force_terms.h"
#include "problems/ephemeris_fit.h"

typedef __float128 ref_real;

#define REF_N 6                 /* state (r, v), 3 + 3 */
#define REF_K 10                /* extrapolation columns: order 2K */
/* Columns of the trial steps that locate a boundary: their states serve
 * only to place the boundary in time (the integration itself steps there
 * with REF_K), and where REF_K columns meet the step tolerance, 7 are
 * within a factor (16 * 18 * 20)^2 (H/T)^-6 of it (the extrapolation's
 * error constant is 1 / prod n_j^2; Hairer, Norsett & Wanner, Sec. II.9):
 * about 1e-15 of the state for a LEO step (H/T = 0.03), a boundary time to
 * about 1e-12 s, below what ref_find_crossing asks */
#define REF_K_TRIAL 7
#define REF_MAX_STEPS 20000000L

/* How a step's time is stretched near a located boundary. At a penumbra's
 * edges the visible fraction goes as depth^(3/2) (the overlap of two discs),
 * so the force has a (t - t_b)^(3/2) term there that no extrapolation step
 * resolves without shrinking towards the edge. A step [t0, t0 + H] with an
 * edge at one end is therefore taken in s in [0, 1] with t = t0 + H phi(s),
 * phi(s) = s^2 (edge at the start), 1 - (1 - s)^2 (at the end) or
 * 3s^2 - 2s^3 (both): the edge term becomes a power of s of degree 3 and the
 * integrand is smooth again (a change of variables of the kind used for
 * integrable end-point singularities in quadrature; common practice). */
enum { REF_MAP_NONE = 0, REF_MAP_START = 1, REF_MAP_END = 2, REF_MAP_BOTH = 3 };

/* The force as the reference evaluates it: the problem, the shadow region
 * whose formula holds until the next located boundary, and the time map of
 * the step being taken. */
typedef struct ref_force {
    const pb_problem *p;
    int region;             /* shadow region (-1: none) */
    int band;               /* atmosphere row (-1: no drag) */
    pb_ephemeris_fit *fit;  /* the time-only bodies over the current step (NULL: none) */
    int map;                /* REF_MAP_*: then the derivative is taken in s */
    ref_real mt0, mH;       /* the mapped step's physical start and length */
} ref_force;

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

static ref_real ref_norm3(const ref_real *x)
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
static ref_real ref_step_k(const ref_force *Fp, ref_real t0, const ref_real *y0, ref_real H,
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
    ref_real sr = fmaxq(ref_norm3(y0), ref_norm3(T[0]));
    ref_real sv = fmaxq(ref_norm3(y0 + 3), ref_norm3(T[0] + 3));
    memcpy(y1, T[0], sizeof T[0]);
    ref_real er = sr > 0 ? ref_norm3(dr) / sr : ref_norm3(dr);
    ref_real ev = sv > 0 ? ref_norm3(dv) / sv : ref_norm3(dv);
    return fmaxq(er, ev);
}

static ref_real ref_step(const ref_force *F, ref_real t0, const ref_real *y0, ref_real H,
                         int map, ref_real *y1)
{
    return ref_step_k(F, t0, y0, H, map, REF_K, y1);
}

static int ref_finite(const ref_real *y)
{
    for (int i = 0; i < REF_N; i++)
        if (!finiteq(y[i]))
            return 0;
    return 1;
}

/* The running integration: state, step size, tolerance, the boundary
 * functions at the current state, and what is known of the next boundary. */
typedef struct ref_run {
    const pb_problem *p;
    ref_real t, y[REF_N], h, tol;
    long steps;
    int nev, nshadow;       /* boundary functions, the first nshadow of them the shadow's */
    ref_real g[4], g_at;    /* the boundary functions hold at t + g_at (just past an edge) */
    ref_force F;            /* p, the shadow region and atmosphere row of the current state */
    int fresh;              /* the state sits on a boundary just landed on */
    int pending;            /* a located boundary lies ahead, at t_edge */
    ref_real t_edge, h_keep;
    ref_real h_cruise;      /* the step size before the last region with edge terms was entered */
    ref_real rej_t, rej_H, rej_err; /* the last rejected attempt */
    ref_real acc_t, acc_H, acc_err; /* the last accepted step */
    ref_real t_fresh;               /* when the last edge was crossed */
    ref_real edge_k;                /* a step beside a singular edge errs by about edge_k H^(5/2) (0: not yet seen) */
    ref_real t_far, y_far[REF_N], g_far[4]; /* a state just past it, and its functions */
} ref_run;

static int ref_crossed(const ref_real *g0, const ref_real *g1, int n)
{
    for (int j = 0; j < n; j++)
        if ((g0[j] > 0) != (g1[j] > 0))
            return 1;
    return 0;
}

/* The state and boundary functions at w->t + tau, by one step from w. */
static int ref_trial(ref_run *w, ref_real tau, ref_real *y, ref_real *g)
{
    ref_real err = ref_step_k(&w->F, w->t, w->y, tau, w->fresh ? REF_MAP_START : REF_MAP_NONE,
                              REF_K_TRIAL, y);
    if (!ref_finite(y) || !finiteq(err))
        return PB_ENONFINITE;
    int ns;
    pb_forces_events_q(w->p, w->t + tau, y, w->F.band, g, &ns);
    return PB_OK;
}

/* Where the first boundary function to change sign within a step from w
 * does so: the bracket [lo, hi] around it, with the state and every
 * function's value at hi. */
typedef struct ref_bracket {
    ref_real lo, hi, g_hi[4], y_hi[REF_N];
} ref_bracket;

/* Function j's crossing within (0, br->hi], by the Illinois variant of
 * regula falsi (Dowell & Jarratt 1971) with a bisection every fourth trial
 * as a safeguard, to a bracket of tol * H. The integration does not start
 * from the bracket: it steps to lo itself, so lo need only be close to the
 * boundary and on its near side; the far side's formula then holds over at
 * most tol * H. Where the force jumps there (a cylindrical shadow, a row of
 * the atmosphere table), that is a velocity error of the jump times tol H:
 * REF_EVENT_TOL_JUMP keeps it below 1e-24 km/s for any step here. At a
 * conical shadow's boundary the force is continuous and the two formulas
 * differ by a (tol H / T_pen)^(3/2) part of the radiation pressure (T_pen
 * the penumbra's duration): REF_EVENT_TOL_SOFT keeps that below 1e-27 km/s
 * over the bracket for a LEO or a GEO penumbra. */
#define REF_EVENT_TOL_JUMP 1e-16Q
#define REF_EVENT_TOL_SOFT 1e-9Q
static int ref_find_crossing(ref_run *w, int j, ref_real H, ref_bracket *br)
{
    /* below g_at the near side of the edge just crossed would answer */
    ref_real a = w->g_at, b = br->hi, ga = w->g[j], gb = br->g_hi[j], y[REF_N], g[4];
    int soft = j < w->nshadow && w->p->forces.shadow == PB_SHADOW_CONICAL;
    ref_real tol = soft ? REF_EVENT_TOL_SOFT : REF_EVENT_TOL_JUMP;
    int side = 0;
    for (int it = 0; b - a > tol * H && it < 200; it++) {
        ref_real m = (it % 4 == 3 || gb == ga) ? 0.5Q * (a + b) : (a * gb - b * ga) / (gb - ga);
        if (!(m > a && m < b))
            m = 0.5Q * (a + b);
        int s = ref_trial(w, m, y, g);
        if (s)
            return s;
        if ((g[j] > 0) == (ga > 0)) {
            a = m, ga = g[j];
            if (side == -1)
                gb *= 0.5Q;  /* Illinois: the stale end's value is halved */
            side = -1;
        } else {
            b = m, gb = g[j];
            memcpy(br->g_hi, g, sizeof g);
            memcpy(br->y_hi, y, sizeof y);
            if (side == 1)
                ga *= 0.5Q;
            side = 1;
        }
    }
    br->lo = a;
    br->hi = b;
    return PB_OK;
}

/* The far end of a located crossing of function j must hold the far side's
 * sign beyond doubt: the root finder may close its bracket to 1e-27 s,
 * leaving g there at the level of the trial states' error (about 1e-15 of
 * the state), where its sign says nothing, and a wrong sign would send the
 * next step from the edge back across it (measured: a GEO eclipse skipped
 * whole). The far end moves on, by a few times the distance at which g
 * clears 1e-12 of its unit (rad, or the body's radius in km) at the
 * step's mean rate, until it does; the far side's formula then serves over
 * that stretch before the boundary (for a jump in LEO, below 1e-19 km/s). */
static int ref_far_side(ref_run *w, int j, ref_real H, ref_real rate, ref_bracket *br)
{
    int conical = j < w->nshadow && w->p->forces.shadow == PB_SHADOW_CONICAL;
    ref_real noise = 1e-12Q * (conical || !(w->p->body_radius > 0) ? 1 : w->p->body_radius);
    int far_pos = !(w->g[j] > 0);
    ref_real tau = br->hi - br->lo, y[REF_N], g[4];
    for (int k = 0; k < 8 && fabsq(br->g_hi[j]) < noise; k++) {
        tau = fmaxq(16 * tau, rate > 0 ? 4 * noise / rate : 1e-12Q * H);
        if (br->lo + tau >= H)
            break;
        int s = ref_trial(w, br->lo + tau, y, g);
        if (s)
            return s;
        if ((g[j] > 0) == far_pos) {
            br->hi = br->lo + tau;
            memcpy(br->g_hi, g, sizeof g);
            memcpy(br->y_hi, y, sizeof y);
        }
    }
    return PB_OK;
}

/* A shadow boundary or an atmosphere row's bound lies inside the step of
 * length H just tried from w (y1, g1 at its end): locate the first crossing
 * and keep it as the pending edge, which later steps reach exactly, the
 * last of them mapped so that the edge's (t_b - t)^(3/2) term is smooth
 * (REF_MAP_END). Every step integrates one region's formula, which is smooth
 * inside the region, so its error estimate means what it says (the steps'
 * intermediate states would otherwise stray across a boundary they end
 * near). (The same holds a row of the atmosphere table fixed: a step's
 * intermediate states stray by kilometres from the trajectory and would
 * otherwise mix two rows' exponentials near a bound.) */
static int ref_locate_edge(ref_run *w, ref_real H, const ref_real *y1, const ref_real *g1)
{
    ref_bracket br = {.hi = H};
    memcpy(br.g_hi, g1, sizeof br.g_hi);
    memcpy(br.y_hi, y1, sizeof br.y_hi);
    int jc = -1;
    for (int j = 0; j < w->nev; j++) {
        if ((w->g[j] > 0) == (br.g_hi[j] > 0))
            continue;  /* no crossing before the earliest one found so far */
        int s = ref_find_crossing(w, j, H, &br);
        if (s)
            return s;
        jc = j;
    }
    int s = jc >= 0 ? ref_far_side(w, jc, H, fabsq(g1[jc] - w->g[jc]) / H, &br) : PB_OK;
    if (s)
        return s;
    w->pending = 1;
    w->t_edge = w->t + br.lo;
    w->h_keep = H;
    w->t_far = w->t + br.hi;
    memcpy(w->y_far, br.y_hi, sizeof br.y_hi);
    memcpy(w->g_far, br.g_hi, sizeof br.g_hi);
    return PB_OK;
}

/* On the pending edge: the far side's region and atmosphere row, and the
 * boundary functions of those, taken just past it (where they start with
 * the far side's signs). The step size from before the edge is kept. */
static void ref_cross_edge(ref_run *w)
{
    if (w->nshadow)
        w->F.region = pb_forces_region_q(w->p, w->g_far);
    if (w->nev > w->nshadow)
        w->F.band += w->g_far[w->nshadow] <= 0 ? -1 : w->g_far[w->nshadow + 1] <= 0 ? 1 : 0;
    pb_forces_events_q(w->p, w->t_far, w->y_far, w->F.band, w->g, &w->nshadow);
    w->g_at = w->t_far - w->t;
    w->pending = 0;
    w->fresh = pb_forces_region_has_edge_terms(w->p, w->F.region);
    w->t_fresh = w->t;
    w->h = fmaxq(w->h, w->h_keep);
    /* a penumbra is crossed by short steps (ref_edge_step): past it, the
     * step size from before it serves again */
    if (w->fresh)
        w->h_cruise = w->h;
    else
        w->h = fmaxq(w->h, w->h_cruise);
}

/* The next step's factor after a step of size H with error estimate err
 * (map: the step was taken in s), within [0.2, 4]. */
static ref_real ref_step_factor(const ref_run *w, ref_real H, ref_real err, int map)
{
    /* in s a step's error goes as about H^K rather than H^(2K); just past a
     * singular edge, as (H/d)^(2K) d^(3/2) at a distance d from it, so it
     * hardly grows while H and d double together: the rate the last two
     * accepted steps show then lets the step grow at the controller's cap
     * instead of by (tol/err)^(1/(2K-1)) */
    ref_real expo = (map ? 2.0Q : 1.0Q) / (2 * REF_K - 1);
    if (err > 0 && err < w->tol && w->acc_err > 0 && w->acc_t >= w->t_fresh
        && fabsq(logq(H / w->acc_H)) > 0.1Q) {
        ref_real p = logq(err / w->acc_err) / logq(H / w->acc_H);
        if (p < 2 * REF_K - 1)
            expo = 1 / fmaxq(p, 2.0Q);
    }
    ref_real fac = err > 0 ? 0.9Q * powq(w->tol / err, expo) : 4.0Q;
    return fminq(4.0Q, fmaxq(0.2Q, fac));
}

/* The factor after a rejected step (fac: the controller's), remembering
 * the attempt: on a second rejection from the same state, where a singular
 * term dominates and the error falls far slower than H^(2K), the cut is by
 * the rate the two attempts show. */
static ref_real ref_reject_factor(ref_run *w, ref_real H, ref_real err, ref_real fac)
{
    if (w->rej_t == w->t && w->rej_H > H && w->rej_err > 0) {
        ref_real p = logq(w->rej_err / err) / logq(w->rej_H / H);
        if (p > 0.5Q && p < 2 * REF_K)
            fac = fminq(fac, 0.9Q * powq(w->tol / err, 1 / p));
        fac = fmaxq(fac, 1e-4Q);
    }
    w->rej_t = w->t, w->rej_H = H, w->rej_err = err;
    return fac;
}

/* The longest step beside a singular edge (one with the edge at its start
 * or end) whose error is predicted to be half the tolerance. Such a step's
 * error goes as its length to the power 5/2 whatever the map: the visible
 * fraction is a (depth)^(3/2) function of the position, and a step's
 * intermediate states stray across the boundary by the square of their
 * substep, so no change of the time variable makes the force smooth for
 * them (measured: an s-mapped step errs about 100 times less than a plain
 * one, with the same power). Every penumbra edge of a run has about the same
 * constant (measured on a LEO day: 2.0e-23 and 2.1e-23 s^-5/2 at the
 * sunlit and the umbral side), so it is learned from the last such step. */
static ref_real ref_edge_step(const ref_run *w)
{
    return w->edge_k > 0 ? powq(0.5Q * w->tol / w->edge_k, 0.4Q) : 1e300Q;
}

/* Step w exactly to target, stopping at every shadow boundary on the way. */
static int ref_advance(ref_run *w, ref_real target)
{
    ref_real y1[REF_N], g1[4];
    int ns;
    while (w->t < target) {
        int to_edge = w->pending && w->t_edge <= target;
        ref_real end = to_edge ? w->t_edge : target;
        ref_real H = w->h, left = end - w->t, edge_h = ref_edge_step(w);
        int sing_end = to_edge && pb_forces_region_has_edge_terms(w->p, w->F.region);
        /* towards a singular edge a step's error depends on its length
         * against its distance from the edge: approach it by steps of three
         * quarters of what is left until the last step is predicted to pass;
         * from one, start with that step */
        if (sing_end && left > edge_h)
            H = fminq(H, 0.75Q * left);
        if (w->fresh)
            H = fminq(H, edge_h);
        int last = H >= left;
        if (last)
            H = left;
        int at_edge = last && to_edge;
        int map = (w->fresh ? REF_MAP_START : 0) | (at_edge && sing_end ? REF_MAP_END : 0);
        ref_real err = ref_step(&w->F, w->t, w->y, H, map, y1);
        if (!ref_finite(y1) || !finiteq(err))
            return PB_ENONFINITE;
        /* a step across a boundary is cut there, accurate or not: the error
         * estimate of a step across a jump says nothing (no boundary lies
         * before a pending one: it was the first) */
        if (w->nev && !w->pending && (pb_forces_events_q(w->p, w->t + H, y1, w->F.band, g1, &ns),
                                      ref_crossed(w->g, g1, w->nev))) {
            int s = ref_locate_edge(w, H, y1, g1);
            if (s)
                return s;
            continue;
        }
        /* a step beside a singular edge whose error stands clear of the
         * round-off teaches the edge's constant */
        int beside = map != REF_MAP_NONE;
        if (beside && err > 1e-3Q * w->tol)
            w->edge_k = err / (H * H * sqrtq(H));
        ref_real fac = ref_step_factor(w, H, err, map);
        /* an eclipse wholly inside the step shows at neither end */
        ref_real dip = err <= w->tol && w->nshadow && !w->pending
                           ? pb_ref_shadow_dip(w->p, w->F.band, w->nshadow, w->t, w->y, H, y1) : 0;
        if (dip > 0) {
            w->h = dip * H;
            continue;
        }
        if (err <= w->tol) {
            memcpy(w->y, y1, sizeof y1);
            if (w->nev && !w->pending) {
                memcpy(w->g, g1, sizeof g1);
                w->g_at = 0;
            }
            w->acc_t = w->t, w->acc_H = H, w->acc_err = err;
            w->t = last ? end : w->t + H;
            w->fresh = 0;
            if (++w->steps > REF_MAX_STEPS)
                return PB_EMAXSTEPS;
            if (!last || fac < 1)
                w->h = H * fac;
            if (at_edge)
                ref_cross_edge(w);
        } else {
            fac = ref_reject_factor(w, H, err, fac);
            w->h = H * fac;
            if (beside)
                w->h = fminq(w->h, ref_edge_step(w));
        }
        if (w->h < 1e-30Q * fabsq(w->t) || w->h <= 0)
            return PB_EMINSTEP;
    }
    return PB_OK;
}

/* An impulsive manoeuvre: dv in the radial, along-track and cross-track
 * directions of the current state (the same frame the harness applies). */
static void ref_apply_manoeuvre(ref_run *w, const pb_manoeuvre *m)
{
    w->pending = 0;  /* a boundary found ahead belonged to the old trajectory */
    ref_real *r = w->y, *v = w->y + 3, h[3], R[3], C[3], I[3];
    h[0] = r[1] * v[2] - r[2] * v[1];
    h[1] = r[2] * v[0] - r[0] * v[2];
    h[2] = r[0] * v[1] - r[1] * v[0];
    ref_real rn = ref_norm3(r), hn = ref_norm3(h);
    for (int i = 0; i < 3; i++)
        R[i] = r[i] / rn, C[i] = h[i] / hn;
    I[0] = C[1] * R[2] - C[2] * R[1];
    I[1] = C[2] * R[0] - C[0] * R[2];
    I[2] = C[0] * R[1] - C[1] * R[0];
    for (int i = 0; i < 3; i++)
        v[i] += (ref_real)m->dv[0] * R[i] + (ref_real)m->dv[1] * I[i] + (ref_real)m->dv[2] * C[i];
}

int pb_reference_propagate(const pb_problem *p, const double *times, int n,
                           long double tol, long double *r, long double *v,
                           long *steps)
{
    if (!p || p->dim < 1 || p->dim > 3 || n < 0 || (n > 0 && !times) || !(tol > 0) ||
        !pb_forces_have_quad(p))
        return PB_EINVAL;
    ref_run w = {.p = p, .t = p->t0, .tol = tol, .rej_t = -1, .t_fresh = 1e300Q};
    for (int i = 0; i < p->dim; i++) {
        w.y[i] = p->r0[i];
        w.y[i + 3] = p->v0[i];
    }
    ref_real vn = ref_norm3(w.y + 3);
    w.h = vn > 0 ? 0.01Q * ref_norm3(w.y) / vn : 1e-3Q;
    if (p->period > 0 && w.h > p->period / 50)
        w.h = p->period / 50;
    w.F.band = pb_forces_band_q(p, w.y);
    w.nev = pb_forces_events_q(p, w.t, w.y, w.F.band, w.g, &w.nshadow);
    w.F.p = p;
    pb_ephemeris_fit fit = {0}; /* no window yet: the first step fits one */
    w.F.fit = pb_forces_timed_bodies(p) ? &fit : NULL;
    w.F.region = w.nshadow ? pb_forces_region_q(p, w.g) : -1;
    const pb_forces *f = &p->forces;
    int im = 0;
    for (int k = 0; k < n; k++) {
        ref_real tk = times[k];
        if (tk < w.t || !isfinite(tk))
            return PB_EINVAL;
        /* a sample at a manoeuvre's time sees the state before it */
        while (w.t < tk || (im < f->n_manoeuvres && f->manoeuvres[im].t < tk)) {
            int burn = im < f->n_manoeuvres && f->manoeuvres[im].t < tk;
            int s = ref_advance(&w, burn ? (ref_real)f->manoeuvres[im].t : tk);
            if (s)
                return s;
            if (burn)
                ref_apply_manoeuvre(&w, &f->manoeuvres[im++]);
        }
        for (int i = 0; i < PB_DIM_MAX; i++) {
            r[(size_t)k * PB_DIM_MAX + i] = i < p->dim ? w.y[i] : 0.0Q;
            v[(size_t)k * PB_DIM_MAX + i] = i < p->dim ? w.y[i + 3] : 0.0Q;
        }
    }
    if (steps)
        *steps = w.steps;
    return PB_OK;
}
