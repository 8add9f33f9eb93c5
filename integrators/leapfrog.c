/* leapfrog.c - kick-drift-kick Stormer-Verlet, second order, symplectic and
 * time-reversible. Source: Verlet (1967); Hairer, Lubich & Wanner, Geometric
 * Numerical Integration (2006), Sec. I.1.4. One force evaluation a step: the
 * acceleration at the end of a step is the one that starts the next. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "method.h"

typedef struct leapfrog_ws {
    int dim;
    pb_force f;
    pb_method_config cfg;
    double t0;
    long step;
    double *r, *v, *a, *cr, *cv; /* state, acceleration at r, Kahan compensations */
    double *rn, *vn;
    int have_a;                  /* a holds a(r) for the current state */
    pb_method_stats st;
} leapfrog_ws;

static void *leapfrog_alloc(int dim)
{
    /* the step keeps PB_DIM_MAX-sized scratch on the stack */
    if (dim < 1 || dim > PB_DIM_MAX)
        return NULL;
    leapfrog_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->dim = dim;
    w->r = calloc(7 * (size_t)dim, sizeof(double));
    if (!w->r) {
        free(w);
        return NULL;
    }
    w->v = w->r + dim;
    w->a = w->v + dim;
    w->cr = w->a + dim;
    w->cv = w->cr + dim;
    w->rn = w->cv + dim;
    w->vn = w->rn + dim;
    return w;
}

static void leapfrog_free(void *ws)
{
    leapfrog_ws *w = ws;
    if (!w)
        return;
    free(w->r);
    free(w);
}

static int leapfrog_start(void *ws, const pb_force *f, const pb_method_config *cfg,
                          double t0, const double *r0, const double *v0)
{
    leapfrog_ws *w = ws;
    if (!(cfg->h > 0) || !isfinite(cfg->h))
        return PB_EINVAL;
    w->f = *f;
    w->cfg = *cfg;
    w->t0 = t0;
    w->step = 0;
    size_t sz = (size_t)w->dim * sizeof(double);
    memcpy(w->r, r0, sz);
    memcpy(w->v, v0, sz);
    memset(w->cr, 0, sz);
    memset(w->cv, 0, sz);
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    w->have_a = 0;
    return PB_OK;
}

/* x += inc, optionally with Kahan compensation c */
static inline double lf_add(double x, double inc, double *c, int compensated)
{
    if (!compensated)
        return x + inc;
    double d = inc - *c;
    double s = x + d;
    *c = (s - x) - d;
    return s;
}

static int leapfrog_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    leapfrog_ws *w = ws;
    int d = w->dim, s, i, comp = w->cfg.compensated;
    double h = w->cfg.h;
    long target = pb_grid_index(w->t0, h, t_out);
    if (target < w->step)
        return PB_EINVAL;
    if (w->step < target && !w->have_a) {
        double t = w->t0 + (double)w->step * h;
        if ((s = w->f.accel(w->f.ctx, t, w->r, w->v, w->a))) {
            w->st.t_fail = t;
            return s;
        }
        w->have_a = 1;
    }
    while (w->step < target) {
        if (w->cfg.max_steps > 0 && w->st.steps >= w->cfg.max_steps)
            return PB_EMAXSTEPS;
        double t = w->t0 + (double)w->step * h;
        double t1 = w->t0 + (double)(w->step + 1) * h;
        /* work on copies so that a failed step leaves the last good state */
        double crs[PB_DIM_MAX], cvs[PB_DIM_MAX];
        memcpy(crs, w->cr, (size_t)d * sizeof(double));
        memcpy(cvs, w->cv, (size_t)d * sizeof(double));
        for (i = 0; i < d; i++)
            w->vn[i] = lf_add(w->v[i], 0.5 * h * w->a[i], &cvs[i], comp);
        for (i = 0; i < d; i++)
            w->rn[i] = lf_add(w->r[i], h * w->vn[i], &crs[i], comp);
        double an[PB_DIM_MAX];
        if ((s = w->f.accel(w->f.ctx, t1, w->rn, w->vn, an))) {
            w->st.t_fail = t;
            return s;
        }
        for (i = 0; i < d; i++) {
            w->vn[i] = lf_add(w->vn[i], 0.5 * h * an[i], &cvs[i], comp);
            if (!isfinite(w->vn[i]) || !isfinite(w->rn[i])) {
                w->st.t_fail = t;
                return PB_ENONFINITE;
            }
        }
        memcpy(w->r, w->rn, (size_t)d * sizeof(double));
        memcpy(w->v, w->vn, (size_t)d * sizeof(double));
        memcpy(w->a, an, (size_t)d * sizeof(double));
        memcpy(w->cr, crs, (size_t)d * sizeof(double));
        memcpy(w->cv, cvs, (size_t)d * sizeof(double));
        w->step++;
        w->st.steps++;
        if (obs && (s = obs(octx, t1, w->r, w->v)))
            return s;
    }
    return PB_OK;
}

static void leapfrog_get_state(const void *ws, double *t, double *r, double *v)
{
    const leapfrog_ws *w = ws;
    *t = w->t0 + (double)w->step * w->cfg.h;
    memcpy(r, w->r, (size_t)w->dim * sizeof(double));
    memcpy(v, w->v, (size_t)w->dim * sizeof(double));
}

static void leapfrog_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const leapfrog_ws *)ws)->st;
}

const pb_method_type pb_method_leapfrog = {
    .name = "leapfrog",
    .description = "kick-drift-kick Stormer-Verlet, 1 evaluation a step",
    .source = "Verlet (1967); Hairer, Lubich & Wanner (2006) Sec. I.1.4",
    .order = 2,
    .flags = PB_KIND_FIXED | PB_KIND_SYMPLECTIC | PB_FORM_SECOND | PB_KIND_COMPENSABLE,
    .alloc = leapfrog_alloc,
    .start = leapfrog_start,
    .advance = leapfrog_advance,
    .get_state = leapfrog_get_state,
    .get_stats = leapfrog_get_stats,
    .free = leapfrog_free,
};
