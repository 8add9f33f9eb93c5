/* test_output_cut.c - adaptive methods count the steps they shorten to land
 * on an output time, the cost an output grid adds to their work-precision. */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "test_support.h"

/* Advance over one orbit of kepler-e0.5 at tolerance 1e-8 in `calls` equal
 * pieces. */
static pbt_result oc_run(const char *name, int calls)
{
    const pb_method_type *m = pb_method_find(name);
    cr_assert_not_null(m, "%s", name);
    pb_problem p;
    pbt_kepler(&p, 0.5);
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.rtol = cfg.atol = 1e-8;
    cfg.time_scale = p.period;
    pbt_result r = pbt_integrate_split(m, &p, &cfg, p.t0 + p.period, calls);
    cr_assert_eq(r.status, PB_OK, "%s", name);
    return r;
}

/* One call: at most the final step is cut. Many calls: every output time can
 * cost a cut step, never more than one each, and the extra steps show up in
 * the step count. (Bound by construction: one clamp per output time.) */
Test(output_cut, counted_per_output_time)
{
    static const char *const names[] = {"rkf45", "gsl-rkf45", "gsl-rkck", "gsl-rk8pd"};
    for (size_t i = 0; i < sizeof names / sizeof names[0]; i++) {
        pbt_result one = oc_run(names[i], 1), many = oc_run(names[i], 200);
        cr_log_info("%s: 1 output: %ld steps, %ld cut; 200 outputs: %ld steps, %ld cut", names[i],
                    one.steps, one.output_cut, many.steps, many.output_cut);
        cr_assert_leq(one.output_cut, 1, "%s", names[i]);
        cr_assert_leq(many.output_cut, 200, "%s", names[i]);
        /* at 1e-8 these take far fewer than 200 steps a period unforced, so
         * most output times must cut a step */
        cr_assert_lt(one.steps, 150, "%s: %ld steps", names[i], one.steps);
        cr_assert_geq(many.output_cut, 100, "%s", names[i]);
        cr_assert_geq(many.steps, 200, "%s", names[i]);
    }
}
