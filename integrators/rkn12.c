/* rkn12.c - the explicit Runge-Kutta-Nystrom 12(10) pair of Dormand,
 * El-Mikkawy & Prince (1987), IMA J. Numer. Anal. 7, 423 (17 stages), for
 * r'' = a(t, r): adaptive, advancing with the 12th-order solution, the step
 * set by the embedded 10th-order one. Coefficients: rkn12_coeffs.h, written
 * and checked by scripts/gen_rkn12_coeffs.py. Dense output: quintic Hermite. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/adaptive_setup.h"
#include "method.h"
#include "integrators/rkn12_coeffs.h"
#include "propbench/dense.h"

/* Why these choices:
 * - The pair has no first-same-as-last stage (stage 17 is not the new
 *   state), so a step costs 17 evaluations; the first stage is a(r) at the
 *   step's start, which is taken as soon as a step is accepted and serves
 *   both the next step and the dense output's end.
 * - The estimate is the difference of the 12th- and 10th-order results,
 *   O(h^11): the controller's exponent is 1/11. I-control (Hairer, Norsett
 *   & Wanner I, Sec. II.4) alone rejects every other step on the way in to
 *   periapsis: the error grows along the orbit at a fixed step, and after a
 *   rejection the step may not grow but is not made to shrink (kepler-e0.5,
 *   1e-12: 766 rejected in 2314 steps). So the smaller of it and Gustafsson's
 *   predictive step is taken (Gustafsson 1994, ACM TOMS 20, 496, as in
 *   Hairer & Wanner II, Sec. IV.8, from memory), which follows the trend of
 *   the error from the last accepted step: 173 rejected in 2845 steps at
 *   1e-13, and 16% fewer evaluations for the same error.
 * - The stages see a(t, r) only: a velocity-dependent force would be wrong
 *   at every stage, so the record says PB_FORM_SECOND and pb_method_fits
 *   refuses such problems. The velocity handed to the force is the one at
 *   the step's start, unused by any force that fits.
 * - No continuous extension of this pair has been published (RKNINT, the
 *   authors' own code, ACM TOMS Algorithm 670, 1989, switches to its 6(4)
 *   pair when dense output is wanted), so samples come from the quintic
 *   Hermite of the step's ends: O(h^6) inside a step against O(h^13) at its
 *   end. With this pair's long steps the interpolant, not the integration,
 *   sets the error between steps (leo-j2 over a day at 1e-12: 6.1e-3 km at
 *   the samples inside steps, 1.6e-9 km at the horizon, a step's end). */

/* Controller constants (common practice, Hairer, Norsett & Wanner I, II.4;
 * the safety and the bounds are DOP853's defaults there, from memory). */
#define RKN12_K 11.0
#define RKN12_SAFETY 0.9
#define RKN12_GROW_MAX 6.0
#define RKN12_SHRINK_MIN (1.0 / 3.0)
/* A last step up to 1% longer than the proposal is stretched to t_out rather
 * than leaving a sliver step behind (as rkf45). */
#define RKN12_STRETCH 1.01

typedef struct rkn12_ws {
    int dim;
    pb_force f;
    pb_method_config cfg;
    double t;
    double h;              /* the controller's proposal for the next step (0: none yet) */
    double hmin;
    double *atol;          /* [2*dim] absolute tolerance of r, then of v */
    double *r, *v, *rn, *vn, *rt, *er, *ev;
    double *k;             /* [RKN12_STAGES][dim]: k[0] = a at (t, r) */
    int have_k1;
    int last_rejected;
    double h_prev, err_prev; /* the last accepted unclamped step and its error */
    pb_dense_span span;
    pb_method_stats st;
} rkn12_ws;

static void *rkn12_alloc(int dim)
{
    if (dim < 1 || dim > PB_STATE_DIM_MAX)
        return NULL;
    rkn12_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    size_t d = (size_t)dim;
    w->dim = dim;
    w->atol = calloc(d * (9 + RKN12_STAGES), sizeof(double));
    if (!w->atol) {
        free(w);
        return NULL;
    }
    w->r = w->atol + 2 * d;
    w->v = w->r + d;
    w->rn = w->v + d;
    w->vn = w->rn + d;
    w->rt = w->vn + d;
    w->er = w->rt + d;
    w->ev = w->er + d;
    w->k = w->ev + d;
    return w;
}

static void rkn12_free(void *ws)
{
    rkn12_ws *w = ws;
    if (!w)
        return;
    free(w->atol);
    free(w);
}

static int rkn12_start(void *ws, const pb_force *f, const pb_method_config *cfg, double t0,
                       const double *r0, const double *v0)
{
    rkn12_ws *w = ws;
    if (cfg->h < 0 || !isfinite(cfg->h) || cfg->min_step < 0 || cfg->max_steps < 0 ||
        !isfinite(t0))
        return PB_EINVAL;
    w->f = *f;
    w->cfg = *cfg;
    int s = pb_adaptive_tolerances(&w->cfg, w->dim, r0, v0, w->atol);
    if (s)
        return s;
    double scale = cfg->time_scale > 0 ? cfg->time_scale : 1.0;
    w->hmin = cfg->min_step > 0 ? cfg->min_step : 1e-12 * scale;
    w->t = t0;
    w->h = cfg->h;
    w->have_k1 = 0;
    w->last_rejected = 0;
    w->h_prev = 0;
    w->err_prev = 1.0;
    memcpy(w->r, r0, (size_t)w->dim * sizeof(double));
    memcpy(w->v, v0, (size_t)w->dim * sizeof(double));
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    pb_dense_start(&w->span, w->dim, t0, r0, v0, NULL);
    return PB_OK;
}

/* Weighted RMS of the errors (er, ev) against the tolerances at both ends. */
static double rkn12_err_norm(const rkn12_ws *w, const double *er, const double *ev)
{
    double s = 0, rtol = w->cfg.rtol;
    int d = w->dim;
    for (int i = 0; i < d; i++) {
        double qr = er[i] / (w->atol[i] + rtol * fmax(fabs(w->r[i]), fabs(w->rn[i])));
        double qv = ev[i] / (w->atol[d + i] + rtol * fmax(fabs(w->v[i]), fabs(w->vn[i])));
        s += qr * qr + qv * qv;
    }
    return sqrt(s / (2 * d));
}

/* Starting step (Hairer, Norsett & Wanner I, Sec. II.4) for the first-order
 * form y' = (v, a), with the estimate's order: h^11. The book's 1e-6
 * fallbacks assume unit time, so they are scaled by the time scale. Uses
 * k[0] = a(t, r); costs one evaluation. rn, vn, rt, er, ev serve as scratch. */
static int rkn12_initial_step(rkn12_ws *w)
{
    int d = w->dim, s;
    double scale = w->cfg.time_scale > 0 ? w->cfg.time_scale : 1.0;
    const double *a0 = w->k;
    memcpy(w->rn, w->r, (size_t)d * sizeof(double));
    memcpy(w->vn, w->v, (size_t)d * sizeof(double));
    double d0 = rkn12_err_norm(w, w->r, w->v), d1 = rkn12_err_norm(w, w->v, a0);
    double h0 = pb_first_step_trial(d0, d1, scale);
    for (int i = 0; i < d; i++)
        w->rt[i] = w->r[i] + h0 * w->v[i];
    if ((s = w->f.accel(w->f.ctx, w->t + h0, w->rt, w->v, w->er)))
        return s;
    for (int i = 0; i < d; i++) {
        w->er[i] -= a0[i];   /* change of a over h0 */
        w->ev[i] = h0 * a0[i]; /* change of v over h0 */
    }
    double d2 = rkn12_err_norm(w, w->ev, w->er) / h0;
    w->h = pb_first_step(h0, d1, d2, RKN12_K, scale);
    return PB_OK;
}

/* One attempt of size h from (t, r, v), k[0] given: the 12th-order result
 * into (rn, vn), the error norm into *err. Leaves (r, v) alone. */
static int rkn12_try(rkn12_ws *w, double h, double *err)
{
    int d = w->dim, s;
    double h2 = h * h;
    for (int i = 1; i < RKN12_STAGES; i++) {
        for (int c = 0; c < d; c++) {
            double acc = 0;
            for (int j = 0; j < i; j++)
                acc += rkn12_a[i][j] * w->k[j * d + c];
            w->rt[c] = w->r[c] + rkn12_c[i] * h * w->v[c] + h2 * acc;
        }
        if ((s = w->f.accel(w->f.ctx, w->t + rkn12_c[i] * h, w->rt, w->v, w->k + i * d)))
            return s;
    }
    for (int c = 0; c < d; c++) {
        double sb = 0, sbp = 0, seb = 0, sebp = 0;
        for (int j = 0; j < RKN12_STAGES; j++) {
            double kj = w->k[j * d + c];
            sb += rkn12_b[j] * kj;
            sbp += rkn12_bp[j] * kj;
            seb += rkn12_eb[j] * kj;
            sebp += rkn12_ebp[j] * kj;
        }
        w->rn[c] = w->r[c] + h * w->v[c] + h2 * sb;
        w->vn[c] = w->v[c] + h * sbp;
        w->er[c] = h2 * seb;
        w->ev[c] = h * sebp;
        if (!isfinite(w->rn[c]) || !isfinite(w->vn[c]) || !isfinite(w->er[c]) ||
            !isfinite(w->ev[c]))
            return PB_ENONFINITE;
    }
    *err = rkn12_err_norm(w, w->er, w->ev);
    return PB_OK;
}

/* Accept the attempt of size h (clamped to t_out when last): new proposal,
 * new state, the next first stage, dense output, the observer. */
static int rkn12_accept(rkn12_ws *w, double h, double err, int last, double t_out,
                        pb_step_observer obs, void *octx)
{
    if (last && h < w->h)
        w->st.output_cut++;
    /* a clamped step shorter than the proposal says nothing about the step
     * the solution allows: the proposal is kept for the next call */
    if (!last || h >= w->h) {
        double e = fmax(err, 1e-10);
        double fac = RKN12_SAFETY * pow(e, -1.0 / RKN12_K);
        if (w->h_prev > 0)
            fac = fmin(fac, fac * (h / w->h_prev) * pow(w->err_prev / e, 1.0 / RKN12_K));
        w->h_prev = h;
        w->err_prev = e;
        fac = fmin(RKN12_GROW_MAX, fmax(RKN12_SHRINK_MIN, fac));
        if (w->last_rejected)
            fac = fmin(fac, 1.0);
        w->h = h * fac;
    }
    w->t = last ? t_out : w->t + h;
    memcpy(w->r, w->rn, (size_t)w->dim * sizeof(double));
    memcpy(w->v, w->vn, (size_t)w->dim * sizeof(double));
    w->last_rejected = 0;
    w->st.steps++;
    /* the next step's first stage, now, for the dense output's end; a failure
     * here is met again (and reported) by the next step */
    w->have_k1 = w->f.accel(w->f.ctx, w->t, w->r, w->v, w->k) == PB_OK;
    pb_dense_push(&w->span, w->t, w->r, w->v, w->have_k1 ? w->k : NULL);
    return obs ? obs(octx, w->t, w->r, w->v) : 0;
}

static int rkn12_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    rkn12_ws *w = ws;
    int s;
    if (!(t_out >= w->t))
        return PB_EINVAL;
    while (w->t < t_out) {
        if (w->cfg.max_steps > 0 && w->st.steps + w->st.rejected >= w->cfg.max_steps)
            return PB_EMAXSTEPS;
        if (!w->have_k1) {
            if ((s = w->f.accel(w->f.ctx, w->t, w->r, w->v, w->k))) {
                w->st.t_fail = w->t;
                return s;
            }
            w->have_k1 = 1;
            pb_dense_set_a(&w->span, w->k);
        }
        if (!(w->h > 0) && (s = rkn12_initial_step(w))) {
            w->st.t_fail = w->t;
            return s;
        }
        if (w->h < w->hmin || w->t + w->h == w->t) {
            w->st.t_fail = w->t;
            return PB_EMINSTEP;
        }
        double rem = t_out - w->t, h = w->h, err;
        int last = rem <= RKN12_STRETCH * h;
        if (last)
            h = rem;
        if ((s = rkn12_try(w, h, &err))) {
            w->st.t_fail = w->t;
            return s;
        }
        if (err <= 1.0) {
            if ((s = rkn12_accept(w, h, err, last, t_out, obs, octx)))
                return s;
        } else {
            w->h = h * fmax(RKN12_SHRINK_MIN, RKN12_SAFETY * pow(err, -1.0 / RKN12_K));
            w->last_rejected = 1;
            w->st.rejected++;
        }
    }
    return PB_OK;
}

static int rkn12_dense(const void *ws, double t, double *r, double *v)
{
    return pb_dense_eval(&((const rkn12_ws *)ws)->span, t, r, v);
}

static void rkn12_get_state(const void *ws, double *t, double *r, double *v)
{
    const rkn12_ws *w = ws;
    *t = w->t;
    memcpy(r, w->r, (size_t)w->dim * sizeof(double));
    memcpy(v, w->v, (size_t)w->dim * sizeof(double));
}

static void rkn12_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const rkn12_ws *)ws)->st;
}

const pb_method_type pb_method_rkn12 = {
    PB_METHOD_RECORD_HEAD,
    .name = "rkn12",
    .description = "Runge-Kutta-Nystrom 12(10), r'' = a(t, r) only, 17 evaluations a step",
    .source = "Dormand, El-Mikkawy & Prince (1987), IMA J. Numer. Anal. 7, 423",
    .order = 12,
    .flags = PB_KIND_ADAPTIVE | PB_FORM_SECOND,
    .alloc = rkn12_alloc,
    .start = rkn12_start,
    .advance = rkn12_advance,
    .get_state = rkn12_get_state,
    .get_stats = rkn12_get_stats,
    .free = rkn12_free,
    .dense = rkn12_dense,
    /* quintic Hermite of the ends: position O(h^6), velocity O(h^5) */
    .dense_order = 4,
};
