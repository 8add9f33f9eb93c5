/* reference.c - reference trajectories: the run of extrapolation steps
 * (reference_step.c) from t0 to the sample times in __float128, with step
 * control, shadow and atmosphere boundaries located and stepped onto
 * exactly, eclipses inside a step caught (reference_dip.c) and manoeuvres
 * applied; the force models are re-evaluated in __float128, never the
 * problem's double accel. */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <quadmath.h>
#include "problems/reference.h"
#include "problems/reference_dip.h"
#include "problems/force_terms.h"
#include "problems/reference_step.h"

/* Columns of the trial steps that locate a boundary: their states serve
 * only to place the boundary in time (the integration itself steps there
 * with REF_K). Measured against REF_K columns from the same state (leo-j2,
 * review of this file): 9.7e-22 of the position at H/T = 0.03, a LEO
 * step, and 4.1e-19 at H/T = 0.045; ref_event_noise allows 1e-14, far
 * above either */
#define REF_K_TRIAL 7
#define REF_MAX_STEPS 20000000L

/* The running integration: state, step size, tolerance, the boundary
 * functions at the current state, and what is known of the next boundary. */
typedef struct ref_run {
    const pb_problem *p;
    ref_real t, y[REF_N], h, tol;
    long steps, cuts;       /* accepted steps; steps cut for an eclipse inside them */
    int nev, nshadow;       /* boundary functions, the first nshadow of them the shadow's */
    ref_real g[4], g_at;    /* the boundary functions hold at t + g_at (just past an edge) */
    ref_force F;            /* p, the shadow region and atmosphere row of the current state */
    int fresh;              /* the state sits on a boundary just landed on */
    int pending;            /* a located boundary lies ahead, at t_edge */
    ref_real t_edge, h_keep;
    ref_real h_cruise;      /* the step size before the last region with edge terms was entered */
    ref_real rej_t, rej_H, rej_err; /* the last rejected attempt */
    ref_real acc_t, acc_H, acc_err; /* the last accepted step */
    ref_real appr_err;              /* the last accepted step's towards the pending edge (1e300: none) */
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
    ref_real err = pb_ref_step(&w->F, w->t, w->y, tau, w->fresh ? REF_MAP_START : REF_MAP_NONE,
                              REF_K_TRIAL, y);
    if (!pb_ref_finite(y) || !finiteq(err))
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
 * as a safeguard, to a bracket of tol * H, or of four times the distance
 * over which g clears the trial states' noise (ref_event_noise), whichever
 * is wider. The integration does not start from the bracket: it steps to lo
 * itself, so lo need only be close to the boundary and on its near side;
 * the far side's formula then holds over at most the bracket. Where the
 * force jumps there (a cylindrical shadow, a row of the atmosphere table),
 * that is a velocity error of the jump times the bracket: the noise bound
 * (about 3e-11 s for a LEO shadow's wall) keeps it near 2e-21 km/s, and
 * REF_EVENT_TOL_JUMP asks for no less. At a conical shadow's boundary the
 * force is continuous and the two formulas differ by a (tol H / T_pen)^(3/2)
 * part of the radiation pressure (T_pen the penumbra's duration):
 * REF_EVENT_TOL_SOFT keeps that below 1e-27 km/s over the bracket for a LEO
 * or a GEO penumbra. Where the force jumps, the Hermite forecast of the root
 * (guess, in (0, H); 0: none) is bracketed first and regula falsi's points
 * are tried in pairs once the bracket is narrow. */
#define REF_EVENT_TOL_JUMP 1e-16Q
#define REF_EVENT_TOL_SOFT 1e-9Q
/* The size below which boundary function j's value says nothing about its
 * sign: ten times the error of a trial state (about 1e-15 of it), in g's
 * unit (rad for the conical shadow's angles, else km, scaled by the body's
 * radius). */
static ref_real ref_event_noise(const ref_run *w, int j)
{
    int conical = j < w->nshadow && w->p->forces.shadow == PB_SHADOW_CONICAL;
    return 1e-14Q * (conical || !(w->p->body_radius > 0) ? 1 : w->p->body_radius);
}

/* How far a shadow function's Hermite forecast of its root over a step of
 * length H may be off, in time: the interpolant's remainder
 * (reference_dip.c), (w H)^3 / 384 of the step with w the orbital rate,
 * four times over. */
static ref_real ref_guess_error(const ref_run *w, ref_real H)
{
    ref_real rn = pb_ref_norm3(w->y), vn = pb_ref_norm3(w->y + 3), wH = rn > 0 ? vn / rn * H : 1;
    return H * wH * wH * wH / 96;
}

/* The Illinois bracket of ref_find_crossing. */
typedef struct ref_root {
    ref_real a, b, ga, gb, fa, fb;  /* ends, their (Illinois-scaled) values, their true values */
    int side;
} ref_root;

/* One trial at m narrows the bracket. */
static int ref_root_try(ref_run *w, int j, ref_real m, ref_root *R, ref_bracket *br)
{
    ref_real y[REF_N], g[4];
    int s = ref_trial(w, m, y, g);
    if (s)
        return s;
    if ((g[j] > 0) == (R->ga > 0)) {
        R->a = m, R->ga = R->fa = g[j];
        if (R->side == -1)
            R->gb *= 0.5Q;  /* Illinois: the stale end's value is halved */
        R->side = -1;
    } else {
        R->b = m, R->gb = R->fb = g[j];
        memcpy(br->g_hi, g, sizeof g);
        memcpy(br->y_hi, y, sizeof y);
        if (R->side == 1)
            R->ga *= 0.5Q;
        R->side = 1;
    }
    return PB_OK;
}

static int ref_find_crossing(ref_run *w, int j, ref_real H, ref_real guess, ref_bracket *br)
{
    /* below g_at the near side of the edge just crossed would answer */
    ref_root R = {w->g_at, br->hi, w->g[j], br->g_hi[j], w->g[j], br->g_hi[j], 0};
    ref_real noise = ref_event_noise(w, j);
    int soft = j < w->nshadow && w->p->forces.shadow == PB_SHADOW_CONICAL;
    ref_real tol = soft ? REF_EVENT_TOL_SOFT : REF_EVENT_TOL_JUMP;
    for (int it = 0; it < 200; it++) {
        /* lean: the distance over which g clears its noise, twice; the
         * bracket is not closed below four times it, so that its far end
         * holds the far side's sign beyond doubt (ref_far_side) */
        ref_real w0 = R.b - R.a, lean = R.fb != R.fa ? 2 * noise * w0 / fabsq(R.fb - R.fa) : 0;
        if (!(w0 > fmaxq(tol * H, 4 * lean)))
            break;
        ref_real m = (it % 4 == 3 || R.gb == R.ga) ? 0.5Q * (R.a + R.b)
                                                   : (R.a * R.gb - R.b * R.ga) / (R.gb - R.ga);
        /* a forecast root is bracketed first, by its error bound each side
         * (where the force jumps: a continuous one needs the boundary to
         * 1e-9 of the step only, which regula falsi reaches as soon) */
        if (!soft && guess > 0 && it < 2)
            m = guess + (it ? 1 : -1) * fmaxq(1e-6Q * H, ref_guess_error(w, H));
        if (!(m > R.a && m < R.b))
            m = 0.5Q * (R.a + R.b);
        /* on a narrow bracket regula falsi is good to far better than the
         * bracket: try both sides of its point at once, lean apart */
        int pair = !soft && !(guess > 0 && it < 2) && it % 4 != 3 && w0 < 1e-2Q * H &&
                   m - lean > R.a && m + lean < R.b && lean > 0;
        if (!pair && m + lean < R.b)
            m += lean;
        int s = ref_root_try(w, j, pair ? m - lean : m, &R, br);
        if (!s && pair)
            s = ref_root_try(w, j, m + lean, &R, br);
        if (s)
            return s;
    }
    br->lo = R.a;
    br->hi = R.b;
    return PB_OK;
}

/* The far end of a located crossing of function j must hold the far side's
 * sign beyond doubt: a root finder may close its bracket to 1e-27 s,
 * leaving g there at the level of the trial states' error (about 1e-15 of
 * the state), where its sign says nothing, and a wrong sign would send the
 * next step from the edge back across it (measured: a GEO eclipse skipped
 * whole). ref_find_crossing's trials lean past the root for this; where
 * its far end still sits in the noise, the far end moves on, by a few times
 * the distance at which g clears it at the step's mean rate, until it does. */
static int ref_far_side(ref_run *w, int j, ref_real H, ref_real rate, ref_bracket *br)
{
    ref_real noise = ref_event_noise(w, j);
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
        ref_real guess = j < w->nshadow && !w->g_at
                             ? H * pb_ref_shadow_root(w->p, w->F.band, j, w->t, w->y, H, y1) : 0;
        int s = ref_find_crossing(w, j, H, guess, &br);
        if (s)
            return s;
        jc = j;
    }
    int s = jc >= 0 ? ref_far_side(w, jc, H, fabsq(g1[jc] - w->g[jc]) / H, &br) : PB_OK;
    if (s)
        return s;
    w->pending = 1;
    w->appr_err = 1e300Q;
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

/* Just inside a penumbra its far edge is near and predictable: each shadow
 * function's value and rate (central differences along the velocity) give
 * when it reaches zero if it heads there; a trial a little past the nearest
 * such time that finds a sign changed is a bracket, and the edge is located
 * at once, so that the steps across the penumbra know how far they may go
 * instead of one of them crossing the edge unawares and being thrown away
 * (the forecast is linear, over a penumbra of a few thousandths of an
 * orbit; the trial goes 5% past it, and when it finds no sign change the
 * edge is found as any other, by a step that crosses it). */
static int ref_predict_edge(ref_run *w)
{
    ref_real gm[4], rate[4], tau = 1e300Q;
    pb_ref_event_rates(w->p, w->F.band, w->t, w->y, 1e-4Q * w->h_cruise, gm, rate);
    for (int j = 0; j < w->nshadow; j++)
        if ((gm[j] > 0) == (w->g[j] > 0) && (gm[j] > 0) != (rate[j] > 0) && rate[j] != 0)
            tau = fminq(tau, -gm[j] / rate[j]);
    if (!(tau < w->h_cruise))
        return PB_OK;
    ref_real y[REF_N], g[4];
    tau *= 1.05Q;
    int s = ref_trial(w, tau, y, g);
    if (s || !ref_crossed(w->g, g, w->nev))
        return s;
    return ref_locate_edge(w, tau, y, g);
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

/* An accepted step: its length, error estimate and the controller's
 * factor, where it ended (end, when last) and how it stood to the edges. */
typedef struct ref_taken {
    ref_real H, err, fac, end;
    int map, last, at_edge, approach;
} ref_taken;

/* Move w over the accepted step (state y1, boundary functions g1) and set
 * the next step's size; nonzero past REF_MAX_STEPS. */
static int ref_accept(ref_run *w, const ref_taken *st, const ref_real *y1, const ref_real *g1)
{
    memcpy(w->y, y1, REF_N * sizeof *y1);
    if (w->nev && !w->pending) {
        memcpy(w->g, g1, sizeof w->g);
        w->g_at = 0;
    }
    w->acc_t = w->t, w->acc_H = st->H, w->acc_err = st->err;
    w->appr_err = st->approach ? st->err : 1e300Q;
    w->t = st->last ? st->end : w->t + st->H;
    w->fresh = 0;
    if (++w->steps > REF_MAX_STEPS)
        return 1;
    if (!st->last || st->fac < 1)
        w->h = st->H * st->fac;
    /* off an edge, the next step may be three times the distance */
    if (st->map & REF_MAP_START)
        w->h = fmaxq(w->h, 3 * st->H);
    if (st->at_edge)
        ref_cross_edge(w);
    return 0;
}

/* Step w exactly to target, stopping at every shadow boundary on the way. */
static int ref_advance(ref_run *w, ref_real target)
{
    ref_real y1[REF_N], g1[4];
    int ns;
    while (w->t < target) {
        if (w->fresh && !w->pending && w->nshadow) {
            int s = ref_predict_edge(w);
            if (s)
                return s;
        }
        int to_edge = w->pending && w->t_edge <= target;
        ref_real end = to_edge ? w->t_edge : target;
        ref_real H = w->h, left = end - w->t, edge_h = ref_edge_step(w);
        int sing_end = to_edge && pb_forces_region_has_edge_terms(w->p, w->F.region);
        /* towards a singular edge a step's error depends on its length
         * against its distance from the edge: approach it by steps of three
         * quarters of what is left (seven eighths after a step that erred
         * by less than 1e-4 of the tolerance: the error goes as about the
         * ninth power of that ratio) until the last step is predicted to
         * pass; from one, start with that step */
        if (sing_end && left > edge_h)
            H = fminq(H, (w->appr_err < 1e-4Q * w->tol ? 0.875Q : 0.75Q) * left);
        if (w->fresh)
            H = fminq(H, edge_h);
        int last = H >= left;
        if (last)
            H = left;
        int at_edge = last && to_edge;
        int map = (w->fresh ? REF_MAP_START : 0) | (at_edge && sing_end ? REF_MAP_END : 0);
        ref_real err = pb_ref_step(&w->F, w->t, w->y, H, map, REF_K, y1);
        if (!pb_ref_finite(y1) || !finiteq(err))
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
        /* an eclipse wholly inside the step shows at neither end (before a
         * pending edge too: that may be an atmosphere row's) */
        ref_real dip = err <= w->tol && w->nshadow
                           ? pb_ref_shadow_dip(w->p, w->F.band, w->nshadow, w->t, w->y, H, y1) : 0;
        if (dip > 0) {
            w->h = dip * H;
            if (++w->cuts > REF_MAX_STEPS)
                return PB_EMAXSTEPS;
            if (w->h < 1e-30Q * fabsq(w->t))
                return PB_EMINSTEP;
            continue;
        }
        if (err <= w->tol) {
            ref_taken st = {H, err, fac, end, map, last, at_edge, sing_end && !last};
            if (ref_accept(w, &st, y1, g1))
                return PB_EMAXSTEPS;
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
    ref_real rn = pb_ref_norm3(r), hn = pb_ref_norm3(h);
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
    ref_run w = {.p = p, .t = p->t0, .tol = tol, .rej_t = -1, .t_fresh = 1e300Q, .appr_err = 1e300Q};
    for (int i = 0; i < p->dim; i++) {
        w.y[i] = p->r0[i];
        w.y[i + 3] = p->v0[i];
    }
    ref_real vn = pb_ref_norm3(w.y + 3);
    w.h = vn > 0 ? 0.01Q * pb_ref_norm3(w.y) / vn : 1e-3Q;
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
