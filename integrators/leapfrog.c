/* leapfrog.c - the kick-drift-kick Stormer-Verlet leapfrog and Yoshida's
 * symmetric compositions of it, orders 4, 6 ("solution A") and 8 ("solution
 * D"). Sources: Verlet (1967); Hairer, Lubich & Wanner (2006) Sec. I.1.4;
 * Yoshida (1990), Physics Letters A 150, 262. Leapfrog is the composition of
 * one substep; where substeps meet their half-kicks merge, so s substeps cost
 * s force evaluations a step (the last one starts the next step). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "integrators/fixed_step.h"
#include "integrators/yoshida_coeffs.h"
#include "propbench/dense.h"

#define YOSHIDA_STAGES_MAX PB_YOSHIDA_STAGES_MAX

/* One composition: c[0..s-1] are the substep fractions of h (they sum to 1). */
typedef struct yoshida_scheme {
    int s;
    double c[YOSHIDA_STAGES_MAX];
} yoshida_scheme;

/* A state with everything a step carries: position, velocity, a(r) and the
 * Kahan compensations of r and v. */
typedef struct yoshida_state {
    double *r, *v, *a, *cr, *cv;
} yoshida_state;

/* Three states by pointer, rotated after each step instead of copied: a step
 * reads `cur` and writes `next` (so a failure leaves the last good state),
 * and the step before stays in `prev` for the dense output. */
typedef struct yoshida_ws {
    int dim;
    pb_force f;
    pb_method_config cfg;
    yoshida_scheme sch;       /* built in start from the w table */
    double kick[YOSHIDA_STAGES_MAX + 1]; /* merged kick fractions b_0..b_s */
    double tfrac[YOSHIDA_STAGES_MAX];    /* time fraction reached by drift j */
    pb_fixed_grid grid;       /* t0, h, the index of the current state */
    yoshida_state buf[3];
    yoshida_state *cur, *prev, *next;
    int have_a;
    pb_method_stats st;
} yoshida_ws;

/* Build the sequence w_k..w_1, w0, w_1..w_k from w[1..k]; w0 = 1 - 2 sum. */
static yoshida_scheme yoshida_make(int k, const double *w)
{
    yoshida_scheme sc;
    memset(&sc, 0, sizeof sc);
    sc.s = pb_yoshida_sequence(k, w, sc.c);
    return sc;
}

static void *yoshida_alloc(int dim)
{
    if (dim < 1 || dim > PB_STATE_DIM_MAX)
        return NULL;
    yoshida_ws *w = calloc(1, sizeof *w);
    if (!w)
        return NULL;
    w->dim = dim;
    double *p = calloc(15 * (size_t)dim, sizeof(double));
    if (!p) {
        free(w);
        return NULL;
    }
    for (int k = 0; k < 3; k++, p += 5 * dim)
        w->buf[k] = (yoshida_state){p, p + dim, p + 2 * dim, p + 3 * dim, p + 4 * dim};
    return w;
}

static void yoshida_free(void *ws)
{
    yoshida_ws *w = ws;
    if (!w)
        return;
    free(w->buf[0].r);
    free(w);
}

static int yoshida_start_with(void *ws, int k, const double *wk, const pb_force *f,
                              const pb_method_config *cfg, double t0, const double *r0,
                              const double *v0)
{
    yoshida_ws *w = ws;
    if (!(cfg->h > 0) || !isfinite(cfg->h))
        return PB_EINVAL;
    w->f = *f;
    w->cfg = *cfg;
    w->sch = yoshida_make(k, wk);
    const yoshida_scheme *sch = &w->sch;
    int s = sch->s;
    double acc = 0;
    w->kick[0] = 0.5 * sch->c[0];
    for (int j = 1; j < s; j++)
        w->kick[j] = 0.5 * (sch->c[j - 1] + sch->c[j]);
    w->kick[s] = 0.5 * sch->c[s - 1];
    for (int j = 0; j < s; j++) {
        acc += sch->c[j];
        w->tfrac[j] = acc;
    }
    size_t sz = (size_t)w->dim * sizeof(double);
    w->cur = &w->buf[0];
    w->prev = &w->buf[1];
    w->next = &w->buf[2];
    memcpy(w->cur->r, r0, sz);
    memcpy(w->cur->v, v0, sz);
    memset(w->cur->cr, 0, sz);
    memset(w->cur->cv, 0, sz);
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    w->have_a = 0;
    pb_fixed_grid_init(&w->grid, t0, cfg->h, cfg->max_steps, w->cur->r, w->cur->v, &w->st);
    return PB_OK;
}

/* x += inc, optionally with Kahan compensation c (true value ~ x - c) */
static inline double yoshida_add(double x, double inc, double *c, int compensated)
{
    if (!compensated)
        return x + inc;
    double d = inc - *c;
    double s = x + d;
    *c = (s - x) - d;
    return s;
}

/* One composed step from `in` into `out` (in is only read, so a failure
 * leaves the last good state). The first substep reads in, the others work
 * in place on out: no copy of the state is made. */
static int yoshida_step(const yoshida_ws *w, const yoshida_state *in, yoshida_state *out,
                        double t, double t1, double h)
{
    int d = w->dim, s = w->sch.s, i, j, st;
    const double *r = in->r, *v = in->v, *a = in->a;
    double *rn = out->r, *vn = out->v;
    if (w->cfg.compensated) {
        for (i = 0; i < d; i++) {
            out->cr[i] = in->cr[i];
            out->cv[i] = in->cv[i];
        }
    }
    for (j = 0; j < s; j++) {
        double kh = w->kick[j] * h, dh = w->sch.c[j] * h;
        if (w->cfg.compensated) {
            for (i = 0; i < d; i++)
                vn[i] = yoshida_add(v[i], kh * a[i], &out->cv[i], 1);
            for (i = 0; i < d; i++)
                rn[i] = yoshida_add(r[i], dh * vn[i], &out->cr[i], 1);
        } else {
            for (i = 0; i < d; i++)
                vn[i] = v[i] + kh * a[i];
            for (i = 0; i < d; i++)
                rn[i] = r[i] + dh * vn[i];
        }
        /* the last drift ends exactly on the grid time t1 */
        double tj = (j == s - 1) ? t1 : t + w->tfrac[j] * h;
        if ((st = w->f.accel(w->f.ctx, tj, rn, vn, out->a)))
            return st;
        r = rn, v = vn, a = out->a;
    }
    double kh = w->kick[s] * h;
    for (i = 0; i < d; i++) {
        vn[i] = yoshida_add(vn[i], kh * a[i], &out->cv[i], w->cfg.compensated);
        if (!isfinite(vn[i]) || !isfinite(rn[i]))
            return PB_ENONFINITE;
    }
    return PB_OK;
}

/* pb_fixed_step_fn: a(r) at the first step of a run (each step's last force
 * is the next one's first), then one composed step, committed whole by
 * rotating the three states. */
static int yoshida_fixed_step(void *ctx, long n, double t, double t1)
{
    yoshida_ws *w = ctx;
    int s;
    (void)n;
    if (!w->have_a) {
        if ((s = w->f.accel(w->f.ctx, t, w->cur->r, w->cur->v, w->cur->a)))
            return s;
        w->have_a = 1;
    }
    if ((s = yoshida_step(w, w->cur, w->next, t, t1, w->grid.h)))
        return s;
    yoshida_state *old = w->prev;
    w->prev = w->cur;
    w->cur = w->next;
    w->next = old;
    w->grid.r = w->cur->r;
    w->grid.v = w->cur->v;
    return PB_OK;
}

/* The last step's ends with a(r) at both, put together only when asked
 * (the same span pb_dense_push would have kept after every step). */
static int yoshida_dense(const void *ws, double t, double *r, double *v)
{
    const yoshida_ws *w = ws;
    const pb_fixed_grid *g = &w->grid;
    pb_dense_span sp;
    if (g->n == 0) {
        pb_dense_start(&sp, w->dim, g->t0, w->cur->r, w->cur->v, w->have_a ? w->cur->a : NULL);
    } else {
        pb_dense_start(&sp, w->dim, pb_fixed_grid_time(g, g->n - 1), w->prev->r, w->prev->v,
                       w->prev->a);
        pb_dense_push(&sp, pb_fixed_grid_time(g, g->n), w->cur->r, w->cur->v, w->cur->a);
    }
    return pb_dense_eval(&sp, t, r, v);
}

static int yoshida_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    yoshida_ws *w = ws;
    return pb_fixed_grid_advance(&w->grid, t_out, yoshida_fixed_step, w, obs, octx);
}

static void yoshida_get_state(const void *ws, double *t, double *r, double *v)
{
    const yoshida_ws *w = ws;
    *t = pb_fixed_grid_time(&w->grid, w->grid.n);
    memcpy(r, w->cur->r, (size_t)w->dim * sizeof(double));
    memcpy(v, w->cur->v, (size_t)w->dim * sizeof(double));
}

static void yoshida_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const yoshida_ws *)ws)->st;
}

/* A composition's start (k pairs of weights w[1..k]) and its type record. */
/* Dense output is the quintic Hermite interpolant of the step's ends (r, v
 * and a(r) at both). Its velocity, the interpolant's derivative, carries the
 * ends' O(h^(p+1)) position errors divided by h: local error O(h^min(p, 5)),
 * so its order is min(p - 1, 4) (measured in tests/test_dense.c). */
#define LEAPFROG_COMPOSITION(NAME, K, W, ORDER, DESC, SRC)                       \
    static int NAME##_start(void *ws, const pb_force *f, const pb_method_config *cfg, \
                            double t0, const double *r0, const double *v0)       \
    {                                                                           \
        return yoshida_start_with(ws, K, W, f, cfg, t0, r0, v0);                \
    }                                                                           \
    const pb_method_type pb_method_##NAME = {                                   \
        PB_METHOD_RECORD_HEAD,                                                  \
        .name = #NAME,                                                          \
        .description = DESC,                                                    \
        .source = SRC,                                                          \
        .order = ORDER,                                                         \
        .flags = PB_KIND_FIXED | PB_KIND_SYMPLECTIC | PB_FORM_SECOND | PB_KIND_COMPENSABLE, \
        .alloc = yoshida_alloc,                                                 \
        .start = NAME##_start,                                                  \
        .advance = yoshida_advance,                                             \
        .get_state = yoshida_get_state,                                         \
        .get_stats = yoshida_get_stats,                                         \
        .free = yoshida_free,                                                   \
        .dense = yoshida_dense,                                                 \
        .dense_order = (ORDER) - 1 < 4 ? (ORDER) - 1 : 4,                       \
    }

/* Leapfrog is the composition of one substep (w0 = 1). */
LEAPFROG_COMPOSITION(leapfrog, 0, NULL, 2, "kick-drift-kick Stormer-Verlet, 1 evaluation a step",
                     "Verlet (1967); Hairer, Lubich & Wanner (2006) Sec. I.1.4");
LEAPFROG_COMPOSITION(yoshida4, 1, pb_yoshida4_w, 4,
                     "Yoshida order-4 leapfrog composition, 3 evaluations a step",
                     "Yoshida (1990), Physics Letters A 150, 262");
LEAPFROG_COMPOSITION(yoshida6, 3, pb_yoshida6_w, 6,
                     "Yoshida order-6 leapfrog composition, 7 evaluations a step",
                     "Yoshida (1990), Physics Letters A 150, 262");
LEAPFROG_COMPOSITION(yoshida8, 7, pb_yoshida8_w, 8,
                     "Yoshida order-8 leapfrog composition, 15 evaluations a step",
                     "Yoshida (1990), Physics Letters A 150, 262");
