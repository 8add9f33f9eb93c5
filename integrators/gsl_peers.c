/* gsl_peers.c - GSL's odeiv2 steppers (rk4, rkf45, rkck, rk8pd, msadams) as
 * peer methods behind the propbench method interface, first-order form
 * y = (r, v). Schemes: GSL Reference Manual, "Ordinary Differential Equations"
 * (rk4: Abramowitz & Stegun 25.5.10; rkf45: Fehlberg 1969; rkck: Cash & Karp
 * 1990; rk8pd: Prince & Dormand 1981; msadams: Adams, Nordsieck form, order 1-12). */
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/fixed_step.h"
#include "propbench/dense.h"

/* Pitfalls of wrapping GSL, and how this file handles them:
 * - GSL's rk4 estimates its error by step doubling: one full step plus two
 *   half steps, and it keeps the two-half-step result. gsl_odeiv2_step_apply
 *   with no derivative passed in costs 11 evaluations a step (1 + 3 full step,
 *   3 + 1 + 3 half steps); the harness's counter shows it. So gsl-rk4 at step h
 *   is in effect RK4 at h/2 at 11/8 of its cost.
 * - The evolve object caches dydt at the current state (first-stage reuse).
 *   Whenever the state is set from outside (start, or the restore after a
 *   failure) the driver is reset, or GSL would step from a stale derivative.
 * - evolve's count and failed_steps count attempts. An accepted step is one
 *   evolve_apply returning success; rejections are the growth of failed_steps
 *   during that call.
 * - One evolve object lives across advance calls and the proposed step h is
 *   carried over, so splitting a run at sample times only adds the clamped
 *   steps: GSL's evolve leaves h alone on the step it clamps to t1.
 * - The system function calls the pb_force (the harness counts through it)
 *   and turns any failure into GSL_EBADFUNC, on which GSL stops; the pb_status
 *   is kept and returned, and the last good state is restored from our copy.
 * - msadams needs a driver (gsl_odeiv2_step_set_driver); all adaptive peers
 *   are built with gsl_odeiv2_driver_alloc_standard_new, which links step,
 *   control (standard: atol, rtol, a_y = 1, a_dydt = 0) and evolve, and are
 *   advanced by gsl_odeiv2_evolve_apply on the driver's parts, step by step. */

typedef struct gp_ws {
    const gsl_odeiv2_step_type *type;
    int fixed;                 /* 1: gsl-rk4 on the grid t0 + n h */
    int dim, n;
    pb_force f;
    pb_method_config cfg;
    gsl_odeiv2_system sys;     /* params points back at this workspace */
    gsl_odeiv2_driver *drv;    /* adaptive peers */
    gsl_odeiv2_step *step;     /* gsl-rk4 */
    double t, h, hmin;         /* t: time of the current state, on every path */
    pb_fixed_grid grid;        /* gsl-rk4: t0, h, the index of the current state */
    int fstatus;               /* pb_status of the last failed force call */
    double *y, *ygood, *yerr;
    double *din, *dout;        /* gsl-rk4: f at the step's start and end */
    int have_din;
    pb_method_stats st;
    pb_dense_span span;        /* the last step's ends (with f where GSL has it) */
} gp_ws;

static int gp_rhs(double t, const double y[], double dydt[], void *params)
{
    gp_ws *w = params;
    memcpy(dydt, y + w->dim, (size_t)w->dim * sizeof(double));
    int s = w->f.accel(w->f.ctx, t, y, y + w->dim, dydt + w->dim);
    if (s) {
        w->fstatus = s;
        return GSL_EBADFUNC;
    }
    return GSL_SUCCESS;
}

static void gp_free(void *ws)
{
    gp_ws *w = ws;
    if (!w)
        return;
    if (w->drv)
        gsl_odeiv2_driver_free(w->drv);
    if (w->step)
        gsl_odeiv2_step_free(w->step);
    free(w->y);
    free(w);
}

static void *gp_alloc(int dim, const gsl_odeiv2_step_type *type, int fixed)
{
    if (dim < 1 || dim > PB_STATE_DIM_MAX)
        return NULL;
    gp_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->type = type;
    w->fixed = fixed;
    w->dim = dim;
    w->n = 2 * dim;
    w->sys.function = gp_rhs;
    w->sys.jacobian = NULL;
    w->sys.dimension = (size_t)w->n;
    w->sys.params = w;
    w->y = calloc(5 * (size_t)w->n, sizeof(double));
    if (!w->y)
        goto fail;
    w->ygood = w->y + w->n;
    w->yerr = w->ygood + w->n;
    w->din = w->yerr + w->n;
    w->dout = w->din + w->n;
    if (fixed) {
        if (!(w->step = gsl_odeiv2_step_alloc(type, (size_t)w->n)))
            goto fail;
    } else {
        /* h, atol and rtol here are placeholders; start sets the real ones */
        w->drv = gsl_odeiv2_driver_alloc_standard_new(&w->sys, type, 1.0, 1e-6, 1e-6, 1.0, 0.0);
        if (!w->drv)
            goto fail;
    }
    return w;
fail:
    gp_free(w);
    return NULL;
}

static double gp_vnorm(const double *x, int d)
{
    double s = 0;
    for (int i = 0; i < d; i++)
        s += x[i] * x[i];
    return sqrt(s);
}

static int gp_start(void *ws, const pb_force *f, const pb_method_config *cfg, double t0,
                    const double *r0, const double *v0)
{
    gp_ws *w = ws;
    if (cfg->h < 0 || !isfinite(cfg->h) || cfg->min_step < 0 || cfg->max_steps < 0)
        return PB_EINVAL;
    w->f = *f;
    w->cfg = *cfg;
    w->t = t0;
    w->fstatus = PB_OK;
    memcpy(w->y, r0, (size_t)w->dim * sizeof(double));
    memcpy(w->y + w->dim, v0, (size_t)w->dim * sizeof(double));
    memcpy(w->ygood, w->y, (size_t)w->n * sizeof(double));
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    w->have_din = 0;
    pb_dense_start(&w->span, w->dim, t0, r0, v0, NULL);
    double scale = cfg->time_scale > 0 ? cfg->time_scale : 1.0;
    if (w->fixed) {
        if (!(cfg->h > 0))
            return PB_EINVAL;
        w->h = cfg->h;
        gsl_odeiv2_step_reset(w->step);
        pb_fixed_grid_init(&w->grid, t0, w->h, cfg->max_steps, w->y, w->y + w->dim, &w->st);
        return PB_OK;
    }
    if (!(cfg->atol >= 0) || !(cfg->rtol >= 0) || !(cfg->atol > 0 || cfg->rtol > 0) ||
        !isfinite(cfg->atol) || !isfinite(cfg->rtol))
        return PB_EINVAL;
    /* GSL's standard control takes one absolute tolerance. With atol = 0 it
     * would test a zero component (z of a planar orbit, a coordinate at a
     * crossing) purely relatively and collapse the step there, so atol = 0
     * becomes rtol times the smaller of |r0| and |v0| (1 if both are 0). */
    double atol = cfg->atol;
    if (!(atol > 0)) {
        double sr = gp_vnorm(r0, w->dim), sv = gp_vnorm(v0, w->dim);
        double sm = sr > 0 && sv > 0 ? fmin(sr, sv) : (sr > 0 ? sr : (sv > 0 ? sv : 1.0));
        atol = cfg->rtol * sm;
    }
    if (gsl_odeiv2_control_init(w->drv->c, atol, cfg->rtol, 1.0, 0.0) != GSL_SUCCESS)
        return PB_EINVAL;
    /* GSL has no automatic first step; a GSL user picks a fraction of the
     * time scale and lets the control adapt it (it shrinks by up to 5x a try). */
    w->h = cfg->h > 0 ? cfg->h : 1e-3 * scale;
    w->hmin = cfg->min_step > 0 ? cfg->min_step : 1e-12 * scale;
    gsl_odeiv2_driver_reset(w->drv);
    return PB_OK;
}

/* After a failure: back to the last good state and forget cached derivatives
 * (and msadams' history), which belong to the failed attempt. */
static int gp_fail(gp_ws *w, int gsl_status)
{
    memcpy(w->y, w->ygood, (size_t)w->n * sizeof(double));
    if (w->fixed)
        gsl_odeiv2_step_reset(w->step);
    else
        gsl_odeiv2_driver_reset(w->drv);
    w->st.t_fail = w->t;
    if (gsl_status == GSL_EBADFUNC)
        return w->fstatus ? w->fstatus : PB_EFORCE;
    /* GSL_FAILURE from evolve: the step could not be reduced any further */
    return gsl_status == GSL_FAILURE ? PB_EMINSTEP : PB_ENOCONV;
}

static int gp_check_finite(const gp_ws *w)
{
    for (int i = 0; i < w->n; i++)
        if (!isfinite(w->y[i]))
            return 0;
    return 1;
}

/* pb_fixed_step_fn for gsl-rk4: one gsl_odeiv2_step_apply; a failure
 * restores the last good state from ygood (gp_fail). */
static int gp_fixed_step(void *ctx, long n, double t, double t1)
{
    gp_ws *w = ctx;
    (void)n;
    w->t = t; /* the state's time, and t_fail if gp_fail restores it */
    /* f at the start is the last step's f at its end (GSL then skips that
     * evaluation), and f at the end is asked for: the same 11 evaluations a
     * step, the same result, and the accelerations the dense output needs */
    int s = gsl_odeiv2_step_apply(w->step, t, w->h, w->y, w->yerr, w->have_din ? w->din : NULL,
                                  w->dout, &w->sys);
    if (s != GSL_SUCCESS) {
        w->have_din = 0;
        return gp_fail(w, s);
    }
    if (!gp_check_finite(w)) {
        w->fstatus = PB_ENONFINITE;
        w->have_din = 0;
        return gp_fail(w, GSL_EBADFUNC);
    }
    memcpy(w->ygood, w->y, (size_t)w->n * sizeof(double));
    memcpy(w->din, w->dout, (size_t)w->n * sizeof(double));
    w->have_din = 1;
    w->t = t1;
    pb_dense_push(&w->span, t1, w->y, w->y + w->dim, w->dout + w->dim);
    return PB_OK;
}

static int gp_advance_adaptive(gp_ws *w, double t_out, pb_step_observer obs, void *octx)
{
    gsl_odeiv2_evolve *e = w->drv->e;
    if (!(t_out >= w->t))
        return PB_EINVAL;
    while (w->t < t_out) {
        /* between GSL calls; rejections inside one call are not interrupted,
         * but GSL ends its own retry loop when h stops shrinking */
        if (w->cfg.max_steps > 0 && w->st.steps + w->st.rejected >= w->cfg.max_steps)
            return PB_EMAXSTEPS;
        if (w->h < w->hmin) {
            w->st.t_fail = w->t;
            return PB_EMINSTEP;
        }
        unsigned long failed0 = e->failed_steps;
        double t = w->t, h_proposed = w->h;
        int s = gsl_odeiv2_evolve_apply(e, w->drv->c, w->drv->s, &w->sys, &t, t_out, &w->h,
                                        w->y);
        w->st.rejected += (long)(e->failed_steps - failed0);
        if (s != GSL_SUCCESS)
            return gp_fail(w, s);
        if (!gp_check_finite(w)) {
            w->fstatus = PB_ENONFINITE;
            return gp_fail(w, GSL_EBADFUNC);
        }
        /* GSL shortens a step that would pass t_out to end on it */
        if (t == t_out && h_proposed > t_out - w->t)
            w->st.output_cut++;
        w->t = t;
        memcpy(w->ygood, w->y, (size_t)w->n * sizeof(double));
        w->st.steps++;
        /* GSL's evolve leaves f at the new state in dydt_out (its steppers
         * all use dydt_in; checked for rkf45, rkck, rk8pd and msadams) */
        pb_dense_push(&w->span, t, w->y, w->y + w->dim, e->dydt_out + w->dim);
        if (obs && (s = obs(octx, w->t, w->y, w->y + w->dim)))
            return s;
    }
    return PB_OK;
}

static int gp_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    gp_ws *w = ws;
    return w->fixed ? pb_fixed_grid_advance(&w->grid, t_out, gp_fixed_step, w, obs, octx)
                    : gp_advance_adaptive(w, t_out, obs, octx);
}

static int gp_dense(const void *ws, double t, double *r, double *v)
{
    return pb_dense_eval(&((const gp_ws *)ws)->span, t, r, v);
}

static void gp_get_state(const void *ws, double *t, double *r, double *v)
{
    const gp_ws *w = ws;
    *t = w->t;
    memcpy(r, w->y, (size_t)w->dim * sizeof(double));
    memcpy(v, w->y + w->dim, (size_t)w->dim * sizeof(double));
}

static void gp_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const gp_ws *)ws)->st;
}

static void *gp_alloc_rk4(int dim) { return gp_alloc(dim, gsl_odeiv2_step_rk4, 1); }
static void *gp_alloc_rkf45(int dim) { return gp_alloc(dim, gsl_odeiv2_step_rkf45, 0); }
static void *gp_alloc_rkck(int dim) { return gp_alloc(dim, gsl_odeiv2_step_rkck, 0); }
static void *gp_alloc_rk8pd(int dim) { return gp_alloc(dim, gsl_odeiv2_step_rk8pd, 0); }
static void *gp_alloc_msadams(int dim) { return gp_alloc(dim, gsl_odeiv2_step_msadams, 0); }

/* Dense output: the quintic Hermite of each step's ends (GSL has none of its
 * own); order min(p - 1, 4), as for the leapfrog family (leapfrog.c). */
#define GP_OPS .start = gp_start, .advance = gp_advance, .get_state = gp_get_state, \
               .get_stats = gp_get_stats, .free = gp_free, .dense = gp_dense

const pb_method_type pb_method_gsl_rk4 = {
    PB_METHOD_RECORD_HEAD,
    .name = "gsl-rk4",
    .description = "GSL's rk4: classical RK4 with step doubling, keeps the two half "
                   "steps, 11 evaluations a step",
    .source = "GSL odeiv2 rk4; Abramowitz & Stegun 25.5.10",
    .order = 4,
    .dense_order = 3,
    .flags = PB_KIND_FIXED | PB_FROM_GSL,
    .alloc = gp_alloc_rk4,
    GP_OPS,
};

const pb_method_type pb_method_gsl_rkf45 = {
    PB_METHOD_RECORD_HEAD,
    .name = "gsl-rkf45",
    .description = "GSL's rkf45: Runge-Kutta-Fehlberg 4(5), standard control",
    .source = "GSL odeiv2 rkf45; Fehlberg (1969) NASA TR R-315",
    .order = 5,
    .dense_order = 4,
    .flags = PB_KIND_ADAPTIVE | PB_FROM_GSL,
    .alloc = gp_alloc_rkf45,
    GP_OPS,
};

const pb_method_type pb_method_gsl_rkck = {
    PB_METHOD_RECORD_HEAD,
    .name = "gsl-rkck",
    .description = "GSL's rkck: Cash-Karp 4(5), standard control",
    .source = "GSL odeiv2 rkck; Cash & Karp (1990)",
    .order = 5,
    .dense_order = 4,
    .flags = PB_KIND_ADAPTIVE | PB_FROM_GSL,
    .alloc = gp_alloc_rkck,
    GP_OPS,
};

const pb_method_type pb_method_gsl_rk8pd = {
    PB_METHOD_RECORD_HEAD,
    .name = "gsl-rk8pd",
    .description = "GSL's rk8pd: Prince-Dormand 8(7), standard control",
    .source = "GSL odeiv2 rk8pd; Prince & Dormand (1981)",
    .order = 8,
    .dense_order = 4,
    .flags = PB_KIND_ADAPTIVE | PB_FROM_GSL,
    .alloc = gp_alloc_rk8pd,
    GP_OPS,
};

const pb_method_type pb_method_gsl_msadams = {
    PB_METHOD_RECORD_HEAD,
    .name = "gsl-msadams",
    .description = "GSL's msadams: variable-order (1-12) Adams predictor-corrector, "
                   "standard control",
    .source = "GSL odeiv2 msadams: variable-coefficient Adams, Nordsieck form, P(EC)^m",
    .order = 12,
    .dense_order = 4,
    .flags = PB_KIND_ADAPTIVE | PB_KIND_MULTISTEP | PB_FROM_GSL,
    .alloc = gp_alloc_msadams,
    GP_OPS,
};
