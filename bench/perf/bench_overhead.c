/* bench_overhead.c - section 3 of `make bench`: the harness's overhead.
 * The reference is RK4 (Abramowitz & Stegun 25.5.10) hand-written on the
 * Kepler problem; against it, round by round, the same loop calling the
 * force through a pointer and through the counting wrapper, the rk4 method
 * driven directly, and pb_case_run's timing and metric passes. */
#include <stdio.h>
#include <string.h>
#include "bench/perf/bench.h"
#include "bench/measure/force_counter.h"

/* ---- the hand-written reference: RK4 on the Kepler problem with the state
 * in scalars and the force inlined, no function pointers and no arrays; the
 * same arithmetic as rk4.c and the two-body force, so the results agree to
 * the last bit */

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

/* ---- 3. harness overhead */

/* What every round runs: the problem, rk4, its workspace, the step. */
typedef struct oh_setup {
    const pb_problem *p;
    const pb_method_type *m;
    pb_case_spec spec;       /* the case as a user's run would give it */
    pb_method_config cfg;
    void *ws;
    double h, t_end;
    long nsteps;
} oh_setup;

/* ns per step of each variant in each round (inline scalar reference,
 * inline arrays, direct force pointer, counting wrapper, method driven,
 * timing pass, metric pass), and each against the reference of its own
 * round (q*; qtd: the timing pass against the direct-pointer loop) */
typedef struct oh_rounds {
    double inl[BENCH_OH_ROUNDS], arr[BENCH_OH_ROUNDS], dir[BENCH_OH_ROUNDS];
    double cnt[BENCH_OH_ROUNDS], drv[BENCH_OH_ROUNDS], tim[BENCH_OH_ROUNDS];
    double met[BENCH_OH_ROUNDS];
    double qa[BENCH_OH_ROUNDS], qr[BENCH_OH_ROUNDS], qc[BENCH_OH_ROUNDS], qd[BENCH_OH_ROUNDS];
    double qt[BENCH_OH_ROUNDS], qtd[BENCH_OH_ROUNDS], qm[BENCH_OH_ROUNDS];
    long steps_case;
    int same;                /* every round's final states bit-identical */
} oh_rounds;

/* The clock read between the variants of one round, in the order they run. */
typedef struct oh_clock {
    double t0, t0d, t1, t2, t3, t3a, t4;
} oh_clock;

/* The metric pass alone (no timing pass), its end time in *t4, then a run
 * that reports the harness's own timing-pass median into res. */
static int oh_case(const oh_setup *o, pb_case_result *res, double *t4)
{
    pb_case_spec spec0 = o->spec;
    spec0.repeats = 0;
    pb_case_result res0;
    int rcode = pb_case_run(&spec0, &res0);
    *t4 = bench_cpu_now();
    if (!rcode) {
        pb_case_result_free(&res0);
        rcode = pb_case_run(&o->spec, res);
    } else {
        memset(res, 0, sizeof *res);
    }
    return rcode;
}

static void oh_record(oh_rounds *w, int k, const oh_clock *c, long nsteps, const pb_case_result *res)
{
    w->inl[k] = bench_ns(c->t0d - c->t0, nsteps);
    w->cnt[k] = bench_ns(c->t2 - c->t1, nsteps);
    w->dir[k] = bench_ns(c->t1 - c->t0d, nsteps);
    w->drv[k] = bench_ns(c->t3 - c->t2, nsteps);
    w->tim[k] = res->ns_per_step;
    /* the metric pass: everything pb_case_run did but the timing pass
     * (truth, samples, observer on every step, summaries) */
    w->arr[k] = bench_ns(c->t3a - c->t3, nsteps);
    w->met[k] = bench_ns(c->t4 - c->t3a, res->steps);
    w->qc[k] = w->cnt[k] / w->inl[k];
    w->qr[k] = w->dir[k] / w->inl[k];
    w->qd[k] = w->drv[k] / w->inl[k];
    w->qt[k] = w->tim[k] / w->inl[k];
    w->qtd[k] = w->tim[k] / w->dir[k];
    w->qm[k] = w->met[k] / w->inl[k];
    w->qa[k] = w->arr[k] / w->inl[k];
}

/* One round of every variant; round -1 is the warm-up and is not kept.
 * 0, or the status of whatever failed. */
static int oh_round(const oh_setup *o, int k, oh_rounds *w)
{
    const pb_problem *p = o->p;
    const pb_method_type *m = o->m;
    double ri[3], vi[3], rc[3], vc[3], rdir[3], vdir[3], ra[3], va[3];
    double rd[3] = {0}, vd[3] = {0}, td = 0;
    oh_clock c;
    c.t0 = bench_cpu_now();
    bench_inline_rk4(p->mu, o->h, o->nsteps, p->r0, p->v0, ri, vi);
    c.t0d = bench_cpu_now();
    bench_direct_rk4(p, o->h, o->nsteps, rdir, vdir);
    c.t1 = bench_cpu_now();
    pb_force_counter fc;
    pb_force f;
    pb_force_counter_init(&fc, p, &f);
    bench_counter_rk4(&f, o->h, o->nsteps, p->r0, p->v0, rc, vc);
    c.t2 = bench_cpu_now();
    pb_force_counter_init(&fc, p, &f);
    int s = m->start(o->ws, &f, &o->cfg, p->t0, p->r0, p->v0);
    if (!s)
        s = m->advance(o->ws, o->t_end, NULL, NULL);
    c.t3 = bench_cpu_now();
    m->get_state(o->ws, &td, rd, vd);
    bench_inline_rk4_arrays(p->mu, o->h, o->nsteps, p->r0, p->v0, ra, va);
    c.t3a = bench_cpu_now();
    pb_case_result res;
    int rcode = oh_case(o, &res, &c.t4);
    int bad = s ? s : rcode ? rcode : res.status;
    if (!bad) {
        w->steps_case = res.steps;
        for (int i = 0; i < 3; i++)
            w->same = w->same && ri[i] == rd[i] && vi[i] == vd[i] && ri[i] == res.final_r[i] &&
                      ri[i] == rc[i] && vi[i] == vc[i] && ri[i] == ra[i] && vi[i] == va[i];
        if (k >= 0)
            oh_record(w, k, &c, o->nsteps, &res);
    }
    pb_case_result_free(&res);
    return bad;
}

/* Over the rounds: medians and least-disturbed minima (ns per step), and
 * the median overheads (percent) against the inline reference (p*) and,
 * for the timing pass, against the loop calling the problem's force (ptd). */
typedef struct oh_summary {
    double mn_i, mn_a, mn_r, mn_c, mn_d, mn_t, mn_m;
    double b, ar, rr, c_, d, t, mm;
    double pa, pr, pc, pd, pt, pm, ptd;
} oh_summary;

static oh_summary oh_summarise(oh_rounds *w)
{
    const int n = BENCH_OH_ROUNDS;
    oh_summary s;
    /* minima first: bench_median sorts its argument */
    s.mn_i = bench_min(w->inl, n), s.mn_a = bench_min(w->arr, n);
    s.mn_c = bench_min(w->cnt, n), s.mn_d = bench_min(w->drv, n);
    s.mn_r = bench_min(w->dir, n), s.rr = bench_median(w->dir, n);
    s.pr = 100 * (bench_median(w->qr, n) - 1);
    s.ptd = 100 * (bench_median(w->qtd, n) - 1);
    s.mn_t = bench_min(w->tim, n), s.mn_m = bench_min(w->met, n);
    s.b = bench_median(w->inl, n), s.c_ = bench_median(w->cnt, n);
    s.d = bench_median(w->drv, n), s.t = bench_median(w->tim, n);
    s.mm = bench_median(w->met, n), s.ar = bench_median(w->arr, n);
    s.pa = 100 * (bench_median(w->qa, n) - 1);
    s.pc = 100 * (bench_median(w->qc, n) - 1);
    s.pd = 100 * (bench_median(w->qd, n) - 1);
    s.pt = 100 * (bench_median(w->qt, n) - 1);
    s.pm = 100 * (bench_median(w->qm, n) - 1);
    return s;
}

static void oh_print(const oh_setup *o, const oh_summary *s, int same, long steps_case)
{
    printf("== 3. Harness overhead: rk4 on %s, %ld steps a round (T/%d, %g orbits), %d rounds ==\n",
           o->p->name, o->nsteps, BENCH_SPO, BENCH_OH_ORBITS, BENCH_OH_ROUNDS);
    printf("   overhead: median over rounds of (variant / reference of the same round) - 1;\n"
           "   min: the least disturbed round, for comparison\n");
    printf("%-52s %8s %8s %9s %9s\n", "run", "ns/step", "min", "overhead", "min/min");
    printf("%-52s %8.1f %8.1f %9s %9s\n", "inline RK4 loop, scalars, force inlined (reference)",
           s->b, s->mn_i, "-", "-");
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "inline RK4 loop over arrays, force inlined", s->ar,
           s->mn_a, s->pa, 100 * (s->mn_a / s->mn_i - 1));
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "scalar loop calling the problem's accel (pluggable)",
           s->rr, s->mn_r, s->pr, 100 * (s->mn_r / s->mn_i - 1));
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "scalar loop, force through the counting wrapper",
           s->c_, s->mn_c, s->pc, 100 * (s->mn_c / s->mn_i - 1));
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "rk4 method driven directly (start + advance)", s->d,
           s->mn_d, s->pd, 100 * (s->mn_d / s->mn_i - 1));
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "pb_case_run timing pass (its ns_per_step)", s->t,
           s->mn_t, s->pt, 100 * (s->mn_t / s->mn_i - 1));
    printf("%-52s %8.1f %8.1f %+8.1f%% %+8.1f%%\n", "pb_case_run metric pass (observer, truth, samples)",
           s->mm, s->mn_m, s->pm, 100 * (s->mn_m / s->mn_i - 1));
    printf("   final states of all five loops bit-identical: %s;"
           " case steps %ld\n", same ? "yes" : "NO", steps_case);
    printf("   made of (least disturbed rounds, ns/step): calling the force through a pointer\n"
           "   instead of inlining it %+.1f; the counting wrapper on top %+.1f (a second indirect\n"
           "   call and finiteness checks); the rk4 method interface %+.1f; pb_case_run's timing\n"
           "   pass against driving the method directly %+.1f; the metric pass's observer, truth\n"
           "   and samples %+.1f. The array-form inline loop is slow because gcc -O2 vectorizes\n"
           "   its 6-element loops badly; rk4.c keeps stage states on the stack instead.\n\n",
           s->mn_r - s->mn_i, s->mn_c - s->mn_r, s->mn_d - s->mn_c, s->mn_t - s->mn_d,
           s->mn_m - s->mn_t);
}

int bench_overhead(const pb_problem *p, double *timing_pct, double *timing_min_pct,
                   double *direct_pct, double *direct_min_pct)
{
    *timing_min_pct = (double)NAN;
    *timing_pct = (double)NAN;
    oh_setup o;
    memset(&o, 0, sizeof o);
    o.p = p;
    o.m = pb_method_find("rk4");
    if (!o.m || p->dim != 3 || !p->exact_q || p->velocity_dependent) {
        printf("== 3. skipped: needs rk4 and a 3-d Kepler problem ==\n\n");
        return -1;
    }
    o.spec.problem = *p;
    o.spec.method = o.m;
    o.spec.steps_per_orbit = BENCH_SPO;
    o.spec.orbits = BENCH_OH_ORBITS;
    o.spec.repeats = 5; /* the harness's own median of 5, as a user's run would */
    o.h = p->period / BENCH_SPO;
    o.nsteps = (long)(BENCH_OH_ORBITS * BENCH_SPO);
    o.t_end = p->t0 + (double)o.nsteps * o.h;
    bench_config(o.m, p, o.h, 0, &o.cfg);
    if (!(o.ws = o.m->alloc(p->dim)))
        return -1;
    oh_rounds w;
    memset(&w, 0, sizeof w);
    w.same = 1;
    /* rounds interleave the variants so load from other processes hits all
     * alike; round -1 is the warm-up */
    for (int k = -1; k < BENCH_OH_ROUNDS; k++) {
        int bad = oh_round(&o, k, &w);
        if (bad) {
            printf("== 3. failed: %s ==\n\n", pb_strerror(bad));
            o.m->free(o.ws);
            return -1;
        }
    }
    o.m->free(o.ws);
    oh_summary s = oh_summarise(&w);
    oh_print(&o, &s, w.same, w.steps_case);
    *timing_pct = s.pt;
    *direct_pct = s.ptd;
    *direct_min_pct = 100 * (s.mn_t / s.mn_r - 1);
    *timing_min_pct = 100 * (s.mn_t / s.mn_i - 1);
    return 0;
}
