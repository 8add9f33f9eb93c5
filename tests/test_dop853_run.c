/* test_dop853_run.c - DOP853 as it runs: tolerance proportionality, the
 * evaluation count (12 a step, 3 more once in a step where dense output is
 * asked for), rejected steps, a velocity-dependent force, its cost against
 * GSL's rk8pd at equal error, split advance calls and a restart
 * (tests/test_dop853.c: the scheme's coefficients and orders). */
#include <criterion/criterion.h>
#include <criterion/logging.h>
#include <gsl/gsl_fit.h>
#include <math.h>
#include <string.h>
#include "test_support.h"
#include "bench/measure/force_counter.h"

extern const pb_method_type pb_method_dop853, pb_method_gsl_rk8pd;

#define TD_TWO_PI 6.283185307179586

static pb_method_config td_cfg(double tol, double time_scale)
{
    pb_method_config c = {0};
    c.atol = tol;
    c.rtol = tol;
    c.time_scale = time_scale;
    return c;
}

/* Tolerance proportionality (HNW I, II.4; common practice): with a per-step
 * control on an O(h^8) estimate and the 8th-order solution kept, the global
 * error goes as tol^(9/8) / tol^(1/8) = tol. Measured here, kepler-e0.5, 3
 * orbits, tol 1e-6 .. 1e-13: errors 137 .. 35 tol, least-squares slope 1.10
 * (the estimate's own order nears 8 from above as the step shrinks).
 * Asserted: slope in [0.9, 1.25], every error within 1e3 tol and above
 * tol / 10. */
Test(dop853, tolerance_proportionality_kepler_e05)
{
    pb_problem p;
    pbt_kepler(&p, 0.5);
    double lx[8], ly[8];
    for (int k = 0; k < 8; k++) {
        double tol = pow(10.0, -(6 + k));
        pb_method_config c = td_cfg(tol, p.period);
        pbt_result r = pbt_integrate(&pb_method_dop853, &p, &c, 3 * p.period);
        cr_assert_eq(r.status, PB_OK);
        double err = pbt_pos_error(&p, &r);
        cr_log_info("dop853 e=0.5 3 orbits tol %.0e: error %.3e, steps %ld, rejected %ld, "
                    "evals %ld", tol, err, r.steps, r.rejected, r.evals);
        cr_assert(err < 1e3 * tol && err > 0.1 * tol, "tol %g: error %g", tol, err);
        lx[k] = log10(tol);
        ly[k] = log10(err);
    }
    double c0, c1, v00, v01, v11, ss;
    gsl_fit_linear(lx, 1, ly, 1, 8, &c0, &c1, &v00, &v01, &v11, &ss);
    cr_log_info("dop853 tolerance proportionality slope %.3f", c1);
    cr_assert(c1 >= 0.9 && c1 <= 1.25, "slope %.3f outside [0.9, 1.25]", c1);
}

/* Counts dense-output calls at the given fractions of every step. */
typedef struct td_probe {
    const pb_method_type *m;
    void *ws;
    double t_prev;
    int nfrac;
    const double *frac;
    long calls;
} td_probe;

static int td_probe_obs(void *ctx, double t, const double *r, const double *v)
{
    (void)r;
    (void)v;
    td_probe *pr = ctx;
    for (int q = 0; q < pr->nfrac; q++) {
        double rr[3], vv[3], ts = pr->t_prev + pr->frac[q] * (t - pr->t_prev);
        if (pr->m->dense(pr->ws, ts, rr, vv) != PB_OK)
            return PB_EINVAL;
        pr->calls++;
    }
    pr->t_prev = t;
    return 0;
}

/* e = 0.9, tol 1e-8, two orbits, with dense output asked at nfrac points of
 * every step: evaluations, steps and rejections. */
static void td_count_run(int nfrac, const double *frac, long *evals, pb_method_stats *st)
{
    pb_problem p;
    pbt_kepler(&p, 0.9);
    pb_force_counter cnt;
    pb_force f;
    pb_force_counter_init(&cnt, &p, &f);
    pb_method_config c = td_cfg(1e-8, p.period);
    void *ws = pb_method_dop853.alloc(3);
    cr_assert_not_null(ws);
    td_probe pr = {&pb_method_dop853, ws, 0, nfrac, frac, 0};
    cr_assert_eq(pb_method_dop853.start(ws, &f, &c, 0, p.r0, p.v0), PB_OK);
    cr_assert_eq(pb_method_dop853.advance(ws, 2 * p.period, td_probe_obs, &pr), PB_OK);
    pb_method_dop853.get_stats(ws, st);
    pb_method_dop853.free(ws);
    *evals = cnt.evals;
    cr_assert_eq(pr.calls, nfrac * st->steps);
}

/* Accounting (HNW's DOP853, FSAL): an attempt costs 11 new evaluations
 * (stages 2..12), an accepted step one more, f at its new state, which is
 * the next step's first stage; plus f at the initial state and one for the
 * starting step (HNW I, II.4). So 12 a step, 11 a rejection. Dense output
 * adds 3 in each step where it is asked for inside the step, once however
 * often; at the step's ends it costs nothing. e = 0.9 makes the control
 * reject some steps on the way into periapsis (measured: 97 steps, 17
 * rejected); the harness's counter must agree with the formula. */
Test(dop853, evaluations_per_step_and_rejections)
{
    long e0, e1, e2, e3;
    pb_method_stats s0, s1, s2, s3;
    const double inside[2] = {0.37, 0.81}, ends[2] = {0.0, 1.0};
    td_count_run(0, NULL, &e0, &s0);
    cr_log_info("dop853 e=0.9 tol 1e-8, 2 orbits: steps %ld, rejected %ld, evals %ld",
                s0.steps, s0.rejected, e0);
    cr_assert_geq(s0.rejected, 1);
    cr_assert_eq(e0, 11 * (s0.steps + s0.rejected) + s0.steps + 2);
    td_count_run(1, inside, &e1, &s1);
    td_count_run(2, inside, &e2, &s2);
    td_count_run(2, ends, &e3, &s3);
    /* the integration is the same whatever is asked of the dense output */
    cr_assert(s1.steps == s0.steps && s2.steps == s0.steps && s3.steps == s0.steps);
    cr_assert(s1.rejected == s0.rejected && s2.rejected == s0.rejected);
    cr_assert_eq(e1, e0 + 3 * s0.steps);
    cr_assert_eq(e2, e0 + 3 * s0.steps);
    cr_assert_eq(e3, e0);
}

/* A velocity-dependent force with a closed form: the damped oscillator
 * r'' = -w^2 r - 2 g v, underdamped (g < w), per component
 * x(t) = e^(-g t) (x0 cos(wd t) + (v0 + g x0)/wd sin(wd t)), wd = sqrt(w^2 -
 * g^2) (textbook). w = 1, g = 0.1. */
static int td_damped_accel(const pb_problem *p, double t, const double *r, const double *v,
                           double *a)
{
    (void)p;
    (void)t;
    for (int i = 0; i < 3; i++)
        a[i] = -r[i] - 0.2 * v[i];
    return PB_OK;
}

static void td_damped_exact(const double *r0, const double *v0, double t, double *r, double *v)
{
    const double g = 0.1, wd = sqrt(1 - g * g);
    double ex = exp(-g * t), c = cos(wd * t), s = sin(wd * t);
    for (int i = 0; i < 3; i++) {
        double B = (v0[i] + g * r0[i]) / wd;
        r[i] = ex * (r0[i] * c + B * s);
        v[i] = ex * (-g * (r0[i] * c + B * s) + wd * (-r0[i] * s + B * c));
    }
}

typedef struct td_damped_obs {
    void *ws;
    double t_prev, worst;
    const double *r0, *v0;
} td_damped_obs;

static int td_damped_probe(void *ctx, double t, const double *r, const double *v)
{
    (void)r;
    (void)v;
    td_damped_obs *o = ctx;
    double ts = 0.5 * (o->t_prev + t), rr[3], vv[3], re[3], ve[3];
    if (pb_method_dop853.dense(o->ws, ts, rr, vv))
        return PB_EINVAL;
    td_damped_exact(o->r0, o->v0, ts, re, ve);
    for (int i = 0; i < 3; i++)
        o->worst = fmax(o->worst, fmax(fabs(rr[i] - re[i]), fabs(vv[i] - ve[i])));
    o->t_prev = t;
    return 0;
}

/* First-order form: the force may depend on v. Five periods at tol 1e-10;
 * measured here: final error 1.0e-11, dense output at mid-steps 2.4e-11.
 * Allowed 1e-8 (tolerance proportionality above: ~1e2 tol on Kepler). */
Test(dop853, velocity_dependent_force)
{
    cr_assert_eq(pb_method_dop853.flags & PB_FORM_SECOND, 0);
    pb_problem p;
    pbt_kepler(&p, 0.0);
    p.accel = td_damped_accel;
    p.velocity_dependent = 1;
    p.exact = NULL;
    p.exact_q = NULL;
    const double r0[3] = {1, 0, 0.5}, v0[3] = {0, 1, -0.3}, tend = 5 * TD_TWO_PI;
    pb_force_counter cnt;
    pb_force f;
    pb_force_counter_init(&cnt, &p, &f);
    pb_method_config c = td_cfg(1e-10, TD_TWO_PI);
    void *ws = pb_method_dop853.alloc(3);
    cr_assert_not_null(ws);
    td_damped_obs o = {ws, 0, 0, r0, v0};
    cr_assert_eq(pb_method_dop853.start(ws, &f, &c, 0, r0, v0), PB_OK);
    cr_assert_eq(pb_method_dop853.advance(ws, tend, td_damped_probe, &o), PB_OK);
    double t, r[3], v[3], re[3], ve[3], e = 0;
    pb_method_dop853.get_state(ws, &t, r, v);
    pb_method_dop853.free(ws);
    td_damped_exact(r0, v0, t, re, ve);
    for (int i = 0; i < 3; i++)
        e = fmax(e, fmax(fabs(r[i] - re[i]), fabs(v[i] - ve[i])));
    cr_log_info("dop853 damped oscillator: final error %.3e, dense %.3e", e, o.worst);
    cr_assert(e <= 1e-8 && o.worst <= 1e-8, "final %.3e, dense %.3e", e, o.worst);
}

/* The work-precision line of m on kepler-e0.5 over 100 orbits: least
 * squares of log10 evaluations against log10 final position error, over
 * tolerances 1e-7 .. 1e-13 in quarter decades. */
static void td_work_line(const pb_method_type *m, double *c0, double *c1)
{
    pb_problem p;
    pbt_kepler(&p, 0.5);
    double le[25], lc[25];
    for (int k = 0; k < 25; k++) {
        pb_method_config c = td_cfg(pow(10.0, -7 - 0.25 * k), p.period);
        pbt_result r = pbt_integrate(m, &p, &c, 100 * p.period);
        cr_assert_eq(r.status, PB_OK);
        le[k] = log10(pbt_pos_error(&p, &r));
        lc[k] = log10((double)r.evals);
    }
    double v00, v01, v11, ss;
    gsl_fit_linear(le, 1, lc, 1, 25, c0, c1, &v00, &v01, &v11, &ss);
}

/* Issue 14's goal: no more evaluations than GSL's rk8pd (Prince & Dormand's
 * RK8(7)13M with GSL's standard control, the peer of the same order) at equal
 * error, kepler-e0.5, 100 orbits. Both work-precision lines are fitted over
 * the same tolerances and compared at errors 1e-4 .. 1e-8, inside both
 * ranges. Measured here: dop853/rk8pd = 0.958 .. 0.966 (with HNW's code
 * defaults, safety 0.9 and no PI term, it was 1.13 .. 1.02: see dop853.c). */
Test(dop853, no_more_evaluations_than_gsl_rk8pd_at_equal_error, .timeout = 30)
{
    double a0, a1, b0, b1;
    td_work_line(&pb_method_dop853, &a0, &a1);
    td_work_line(&pb_method_gsl_rk8pd, &b0, &b1);
    for (int e = -4; e >= -8; e--) {
        double ratio = pow(10.0, (a0 + a1 * e) - (b0 + b1 * e));
        cr_log_info("dop853/gsl-rk8pd evaluations at error 1e%d: %.3f", e, ratio);
        cr_assert(ratio <= 1.0, "at error 1e%d dop853 needs %.3f times rk8pd's evaluations", e,
                  ratio);
    }
}

Test(dop853, split_advance_keeps_the_step_proposal)
{
    /* 200 sample times clamp at most one step each and leave the proposal
     * alone (method.h); both runs end within the tolerance's error level */
    pb_problem p;
    pbt_kepler(&p, 0.5);
    pb_method_config c = td_cfg(1e-10, p.period);
    pbt_result one = pbt_integrate(&pb_method_dop853, &p, &c, 5 * p.period);
    pbt_result split = pbt_integrate_split(&pb_method_dop853, &p, &c, 5 * p.period, 200);
    cr_assert_eq(one.status, PB_OK);
    cr_assert_eq(split.status, PB_OK);
    cr_assert_eq(split.t, 5 * p.period);
    cr_log_info("dop853 5 orbits one call: %ld steps; 200 calls: %ld steps, %ld cut",
                one.steps, split.steps, split.output_cut);
    cr_assert_leq(split.steps, one.steps + 200);
    cr_assert_geq(split.output_cut, 150);
    cr_assert_lt(pbt_pos_error(&p, &split), 1e-7);
    cr_assert_lt(pbt_pos_error(&p, &one), 1e-7);
}

Test(dop853, restart_on_a_used_workspace_equals_a_fresh_one)
{
    /* start() sets the state from outside: nothing cached at the old state
     * (first stage, proposal, PI memory, dense step) may survive it */
    pb_problem p;
    pbt_kepler(&p, 0.5);
    pb_method_config c = td_cfg(1e-9, p.period);
    pbt_result fresh = pbt_integrate(&pb_method_dop853, &p, &c, p.period);
    cr_assert_eq(fresh.status, PB_OK);
    pb_force_counter cnt;
    pb_force f;
    pb_force_counter_init(&cnt, &p, &f);
    void *ws = pb_method_dop853.alloc(3);
    cr_assert_not_null(ws);
    double t, r[3], v[3];
    cr_assert_eq(pb_method_dop853.start(ws, &f, &c, p.t0, p.r0, p.v0), PB_OK);
    cr_assert_eq(pb_method_dop853.dense(ws, 0.0, r, v), PB_EINVAL); /* no step yet */
    cr_assert_eq(pb_method_dop853.advance(ws, 0.5 * p.period, NULL, NULL), PB_OK);
    cr_assert_eq(pb_method_dop853.start(ws, &f, &c, p.t0, p.r0, p.v0), PB_OK);
    cr_assert_eq(pb_method_dop853.dense(ws, 0.25 * p.period, r, v), PB_EINVAL);
    cr_assert_eq(pb_method_dop853.advance(ws, p.period, NULL, NULL), PB_OK);
    pb_method_dop853.get_state(ws, &t, r, v);
    pb_method_dop853.free(ws);
    cr_assert_eq(t, p.period);
    for (int i = 0; i < 3; i++) {
        cr_assert_eq(r[i], fresh.r[i]);
        cr_assert_eq(v[i], fresh.v[i]);
    }
}
