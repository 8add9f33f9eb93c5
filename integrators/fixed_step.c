/* fixed_step.c - the fixed-step grid and the advance loop that rk4, the
 * leapfrog family, gsl-rk4 and Gauss-Jackson share (see fixed_step.h).
 * Times are t0 + n*h from an integer step count, never a running sum of h,
 * so the clock itself accumulates no round-off over millions of steps. */
#include <float.h>
#include <math.h>
#include "integrators/fixed_step.h"

long pb_grid_index(double t0, double h, double t_out)
{
    if (!(h > 0) || !isfinite(t_out))
        return -1;
    double x = (t_out - t0) / h;
    if (x < -0.5)
        return -1;
    long n = lround(x);
    /* t_out must be the grid point t0 + n*h to within the rounding of that
     * sum and of the division above: a few ulps of |t0| + |t_out|, in steps */
    double tol = 8 * DBL_EPSILON * (fabs(x) + (fabs(t0) + fabs(t_out)) / h + 1.0);
    if (fabs(x - (double)n) > tol)
        return -1;
    return n;
}

void pb_fixed_grid_init(pb_fixed_grid *g, double t0, double h, long max_steps,
                        const double *r, const double *v, pb_method_stats *st)
{
    g->t0 = t0;
    g->h = h;
    g->n = 0;
    g->max_steps = max_steps;
    g->r = r;
    g->v = v;
    g->st = st;
}

int pb_fixed_grid_advance(pb_fixed_grid *g, double t_out, pb_fixed_step_fn step, void *ctx,
                          pb_step_observer obs, void *obs_ctx)
{
    long target = pb_grid_index(g->t0, g->h, t_out); /* -1 when off the grid */
    if (target < g->n)
        return PB_EINVAL;
    while (g->n < target) {
        /* checked before the step, so the state left is the last one taken */
        if (g->max_steps > 0 && g->st->steps >= g->max_steps)
            return PB_EMAXSTEPS;
        double t = pb_fixed_grid_time(g, g->n), t1 = pb_fixed_grid_time(g, g->n + 1);
        int s = step(ctx, g->n, t, t1);
        if (s) {
            g->st->t_fail = t;
            return s;
        }
        g->n++;
        g->st->steps++;
        if (obs && (s = obs(obs_ctx, t1, g->r, g->v)))
            return s;
    }
    return PB_OK;
}
