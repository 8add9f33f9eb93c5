/* bench_main.c - `make bench`: cost of every method on one problem, our RK4
 * against GSL's rk4 (per step and at equal accuracy), the harness's overhead
 * against a hand-written inline RK4 loop, and peak memory against horizon.
 * Reporting only: nothing here asserts a timing. RK4 tableau: Abramowitz &
 * Stegun 25.5.10; GSL's rk4 step doubling: GSL Reference Manual, odeiv2. */
#include <gsl/gsl_errno.h>
#include <gsl/gsl_odeiv2.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/time.h>
#include <sys/wait.h>
#include <time.h>
#include <unistd.h>
#include "bench/measure/harness.h"
#include "bench/measure/force_counter.h"
#include "problems/catalogue.h"

#define BENCH_REPEATS 7         /* timed repeats after one warm-up */
#define BENCH_PROBLEM "kepler-e0.5"
#define BENCH_ORBITS 100.0      /* horizon of the per-method table */
#define BENCH_SPO 1000          /* fixed-step methods: steps per orbit */
#define BENCH_TOL 1e-10         /* adaptive methods: rtol = atol */
#define BENCH_OH_ORBITS 50.0    /* overhead case: 5e4 steps a round, all in the timing pass */
#define BENCH_OH_ROUNDS 31
#define BENCH_OVERHEAD_GOAL 10.0  /* percent */
#define BENCH_MEMORY_GOAL 5.0     /* percent */

static double bench_now(void)
{
    struct timespec ts;
    clock_gettime(CLOCK_MONOTONIC, &ts);
    return (double)ts.tv_sec + 1e-9 * (double)ts.tv_nsec;
}

static int bench_cmp(const void *a, const void *b)
{
    double d = *(const double *)a - *(const double *)b;
    return (d > 0) - (d < 0);
}

/* Median of x[0..n) (sorts x). */
static double bench_median(double *x, int n)
{
    qsort(x, (size_t)n, sizeof(double), bench_cmp);
    return n % 2 ? x[n / 2] : 0.5 * (x[n / 2 - 1] + x[n / 2]);
}

static double bench_min(const double *x, int n)
{
    double m = x[0];
    for (int i = 1; i < n; i++)
        m = fmin(m, x[i]);
    return m;
}

/* |r - r_exact(t)| with the exact solution in __float128. */
static double bench_pos_err(const pb_problem *p, double t, const double *r)
{
    __float128 rq[PB_DIM_MAX], vq[PB_DIM_MAX];
    if (!p->exact_q || p->exact_q(p, t, rq, vq))
        return NAN;
    __float128 s = 0;
    for (int i = 0; i < p->dim; i++) {
        __float128 d = (__float128)r[i] - rq[i];
        s += d * d;
    }
    return sqrt((double)s);
}

/* The harness's configuration for a fixed step h or an adaptive tolerance
 * (the same settings harness.c gives a case). */
static void bench_config(const pb_method_type *m, const pb_problem *p, double h, double tol,
                         pb_method_config *cfg)
{
    memset(cfg, 0, sizeof *cfg);
    cfg->time_scale = p->period;
    if (m->flags & PB_KIND_FIXED) {
        cfg->h = h;
    } else {
        cfg->rtol = cfg->atol = tol;
        cfg->min_step = 1e-13 * p->period;
        cfg->max_steps = 50000000L;
    }
}

typedef struct bench_timing {
    int status;
    long steps, evals, rejected;
    double sec;          /* median wall time of one run */
    double pos_err;      /* at t_end */
    double r[PB_DIM_MAX], v[PB_DIM_MAX];
} bench_timing;

/* One timed thing: a method driven directly (start + advance through the
 * counting force wrapper, no observer; alloc outside the clock), or, with
 * m == NULL, GSL's rk4 stepper in a plain loop. */
typedef struct bench_job {
    const pb_method_type *m;
    pb_method_config cfg;
    double t_end;
    long nsteps;             /* plain GSL loop */
    void *ws;
    double dt[BENCH_REPEATS];
    bench_timing out;
} bench_job;

static void bench_job_once(bench_job *j, const pb_problem *p, int k);

/* Run every job once per round, round after round (so a burst of load from
 * other processes hits all of them alike); round -1 is the warm-up. Fills
 * each job's median time, counts and final error. */
static void bench_jobs_run(bench_job *jobs, int n, const pb_problem *p)
{
    for (int i = 0; i < n; i++) {
        memset(&jobs[i].out, 0, sizeof jobs[i].out);
        jobs[i].out.sec = jobs[i].out.pos_err = NAN;
        if (jobs[i].m && !(jobs[i].ws = jobs[i].m->alloc(p->dim)))
            jobs[i].out.status = PB_ENOMEM;
    }
    for (int k = -1; k < BENCH_REPEATS; k++)
        for (int i = 0; i < n; i++)
            if (!jobs[i].out.status)
                bench_job_once(&jobs[i], p, k);
    for (int i = 0; i < n; i++) {
        bench_job *j = &jobs[i];
        if (!j->out.status) {
            j->out.sec = bench_median(j->dt, BENCH_REPEATS);
            double t = j->t_end;
            if (j->m)
                j->m->get_state(j->ws, &t, j->out.r, j->out.v);
            j->out.pos_err = bench_pos_err(p, t, j->out.r);
        }
        if (j->m)
            j->m->free(j->ws);
        j->ws = NULL;
    }
}

static void bench_gsl_plain_once(bench_job *j, const pb_problem *p, int k);

static void bench_job_once(bench_job *j, const pb_problem *p, int k)
{
    if (!j->m) {
        bench_gsl_plain_once(j, p, k);
        return;
    }
    const pb_method_type *m = j->m;
    pb_force_counter c;
    pb_force f;
    pb_force_counter_init(&c, p, &f);
    double t0 = bench_now();
    int s = m->start(j->ws, &f, &j->cfg, p->t0, p->r0, p->v0);
    if (!s)
        s = m->advance(j->ws, j->t_end, NULL, NULL);
    double el = bench_now() - t0;
    if (s) {
        j->out.status = s;
        return;
    }
    if (k >= 0)
        j->dt[k] = el;
    pb_method_stats st;
    m->get_stats(j->ws, &st);
    j->out.steps = st.steps + st.startup_steps;
    j->out.rejected = st.rejected;
    j->out.evals = c.evals;
}

/* ---- the hand-written reference: RK4 on the Kepler problem with the state
 * in scalars and the force inlined, no function pointers and no arrays; the
 * same arithmetic as rk4.c and the two-body force, so the results agree to
 * the last bit */

#define BENCH_KEPLER(mu, x, y, z, ax, ay, az)                                   \
    do {                                                                        \
        double r2_ = (x) * (x) + (y) * (y) + (z) * (z), rn_ = sqrt(r2_);        \
        double k_ = -(mu) / (r2_ * rn_);                                        \
        ax = k_ * (x);                                                          \
        ay = k_ * (y);                                                          \
        az = k_ * (z);                                                          \
    } while (0)

static void bench_inline_rk4(double mu, double h, long nsteps, const double *r0, const double *v0,
                             double *r_out, double *v_out)
{
    double x = r0[0], y = r0[1], z = r0[2], u = v0[0], v = v0[1], w = v0[2];
    double hh = 0.5 * h, h6 = h / 6.0;
    for (long n = 0; n < nsteps; n++) {
        double a1x, a1y, a1z, a2x, a2y, a2z, a3x, a3y, a3z, a4x, a4y, a4z;
        BENCH_KEPLER(mu, x, y, z, a1x, a1y, a1z);
        double x2 = x + hh * u, y2 = y + hh * v, z2 = z + hh * w;
        double u2 = u + hh * a1x, v2 = v + hh * a1y, w2 = w + hh * a1z;
        BENCH_KEPLER(mu, x2, y2, z2, a2x, a2y, a2z);
        double x3 = x + hh * u2, y3 = y + hh * v2, z3 = z + hh * w2;
        double u3 = u + hh * a2x, v3 = v + hh * a2y, w3 = w + hh * a2z;
        BENCH_KEPLER(mu, x3, y3, z3, a3x, a3y, a3z);
        double x4 = x + h * u3, y4 = y + h * v3, z4 = z + h * w3;
        double u4 = u + h * a3x, v4 = v + h * a3y, w4 = w + h * a3z;
        BENCH_KEPLER(mu, x4, y4, z4, a4x, a4y, a4z);
        x += h6 * (u + 2.0 * (u2 + u3) + u4);
        y += h6 * (v + 2.0 * (v2 + v3) + v4);
        z += h6 * (w + 2.0 * (w2 + w3) + w4);
        u += h6 * (a1x + 2.0 * (a2x + a3x) + a4x);
        v += h6 * (a1y + 2.0 * (a2y + a3y) + a4y);
        w += h6 * (a1z + 2.0 * (a2z + a3z) + a4z);
    }
    r_out[0] = x, r_out[1] = y, r_out[2] = z;
    v_out[0] = u, v_out[1] = v, v_out[2] = w;
}

/* The same scheme written over arrays, as rk4.c is, force still inlined: a
 * second hand-written form, to show how much the reference depends on style. */
static void bench_inline_rk4_arrays(double mu, double h, long nsteps, const double *r0,
                                    const double *v0, double *r_out, double *v_out)
{
    double y[6], yt[6], k1[6], k2[6], k3[6], k4[6];
    memcpy(y, r0, 3 * sizeof(double));
    memcpy(y + 3, v0, 3 * sizeof(double));
    for (long n = 0; n < nsteps; n++) {
        int i;
        for (i = 0; i < 3; i++) k1[i] = y[3 + i];
        BENCH_KEPLER(mu, y[0], y[1], y[2], k1[3], k1[4], k1[5]);
        for (i = 0; i < 6; i++) yt[i] = y[i] + 0.5 * h * k1[i];
        for (i = 0; i < 3; i++) k2[i] = yt[3 + i];
        BENCH_KEPLER(mu, yt[0], yt[1], yt[2], k2[3], k2[4], k2[5]);
        for (i = 0; i < 6; i++) yt[i] = y[i] + 0.5 * h * k2[i];
        for (i = 0; i < 3; i++) k3[i] = yt[3 + i];
        BENCH_KEPLER(mu, yt[0], yt[1], yt[2], k3[3], k3[4], k3[5]);
        for (i = 0; i < 6; i++) yt[i] = y[i] + h * k3[i];
        for (i = 0; i < 3; i++) k4[i] = yt[3 + i];
        BENCH_KEPLER(mu, yt[0], yt[1], yt[2], k4[3], k4[4], k4[5]);
        for (i = 0; i < 6; i++)
            y[i] += h / 6.0 * (k1[i] + 2.0 * (k2[i] + k3[i]) + k4[i]);
    }
    memcpy(r_out, y, 3 * sizeof(double));
    memcpy(v_out, y + 3, 3 * sizeof(double));
}

/* The scalar RK4 loop with each evaluation made by FORCE(px, py, pz, tt)
 * into q (position) and a (acceleration): r and a then pass through memory
 * as they do behind any force interface. */
#define BENCH_RK4_CALLING(FORCE)                                                \
    double x = r0[0], y = r0[1], z = r0[2], u = v0[0], v = v0[1], w = v0[2];     \
    double hh = 0.5 * h, h6 = h / 6.0, q[3], a[3], t = 0;                       \
    for (long n = 0; n < nsteps; n++) {                                         \
        double a1x, a1y, a1z, a2x, a2y, a2z, a3x, a3y, a3z, a4x, a4y, a4z;      \
        t = (double)n * h;                                                      \
        BENCH_CALL(FORCE, x, y, z, t, a1x, a1y, a1z);                           \
        double x2 = x + hh * u, y2 = y + hh * v, z2 = z + hh * w;               \
        double u2 = u + hh * a1x, v2 = v + hh * a1y, w2 = w + hh * a1z;         \
        BENCH_CALL(FORCE, x2, y2, z2, t + hh, a2x, a2y, a2z);                   \
        double x3 = x + hh * u2, y3 = y + hh * v2, z3 = z + hh * w2;            \
        double u3 = u + hh * a2x, v3 = v + hh * a2y, w3 = w + hh * a2z;         \
        BENCH_CALL(FORCE, x3, y3, z3, t + hh, a3x, a3y, a3z);                   \
        double x4 = x + h * u3, y4 = y + h * v3, z4 = z + h * w3;               \
        double u4 = u + h * a3x, v4 = v + h * a3y, w4 = w + h * a3z;            \
        BENCH_CALL(FORCE, x4, y4, z4, t + h, a4x, a4y, a4z);                    \
        x += h6 * (u + 2.0 * (u2 + u3) + u4);                                   \
        y += h6 * (v + 2.0 * (v2 + v3) + v4);                                   \
        z += h6 * (w + 2.0 * (w2 + w3) + w4);                                   \
        u += h6 * (a1x + 2.0 * (a2x + a3x) + a4x);                              \
        v += h6 * (a1y + 2.0 * (a2y + a3y) + a4y);                              \
        w += h6 * (a1z + 2.0 * (a2z + a3z) + a4z);                              \
    }                                                                           \
    r_out[0] = x, r_out[1] = y, r_out[2] = z;                                   \
    v_out[0] = u, v_out[1] = v, v_out[2] = w

#define BENCH_CALL(FORCE, px, py, pz, tt, ax, ay, az)                           \
    do {                                                                        \
        q[0] = (px), q[1] = (py), q[2] = (pz);                                  \
        FORCE(tt);                                                              \
        ax = a[0], ay = a[1], az = a[2];                                        \
    } while (0)

/* Each evaluation through the harness's counting force wrapper (two
 * indirect calls): the force interface's cost. */
static void bench_counter_rk4(const pb_force *f, double h, long nsteps, const double *r0,
                              const double *v0, double *r_out, double *v_out)
{
#define BENCH_COUNTED(tt) f->accel(f->ctx, (tt), q, NULL, a)
    BENCH_RK4_CALLING(BENCH_COUNTED);
#undef BENCH_COUNTED
}

/* Each evaluation through the problem's own acceleration pointer, as any
 * propagator with a pluggable force model calls it: the reference for the
 * harness's overhead, which cannot inline a force it is handed at run time. */
static void bench_direct_rk4(const pb_problem *p, double h, long nsteps, double *r_out,
                             double *v_out)
{
    const double *r0 = p->r0, *v0 = p->v0;
#define BENCH_DIRECT(tt) p->accel(p, (tt), q, NULL, a)
    BENCH_RK4_CALLING(BENCH_DIRECT);
#undef BENCH_DIRECT
}
#undef BENCH_CALL
#undef BENCH_RK4_CALLING

/* ---- GSL's rk4 stepper called directly in a plain loop */

typedef struct bench_gsl_ctx {
    double mu;
    long evals;
} bench_gsl_ctx;

static int bench_gsl_rhs(double t, const double y[], double dydt[], void *params)
{
    (void)t;
    bench_gsl_ctx *c = params;
    c->evals++;
    dydt[0] = y[3];
    dydt[1] = y[4];
    dydt[2] = y[5];
    BENCH_KEPLER(c->mu, y[0], y[1], y[2], dydt[3], dydt[4], dydt[5]);
    return GSL_SUCCESS;
}

static void bench_gsl_plain_once(bench_job *j, const pb_problem *p, int k)
{
    bench_gsl_ctx c = {p->mu, 0};
    gsl_odeiv2_system sys = {bench_gsl_rhs, NULL, 6, &c};
    /* the stepper's allocation stays outside the clock, as for our methods */
    gsl_odeiv2_step *st = gsl_odeiv2_step_alloc(gsl_odeiv2_step_rk4, 6);
    if (!st) {
        j->out.status = PB_ENOMEM;
        return;
    }
    double y[6], yerr[6], h = j->cfg.h;
    double t0 = bench_now();
    memcpy(y, p->r0, 3 * sizeof(double));
    memcpy(y + 3, p->v0, 3 * sizeof(double));
    for (long n = 0; n < j->nsteps; n++)
        if (gsl_odeiv2_step_apply(st, p->t0 + (double)n * h, h, y, yerr, NULL, NULL, &sys)) {
            j->out.status = PB_EFORCE;
            break;
        }
    double el = bench_now() - t0;
    gsl_odeiv2_step_free(st);
    if (k >= 0)
        j->dt[k] = el;
    j->out.steps = j->nsteps;
    j->out.evals = c.evals;
    memcpy(j->out.r, y, 3 * sizeof(double));
    memcpy(j->out.v, y + 3, 3 * sizeof(double));
}

static double bench_ns(double sec, long n)
{
    return n > 0 && isfinite(sec) ? 1e9 * sec / (double)n : (double)NAN;
}

/* ---- 1. every method on the same problem */

static void bench_methods(const pb_problem *p, double *rk4_ns_step)
{
    double T = p->period, t_end = p->t0 + BENCH_ORBITS * T, h = T / BENCH_SPO;
    printf("== 1. Cost per step and per evaluation: %s, %g orbits, no observer ==\n",
           p->name, BENCH_ORBITS);
    printf("   fixed-step methods at %d steps per orbit; adaptive at tolerance %g (rtol = atol)\n",
           BENCH_SPO, BENCH_TOL);
    printf("   each: start + advance through the counting force wrapper; median of %d after a warm-up\n\n",
           BENCH_REPEATS);
    printf("%-16s %-5s %-10s %9s %9s %6s %9s %9s %8s %10s\n", "method", "from", "setting",
           "steps", "evals", "ev/st", "ns/step", "ns/eval", "x rk4", "pos err");
    bench_job jobs[64];
    memset(jobs, 0, sizeof jobs);
    int nm = 0;
    for (const pb_method_type *const *mp = pb_method_table; *mp && nm < 64; mp++, nm++) {
        jobs[nm].m = *mp;
        jobs[nm].t_end = t_end;
        bench_config(*mp, p, h, BENCH_TOL, &jobs[nm].cfg);
    }
    bench_jobs_run(jobs, nm, p);
    for (int i = 0; i < nm; i++)
        if (strcmp(jobs[i].m->name, "rk4") == 0)
            *rk4_ns_step = bench_ns(jobs[i].out.sec, jobs[i].out.steps);
    for (int i = 0; i < nm; i++) {
        const pb_method_type *m = jobs[i].m;
        const bench_timing *r = &jobs[i].out;
        char setting[32];
        if (m->flags & PB_KIND_FIXED)
            snprintf(setting, sizeof setting, "n%d", BENCH_SPO);
        else
            snprintf(setting, sizeof setting, "tol%g", BENCH_TOL);
        const char *from = (m->flags & PB_FROM_GSL) ? "GSL" : "ours";
        if (r->status) {
            printf("%-16s %-5s %-10s  failed: %s\n", m->name, from, setting, pb_strerror(r->status));
            continue;
        }
        double nss = bench_ns(r->sec, r->steps);
        printf("%-16s %-5s %-10s %9ld %9ld %6.2f %9.1f %9.2f %8.2f %10.2e\n", m->name, from,
               setting, r->steps, r->evals, (double)r->evals / (double)r->steps, nss,
               bench_ns(r->sec, r->evals), nss / *rk4_ns_step, r->pos_err);
    }
    printf("   (x rk4: ns per step relative to our rk4; GSL's peers run behind our method\n"
           "    interface, gsl-rk4 step-doubles: 11 evaluations a step)\n\n");
}

/* ---- 2. our RK4 against GSL's rk4 */

static void bench_rk4_vs_gsl(const pb_problem *p)
{
    const pb_method_type *ours = pb_method_find("rk4"), *peer = pb_method_find("gsl-rk4");
    if (!ours || !peer) {
        printf("== 2. skipped: rk4 or gsl-rk4 not in the method table ==\n\n");
        return;
    }
    double T = p->period, t_end = p->t0 + BENCH_ORBITS * T;
    int spo_gsl = BENCH_SPO / 2;
    double h = T / spo_gsl;
    long n = (long)(BENCH_ORBITS * spo_gsl);
    bench_job jobs[4];
    memset(jobs, 0, sizeof jobs);
    jobs[0].m = ours;
    bench_config(ours, p, h, 0, &jobs[0].cfg);
    jobs[1].m = ours;
    bench_config(ours, p, h / 2, 0, &jobs[1].cfg);
    jobs[2].m = peer;
    bench_config(peer, p, h, 0, &jobs[2].cfg);
    jobs[3].m = NULL;
    jobs[3].cfg.h = h;
    jobs[3].nsteps = n;
    for (int i = 0; i < 4; i++)
        jobs[i].t_end = t_end;
    bench_jobs_run(jobs, 4, p);
    const bench_timing o_h = jobs[0].out, o_h2 = jobs[1].out, g_h = jobs[2].out,
                       g_plain = jobs[3].out;
    printf("== 2. Our rk4 against GSL's rk4: %s, %g orbits, h = T/%d ==\n", p->name,
           BENCH_ORBITS, spo_gsl);
    printf("%-34s %9s %9s %9s %9s %10s\n", "run", "steps", "evals", "ns/step", "ms", "pos err");
    const struct { const char *label; const bench_timing *r; } rows[] = {
        {"ours rk4 at h", &o_h},
        {"ours rk4 at h/2", &o_h2},
        {"GSL gsl-rk4 peer at h", &g_h},
        {"GSL step_rk4 plain loop at h", &g_plain},
    };
    for (size_t i = 0; i < sizeof rows / sizeof rows[0]; i++) {
        const bench_timing *r = rows[i].r;
        if (r->status) {
            printf("%-34s failed: %s\n", rows[i].label, pb_strerror(r->status));
            continue;
        }
        printf("%-34s %9ld %9ld %9.1f %9.2f %10.3e\n", rows[i].label, r->steps, r->evals,
               bench_ns(r->sec, r->steps), 1e3 * r->sec, r->pos_err);
    }
    printf("   per step at h:     GSL peer / ours = %.2f x time, %.2f x evals;"
           " GSL plain / ours = %.2f x time\n",
           bench_ns(g_h.sec, g_h.steps) / bench_ns(o_h.sec, o_h.steps),
           ((double)g_h.evals / (double)g_h.steps) / ((double)o_h.evals / (double)o_h.steps),
           bench_ns(g_plain.sec, g_plain.steps) / bench_ns(o_h.sec, o_h.steps));
    printf("   equal accuracy:    ours at h/2 / GSL peer at h = %.2f x time, %.2f x evals"
           " (errors %.3e vs %.3e, ratio %.3f)\n",
           o_h2.sec / g_h.sec, (double)o_h2.evals / (double)g_h.evals, o_h2.pos_err,
           g_h.pos_err, o_h2.pos_err / g_h.pos_err);
    printf("                      ours at h/2 / GSL plain at h = %.2f x time, %.2f x evals\n\n",
           o_h2.sec / g_plain.sec, (double)o_h2.evals / (double)g_plain.evals);
}

/* ---- 3. harness overhead */

static int bench_overhead(const pb_problem *p, double *timing_pct, double *timing_min_pct,
                          double *direct_pct, double *direct_min_pct)
{
    *timing_min_pct = NAN;
    const pb_method_type *m = pb_method_find("rk4");
    *timing_pct = NAN;
    if (!m || p->dim != 3 || !p->exact_q || p->velocity_dependent) {
        printf("== 3. skipped: needs rk4 and a 3-d Kepler problem ==\n\n");
        return -1;
    }
    pb_case_spec spec;
    memset(&spec, 0, sizeof spec);
    spec.problem = *p;
    spec.method = m;
    spec.steps_per_orbit = BENCH_SPO;
    spec.orbits = BENCH_OH_ORBITS;
    spec.repeats = 5; /* the harness's own median of 5, as a user's run would */
    double h = p->period / BENCH_SPO;
    long nsteps = (long)(BENCH_OH_ORBITS * BENCH_SPO);
    double t_end = p->t0 + (double)nsteps * h;
    double inl[BENCH_OH_ROUNDS], cnt[BENCH_OH_ROUNDS], drv[BENCH_OH_ROUNDS];
    double tim[BENCH_OH_ROUNDS], met[BENCH_OH_ROUNDS], dir[BENCH_OH_ROUNDS], qr[BENCH_OH_ROUNDS];
    double qtd[BENCH_OH_ROUNDS], rdir[3], vdir[3];
    double qc[BENCH_OH_ROUNDS], qd[BENCH_OH_ROUNDS], qt[BENCH_OH_ROUNDS], qm[BENCH_OH_ROUNDS];
    double arr[BENCH_OH_ROUNDS], qa[BENCH_OH_ROUNDS], ra[3], va[3];
    double ri[3], vi[3], rc[3], vc[3], rd[3] = {0}, vd[3] = {0}, td = 0;
    long steps_case = 0;
    int same = 1;
    pb_method_config cfg;
    bench_config(m, p, h, 0, &cfg);
    void *ws = m->alloc(p->dim);
    if (!ws)
        return -1;
    /* rounds interleave the variants so load from other processes hits all
     * alike; round 0 is the warm-up */
    for (int k = -1; k < BENCH_OH_ROUNDS; k++) {
        double t0 = bench_now();
        bench_inline_rk4(p->mu, h, nsteps, p->r0, p->v0, ri, vi);
        double t0d = bench_now();
        bench_direct_rk4(p, h, nsteps, rdir, vdir);
        double t1 = bench_now();
        pb_force_counter c;
        pb_force f;
        pb_force_counter_init(&c, p, &f);
        bench_counter_rk4(&f, h, nsteps, p->r0, p->v0, rc, vc);
        double t2 = bench_now();
        pb_force_counter_init(&c, p, &f);
        int s = m->start(ws, &f, &cfg, p->t0, p->r0, p->v0);
        if (!s)
            s = m->advance(ws, t_end, NULL, NULL);
        double t3 = bench_now();
        m->get_state(ws, &td, rd, vd);
        bench_inline_rk4_arrays(p->mu, h, nsteps, p->r0, p->v0, ra, va);
        double t3a = bench_now();
        /* the metric pass alone (no timing pass), then a run that reports
         * the harness's own timing-pass median */
        pb_case_spec spec0 = spec;
        spec0.repeats = 0;
        pb_case_result res0, res;
        int rcode = pb_case_run(&spec0, &res0);
        double t4 = bench_now();
        if (!rcode)
            pb_case_result_free(&res0);
        if (!rcode)
            rcode = pb_case_run(&spec, &res);
        else
            memset(&res, 0, sizeof res);
        if (s || rcode || res.status) {
            printf("== 3. failed: %s ==\n\n", pb_strerror(s ? s : rcode ? rcode : res.status));
            pb_case_result_free(&res);
            m->free(ws);
            return -1;
        }
        steps_case = res.steps;
        for (int i = 0; i < 3; i++)
            same = same && ri[i] == rd[i] && vi[i] == vd[i] && ri[i] == res.final_r[i] &&
                   ri[i] == rc[i] && vi[i] == vc[i] && ri[i] == ra[i] && vi[i] == va[i];
        if (k >= 0) {
            inl[k] = bench_ns(t0d - t0, nsteps);
            cnt[k] = bench_ns(t2 - t1, nsteps);
            dir[k] = bench_ns(t1 - t0d, nsteps);
            drv[k] = bench_ns(t3 - t2, nsteps);
            tim[k] = res.ns_per_step;
            /* the metric pass: everything pb_case_run did but the timing pass
             * (truth, samples, observer on every step, summaries) */
            arr[k] = bench_ns(t3a - t3, nsteps);
            met[k] = bench_ns(t4 - t3a, res.steps);
            /* each variant against the reference of its own round */
            qc[k] = cnt[k] / inl[k];
            qr[k] = dir[k] / inl[k];
            qd[k] = drv[k] / inl[k];
            qt[k] = tim[k] / inl[k];
            qtd[k] = tim[k] / dir[k];
            qm[k] = met[k] / inl[k];
            qa[k] = arr[k] / inl[k];
        }
        pb_case_result_free(&res);
    }
    m->free(ws);
    /* minima first: bench_median sorts its argument */
    double mn_i = bench_min(inl, BENCH_OH_ROUNDS), mn_a = bench_min(arr, BENCH_OH_ROUNDS);
    double mn_c = bench_min(cnt, BENCH_OH_ROUNDS), mn_d = bench_min(drv, BENCH_OH_ROUNDS);
    double mn_r = bench_min(dir, BENCH_OH_ROUNDS), rr = bench_median(dir, BENCH_OH_ROUNDS);
    double pr = 100 * (bench_median(qr, BENCH_OH_ROUNDS) - 1);
    double ptd = 100 * (bench_median(qtd, BENCH_OH_ROUNDS) - 1);
    double mn_t = bench_min(tim, BENCH_OH_ROUNDS), mn_m = bench_min(met, BENCH_OH_ROUNDS);
    double b = bench_median(inl, BENCH_OH_ROUNDS), c_ = bench_median(cnt, BENCH_OH_ROUNDS);
    double d = bench_median(drv, BENCH_OH_ROUNDS), t = bench_median(tim, BENCH_OH_ROUNDS);
    double mm = bench_median(met, BENCH_OH_ROUNDS), ar = bench_median(arr, BENCH_OH_ROUNDS);
    double pa = 100 * (bench_median(qa, BENCH_OH_ROUNDS) - 1);
    double pc = 100 * (bench_median(qc, BENCH_OH_ROUNDS) - 1);
    double pd = 100 * (bench_median(qd, BENCH_OH_ROUNDS) - 1);
    double pt = 100 * (bench_median(qt, BENCH_OH_ROUNDS) - 1);
    double pm = 100 * (bench_median(qm, BENCH_OH_ROUNDS) - 1);
    printf("== 3. Harness overhead: rk4 on %s, %ld steps a round (T/%d, %g orbits), %d rounds ==\n",
           p->name, nsteps, BENCH_SPO, BENCH_OH_ORBITS, BENCH_OH_ROUNDS);
    printf("   overhead: median over rounds of (variant / reference of the same round) - 1;\n"
           "   min: the least disturbed round, for comparison\n");
    printf("%-52s %8s %8s %9s %9s\n", "run", "ns/step", "min", "overhead", "min/min");
    printf("%-52s %8.1f %8.1f %9s %9s\n", "inline RK4 loop, scalars, force inlined (reference)",
           b, mn_i, "-", "-");
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "inline RK4 loop over arrays, force inlined", ar,
           mn_a, pa, 100 * (mn_a / mn_i - 1));
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "scalar loop calling the problem's accel (pluggable)",
           rr, mn_r, pr, 100 * (mn_r / mn_i - 1));
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "scalar loop, force through the counting wrapper",
           c_, mn_c, pc, 100 * (mn_c / mn_i - 1));
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "rk4 method driven directly (start + advance)", d,
           mn_d, pd, 100 * (mn_d / mn_i - 1));
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "pb_case_run timing pass (its ns_per_step)", t,
           mn_t, pt, 100 * (mn_t / mn_i - 1));
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "pb_case_run metric pass (observer, truth, samples)",
           mm, mn_m, pm, 100 * (mn_m / mn_i - 1));
    printf("   final states of all five loops bit-identical: %s;"
           " case steps %ld\n", same ? "yes" : "NO", steps_case);
    printf("   made of (least disturbed rounds, ns/step): calling the force through a pointer\n"
           "   instead of inlining it %+.1f; the counting wrapper on top %+.1f (a second indirect\n"
           "   call and finiteness checks); the rk4 method interface %+.1f; pb_case_run's timing\n"
           "   pass against driving the method directly %+.1f; the metric pass's observer, truth\n"
           "   and samples %+.1f. The array-form inline loop is slow because gcc -O2 vectorizes\n"
           "   its 6-element loops badly; rk4.c keeps stage states on the stack instead.\n\n",
           mn_r - mn_i, mn_c - mn_r, mn_d - mn_c, mn_t - mn_d, mn_m - mn_t);
    *timing_pct = pt;
    *direct_pct = ptd;
    *direct_min_pct = 100 * (mn_t / mn_r - 1);
    *timing_min_pct = 100 * (mn_t / mn_i - 1);
    return 0;
}

/* ---- 4. peak memory against horizon */

/* Peak resident set (KiB) of a child that runs the case, or does nothing
 * when spec is NULL; -1 on failure. */
static long bench_child_maxrss(const pb_case_spec *spec, double *sec, long *steps)
{
    int fd[2];
    if (pipe(fd))
        return -1;
    fflush(NULL);
    double t0 = bench_now();
    pid_t pid = fork();
    if (pid < 0)
        return -1;
    if (pid == 0) {
        close(fd[0]);
        long n = 0;
        int ok = 1;
        if (spec) {
            pb_case_result res;
            ok = pb_case_run(spec, &res) == 0 && res.status == PB_OK;
            n = res.steps;
            pb_case_result_free(&res);
        }
        ssize_t w = write(fd[1], &n, sizeof n);
        _exit(ok && w == (ssize_t)sizeof n ? 0 : 1);
    }
    close(fd[1]);
    long n = 0;
    if (read(fd[0], &n, sizeof n) != (ssize_t)sizeof n)
        n = -1;
    close(fd[0]);
    int st = 0;
    struct rusage ru;
    if (wait4(pid, &st, 0, &ru) < 0 || !WIFEXITED(st) || WEXITSTATUS(st) != 0)
        return -1;
    *sec = bench_now() - t0;
    *steps = n;
    return ru.ru_maxrss;
}

static int bench_memory(double *diff_pct)
{
    pb_case_spec spec;
    memset(&spec, 0, sizeof spec);
    *diff_pct = NAN;
    if (pb_problem_lookup("kepler-e0", &spec.problem) || !(spec.method = pb_method_find("leapfrog"))) {
        printf("== 4. skipped: kepler-e0 or leapfrog missing ==\n\n");
        return -1;
    }
    spec.steps_per_orbit = 100;
    spec.repeats = 1;
    double s0, s1, s2;
    long n0, n1, n2;
    long base = bench_child_maxrss(NULL, &s0, &n0);
    spec.orbits = 1e3;
    long m1 = bench_child_maxrss(&spec, &s1, &n1);
    spec.orbits = 1e5;
    long m2 = bench_child_maxrss(&spec, &s2, &n2);
    printf("== 4. Peak memory (ru_maxrss of a forked child running pb_case_run):"
           " leapfrog, kepler-e0, T/100 ==\n");
    if (base < 0 || m1 < 0 || m2 < 0) {
        printf("   failed to measure (child exited abnormally)\n\n");
        return -1;
    }
    printf("%-34s %10s %12s %9s\n", "run", "steps", "maxrss KiB", "wall s");
    printf("%-34s %10s %12ld %9.2f\n", "child doing nothing (baseline)", "-", base, s0);
    printf("%-34s %10ld %12ld %9.2f\n", "10^3 orbits", n1, m1, s1);
    printf("%-34s %10ld %12ld %9.2f\n", "10^5 orbits", n2, m2, s2);
    *diff_pct = 100.0 * fabs((double)(m2 - m1)) / (double)m1;
    printf("   10^5 vs 10^3 orbits: %+ld KiB (%.2f%% of the 10^3-orbit peak);"
           " above baseline: %ld vs %ld KiB\n\n", m2 - m1, *diff_pct, m2 - base, m1 - base);
    return 0;
}

int main(void)
{
    pb_problem p;
    if (pb_problem_lookup(BENCH_PROBLEM, &p) || !(p.period > 0)) {
        fprintf(stderr, "bench: problem %s not found\n", BENCH_PROBLEM);
        return 2;
    }
    gsl_set_error_handler_off();
    double t_start = bench_now();
    double load[1] = {NAN};
    if (getloadavg(load, 1) != 1)
        load[0] = NAN;
    printf("propbench bench (CLOCK_MONOTONIC, warm-up first, medians; reporting only)\n");
    printf("   load average at start %.2f on %ld CPUs: timings shift with other processes' load\n\n",
           load[0], sysconf(_SC_NPROCESSORS_ONLN));
    double rk4_ns = NAN, oh_pct = NAN, oh_min_pct = NAN, mem_pct = NAN, od_pct = NAN, od_min = NAN;
    bench_methods(&p, &rk4_ns);
    bench_rk4_vs_gsl(&p);
    int oh_ok = bench_overhead(&p, &oh_pct, &oh_min_pct, &od_pct, &od_min) == 0;
    int mem_ok = bench_memory(&mem_pct) == 0;
    printf("== Goals ==\n");
    printf("   harness overhead <= %.0f%% against a hand-written RK4 loop calling the same force\n"
           "   function:                              %s (measured %+.1f%%, median of paired rounds;"
           " %+.1f%% best round)\n",
           BENCH_OVERHEAD_GOAL, oh_ok && od_pct <= BENCH_OVERHEAD_GOAL ? "PASS" : "MISS", od_pct, od_min);
    printf("   against a loop with the Kepler force inlined (no function call): %+.1f%% (median),"
           " %+.1f%% best round\n", oh_pct, oh_min_pct);
    printf("   memory independent of horizon (< %.0f%%): %s (measured %.2f%%, 10^5 vs 10^3 orbits)\n",
           BENCH_MEMORY_GOAL, mem_ok && mem_pct < BENCH_MEMORY_GOAL ? "PASS" : "MISS", mem_pct);
    printf("   total bench time %.1f s\n", bench_now() - t_start);
    return 0;
}
