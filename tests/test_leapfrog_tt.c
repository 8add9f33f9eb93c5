/* test_leapfrog_tt.c - the time-transformed leapfrog and its Yoshida
 * compositions: on the Kepler problem every step end lies on the starting
 * ellipse to round-off while the time errs at the method's order (Preto &
 * Tremaine 1999; Mikkola & Tanikawa 1999); observed orders on a perturbed
 * problem with an exact solution (revolving-e0.5) and on leo-j2 against
 * the reference; the stepping contract of a method that steps in s; the
 * refusal of velocity-dependent and non-central problems through the CLI. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "test_support.h"
#include "bench/measure/force_counter.h"
#include "bench/measure/harness.h"
#include "problems/catalogue.h"
#include "problems/twobody.h"

extern const pb_method_type pb_method_leapfrog_tt;
extern const pb_method_type pb_method_yoshida4_tt;
extern const pb_method_type pb_method_yoshida6_tt;
extern const pb_method_type pb_method_yoshida8_tt;

static const pb_method_type *const ltt_methods[4] = {
    &pb_method_leapfrog_tt, &pb_method_yoshida4_tt, &pb_method_yoshida6_tt,
    &pb_method_yoshida8_tt};

/* What an observer on every step end of a normalized Kepler orbit (mu = 1,
 * a = 1, periapsis at t = 0) sees: the largest errors of the invariants
 * relative to their start, and the time error of the last step end, t minus
 * the time at which the exact orbit passes the same point (its mean anomaly,
 * Kepler's equation; REFERENCES.md two-body laws). */
typedef struct ltt_watch {
    double e, E0, h0[3], hn0, ev0[3];
    double dE, dh, dev, dt_last, t_last;
    long steps;
} ltt_watch;

static void ltt_invariants(const double *r, const double *v, double *E, double *h, double *ev)
{
    double rn = sqrt(r[0] * r[0] + r[1] * r[1] + r[2] * r[2]);
    *E = 0.5 * (v[0] * v[0] + v[1] * v[1] + v[2] * v[2]) - 1.0 / rn;
    h[0] = r[1] * v[2] - r[2] * v[1];
    h[1] = r[2] * v[0] - r[0] * v[2];
    h[2] = r[0] * v[1] - r[1] * v[0];
    /* eccentricity vector v x h / mu - r / |r| */
    ev[0] = v[1] * h[2] - v[2] * h[1] - r[0] / rn;
    ev[1] = v[2] * h[0] - v[0] * h[2] - r[1] / rn;
    ev[2] = v[0] * h[1] - v[1] * h[0] - r[2] / rn;
}

static int ltt_observe(void *ctx, double t, const double *r, const double *v)
{
    ltt_watch *w = ctx;
    double E, h[3], ev[3], dh = 0, dev = 0;
    ltt_invariants(r, v, &E, h, ev);
    for (int i = 0; i < 3; i++) {
        dh += (h[i] - w->h0[i]) * (h[i] - w->h0[i]);
        dev += (ev[i] - w->ev0[i]) * (ev[i] - w->ev0[i]);
    }
    w->dE = fmax(w->dE, fabs(E / w->E0 - 1));
    w->dh = fmax(w->dh, sqrt(dh) / w->hn0);
    w->dev = fmax(w->dev, sqrt(dev) / w->e);
    /* eccentric anomaly from r and r.v (a = mu = 1), then Kepler's equation */
    double rn = sqrt(r[0] * r[0] + r[1] * r[1] + r[2] * r[2]);
    double rv = r[0] * v[0] + r[1] * v[1] + r[2] * v[2];
    double Ea = atan2(rv / w->e, (1.0 - rn) / w->e);
    w->dt_last = remainder(t - (Ea - w->e * sin(Ea)), 2 * M_PI);
    w->t_last = t;
    w->steps++;
    return 0;
}

static ltt_watch ltt_kepler_run(const pb_method_type *m, double e, int n, double orbits,
                                int compensated)
{
    pb_problem p;
    pbt_kepler(&p, e);
    pb_force_counter cnt;
    pb_force f;
    pb_force_counter_init(&cnt, &p, &f);
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = p.period / n;
    cfg.mu = 1.0;
    cfg.compensated = compensated;
    ltt_watch w;
    memset(&w, 0, sizeof w);
    w.e = e;
    ltt_invariants(p.r0, p.v0, &w.E0, w.h0, w.ev0);
    w.hn0 = sqrt(w.h0[0] * w.h0[0] + w.h0[1] * w.h0[1] + w.h0[2] * w.h0[2]);
    void *ws = m->alloc(3);
    cr_assert_not_null(ws);
    cr_assert_eq(m->start(ws, &f, &cfg, p.t0, p.r0, p.v0), PB_OK);
    int s = m->advance(ws, p.t0 + orbits * p.period, ltt_observe, &w);
    cr_assert_eq(s, PB_OK, "%s: %s", m->name, pb_strerror(s));
    m->free(ws);
    return w;
}

/* kepler-e0.9 and kepler-e0.99 (normalized, as the catalogue's) at 30 steps
 * an orbit over 100 orbits: the orbit's shape at every step end to
 * round-off. Bound 1e-12 relative on the energy, |h| and the eccentricity
 * vector (round-off: ~1e-16 a step over 3000 steps, with the 1/r of a
 * periapsis at 0.01; measured here: see the log). The time error is
 * truncation, far above round-off (more than 1e-8 of an orbit). */
Test(leapfrog_tt, kepler_orbit_shape_exact_time_not, .timeout = 60)
{
    const double ecc[2] = {0.9, 0.99};
    for (int k = 0; k < 4; k++)
        for (int j = 0; j < 2; j++) {
            ltt_watch w = ltt_kepler_run(ltt_methods[k], ecc[j], 30, 100, 0);
            cr_log_info("%s e = %g, 30 steps/orbit, 100 orbits: energy %.2e |h| %.2e "
                        "ecc vector %.2e, time error %.3e at t = %.2f (%ld steps)",
                        ltt_methods[k]->name, ecc[j], w.dE, w.dh, w.dev, w.dt_last, w.t_last,
                        w.steps);
            /* the energy relative to mu/r at periapsis, the size of the terms
             * that cancel there (1/(1-e) times |E0|; common practice) */
            w.dE *= 0.5 * (1 - ecc[j]);
            cr_assert(w.dE < 1e-12 && w.dh < 1e-12 && w.dev < 1e-12,
                      "%s e = %g: energy %.2e |h| %.2e ecc vector %.2e", ltt_methods[k]->name,
                      ecc[j], w.dE, w.dh, w.dev);
            cr_assert(fabs(w.dt_last) > 1e-8 * 2 * M_PI, "%s e = %g: time error %.3e",
                      ltt_methods[k]->name, ecc[j], w.dt_last);
        }
}

/* The time error's rate (time error / t) at n and 2n steps an orbit over
 * 10 orbits of kepler-e0.99: order p within 0.3 (common practice,
 * REFERENCES.md "Orders of accuracy"; Yoshida 1990 for the compositions).
 * Measured here, rates at n = 10..640: leapfrog-tt 3.06e-2, 7.98e-3,
 * 2.03e-3, 5.10e-4, 1.28e-4 (1.99 from 40 to 80 and 80 to 160); yoshida4-tt
 * 2.50e-6, 1.57e-7 at 80, 160 (3.99); yoshida6-tt 2.93e-8, 4.63e-10 at 40,
 * 80 (5.98); yoshida8-tt 2.20e-9, 8.81e-12 at 40, 80 (7.96), round-off
 * (1e-13) from 160 on. The rates at e = 0.9 agree to 3 digits: in s the
 * timing error does not depend on the eccentricity. */
Test(leapfrog_tt, kepler_time_error_order, .timeout = 60)
{
    const int n1[4] = {80, 80, 40, 40};
    for (int k = 0; k < 4; k++) {
        ltt_watch a = ltt_kepler_run(ltt_methods[k], 0.99, n1[k], 10, 0);
        ltt_watch b = ltt_kepler_run(ltt_methods[k], 0.99, 2 * n1[k], 10, 0);
        double ra = a.dt_last / a.t_last, rb = b.dt_last / b.t_last, q = log2(ra / rb);
        cr_log_info("%s kepler-e0.99: time error rates %.4e, %.4e at %d, %d steps/orbit: "
                    "order %.3f", ltt_methods[k]->name, ra, rb, n1[k], 2 * n1[k], q);
        cr_assert(fabs(q - ltt_methods[k]->order) <= 0.3, "%s: observed order %.3f",
                  ltt_methods[k]->name, q);
    }
}

/* A case through the harness, as `propbench run` runs it (no timing pass,
 * no cache). */
static pb_case_result ltt_case(const char *problem, const pb_method_type *m, int n, double orbits)
{
    pb_case_spec s;
    pb_case_spec_default(&s);
    cr_assert_eq(pb_problem_lookup(problem, &s.problem), PB_OK);
    s.method = m;
    s.steps_per_orbit = n;
    s.orbits = orbits;
    s.repeats = 0;
    s.cache_dir = NULL;
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_str_eq(r.status_name, "ok", "%s %s n %d: %s (%s)", problem, m->name, n,
                     r.status_name, r.status_detail);
    return r;
}

/* Observed order of the largest position error on a perturbed problem:
 * order p within 0.3 (common practice, REFERENCES.md "Orders of accuracy"). */
static void ltt_case_order(const char *problem, double orbits, const int *n1)
{
    for (int k = 0; k < 4; k++) {
        pb_case_result a = ltt_case(problem, ltt_methods[k], n1[k], orbits);
        pb_case_result b = ltt_case(problem, ltt_methods[k], 2 * n1[k], orbits);
        double q = log2(a.pos_err_max / b.pos_err_max);
        cr_log_info("%s %s: pos_err_max %.4e, %.4e at %d, %d steps/orbit (%ld, %ld "
                    "evaluations): order %.3f", problem, ltt_methods[k]->name, a.pos_err_max,
                    b.pos_err_max, n1[k], 2 * n1[k], a.evals, b.evals, q);
        cr_assert(fabs(q - ltt_methods[k]->order) <= 0.3, "%s on %s: observed order %.3f",
                  ltt_methods[k]->name, problem, q);
        pb_case_result_free(&a);
        pb_case_result_free(&b);
    }
}

/* revolving-e0.5: Kepler plus a gamma/r^2 potential, a perturbation with
 * Newton's exact solution (Principia I, Prop. 44; problems/revolving.c),
 * over 10 orbits. Measured here (n = 10..320): leapfrog-tt 7.64e-2, 1.92e-2
 * at 80, 160 (2.00); yoshida4-tt 5.36e-4, 3.37e-5 (3.99); yoshida6-tt
 * 9.45e-6, 1.51e-7 at 40, 80 (5.97); yoshida8-tt 1.21e-6, 5.02e-9 at 40, 80
 * (7.91), 1.1e-13 at 320 (round-off). */
Test(leapfrog_tt, revolving_order_against_exact, .timeout = 60)
{
    const int n1[4] = {80, 80, 40, 40};
    ltt_case_order("revolving-e0.5", 10, n1);
}

/* leo-j2 over 15 orbits against the reference trajectory (problems/
 * reference.c, __float128). Measured here: leapfrog-tt 3.30e2, 82.5 m at
 * 80, 160 (2.00); yoshida4-tt 1.62, 0.102 (3.99); yoshida6-tt 3.02e-4,
 * 4.74e-6 at 80, 160 (5.99); yoshida8-tt 1.46e-3, 5.91e-6 at 40, 80 (7.94). */
Test(leapfrog_tt, leo_j2_order_against_reference, .timeout = 120)
{
    const int n1[4] = {80, 80, 80, 40};
    ltt_case_order("leo-j2", 15, n1);
}

/* Refused before any step, through the CLI: leo-drag's drag depends on the
 * velocity (PB_FORM_SECOND), arenstorf (the CR3BP) has no central Kepler
 * term and a Coriolis force (PB_KIND_KEPLER, PB_FORM_SECOND): exit status
 * 2, a message naming method and problem, no run folder written. */
Test(leapfrog_tt, refused_on_drag_and_cr3bp_through_cli, .timeout = 60)
{
    const char *problems[2] = {"leo-drag", "arenstorf"};
    const char *why[2] = {"depends on velocity", "no central"};
    for (int i = 0; i < 2; i++) {
        char dir[512], outdir[600], out[4096], err[4096];
        pbt_tmpdir(dir, sizeof dir);
        cr_assert(dir[0]);
        snprintf(outdir, sizeof outdir, "%s/run", dir);
        const char *args[] = {"run", "--problem", problems[i], "--method", "leapfrog-tt",
                              "--steps-per-orbit", "50", "--repeats", "0", "--out", outdir,
                              NULL};
        int rc = pbt_run_cli(args, out, sizeof out, err, sizeof err);
        cr_assert_eq(rc, 2, "%s: exit %d (%s)", problems[i], rc, err);
        cr_assert(strstr(err, "leapfrog-tt") && strstr(err, problems[i]) && strstr(err, why[i]),
                  "%s: %s", problems[i], err);
        cr_assert_not(pbt_exists(outdir), "%s: %s written", problems[i], outdir);
    }
}
