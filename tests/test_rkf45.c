/* test_rkf45.c - RKF45: one step against GSL's rkf45 stepper (the same
 * Fehlberg tableau), tolerance proportionality on Kepler e = 0.5, the step
 * budget and minimum-step guards, rejected-step accounting, split advance
 * calls and a non-finite force. */
#include <criterion/criterion.h>
#include <criterion/logging.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_fit.h>
#include <gsl/gsl_odeiv2.h>
#include <math.h>
#include "problems/twobody.h"
#include "test_support.h"
#include "bench/measure/force_counter.h"

extern const pb_method_type pb_method_rkf45;

#define TR_TWO_PI 6.283185307179586

static pb_method_config tr_cfg(double atol, double rtol)
{
    pb_method_config c = {0};
    c.atol = atol;
    c.rtol = rtol;
    c.time_scale = TR_TWO_PI;
    return c;
}

/* GSL's view of the same problem: y = (r, v), dy = (v, a). */
static int tr_gsl_rhs(double t, const double y[], double dy[], void *params)
{
    const pb_problem *p = params;
    for (int i = 0; i < 3; i++)
        dy[i] = y[3 + i];
    return p->accel(p, t, y, y + 3, dy + 3) ? GSL_EBADFUNC : GSL_SUCCESS;
}

Test(rkf45, single_step_matches_gsl_rkf45)
{
    /* Source: Fehlberg (1969) NASA TR R-315; GSL's rkf45 implements the same
     * tableau and also advances with the 5th-order weights, so one step must
     * agree to round-off (REFERENCES.md). */
    pb_problem p;
    pbt_kepler(&p, 0.5);
    const double h = 0.05;
    double y[6] = {p.r0[0], p.r0[1], p.r0[2], p.v0[0], p.v0[1], p.v0[2]}, yerr[6];
    gsl_odeiv2_system sys = {tr_gsl_rhs, NULL, 6, &p};
    gsl_odeiv2_step *gs = gsl_odeiv2_step_alloc(gsl_odeiv2_step_rkf45, 6);
    cr_assert_not_null(gs);
    cr_assert_eq(gsl_odeiv2_step_apply(gs, 0.0, h, y, yerr, NULL, NULL, &sys), GSL_SUCCESS);
    gsl_odeiv2_step_free(gs);

    /* ours, forced to take exactly that step: first step cfg.h = h, t_out = h */
    pb_method_config c = tr_cfg(1e-3, 0.0);
    c.h = h;
    pbt_result r = pbt_integrate(&pb_method_rkf45, &p, &c, h);
    cr_assert_eq(r.status, PB_OK);
    cr_assert_eq(r.steps, 1);
    cr_assert_eq(r.rejected, 0);
    for (int i = 0; i < 3; i++) {
        /* round-off: a few ulps of O(1) values (coefficients are written as
         * different but equal fractions in the two codes) */
        cr_assert(fabs(r.r[i] - y[i]) <= 1e-15, "r[%d]: %.17g vs GSL %.17g", i, r.r[i], y[i]);
        cr_assert(fabs(r.v[i] - y[3 + i]) <= 1e-15, "v[%d]: %.17g vs GSL %.17g", i, r.v[i],
                  y[3 + i]);
    }

    /* The error estimate, seen through the accept/reject decision: with
     * rtol = 0 our norm is rms(yerr)/atol, so atol just above rms(GSL's yerr)
     * must accept and just below must reject. The margin 1e-6 is far above the
     * round-off of yerr (|yerr| ~ 1e-7, round-off ~ 1e-17). */
    double s = 0;
    for (int i = 0; i < 6; i++)
        s += yerr[i] * yerr[i];
    double rms = sqrt(s / 6);
    cr_assert(rms > 1e-10, "GSL's error estimate %.3g too small to test", rms);
    c = tr_cfg(rms * (1 + 1e-6), 0.0);
    c.h = h;
    c.max_steps = 1;
    r = pbt_integrate(&pb_method_rkf45, &p, &c, h);
    cr_assert_eq(r.status, PB_OK);
    cr_assert_eq(r.steps, 1);
    cr_assert_eq(r.rejected, 0);
    c.atol = rms * (1 - 1e-6);
    r = pbt_integrate(&pb_method_rkf45, &p, &c, h);
    cr_assert_eq(r.status, PB_EMAXSTEPS);
    cr_assert_eq(r.steps, 0);
    cr_assert_eq(r.rejected, 1);
    cr_assert_eq(r.t, 0.0); /* the rejected step left the state alone */
}

Test(rkf45, tolerance_proportionality_kepler_e05)
{
    /* Tolerance proportionality (Hairer, Norsett & Wanner I, Sec. II.4, common
     * practice): with error-per-step control on an O(h^5) estimate and the
     * 5th-order solution kept, the global error goes as tol^1. Band for the
     * least-squares slope over tol = 1e-4 .. 1e-12 (one orbit): [0.8, 1.2];
     * the loose end is pre-asymptotic, which pulls the slope below 1. */
    pb_problem p;
    pbt_kepler(&p, 0.5);
    double lx[9], ly[9];
    for (int k = 0; k < 9; k++) {
        double tol = pow(10.0, -(4 + k));
        pb_method_config c = tr_cfg(tol, tol);
        pbt_result r = pbt_integrate(&pb_method_rkf45, &p, &c, p.period);
        cr_assert_eq(r.status, PB_OK);
        double err = pbt_pos_error(&p, &r);
        /* the error follows the tolerance: within 1e3 of it over one orbit */
        cr_assert(err < 1e3 * tol && err > 1e-2 * tol, "tol %g: error %g", tol, err);
        lx[k] = log10(tol);
        ly[k] = log10(err);
        cr_log_info("rkf45 e=0.5 tol %.0e: pos err %.3e, steps %ld, rejected %ld, evals %ld",
                    tol, err, r.steps, r.rejected, r.evals);
    }
    double c0, c1, v00, v01, v11, ss;
    gsl_fit_linear(lx, 1, ly, 1, 9, &c0, &c1, &v00, &v01, &v11, &ss);
    cr_log_info("rkf45 tolerance proportionality slope %.3f", c1);
    cr_assert(c1 >= 0.8 && c1 <= 1.2, "log-log slope %.3f outside [0.8, 1.2]", c1);
    /* asymptotic end (1e-8 .. 1e-12): slope 1 within 0.1 */
    gsl_fit_linear(lx + 4, 1, ly + 4, 1, 5, &c0, &c1, &v00, &v01, &v11, &ss);
    cr_log_info("rkf45 asymptotic slope (1e-8..1e-12) %.3f", c1);
    cr_assert(fabs(c1 - 1.0) <= 0.1, "asymptotic slope %.3f not within 0.1 of 1", c1);
}

Test(rkf45, max_steps_returns_promptly)
{
    /* The budget counts accepted + rejected steps (method.h contract). */
    pb_problem p;
    pbt_kepler(&p, 0.5);
    pb_method_config c = tr_cfg(1e-10, 1e-10);
    c.max_steps = 25;
    pbt_result r = pbt_integrate(&pb_method_rkf45, &p, &c, 100 * p.period);
    cr_assert_eq(r.status, PB_EMAXSTEPS);
    cr_assert_eq(r.steps + r.rejected, 25);
    /* 6 stages an attempt + one evaluation for the starting step + the first
     * stage at the last accepted state (taken at once, for dense output) */
    cr_assert_leq(r.evals, 6 * 25 + 2);
    cr_assert(r.t > 0 && r.t < p.period);
}

Test(rkf45, min_step_returns_promptly)
{
    /* An explicit floor far above what periapsis of e = 0.9 needs at 1e-10:
     * the step collapses there and must stop, not crawl. */
    pb_problem p;
    pbt_kepler(&p, 0.9);
    pb_method_config c = tr_cfg(1e-10, 1e-10);
    c.min_step = 0.05;
    c.h = 0.1;
    pbt_result r = pbt_integrate(&pb_method_rkf45, &p, &c, p.period);
    cr_assert_eq(r.status, PB_EMINSTEP);
    cr_assert_lt(r.evals, 200);
    cr_assert_eq(r.t_fail, r.t);

    /* Automatic floor (1e-12 time scales) on a radial fall from rest at r = 1:
     * the orbit hits the centre at half the period of the degenerate ellipse
     * a = 1/2, pi sqrt(a^3/mu) = 1.1107207345 (Kepler's third law,
     * REFERENCES.md). The step must collapse there and stop with PB_EMINSTEP. */
    double r0[3] = {1, 0, 0}, v0[3] = {0, 0, 0};
    pb_problem_init_twobody(&p, "fall", "radial fall", PB_UNITS_NORMALIZED, 1.0, r0, v0);
    c = tr_cfg(1e-9, 1e-9);
    r = pbt_integrate(&pb_method_rkf45, &p, &c, 2.0);
    cr_assert(r.status == PB_EMINSTEP, "status %d (%s)", r.status, pb_strerror(r.status));
    cr_assert(fabs(r.t_fail - 1.1107207345395915) < 1e-4, "stopped at %.10f", r.t_fail);
    cr_assert_lt(r.evals, 100000);
    cr_log_info("rkf45 radial fall: stopped at t = %.12f after %ld steps, %ld rejected",
                r.t_fail, r.steps, r.rejected);
}

Test(rkf45, rejected_steps_are_counted)
{
    /* e = 0.9 at a tight tolerance: the PI controller overshoots the periapsis
     * passage and some steps are rejected. Accounting (6 stages, common
     * practice): every attempt costs 5 new evaluations, the initial state and
     * every accepted state one more for its first stage (taken as soon as
     * the step is accepted, for dense output, so the last state's too), plus
     * one for the starting-step algorithm (Hairer, Norsett & Wanner I, II.4).
     * The harness's counter must agree. */
    pb_problem p;
    pbt_kepler(&p, 0.9);
    pb_method_config c = tr_cfg(1e-8, 1e-8);
    pbt_result r = pbt_integrate(&pb_method_rkf45, &p, &c, 2 * p.period);
    cr_assert_eq(r.status, PB_OK);
    cr_log_info("rkf45 e=0.9 tol 1e-8, 2 orbits: steps %ld, rejected %ld, evals %ld", r.steps,
                r.rejected, r.evals);
    cr_assert_geq(r.rejected, 1);
    cr_assert_eq(r.evals, 5 * (r.steps + r.rejected) + r.steps + 2);
    /* and the run is still accurate: error within 1e4 tol after two orbits of
     * e = 0.9 (tolerance proportionality as above) */
    cr_assert_lt(pbt_pos_error(&p, &r), 1e-4);
}

Test(rkf45, split_advance_keeps_the_step_proposal)
{
    /* Clamping at 200 sample times must not shrink later steps: the split run
     * takes at most one extra (clamped) step per sample, and ends where the
     * single call does to within the tolerance's error level. */
    pb_problem p;
    pbt_kepler(&p, 0.5);
    pb_method_config c = tr_cfg(1e-10, 1e-10);
    pbt_result one = pbt_integrate(&pb_method_rkf45, &p, &c, 5 * p.period);
    cr_assert_eq(one.status, PB_OK);

    pb_force_counter cnt;
    pb_force f;
    pb_force_counter_init(&cnt, &p, &f);
    void *ws = pb_method_rkf45.alloc(3);
    cr_assert_not_null(ws);
    cr_assert_eq(pb_method_rkf45.start(ws, &f, &c, 0.0, p.r0, p.v0), PB_OK);
    const int nsamp = 200;
    for (int k = 1; k <= nsamp; k++)
        cr_assert_eq(pb_method_rkf45.advance(ws, 5 * p.period * k / nsamp, NULL, NULL), PB_OK);
    pbt_result split = {0};
    pb_method_rkf45.get_state(ws, &split.t, split.r, split.v);
    pb_method_stats st;
    pb_method_rkf45.get_stats(ws, &st);
    pb_method_rkf45.free(ws);
    cr_assert_eq(split.t, 5 * p.period);
    cr_log_info("rkf45 5 orbits one call: %ld steps %ld evals; 200 calls: %ld steps %ld evals",
                one.steps, one.evals, st.steps, cnt.evals);
    cr_assert_leq(st.steps, one.steps + nsamp);
    double d = 0;
    for (int i = 0; i < 3; i++)
        d += (split.r[i] - one.r[i]) * (split.r[i] - one.r[i]);
    /* both runs are within ~1e-7 of the truth at this tolerance (slope test) */
    cr_assert_lt(sqrt(d), 1e-6);
    cr_assert_lt(pbt_pos_error(&p, &split), 1e-6);
}

Test(rkf45, nonfinite_force_stops_with_last_good_state)
{
    /* A NaN acceleration must end the case with PB_ENONFINITE (method.h
     * contract), keeping the last good state; it lies on the exact orbit to
     * the run's accuracy (tolerance 1e-10: error well below 1e-6). */
    pb_problem p;
    pbt_kepler(&p, 0.5);
    p.accel = pbt_nan_after_1_accel;
    pb_method_config c = tr_cfg(1e-10, 1e-10);
    pbt_result r = pbt_integrate(&pb_method_rkf45, &p, &c, p.period);
    cr_assert_eq(r.status, PB_ENONFINITE);
    cr_assert_eq(r.t_fail, r.t);
    cr_assert(r.t <= 1.0 && r.t > 0.9, "stopped at %g", r.t);
    for (int i = 0; i < 3; i++)
        cr_assert(isfinite(r.r[i]) && isfinite(r.v[i]));
    cr_assert_lt(pbt_pos_error(&p, &r), 1e-6);
}

/* Accepted-step times, recorded through the per-step observer. */
typedef struct tr_times {
    int n;
    double t[4096];
} tr_times;

static int tr_record(void *ctx, double t, const double *r, const double *v)
{
    (void)r;
    (void)v;
    tr_times *tt = ctx;
    if (tt->n < 4096)
        tt->t[tt->n++] = t;
    return 0;
}

/* Run to t_end through the sample times ts[0..ns-1], recording accepted steps. */
static int tr_run_recorded(const pb_problem *p, const pb_method_config *c, const double *ts,
                           int ns, tr_times *out)
{
    pb_force_counter cnt;
    pb_force f;
    pb_force_counter_init(&cnt, p, &f);
    void *ws = pb_method_rkf45.alloc(3);
    cr_assert_not_null(ws);
    out->n = 0;
    int s = pb_method_rkf45.start(ws, &f, c, p->t0, p->r0, p->v0);
    for (int k = 0; k < ns && !s; k++)
        s = pb_method_rkf45.advance(ws, ts[k], tr_record, out);
    pb_method_rkf45.free(ws);
    return s;
}

Test(rkf45, clamp_does_not_shrink_the_next_step)
{
    /* Interface contract (method.h, DESIGN.md): the last step is clamped onto
     * t_out, and the step after it is the proposal the unclamped run used for
     * the step that straddled t_out. */
    pb_problem p;
    pbt_kepler(&p, 0.5);
    pb_method_config c = tr_cfg(1e-9, 1e-9);
    static tr_times a, b;
    double t_end = p.period, ts[2] = {0.37 * p.period, p.period};
    cr_assert_eq(tr_run_recorded(&p, &c, &t_end, 1, &a), PB_OK);
    cr_assert_eq(tr_run_recorded(&p, &c, ts, 2, &b), PB_OK);
    int j = 0;
    while (j < a.n && a.t[j] <= ts[0])
        j++;
    cr_assert(j > 0 && j < a.n && a.t[j - 1] < ts[0]);
    for (int i = 0; i < j; i++)
        cr_assert_eq(b.t[i], a.t[i]); /* identical up to the sample */
    cr_assert_eq(b.t[j], ts[0]);      /* clamped exactly */
    double h_prop = a.t[j] - a.t[j - 1], h_next = b.t[j + 1] - b.t[j];
    cr_log_info("rkf45 clamp at %.4f: clamped step %.3e, next %.6e, proposal %.6e", ts[0],
                ts[0] - a.t[j - 1], h_next, h_prop);
    cr_assert(fabs(h_next - h_prop) <= 1e-12 * h_prop, "next step %.17g, proposal %.17g",
              h_next, h_prop);
}

Test(rkf45, restart_on_a_used_workspace_equals_a_fresh_one)
{
    /* start() sets the state from outside: nothing cached at the old state
     * (first stage, step proposal, PI memory) may survive it. */
    pb_problem p;
    pbt_kepler(&p, 0.5);
    pb_method_config c = tr_cfg(1e-9, 1e-9);
    pbt_result fresh = pbt_integrate(&pb_method_rkf45, &p, &c, p.period);
    cr_assert_eq(fresh.status, PB_OK);
    pb_force_counter cnt;
    pb_force f;
    pb_force_counter_init(&cnt, &p, &f);
    void *ws = pb_method_rkf45.alloc(3);
    cr_assert_not_null(ws);
    cr_assert_eq(pb_method_rkf45.start(ws, &f, &c, p.t0, p.r0, p.v0), PB_OK);
    cr_assert_eq(pb_method_rkf45.advance(ws, 0.5 * p.period, NULL, NULL), PB_OK);
    cr_assert_eq(pb_method_rkf45.start(ws, &f, &c, p.t0, p.r0, p.v0), PB_OK);
    cr_assert_eq(pb_method_rkf45.advance(ws, p.period, NULL, NULL), PB_OK);
    double t, r[3], v[3];
    pb_method_rkf45.get_state(ws, &t, r, v);
    pb_method_rkf45.free(ws);
    cr_assert_eq(t, p.period);
    for (int i = 0; i < 3; i++) {
        cr_assert_eq(r[i], fresh.r[i]);
        cr_assert_eq(v[i], fresh.v[i]);
    }
}
