/* test_fixed_step.c - the advance loop the fixed-step methods share
 * (integrators/fixed_step.h): grid times from the step count, off-grid and
 * backward times refused, the step budget, the observer's stop, a failing
 * step; then the same contract through every fixed-step method in the table.
 * Source of every check: the method contract (method.h, DEVELOPERS.md). */
#include <criterion/criterion.h>
#include <math.h>
#include <string.h>
#include "integrators/fixed_step.h"
#include "test_support.h"

/* A toy method whose state has exact binary values: r counts the steps,
 * v is multiplied by 1.5 each step (1.5^n is exact while 3^n < 2^53). */
typedef struct fst_toy {
    double r[1], v[1];
    long fail_at;          /* index whose step fails (-1: none) */
    int fail_status;
    long calls;
    double t_last, t1_last;
    long bad_times;        /* calls whose t or t1 was not t0 + n*h, t0 + (n+1)*h */
    double t0, h;
} fst_toy;

static int fst_step(void *ctx, long n, double t, double t1)
{
    fst_toy *y = ctx;
    y->calls++;
    if (t != y->t0 + (double)n * y->h || t1 != y->t0 + (double)(n + 1) * y->h)
        y->bad_times++;
    y->t_last = t;
    y->t1_last = t1;
    if (n == y->fail_at)
        return y->fail_status; /* the state of index n is left alone */
    y->r[0] += 1.0;
    y->v[0] *= 1.5;
    return PB_OK;
}

typedef struct fst_obs {
    long calls, stop_at;   /* return `code` on call number stop_at (0: never) */
    int code;
    double t_last, r_last;
} fst_obs;

static int fst_observe(void *ctx, double t, const double *r, const double *v)
{
    fst_obs *o = ctx;
    (void)v;
    o->calls++;
    o->t_last = t;
    o->r_last = r[0];
    return o->calls == o->stop_at ? o->code : 0;
}

static void fst_setup(pb_fixed_grid *g, fst_toy *y, pb_method_stats *st, double t0, double h,
                      long max_steps)
{
    memset(y, 0, sizeof *y);
    y->v[0] = 1.0;
    y->fail_at = -1;
    y->t0 = t0;
    y->h = h;
    memset(st, 0, sizeof *st);
    st->t_fail = t0;
    pb_fixed_grid_init(g, t0, h, max_steps, y->r, y->v, st);
}

Test(fixed_step, grid_times_from_the_count)
{
    /* 1000 steps of 0.1 from 0: 1000 * 0.1 rounds to 100 exactly, while
     * adding 0.1 a thousand times gives 99.9999999999986 (round-off of the
     * running sum: common practice), so the loop must land on t_out = 100. */
    pb_fixed_grid g;
    fst_toy y;
    pb_method_stats st;
    fst_obs o = {0};
    fst_setup(&g, &y, &st, 0.0, 0.1, 0);
    double sum = 0;
    for (int k = 0; k < 1000; k++)
        sum += 0.1;
    cr_assert_neq(sum, 100.0);
    cr_assert_eq(pb_fixed_grid_advance(&g, 100.0, fst_step, &y, fst_observe, &o), PB_OK);
    cr_assert_eq(g.n, 1000);
    cr_assert_eq(st.steps, 1000);
    cr_assert_eq(y.calls, 1000);
    cr_assert_eq(y.bad_times, 0);
    cr_assert_eq(y.t1_last, 100.0);
    cr_assert_eq(o.calls, 1000);
    cr_assert_eq(o.t_last, 100.0);
    cr_assert_eq(o.r_last, 1000.0);   /* the observer sees the committed state */
    cr_assert_eq(pb_fixed_grid_time(&g, g.n), 100.0);
    /* already there: nothing to do */
    cr_assert_eq(pb_fixed_grid_advance(&g, 100.0, fst_step, &y, fst_observe, &o), PB_OK);
    cr_assert_eq(y.calls, 1000);
    cr_assert_eq(o.calls, 1000);
}

Test(fixed_step, off_grid_and_backward_times_refused)
{
    pb_fixed_grid g;
    fst_toy y;
    pb_method_stats st;
    fst_setup(&g, &y, &st, 1.0, 0.5, 0);
    /* t0 + 2.5 h is between grid points: refused before any step */
    cr_assert_eq(pb_fixed_grid_advance(&g, 2.25, fst_step, &y, NULL, NULL), PB_EINVAL);
    cr_assert_eq(y.calls, 0);
    cr_assert_eq(g.n, 0);
    cr_assert_eq(st.steps, 0);
    cr_assert_eq(y.r[0], 0.0);
    cr_assert_eq(pb_fixed_grid_advance(&g, NAN, fst_step, &y, NULL, NULL), PB_EINVAL);
    cr_assert_eq(pb_fixed_grid_advance(&g, 0.0, fst_step, &y, NULL, NULL), PB_EINVAL);
    cr_assert_eq(y.calls, 0);
    /* t0 + 4 h */
    cr_assert_eq(pb_fixed_grid_advance(&g, 3.0, fst_step, &y, NULL, NULL), PB_OK);
    cr_assert_eq(g.n, 4);
    cr_assert_eq(y.r[0], 4.0);
    cr_assert_eq(y.v[0], 5.0625);     /* 1.5^4 */
    cr_assert_eq(y.bad_times, 0);
    /* t0 + 2 h is behind the state: refused, nothing moves */
    cr_assert_eq(pb_fixed_grid_advance(&g, 2.0, fst_step, &y, NULL, NULL), PB_EINVAL);
    cr_assert_eq(g.n, 4);
    cr_assert_eq(st.steps, 4);
    cr_assert_eq(y.calls, 4);
    cr_assert_eq(y.r[0], 4.0);
}

Test(fixed_step, step_budget)
{
    pb_fixed_grid g;
    fst_toy y;
    pb_method_stats st;
    fst_obs o = {0};
    fst_setup(&g, &y, &st, 1.0, 0.5, 5);
    /* 8 steps asked, 5 allowed: the state is that of the fifth step */
    cr_assert_eq(pb_fixed_grid_advance(&g, 5.0, fst_step, &y, fst_observe, &o), PB_EMAXSTEPS);
    cr_assert_eq(g.n, 5);
    cr_assert_eq(st.steps, 5);
    cr_assert_eq(y.calls, 5);
    cr_assert_eq(o.calls, 5);
    cr_assert_eq(y.r[0], 5.0);
    cr_assert_eq(y.v[0], 7.59375);    /* 1.5^5 */
    cr_assert_eq(pb_fixed_grid_time(&g, g.n), 3.5);
    cr_assert_eq(st.t_fail, 1.0);     /* a spent budget is not a failed step */
    /* still spent on the next call; a time already reached needs no step */
    cr_assert_eq(pb_fixed_grid_advance(&g, 5.0, fst_step, &y, fst_observe, &o), PB_EMAXSTEPS);
    cr_assert_eq(y.calls, 5);
    cr_assert_eq(pb_fixed_grid_advance(&g, 3.5, fst_step, &y, fst_observe, &o), PB_OK);
    cr_assert_eq(g.n, 5);
}

Test(fixed_step, observer_stop_is_passed_on)
{
    pb_fixed_grid g;
    fst_toy y;
    pb_method_stats st;
    fst_obs o = {.stop_at = 3, .code = 42};
    fst_setup(&g, &y, &st, 1.0, 0.5, 0);
    cr_assert_eq(pb_fixed_grid_advance(&g, 5.0, fst_step, &y, fst_observe, &o), 42);
    /* stopped after the third step, which stands */
    cr_assert_eq(g.n, 3);
    cr_assert_eq(st.steps, 3);
    cr_assert_eq(y.calls, 3);
    cr_assert_eq(o.t_last, 2.5);
    cr_assert_eq(y.r[0], 3.0);
    cr_assert_eq(y.v[0], 3.375);      /* 1.5^3 */
    /* the next call goes on from there to t0 + 8 h */
    o.stop_at = 0;
    cr_assert_eq(pb_fixed_grid_advance(&g, 5.0, fst_step, &y, fst_observe, &o), PB_OK);
    cr_assert_eq(g.n, 8);
    cr_assert_eq(y.calls, 8);
    cr_assert_eq(o.calls, 8);
    cr_assert_eq(o.t_last, 5.0);
    cr_assert_eq(y.r[0], 8.0);
}

Test(fixed_step, failing_step_keeps_last_good_state)
{
    pb_fixed_grid g;
    fst_toy y;
    pb_method_stats st;
    fst_obs o = {0};
    fst_setup(&g, &y, &st, 1.0, 0.5, 0);
    y.fail_at = 4;
    y.fail_status = PB_ENONFINITE;
    cr_assert_eq(pb_fixed_grid_advance(&g, 5.0, fst_step, &y, fst_observe, &o), PB_ENONFINITE);
    cr_assert_eq(g.n, 4);
    cr_assert_eq(st.steps, 4);
    cr_assert_eq(o.calls, 4);         /* no observer call for the failed step */
    cr_assert_eq(st.t_fail, 3.0);     /* t0 + 4 h, the time of the state kept */
    cr_assert_eq(pb_fixed_grid_time(&g, g.n), 3.0);
    cr_assert_eq(y.r[0], 4.0);
    cr_assert_eq(y.v[0], 5.0625);
    /* a force failing on the very first step: the epoch state, t_fail = t0 */
    fst_setup(&g, &y, &st, 1.0, 0.5, 0);
    y.fail_at = 0;
    y.fail_status = PB_EFORCE;
    st.t_fail = -1.0;
    cr_assert_eq(pb_fixed_grid_advance(&g, 5.0, fst_step, &y, NULL, NULL), PB_EFORCE);
    cr_assert_eq(g.n, 0);
    cr_assert_eq(st.steps, 0);
    cr_assert_eq(st.t_fail, 1.0);
    cr_assert_eq(y.r[0], 0.0);
    cr_assert_eq(y.v[0], 1.0);
}

/* ---- the same contract through every fixed-step method of the table ---- */

static int fst_kepler_accel(void *ctx, double t, const double *r, const double *v, double *a)
{
    const pb_problem *p = ctx;
    return p->accel(p, t, r, v, a);
}

/* Start m on the e = 0.1 Kepler problem at 100 steps an orbit. */
static void *fst_method_start(const pb_method_type *m, const pb_problem *p, long max_steps,
                              pb_force *f, double *h)
{
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = *h = p->period / 100;
    cfg.mu = pb_problem_kepler_mu(p); /* as the harness sets it */
    cfg.max_steps = max_steps;
    f->accel = fst_kepler_accel;
    f->ctx = (void *)p;
    f->dim = p->dim;
    void *ws = m->alloc(p->dim);
    cr_assert_not_null(ws, "%s", m->name);
    cr_assert_eq(m->start(ws, f, &cfg, p->t0, p->r0, p->v0), PB_OK, "%s", m->name);
    return ws;
}

/* Methods that step in a fictitious time s (ds = (mu/r) dt): fixed-step in
 * s, so their step ends lie on no t grid and they take any t_out; their
 * own contract is tested in tests/test_leapfrog_tt.c (gauss-jackson8-s, dt = c r ds:
 * tests/test_formulation.c). */
static const char *const fst_in_s[] = {"leapfrog-tt", "yoshida4-tt", "yoshida6-tt",
                                       "yoshida8-tt", "gauss-jackson8-s"};

static int fst_steps_in_s(const pb_method_type *m)
{
    for (size_t i = 0; i < sizeof fst_in_s / sizeof fst_in_s[0]; i++)
        if (strcmp(m->name, fst_in_s[i]) == 0)
            return 1;
    return 0;
}

Test(fixed_step, every_fixed_method)
{
    pb_problem p;
    pbt_kepler(&p, 0.1);
    int nfixed = 0;
    for (const pb_method_type *const *mp = pb_method_table; *mp; mp++) {
        const pb_method_type *m = *mp;
        if (!(m->flags & PB_KIND_FIXED) || fst_steps_in_s(m))
            continue;
        nfixed++;
        pb_force f;
        double h, t, r[3], v[3], rs[3], vs[3];
        pb_method_stats st;
        /* the reference: 12 steps in one call */
        void *ws = fst_method_start(m, &p, 0, &f, &h);
        cr_assert_eq(m->advance(ws, p.t0 + 12 * h, NULL, NULL), PB_OK, "%s", m->name);
        m->get_state(ws, &t, r, v);
        cr_assert_eq(t, p.t0 + 12.0 * h, "%s", m->name);
        m->free(ws);

        /* off the grid: refused before any step */
        ws = fst_method_start(m, &p, 0, &f, &h);
        cr_assert_eq(m->advance(ws, p.t0 + 2.5 * h, NULL, NULL), PB_EINVAL, "%s", m->name);
        m->get_stats(ws, &st);
        cr_assert_eq(st.steps, 0, "%s", m->name);
        /* an observer stopping after step 3; going on gives the same bits */
        fst_obs o = {.stop_at = 3, .code = 9};
        cr_assert_eq(m->advance(ws, p.t0 + 12 * h, fst_observe, &o), 9, "%s", m->name);
        m->get_state(ws, &t, rs, vs);
        cr_assert_eq(t, p.t0 + 3.0 * h, "%s", m->name);
        cr_assert_eq(o.t_last, p.t0 + 3.0 * h, "%s", m->name);
        cr_assert_eq(o.r_last, rs[0], "%s", m->name);
        cr_assert_eq(m->advance(ws, p.t0 + 12 * h, NULL, NULL), PB_OK, "%s", m->name);
        m->get_state(ws, &t, rs, vs);
        for (int i = 0; i < 3; i++)
            cr_assert(rs[i] == r[i] && vs[i] == v[i], "%s: component %d", m->name, i);
        m->free(ws);

        /* a budget of 7 steps: PB_EMAXSTEPS at step 7, its state kept */
        ws = fst_method_start(m, &p, 7, &f, &h);
        cr_assert_eq(m->advance(ws, p.t0 + 12 * h, NULL, NULL), PB_EMAXSTEPS, "%s", m->name);
        m->get_state(ws, &t, rs, vs);
        m->get_stats(ws, &st);
        cr_assert_eq(st.steps, 7, "%s", m->name);
        cr_assert_eq(t, p.t0 + 7.0 * h, "%s", m->name);
        m->free(ws);
        ws = fst_method_start(m, &p, 0, &f, &h);
        cr_assert_eq(m->advance(ws, p.t0 + 7 * h, NULL, NULL), PB_OK, "%s", m->name);
        m->get_state(ws, &t, r, v);
        for (int i = 0; i < 3; i++)
            cr_assert(rs[i] == r[i] && vs[i] == v[i], "%s: component %d", m->name, i);
        m->free(ws);
    }
    /* rk4, leapfrog, yoshida4/6/8, gsl-rk4, gauss-jackson8, gauss-legendre(12),
     * kepler-split2/4/8/4c/8c */
    cr_assert_eq(nfixed, 14);
}
