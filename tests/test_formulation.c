/* test_formulation.c - the regularised formulations (Sundman, KS) around
 * first-order methods, and gauss-jackson8-s: the KS map and its inverse,
 * observed orders and errors against the exact Kepler solution, metrics in
 * Cartesian form, and the refusals. KS: Stiefel & Scheifele (1971), "Linear
 * and Regular Celestial Mechanics" (from memory). */
#include <criterion/criterion.h>
#include <float.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include "bench/measure/force_counter.h"
#include "bench/measure/harness.h"
#include "integrators/formulation.h"
#include "problems/catalogue.h"
#include "test_support.h"

extern const pb_method_type pb_method_rk4;
extern const pb_method_type pb_method_dop853;
extern const pb_method_type pb_method_gauss_jackson8_s;

/* One advance of inner on form (or of m itself when inner is NULL) from p's
 * start to t_end through the counting wrapper; the error against the exact
 * solution in *err. */
static pbt_result form_run(const pb_method_type *inner, pb_formulation form,
                           const pb_method_type *m, const pb_problem *p,
                           const pb_method_config *cfg, double t_end, double *err)
{
    pbt_result res;
    memset(&res, 0, sizeof res);
    pb_force_counter c;
    pb_force f;
    pb_force_counter_init(&c, p, &f);
    const pb_method_type *rec = inner ? pb_formulation_record(inner) : m;
    void *ws = inner ? pb_formulation_alloc(inner, form, p->dim) : m->alloc(p->dim);
    cr_assert_not_null(ws);
    res.status = rec->start(ws, &f, cfg, p->t0, p->r0, p->v0);
    if (!res.status)
        res.status = rec->advance(ws, t_end, NULL, NULL);
    rec->get_state(ws, &res.t, res.r, res.v);
    pb_method_stats st;
    rec->get_stats(ws, &st);
    res.steps = st.steps;
    res.evals = c.evals;
    rec->free(ws);
    *err = pbt_pos_error(p, &res);
    return res;
}

static pb_method_config form_fixed_cfg(int steps_per_orbit)
{
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = 2 * M_PI / steps_per_orbit;
    cfg.mu = 1;
    cfg.time_scale = 2 * M_PI;
    return cfg;
}

/* x, v -> u, u' -> x, v: to round-off, with the bilinear relation
 * u4 u1' - u3 u2' + u2 u3' - u1 u4' = 0, t' = r and h = mu/r - v^2/2. */
Test(formulation, ks_round_trip)
{
    static const double states[][6] = {
        {1.2, -0.7, 0.4, 0.3, 0.9, -0.2},     /* x1 > 0 */
        {-0.8, 0.5, -1.1, -0.4, -0.6, 0.7},   /* x1 < 0 */
        {-2.0, 1e-9, 0.0, 0.0, -0.7, 0.01},   /* near the -x1 axis */
        {7000.0, -1200.0, 300.0, 1.1, 7.3, -0.2}, /* km, km/s */
    };
    for (size_t k = 0; k < sizeof states / sizeof states[0]; k++) {
        pb_form_eqs e = {.form = PB_FORMULATION_KS, .dim = 3, .mu = 1.7, .c = 1, .n = 1};
        const double *x = states[k], *v = states[k] + 3;
        double q[6], qp[6], t, x2[3], v2[3];
        cr_assert_eq(pb_form_to_reg(&e, 3.5, x, v, q, qp), PB_OK);
        pb_form_to_phys(&e, q, qp, &t, x2, v2);
        double r = sqrt(x[0] * x[0] + x[1] * x[1] + x[2] * x[2]);
        double vv = v[0] * v[0] + v[1] * v[1] + v[2] * v[2], vn = sqrt(vv);
        cr_assert_eq(t, 3.5);
        for (int i = 0; i < 3; i++) {
            /* a few ulps of |x| and |v| (common practice for a map and its inverse) */
            cr_assert(fabs(x2[i] - x[i]) <= 8 * DBL_EPSILON * r, "state %zu x%d %.17g %.17g", k, i,
                      x2[i], x[i]);
            cr_assert(fabs(v2[i] - v[i]) <= 8 * DBL_EPSILON * vn, "state %zu v%d %.17g %.17g", k,
                      i, v2[i], v[i]);
        }
        double bil = q[3] * qp[0] - q[2] * qp[1] + q[1] * qp[2] - q[0] * qp[3];
        cr_assert(fabs(bil) <= 8 * DBL_EPSILON * sqrt(r) * vn, "bilinear %.3e", bil);
        cr_assert(fabs(q[0] * q[0] + q[1] * q[1] + q[2] * q[2] + q[3] * q[3] - r) <= 4 * DBL_EPSILON * r);
        cr_assert_eq(qp[4], r);
        cr_assert(fabs(qp[5] - (1.7 / r - 0.5 * vv)) <= 4 * DBL_EPSILON * (1.7 / r + vv));
    }
}

/* Sundman: (x, v) -> (x, t; g v, g) -> (x, v) to round-off, with g = c r^n. */
Test(formulation, sundman_round_trip)
{
    pb_form_eqs e = {.form = PB_FORMULATION_SUNDMAN, .dim = 3, .mu = 1, .c = 0.37, .n = 1.5};
    const double x[3] = {-0.3, 1.4, 0.2}, v[3] = {0.8, 0.1, -0.5};
    double q[4], qp[4], t, x2[3], v2[3];
    cr_assert_eq(pb_form_to_reg(&e, -2.0, x, v, q, qp), PB_OK);
    double r = sqrt(0.09 + 1.96 + 0.04);
    cr_assert(fabs(qp[3] - 0.37 * pow(r, 1.5)) <= 4 * DBL_EPSILON * qp[3]);
    pb_form_to_phys(&e, q, qp, &t, x2, v2);
    cr_assert_eq(t, -2.0);
    for (int i = 0; i < 3; i++) {
        cr_assert_eq(x2[i], x[i]);
        cr_assert(fabs(v2[i] - v[i]) <= 4 * DBL_EPSILON, "v%d %.17g %.17g", i, v2[i], v[i]);
    }
}

/* Sundman's c for n = 1 is 1/(a nm) (Kepler's equation: dt = r dE/(a nm)),
 * and for n = 2 it is 1/h_ang (r^2 dtheta/dt = h_ang): the trapezoidal rule
 * must give both. Normalized e = 0.9: a = nm = 1, h_ang = sqrt(1 - e^2). */
Test(formulation, sundman_constant)
{
    pb_problem p;
    pbt_kepler(&p, 0.9);
    double c1 = pb_form_sundman_c(1, p.r0, p.v0, p.dim, 1.0);
    double c2 = pb_form_sundman_c(1, p.r0, p.v0, p.dim, 2.0);
    cr_assert(fabs(c1 - 1.0) <= 1e-14, "c(n=1) = %.17g", c1);
    cr_assert(fabs(c2 - 1.0 / sqrt(1 - 0.81)) <= 1e-13, "c(n=2) = %.17g", c2);
}

/* Observed order of rk4 in s from N and 2N steps per Kepler orbit: 4 within
 * 0.3 (common practice, REFERENCES.md), errors against the exact solution
 * after `orbits` periods. */
static void form_order(pb_formulation form, double e, int n1, double orbits, double *order,
                       double *err2)
{
    pb_problem p;
    pbt_kepler(&p, e);
    double err1;
    pb_method_config c1 = form_fixed_cfg(n1), c2 = form_fixed_cfg(2 * n1);
    pbt_result r1 = form_run(&pb_method_rk4, form, NULL, &p, &c1, orbits * 2 * M_PI, &err1);
    pbt_result r2 = form_run(&pb_method_rk4, form, NULL, &p, &c2, orbits * 2 * M_PI, err2);
    cr_assert_eq(r1.status, PB_OK);
    cr_assert_eq(r2.status, PB_OK);
    /* one s-step per physical step of the grid: N per Kepler orbit (to 1%:
     * Sundman's s-length of an orbit follows the numerical energy) */
    cr_assert(fabs((double)r1.steps - orbits * n1) <= 0.01 * orbits * n1 + 1, "%ld steps", r1.steps);
    *order = log(err1 / *err2) / log(2.0);
}

Test(formulation, rk4_orders_ks_and_sundman)
{
    /* N in the asymptotic range (Sundman's order at e = 0.99 rises 1.60,
     * 2.83, 3.72, 3.89, 3.95 from N = 400 to 6400; KS is 4.000 from 200 on:
     * on a Kepler orbit its u is a harmonic oscillator); err: the error
     * measured at 2N when this test was written, kept to within a factor 1.5 */
    struct { pb_formulation f; double e; int n; double err; } cs[] = {
        {PB_FORMULATION_KS, 0.9, 200, 2.822e-08},
        {PB_FORMULATION_KS, 0.99, 200, 9.765e-08},
        {PB_FORMULATION_SUNDMAN, 0.9, 800, 1.977e-06},
        {PB_FORMULATION_SUNDMAN, 0.99, 3200, 2.546e-05},
    };
    for (size_t k = 0; k < sizeof cs / sizeof cs[0]; k++) {
        double order, err;
        form_order(cs[k].f, cs[k].e, cs[k].n, 10, &order, &err);
        cr_assert(fabs(order - 4.0) <= 0.3, "%s e=%g: observed order %.3f",
                  pb_formulation_name(cs[k].f), cs[k].e, order);
        cr_assert(err <= 1.5 * cs[k].err, "%s e=%g: error %.3e", pb_formulation_name(cs[k].f),
                  cs[k].e, err);
    }
}

/* dop853 on the regularised equations: the error against the exact
 * solution after 10 orbits follows the tolerance, and the regularised form
 * costs fewer evaluations than the Cartesian one at the same tolerance
 * (the reason for regularising). */
Test(formulation, dop853_exact_error_and_cost)
{
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.mu = 1;
    cfg.time_scale = 2 * M_PI;
    double es[] = {0.9, 0.99};
    for (int k = 0; k < 2; k++) {
        pb_problem p;
        pbt_kepler(&p, es[k]);
        double ec, eks, esu;
        cfg.rtol = cfg.atol = 1e-11;
        pbt_result rc = form_run(NULL, 0, &pb_method_dop853, &p, &cfg, 20 * M_PI, &ec);
        pbt_result rk = form_run(&pb_method_dop853, PB_FORMULATION_KS, NULL, &p, &cfg, 20 * M_PI, &eks);
        pbt_result rs = form_run(&pb_method_dop853, PB_FORMULATION_SUNDMAN, NULL, &p, &cfg, 20 * M_PI, &esu);
        cr_assert_eq(rc.status, PB_OK);
        cr_assert_eq(rk.status, PB_OK);
        cr_assert_eq(rs.status, PB_OK);
        /* measured when written (e = 0.9, 0.99): Cartesian 2.99e-8, 2.84e-7 in
         * 12853, 21014 evaluations; KS 4.30e-11, 4.76e-10 in 2297, 2321;
         * Sundman 6.91e-8, 1.12e-7 in 6466, 11603. KS must stay 100 times
         * more accurate than Cartesian at under a quarter of its cost;
         * Sundman within 3 times Cartesian's error at under 60% of its cost */
        cr_assert(eks <= 1e-2 * ec && rk.evals < rc.evals / 4, "e=%g ks %.3e (%ld evals), "
                  "cartesian %.3e (%ld)", es[k], eks, rk.evals, ec, rc.evals);
        cr_assert(esu <= 3 * ec && rs.evals < 0.6 * (double)rc.evals, "e=%g sundman %.3e "
                  "(%ld evals), cartesian %.3e (%ld)", es[k], esu, rs.evals, ec, rc.evals);
    }
}

/* gauss-jackson8-s on kepler-e0.9 over 10 orbits: observed order between
 * 96 and 128 steps per orbit (its errors at 80, 96, 112, 128, 160 give
 * successive orders 10.8, 10.9, 11.0, 12.0: the asymptotic range starts
 * near 80), against gauss-jackson8's 11 (tests/test_gauss_jackson.c), and
 * the error against the exact solution at 128 (2.362e-10 when written,
 * kept within a factor 1.5). */
Test(formulation, gauss_jackson8_s_order_and_error)
{
    pb_problem p;
    pbt_kepler(&p, 0.9);
    double e96, e128;
    pb_method_config c96 = form_fixed_cfg(96), c128 = form_fixed_cfg(128);
    pbt_result r96 = form_run(NULL, 0, &pb_method_gauss_jackson8_s, &p, &c96, 20 * M_PI, &e96);
    pbt_result r128 = form_run(NULL, 0, &pb_method_gauss_jackson8_s, &p, &c128, 20 * M_PI, &e128);
    cr_assert_eq(r96.status, PB_OK);
    cr_assert_eq(r128.status, PB_OK);
    double order = log(e96 / e128) / log(128.0 / 96.0);
    cr_assert(fabs(order - 11.0) <= 0.3, "observed order %.3f (errors %.3e, %.3e)", order, e96,
              e128);
    cr_assert(e128 <= 1.5 * 2.362e-10, "error %.3e", e128);
    /* one fixed s-step per grid step; the iterated corrector costs a
     * second evaluation on most steps (2.28 a step when written) */
    cr_assert_eq(r128.steps, 1280);
    cr_assert(r128.evals <= 3 * r128.steps, "%ld evaluations", r128.evals);
}

/* Output times never change the integration: the same run in one advance
 * and in 7 (each output reached on the inner dense output) ends in the same
 * bits, for a fixed-step and an adaptive inner method; and the 7 outputs
 * are at their times exactly. */
Test(formulation, output_times_leave_the_integration_alone)
{
    pb_problem p;
    pbt_kepler(&p, 0.9);
    const pb_method_type *inner[] = {&pb_method_rk4, &pb_method_dop853};
    for (int k = 0; k < 2; k++) {
        pb_method_config cfg = form_fixed_cfg(300);
        if (k) {
            cfg.h = 0;
            cfg.rtol = cfg.atol = 1e-10;
        }
        pbt_result one[2], seven[2];
        for (int f = 0; f < 2; f++) {
            pb_formulation form = f ? PB_FORMULATION_SUNDMAN : PB_FORMULATION_KS;
            const pb_method_type *rec = pb_formulation_record(inner[k]);
            for (int pieces = 1; pieces <= 7; pieces += 6) {
                pb_force_counter c;
                pb_force fo;
                pb_force_counter_init(&c, &p, &fo);
                void *ws = pb_formulation_alloc(inner[k], form, p.dim);
                cr_assert_not_null(ws);
                cr_assert_eq(rec->start(ws, &fo, &cfg, p.t0, p.r0, p.v0), PB_OK);
                pbt_result *res = pieces == 1 ? &one[f] : &seven[f];
                for (int j = 1; j <= pieces; j++) {
                    double t_out = 3.3 * 2 * M_PI * j / pieces;
                    cr_assert_eq(rec->advance(ws, t_out, NULL, NULL), PB_OK);
                    rec->get_state(ws, &res->t, res->r, res->v);
                    cr_assert_eq(res->t, t_out);
                }
                rec->free(ws);
            }
            for (int i = 0; i < 2; i++)
                cr_assert(one[f].r[i] == seven[f].r[i] && one[f].v[i] == seven[f].v[i],
                          "%s %s: component %d differs", inner[k]->name,
                          pb_formulation_name(form), i);
        }
    }
}

/* The case's energy error is the Cartesian one: recomputed here from the
 * final Cartesian state (E = v^2/2 - mu/r, two-body energy, REFERENCES.md)
 * it equals the summary's to round-off. */
Test(formulation, energy_in_cartesian_form)
{
    pb_case_spec spec;
    pb_case_spec_default(&spec);
    cr_assert_eq(pb_problem_lookup("kepler-e0.99", &spec.problem), PB_OK);
    spec.problem.formulation = PB_FORMULATION_KS;
    spec.method = &pb_method_rk4;
    spec.steps_per_orbit = 300;
    spec.orbits = 10;
    spec.repeats = 0;
    spec.cache_dir = NULL;
    pb_case_result res;
    cr_assert_eq(pb_case_run(&spec, &res), PB_OK);
    cr_assert_eq(res.status, PB_OK);
    /* the state at the horizon, as the last sample holds it (res.final_r is
     * the integration's end, a grid time some ulps past the horizon) */
    const pb_sample *ls = &res.samples[res.nsamples - 1];
    cr_assert_eq(ls->t, res.t_final);
    const double *r = ls->r, *v = ls->v;
    double T = 0.5 * (v[0] * v[0] + v[1] * v[1]), U = 1.0 / sqrt(r[0] * r[0] + r[1] * r[1]);
    double rel = fabs(T - U + 0.5) / 0.5;
    /* to the rounding of the difference T - U (a few ulps of T + U: at this
     * final periapsis T + U is 200 against |E| = 0.5), never closer: the
     * regularised state's own energy slot would differ by the method's error */
    cr_assert(fabs(rel - res.energy_rel_final) <= 4 * DBL_EPSILON * (T + U) / 0.5,
              "summary %.6e, recomputed %.6e", res.energy_rel_final, rel);
    cr_assert(res.energy_rel_final > 1e-10, "%.3e", res.energy_rel_final); /* 1.1e-8 measured */
    cr_assert(strstr(res.id, "__ks__") != NULL, "id %s", res.id);
    /* the error against the exact solution is measured too, in Cartesian form */
    cr_assert(res.pos_err_final > 0 && res.pos_err_final < 1e-3, "%.3e", res.pos_err_final);
    pb_case_result_free(&res);
}

static int form_cli(const char *const *args, char *err, size_t errlen)
{
    static char out[16384];
    return pbt_run_cli(args, out, sizeof out, err, errlen);
}

/* Refusals: exit 2, a message naming what and where, nothing written. */
Test(formulation, refusals)
{
    char dir[256], out[300], err[4096], file[300];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(out, sizeof out, "%s/run", dir);
    const char *cr3bp[] = {"run", "--problem", "arenstorf", "--method", "rk4", "--steps-per-orbit",
                           "1000", "--formulation", "ks", "--out", out, NULL};
    cr_assert_eq(form_cli(cr3bp, err, sizeof err), 2);
    cr_assert(strstr(err, "formulation 'ks' needs a central body's GM"), "%s", err);
    const char *second[] = {"run", "--problem", "kepler-e0.5", "--method", "leapfrog",
                            "--steps-per-orbit", "100", "--formulation", "ks", "--out", out, NULL};
    cr_assert_eq(form_cli(second, err, sizeof err), 2);
    cr_assert(strstr(err, "method 'leapfrog' cannot take formulation 'ks'"), "%s", err);
    const char *bad[] = {"run", "--problem", "kepler-e0.5", "--method", "rk4", "--steps-per-orbit",
                         "100", "--formulation", "levi-civita", "--out", out, NULL};
    cr_assert_eq(form_cli(bad, err, sizeof err), 2);
    cr_assert(strstr(err, "--formulation: unknown formulation 'levi-civita'"), "%s", err);
    const char *sel[] = {"select", "--problem", "kepler-e0.5", "--orbits", "1", "--max-pos-err",
                         "1e-3", "--formulation", "KS", "--out", out, NULL};
    cr_assert_eq(form_cli(sel, err, sizeof err), 2);
    cr_assert(strstr(err, "unknown formulation 'KS'"), "%s", err);
    snprintf(file, sizeof file, "%s/p.ini", dir);
    FILE *f = fopen(file, "w");
    cr_assert_not_null(f);
    fprintf(f, "[case x]\nunits = normalized\nmu = 1\na = 1\ne = 0.5\nformulation = polar\n");
    fclose(f);
    const char *pf[] = {"run", "--problem-file", file, "--method", "rk4", "--steps-per-orbit",
                        "100", "--out", out, NULL};
    cr_assert_eq(form_cli(pf, err, sizeof err), 2);
    char want[400];
    snprintf(want, sizeof want, "%s:6: key 'formulation': unknown formulation 'polar'", file);
    cr_assert(strstr(err, want), "%s", err);
    cr_assert(!pbt_exists(out), "%s was written", out);
}

/* A regularised formulation is set up from the Kepler period of the start:
 * on an unbound orbit (hyperbolic-flyby, e = 1.158) gauss-jackson8-s and a
 * KS case are refused with exit 2 and a message naming method and problem
 * (they were "crashed: invalid argument"), the standard suite leaves them
 * out, and the same method on a bound orbit fits. */
Test(formulation, unbound_orbit_refused)
{
    char dir[256], out[300], err[4096];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(out, sizeof out, "%s/run", dir);
    const char *gjs[] = {"run", "--problem", "hyperbolic-flyby", "--method", "gauss-jackson8-s",
                         "--steps-per-orbit", "100", "--out", out, NULL};
    cr_assert_eq(form_cli(gjs, err, sizeof err), 2);
    cr_assert(strstr(err, "method 'gauss-jackson8-s' steps in a regularised time") &&
              strstr(err, "needs a bound orbit, but problem 'hyperbolic-flyby' starts on an unbound one"),
              "%s", err);
    const char *ks[] = {"run", "--problem", "hyperbolic-flyby", "--method", "dop853", "--tolerance",
                        "1e-9", "--formulation", "ks", "--out", out, NULL};
    cr_assert_eq(form_cli(ks, err, sizeof err), 2);
    cr_assert(strstr(err, "method 'dop853' in the problem's regularised formulation"), "%s", err);
    cr_assert(!pbt_exists(out), "%s was written", out);
    pb_problem hyp, ell;
    cr_assert_eq(pb_problem_lookup("hyperbolic-flyby", &hyp), PB_OK);
    cr_assert_eq(pb_problem_lookup("kepler-e0.99", &ell), PB_OK);
    cr_assert(!pb_method_fits(&pb_method_gauss_jackson8_s, &hyp));
    cr_assert(pb_method_fits(&pb_method_gauss_jackson8_s, &ell));
    cr_assert(pb_method_fits(&pb_method_dop853, &hyp), "Cartesian dop853 takes any orbit");
}

/* summary.json records the formulation ("formulation": "ks", the id's
 * "__ks"), a problem file's key sets it, and a Cartesian case has no key,
 * so that baselines made before it compare unchanged. */
Test(formulation, summary_records_it)
{
    char dir[256], out[300], err[4096], file[300], path[400];
    pbt_tmpdir(dir, sizeof dir);
    snprintf(file, sizeof file, "%s/p.ini", dir);
    FILE *f = fopen(file, "w");
    cr_assert_not_null(f);
    fprintf(f, "[case ecc]\nunits = normalized\nmu = 1\na = 1\ne = 0.9\norbits = 2\n"
               "formulation = sundman\n");
    fclose(f);
    snprintf(out, sizeof out, "%s/a", dir);
    const char *a[] = {"run", "--problem-file", file, "--method", "dop853", "--tolerance", "1e-9",
                       "--repeats", "0", "--quiet", "--out", out, NULL};
    cr_assert_eq(form_cli(a, err, sizeof err), 0, "%s", err);
    snprintf(path, sizeof path, "%s/summary.json", out);
    char *doc = pbt_slurp_file(path, NULL);
    cr_assert_not_null(doc);
    cr_assert(strstr(doc, "\"formulation\": \"sundman\""), "no formulation key");
    cr_assert(strstr(doc, "ecc__dop853__tol1e-09__sundman__o2"), "id");
    free(doc);
    snprintf(out, sizeof out, "%s/b", dir);
    const char *b[] = {"run", "--problem-file", file, "--method", "dop853", "--tolerance", "1e-9",
                       "--formulation", "cartesian", "--repeats", "0", "--quiet", "--out", out,
                       NULL};
    cr_assert_eq(form_cli(b, err, sizeof err), 0, "%s", err);
    snprintf(path, sizeof path, "%s/summary.json", out);
    doc = pbt_slurp_file(path, NULL);
    cr_assert_not_null(doc);
    cr_assert(!strstr(doc, "\"formulation\""), "a Cartesian case has the key");
    free(doc);
}

/* Dense output between step ends, as the harness samples it (from inside
 * the observer, after each step): on kepler-e0.9 over 2 orbits, the largest
 * error of the states at 1/4, 1/2 and 3/4 of every step against the exact
 * solution stays within 10 times the largest error at the step ends (plus
 * 1e-13 of round-off), for KS and Sundman around rk4 (300 s-steps an orbit),
 * and within that plus 10 times the tolerance around dop853 (tolerance
 * 1e-10; its continuous extension is accurate to about the tolerance, not
 * to the step ends' global error: KS 2.6e-10 between, 2.2e-11 at the ends):
 * the state at a sample time comes from the inner method's continuous
 * extension at the s where t(s) equals it. */
typedef struct form_dense_watch {
    const pb_method_type *rec;
    void *ws;
    const pb_problem *p;
    double t_prev, end_max, mid_max;
} form_dense_watch;

static double form_exact_dev(const pb_problem *p, double t, const double *r)
{
    double re[3], ve[3], d = 0;
    cr_assert_eq(p->exact(p, t, re, ve), PB_OK);
    for (int i = 0; i < p->dim; i++)
        d = fmax(d, fabs(r[i] - re[i]));
    return d;
}

static int form_dense_observe(void *ctx, double t, const double *r, const double *v)
{
    form_dense_watch *w = ctx;
    (void)v;
    w->end_max = fmax(w->end_max, form_exact_dev(w->p, t, r));
    for (int k = 1; k <= 3; k++) {
        double tm = w->t_prev + 0.25 * k * (t - w->t_prev), rm[3], vm[3];
        cr_assert_eq(w->rec->dense(w->ws, tm, rm, vm), PB_OK, "dense at %.17g", tm);
        w->mid_max = fmax(w->mid_max, form_exact_dev(w->p, tm, rm));
    }
    w->t_prev = t;
    return 0;
}

Test(formulation, dense_output_between_step_ends)
{
    pb_problem p;
    pbt_kepler(&p, 0.9);
    const pb_method_type *inner[] = {&pb_method_rk4, &pb_method_dop853};
    for (int k = 0; k < 2; k++)
        for (int f = 0; f < 2; f++) {
            pb_formulation form = f ? PB_FORMULATION_SUNDMAN : PB_FORMULATION_KS;
            pb_method_config cfg = form_fixed_cfg(300);
            if (k) {
                cfg.h = 0;
                cfg.rtol = cfg.atol = 1e-10;
            }
            pb_force_counter c;
            pb_force fo;
            pb_force_counter_init(&c, &p, &fo);
            form_dense_watch w = {pb_formulation_record(inner[k]), NULL, &p, p.t0, 0, 0};
            w.ws = pb_formulation_alloc(inner[k], form, p.dim);
            cr_assert_not_null(w.ws);
            cr_assert_eq(w.rec->start(w.ws, &fo, &cfg, p.t0, p.r0, p.v0), PB_OK);
            cr_assert_eq(w.rec->advance(w.ws, 2 * 2 * M_PI, form_dense_observe, &w), PB_OK);
            w.rec->free(w.ws);
            cr_expect(w.mid_max <= 10 * w.end_max + 10 * cfg.rtol + 1e-13,
                      "%s %s: between ends %.3e, at ends %.3e",
                      inner[k]->name, pb_formulation_name(form), w.mid_max, w.end_max);
            cr_expect(w.end_max > 0 && w.end_max < 1e-2, "%s %s: at ends %.3e", inner[k]->name,
                      pb_formulation_name(form), w.end_max);
        }
}
