/* force_counter.c - counting, finiteness-checking force wrapper. */
#include <math.h>
#include "bench/measure/force_counter.h"

static int counter_accel(void *ctx, double t, const double *r, const double *v, double *a)
{
    pb_force_counter *c = ctx;
    c->evals++;
    int s = c->accel(c->problem, t, r, v, a);
    if (s)
        return s;
    int ok = 1;
    for (int i = 0; i < c->dim; i++)
        ok &= isfinite(a[i]);
    if (!ok) {
        if (!c->saw_nonfinite) {
            c->saw_nonfinite = 1;
            c->t_nonfinite = t;
        }
        return PB_ENONFINITE;
    }
    return PB_OK;
}

void pb_force_counter_init(pb_force_counter *c, const pb_problem *p, pb_force *f)
{
    c->problem = p;
    c->accel = p->accel;
    c->dim = p->dim;
    c->evals = 0;
    c->t_nonfinite = 0;
    c->saw_nonfinite = 0;
    f->accel = counter_accel;
    f->ctx = c;
    f->dim = p->dim;
}
