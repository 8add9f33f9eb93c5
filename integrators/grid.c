/* grid.c - the fixed-step grid shared by fixed-step methods.
 * Times are t0 + n*h from an integer step count, never a running sum of h,
 * so the clock itself accumulates no round-off over millions of steps. */
#include <float.h>
#include <math.h>
#include "method.h"

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
