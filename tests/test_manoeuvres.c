/* test_manoeuvres.c - impulsive manoeuvres: the reference trajectory against
 * the exact two-body flow cut at each burn (universal variables in
 * __float128, with the burn frame computed here), and the harness's runs
 * through them: whole steps per segment, the restart cost of a multistep
 * method, convergence of a fixed-step method at its order, and invariants
 * measured against the truth. */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include <quadmath.h>
#include "bench/measure/harness.h"
#include "problems/force_terms.h"
#include "problems/reference.h"
#include "problems/twobody.h"

/* Normalized circular orbit (mu = 1, r = 1) with three burns of our own
 * choosing: along-track, then radial and cross-track, then retrograde. */
static pb_problem burn_problem(void)
{
    pb_forces f;
    memset(&f, 0, sizeof f);
    f.n_manoeuvres = 3;
    f.manoeuvres[0] = (pb_manoeuvre){2.0, {0, 0.05, 0}};
    f.manoeuvres[1] = (pb_manoeuvre){5.5, {0.02, 0, 0.01}};
    f.manoeuvres[2] = (pb_manoeuvre){9.0, {0, -0.03, 0}};
    double r0[3] = {1, 0, 0}, v0[3] = {0, 1, 0};
    pb_problem p;
    pb_problem_init_forces(&p, "burns", "test", PB_UNITS_NORMALIZED, 1.0, 0.0, &f, r0, v0);
    return p;
}

/* dv in the radial, along-track (h x r direction) and cross-track (h)
 * directions of (r, v), in __float128. */
static void exact_burn(const pb_manoeuvre *m, const __float128 *r, __float128 *v)
{
    __float128 h[3] = {r[1] * v[2] - r[2] * v[1], r[2] * v[0] - r[0] * v[2], r[0] * v[1] - r[1] * v[0]};
    __float128 rn = sqrtq(r[0] * r[0] + r[1] * r[1] + r[2] * r[2]);
    __float128 hn = sqrtq(h[0] * h[0] + h[1] * h[1] + h[2] * h[2]), R[3], C[3], I[3];
    for (int i = 0; i < 3; i++)
        R[i] = r[i] / rn, C[i] = h[i] / hn;
    I[0] = C[1] * R[2] - C[2] * R[1];
    I[1] = C[2] * R[0] - C[0] * R[2];
    I[2] = C[0] * R[1] - C[1] * R[0];
    for (int i = 0; i < 3; i++)
        v[i] += m->dv[0] * R[i] + m->dv[1] * I[i] + m->dv[2] * C[i];
}

/* The exact state at t: Kepler arcs from burn to burn (a state at a burn's
 * own time is the one before it, as the harness and the reference define). */
static void exact_state(const pb_problem *p, double t, __float128 *r, __float128 *v)
{
    __float128 tc = 0, r0[3], v0[3];
    for (int i = 0; i < 3; i++)
        r0[i] = p->r0[i], v0[i] = p->v0[i];
    for (int k = 0; k < p->forces.n_manoeuvres && p->forces.manoeuvres[k].t < t; k++) {
        const pb_manoeuvre *m = &p->forces.manoeuvres[k];
        cr_assert_eq(pb_universal_propagate_q(1, r0, v0, m->t - tc, r, v), PB_OK);
        exact_burn(m, r, v);
        memcpy(r0, r, sizeof r0);
        memcpy(v0, v, sizeof v0);
        tc = m->t;
    }
    cr_assert_eq(pb_universal_propagate_q(1, r0, v0, t - tc, r, v), PB_OK);
}

/* The reference integrates through the burns to its own floor: against the
 * exact arcs it agrees to 1e-18 (long double output; the GBS tolerance is
 * 1e-28 per step), before, at and after each burn. */
Test(manoeuvres, reference_follows_the_burns)
{
    pb_problem p = burn_problem();
    double t[] = {1.0, 2.0, 3.0, 5.5, 7.0, 9.0, 12.0};
    int n = (int)(sizeof t / sizeof t[0]);
    long double r[7 * PB_DIM_MAX], v[7 * PB_DIM_MAX];
    cr_assert_eq(pb_reference_propagate(&p, t, n, 1e-28L, r, v, NULL), PB_OK);
    for (int k = 0; k < n; k++) {
        __float128 re[3], ve[3];
        exact_state(&p, t[k], re, ve);
        for (int i = 0; i < 3; i++) {
            cr_expect(fabsl(r[k * PB_DIM_MAX + i] - (long double)re[i]) < 1e-18L, "t %g r[%d]", t[k], i);
            cr_expect(fabsl(v[k * PB_DIM_MAX + i] - (long double)ve[i]) < 1e-18L, "t %g v[%d]", t[k], i);
        }
    }
    /* and a burn changes the orbit: the two-body flow without it is far off */
    __float128 r2[3], v2[3], r0[3] = {1, 0, 0}, v0[3] = {0, 1, 0};
    pb_universal_propagate_q(1, r0, v0, 12.0, r2, v2);
    cr_assert(fabsl(r[6 * PB_DIM_MAX] - (long double)r2[0]) > 1e-2L);
}

static pb_case_spec burn_spec(const char *method, int spo, double tol)
{
    pb_case_spec s;
    pb_case_spec_default(&s);
    s.problem = burn_problem();
    s.method = pb_method_find(method);
    cr_assert_not_null(s.method);
    s.steps_per_orbit = spo;
    s.tolerance = tol;
    s.orbits = 2;         /* 4 pi: past all three burns */
    s.repeats = 0;
    s.linear_samples = 10;
    s.cache_dir = NULL;
    return s;
}

/* A fixed-step method takes whole steps in each segment, the step shortened
 * to ceil(segment / h): with h = 2 pi / 200 the segments [0, 2], [2, 5.5],
 * [5.5, 9] and [9, 4 pi] take 64, 112, 112 and 114 steps (computed here:
 * 63.7, 111.4, 111.4 and 113.5 rounded up). */
Test(manoeuvres, fixed_step_segments_in_whole_steps)
{
    pb_case_spec s = burn_spec("rk4", 200, 0);
    pb_case_result res;
    cr_assert_eq(pb_case_run(&s, &res), PB_OK);
    cr_assert_str_eq(res.status_name, "ok");
    cr_expect_eq(res.steps, 64 + 112 + 112 + 114, "steps %ld", res.steps);
    cr_expect(fabs(res.t_end - 4 * M_PI) < 1e-12);
    pb_case_result_free(&res);
}

/* RK4 through the burns still converges at order 4: doubling the steps
 * divides the final position error by 16 (common practice: observed order
 * within 0.3 of the method's). */
Test(manoeuvres, rk4_converges_at_order_four_through_burns)
{
    double err[2];
    for (int j = 0; j < 2; j++) {
        pb_case_spec s = burn_spec("rk4", 400 << j, 0);
        pb_case_result res;
        cr_assert_eq(pb_case_run(&s, &res), PB_OK);
        cr_assert_str_eq(res.status_name, "ok");
        err[j] = res.pos_err_final;
        pb_case_result_free(&res);
    }
    double order = log2(err[0] / err[1]);
    cr_expect(fabs(order - 4) < 0.3, "observed order %g (errors %g, %g)", order, err[0], err[1]);
}

/* A multistep method starts again after every burn and the start is paid
 * again: four segments cost four start-ups. */
Test(manoeuvres, multistep_restart_is_counted)
{
    pb_case_spec s = burn_spec("gauss-jackson8", 400, 0);
    pb_case_result res;
    cr_assert_eq(pb_case_run(&s, &res), PB_OK);
    cr_assert_str_eq(res.status_name, "ok");
    pb_case_spec s1 = s;
    s1.problem.forces.n_manoeuvres = 0;
    s1.problem.invariants_from_truth = 0;
    pb_case_result one;
    cr_assert_eq(pb_case_run(&s1, &one), PB_OK);
    cr_assert(one.startup_steps > 0);
    cr_expect_eq(res.startup_steps, 4 * one.startup_steps, "%ld vs 4 x %ld", res.startup_steps,
                 one.startup_steps);
    pb_case_result_free(&res);
    pb_case_result_free(&one);
}

/* The burns change the energy by about 10%, yet an accurate run's energy
 * error, measured against the truth's energy at the same time, stays at its
 * integration error. */
Test(manoeuvres, invariants_measured_against_the_truth)
{
    pb_case_spec s = burn_spec("rkf45", 0, 1e-11);
    pb_case_result res;
    cr_assert_eq(pb_case_run(&s, &res), PB_OK);
    cr_assert_str_eq(res.status_name, "ok");
    cr_expect(res.energy_rel_max < 1e-7, "energy_rel_max %g", res.energy_rel_max);
    cr_expect(res.angmom_rel_max < 1e-7, "angmom_rel_max %g", res.angmom_rel_max);
    cr_expect(res.pos_err_final < 1e-6, "pos_err_final %g", res.pos_err_final);
    pb_case_result_free(&res);
}
