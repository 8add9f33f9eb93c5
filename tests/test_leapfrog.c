/* test_leapfrog.c - leapfrog: observed order on the e = 0.6 Kepler problem, and
 * its bounded energy error over 10^4 orbits against RK4's drift (the Kepler
 * experiments of Hairer, Lubich & Wanner 2006, Ch. I). */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "test_support.h"
#include "bench/measure/force_counter.h"
#include "problems/twobody.h"

extern const pb_method_type pb_method_leapfrog;
extern const pb_method_type pb_method_rk4;

static double lft_error(const pb_problem *p, int steps_per_orbit, double orbits)
{
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = p->period / steps_per_orbit;
    pbt_result res = pbt_integrate(&pb_method_leapfrog, p, &cfg, orbits * p->period);
    cr_assert_eq(res.status, PB_OK, "leapfrog failed: %s", pb_strerror(res.status));
    /* one evaluation a step plus the one that starts the run */
    cr_assert_eq(res.evals, (long)(orbits * steps_per_orbit) + 1);
    return pbt_pos_error(p, &res);
}

/* Measured here over one orbit: orders 2.009, 2.004, 2.001 for 200 -> 1600
 * steps per orbit; the check uses 800 -> 1600. */
Test(leapfrog, observed_order_kepler_e06)
{
    pb_problem p;
    pbt_kepler(&p, 0.6);
    double e1 = lft_error(&p, 800, 1.0);
    double e2 = lft_error(&p, 1600, 1.0);
    double order = log(e1 / e2) / log(2.0);
    /* order 2 within 0.3 (common practice, REFERENCES.md "Orders of accuracy") */
    cr_assert(fabs(order - 2.0) <= 0.3, "observed order %.3f (errors %.3e, %.3e)", order,
              e1, e2);
}

/* Measured here, e = 0.6, 200 steps per orbit, 10^4 orbits (0.1 s and 0.2 s):
 * leapfrog max energy error 7.35e-3 over both ranges (ratio 1.000); RK4
 * 6.65e-3 over the first 10^3 orbits and 6.82e-2 over the rest (ratio 10.3,
 * linear drift: the late window ends 10 times later). */
Test(leapfrog, energy_bounded_rk4_drifts)
{
    pb_problem p;
    pbt_kepler(&p, 0.6);
    long orbits = 10000;
    pbt_energy_split lf = pbt_energy_split_run(&pb_method_leapfrog, &p, 200, orbits);
    pbt_energy_split rk = pbt_energy_split_run(&pb_method_rk4, &p, 200, orbits);
    /* symplectic: energy error bounded, no secular drift (Hairer, Lubich &
     * Wanner 2006, Ch. I); bound: late max within a factor 2 of early max */
    cr_assert(lf.max_late <= 2.0 * lf.max_early, "leapfrog energy %.3e then %.3e",
              lf.max_early, lf.max_late);
    /* the bound is about truncation, not round-off: the error is O(h^2) (same
     * source), measured here 7.35e-3, far above the 1e-13 round-off level */
    cr_assert(lf.max_early > 1e-4 && lf.max_early < 3e-2, "leapfrog energy %.3e",
              lf.max_early);
    /* non-symplectic RK4: energy error grows ~linearly in t (same source), so
     * a window ending 10x later must show a clearly larger max (measured 10.3) */
    cr_assert(rk.max_late >= 5.0 * rk.max_early, "rk4 energy %.3e then %.3e",
              rk.max_early, rk.max_late);
}
