/* test_dense.c - dense output: the Hermite helper reproduces the polynomials
 * it must (Hermite interpolation is exact for degree 5 with values, first and
 * second derivatives at both ends, and for degree 3 with values and first
 * derivatives: textbook, e.g. Burden & Faires, Numerical Analysis, Sec. 3.4;
 * common practice), and every fixed-step method's dense output converges at
 * its stated order inside a step. */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "integrators/method.h"
#include "propbench/dense.h"
#include "bench/measure/force_counter.h"
#include "problems/twobody.h"
#include "test_support.h"

/* x(t) = sum c_k t^k and its first two derivatives */
static void poly(const double *c, int deg, double t, double *x, double *dx, double *ddx)
{
    *x = *dx = *ddx = 0;
    for (int k = deg; k >= 0; k--) {
        *ddx = *ddx * t + 2 * *dx;
        *dx = *dx * t + *x;
        *x = *x * t + c[k];
    }
}

Test(dense, hermite_is_exact_on_the_polynomials_it_must_be)
{
    static const double c5[6] = {0.3, -1.1, 0.7, 2.0, -0.9, 0.45};  /* degree 5 */
    static const double c6[7] = {0.3, -1.1, 0.7, 2.0, -0.9, 0.45, 1.3}; /* degree 6 */
    double t0 = 0.4, t1 = 1.1;
    for (int with_a = 0; with_a < 2; with_a++) {
        for (int deg = 3; deg <= 6; deg++) {
            const double *c = deg == 6 ? c6 : c5;
            double cc[7] = {0};
            memcpy(cc, c, (size_t)(deg + 1) * sizeof(double));
            double r0, v0, a0, r1, v1, a1;
            poly(cc, deg, t0, &r0, &v0, &a0);
            poly(cc, deg, t1, &r1, &v1, &a1);
            pb_dense_span s;
            pb_dense_start(&s, 1, t0, &r0, &v0, with_a ? &a0 : NULL);
            pb_dense_push(&s, t1, &r1, &v1, with_a ? &a1 : NULL);
            double worst = 0;
            for (int j = 1; j < 20; j++) {
                double t = t0 + (t1 - t0) * j / 20.0, r, v, x, dx, ddx;
                cr_assert_eq(pb_dense_eval(&s, t, &r, &v), PB_OK);
                poly(cc, deg, t, &x, &dx, &ddx);
                worst = fmax(worst, fmax(fabs(r - x), fabs(v - dx)));
            }
            int exact = deg <= (with_a ? 5 : 3);
            if (exact)
                cr_assert_lt(worst, 1e-14, "degree %d, with a %d: %g", deg, with_a, worst);
            else
                cr_assert_gt(worst, 1e-6, "degree %d, with a %d cannot be exact: %g", deg, with_a,
                             worst);
        }
    }
    /* the ends exactly, and nothing outside the step */
    double r0 = 1, v0 = 2, r1 = 3, v1 = 4, r, v;
    pb_dense_span s;
    pb_dense_start(&s, 1, 0, &r0, &v0, NULL);
    cr_assert_eq(pb_dense_eval(&s, 0.5, &r, &v), PB_EINVAL);
    pb_dense_push(&s, 1, &r1, &v1, NULL);
    cr_assert_eq(pb_dense_eval(&s, 1, &r, &v), PB_OK);
    cr_assert(r == 3 && v == 4);
    cr_assert_eq(pb_dense_eval(&s, 0, &r, &v), PB_OK);
    cr_assert(r == 1 && v == 2);
    cr_assert_eq(pb_dense_eval(&s, 1.5, &r, &v), PB_EINVAL);
    cr_assert_eq(pb_dense_eval(&s, -0.1, &r, &v), PB_EINVAL);
}

static int dense_observe(void *ctx, double t, const double *r, const double *v)
{
    double *ends = ctx;
    (void)r;
    (void)v;
    ends[0] = ends[1];
    ends[1] = t;
    return 0;
}

/* Error of m's dense output at 37% into the last step of an advance to
 * (step + 1) h (that is, into step `step`, 0-based, for a method on the t
 * grid) of the e = 0.5 Kepler orbit at n steps per orbit, against the exact
 * solution. */
static double dense_error(const pb_method_type *m, int n, int step)
{
    pb_problem p;
    pbt_kepler(&p, 0.5);
    pb_force_counter cnt;
    pb_force f;
    pb_force_counter_init(&cnt, &p, &f);
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = p.period / n;
    cfg.time_scale = p.period;
    cfg.mu = pb_problem_kepler_mu(&p);
    void *ws = m->alloc(p.dim);
    cr_assert_not_null(ws);
    cr_assert_eq(m->start(ws, &f, &cfg, p.t0, p.r0, p.v0), PB_OK);
    /* the last step's ends as the observer sees them: on the grid, or where
     * a method stepping in a fictitious time (leapfrog-tt) put them */
    double ends[2] = {p.t0, p.t0};
    cr_assert_eq(m->advance(ws, p.t0 + (step + 1) * cfg.h, dense_observe, ends), PB_OK);
    double hs = ends[1] - ends[0];
    double t = ends[0] + 0.37 * hs, r[3], v[3], re[3], ve[3];
    cr_assert_eq(m->dense(ws, t, r, v), PB_OK, "%s", m->name);
    /* outside the last step: refused, not extrapolated */
    cr_assert_eq(m->dense(ws, ends[0] - 0.5 * hs, r + 0, v + 0) == PB_EINVAL || step == 0, 1);
    cr_assert_eq(m->dense(ws, t, r, v), PB_OK);
    cr_assert_eq(p.exact(&p, t, re, ve), PB_OK);
    m->free(ws);
    double e = 0;
    for (int i = 0; i < 3; i++)
        e = fmax(e, fmax(fabs(r[i] - re[i]), fabs(v[i] - ve[i])));
    return e;
}

/* Inside a step the dense output's error is O(h^(q+1)), q its stated dense
 * order (the velocity from a Hermite interpolant carries the ends' position
 * errors divided by h, hence q = min(p - 1, 4) for the interpolated methods):
 * measured by halving the step (400 -> 800 steps per orbit) in the second
 * step, where every method has the accelerations of both ends, and found no
 * lower than q + 1 - 0.4. Measured here: rk4 4.01, leapfrog 2.00, yoshida4
 * 3.74, yoshida6 6.23 (its interpolation term, O(h^6), still leads), yoshida8
 * 5.03, gsl-rk4 4.01, gauss-jackson8 5.14 (after its start-up, step 10),
 * gauss-legendre 5.03 (collocation polynomial, q = s = 4). gauss-legendre12's
 * error at 400 steps is 8e-15, round-off, so it is measured at 100 -> 200:
 * 1.3e-10, 9.1e-13, 7.11 (q = s = 6). */
Test(dense, fixed_step_methods_converge_at_their_stated_dense_order, .timeout = 60)
{
    for (const pb_method_type *const *mp = pb_method_table; *mp; mp++) {
        const pb_method_type *m = *mp;
        /* a Kepler-splitting map is exact on this orbit, dense output too
         * (round-off at any step): tests/test_kepler_split.c measures its
         * dense order on the perturbed revolving orbit */
        if (!(m->flags & PB_KIND_FIXED) || (m->flags & PB_KIND_KEPLER))
            continue;
        int step = (m->flags & PB_KIND_MULTISTEP) ? 10 : 1;
        int q = m->dense_order, n = 400;
        double e1 = dense_error(m, n, step);
        /* where 400 steps already put the dense error near round-off, halve
         * the steps until it is 1e-11 or more, so that truncation leads */
        while (e1 < 1e-11 && n > 25) {
            n /= 2;
            e1 = dense_error(m, n, step);
        }
        double e2 = dense_error(m, 2 * n, 2 * step + 1);
        double k = log2(e1 / e2);
        cr_log_info("%s: dense errors %.3e %.3e at %d -> %d steps, local order %.2f (want %d)",
                    m->name, e1, e2, n, 2 * n, k, q + 1);
        cr_assert(k > q + 1 - 0.4, "%s: local order %.2f, stated dense order %d gives %d",
                  m->name, k, m->dense_order, q + 1);
    }
}
