/* test_harness.c - the harness's metrics, sampler, growth laws and the
 * numbers of one case, checked against hand computations and against an
 * independent integration by GSL. */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include "bench/measure/growth.h"
#include "bench/measure/harness.h"
#include "bench/measure/metrics.h"
#include "bench/measure/sampler.h"
#include "problems/catalogue.h"
#include "problems/twobody.h"
#include "test_support.h"

static pb_problem kepler(const char *name)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup(name, &p), PB_OK);
    return p;
}

static pb_case_spec spec_fixed(const char *problem, const char *method, int spo, double orbits)
{
    pb_case_spec s;
    memset(&s, 0, sizeof s);
    s.problem = kepler(problem);
    s.method = pb_method_find(method);
    cr_assert_not_null(s.method, "method %s", method);
    s.steps_per_orbit = spo;
    s.orbits = orbits;
    s.linear_samples = 10;
    return s;
}

/* RIC split of a known offset: the truth is a circular orbit in the x-y plane
 * at (1, 0, 0) moving +y; an offset (dx, dy, dz) is radial dx, along-track dy,
 * cross-track dz by the definition of the frame (common practice). */
Test(harness, ric_split_of_known_offset)
{
    pb_problem p = kepler("kepler-e0");
    long double rt[3] = {1, 0, 0}, vt[3] = {0, 1, 0};
    double r[3] = {1 + 1e-3, 2e-3, -3e-3}, v[3] = {0, 1, 0};
    pb_sample s;
    pb_metrics_sample(&p, 0, r, v, rt, vt, -0.5, 0.5, 1.0, &s);
    cr_assert_float_eq(s.radial, 1e-3, 1e-15);
    cr_assert_float_eq(s.along, 2e-3, 1e-15);
    cr_assert_float_eq(s.cross, -3e-3, 1e-15);
    cr_assert_float_eq(s.pos_err, sqrt(14e-6), 1e-15);
    /* the frame follows the true orbit: rotate the truth by 90 deg */
    long double rt2[3] = {0, 1, 0}, vt2[3] = {-1, 0, 0};
    double r2[3] = {-2e-3, 1 + 1e-3, -3e-3};
    pb_metrics_sample(&p, 0, r2, vt2[0] == -1 ? (double[3]){-1, 0, 0} : v, rt2, vt2, -0.5, 0.5, 1.0, &s);
    cr_assert_float_eq(s.radial, 1e-3, 1e-15);
    cr_assert_float_eq(s.along, 2e-3, 1e-15);
    cr_assert_float_eq(s.cross, -3e-3, 1e-15);
}

/* The RIC split away from an apsis of an eccentric orbit, where the velocity
 * is not perpendicular to the radius: R = r/|r|, C = h/|h|, I = C x R (the
 * radial / in-track / cross-track frame, common practice), so an offset
 * built as a R + b I + c C comes back as (a, b, c) and an offset along the
 * velocity has a radial part. */
Test(harness, ric_split_off_apsis)
{
    pb_problem p = kepler("kepler-e0.6");
    double E = 1.0, e = 0.6, b = sqrt(1 - e * e), rn = 1 - e * cos(E);
    long double rt[3] = {cos(E) - e, b * sin(E), 0}, vt[3] = {-sin(E) / rn, b * cos(E) / rn, 0};
    double R[3], I[3], C[3], r3[3] = {(double)rt[0], (double)rt[1], 0};
    double v3[3] = {(double)vt[0], (double)vt[1], 0};
    double rr = sqrt(r3[0] * r3[0] + r3[1] * r3[1]);
    R[0] = r3[0] / rr, R[1] = r3[1] / rr, R[2] = 0;
    C[0] = 0, C[1] = 0, C[2] = 1;            /* prograde in the x-y plane */
    I[0] = -R[1], I[1] = R[0], I[2] = 0;     /* C x R */
    const double off[3] = {2e-4, -3e-4, 5e-5};
    double r[3];
    for (int i = 0; i < 3; i++)
        r[i] = r3[i] + off[0] * R[i] + off[1] * I[i] + off[2] * C[i];
    pb_sample s;
    pb_metrics_sample(&p, 0, r, v3, rt, vt, -0.5, 0.5, 0.8, &s);
    cr_assert_float_eq(s.radial, off[0], 1e-15);
    cr_assert_float_eq(s.along, off[1], 1e-15);
    cr_assert_float_eq(s.cross, off[2], 1e-15);
    /* an offset along the velocity is not purely in-track here */
    double vn = sqrt(v3[0] * v3[0] + v3[1] * v3[1]);
    for (int i = 0; i < 3; i++)
        r[i] = r3[i] + 1e-4 * v3[i] / vn;
    pb_metrics_sample(&p, 0, r, v3, rt, vt, -0.5, 0.5, 0.8, &s);
    double flight_path = (r3[0] * v3[0] + r3[1] * v3[1]) / (rr * vn); /* sin of the angle */
    cr_assert_gt(fabs(flight_path), 0.1);
    cr_assert_float_eq(s.radial, 1e-4 * flight_path, 1e-15);
    cr_assert_float_eq(s.along, 1e-4 * sqrt(1 - flight_path * flight_path), 1e-15);
}

/* Apsidal precession of a state rotated by a known angle about the orbit
 * normal: the eccentricity vector rotates with it, so the apsidal angle is
 * that angle (Laplace-Runge-Lenz vector, textbook law). */
Test(harness, apsidal_angle_of_rotated_state)
{
    pb_problem p = kepler("kepler-e0.6");
    double d = 1e-3;
    long double rt[3], vt[3];
    for (int i = 0; i < 3; i++) {
        rt[i] = p.r0[i];
        vt[i] = p.v0[i];
    }
    double c = cos(d), sn = sin(d);
    double r[3] = {c * p.r0[0] - sn * p.r0[1], sn * p.r0[0] + c * p.r0[1], 0};
    double v[3] = {c * p.v0[0] - sn * p.v0[1], sn * p.v0[0] + c * p.v0[1], 0};
    pb_sample s;
    pb_metrics_sample(&p, 0, r, v, rt, vt, -0.5, 0.5, 0.8, &s);
    cr_assert_float_eq(s.apsis_angle, d, 1e-13);
    /* |e| = 0.6 rotated by d: |de| = 2 * 0.6 * sin(d/2) */
    cr_assert_float_eq(s.ecc_drift, 1.2 * sin(d / 2), 1e-13);
    cr_assert_float_eq(s.energy_rel, 0.0, 1e-15);
}

/* Power laws by construction: err = c t^k gives slope k exactly. */
Test(harness, growth_fit_recovers_exponent)
{
    double t[8], e[8];
    const double ks[] = {0.0, 0.5, 1.0, 2.0, 1.5};
    const char *cls[] = {"bounded", "sqrt", "linear", "quadratic", "other"};
    for (int j = 0; j < 5; j++) {
        for (int i = 0; i < 8; i++) {
            t[i] = pow(10.0, 1 + 0.5 * i);
            e[i] = 3e-9 * pow(t[i], ks[j]);
        }
        pb_growth g = pb_growth_fit(t, e, 8, 10.0);
        cr_assert_float_eq(g.k, ks[j], 1e-12);
        cr_assert_str_eq(g.cls, cls[j]);
        cr_assert_eq(g.npoints, 8);
    }
    pb_growth g = pb_growth_fit(t, e, 2, 10.0);
    cr_assert(isnan(g.k));
    cr_assert_str_eq(g.cls, "other");
}

/* Samples: increasing, on the step grid, log samples at whole periods. */
Test(harness, sample_plan_on_grid)
{
    double T = 2 * M_PI, h = T / 333;
    pb_sample_plan plan;
    cr_assert_eq(pb_sample_plan_make(0, 1000 * T, T, h, 100, &plan), 0);
    int nlog = 0;
    for (int k = 0; k < plan.n; k++) {
        if (k)
            cr_assert_gt(plan.t[k], plan.t[k - 1]);
        double n = plan.t[k] / h;
        cr_assert_float_eq(n, round(n), 1e-9 * n);
        if (plan.on_log_grid[k]) {
            nlog++;
            double orb = plan.t[k] / T;
            cr_assert_float_eq(orb, round(orb), 1e-9 * orb);
        }
    }
    cr_assert_eq(nlog, 16); /* 1 2 3 5 7 per decade over 1..1000 plus 1000 */
    cr_assert_float_eq(plan.t[plan.n - 1], 1000 * T, 1e-9);
    cr_assert_lt(plan.n, 130);
    pb_sample_plan_free(&plan);
    /* a long horizon: 83306 orbits at 261 steps each end on step 21742866
     * exactly, though the quotient's rounding there exceeds 1e-9 of a step */
    h = T / 261;
    cr_assert_eq(pb_sample_plan_make(0, 83306 * T, T, h, 10, &plan), 0);
    cr_assert_eq(lround(plan.t[plan.n - 1] / h), 21742866L);
    pb_sample_plan_free(&plan);
}

/* Hairer, Lubich & Wanner (2006) Ch. I, Kepler experiments (from memory):
 * RK4's energy error grows linearly and its along-track error
 * quadratically; leapfrog's energy error is bounded and its along-track
 * error grows linearly. kepler-e0.6 over 1000 orbits, errors well below
 * saturation at these steps. */
Test(harness, growth_classes_match_known_behaviour)
{
    pb_case_spec s = spec_fixed("kepler-e0.6", "rk4", 2000, 1000);
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_str_eq(r.g_energy.cls, "linear", "rk4 energy k = %g", r.g_energy.k);
    cr_assert_str_eq(r.g_along.cls, "quadratic", "rk4 along k = %g", r.g_along.k);
    pb_case_result_free(&r);

    s = spec_fixed("kepler-e0.6", "leapfrog", 2000, 1000);
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_str_eq(r.g_energy.cls, "bounded", "leapfrog energy k = %g", r.g_energy.k);
    cr_assert_str_eq(r.g_along.cls, "linear", "leapfrog along k = %g", r.g_along.k);
    pb_case_result_free(&r);
}

/* The running maximum between samples sees what whole-period samples miss:
 * leapfrog at periapsis-start samples lands where its energy error is
 * smallest, so the step maximum must exceed every sampled value. */
Test(harness, running_max_exceeds_samples)
{
    pb_case_spec s = spec_fixed("kepler-e0.5", "leapfrog", 1000, 100);
    s.linear_samples = 0;
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    double smax = 0;
    for (int k = 0; k < r.nsamples; k++)
        smax = fmax(smax, r.samples[k].energy_rel);
    /* measured: step max 1.07e-4 against a sample max of 1.38e-5 */
    cr_assert_gt(r.energy_rel_max, 5 * smax, "step max %g vs sample max %g", r.energy_rel_max, smax);
    pb_case_result_free(&r);
}

/* Cost counted outside the method: RK4 4 evaluations a step, leapfrog one
 * (plus the first), and the fingerprint is bit-reproducible. */
Test(harness, cost_counts_and_fingerprint)
{
    pb_case_spec s = spec_fixed("kepler-e0.6", "rk4", 100, 10);
    pb_case_result a, b;
    cr_assert_eq(pb_case_run(&s, &a), 0);
    cr_assert_eq(a.steps, 1000);
    /* 4 a step, and the first stage at the last state, taken at once for the
     * dense output (rk4.c) */
    cr_assert_eq(a.evals, 4001);
    cr_assert_eq(pb_case_run(&s, &b), 0);
    cr_assert_str_eq(a.fingerprint, b.fingerprint);
    pb_case_result_free(&a);
    pb_case_result_free(&b);
    s = spec_fixed("kepler-e0.6", "leapfrog", 100, 10);
    cr_assert_eq(pb_case_run(&s, &a), 0);
    cr_assert_eq(a.evals, 1001);
    pb_case_result_free(&a);
}

/* A diverging integration is reported as such, with the time: RK4 at 60
 * steps per orbit cannot pass the e = 0.9 periapsis: its energy error passes
 * 100% (measured: 10.7 relative by the end when left to run). */
Test(harness, divergence_reported_with_time)
{
    pb_case_spec s = spec_fixed("kepler-e0.9", "rk4", 60, 100);
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_str_eq(r.status_name, "diverged");
    cr_assert_str_eq(r.status_detail, "relative energy error passed 100%");
    cr_assert_gt(r.diverged_at, 0);
    cr_assert_lt(r.diverged_at, 100 * s.problem.period);
    pb_case_result_free(&r);
}

/* A step budget ends the case where its last step left it, and that time is
 * reported: 5 fixed steps of T/100 end at t = T/20 (the grid, by
 * construction), not at the start. */
Test(harness, max_steps_reports_the_time_reached)
{
    pb_case_spec s = spec_fixed("kepler-e0.6", "rk4", 100, 2);
    s.max_steps = 5;
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_str_eq(r.status_name, "max_steps");
    cr_assert_float_eq(r.diverged_at, s.problem.period / 20, 1e-14);
    cr_assert_float_eq(r.t_end, r.diverged_at, 0);
    pb_case_result_free(&r);
}

/* --- independent check with GSL's rk8pd at tight tolerance --- */
static int gsl_kepler(double t, const double y[], double f[], void *params)
{
    (void)t;
    (void)params;
    double r = sqrt(y[0] * y[0] + y[1] * y[1] + y[2] * y[2]), r3 = r * r * r;
    for (int i = 0; i < 3; i++) {
        f[i] = y[3 + i];
        f[3 + i] = -y[i] / r3;
    }
    return GSL_SUCCESS;
}

static void gsl_reference(const pb_problem *p, double t_end, double *y)
{
    gsl_odeiv2_system sys = {gsl_kepler, NULL, 6, NULL};
    gsl_odeiv2_driver *d = gsl_odeiv2_driver_alloc_y_new(&sys, gsl_odeiv2_step_rk8pd, 1e-3, 1e-14, 1e-14);
    for (int i = 0; i < 3; i++) {
        y[i] = p->r0[i];
        y[3 + i] = p->v0[i];
    }
    double t = 0;
    cr_assert_eq(gsl_odeiv2_driver_apply(d, &t, t_end, y), GSL_SUCCESS);
    gsl_odeiv2_driver_free(d);
}

/* The numbers of `propbench run --problem kepler-e0.6 --method rk4
 * --steps-per-orbit 1000 --orbits 100` confirmed independently: GSL's rk8pd
 * at 1e-14 (a reference library) gives the true final state to far better
 * than RK4's error, and RK4's final state differs from it by the harness's
 * reported error. Measured here: pos_err_final 2.196e-4, energy 2.13e-7. */
Test(harness, rk4_numbers_confirmed_by_gsl_rk8pd)
{
    pb_case_spec s = spec_fixed("kepler-e0.6", "rk4", 1000, 100);
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    double y[6];
    gsl_reference(&s.problem, 100 * s.problem.period, y);
    double d = 0;
    for (int i = 0; i < 3; i++)
        d += (r.final_r[i] - y[i]) * (r.final_r[i] - y[i]);
    d = sqrt(d);
    cr_assert_float_eq(d, r.pos_err_final, 1e-3 * r.pos_err_final, "gsl says %g, harness %g", d, r.pos_err_final);
    cr_assert_float_eq(r.pos_err_final, 2.196e-4, 0.01e-4);
    double E = 0.5 * (r.final_v[0] * r.final_v[0] + r.final_v[1] * r.final_v[1]) -
               1 / sqrt(r.final_r[0] * r.final_r[0] + r.final_r[1] * r.final_r[1]);
    cr_assert_float_eq(fabs(E + 0.5) / 0.5, r.energy_rel_final, 1e-9);
    cr_assert_gt(r.energy_rel_max, 2.0e-7);
    cr_assert_lt(r.energy_rel_max, 2.5e-7);
    pb_case_result_free(&r);
}

/* The apsidal angle is unwrapped over the samples: leapfrog at 100 steps per
 * orbit on e = 0.6 precesses by more than pi over 1000 orbits, and the rate
 * over the whole run must agree with the rate over the first 10 orbits,
 * where the angle is still far from +-pi (consistency of the definition:
 * angle / orbits). Measured: -2.43e-2 rad/orbit overall. */
Test(harness, apsidal_rate_unwrapped_past_pi)
{
    pb_case_spec s = spec_fixed("kepler-e0.6", "leapfrog", 100, 1000);
    s.linear_samples = 100;
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    double early = NAN;
    for (int k = 0; k < r.nsamples; k++)
        if (fabs(r.samples[k].orbits - 10) < 1e-9)
            early = r.samples[k].apsis_angle / 10;
    cr_assert(isfinite(early));
    cr_assert_gt(fabs(r.apsidal_rate) * 1000, M_PI, "total %g rad", r.apsidal_rate * 1000);
    cr_assert_float_eq(r.apsidal_rate, early, 0.1 * fabs(early), "rate %g, first 10 orbits %g",
                       r.apsidal_rate, early);
    pb_case_result_free(&r);
}

/* A run whose position error passes a tenth of the orbit's size is flagged:
 * leapfrog at 100 steps per orbit on kepler-e0 over 200 orbits drifts in
 * phase by more than that (its along-track error grows linearly, Hairer,
 * Lubich & Wanner 2006 Ch. I), while 2000 steps per orbit stay well inside. */
Test(harness, saturated_runs_are_flagged)
{
    pb_case_spec s = spec_fixed("kepler-e0", "leapfrog", 100, 200);
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_str_eq(r.status_name, "ok");
    cr_assert_gt(r.pos_err_max, 0.1);
    cr_assert(r.saturated);
    pb_case_result_free(&r);
    s = spec_fixed("kepler-e0", "leapfrog", 2000, 200);
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_lt(r.pos_err_max, 0.01);
    cr_assert(!r.saturated);
    pb_case_result_free(&r);
}

/* With too short a horizon for 3 samples past 10 periods, the fit falls back
 * to the samples from the first period and says so. */
Test(harness, growth_fit_window_is_reported)
{
    pb_case_spec s = spec_fixed("kepler-e0.6", "rk4", 400, 15);
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_float_eq(r.g_pos.from / s.problem.period, 1.0, 1e-9);
    pb_case_result_free(&r);
    s = spec_fixed("kepler-e0.6", "rk4", 400, 100);
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_float_eq(r.g_pos.from / s.problem.period, 10.0, 1e-9);
    pb_case_result_free(&r);
}

/* A parabola from r0 = (1, 0, 0), v0 = (0, sqrt 2, 0), mu = 1 (escape speed:
 * E0 = 0 up to round-off, REFERENCES.md conics): an energy error relative to
 * |E0| would be round-off over round-off, and used to end every such case as
 * "diverged" on its first step. Relative to v0^2/2 + mu/r0 = 2 it is the
 * integrator's: RK4 at h = 1e-3 over 10 TU stays near round-off, and the
 * case finishes. For the bound Kepler problems the scale is |E0| exactly, so
 * their energy errors keep every bit. */
Test(harness, near_parabolic_energy_relative_to_its_parts)
{
    pb_problem p;
    double r0[3] = {1, 0, 0}, v0[3] = {0, sqrt(2.0), 0};
    pb_problem_init_twobody(&p, "parabola", "escape-speed start", PB_UNITS_NORMALIZED, 1.0, r0, v0);
    double E0 = p.energy(&p, 0, r0, v0);
    cr_assert_lt(fabs(E0), 1e-15);
    cr_assert_float_eq(pb_energy_scale(&p, E0), 2.0, 1e-15);
    pb_case_spec s;
    memset(&s, 0, sizeof s);
    s.problem = p;
    s.method = pb_method_find("rk4");
    s.step_s = 1e-3;
    s.horizon_s = 10;
    s.linear_samples = 10;
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_str_eq(r.status_name, "ok", "%s at t = %g", r.status_detail, r.diverged_at);
    cr_assert(r.energy_rel_to_parts);
    cr_assert_lt(r.energy_rel_max, 1e-12);
    pb_case_result_free(&r);
    pb_problem q = kepler("kepler-e0.99");
    double Eq = q.energy(&q, 0, q.r0, q.v0);
    cr_assert_eq(pb_energy_scale(&q, Eq), fabs(Eq));
}

/* The adaptive minimum step is bounded by the horizon as well as the period:
 * for an ellipse one ulp below escape speed (period ~1e24 TU) a floor of
 * 1e-13 periods was longer than a 10 TU horizon and ended the case at t = 0.
 * Now rkf45 finishes, and its final position agrees with the exact flow. */
Test(harness, near_escape_adaptive_min_step)
{
    pb_problem p;
    double r0[3] = {1, 0, 0}, v0[3] = {0, 1.414213562373095, 0};
    pb_problem_init_twobody(&p, "near-escape", "one ulp below escape speed", PB_UNITS_NORMALIZED, 1.0, r0, v0);
    cr_assert_gt(p.period, 1e20);
    pb_case_spec s;
    memset(&s, 0, sizeof s);
    s.problem = p;
    s.method = pb_method_find("rkf45");
    s.tolerance = 1e-10;
    s.horizon_s = 10;
    s.linear_samples = 10;
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_str_eq(r.status_name, "ok", "%s at t = %g", r.status_detail, r.diverged_at);
    cr_assert_gt(r.steps, 10);
    cr_assert_lt(r.pos_err_final, 1e-6);
    pb_case_result_free(&r);
}

/* The metric grid does not move with the plot grid: the log-spaced whole
 * periods and PB_METRIC_LINEAR points are the same times whatever
 * linear_samples asks for. */
Test(harness, metric_grid_independent_of_plot_samples)
{
    double T = 2 * M_PI, h = T / 100;
    pb_sample_plan a, b;
    cr_assert_eq(pb_sample_plan_make(0, 108 * T, T, h, 10, &a), 0);
    cr_assert_eq(pb_sample_plan_make(0, 108 * T, T, h, 1000, &b), 0);
    double ta[400], tb[400];
    int na = 0, nb = 0;
    for (int k = 0; k < a.n; k++)
        if (a.in_metrics[k])
            ta[na++] = a.t[k];
    for (int k = 0; k < b.n; k++)
        if (b.in_metrics[k])
            tb[nb++] = b.t[k];
    cr_assert_eq(na, nb);
    for (int k = 0; k < na; k++)
        cr_assert_eq(ta[k], tb[k], "metric time %d: %.17g vs %.17g", k, ta[k], tb[k]);
    cr_assert_gt(b.n, 1000);
    cr_assert_geq(na, PB_METRIC_LINEAR);
    pb_sample_plan_free(&a);
    pb_sample_plan_free(&b);
}

/* A case's verdict is the same for any number of plot samples: the
 * integration (fingerprint, counts), every maximum, final value and growth
 * class and exponent. Every method of the table (samples are taken on dense
 * output, so they never shorten an adaptive step either), on an eccentric
 * orbit and on the near-circular LEO whose leapfrog case used to class its
 * energy growth differently under sweep (50 samples), run (100) and
 * --samples 1000. */
Test(harness, verdict_independent_of_plot_samples, .timeout = 120)
{
    static const char *const problems[] = {"kepler-e0.6", "leo-near-circular"};
    static const int ns[] = {10, 50, 1000};
    for (const pb_method_type *const *m = pb_method_table; *m; m++) {
        for (int pi = 0; pi < 2; pi++) {
            pb_case_result r[3];
            for (int j = 0; j < 3; j++) {
                pb_case_spec s = spec_fixed(problems[pi], (*m)->name, 100, 16);
                if (!((*m)->flags & PB_KIND_FIXED)) {
                    s.steps_per_orbit = 0;
                    s.tolerance = 1e-9;
                }
                s.linear_samples = ns[j];
                cr_assert_eq(pb_case_run(&s, &r[j]), 0);
            }
            for (int j = 1; j < 3; j++) {
                const char *what = (*m)->name;
                cr_assert_str_eq(r[j].fingerprint, r[0].fingerprint, "%s", what);
                cr_assert_eq(r[j].steps, r[0].steps, "%s", what);
                cr_assert_eq(r[j].evals, r[0].evals, "%s", what);
                cr_assert_eq(r[j].pos_err_max, r[0].pos_err_max, "%s on %s", what, problems[pi]);
                cr_assert_eq(r[j].vel_err_max, r[0].vel_err_max, "%s", what);
                cr_assert_eq(r[j].pos_err_final, r[0].pos_err_final, "%s", what);
                cr_assert_eq(r[j].energy_rel_max, r[0].energy_rel_max, "%s", what);
                cr_assert_str_eq(r[j].g_energy.cls, r[0].g_energy.cls, "%s on %s", what, problems[pi]);
                cr_assert_str_eq(r[j].g_pos.cls, r[0].g_pos.cls, "%s", what);
                cr_assert(r[j].g_pos.k == r[0].g_pos.k || (isnan(r[j].g_pos.k) && isnan(r[0].g_pos.k)),
                          "%s", what);
                cr_assert(r[j].g_energy.k == r[0].g_energy.k ||
                          (isnan(r[j].g_energy.k) && isnan(r[0].g_energy.k)), "%s", what);
            }
            for (int j = 0; j < 3; j++)
                pb_case_result_free(&r[j]);
        }
    }
}

/* A fixed-step case reaches the stated horizon itself, not the last grid
 * point before it: gauss-jackson8 at 48 steps per orbit over one day of
 * leo-near-circular (86400 s is 15.56 periods, off the grid) ends its
 * samples at t0 + 86400 s exactly, by dense output from the step that
 * passes it, as an adaptive method does by clamping its last step. */
Test(harness, fixed_step_reaches_the_horizon_exactly)
{
    static const char *const methods[] = {"gauss-jackson8", "rk4", "rkf45"};
    for (int i = 0; i < 3; i++) {
        pb_case_spec s = spec_fixed("leo-near-circular", methods[i], 48, 0);
        s.horizon_s = 86400;
        if (!strcmp(methods[i], "rkf45")) {
            s.steps_per_orbit = 0;
            s.tolerance = 1e-9;
        }
        pb_case_result r;
        cr_assert_eq(pb_case_run(&s, &r), 0);
        cr_assert_eq(r.status, PB_OK, "%s", methods[i]);
        cr_assert_eq(r.t_end, s.problem.t0 + 86400.0, "%s ends at %.17g", methods[i], r.t_end);
        cr_assert_eq(r.samples[r.nsamples - 1].t, s.problem.t0 + 86400.0);
        pb_case_result_free(&r);
    }
}
