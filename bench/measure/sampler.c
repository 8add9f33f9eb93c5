/* sampler.c - log-spaced whole-period samples merged with the metric and plot
 * grids, or a caller's own times (a scored ephemeris's epochs). Invariant:
 * times are strictly increasing and all lie in (t0, t0 + horizon]; with a
 * fixed step they are exact grid points t0 + n*h. */
#include <float.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "bench/measure/sampler.h"

typedef struct { double x; int log, metric; } sampler_item; /* x: elapsed time */

static int sampler_cmp(const void *a, const void *b)
{
    double d = ((const sampler_item *)a)->x - ((const sampler_item *)b)->x;
    return (d > 0) - (d < 0);
}

int pb_sample_log_times(double horizon, double scale, double *x, int max)
{
    static const double mant[] = {1, 2, 3, 5, 7};
    int n = 0;
    /* elapsed units on which log samples are placed: whole periods, or for
     * problems without a period, fractions 1e-3 .. 1 of the horizon */
    double unit = scale, first = 1.0;
    if (!(scale > 0) || scale >= horizon * 0.999999) {
        unit = horizon;
        first = 1e-3;
    }
    for (double dec = first; dec * unit <= horizon * (1 + 1e-12) && n < max; dec *= 10)
        for (int j = 0; j < 5 && n < max; j++) {
            double k = mant[j] * dec;
            if (k * unit <= horizon * (1 + 1e-12))
                x[n++] = k * unit;
        }
    return n;
}

int pb_sample_plan_make(double t0, double horizon, double scale, double h,
                        int linear_samples, pb_sample_plan *plan)
{
    plan->n = 0;
    plan->t = NULL;
    plan->on_log_grid = NULL;
    plan->in_metrics = NULL;
    int cap = 5 * 40 + PB_METRIC_LINEAR + linear_samples + 2;
    sampler_item *it = malloc((size_t)cap * sizeof *it);
    if (!it)
        return -1;
    int n = 0;
    double lx[5 * 40];
    int nl = pb_sample_log_times(horizon, scale, lx, 5 * 40);
    for (int j = 0; j < nl; j++)
        it[n++] = (sampler_item){lx[j], 1, 1};
    for (int j = 1; j <= PB_METRIC_LINEAR; j++)
        it[n++] = (sampler_item){horizon * j / PB_METRIC_LINEAR, 0, 1};
    for (int j = 1; j <= linear_samples; j++)
        it[n++] = (sampler_item){horizon * j / linear_samples, 0, 0};
    it[n++] = (sampler_item){horizon, 0, 1};
    /* onto the grid, never past the horizon: the last grid point at or
     * before each time */
    if (h > 0)
        for (int j = 0; j < n; j++) {
            /* a quotient within rounding of a whole number is that number
             * (the slack must be relative: 1e7 steps carry 1e-9 of error) */
            double q = it[j].x / h, nq = nearbyint(q);
            if (fabs(q - nq) <= 8 * DBL_EPSILON * (fabs(q) + 1))
                q = nq;
            it[j].x = floor(q) * h;
        }
    qsort(it, (size_t)n, sizeof *it, sampler_cmp);
    /* merge equal times; a merged time keeps the flags either had */
    int m = 0;
    double eps = 1e-12 * horizon;
    for (int j = 0; j < n; j++) {
        if (!(it[j].x > eps))
            continue;
        if (m > 0 && fabs(it[j].x - it[m - 1].x) <= eps) {
            /* the time of a metric-grid point never depends on the plot grid:
             * of two merged times, the log or metric one is kept */
            int rank_j = 2 * it[j].log + it[j].metric, rank_m = 2 * it[m - 1].log + it[m - 1].metric;
            if (rank_j > rank_m)
                it[m - 1].x = it[j].x;
            it[m - 1].log |= it[j].log;
            it[m - 1].metric |= it[j].metric;
            continue;
        }
        it[m++] = it[j];
    }
    plan->t = malloc((size_t)(m > 0 ? m : 1) * sizeof(double));
    plan->on_log_grid = malloc((size_t)(m > 0 ? m : 1) * sizeof(int));
    plan->in_metrics = malloc((size_t)(m > 0 ? m : 1) * sizeof(int));
    if (!plan->t || !plan->on_log_grid || !plan->in_metrics) {
        free(it);
        pb_sample_plan_free(plan);
        return -1;
    }
    for (int j = 0; j < m; j++) {
        /* with a grid, t0 + n*h is exactly what the method computes */
        plan->t[j] = h > 0 ? t0 + (double)lround(it[j].x / h) * h : t0 + it[j].x;
        plan->on_log_grid[j] = it[j].log;
        plan->in_metrics[j] = it[j].metric;
    }
    plan->n = m;
    free(it);
    return 0;
}

void pb_sample_plan_free(pb_sample_plan *plan)
{
    free(plan->t);
    free(plan->on_log_grid);
    free(plan->in_metrics);
    plan->t = NULL;
    plan->on_log_grid = NULL;
    plan->in_metrics = NULL;
    plan->n = 0;
}

/* The given time nearest each log-spaced time, when it lies within half the
 * spacing of the times around it, serves that log time in the fits, so a
 * trajectory scored at its own epochs gets growth laws like a run's. */
static void sampler_mark_log(double t0, double horizon, double scale, pb_sample_plan *plan)
{
    double lx[200];
    int nl = pb_sample_log_times(horizon, scale, lx, 200), j = 0;
    for (int i = 0; i < nl && plan->n > 1; i++) {
        double want = t0 + lx[i];
        while (j + 1 < plan->n && fabs(plan->t[j + 1] - want) <= fabs(plan->t[j] - want))
            j++;
        double gap = j + 1 < plan->n ? plan->t[j + 1] - plan->t[j] : plan->t[j] - plan->t[j - 1];
        if (fabs(plan->t[j] - want) <= 0.5 * gap)
            plan->on_log_grid[j] = 1;
    }
}

int pb_sample_plan_given(const double *times, int n, double t0, double horizon, double scale,
                         pb_sample_plan *plan)
{
    int n1 = n > 0 ? n : 1;
    memset(plan, 0, sizeof *plan);
    plan->t = malloc((size_t)n1 * sizeof(double));
    plan->on_log_grid = calloc((size_t)n1, sizeof(int));
    plan->in_metrics = malloc((size_t)n1 * sizeof(int));
    if (!plan->t || !plan->on_log_grid || !plan->in_metrics) {
        pb_sample_plan_free(plan);
        return -1;
    }
    for (int k = 0; k < n; k++) {
        plan->t[k] = times[k];
        plan->in_metrics[k] = 1;
    }
    plan->n = n;
    sampler_mark_log(t0, horizon, scale, plan);
    return 0;
}
