/* ralston3.c - an example plug-in: Ralston's third-order Runge-Kutta method,
 * built against propbench's public headers alone:
 *
 *     cc -shared -fPIC $(pkg-config --cflags propbench) ralston3.c -o ralston3.so
 *     propbench run --plugin ./ralston3.so --method ralston3 --problem kepler-e0.5
 *
 * Source: A. Ralston, "Runge-Kutta methods with minimum error bounds",
 * Math. Comp. 16 (1962) 431-437; tableau c = (0, 1/2, 3/4), a21 = 1/2,
 * a32 = 3/4, b = (2/9, 1/3, 4/9). Three evaluations a step. Dense output:
 * the cubic Hermite of each step's ends (pb_dense_span without end
 * accelerations), order 2 = min(p - 1, 4). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <propbench/propbench.h>
#include <propbench/plugin.h>

enum { R3_DIM_MAX = 3 };

typedef struct ralston3_ws {
    int dim;
    pb_force f;
    pb_method_config cfg;
    double t0, h;
    long n;                          /* grid index of the current state */
    double y[2 * R3_DIM_MAX];        /* (r, v) */
    pb_method_stats st;
    pb_dense_span span;
} ralston3_ws;

static void *ralston3_alloc(int dim)
{
    if (dim < 1 || dim > R3_DIM_MAX)
        return NULL;
    ralston3_ws *w = calloc(1, sizeof *w);
    if (w)
        w->dim = dim;
    return w;
}

static void ralston3_free(void *ws)
{
    free(ws);
}

static int ralston3_start(void *ws, const pb_force *f, const pb_method_config *cfg, double t0,
                          const double *r0, const double *v0)
{
    ralston3_ws *w = ws;
    if (!(cfg->h > 0) || !isfinite(cfg->h))
        return PB_EINVAL;
    w->f = *f;
    w->cfg = *cfg;
    w->t0 = t0;
    w->h = cfg->h;
    w->n = 0;
    memcpy(w->y, r0, (size_t)w->dim * sizeof *r0);
    memcpy(w->y + w->dim, v0, (size_t)w->dim * sizeof *v0);
    memset(&w->st, 0, sizeof w->st);
    w->st.t_fail = t0;
    pb_dense_start(&w->span, w->dim, t0, r0, v0, NULL);
    return PB_OK;
}

/* k = y' = (v, a(t, r, v)) at y */
static int ralston3_deriv(const ralston3_ws *w, double t, const double *y, double *k)
{
    memcpy(k, y + w->dim, (size_t)w->dim * sizeof *k);
    return w->f.accel(w->f.ctx, t, y, y + w->dim, k + w->dim);
}

/* One step from the state at time t; the state changes only when the step
 * succeeds and its result is finite. */
static int ralston3_step(ralston3_ws *w, double t, double h)
{
    int n2 = 2 * w->dim, s, ok = 1;
    double k1[2 * R3_DIM_MAX], k2[2 * R3_DIM_MAX], k3[2 * R3_DIM_MAX];
    double ys[2 * R3_DIM_MAX], yn[2 * R3_DIM_MAX];
    if ((s = ralston3_deriv(w, t, w->y, k1)))
        return s;
    for (int i = 0; i < n2; i++)
        ys[i] = w->y[i] + 0.5 * h * k1[i];
    if ((s = ralston3_deriv(w, t + 0.5 * h, ys, k2)))
        return s;
    for (int i = 0; i < n2; i++)
        ys[i] = w->y[i] + 0.75 * h * k2[i];
    if ((s = ralston3_deriv(w, t + 0.75 * h, ys, k3)))
        return s;
    for (int i = 0; i < n2; i++) {
        yn[i] = w->y[i] + h * (2.0 / 9.0 * k1[i] + 1.0 / 3.0 * k2[i] + 4.0 / 9.0 * k3[i]);
        ok &= isfinite(yn[i]);
    }
    if (!ok)
        return PB_ENONFINITE;
    memcpy(w->y, yn, (size_t)n2 * sizeof *yn);
    return PB_OK;
}

static int ralston3_advance(void *ws, double t_out, pb_step_observer obs, void *octx)
{
    ralston3_ws *w = ws;
    long target = pb_grid_index(w->t0, w->h, t_out);
    if (target < w->n)
        return PB_EINVAL;
    while (w->n < target) {
        if (w->cfg.max_steps > 0 && w->st.steps >= w->cfg.max_steps)
            return PB_EMAXSTEPS;
        double t = w->t0 + (double)w->n * w->h;
        double t1 = w->t0 + (double)(w->n + 1) * w->h;  /* time as t0 + n h */
        int s = ralston3_step(w, t, t1 - t);
        if (s) {
            w->st.t_fail = t;
            return s;
        }
        w->n++;
        w->st.steps++;
        w->st.t_fail = t1;
        pb_dense_push(&w->span, t1, w->y, w->y + w->dim, NULL);
        if (obs && (s = obs(octx, t1, w->y, w->y + w->dim)))
            return s;
    }
    return PB_OK;
}

static void ralston3_get_state(const void *ws, double *t, double *r, double *v)
{
    const ralston3_ws *w = ws;
    *t = w->t0 + (double)w->n * w->h;
    memcpy(r, w->y, (size_t)w->dim * sizeof *r);
    memcpy(v, w->y + w->dim, (size_t)w->dim * sizeof *v);
}

static void ralston3_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const ralston3_ws *)ws)->st;
}

static int ralston3_dense(const void *ws, double t, double *r, double *v)
{
    return pb_dense_eval(&((const ralston3_ws *)ws)->span, t, r, v);
}

static const pb_method_type ralston3 = {
    PB_METHOD_RECORD_HEAD,
    .name = "ralston3",
    .description = "Ralston's third-order Runge-Kutta, 3 evaluations a step (plug-in)",
    .source = "Ralston (1962), Math. Comp. 16, 431",
    .order = 3,
    .flags = PB_KIND_FIXED,
    .alloc = ralston3_alloc,
    .start = ralston3_start,
    .advance = ralston3_advance,
    .get_state = ralston3_get_state,
    .get_stats = ralston3_get_stats,
    .free = ralston3_free,
    .dense = ralston3_dense,
    .dense_order = 2,
};

static const pb_method_type *const ralston3_methods[] = {&ralston3, NULL};

static const pb_method_pack ralston3_pack = {
    PB_METHOD_PACK_HEAD,
    .version = "1.0",
    .methods = ralston3_methods,
};

const pb_method_pack *pb_plugin_open(void)
{
    return &ralston3_pack;
}
