/* test_truth_shift.c - the truth moved by a few ulps of time (the harness
 * does so when a fixed-step grid ends an ulp short of the horizon, keeping
 * the reference's cache key independent of the step) agrees with the exact
 * two-body flow at the moved time. */
#include <criterion/criterion.h>
#include <math.h>
#include <quadmath.h>
#include "problems/catalogue.h"
#include "problems/truth.h"
#include "problems/twobody.h"

/* The exact flow (universal variables in __float128) at t and at t + dt
 * against the Taylor-shifted truth: an O(dt^3) error, far below the long
 * double truth's own 1e-19 relative rounding for dt of a few ulps. */
Test(truth_shift, matches_the_exact_flow_at_the_moved_time)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("kepler-e0.5", &p), PB_OK);
    double t[1] = {100 * p.period};
    double dt = -4 * (nextafter(t[0], INFINITY) - t[0]);
    pb_truth *tr = NULL;
    cr_assert_eq(pb_truth_build(&p, t, 1, NULL, &tr), PB_OK);
    pb_truth_shift(tr, 0, t[0], dt, &p);
    long double r[3], v[3];
    pb_truth_state(tr, 0, r, v);
    __float128 rq[3], vq[3];
    cr_assert_eq(p.exact_q(&p, t[0] + dt, rq, vq), PB_OK);
    for (int i = 0; i < 3; i++) {
        cr_expect(fabsl(r[i] - (long double)rq[i]) < 1e-18L, "r[%d] off by %Lg", i,
                  fabsl(r[i] - (long double)rq[i]));
        cr_expect(fabsl(v[i] - (long double)vq[i]) < 1e-18L, "v[%d] off by %Lg", i,
                  fabsl(v[i] - (long double)vq[i]));
    }
    /* and the shift moved it: the unshifted state differs by |v dt| */
    __float128 r0[3], v0[3];
    p.exact_q(&p, t[0], r0, v0);
    cr_assert(fabsl(r[1] - (long double)r0[1]) > 1e-15L);
    pb_truth_free(tr);
}
