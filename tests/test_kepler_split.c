/* test_kepler_split.c - the Kepler-splitting maps (Wisdom & Holman 1991;
 * SBAB_n of Laskar & Robutel 2001): coefficients by their order conditions,
 * exactness on pure Kepler orbits, the O(eps h^2n + eps^2 h^2) error on
 * Newton's revolving orbit, dense output, leo-j2 at 1 m and the refusals. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include "test_support.h"
#include "bench/measure/force_counter.h"
#include "bench/measure/harness.h"
#include "propbench/dense.h"
#include "propbench/drive.h"
#include "problems/catalogue.h"
#include "problems/revolving.h"
#include "problems/twobody.h"

extern const pb_method_type pb_method_kepler_split2;
extern const pb_method_type pb_method_kepler_split4;
extern const pb_method_type pb_method_kepler_split8;
extern const pb_method_type pb_method_kepler_split4c;
extern const pb_method_type pb_method_kepler_split8c;

#define KST_N 5
static const pb_method_type *const kst_methods[KST_N] = {
    &pb_method_kepler_split2, &pb_method_kepler_split4, &pb_method_kepler_split8,
    &pb_method_kepler_split4c, &pb_method_kepler_split8c};
static const int kst_n[KST_N] = {1, 2, 4, 2, 4}; /* SBAB_n: kepler-split(2n)[c] */
static const int kst_corr[KST_N] = {0, 0, 0, 1, 1}; /* with the corrector */

/* The revolving orbit of revolving-e0.5 (mu = 1, a = 1, e = 0.5) with the
 * potential -gamma/r^2 of strength gamma (the catalogue's is 0.01). */
static void kst_revolving(pb_problem *p, double gamma)
{
    cr_assert_eq(pb_problem_init_revolving(p, "revolving", "", 1.0, gamma, 1.0, 0.5), PB_OK);
}

static pbt_result kst_run(const pb_method_type *m, const pb_problem *p, double h, double t_end)
{
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = h;
    cfg.mu = pb_problem_kepler_mu(p);
    pbt_result res = pbt_integrate(m, p, &cfg, t_end);
    cr_assert_eq(res.status, PB_OK, "%s: %s", m->name, pb_strerror(res.status));
    return res;
}

/* Position error after `orbits` periods at n steps an orbit. */
static double kst_error(const pb_method_type *m, const pb_problem *p, int n, double orbits)
{
    pbt_result res = kst_run(m, p, p->period / n, p->t0 + orbits * p->period);
    return pbt_pos_error(p, &res);
}

/* The SBAB_n kick fractions and nodes are the (n+1)-point Lobatto rule on
 * [0, 1] (Laskar & Robutel 2001; Abramowitz & Stegun 25.4.32), whose
 * first-order-in-eps condition is exactness for polynomials of degree up to
 * 2n - 1 (and not 2n: the rule has no more). Read from the records' runs:
 * the kick times and weights are recovered here from a probe force. */
typedef struct kst_probe {
    int calls;
    double t[8];
} kst_probe;

static int kst_probe_accel(void *ctx, double t, const double *r, const double *v, double *a)
{
    kst_probe *pr = ctx;
    (void)v;
    if (pr->calls < 8)
        pr->t[pr->calls] = t;
    pr->calls++;
    /* a pure Kepler force: every kick is zero, the run is the Kepler flow */
    double r2 = r[0] * r[0] + r[1] * r[1] + r[2] * r[2], k = -1.0 / (r2 * sqrt(r2));
    for (int i = 0; i < 3; i++)
        a[i] = k * r[i];
    return PB_OK;
}

Test(kepler_split, kick_times_are_lobatto_nodes)
{
    /* Lobatto nodes on [0, 1] (A&S 25.4.32): n + 1 = 2: 0, 1; 3: 0, 1/2, 1;
     * 5: 0, 1/2 -+ sqrt(21)/14, 1/2, 1 */
    const double s21 = sqrt(21.0) / 14.0;
    const double nodes[5][5] = {{0, 1}, {0, 0.5, 1}, {0}, {0, 0.5 - s21, 0.5, 0.5 + s21, 1}};
    for (int k = 0; k < KST_N; k++) {
        const pb_method_type *m = kst_methods[k];
        kst_probe pr = {0};
        pb_force f = {kst_probe_accel, &pr, 3};
        pb_method_config cfg;
        memset(&cfg, 0, sizeof cfg);
        cfg.h = 0.5;
        cfg.mu = 1.0;
        void *ws = m->alloc(3);
        double r0[3] = {1, 0, 0}, v0[3] = {0, 1.1, 0};
        cr_assert_eq(m->start(ws, &f, &cfg, 2.0, r0, v0), PB_OK);
        cr_assert_eq(m->advance(ws, 2.5, NULL, NULL), PB_OK);
        m->free(ws);
        /* one force at the start, then one at each later node */
        cr_assert_eq(pr.calls, kst_n[k] + 1, "%s: %d evaluations", m->name, pr.calls);
        /* the corrector's J P is not evaluated where the perturbation is
         * exactly zero, as on this pure Kepler force */
        for (int j = 0; j <= kst_n[k]; j++)
            cr_assert(fabs((pr.t[j] - 2.0) / 0.5 - nodes[kst_n[k] - 1][j]) < 1e-15,
                      "%s node %d: %.17g",
                      m->name, j, (pr.t[j] - 2.0) / 0.5);
    }
}

/* The kicks' weights through the map itself: a perturbation c t^k along x
 * (time alone: each kick is made at its own time) on an orbit far out (r =
 * 1e6, v = 1e-3, mu = 1), where the Kepler flow over one step is free motion
 * to 1e-18, so the velocity the perturbation adds over the step [0, 1] is
 * c sum d_j x_j^k, the kick rule applied to t^k. Laskar & Robutel (2001):
 * the eps h^2n error needs it exact for k <= 2n - 1 (= 1/(k+1)); at k = 2n
 * it is the Lobatto rule's value (A&S 25.4.32 weights 1/2 1/2; 1/6 2/3 1/6;
 * 1/20 49/180 16/45 49/180 1/20 at the nodes above), not 1/(2n+1). */
typedef struct kst_tk {
    int k;
    double c;
} kst_tk;

static int kst_tk_accel(void *ctx, double t, const double *r, const double *v, double *a)
{
    const kst_tk *q = ctx;
    (void)v;
    double r2 = r[0] * r[0] + r[1] * r[1] + r[2] * r[2], g = -1.0 / (r2 * sqrt(r2));
    for (int i = 0; i < 3; i++)
        a[i] = g * r[i];
    a[0] += q->c * pow(t, q->k);
    return PB_OK;
}

static double kst_kick_sum(const pb_method_type *m, int k)
{
    double dv[2];
    for (int on = 0; on < 2; on++) {
        kst_tk q = {k, on ? 1e-3 : 0.0};
        pb_force f = {kst_tk_accel, &q, 3};
        pb_method_config cfg;
        memset(&cfg, 0, sizeof cfg);
        cfg.h = 1.0;
        cfg.mu = 1.0;
        double r0[3] = {1e6, 0, 0}, v0[3] = {0, 1e-3, 0}, t, r[3], v[3];
        void *ws = m->alloc(3);
        cr_assert_eq(m->start(ws, &f, &cfg, 0.0, r0, v0), PB_OK);
        cr_assert_eq(m->advance(ws, 1.0, NULL, NULL), PB_OK);
        m->get_state(ws, &t, r, v);
        m->free(ws);
        dv[on] = v[0];
    }
    return (dv[1] - dv[0]) / 1e-3;
}

Test(kepler_split, quadrature_conditions)
{
    const double s21 = sqrt(21.0) / 14.0;
    const double x[5][5] = {{0, 1}, {0, 0.5, 1}, {0}, {0, 0.5 - s21, 0.5, 0.5 + s21, 1}};
    const double w[5][5] = {{0.5, 0.5},
                            {1.0 / 6, 2.0 / 3, 1.0 / 6},
                            {0},
                            {1.0 / 20, 49.0 / 180, 16.0 / 45, 49.0 / 180, 1.0 / 20}};
    for (int m = 0; m < KST_N; m++) {
        int n = kst_n[m];
        for (int k = 0; k <= 2 * n; k++) {
            double got = kst_kick_sum(kst_methods[m], k), lobatto = 0;
            for (int j = 0; j <= n; j++)
                lobatto += w[n - 1][j] * pow(x[n - 1][j], k);
            /* 1e-12: the velocity difference carries round-off of v ~ 1e-3
             * relative to c = 1e-3 (common practice) */
            cr_assert(fabs(got - lobatto) < 1e-12, "%s k = %d: %.15g, Lobatto %.15g",
                      kst_methods[m]->name, k, got, lobatto);
            if (k <= 2 * n - 1)
                cr_assert(fabs(got - 1.0 / (k + 1)) < 1e-12, "%s k = %d: %.15g",
                          kst_methods[m]->name, k, got);
            else /* the rule's defect at 2n: 1/6, 1/120, 1/35280 (closed forms) */
                cr_assert(fabs(got - 1.0 / (k + 1)) > 1e-5, "%s exact at k = %d",
                          kst_methods[m]->name, k);
        }
    }
}

/* Pure Kepler: every kick is zero (the perturbation a - (-mu r/|r|^3) is
 * computed as the force computes it), so the map is the exact flow and any
 * step does. What is left is pb_universal_propagate's own round-off: 1000
 * of its drifts of T/10 alone, without kicks, end 1.5e-11 (e = 0.5) and
 * 7.7e-10 (e = 0.9) from the exact state (measured here against the
 * __float128 flow), the e = 0.9 drift a bias of 3.5e-16 in energy per call.
 * Measured here, 10 steps an orbit over 100 orbits: kepler-split2 2.0e-11,
 * 7.7e-10; kepler-split4 7.1e-13, 6.8e-10; kepler-split8 2.4e-11, 4.2e-10
 * (a = 1); kepler-split4c and -8c as 4 and 8 (their corrector vanishes
 * with P, and costs no evaluation then). A map of order 2 in h with an O(1)
 * error constant would be off by O(1) at this step: the bounds below are
 * the floor of the solver. */
Test(kepler_split, exact_on_pure_kepler)
{
    const double ecc[2] = {0.5, 0.9}, bound[2] = {1e-10, 3e-9};
    for (int k = 0; k < KST_N; k++) {
        for (int j = 0; j < 2; j++) {
            pb_problem p;
            pbt_kepler(&p, ecc[j]);
            pbt_result res = kst_run(kst_methods[k], &p, p.period / 10, 100 * p.period);
            cr_assert_eq(res.evals, 1000L * kst_n[k] + 1, "%s: %ld evaluations",
                         kst_methods[k]->name, res.evals);
            double err = pbt_pos_error(&p, &res);
            cr_assert(err <= bound[j], "%s on e = %g: %.3e", kst_methods[k]->name, ecc[j], err);
        }
    }
    /* an off-grid step length (T/7.3) is just as exact: 7.3 steps per orbit
     * over 100 orbits end 730 steps in (the grid time) */
    pb_problem p;
    pbt_kepler(&p, 0.5);
    pbt_result res = kst_run(&pb_method_kepler_split4, &p, p.period / 7.3, 730 * p.period / 7.3);
    cr_assert_leq(pbt_pos_error(&p, &res), 1e-10);
}

/* Observed global order of kepler-split2 on revolving-e0.5 (gamma = 0.01),
 * one orbit: measured here 2.01, 2.00, 2.00 over 128 -> 1024 steps an
 * orbit; the check uses 256 -> 512 (order 2 within 0.3, common practice,
 * REFERENCES.md "Orders of accuracy"). */
Test(kepler_split, order2_revolving)
{
    pb_problem p;
    kst_revolving(&p, 0.01);
    double e1 = kst_error(&pb_method_kepler_split2, &p, 256, 1.0);
    double e2 = kst_error(&pb_method_kepler_split2, &p, 512, 1.0);
    double q = log2(e1 / e2);
    cr_assert(fabs(q - 2.0) <= 0.3, "order %.3f (%.3e, %.3e)", q, e1, e2);
}

/* kepler-split4's two regimes (Laskar & Robutel 2001: error O(eps h^4 +
 * eps^2 h^2)). With gamma = 1e-6 eps h^4 leads: measured here over one
 * orbit 4.27, 4.25, 4.05, 4.02 for 32 -> 512 steps; the check takes 64 ->
 * 256 (two halvings: 4.04). With gamma = 0.01 at fine steps eps^2 h^2
 * leads: 1.96, 1.99, 2.00 over 256 -> 1024; the check takes 512 -> 1024. */
Test(kepler_split, order4_then_2_revolving)
{
    pb_problem p;
    kst_revolving(&p, 1e-6);
    double e1 = kst_error(&pb_method_kepler_split4, &p, 64, 1.0);
    double e2 = kst_error(&pb_method_kepler_split4, &p, 256, 1.0);
    double q = log(e1 / e2) / log(4.0);
    cr_assert(fabs(q - 4.0) <= 0.3, "gamma 1e-6: order %.3f (%.3e, %.3e)", q, e1, e2);
    kst_revolving(&p, 0.01);
    e1 = kst_error(&pb_method_kepler_split4, &p, 512, 1.0);
    e2 = kst_error(&pb_method_kepler_split4, &p, 1024, 1.0);
    q = log2(e1 / e2);
    cr_assert(fabs(q - 2.0) <= 0.3, "gamma 0.01: order %.3f (%.3e, %.3e)", q, e1, e2);
}

/* Where h^2 leads, the error's power of eps tells the maps apart: eps h^2
 * for kepler-split2, eps^2 h^2 for the SBAB_n with n > 1 (Laskar & Robutel
 * 2001). Error at 1024 steps an orbit, one orbit, gamma 0.01 against 0.001:
 * measured here ratios 10.5 (kepler-split2), 101.8 (kepler-split4), 101.2
 * (kepler-split8), i.e. slopes 1.02, 2.01, 2.01 in gamma; each within 0.3
 * of its power. */
Test(kepler_split, error_power_of_eps)
{
    const double want[3] = {1, 2, 2};
    for (int k = 0; k < 3; k++) {
        pb_problem p;
        kst_revolving(&p, 0.01);
        double big = kst_error(kst_methods[k], &p, 1024, 1.0);
        kst_revolving(&p, 0.001);
        double small = kst_error(kst_methods[k], &p, 1024, 1.0);
        double s = log10(big / small);
        cr_assert(fabs(s - want[k]) <= 0.3, "%s: error ~ gamma^%.3f (%.3e, %.3e)",
                  kst_methods[k]->name, s, big, small);
    }
}

/* One step of h from the periapsis start: the error (r, v) against the
 * exact flow, in __float128. */
static void kst_step_error(const pb_method_type *m, double gamma, double h, __float128 *d)
{
    pb_problem p;
    kst_revolving(&p, gamma);
    pbt_result res = kst_run(m, &p, h, p.t0 + h);
    __float128 rq[3], vq[3];
    cr_assert_eq(p.exact_q(&p, res.t, rq, vq), PB_OK);
    for (int i = 0; i < 3; i++) {
        d[i] = (__float128)res.r[i] - rq[i];
        d[i + 3] = (__float128)res.v[i] - vq[i];
    }
}

static double kst_norm6(const __float128 *d)
{
    __float128 s = 0;
    for (int i = 0; i < 6; i++)
        s += d[i] * d[i];
    return sqrt((double)s);
}

/* The parts of one step's error of first and second degree in the strength
 * g of the perturbation (a step of h from periapsis on revolving-e0.5 with
 * g, g/2, g/4): L = g A + g^2 B + g^3 C + ..., so g A = (L1 - 12 L2 + 32
 * L4)/3 and g^2 B = -2 L1 + 20 L2 - 32 L4 (Richardson in g, exact for a
 * cubic). */
static void kst_parts(const pb_method_type *m, double g, double h, double *lin, double *quad)
{
    __float128 a[6], b[6], c[6], l[6], q[6];
    kst_step_error(m, g, h, a);
    kst_step_error(m, g / 2, h, b);
    kst_step_error(m, g / 4, h, c);
    for (int i = 0; i < 6; i++) {
        l[i] = (a[i] - 12 * b[i] + 32 * c[i]) / 3;
        q[i] = -2 * a[i] + 20 * b[i] - 32 * c[i];
    }
    *lin = kst_norm6(l);
    *quad = kst_norm6(q);
}

/* Laskar & Robutel (2001): for SBAB_n the eps part of the local error is
 * O(h^(2n+1)) (the eps h^2n of the global error) and the eps^2 part O(h^3)
 * (its eps^2 h^2), O(h^5) with the corrector. On revolving-e0.5 (g = 0.01),
 * measured here: eps parts from 48 to 64 steps an orbit 2.87, 5.18, 9.03,
 * 5.18, 9.26 (kepler-split2, 4, 8, 4c, 8c); eps^2 parts 3.16, 2.98, 2.95
 * over 48 -> 64 and, corrected, 4.92, 4.90 over 96 -> 128 (4.69, 4.63 at 48
 * -> 64, still approaching 5: 4.96, 4.95 at 128 -> 192). Each within 0.3 of
 * its power (common practice, REFERENCES.md "Orders of accuracy").
 * kepler-split8's eps part at 64 steps is 1e-11 against a round-off of
 * ~1e-15. */
Test(kepler_split, local_error_eps_parts)
{
    const double g = 0.01, h1 = 2 * M_PI / 48, h2 = 2 * M_PI / 64;
    const double h3 = 2 * M_PI / 96, h4 = 2 * M_PI / 128;
    for (int k = 0; k < KST_N; k++) {
        const pb_method_type *m = kst_methods[k];
        double l1, q1, l2, q2;
        kst_parts(m, g, h1, &l1, &q1);
        kst_parts(m, g, h2, &l2, &q2);
        double ql = log(l1 / l2) / log(h1 / h2), qq = log(q1 / q2) / log(h1 / h2);
        if (kst_corr[k]) {
            double l3, l4;
            kst_parts(m, g, h3, &l3, &q1);
            kst_parts(m, g, h4, &l4, &q2);
            qq = log(q1 / q2) / log(h3 / h4);
        }
        int want = 2 * kst_n[k] + 1, want2 = kst_corr[k] ? 5 : 3;
        cr_log_info("%s: eps part %.3f (%.3e, %.3e), eps^2 part %.3f (%.3e, %.3e)", m->name, ql,
                    l1, l2, qq, q1, q2);
        cr_assert(fabs(ql - want) <= 0.3, "%s: eps part order %.3f (%.3e, %.3e), want %d",
                  m->name, ql, l1, l2, want);
        cr_assert(fabs(qq - want2) <= 0.3, "%s: eps^2 part order %.3f (%.3e, %.3e), want %d",
                  m->name, qq, q1, q2, want2);
    }
}

/* Dense output at 37% into the second step of revolving-e0.5 (gamma 0.01)
 * against the exact solution, and against the quintic Hermite of the same
 * step's ends (r, v and the force at both, propbench/dense.h), which is what
 * a method without an extension of its own would give. */
typedef struct kst_ends {
    double t[2], r[2][3], v[2][3];
} kst_ends;

static int kst_observe(void *ctx, double t, const double *r, const double *v)
{
    kst_ends *e = ctx;
    e->t[0] = e->t[1];
    memcpy(e->r[0], e->r[1], sizeof e->r[0]);
    memcpy(e->v[0], e->v[1], sizeof e->v[0]);
    e->t[1] = t;
    memcpy(e->r[1], r, sizeof e->r[1]);
    memcpy(e->v[1], v, sizeof e->v[1]);
    return 0;
}

static void kst_dense_errors(const pb_method_type *m, const pb_problem *pp, int n, double *own,
                             double *hermite)
{
    pb_problem p = *pp;
    pb_force_counter cnt;
    pb_force f;
    pb_force_counter_init(&cnt, &p, &f);
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = p.period / n;
    cfg.mu = p.mu;
    void *ws = m->alloc(3);
    kst_ends e;
    memset(&e, 0, sizeof e);
    cr_assert_eq(m->start(ws, &f, &cfg, p.t0, p.r0, p.v0), PB_OK);
    cr_assert_eq(m->advance(ws, p.t0 + 2 * cfg.h, kst_observe, &e), PB_OK);
    double t = e.t[0] + 0.37 * (e.t[1] - e.t[0]), r[3], v[3], re[3], ve[3], a0[3], a1[3];
    cr_assert_eq(m->dense(ws, t, r, v), PB_OK);
    /* outside the last step: refused */
    cr_assert_eq(m->dense(ws, e.t[0] - 0.1 * cfg.h, re, ve), PB_EINVAL);
    m->free(ws);
    cr_assert_eq(p.exact(&p, t, re, ve), PB_OK);
    *own = 0;
    for (int i = 0; i < 3; i++)
        *own = fmax(*own, fmax(fabs(r[i] - re[i]), fabs(v[i] - ve[i])));
    cr_assert_eq(p.accel(&p, e.t[0], e.r[0], e.v[0], a0), PB_OK);
    cr_assert_eq(p.accel(&p, e.t[1], e.r[1], e.v[1], a1), PB_OK);
    pb_dense_span s;
    pb_dense_start(&s, 3, e.t[0], e.r[0], e.v[0], a0);
    pb_dense_push(&s, e.t[1], e.r[1], e.v[1], a1);
    cr_assert_eq(pb_dense_eval(&s, t, r, v), PB_OK);
    *hermite = 0;
    for (int i = 0; i < 3; i++)
        *hermite = fmax(*hermite, fmax(fabs(r[i] - re[i]), fabs(v[i] - ve[i])));
}

Test(kepler_split, dense_output)
{
    pb_problem rev, kep;
    kst_revolving(&rev, 0.01);
    pbt_kepler(&kep, 0.5);
    for (int k = 0; k < KST_N; k++) {
        const pb_method_type *m = kst_methods[k];
        double o1, h1, o2, h2, ok, hk;
        kst_dense_errors(m, &rev, 400, &o1, &h1);
        kst_dense_errors(m, &rev, 800, &o2, &h2);
        kst_dense_errors(m, &kep, 8, &ok, &hk);
        double q = log2(o1 / o2);
        cr_log_info("%s: dense %.3e, %.3e at 400, 800 steps (local order %.2f); kepler-e0.5 "
                    "at 8 steps %.3e, Hermite of the ends %.3e", m->name, o1, o2, q, ok, hk);
        /* local order q + 1 = dense_order + 1, no lower than that - 0.4
         * (as tests/test_dense.c holds every other method); measured here
         * 1.98 (kepler-split2), 3.04, 3.00, 3.96 (kepler-split4c), 4.01 */
        cr_assert(q > m->dense_order + 1 - 0.4, "%s: dense local order %.2f", m->name, q);
        /* on a pure Kepler orbit at 8 steps an orbit the extension is the
         * exact flow (measured here 1.1e-16), where the quintic Hermite of
         * the same exact ends errs by 3.9e-4 (measured): the reason for the
         * Kepler-based extension at the long steps these maps take */
        cr_assert(ok <= 1e-13, "%s: dense error %.3e on kepler-e0.5", m->name, ok);
        cr_assert(hk >= 1e-4, "%s: Hermite error %.3e", m->name, hk);
    }
}

/* A case through the harness, as `propbench run` runs it: leo-j2 over one
 * day, measured against the reference trajectory (results/cache when run
 * from the project's root, as make test does; built in memory otherwise). */
static pb_case_result kst_case(const char *problem, const pb_method_type *m, int n)
{
    pb_case_spec s;
    pb_case_spec_default(&s);
    cr_assert_eq(pb_problem_lookup(problem, &s.problem), PB_OK);
    s.method = m;
    s.steps_per_orbit = n;
    s.horizon_s = 86400;
    s.repeats = 0;
    pb_case_result r;
    cr_assert_eq(pb_case_run(&s, &r), 0);
    cr_assert_str_eq(r.status_name, "ok", "%s %s: %s", problem, m->name, r.status_name);
    return r;
}

/* leo-j2 at 1 m over a day (km units): measured here kepler-split4 at 128
 * steps an orbit 0.773 m (1992 steps, 3985 evaluations), kepler-split8 at
 * 64 0.841 m (996 steps, 3985 evaluations), kepler-split8c at 12 0.803 m
 * (187 steps, 937 evaluations); kepler-split2 needs thousands
 * of steps an orbit (its error is eps h^2, eps ~ J2 = 1.08e-3: 2874 m at
 * 64). The bound 1 m is the requirement of issue 15's comparison;
 * evaluations are n a step plus the first. */
Test(kepler_split, leo_j2_one_metre_over_a_day, .timeout = 120)
{
    const pb_method_type *m[3] = {&pb_method_kepler_split4, &pb_method_kepler_split8,
                                  &pb_method_kepler_split8c};
    const int n[3] = {128, 64, 12}, per_step[3] = {2, 4, 5};
    for (int k = 0; k < 3; k++) {
        pb_case_result r = kst_case("leo-j2", m[k], n[k]);
        cr_log_info("%s leo-j2 %d steps/orbit: %.4e m, %ld steps, %ld evaluations", m[k]->name,
                    n[k], r.pos_err_max * 1e3, r.steps, r.evals);
        cr_assert_leq(r.pos_err_max, 1e-3, "%s: %.4e km", m[k]->name, r.pos_err_max);
        /* the corrected map's J P costs one more at the start */
        cr_assert_eq(r.evals, per_step[k] * r.steps + 1 + (k == 2));
        pb_case_result_free(&r);
    }
}

/* Refused where the perturbation depends on velocity (leo-drag: drag) or
 * there is no central body (arenstorf, the CR3BP): by pb_method_fits, by
 * the public driver and by the CLI (exit 2, the reason named, nothing
 * written; DEVELOPERS.md "Bad input"). */
Test(kepler_split, refused_without_central_body_or_with_drag)
{
    const char *refused[2] = {"leo-drag", "arenstorf"};
    const char *why[2] = {"depends on velocity", "has no central"};
    for (int i = 0; i < 2; i++) {
        pb_problem p;
        cr_assert_eq(pb_problem_lookup(refused[i], &p), PB_OK);
        for (int k = 0; k < KST_N; k++)
            cr_assert_not(pb_method_fits(kst_methods[k], &p), "%s", refused[i]);
        pb_drive_request rq = {.problem = refused[i], .method = &pb_method_kepler_split4,
                               .steps_per_orbit = 100, .orbits = 1};
        pb_drive_outcome out;
        char err[512] = "";
        cr_assert_eq(pb_drive_case(&rq, &out, err, sizeof err), -1, "%s", refused[i]);
        cr_assert(strstr(err, refused[i]) && strstr(err, why[i]), "%s", err);

        char dir[256], outdir[300], o[4096], e[4096];
        pbt_tmpdir(dir, sizeof dir);
        snprintf(outdir, sizeof outdir, "%s/run", dir);
        const char *args[] = {"run", "--problem", refused[i], "--method", "kepler-split2",
                              "--steps-per-orbit", "100", "--repeats", "0", "--out", outdir,
                              NULL};
        int rc = pbt_run_cli(args, o, sizeof o, e, sizeof e);
        cr_assert_eq(rc, 2, "%s: exit %d, stderr %s", refused[i], rc, e);
        cr_assert(strstr(e, "kepler-split2") && strstr(e, refused[i]) && strstr(e, why[i]),
                  "%s", e);
        cr_assert_not(pbt_exists(outdir), "%s written", outdir);
    }
    pb_problem k;
    cr_assert_eq(pb_problem_lookup("leo-j2", &k), PB_OK);
    cr_assert(pb_method_fits(&pb_method_kepler_split2, &k));
}

/* start refuses a configuration without a central body's GM (mu <= 0 or
 * not finite) and a state that is not 3-dimensional (alloc). */
Test(kepler_split, start_needs_mu)
{
    pb_problem p;
    pbt_kepler(&p, 0.5);
    pb_force f = {NULL, NULL, 3};
    pb_method_config cfg;
    memset(&cfg, 0, sizeof cfg);
    cfg.h = 0.1;
    const double bad[3] = {0.0, -1.0, NAN};
    void *ws = pb_method_kepler_split2.alloc(3);
    for (int i = 0; i < 3; i++, cfg.mu = bad[i % 3])
        cr_assert_eq(pb_method_kepler_split2.start(ws, &f, &cfg, 0, p.r0, p.v0), PB_EINVAL);
    pb_method_kepler_split2.free(ws);
    cr_assert_null(pb_method_kepler_split2.alloc(2));
    cr_assert_null(pb_method_kepler_split2.alloc(6));
}

/* Symplectic: the energy error stays bounded (Hairer, Lubich & Wanner 2006,
 * Ch. I and IX; Wisdom & Holman 1991). revolving-e0.5 (energy v^2/2 - mu/r
 * - gamma/r^2) at 64 steps an orbit over 10^4 orbits (10^3 under the
 * sanitizers): the largest relative energy error over orbits 10^3..10^4 is
 * within a factor 2 of that over the first 10^3. Measured here: 6.590e-4
 * then 6.590e-4 (kepler-split2), 5.694e-6 (both, kepler-split4), 1.804e-6
 * (kepler-split8), 1.447e-6 then 1.466e-6 (kepler-split4c), 5.559e-8 then
 * 5.567e-8 (kepler-split8c).
 * At 32 steps an orbit kepler-split8c's energy error beats with a period of
 * about 6000 orbits between 1.0e-6 and 7.8e-6 (bounded, but longer than the
 * first window), hence 64. */
typedef struct kst_energy {
    const pb_problem *p;
    double e0, split_t, early, late;
} kst_energy;

static int kst_energy_observe(void *ctx, double t, const double *r, const double *v)
{
    kst_energy *o = ctx;
    double d = fabs(o->p->energy(o->p, t, r, v) / o->e0 - 1);
    if (t <= o->split_t)
        o->early = fmax(o->early, d);
    else
        o->late = fmax(o->late, d);
    return 0;
}

Test(kepler_split, energy_bounded, .timeout = 60)
{
    double orbits = pbt_sanitized() ? 1e3 : 1e4;
    for (int k = 0; k < KST_N; k++) {
        const pb_method_type *m = kst_methods[k];
        pb_problem p;
        kst_revolving(&p, 0.01);
        pb_force_counter cnt;
        pb_force f;
        pb_force_counter_init(&cnt, &p, &f);
        pb_method_config cfg;
        memset(&cfg, 0, sizeof cfg);
        cfg.h = p.period / 64;
        cfg.mu = p.mu;
        kst_energy o = {&p, p.energy(&p, p.t0, p.r0, p.v0), p.t0 + orbits / 10 * p.period, 0, 0};
        void *ws = m->alloc(3);
        cr_assert_eq(m->start(ws, &f, &cfg, p.t0, p.r0, p.v0), PB_OK);
        cr_assert_eq(m->advance(ws, p.t0 + 64 * orbits * cfg.h, kst_energy_observe, &o), PB_OK);
        m->free(ws);
        cr_log_info("%s: energy %.3e then %.3e", m->name, o.early, o.late);
        cr_assert(o.late <= 2 * o.early, "%s: energy %.3e then %.3e", m->name, o.early, o.late);
        /* truncation, not round-off: far above 1e-13 */
        cr_assert(o.early > 1e-10, "%s: energy %.3e", m->name, o.early);
    }
}

/* The corrected maps' global order in h at fixed eps is 4 (eps h^2n +
 * eps^2 h^4): revolving-e0.5 (gamma 0.01), one orbit, measured here 4.28,
 * 4.05, 4.01, 4.00, 4.00 (kepler-split4c) and 4.10, 4.02, 4.01, 4.01, 4.05
 * (kepler-split8c) from 32 to 1024 steps an orbit; the check takes 256 ->
 * 512 (within 0.3, common practice). */
Test(kepler_split, corrected_order4_revolving)
{
    pb_problem p;
    kst_revolving(&p, 0.01);
    for (int k = 3; k < KST_N; k++) {
        double e1 = kst_error(kst_methods[k], &p, 256, 1.0);
        double e2 = kst_error(kst_methods[k], &p, 512, 1.0);
        double q = log2(e1 / e2);
        cr_assert(fabs(q - 4.0) <= 0.3, "%s: order %.3f (%.3e, %.3e)", kst_methods[k]->name, q,
                  e1, e2);
    }
}
