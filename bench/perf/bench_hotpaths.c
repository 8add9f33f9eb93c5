/* bench_hotpaths.c - section 6 of `make bench`: the hot paths of issue 16
 * against hand-written loops, round by round on the same problem and step:
 * gauss-jackson8 against its one-evaluation floor (a loop making one force
 * call a step through the same pointer, the counting wrapper, with the
 * cheapest update that keeps the calls dependent: symplectic Euler),
 * leapfrog against a hand kick-drift-kick loop calling the force through a
 * pointer (the counting wrapper the method gets, and the problem's own
 * accel), and rkf45's cost per evaluation against the same floor. */
#include <stdio.h>
#include <string.h>
#include "bench/perf/bench.h"
#include "bench/measure/force_counter.h"

#define HP_ROUNDS 21
#define HP_ORBITS 50.0   /* 5e4 steps a round at BENCH_SPO */

enum { HP_FLOOR, HP_GJ, HP_LF_HANDC, HP_LF_HANDP, HP_LF, HP_Y6, HP_RKF, HP_N };

typedef struct hp_setup {
    const pb_problem *p;
    const pb_method_type *m[HP_N];   /* the methods driven (NULL for hand loops) */
    pb_method_config cfg[HP_N];
    void *ws[HP_N];
    double h, t_end;
    long nsteps;
} hp_setup;

typedef struct hp_rounds {
    double ns[HP_N][HP_ROUNDS];      /* per step */
    double q_gj[HP_ROUNDS], q_lf[HP_ROUNDS], q_lfp[HP_ROUNDS];
    long steps[HP_N], evals[HP_N];
    int same;                        /* hand and method leapfrog bit-identical */
} hp_rounds;

/* One force call a step through f, symplectic Euler between them. */
static void hp_floor(const pb_force *f, double h, long n, const double *r0, const double *v0,
                     double *r_out)
{
    double r[3], v[3], a[3];
    memcpy(r, r0, sizeof r);
    memcpy(v, v0, sizeof v);
    for (long k = 0; k < n; k++) {
        f->accel(f->ctx, (double)k * h, r, v, a);
        for (int i = 0; i < 3; i++) {
            v[i] += h * a[i];
            r[i] += h * v[i];
        }
    }
    memcpy(r_out, r, sizeof r);
}

/* Kick-drift-kick with the force through FORCE(t), the last force of a
 * step reused as the next one's first, as leapfrog.c does. */
#define HP_KDK(FORCE)                                                           \
    double r[3], v[3], a[3], hh = 0.5 * h;                                      \
    memcpy(r, r0, sizeof r);                                                    \
    memcpy(v, v0, sizeof v);                                                    \
    FORCE(0.0);                                                                 \
    for (long k = 0; k < n; k++) {                                              \
        for (int i = 0; i < 3; i++) v[i] += hh * a[i];                          \
        for (int i = 0; i < 3; i++) r[i] += h * v[i];                           \
        FORCE((double)(k + 1) * h);                                             \
        for (int i = 0; i < 3; i++) v[i] += hh * a[i];                          \
    }                                                                           \
    memcpy(r_out, r, sizeof r);                                                 \
    memcpy(v_out, v, sizeof v)

static void hp_kdk_counted(const pb_force *f, double h, long n, const double *r0,
                           const double *v0, double *r_out, double *v_out)
{
#define HP_COUNTED(tt) f->accel(f->ctx, (tt), r, v, a)
    HP_KDK(HP_COUNTED);
#undef HP_COUNTED
}

static void hp_kdk_direct(const pb_problem *p, double h, long n, double *r_out, double *v_out)
{
    const double *r0 = p->r0, *v0 = p->v0;
#define HP_DIRECT(tt) p->accel(p, (tt), r, NULL, a)
    HP_KDK(HP_DIRECT);
#undef HP_DIRECT
}
#undef HP_KDK

/* A method driven directly (start + advance, counting wrapper, no
 * observer), its seconds; final state into r, v. */
static double hp_drive(const hp_setup *o, int k, long *steps, long *evals, double *r, double *v)
{
    const pb_method_type *m = o->m[k];
    const pb_problem *p = o->p;
    pb_force_counter fc;
    pb_force f;
    pb_force_counter_init(&fc, p, &f);
    double t0 = bench_cpu_now(), t;
    int s = m->start(o->ws[k], &f, &o->cfg[k], p->t0, p->r0, p->v0);
    if (!s)
        s = m->advance(o->ws[k], o->t_end, NULL, NULL);
    double sec = bench_cpu_now() - t0;
    pb_method_stats st;
    m->get_stats(o->ws[k], &st);
    m->get_state(o->ws[k], &t, r, v);
    *steps = s ? -1 : st.steps;
    *evals = fc.evals;
    return sec;
}

static void hp_round(const hp_setup *o, int k, hp_rounds *w)
{
    const pb_problem *p = o->p;
    double rf[3], rc[3], vc[3], rp[3], vp[3], rm[PB_DIM_MAX], vm[PB_DIM_MAX];
    pb_force_counter fc;
    pb_force f;
    double sec[HP_N];
    pb_force_counter_init(&fc, p, &f);
    double t0 = bench_cpu_now();
    hp_floor(&f, o->h, o->nsteps, p->r0, p->v0, rf);
    double t1 = bench_cpu_now();
    hp_kdk_counted(&f, o->h, o->nsteps, p->r0, p->v0, rc, vc);
    double t2 = bench_cpu_now();
    hp_kdk_direct(p, o->h, o->nsteps, rp, vp);
    double t3 = bench_cpu_now();
    sec[HP_FLOOR] = t1 - t0, sec[HP_LF_HANDC] = t2 - t1, sec[HP_LF_HANDP] = t3 - t2;
    w->steps[HP_FLOOR] = w->steps[HP_LF_HANDC] = w->steps[HP_LF_HANDP] = o->nsteps;
    for (int j = 0; j < HP_N; j++) {
        if (!o->m[j])
            continue;
        sec[j] = hp_drive(o, j, &w->steps[j], &w->evals[j], rm, vm);
        if (j == HP_LF)
            for (int i = 0; i < 3; i++)
                w->same = w->same && rm[i] == rc[i] && vm[i] == vc[i] && rm[i] == rp[i] &&
                          vm[i] == vp[i];
    }
    if (k < 0)
        return;
    for (int j = 0; j < HP_N; j++)
        w->ns[j][k] = bench_ns(sec[j], w->steps[j]);
    w->q_gj[k] = w->ns[HP_GJ][k] / w->ns[HP_FLOOR][k];
    w->q_lf[k] = w->ns[HP_LF][k] / w->ns[HP_LF_HANDC][k];
    w->q_lfp[k] = w->ns[HP_LF][k] / w->ns[HP_LF_HANDP][k];
}

static void hp_line(const char *what, double *ns, long steps, long evals)
{
    double mn = bench_min(ns, HP_ROUNDS), md = bench_median(ns, HP_ROUNDS);
    if (evals > 0)
        printf("%-56s %8.1f %8.1f %8.2f\n", what, md, mn, md * (double)steps / (double)evals);
    else
        printf("%-56s %8.1f %8.1f %8s\n", what, md, mn, "-");
}

static void hp_print(const hp_setup *o, hp_rounds *w, double *gj_x, double *lf_x)
{
    printf("== 6. Hot paths against hand loops: %s, %d steps per orbit, %g orbits, %d rounds ==\n",
           o->p->name, BENCH_SPO, HP_ORBITS, HP_ROUNDS);
    printf("   each variant once a round, interleaved; ratios are medians over rounds of\n"
           "   (variant / its reference in the same round)\n");
    printf("%-56s %8s %8s %8s\n", "run", "ns/step", "min", "ns/eval");
    hp_line("floor: 1 force call a step via counting wrapper + Euler", w->ns[HP_FLOOR],
            w->steps[HP_FLOOR], 0);
    hp_line("gauss-jackson8 driven (start-up included)", w->ns[HP_GJ], w->steps[HP_GJ],
            w->evals[HP_GJ]);
    hp_line("hand kick-drift-kick, force via counting wrapper", w->ns[HP_LF_HANDC],
            w->steps[HP_LF_HANDC], 0);
    hp_line("hand kick-drift-kick, force via the problem's accel", w->ns[HP_LF_HANDP],
            w->steps[HP_LF_HANDP], 0);
    hp_line("leapfrog driven", w->ns[HP_LF], w->steps[HP_LF], w->evals[HP_LF]);
    hp_line("yoshida6 driven (7 evaluations a step)", w->ns[HP_Y6], w->steps[HP_Y6],
            w->evals[HP_Y6]);
    hp_line("rkf45 driven (tolerance 1e-10)", w->ns[HP_RKF], w->steps[HP_RKF], w->evals[HP_RKF]);
    *gj_x = bench_median(w->q_gj, HP_ROUNDS);
    *lf_x = bench_median(w->q_lf, HP_ROUNDS);
    printf("   gauss-jackson8 / floor %.2fx (goal <= %.2fx); leapfrog / hand loop %.3fx via the\n"
           "   wrapper (goal <= %.2fx), %.3fx against the loop calling the problem's accel;\n"
           "   hand and driven leapfrog bit-identical: %s\n\n",
           *gj_x, BENCH_GJ_FLOOR_GOAL, *lf_x, BENCH_LF_HAND_GOAL, bench_median(w->q_lfp, HP_ROUNDS),
           w->same ? "yes" : "NO");
}

int bench_hotpaths(const pb_problem *p, double *gj_x, double *lf_x)
{
    static const char *const names[HP_N] = {NULL, "gauss-jackson8", NULL, NULL, "leapfrog",
                                            "yoshida6", "rkf45"};
    *gj_x = *lf_x = (double)NAN;
    hp_setup o;
    memset(&o, 0, sizeof o);
    o.p = p;
    o.h = p->period / BENCH_SPO;
    o.nsteps = (long)(HP_ORBITS * BENCH_SPO);
    o.t_end = p->t0 + (double)o.nsteps * o.h;
    if (p->dim != 3 || p->velocity_dependent) {
        printf("== 6. skipped: needs a 3-d problem without velocity-dependent forces ==\n\n");
        return -1;
    }
    int bad = 0;
    for (int j = 0; j < HP_N; j++) {
        if (!names[j])
            continue;
        o.m[j] = pb_method_find(names[j]);
        if (!o.m[j] || !(o.ws[j] = o.m[j]->alloc(p->dim))) {
            bad = 1;
            continue;
        }
        bench_config(o.m[j], p, o.h, BENCH_TOL, &o.cfg[j]);
    }
    hp_rounds w;
    memset(&w, 0, sizeof w);
    w.same = 1;
    for (int k = -1; k < HP_ROUNDS && !bad; k++) {
        hp_round(&o, k, &w);
        for (int j = 0; j < HP_N; j++)
            bad |= w.steps[j] < 0;
    }
    for (int j = 0; j < HP_N; j++)
        if (o.ws[j])
            o.m[j]->free(o.ws[j]);
    if (bad) {
        printf("== 6. failed: a method is missing or a run did not finish ==\n\n");
        return -1;
    }
    hp_print(&o, &w, gj_x, lf_x);
    return 0;
}
