/* growth.c - growth-law fits with GSL's linear least squares. */
#include <math.h>
#include <stdlib.h>
#include <gsl/gsl_fit.h>
#include "bench/measure/growth.h"

const char *pb_growth_class(double k)
{
    if (!isfinite(k))
        return "other";
    if (fabs(k) < 0.25)
        return "bounded";
    if (k >= 0.25 && k < 0.75)
        return "sqrt";
    if (k >= 0.75 && k <= 1.25)
        return "linear";
    if (k >= 1.75 && k <= 2.25)
        return "quadratic";
    return "other";
}

pb_growth pb_growth_fit(const double *t, const double *err, int n, double t_min)
{
    pb_growth g = {NAN, NAN, 0, "other", t_min};
    double *x = malloc((size_t)(n > 0 ? n : 1) * sizeof(double));
    double *y = malloc((size_t)(n > 0 ? n : 1) * sizeof(double));
    if (!x || !y)
        goto done;
    int m = 0;
    for (int i = 0; i < n; i++)
        if (t[i] >= t_min && t[i] > 0 && isfinite(err[i]) && err[i] > 0) {
            x[m] = log10(t[i]);
            y[m] = log10(err[i]);
            m++;
        }
    g.npoints = m;
    if (m < 3)
        goto done;
    double c0, c1, cov00, cov01, cov11, sumsq;
    gsl_fit_linear(x, 1, y, 1, (size_t)m, &c0, &c1, &cov00, &cov01, &cov11, &sumsq);
    g.k = c1;
    g.k_err = sqrt(cov11);
    g.cls = pb_growth_class(c1);
done:
    free(x);
    free(y);
    return g;
}
