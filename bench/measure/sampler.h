/* sampler.h - the sample times of a case: log-spaced whole periods (1, 2, 3,
 * 5, 7, 10, 20, ...) that the growth fits use and a fixed linear grid of
 * PB_METRIC_LINEAR points, which together are the metric grid, merged with
 * the linear grid asked for plots. The count grows with log(horizon), so
 * memory does not grow with it. */
#ifndef PB_SAMPLER_H
#define PB_SAMPLER_H

/* The metric grid's linear points: fixed, so that no maximum, final value
 * or fit depends on how many points a plot asks for (--samples). */
#define PB_METRIC_LINEAR 100

typedef struct pb_sample_plan {
    int n;
    double *t;          /* absolute times, increasing, last = end of horizon */
    int *on_log_grid;   /* 1 for log-spaced whole-period samples */
    int *in_metrics;    /* 1 for the metric grid (log grid, the PB_METRIC_LINEAR
                         * points, the horizon); 0 for points only plotted */
} pb_sample_plan;

/* The log-spaced elapsed times (1, 2, 3, 5, 7, 10, ... units of scale, or
 * 1e-3 .. 1 of the horizon when there is no period) up to the horizon, at
 * most max of them into x; returns how many. */
int pb_sample_log_times(double horizon, double scale, double *x, int max);

/* Plan samples from t0 over `horizon` time units. scale is the period (or, for
 * problems without one, the horizon itself). When h > 0 every time is put on
 * the grid t0 + n*h (n integer), as fixed-step methods need. Returns 0, or -1
 * when out of memory. Owner: the caller (pb_sample_plan_free). */
int pb_sample_plan_make(double t0, double horizon, double scale, double h,
                        int linear_samples, pb_sample_plan *plan);
/* A plan of the caller's times (increasing, absolute), all on the metric
 * grid; the one nearest each log-spaced time (within half the spacing
 * there) also on the log grid. 0, or -1 when out of memory. */
int pb_sample_plan_given(const double *times, int n, double t0, double horizon, double scale,
                         pb_sample_plan *plan);
void pb_sample_plan_free(pb_sample_plan *plan);

#endif
