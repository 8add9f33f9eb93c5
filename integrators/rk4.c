/* rk4.c - the classical fourth-order Runge-Kutta method, first-order form
 * y = (r, v). Source: Kutta (1901); tableau as in Abramowitz & Stegun 25.5.10.
 * Optional compensated (Kahan) summation of the state update. Time is t0 + n*h
 * from the integer step count, never a summed clock. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "method.h"

typedef struct rk4_ws {
    int dim, n;               /* n = 2*dim state values */
    pb_force f;
    pb_method_config cfg;
    double t0;
    long step;                /* grid index of the current state */
    double *y, *comp;         /* state and its Kahan compensation */
    double *k1, *k2, *k3, *k4, *ytmp;
    pb_method_stats st;
} rk4_ws;

static void *rk4_alloc(int dim)
{
    if (dim < 1 || dim > PB_DIM_MAX)
        return NULL;
    rk4_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->dim = dim;
    w->n = 2 * dim;
    w->y = calloc(7 * (size_t)w->n, sizeof(double));
    if (!w->y) {
        free(w);
        return NULL;
    }
    w->comp = w->y + w->n;
    w->k1 = w->comp + w->n;
    w->k2 = w->k1 + w->n;
    w->k3 = w->k2 + w->n;
    w->k4 = w->k3 + w->n;
    w->ytmp = w->k4 + w->n;
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
    w->t0 = t0;
    w->step = 0;
    memcpy(w->y, r0, (size_t)w->dim * sizeof(double));
    memcpy(w->y + w->dim, v0, (size_t)w->dim * sizeof(double));
    memset(w->comp, 0, (size_t)w->n * sizeof(double));
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    return PB_OK;
}

/* dy/dt = (v, a(t, r, v)) */
static int rk4_deriv(rk4_ws *w, double t, const double *y, double *dy)
{
    memcpy(dy, y + w->dim, (size_t)w->dim * sizeof(double));
    return w->f.accel(w->f.ctx, t, y, y + w->dim, dy + w->dim);
}

static int rk4_step(rk4_ws *w, double t, double h)
{
    int n = w->n, s, i;
    double *y = w->y, *yt = w->ytmp;
    if ((s = rk4_deriv(w, t, y, w->k1)))
        return s;
    for (i = 0; i < n; i++)
        yt[i] = y[i] + 0.5 * h * w->k1[i];
    if ((s = rk4_deriv(w, t + 0.5 * h, yt, w->k2)))
        return s;
    for (i = 0; i < n; i++)
        yt[i] = y[i] + 0.5 * h * w->k2[i];
    if ((s = rk4_deriv(w, t + 0.5 * h, yt, w->k3)))
        return s;
    for (i = 0; i < n; i++)
        yt[i] = y[i] + h * w->k3[i];
    if ((s = rk4_deriv(w, t + h, yt, w->k4)))
        return s;
    /* k1[i] is dead once inc is formed: it holds the new compensation until
     * the whole step is known finite, so a failed step leaves y and comp intact */
    for (i = 0; i < n; i++) {
        double inc = h / 6.0 * (w->k1[i] + 2.0 * (w->k2[i] + w->k3[i]) + w->k4[i]);
        if (w->cfg.compensated) {
            /* Kahan: carry the low-order bits the addition to y[i] drops */
            double dx = inc - w->comp[i];
            double sum = y[i] + dx;
            w->k1[i] = (sum - y[i]) - dx;
            yt[i] = sum;
        } else {
            yt[i] = y[i] + inc;
        }
        if (!isfinite(yt[i]))
            return PB_ENONFINITE;
    }
    memcpy(y, yt, (size_t)n * sizeof(double));
    if (w->cfg.compensated)
        memcpy(w->comp, w->k1, (size_t)n * sizeof(double));
    return PB_OK;
}

static int rk4_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    rk4_ws *w = ws;
    double h = w->cfg.h;
    long target = pb_grid_index(w->t0, h, t_out);
    if (target < w->step)
        return PB_EINVAL;
    while (w->step < target) {
        if (w->cfg.max_steps > 0 && w->st.steps >= w->cfg.max_steps)
            return PB_EMAXSTEPS;
        double t = w->t0 + (double)w->step * h;
        int s = rk4_step(w, t, h);
        if (s) {
            w->st.t_fail = t;
            return s;
        }
        w->step++;
        w->st.steps++;
        if (obs && (s = obs(octx, w->t0 + (double)w->step * h, w->y, w->y + w->dim)))
            return s;
    }
    return PB_OK;
}

static void rk4_get_state(const void *ws, double *t, double *r, double *v)
{
    const rk4_ws *w = ws;
    *t = w->t0 + (double)w->step * w->cfg.h;
    memcpy(r, w->y, (size_t)w->dim * sizeof(double));
    memcpy(v, w->y + w->dim, (size_t)w->dim * sizeof(double));
}

static void rk4_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const rk4_ws *)ws)->st;
}

const pb_method_type pb_method_rk4 = {
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
};
