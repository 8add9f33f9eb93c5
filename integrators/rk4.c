/* rk4.c - the classical fourth-order Runge-Kutta method, first-order form
 * y = (r, v). Source: Kutta (1901); tableau as in Abramowitz & Stegun 25.5.10.
 * Optional compensated (Kahan) summation of the state update. Stepped on the
 * grid t0 + n*h by the shared fixed-step loop (fixed_step.h). Dense output:
 * the quintic Hermite of each step's ends, the acceleration at the new state
 * being evaluated as soon as a step is taken (it is the next step's first
 * stage, so a run costs one evaluation more, not one a step). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/fixed_step.h"
#include "propbench/dense.h"

typedef struct rk4_ws {
    int dim, n;               /* n = 2*dim state values */
    pb_force f;
    pb_method_config cfg;
    pb_fixed_grid grid;       /* t0, h, the index of the current state */
    double *y, *comp;         /* state (r, v) and its Kahan compensation */
    pb_method_stats st;
    double a[PB_STATE_DIM_MAX];     /* the first stage's a at the current state, when have_a */
    int have_a;
    pb_dense_span span;       /* the last step's ends with their accelerations */
} rk4_ws;

static void *rk4_alloc(int dim)
{
    if (dim < 1 || dim > PB_STATE_DIM_MAX)
        return NULL;
    rk4_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->dim = dim;
    w->n = 2 * dim;
    w->y = calloc(2 * (size_t)w->n, sizeof(double));
    if (!w->y) {
        free(w);
        return NULL;
    }
    w->comp = w->y + w->n;
    return w;
}

static void rk4_free(void *ws)
{
    rk4_ws *w = ws;
    if (!w)
        return;
    free(w->y);
    free(w);
}

static int rk4_start(void *ws, const pb_force *f, const pb_method_config *cfg,
                     double t0, const double *r0, const double *v0)
{
    rk4_ws *w = ws;
    if (!(cfg->h > 0) || !isfinite(cfg->h))
        return PB_EINVAL;
    w->f = *f;
    w->cfg = *cfg;
    memcpy(w->y, r0, (size_t)w->dim * sizeof(double));
    memcpy(w->y + w->dim, v0, (size_t)w->dim * sizeof(double));
    memset(w->comp, 0, (size_t)w->n * sizeof(double));
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    w->have_a = 0;
    pb_dense_start(&w->span, w->dim, t0, r0, v0, NULL);
    pb_fixed_grid_init(&w->grid, t0, cfg->h, cfg->max_steps, w->y, w->y + w->dim, &w->st);
    return PB_OK;
}

/* One step for a state of d positions and d velocities. The derivative of the
 * position part is the stage velocity itself, so stages keep (r, v) on the
 * stack and nothing is copied; inlined with d = 3 the loops unroll. The
 * arithmetic is the tableau's, term for term, so every variant gives the
 * same bits. A failed step leaves y and comp untouched. */
static PB_STEP_INLINE int rk4_step_d(rk4_ws *w, double t, double t1, double h, const int d)
{
    double *r = w->y, *v = w->y + d, *cr = w->comp, *cv = w->comp + d;
    double a1[PB_STATE_DIM_MAX], a2[PB_STATE_DIM_MAX], a3[PB_STATE_DIM_MAX], a4[PB_STATE_DIM_MAX];
    double r2[PB_STATE_DIM_MAX], v2[PB_STATE_DIM_MAX], r3[PB_STATE_DIM_MAX], v3[PB_STATE_DIM_MAX];
    double r4[PB_STATE_DIM_MAX], v4[PB_STATE_DIM_MAX], rn[PB_STATE_DIM_MAX], vn[PB_STATE_DIM_MAX];
    double ncr[PB_STATE_DIM_MAX], ncv[PB_STATE_DIM_MAX];
    int s, i, ok = 1;
    void *ctx = w->f.ctx;
    if (w->have_a) {
        PB_UNROLL_COMPONENTS
        for (i = 0; i < d; i++)
            a1[i] = w->a[i];
    } else {
        if ((s = w->f.accel(ctx, t, r, v, a1)))
            return s;
        pb_dense_set_a(&w->span, a1);
    }
    PB_UNROLL_COMPONENTS
    for (i = 0; i < d; i++) {
        r2[i] = r[i] + 0.5 * h * v[i];
        v2[i] = v[i] + 0.5 * h * a1[i];
    }
    if ((s = w->f.accel(ctx, t + 0.5 * h, r2, v2, a2)))
        return s;
    PB_UNROLL_COMPONENTS
    for (i = 0; i < d; i++) {
        r3[i] = r[i] + 0.5 * h * v2[i];
        v3[i] = v[i] + 0.5 * h * a2[i];
    }
    if ((s = w->f.accel(ctx, t + 0.5 * h, r3, v3, a3)))
        return s;
    PB_UNROLL_COMPONENTS
    for (i = 0; i < d; i++) {
        r4[i] = r[i] + h * v3[i];
        v4[i] = v[i] + h * a3[i];
    }
    if ((s = w->f.accel(ctx, t + h, r4, v4, a4)))
        return s;
    if (w->cfg.compensated) {
        for (i = 0; i < d; i++) {
            /* Kahan: carry the low-order bits the addition to the state drops */
            double dr = h / 6.0 * (v[i] + 2.0 * (v2[i] + v3[i]) + v4[i]) - cr[i];
            double dv = h / 6.0 * (a1[i] + 2.0 * (a2[i] + a3[i]) + a4[i]) - cv[i];
            rn[i] = r[i] + dr;
            vn[i] = v[i] + dv;
            ncr[i] = (rn[i] - r[i]) - dr;
            ncv[i] = (vn[i] - v[i]) - dv;
        }
    } else {
        PB_UNROLL_COMPONENTS
        for (i = 0; i < d; i++) {
            rn[i] = r[i] + h / 6.0 * (v[i] + 2.0 * (v2[i] + v3[i]) + v4[i]);
            vn[i] = v[i] + h / 6.0 * (a1[i] + 2.0 * (a2[i] + a3[i]) + a4[i]);
        }
    }
    PB_UNROLL_COMPONENTS
    for (i = 0; i < d; i++)
        ok &= (isfinite(rn[i]) != 0) & (isfinite(vn[i]) != 0);
    if (!ok)
        return PB_ENONFINITE;
    PB_UNROLL_COMPONENTS
    for (i = 0; i < d; i++) {
        r[i] = rn[i];
        v[i] = vn[i];
    }
    if (w->cfg.compensated)
        for (i = 0; i < d; i++) {
            cr[i] = ncr[i];
            cv[i] = ncv[i];
        }
    /* the next step's first stage now, for the dense output's end; a failure
     * here is met again (and reported) by the next step */
    w->have_a = w->f.accel(ctx, t1, r, v, w->a) == PB_OK;
    pb_dense_push(&w->span, t1, r, v, w->have_a ? w->a : NULL);
    return PB_OK;
}

/* pb_fixed_step_fn: rk4_step_d commits only a good step */
static int rk4_fixed_step(void *ctx, long n, double t, double t1)
{
    rk4_ws *w = ctx;
    (void)n;
    double h = w->grid.h;
    return w->dim == 3 ? rk4_step_d(w, t, t1, h, 3) : rk4_step_d(w, t, t1, h, w->dim);
}

static int rk4_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    rk4_ws *w = ws;
    return pb_fixed_grid_advance(&w->grid, t_out, rk4_fixed_step, w, obs, octx);
}

static void rk4_get_state(const void *ws, double *t, double *r, double *v)
{
    const rk4_ws *w = ws;
    *t = pb_fixed_grid_time(&w->grid, w->grid.n);
    memcpy(r, w->y, (size_t)w->dim * sizeof(double));
    memcpy(v, w->y + w->dim, (size_t)w->dim * sizeof(double));
}

static int rk4_dense(const void *ws, double t, double *r, double *v)
{
    return pb_dense_eval(&((const rk4_ws *)ws)->span, t, r, v);
}

static void rk4_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const rk4_ws *)ws)->st;
}

const pb_method_type pb_method_rk4 = {
    PB_METHOD_RECORD_HEAD,
    .name = "rk4",
    .description = "classical Runge-Kutta, 4 evaluations a step",
    .source = "Kutta (1901); Abramowitz & Stegun 25.5.10",
    .order = 4,
    .flags = PB_KIND_FIXED | PB_KIND_COMPENSABLE,
    .alloc = rk4_alloc,
    .start = rk4_start,
    .advance = rk4_advance,
    .get_state = rk4_get_state,
    .get_stats = rk4_get_stats,
    .free = rk4_free,
    .dense = rk4_dense,
    .dense_order = 3,   /* min(p - 1, 4): see leapfrog.c */
};
