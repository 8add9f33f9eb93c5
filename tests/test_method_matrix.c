/* test_method_matrix.c - every method in pb_method_table against every
 * known-answer Kepler problem (exact error after 3 orbits within a per-method
 * tolerance), and a force that turns NaN part-way, which every method must
 * report as PB_ENONFINITE near that time. Walks the table, so new methods are
 * picked up automatically (GSL's test matrix for odeiv2 steppers, in spirit). */
#include <criterion/criterion.h>
#include <criterion/parameterized.h>
#include <math.h>
#include <string.h>
#include "test_support.h"
#include "problems/twobody.h"

#define MX_METHODS_MAX 64
#define MX_NPROB 4
#define MX_ORBITS 3.0

/* The known-answer problems: kepler-e0, -e0.1, -e0.5, -e0.6 (mu = 1, a = 1,
 * periapsis start in the x-y plane). */
static const double mx_ecc[MX_NPROB] = {0.0, 0.1, 0.5, 0.6};

/* Per-method settings: steps per orbit (fixed) or rtol = atol (adaptive), and
 * the position-error bound after 3 orbits for e = 0, 0.1, 0.5, 0.6. Source of
 * each bound: the error measured here against the exact solution (universal
 * variables in __float128), times ~10 and rounded up; floors at 1e-11 where
 * the measurement was at round-off. */
typedef struct mx_setting {
    const char *name;
    double steps_or_rtol;
    double tol[MX_NPROB];
} mx_setting;

static const mx_setting mx_settings[] = {
    /* measured: 6.5e-7, 7.9e-7, 1.2e-4, 9.2e-4 */
    {"rk4", 200, {1e-5, 1e-5, 2e-3, 1e-2}},
    /* measured: 2.5e-4, 3.3e-4, 5.3e-3, 1.6e-2 */
    {"leapfrog", 1000, {3e-3, 4e-3, 6e-2, 0.2}},
    /* measured: 1.7e-5, 1.8e-5, 9.9e-4, 5.4e-3 */
    {"yoshida4", 200, {2e-4, 2e-4, 1e-2, 6e-2}},
    /* measured: 1.4e-9, 1.5e-9, 1.1e-6, 1.5e-5 */
    {"yoshida6", 200, {2e-8, 2e-8, 2e-5, 2e-4}},
    /* measured: 5.7e-12, 6.4e-12, 2.5e-8, 5.6e-7 */
    {"yoshida8", 200, {1e-10, 1e-10, 3e-7, 6e-6}},
    /* measured: 4.1e-14, 2.3e-13, 4.9e-7, 3.0e-5 */
    {"gauss-jackson8", 200, {1e-11, 1e-11, 5e-6, 3e-4}},
    /* measured: 3.3e-8, 3.9e-8, 5.6e-6, 4.0e-5 */
    {"gsl-rk4", 200, {4e-7, 4e-7, 6e-5, 4e-4}},
    /* adaptive, rtol = atol = 1e-9; measured: 1.0e-6, 1.0e-6, 2.1e-6, 3.2e-6 */
    {"rkf45", 1e-9, {1e-5, 1e-5, 3e-5, 4e-5}},
    /* measured: 8.2e-7, 8.0e-7, 1.5e-6, 2.0e-6 */
    {"gsl-rkf45", 1e-9, {1e-5, 1e-5, 2e-5, 2e-5}},
    /* measured: 8.3e-7, 9.3e-7, 9.0e-7, 1.4e-6 */
    {"gsl-rkck", 1e-9, {1e-5, 1e-5, 1e-5, 2e-5}},
    /* measured: 3.9e-8, 2.1e-8, 2.2e-8, 9.3e-9 */
    {"gsl-rk8pd", 1e-9, {4e-7, 4e-7, 4e-7, 4e-7}},
    /* measured: 1.6e-5, 4.7e-6, 5.9e-6, 4.1e-6 */
    {"gsl-msadams", 1e-9, {2e-4, 5e-5, 6e-5, 5e-5}},
    /* rtol 1e-12: at 1e-9, 3 orbits of e = 0.5 take 46 attempts, inside the
     * step-budget test's 50 (77 at 1e-12); measured: 4.6e-13, 7.5e-14,
     * 3.4e-13, 2.4e-13 */
    {"rkn12", 1e-12, {5e-12, 1e-12, 4e-12, 3e-12}},
    /* measured: 1.2e-14, 1.4e-14, 7.6e-14, 6.1e-14 (round-off) */
    {"radau15", 1e-9, {1e-11, 1e-11, 1e-11, 1e-11}},
};

static const mx_setting *mx_find(const char *name)
{
    for (size_t i = 0; i < sizeof mx_settings / sizeof mx_settings[0]; i++)
        if (strcmp(mx_settings[i].name, name) == 0)
            return &mx_settings[i];
    return NULL;
}

/* Default for a method missing from the table, from its order p and flags:
 * pb_method_expected_error (integrators/method.h states the rule). The test
 * matrix_defaults checks this default on every method in the table. */
static void mx_default(const pb_method_type *m, double e, double *steps_or_rtol, double *tol)
{
    pb_method_expected_error(m, e, steps_or_rtol, tol);
}

static void mx_config(const pb_method_type *m, const pb_problem *p, double steps_or_rtol,
                      pb_method_config *cfg)
{
    memset(cfg, 0, sizeof *cfg);
    cfg->time_scale = p->period;
    cfg->mu = pb_problem_kepler_mu(p); /* as the harness sets it */
    cfg->max_steps = 10000000; /* a hang guard, far above any case here */
    if (m->flags & PB_KIND_ADAPTIVE) {
        cfg->rtol = steps_or_rtol;
        cfg->atol = steps_or_rtol;
    } else {
        cfg->h = p->period / steps_or_rtol;
    }
}

static int mx_nmethods(void)
{
    int n = 0;
    while (pb_method_table[n] && n < MX_METHODS_MAX)
        n++;
    return n;
}

typedef struct mx_case {
    int method;   /* index into pb_method_table */
    int problem;  /* index into mx_ecc */
    int use_default;
} mx_case;

static size_t mx_fill(mx_case *cases, int use_default)
{
    size_t n = 0;
    for (int m = 0; m < mx_nmethods(); m++)
        for (int k = 0; k < MX_NPROB; k++)
            cases[n++] = (mx_case){m, k, use_default};
    return n;
}

static void mx_check(const mx_case *c)
{
    const pb_method_type *m = pb_method_table[c->method];
    pb_problem p;
    pbt_kepler(&p, mx_ecc[c->problem]);
    /* second-order-form methods need a velocity-independent force */
    if ((m->flags & PB_FORM_SECOND) && p.velocity_dependent)
        cr_skip_test("%s needs a velocity-independent force", m->name);
    double par, tol;
    const mx_setting *s = c->use_default ? NULL : mx_find(m->name);
    if (s) {
        par = s->steps_or_rtol;
        tol = s->tol[c->problem];
    } else {
        mx_default(m, mx_ecc[c->problem], &par, &tol);
    }
    pb_method_config cfg;
    mx_config(m, &p, par, &cfg);
    pbt_result res = pbt_integrate(m, &p, &cfg, MX_ORBITS * p.period);
    cr_assert_eq(res.status, PB_OK, "%s on e = %g: %s", m->name, mx_ecc[c->problem],
                 pb_strerror(res.status));
    cr_assert(fabs(res.t - MX_ORBITS * p.period) <= 1e-12 * MX_ORBITS * p.period,
              "%s stopped at t = %.17g", m->name, res.t);
    double err = pbt_pos_error(&p, &res);
    /* the exact two-body flow (Kepler's laws; universal variables) as truth */
    cr_assert(err <= tol, "%s on e = %g (%s): position error %.3e > %.1e", m->name,
              mx_ecc[c->problem], s ? "table" : "default", err, tol);
}

/* No .timeout on these parameterized tests: Criterion 2.4.1's runner leaks
 * 48 bytes (LeakSanitizer fails the ASan run) when a timed parameterized test
 * runs beside a timed test of another suite with --jobs 2. The hang guard is
 * cfg.max_steps instead (every advance loop counts its steps against it). */
ParameterizedTestParameters(matrix, exact_error)
{
    static mx_case cases[MX_METHODS_MAX * MX_NPROB];
    size_t n = mx_fill(cases, 0);
    return cr_make_param_array(mx_case, cases, n);
}

ParameterizedTest(mx_case *c, matrix, exact_error)
{
    mx_check(c);
}

/* The order-based default must itself hold for every method we have, so a
 * newly added method without a table line still gets a meaningful bound. */
ParameterizedTestParameters(matrix, defaults)
{
    static mx_case cases[MX_METHODS_MAX * MX_NPROB];
    size_t n = mx_fill(cases, 1);
    return cr_make_param_array(mx_case, cases, n);
}

ParameterizedTest(mx_case *c, matrix, defaults)
{
    mx_check(c);
}

Test(matrix, table_fits)
{
    /* the matrix holds at most MX_METHODS_MAX methods; grow it if this fails */
    int n = 0;
    while (pb_method_table[n])
        n++;
    cr_assert_lt(n, MX_METHODS_MAX, "%d methods in pb_method_table", n);
}

/* A force that becomes NaN once t > MX_T_NAN (in periods). */
#define MX_T_NAN 1.3717 /* off every fixed-step grid used here */

static int mx_nan_accel(const pb_problem *p, double t, const double *r, const double *v,
                        double *a)
{
    (void)v;
    double r2 = r[0] * r[0] + r[1] * r[1] + r[2] * r[2];
    double k = -p->mu / (r2 * sqrt(r2));
    for (int i = 0; i < 3; i++)
        a[i] = t > MX_T_NAN * p->period ? (double)NAN : k * r[i];
    return PB_OK;
}

ParameterizedTestParameters(matrix, nan_force)
{
    static mx_case cases[MX_METHODS_MAX];
    int n = mx_nmethods();
    for (int m = 0; m < n; m++)
        cases[m] = (mx_case){m, 1, 0};
    return cr_make_param_array(mx_case, cases, (size_t)n);
}

/* GSL's odeiv2 test suite does the same with broken right-hand sides. */
ParameterizedTest(mx_case *c, matrix, nan_force)
{
    const pb_method_type *m = pb_method_table[c->method];
    pb_problem p;
    pbt_kepler(&p, mx_ecc[c->problem]);
    p.accel = mx_nan_accel;
    p.exact = NULL;
    p.exact_q = NULL;
    double par, tol = 0;
    const mx_setting *s = mx_find(m->name);
    if (s)
        par = s->steps_or_rtol;
    else
        mx_default(m, mx_ecc[c->problem], &par, &tol);
    pb_method_config cfg;
    mx_config(m, &p, par, &cfg);
    double t_nan = MX_T_NAN * p.period;
    pbt_result res = pbt_integrate(m, &p, &cfg, MX_ORBITS * p.period);
    /* status.h: a non-finite force ends the case with PB_ENONFINITE */
    cr_assert_eq(res.status, PB_ENONFINITE, "%s: status %s", m->name,
                 pb_strerror(res.status));
    /* t_fail is the last good state, so it is before the NaN, and within a
     * few steps of it: 2.5 mean steps (Yoshida's substeps reach outside
     * [t, t+h]; an adaptive method may shrink and retry first). Measured here
     * (e = 0.1): 0.23 to 1.34 mean steps before t_nan over all methods. */
    double window = 2.5 * (res.t_fail - p.t0) / (double)(res.steps > 0 ? res.steps : 1);
    cr_assert(res.t_fail <= t_nan && res.t_fail >= t_nan - window,
              "%s: t_fail = %.6f, NaN from %.6f (window %.3g)", m->name, res.t_fail, t_nan,
              window);
    /* the state handed back is the last good one: finite, at t_fail */
    for (int i = 0; i < 3; i++)
        cr_assert(isfinite(res.r[i]) && isfinite(res.v[i]), "%s: non-finite state",
                  m->name);
    cr_assert(fabs(res.t - res.t_fail) <= 1e-9 * p.period, "%s: state at %.6f, t_fail %.6f",
              m->name, res.t, res.t_fail);
}

ParameterizedTestParameters(matrix, step_budget)
{
    static mx_case cases[MX_METHODS_MAX];
    int n = mx_nmethods();
    for (int m = 0; m < n; m++)
        cases[m] = (mx_case){m, 2, 0};
    return cr_make_param_array(mx_case, cases, (size_t)n);
}

/* A step budget far short of the horizon ends the case with PB_EMAXSTEPS
 * (status.h, method.h: max_steps counts accepted + rejected steps), never
 * with a hang or a partial success, and leaves a finite state short of t_out.
 * The budget is 50 attempts, or half the attempts the method needs for the
 * horizon where that is fewer (bulirsch-stoer takes 28 long steps over the
 * 3 orbits at 1e-9: 50 would not be short of the horizon). */
ParameterizedTest(mx_case *c, matrix, step_budget)
{
    const pb_method_type *m = pb_method_table[c->method];
    pb_problem p;
    pbt_kepler(&p, mx_ecc[c->problem]);
    double par, tol = 0;
    const mx_setting *s = mx_find(m->name);
    if (s)
        par = s->steps_or_rtol;
    else
        mx_default(m, mx_ecc[c->problem], &par, &tol);
    pb_method_config cfg;
    mx_config(m, &p, par, &cfg);
    pbt_result full = pbt_integrate(m, &p, &cfg, MX_ORBITS * p.period);
    long need = full.steps + full.rejected, budget = need / 2 < 50 ? need / 2 : 50;
    cr_assert_geq(budget, 1, "%s: %ld attempts for the horizon", m->name, need);
    cfg.max_steps = budget;
    pbt_result res = pbt_integrate(m, &p, &cfg, MX_ORBITS * p.period);
    cr_assert_eq(res.status, PB_EMAXSTEPS, "%s: status %s", m->name, pb_strerror(res.status));
    cr_assert_leq(res.steps + res.rejected, budget, "%s: %ld + %ld steps", m->name, res.steps,
                  res.rejected);
    cr_assert(res.t < MX_ORBITS * p.period, "%s reached t = %.6f", m->name, res.t);
    for (int i = 0; i < 3; i++)
        cr_assert(isfinite(res.r[i]) && isfinite(res.v[i]), "%s: non-finite state", m->name);
}
