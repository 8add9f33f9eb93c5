/* growth.h - the growth law of an error series: least-squares slope k of
 * log(error) against log(t), its standard error, and a class. */
#ifndef PB_GROWTH_H
#define PB_GROWTH_H

#include "bench/measure/case.h"

/* Fit over the points with t >= t_min whose error is finite and positive
 * (GSL's gsl_fit_linear). Fewer than 3 points: k = NaN, class "other". */
pb_growth pb_growth_fit(const double *t, const double *err, int n, double t_min);

/* "bounded" |k| < 0.25, "sqrt" 0.25..0.75, "linear" 0.75..1.25,
 * "quadratic" 1.75..2.25, else "other" (t^1.5, Brouwer's along-track law, is "other"). */
const char *pb_growth_class(double k);

#endif
