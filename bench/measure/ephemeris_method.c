/* ephemeris_method.c - the ephemeris pseudo-method (ephemeris_method.h).
 * Dense output: the cubic Hermite interpolant (propbench/dense.h) through
 * the positions and velocities of the two records around t (common practice
 * for ephemeris interpolation between state vectors). */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "bench/measure/ephemeris_method.h"
#include "propbench/dense.h"

static _Thread_local const pb_ephemeris *ephemeris_bound;

typedef struct ephemeris_ws {
    const pb_ephemeris *e;
    int i;                    /* last record reached (-1: at the start) */
    double t0, r0[3], v0[3];
    pb_method_stats st;
} ephemeris_ws;

void pb_ephemeris_bind(const pb_ephemeris *e)
{
    ephemeris_bound = e;
}

void pb_ephemeris_free(pb_ephemeris *e)
{
    if (!e)
        return;
    free(e->t);
    free(e->r);
    free(e->v);
    memset(e, 0, sizeof *e);
}

static void *ephemeris_alloc(int dim)
{
    if (!ephemeris_bound || dim < 1 || dim > 3)
        return NULL;
    ephemeris_ws *w = calloc(1, sizeof *w);
    if (w)
        w->e = ephemeris_bound;
    return w;
}

static int ephemeris_start(void *ws, const pb_force *f, const pb_method_config *cfg,
                           double t0, const double *r0, const double *v0)
{
    (void)cfg;
    ephemeris_ws *w = ws;
    w->i = -1;
    w->t0 = t0;
    memset(&w->st, 0, sizeof w->st);
    for (int k = 0; k < 3; k++)
        w->r0[k] = k < f->dim ? r0[k] : 0, w->v0[k] = k < f->dim ? v0[k] : 0;
    return w->e->n > 0 ? 0 : PB_EINVAL;
}

/* t and u the same time within round-off of the larger */
static int ephemeris_same(double t, double u)
{
    return fabs(t - u) <= 8e-16 * fmax(1.0, fmax(fabs(t), fabs(u)));
}

static int ephemeris_advance(void *ws, double t_out, pb_step_observer obs, void *ctx)
{
    ephemeris_ws *w = ws;
    const pb_ephemeris *e = w->e;
    while (w->i + 1 < e->n && (e->t[w->i + 1] <= t_out || ephemeris_same(e->t[w->i + 1], t_out))) {
        w->i++;
        w->st.steps++;
        int s = obs ? obs(ctx, e->t[w->i], e->r + 3 * w->i, e->v + 3 * w->i) : 0;
        if (s) {
            w->st.t_fail = e->t[w->i];
            return s;
        }
    }
    if (w->i < 0 || !ephemeris_same(e->t[w->i], t_out))
        return PB_EINVAL; /* the ephemeris does not reach t_out */
    return 0;
}

static void ephemeris_get_state(const void *ws, double *t, double *r, double *v)
{
    const ephemeris_ws *w = ws;
    int i = w->i;
    *t = i < 0 ? w->t0 : w->e->t[i];
    for (int k = 0; k < 3; k++) {
        r[k] = i < 0 ? w->r0[k] : w->e->r[3 * i + k];
        v[k] = i < 0 ? w->v0[k] : w->e->v[3 * i + k];
    }
}

static void ephemeris_get_stats(const void *ws, pb_method_stats *st)
{
    *st = ((const ephemeris_ws *)ws)->st;
}

static void ephemeris_free(void *ws)
{
    free(ws);
}

static int ephemeris_dense(const void *ws, double t, double *r, double *v)
{
    const ephemeris_ws *w = ws;
    const pb_ephemeris *e = w->e;
    int i = w->i;
    if (i < 0)
        return PB_EINVAL;
    if (t == e->t[i] || ephemeris_same(t, e->t[i])) {
        memcpy(r, e->r + 3 * i, 3 * sizeof(double));
        memcpy(v, e->v + 3 * i, 3 * sizeof(double));
        return 0;
    }
    if (i == 0 || t < e->t[i - 1] || t > e->t[i])
        return PB_EINVAL;
    /* the two records around t as the ends of a step, through the Hermite
     * interpolant every method without its own dense output uses (cubic:
     * the records have no accelerations) */
    pb_dense_span span;
    pb_dense_start(&span, 3, e->t[i - 1], e->r + 3 * (i - 1), e->v + 3 * (i - 1), NULL);
    pb_dense_push(&span, e->t[i], e->r + 3 * i, e->v + 3 * i, NULL);
    return pb_dense_eval(&span, t, r, v);
}

const pb_method_type pb_method_ephemeris = {
    PB_METHOD_RECORD_HEAD,
    .name = "ephemeris",
    .description = "a trajectory read from an ephemeris file (CCSDS OEM), replayed",
    .source = "CCSDS 502.0-B-3 Orbit Data Messages; cubic Hermite between records",
    .order = 3,
    .flags = PB_KIND_ADAPTIVE,
    .alloc = ephemeris_alloc,
    .start = ephemeris_start,
    .advance = ephemeris_advance,
    .get_state = ephemeris_get_state,
    .get_stats = ephemeris_get_stats,
    .free = ephemeris_free,
    .dense = ephemeris_dense,
    .dense_order = 3,
};
