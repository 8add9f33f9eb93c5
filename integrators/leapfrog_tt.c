/* leapfrog_tt.c - the time-transformed (logarithmic-Hamiltonian) leapfrog and
 * Yoshida's compositions of it, orders 4, 6 and 8. Sources: Mikkola &
 * Tanikawa (1999), MNRAS 310, 745; Preto & Tremaine (1999), AJ 118, 2532;
 * Yoshida (1990), Physics Letters A 150, 262 (the weights of leapfrog.c).
 *
 * The independent variable is s with ds = U dt, U = mu/r the Kepler part of
 * the potential. With B = -(v^2/2 - mu/r), the Kepler binding energy, the
 * equations in s split into two parts that are solved exactly:
 *   drift (v, B fixed):  dt/ds = 1/(T + B), dr/ds = v/(T + B), T = v^2/2;
 *   kick  (r, t fixed):  dv/ds = a(t, r)/U,  dB/ds = -v . f/U,
 * with f = a + mu r/r^3 the perturbation (dE/dt = v . f for the Kepler
 * energy E). v is linear in s across a kick, so B changes there by
 * -(ds/U) <v> . f with <v> the mean of the kick's two velocities: the kick's
 * exact flow. The step is drift-kick-drift (the force at the middle): with
 * f = 0 B never moves and the map is Preto & Tremaine's leapfrog with
 * p_t = -E, whose steps lie exactly on the Kepler ellipse of the start (the
 * kick-drift-kick order does not have this property: its energy error is
 * O(h^2)). Composing such maps keeps it, so every member follows a Kepler
 * orbit to round-off and errs only in time. Why B and not Mikkola &
 * Aarseth's (2002) TTL variable W: W is integrated by its own kick, so with
 * f = 0 it follows U only to the truncation error and the time
 * transformation, and with it the exact orbit, would be lost.
 *
 * Stepping in s, the method takes cfg->h as the physical step it would take
 * on a grid (period / N, the period being cfg->time_scale) and turns it into
 * the s-step that gives N steps per Kepler orbit of the start: s per orbit
 * is 2 pi sqrt(mu a) (tt_sstep). Physical time is integrated (always with compensated
 * summation), so step ends lie on no t grid; advance takes any t_out at or
 * after the last one, steps until a step end reaches it, and keeps the state
 * at t_out from dense output for get_state while the integration goes on
 * from the step end. Dense output: quintic Hermite in s (tt_dense). The force at a step end is not part of the
 * integration (drift-kick-drift evaluates it mid-step), so it is evaluated
 * there when a state inside the step is first asked for, at most once an
 * end; the harness keeps dense output's evaluations out of a case's count.
 * Symmetric in s for any perturbation, symplectic on the Kepler problem
 * (Preto & Tremaine 1999). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/method.h"
#include "integrators/yoshida_coeffs.h"
#include "propbench/dense.h"

#define TT_STAGES_MAX PB_YOSHIDA_STAGES_MAX

/* One end of a step: r, v there, a there once evaluated. */
typedef struct tt_end {
    double t, r[PB_DIM_MAX], v[PB_DIM_MAX], a[PB_DIM_MAX];
    int have_a;
} tt_end;

typedef struct tt_ws {
    int dim;
    pb_force f;
    pb_method_config cfg;
    int s;                          /* substeps of the composition */
    double c[TT_STAGES_MAX];        /* kick fractions of ds (they sum to 1) */
    double d[TT_STAGES_MAX + 1];    /* merged drift fractions d_0..d_s */
    double mu, ds;
    /* the integration: state at the current step end, with compensations */
    double B, ct, cB, cr[PB_DIM_MAX], cv[PB_DIM_MAX];
    tt_end prev, cur;               /* the last step's two ends */
    int have_step;
    /* what get_state reports: the last t_out (by dense output) or step end */
    double t_rep, r_rep[PB_DIM_MAX], v_rep[PB_DIM_MAX];
    pb_method_stats st;
} tt_ws;

static void *tt_alloc(int dim)
{
    if (dim < 1 || dim > PB_DIM_MAX || dim > PB_DENSE_DIM_MAX)
        return NULL;
    tt_ws *w = calloc(1, sizeof *w);
    if (w)
        w->dim = dim;
    return w;
}

static void tt_free(void *ws)
{
    free(ws);
}

/* x += inc, with Kahan compensation c (true value ~ x - c) when asked */
static inline double tt_add(double x, double inc, double *c, int compensated)
{
    if (!compensated)
        return x + inc;
    double d = inc - *c;
    double s = x + d;
    *c = (s - x) - d;
    return s;
}

static double tt_dot(const double *a, const double *b, int dim)
{
    double s = 0;
    for (int i = 0; i < dim; i++)
        s += a[i] * b[i];
    return s;
}

/* The s-step for physical step h: N = period/h steps per Kepler orbit of
 * the start, whose s per orbit is 2 pi sqrt(mu a) (mu/a = 2 mu/r - v^2);
 * with no period given (time_scale 0) h is taken as that orbit's period / N,
 * ds = h mu/a. An unbound start: ds = h mu/r0, a first step of about h. */
static double tt_sstep(const pb_method_config *cfg, const double *r0, const double *v0,
                       int dim)
{
    double mu = cfg->mu, h = cfg->h, U0 = mu / sqrt(tt_dot(r0, r0, dim));
    double k = 2.0 * U0 - tt_dot(v0, v0, dim);
    if (!(k > 0))
        return h * U0;
    if (cfg->time_scale > 0 && isfinite(cfg->time_scale))
        return 2.0 * M_PI * mu / sqrt(k) * h / cfg->time_scale;
    return h * k;
}

static int tt_start_with(void *ws, int k, const double *wk, const pb_force *f,
                         const pb_method_config *cfg, double t0, const double *r0,
                         const double *v0)
{
    tt_ws *w = ws;
    int dim = w->dim;
    if (!(cfg->h > 0) || !isfinite(cfg->h) || !(cfg->mu > 0) || !isfinite(cfg->mu))
        return PB_EINVAL;
    double r2 = tt_dot(r0, r0, dim);
    if (!(r2 > 0) || !isfinite(r2) || !isfinite(tt_dot(v0, v0, dim)))
        return PB_EINVAL;
    w->f = *f;
    w->cfg = *cfg;
    w->mu = cfg->mu;
    w->s = pb_yoshida_sequence(k, wk, w->c);
    w->d[0] = 0.5 * w->c[0];
    for (int j = 1; j < w->s; j++)
        w->d[j] = 0.5 * (w->c[j - 1] + w->c[j]);
    w->d[w->s] = 0.5 * w->c[w->s - 1];
    w->ds = tt_sstep(cfg, r0, v0, dim);
    memset(&w->cur, 0, sizeof w->cur);
    w->cur.t = t0;
    memcpy(w->cur.r, r0, (size_t)dim * sizeof(double));
    memcpy(w->cur.v, v0, (size_t)dim * sizeof(double));
    w->B = w->mu / sqrt(r2) - 0.5 * tt_dot(v0, v0, dim);
    w->ct = w->cB = 0;
    memset(w->cr, 0, sizeof w->cr);
    memset(w->cv, 0, sizeof w->cv);
    w->prev = w->cur;
    w->have_step = 0;
    w->t_rep = t0;
    memcpy(w->r_rep, r0, sizeof w->r_rep);
    memcpy(w->v_rep, v0, sizeof w->v_rep);
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    return PB_OK;
}

/* The state a step works on, so that a failed step leaves the committed one. */
typedef struct tt_state {
    double t, B, ct, cB, r[PB_DIM_MAX], v[PB_DIM_MAX], cr[PB_DIM_MAX], cv[PB_DIM_MAX];
} tt_state;

/* Drift by fraction h of s: straight line for dt = h/(T + B). */
static int tt_drift(const tt_ws *w, tt_state *x, double h)
{
    double g = 0.5 * tt_dot(x->v, x->v, w->dim) + x->B; /* = U on the exact flow */
    if (!(g > 0))
        return PB_ENONFINITE;
    double dt = h / g;
    int comp = w->cfg.compensated;
    for (int i = 0; i < w->dim; i++)
        x->r[i] = tt_add(x->r[i], dt * x->v[i], &x->cr[i], comp);
    x->t = tt_add(x->t, dt, &x->ct, 1);
    return PB_OK;
}

/* Kick by fraction h of s: dv = (h/U) a(t, r), dB = -(h/U) <v> . f. */
static int tt_kick(const tt_ws *w, tt_state *x, double h)
{
    int dim = w->dim, comp = w->cfg.compensated, s;
    double a[PB_DIM_MAX] = {0}, vm[PB_DIM_MAX] = {0};
    if ((s = w->f.accel(w->f.ctx, x->t, x->r, x->v, a)))
        return s;
    double rr = sqrt(tt_dot(x->r, x->r, dim)), q = h * rr / w->mu; /* h/U */
    double kk = w->mu / (rr * rr * rr), vf = 0;
    for (int i = 0; i < dim; i++) {
        double vn = tt_add(x->v[i], q * a[i], &x->cv[i], comp);
        vm[i] = 0.5 * (x->v[i] + vn);
        x->v[i] = vn;
        vf += vm[i] * (a[i] + kk * x->r[i]);
    }
    x->B = tt_add(x->B, -q * vf, &x->cB, comp);
    return PB_OK;
}

/* One composed step from the committed state; committed only whole. */
static int tt_step(tt_ws *w)
{
    int dim = w->dim, s;
    tt_state x;
    x.t = w->cur.t, x.B = w->B, x.ct = w->ct, x.cB = w->cB;
    memcpy(x.r, w->cur.r, sizeof x.r);
    memcpy(x.v, w->cur.v, sizeof x.v);
    memcpy(x.cr, w->cr, sizeof x.cr);
    memcpy(x.cv, w->cv, sizeof x.cv);
    for (int j = 0; j < w->s; j++) {
        if ((s = tt_drift(w, &x, w->d[j] * w->ds)) || (s = tt_kick(w, &x, w->c[j] * w->ds)))
            return s;
    }
    if ((s = tt_drift(w, &x, w->d[w->s] * w->ds)))
        return s;
    int ok = isfinite(x.t) && isfinite(x.B);
    for (int i = 0; i < dim; i++)
        ok = ok && isfinite(x.r[i]) && isfinite(x.v[i]);
    if (!ok)
        return PB_ENONFINITE;
    w->prev = w->cur;
    w->cur.t = x.t;
    memcpy(w->cur.r, x.r, sizeof x.r);
    memcpy(w->cur.v, x.v, sizeof x.v);
    w->cur.have_a = 0;
    w->B = x.B, w->ct = x.ct, w->cB = x.cB;
    memcpy(w->cr, x.cr, sizeof x.cr);
    memcpy(w->cv, x.cv, sizeof x.cv);
    w->have_step = 1;
    return PB_OK;
}

/* The force at both ends of the last step, for the Hermite interpolant;
 * evaluated once an end (the newer end's serves the next step too). */
static int tt_end_accels(tt_ws *w)
{
    tt_end *e[2] = {&w->prev, &w->cur};
    for (int k = 0; k < 2; k++) {
        if (e[k]->have_a)
            continue;
        int s = w->f.accel(w->f.ctx, e[k]->t, e[k]->r, e[k]->v, e[k]->a);
        if (s)
            return s;
        e[k]->have_a = 1;
    }
    return PB_OK;
}

/* The derivatives in s at a step end: t' = 1/U = |r|/mu, t'' = r.v/mu^2,
 * r' = v t', r'' = a t'^2 + v t'' (on the exact flow T + B = U). */
static void tt_sderiv(const tt_ws *w, const tt_end *e, double *tp, double *rp, double *rpp)
{
    double mu = w->mu, rn = sqrt(tt_dot(e->r, e->r, w->dim)), t1 = rn / mu;
    tp[0] = e->t;
    tp[1] = t1;
    tp[2] = tt_dot(e->r, e->v, w->dim) / (mu * mu);
    for (int i = 0; i < w->dim; i++) {
        rp[i] = e->v[i] * t1;
        rpp[i] = e->a[i] * t1 * t1 + e->v[i] * tp[2];
    }
}

/* s in [0, ds] where the quintic t(s) of span ts reaches t: Newton, kept
 * inside a bracket that bisection shrinks when a Newton step leaves it. */
static double tt_solve_s(const pb_dense_span *ts, double ds, double ta, double tb, double t)
{
    double lo = 0, hi = ds, s = ds * (t - ta) / (tb - ta);
    for (int it = 0; it < 60; it++) {
        double x, dx;
        pb_dense_eval(ts, s, &x, &dx);
        if (x < t)
            lo = s;
        else
            hi = s;
        double sn = dx > 0 ? s - (x - t) / dx : 0.5 * (lo + hi);
        if (!(sn > lo && sn < hi))
            sn = 0.5 * (lo + hi);
        if (fabs(sn - s) <= 4e-16 * ds)
            return sn;
        s = sn;
    }
    return s;
}

/* Dense output, interpolated in s (where a Kepler orbit is smooth: its
 * eccentric anomaly is linear in s) rather than in t, where one step can
 * sweep most of a periapsis passage: quintic Hermite of t(s) and r(s) from
 * both ends, s found for t, v = r'(s)/t'(s). The workspace always comes
 * from tt_alloc (never const); only the ends' force cache changes here,
 * never the integration. */
static int tt_dense(const void *cws, double t, double *r, double *v)
{
    tt_ws *w = (tt_ws *)cws;
    if (!w->have_step || !(t >= w->prev.t && t <= w->cur.t))
        return PB_EINVAL;
    const tt_end *e = t == w->cur.t ? &w->cur : t == w->prev.t ? &w->prev : NULL;
    if (e) {
        memcpy(r, e->r, (size_t)w->dim * sizeof(double));
        memcpy(v, e->v, (size_t)w->dim * sizeof(double));
        return PB_OK;
    }
    int s = tt_end_accels(w);
    if (s)
        return s;
    double t0[3], t1[3], rp0[PB_DIM_MAX], rpp0[PB_DIM_MAX], rp1[PB_DIM_MAX], rpp1[PB_DIM_MAX];
    tt_sderiv(w, &w->prev, t0, rp0, rpp0);
    tt_sderiv(w, &w->cur, t1, rp1, rpp1);
    pb_dense_span ts, rs;
    pb_dense_start(&ts, 1, 0.0, &t0[0], &t0[1], &t0[2]);
    pb_dense_push(&ts, w->ds, &t1[0], &t1[1], &t1[2]);
    pb_dense_start(&rs, w->dim, 0.0, w->prev.r, rp0, rpp0);
    pb_dense_push(&rs, w->ds, w->cur.r, rp1, rpp1);
    double sx = tt_solve_s(&ts, w->ds, w->prev.t, w->cur.t, t), x, tp, rp[PB_DIM_MAX];
    pb_dense_eval(&ts, sx, &x, &tp);
    pb_dense_eval(&rs, sx, r, rp);
    /* v = r'/t' with t' = |r|/mu at the interpolated point, not the slope of
     * t(s): the step's time carries the method's timing error (12% of a
     * periapsis step at e = 0.99 and 50 steps an orbit), which the slope
     * would put into the speed and the energy; |r|/mu keeps the state on
     * the orbit the step ends lie on */
    double k = w->mu / sqrt(tt_dot(r, r, w->dim));
    for (int i = 0; i < w->dim; i++)
        v[i] = rp[i] * k;
    return PB_OK;
}

static void tt_report_end(tt_ws *w)
{
    w->t_rep = w->cur.t;
    memcpy(w->r_rep, w->cur.r, sizeof w->r_rep);
    memcpy(w->v_rep, w->cur.v, sizeof w->v_rep);
}

/* Step until a step end reaches t_out (any time at or after the last one
 * reported); the state at t_out itself comes from dense output. */
static int tt_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    tt_ws *w = ws;
    int s;
    if (!(t_out >= w->t_rep) || !isfinite(t_out))
        return PB_EINVAL;
    while (w->cur.t < t_out) {
        /* checked before the step, so the state left is the last one taken */
        if (w->cfg.max_steps > 0 && w->st.steps >= w->cfg.max_steps) {
            tt_report_end(w);
            return PB_EMAXSTEPS;
        }
        if ((s = tt_step(w))) {
            w->st.t_fail = w->cur.t;
            tt_report_end(w);
            return s;
        }
        w->st.steps++;
        tt_report_end(w);
        if (obs && (s = obs(octx, w->cur.t, w->cur.r, w->cur.v)))
            return s;
    }
    if (t_out == w->cur.t)
        return PB_OK;
    double r[PB_DIM_MAX] = {0}, v[PB_DIM_MAX] = {0};
    if ((s = tt_dense(w, t_out, r, v))) {
        w->st.t_fail = w->cur.t;
        return s;
    }
    w->t_rep = t_out;
    memcpy(w->r_rep, r, sizeof r);
    memcpy(w->v_rep, v, sizeof v);
    return PB_OK;
}

static void tt_get_state(const void *ws, double *t, double *r, double *v)
{
    const tt_ws *w = ws;
    *t = w->t_rep;
    memcpy(r, w->r_rep, (size_t)w->dim * sizeof(double));
    memcpy(v, w->v_rep, (size_t)w->dim * sizeof(double));
}

static void tt_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const tt_ws *)ws)->st;
}

/* A composition's start (k pairs of weights w[1..k]) and its type record.
 * Dense order min(p - 1, 4), as for leapfrog.c's compositions (the
 * interpolant's velocity carries the ends' errors divided by the step). */
#define LEAPFROG_TT(NAME, CNAME, K, W, ORDER, DESC, SRC)                          \
    static int CNAME##_start(void *ws, const pb_force *f, const pb_method_config *cfg, \
                             double t0, const double *r0, const double *v0)       \
    {                                                                           \
        return tt_start_with(ws, K, W, f, cfg, t0, r0, v0);                     \
    }                                                                           \
    const pb_method_type pb_method_##CNAME = {                                  \
        PB_METHOD_RECORD_HEAD,                                                  \
        .name = NAME,                                                           \
        .description = DESC,                                                    \
        .source = SRC,                                                          \
        .order = ORDER,                                                         \
        .flags = PB_KIND_FIXED | PB_KIND_SYMPLECTIC | PB_FORM_SECOND |          \
                 PB_KIND_KEPLER | PB_KIND_COMPENSABLE | PB_KIND_REGULARIZED,    \
        .alloc = tt_alloc,                                                      \
        .start = CNAME##_start,                                                 \
        .advance = tt_advance,                                                  \
        .get_state = tt_get_state,                                              \
        .get_stats = tt_get_stats,                                              \
        .free = tt_free,                                                        \
        .dense = tt_dense,                                                      \
        .dense_order = (ORDER) - 1 < 4 ? (ORDER) - 1 : 4,                       \
    }

#define TT_SRC "Mikkola & Tanikawa (1999) MNRAS 310, 745; Preto & Tremaine (1999) AJ 118, 2532"
LEAPFROG_TT("leapfrog-tt", leapfrog_tt, 0, NULL, 2,
            "time-transformed (log-Hamiltonian) leapfrog, ds = (mu/r) dt: exact Kepler "
            "orbit, error in time only; 1 evaluation a step", TT_SRC);
LEAPFROG_TT("yoshida4-tt", yoshida4_tt, 1, pb_yoshida4_w, 4,
            "Yoshida order-4 composition of leapfrog-tt, 3 evaluations a step",
            TT_SRC "; Yoshida (1990) Physics Letters A 150, 262");
LEAPFROG_TT("yoshida6-tt", yoshida6_tt, 3, pb_yoshida6_w, 6,
            "Yoshida order-6 composition of leapfrog-tt, 7 evaluations a step",
            TT_SRC "; Yoshida (1990) Physics Letters A 150, 262");
LEAPFROG_TT("yoshida8-tt", yoshida8_tt, 7, pb_yoshida8_w, 8,
            "Yoshida order-8 composition of leapfrog-tt, 15 evaluations a step",
            TT_SRC "; Yoshida (1990) Physics Letters A 150, 262");
