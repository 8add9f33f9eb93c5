/* test_radau15.c - Everhart's Gauss-Radau 15: its spacings against an
 * independent mpmath computation, the predictor-corrector's convergence,
 * the local order 16 of a converged step, dense output inside a step,
 * accuracy on kepler-e0.5 against the exact solution, the Arenstorf orbit
 * (a velocity-dependent force) and Brouwer's law for the energy error. */
#include <criterion/criterion.h>
#include <criterion/logging.h>
#include <gsl/gsl_fit.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "bench/measure/force_counter.h"
#include "bench/measure/harness.h"
#include "integrators/radau15.h"
#include "problems/catalogue.h"
#include "test_support.h"

/* The Radau spacings of order 15 on [0, 1], printed by python3-mpmath
 * (Debian's python3-mpmath 1.3.0) at 50 digits, independently of the C code
 * (which bisects in long double):
 *     import mpmath as mp
 *     mp.mp.dps = 50
 *     f = lambda x: mp.legendre(7, x) + mp.legendre(8, x)
 *     c = mp.taylor(f, 0, 8)[::-1]
 *     for x in sorted(mp.re(r) for r in mp.polyroots(c, maxsteps=200, extraprec=200)):
 *         if abs(x + 1) > 1e-20: print(mp.nstr((x + 1) / 2, 30))
 * (the roots of P_7 + P_8 other than -1: Radau's quadrature with the end
 * point fixed, Abramowitz & Stegun 25.4.31; a findroot polish from each
 * value changes none of the 30 digits). */
static const char *const rd_mpmath[PB_RADAU15_NODES - 1] = {
    "0.0562625605369221464656521910323", "0.180240691736892364987579942809",
    "0.352624717113169637373907770171",  "0.547153626330555383001448557652",
    "0.734210177215410531523210608307",  "0.885320946839095768090359762932",
    "0.977520613561287501891174500429"};

Test(radau15, spacings_match_mpmath)
{
    double h[PB_RADAU15_NODES];
    pb_radau15_spacings(h);
    cr_assert_eq(h[0], 0.0);
    for (int i = 1; i < PB_RADAU15_NODES; i++) {
        double want = strtod(rd_mpmath[i - 1], NULL);
        cr_assert(fabs(h[i] - want) <= 1e-16, "h_%d = %.17g, mpmath %s", i, h[i],
                  rd_mpmath[i - 1]);
    }
}

static pb_method_config rd_cfg(double tol, double scale)
{
    pb_method_config c;
    memset(&c, 0, sizeof c);
    c.rtol = c.atol = tol;
    c.time_scale = scale;
    c.max_steps = 10000000;
    return c;
}

/* How every accepted step's iteration ended: by Rein & Spiegel's test (the
 * last sweep changed B_7 by less than 1e-16 of |a|), or at round-off (the
 * change stopped shrinking), with the largest such last change. */
typedef struct rd_watch {
    const void *ws;
    long steps, at_roundoff;
    double worst;
} rd_watch;

static int rd_observe(void *ctx, double t, const double *r, const double *v)
{
    (void)t, (void)r, (void)v;
    rd_watch *w = ctx;
    pb_radau15_info in;
    pb_radau15_get_info(w->ws, &in);
    w->steps++;
    w->at_roundoff += !(in.last_correction < 1e-16);
    w->worst = fmax(w->worst, in.last_correction);
    return 0;
}

/* The predictor-corrector on kepler-e0.5 over 10 orbits: every step
 * converged, none at the sweep limit. A step that ends at round-off rather
 * than below 1e-16 has its last change of B_7 at the level of the
 * accelerations' round-off carried into B_7 = g_7, the 7th divided
 * difference: sum_j 1/prod_{i != j} |h_j - h_i| = 11525 times 2^-52 =
 * 2.6e-12 of |a| for one ulp in each; allowed 1e-11 (a few ulps). Measured
 * at most 1.3e-12 at 1e-9 (28 of 223 steps ended so) and 5.4e-13 at 1e-12
 * (16 of 348). And the predictor (Everhart 1985, Sec. 3) carries most of
 * the way: 4.2 sweeps an attempt at 1e-12 (~35 steps an orbit), 5.2 at
 * 1e-9, where a step of an eighth of the circular orbit started from zero
 * values takes 9. */
Test(radau15, predictor_corrector_converges)
{
    pb_problem p;
    pbt_kepler(&p, 0.5);
    const double tols[2] = {1e-9, 1e-12}, max_mean[2] = {6.0, 5.0};
    for (int k = 0; k < 2; k++) {
        pb_force_counter cnt;
        pb_force f;
        pb_force_counter_init(&cnt, &p, &f);
        pb_method_config c = rd_cfg(tols[k], p.period);
        void *ws = pb_method_radau15.alloc(3);
        cr_assert_not_null(ws);
        cr_assert_eq(pb_method_radau15.start(ws, &f, &c, p.t0, p.r0, p.v0), PB_OK);
        rd_watch w = {ws, 0, 0, 0};
        cr_assert_eq(pb_method_radau15.advance(ws, p.t0 + 10 * p.period, rd_observe, &w), PB_OK);
        pb_radau15_info in;
        pb_radau15_get_info(ws, &in);
        pb_method_stats st;
        pb_method_radau15.get_stats(ws, &st);
        double mean = (double)in.iterations / (double)(st.steps + st.rejected);
        cr_log_info("radau15 tol %.0e: epsilon %.3e, %ld steps, %.2f sweeps an attempt, "
                    "%ld evaluations; %ld steps ended at round-off, last change at most %.2e",
                    tols[k], in.epsilon, st.steps, mean, cnt.evals, w.at_roundoff, w.worst);
        /* rtol -> epsilon = rtol^(7/16) (radau15.c states why) */
        cr_assert_float_eq(in.epsilon, pow(tols[k], 7.0 / 16.0), 1e-15);
        cr_assert(w.worst < 1e-11, "a step's last sweep changed B_7 by %.2e of |a|", w.worst);
        cr_assert_eq(in.not_converged, 0);
        cr_assert(mean >= 2 && mean <= max_mean[k], "%.2f sweeps an attempt", mean);
        /* a step costs 7 evaluations a sweep and one at its start */
        cr_assert_eq(cnt.evals, 7 * in.iterations + st.steps);
        pb_method_radau15.free(ws);
    }
}

/* One step of size h from p's start (first step cfg.h, t_out at its end;
 * rtol = 1: never rejected), returning the method's workspace for dense
 * output; the caller frees it. */
static void *rd_one_step(const pb_problem *p, pb_force_counter *cnt, double h)
{
    pb_force f;
    pb_force_counter_init(cnt, p, &f);
    pb_method_config c = rd_cfg(1.0, p->period);
    c.h = h;
    void *ws = pb_method_radau15.alloc(3);
    cr_assert_not_null(ws);
    cr_assert_eq(pb_method_radau15.start(ws, &f, &c, p->t0, p->r0, p->v0), PB_OK);
    cr_assert_eq(pb_method_radau15.advance(ws, p->t0 + h, NULL, NULL), PB_OK);
    pb_method_stats st;
    pb_method_radau15.get_stats(ws, &st);
    cr_assert_eq(st.steps, 1);
    return ws;
}

static double rd_dist(const double *a, const double *b)
{
    return sqrt((a[0] - b[0]) * (a[0] - b[0]) + (a[1] - b[1]) * (a[1] - b[1]) +
                (a[2] - b[2]) * (a[2] - b[2]));
}

static double rd_slope(const double *h, const double *e, int n)
{
    double lx[8], ly[8], c0, c1, v00, v01, v11, ss;
    for (int i = 0; i < n; i++) {
        lx[i] = log(h[i]);
        ly[i] = log(e[i]);
    }
    gsl_fit_linear(lx, 1, ly, 1, (size_t)n, &c0, &c1, &v00, &v01, &v11, &ss);
    return c1;
}

/* A converged Radau step of order 15 has local error O(h^16) (Everhart
 * 1985; common practice: local order p + 1). The circular orbit is smooth
 * enough for steps of a fifth to two fifths of an orbit to be asymptotic
 * and still far above round-off: measured 8.996e-9, 5.19e-10, 1.46e-11,
 * 3.93e-13, 3.84e-15 at h = 3, 2.5, 2, 1.6, 1.2 (orders 15.6, 16.0, 16.2,
 * 16.1). Least-squares slope over 2.5 .. 1.2 within 0.3 of 16. An
 * iteration stopped early would lose orders here. */
Test(radau15, converged_step_has_local_order_16)
{
    pb_problem p;
    pbt_kepler(&p, 0.0);
    double h[4] = {2.5, 2.0, 1.6, 1.2}, e[4];
    for (int i = 0; i < 4; i++) {
        pb_force_counter cnt;
        void *ws = rd_one_step(&p, &cnt, h[i]);
        double t, r[3], v[3], re[3], ve[3];
        pb_method_radau15.get_state(ws, &t, r, v);
        cr_assert_eq(p.exact(&p, t, re, ve), PB_OK);
        e[i] = rd_dist(r, re);
        pb_method_radau15.free(ws);
    }
    double k = rd_slope(h, e, 4);
    cr_log_info("radau15 one-step errors %.3e %.3e %.3e %.3e: local order %.2f", e[0], e[1],
                e[2], e[3], k);
    cr_assert(fabs(k - 16.0) <= 0.3, "local order %.2f", k);
}

/* Dense output from the step's own polynomial: the acceleration polynomial
 * of degree 7 is off by O(h^8) inside the step, so the velocity by O(h^9)
 * and the position by O(h^10): dense order 8. Measured at 37% of one step
 * on the circular orbit, h = 1.6 .. 0.8: velocity orders 8.5, 8.7, 8.8,
 * position 9.4 .. 9.8; slope no lower than dense_order + 1 - 0.4 (as
 * tests/test_dense.c asks of every fixed-step method). The ends are the
 * states themselves; outside the step is refused. */
Test(radau15, dense_output_order_inside_a_step)
{
    pb_problem p;
    pbt_kepler(&p, 0.0);
    double h[4] = {1.6, 1.2, 1.0, 0.8}, er[4], ev[4];
    for (int i = 0; i < 4; i++) {
        pb_force_counter cnt;
        void *ws = rd_one_step(&p, &cnt, h[i]);
        long evals = cnt.evals;
        double t = p.t0 + 0.37 * h[i], r[3], v[3], re[3], ve[3];
        cr_assert_eq(pb_method_radau15.dense(ws, t, r, v), PB_OK);
        cr_assert_eq(cnt.evals, evals, "dense output evaluated the force");
        cr_assert_eq(p.exact(&p, t, re, ve), PB_OK);
        er[i] = rd_dist(r, re);
        ev[i] = rd_dist(v, ve);
        double tn, rn[3], vn[3];
        pb_method_radau15.get_state(ws, &tn, rn, vn);
        cr_assert_eq(pb_method_radau15.dense(ws, tn, r, v), PB_OK);
        cr_assert(r[0] == rn[0] && r[1] == rn[1] && v[0] == vn[0] && v[1] == vn[1]);
        cr_assert_eq(pb_method_radau15.dense(ws, p.t0, r, v), PB_OK);
        cr_assert(r[0] == p.r0[0] && v[1] == p.v0[1]);
        cr_assert_eq(pb_method_radau15.dense(ws, p.t0 + 1.01 * h[i], r, v), PB_EINVAL);
        pb_method_radau15.free(ws);
    }
    double kr = rd_slope(h, er, 4), kv = rd_slope(h, ev, 4);
    cr_log_info("radau15 dense: position order %.2f, velocity order %.2f", kr, kv);
    int q = pb_method_radau15.dense_order;
    cr_assert(kv >= q + 1 - 0.4 && kr >= q + 1 - 0.4, "orders %.2f %.2f, dense order %d", kr,
              kv, q);
}

/* A case through the harness, as `propbench run --problem NAME --method
 * radau15 --tolerance TOL --orbits N` runs it (no timing pass, nothing
 * written). */
static pb_case_result rd_case(const char *problem, double tol, double orbits)
{
    pb_case_spec s;
    pb_case_spec_default(&s);
    cr_assert_eq(pb_problem_lookup(problem, &s.problem), PB_OK);
    s.method = &pb_method_radau15;
    s.tolerance = tol;
    s.orbits = orbits;
    s.repeats = 0;
    s.cache_dir = NULL;
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_str_eq(r.status_name, "ok", "%s at %g: %s", problem, tol, r.status_name);
    return r;
}

/* kepler-e0.5 over 3 orbits against the exact two-body flow (universal
 * variables in __float128): the largest position error over every sample,
 * which comes from the dense output. Bounds: the errors measured here
 * (1.6e-8, 2.1e-11, 6.2e-14 at rtol 1e-6, 1e-9, 1e-12) times ~10, rounded
 * up, the last at the round-off floor of 3 orbits (1e-12). */
Test(radau15, kepler_e05_accuracy_against_exact)
{
    const double tol[3] = {1e-6, 1e-9, 1e-12}, bound[3] = {2e-7, 3e-10, 1e-12};
    for (int k = 0; k < 3; k++) {
        pb_case_result r = rd_case("kepler-e0.5", tol[k], 3);
        cr_log_info("radau15 kepler-e0.5 rtol %.0e, 3 orbits: pos_err_max %.3e, final %.3e, "
                    "%ld steps, %ld evaluations", tol[k], r.pos_err_max, r.pos_err_final,
                    r.steps, r.evals);
        cr_assert(r.pos_err_max <= bound[k], "rtol %g: %.3e > %.0e", tol[k], r.pos_err_max,
                  bound[k]);
        pb_case_result_free(&r);
    }
}

/* The Arenstorf orbit (Hairer, Norsett & Wanner I, Sec. II.0, from memory;
 * REFERENCES.md): a rotating frame, so the force depends on the velocity
 * (Coriolis), which radau15 takes (its substeps carry velocities). After one
 * period the state returns to the start within 1e-8 (REFERENCES.md's
 * tolerance); measured here 3.3e-14 at rtol 1e-12. The velocity-dependent
 * force slows the iteration (contraction ~ dt |da/dv| a sweep rather than
 * (dt/tau)^2): measured 7.8 sweeps an attempt. */
Test(radau15, arenstorf_orbit_closes)
{
    pb_problem p;
    cr_assert_eq(pb_problem_lookup("arenstorf", &p), PB_OK);
    cr_assert(p.velocity_dependent);
    cr_assert(pb_method_fits(&pb_method_radau15, &p));
    pb_method_config c = rd_cfg(1e-12, p.period);
    pbt_result r = pbt_integrate(&pb_method_radau15, &p, &c, p.t0 + p.period);
    cr_assert_eq(r.status, PB_OK);
    double dr = rd_dist(r.r, p.r0), dv = rd_dist(r.v, p.v0);
    cr_log_info("radau15 arenstorf, one period: |dr| %.3e, |dv| %.3e, %ld steps, %ld evals", dr,
                dv, r.steps, r.evals);
    cr_assert(dr <= 1e-8, "position after one period %.3e from the start", dr);
}

/* Brouwer's law (Brouwer 1937; Rein & Spiegel 2015, Sec. 4: their integrator's energy
 * error grows as t^(1/2) over 1e9 orbits, thanks to compensated sums): at
 * round-off accuracy the energy error is a random walk. The long run
 * (kepler-e0.5, 1e4 orbits at rtol 1e-18, `propbench run --problem
 * kepler-e0.5 --method radau15 --tolerance 1e-18 --orbits 10000`, 2.4 s)
 * gives k = 0.43 +- 0.03. Here 1000 orbits (0.2 s; measured k = 0.45 +-
 * 0.04): the criterion is sub-linear growth that is still growth, the
 * harness's "sqrt" class, k in [0.25, 0.75) (a systematic round-off drift
 * would show k ~ 1, "linear"). */
Test(radau15, energy_error_follows_brouwers_law)
{
    pb_case_result r = rd_case("kepler-e0.5", 1e-18, 1000);
    cr_log_info("radau15 kepler-e0.5 rtol 1e-18, 1000 orbits: energy k = %.3f +- %.3f (%s), "
                "energy max %.3e, %ld steps", r.g_energy.k, r.g_energy.k_err, r.g_energy.cls,
                r.energy_rel_max, r.steps);
    cr_assert(r.g_energy.k >= 0.25 && r.g_energy.k < 0.75, "energy growth k = %.3f",
              r.g_energy.k);
    cr_assert_str_eq(r.g_energy.cls, "sqrt");
    pb_case_result_free(&r);
}

/* Rein & Spiegel's rejection: a first step of a quarter orbit at periapsis
 * of kepler-e0.9 asks for a successor less than SAFETY (1/4) of itself, so
 * it is rejected and retried at the size asked for (the same polynomial
 * rescaled as its start), and the run is as accurate as one started small:
 * measured 2 rejected, 204 steps, 3.0e-13 after 3 orbits (automatic first
 * step: 0 rejected, 205 steps, 9.9e-14). Bound 3e-12 (10x). */
Test(radau15, too_long_a_step_is_rejected_and_retried)
{
    pb_problem p;
    pbt_kepler(&p, 0.9);
    pb_method_config c = rd_cfg(1e-12, p.period);
    c.h = p.period / 4;
    pbt_result r = pbt_integrate(&pb_method_radau15, &p, &c, 3 * p.period);
    cr_assert_eq(r.status, PB_OK);
    double err = pbt_pos_error(&p, &r);
    cr_log_info("radau15 e = 0.9, first step T/4: %ld rejected, %ld steps, error %.3e",
                r.rejected, r.steps, err);
    cr_assert_geq(r.rejected, 1);
    cr_assert(err <= 3e-12, "error %.3e", err);
}
