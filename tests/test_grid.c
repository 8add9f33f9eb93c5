/* test_grid.c - the fixed-step grid: t0 + n*h is found again from the time a
 * caller asks for, and a time off the grid is refused however many steps in
 * (method.h: advance reaches t_out exactly or returns PB_EINVAL). */
#include <criterion/criterion.h>
#include <math.h>
#include "integrators/method.h"

Test(grid, finds_grid_points_and_refuses_others)
{
    const double t0s[] = {0.0, 1234.5, -7.25};
    const double hs[] = {2 * M_PI / 1000, 27.76728, 1e-3};
    const long ns[] = {1, 7, 1000, 1000000, 100000000};
    for (int a = 0; a < 3; a++)
        for (int b = 0; b < 3; b++)
            for (int c = 0; c < 5; c++) {
                double t0 = t0s[a], h = hs[b];
                long n = ns[c];
                double t = t0 + (double)n * h; /* as every fixed-step method computes it */
                cr_assert_eq(pb_grid_index(t0, h, t), n, "t0=%g h=%g n=%ld", t0, h, n);
                /* a thousandth of a step off is another time, not this grid point */
                cr_assert_eq(pb_grid_index(t0, h, t + 1e-3 * h), -1, "t0=%g h=%g n=%ld", t0, h, n);
                cr_assert_eq(pb_grid_index(t0, h, t - 1e-3 * h), -1, "t0=%g h=%g n=%ld", t0, h, n);
            }
    cr_assert_eq(pb_grid_index(0, -1, 1), -1);
    cr_assert_eq(pb_grid_index(0, 1, NAN), -1);
    cr_assert_eq(pb_grid_index(0, 1, -3), -1);
}
