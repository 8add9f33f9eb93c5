/* grid.c - the fixed-step grid shared by fixed-step methods.
 * Times are t0 + n*h from an integer step count, never a running sum of h,
 * so the clock itself accumulates no round-off over millions of steps. */
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
    /* t_out must be the grid point to within a few ulps of the elapsed time */
    double tol = 1e-9 * (fabs(x) + 1.0);
    if (fabs(x - (double)n) > tol)
        return -1;
    return n;
}
