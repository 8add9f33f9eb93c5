/* segments.c - integrating through impulsive manoeuvres (segments.h). */
#include <math.h>
#include <string.h>
#include "bench/measure/segments.h"
#include "problems/twobody.h"

void pb_manoeuvre_apply(const pb_manoeuvre *m, const double *r, double *v)
{
    double R[3], I[3], C[3];
    pb_ric_frame(r, v, R, I, C);
    for (int i = 0; i < 3; i++)
        v[i] += m->dv[0] * R[i] + m->dv[1] * I[i] + m->dv[2] * C[i];
}

static void segments_add(pb_method_stats *acc, const pb_method_stats *st)
{
    acc->steps += st->steps;
    acc->rejected += st->rejected;
    acc->startup_steps += st->startup_steps;
    acc->output_cut += st->output_cut;
    acc->t_fail = st->t_fail;
}

/* The step of a fixed-step method over [a, b]: h shortened just enough to
 * divide the segment into whole steps (a relative slack of 1e-9 keeps a
 * segment that is n h to round-off at n steps). */
static double segments_step(double h, double a, double b)
{
    double n = ceil((b - a) / h * (1 - 1e-9));
    return n >= 1 ? (b - a) / n : b - a;
}

int pb_case_integrate(const pb_case_spec *spec, const pb_method_config *cfg, void *ws,
                      const pb_force *f, double t_stop, pb_step_observer obs, void *obs_ctx,
                      pb_method_stats *stats, int *first_start)
{
    int dummy;
    if (!first_start)
        first_start = &dummy;
    const pb_problem *p = &spec->problem;
    const pb_method_type *m = pb_case_method(spec);
    const pb_forces *fo = &p->forces;
    int fixed = (m->flags & PB_KIND_FIXED) != 0;
    memset(stats, 0, sizeof *stats);
    int k = 0;
    while (k < fo->n_manoeuvres && !(fo->manoeuvres[k].t > p->t0))
        k++;  /* a manoeuvre at or before the start is not part of the run */
    if (k >= fo->n_manoeuvres || !(fo->manoeuvres[k].t < t_stop)) {
        int s = *first_start = m->start(ws, f, cfg, p->t0, p->r0, p->v0);
        if (!s)
            s = m->advance(ws, t_stop, obs, obs_ctx);
        m->get_stats(ws, stats);
        return s;
    }
    pb_method_config c = *cfg;
    int first = 1;
    double t = p->t0, r[PB_DIM_MAX] = {0}, v[PB_DIM_MAX] = {0};
    memcpy(r, p->r0, sizeof r);
    memcpy(v, p->v0, sizeof v);
    for (;;) {
        int burn = k < fo->n_manoeuvres && fo->manoeuvres[k].t < t_stop;
        double end = burn ? fo->manoeuvres[k].t : t_stop;
        if (fixed)
            c.h = segments_step(cfg->h, t, end);
        pb_method_stats st;
        int s = m->start(ws, f, &c, t, r, v);
        if (first)
            *first_start = s, first = 0;
        if (!s)
            s = m->advance(ws, end, obs, obs_ctx);
        m->get_stats(ws, &st);
        segments_add(stats, &st);
        if (s || !burn)
            return s;
        m->get_state(ws, &t, r, v);
        t = end;
        pb_manoeuvre_apply(&fo->manoeuvres[k++], r, v);
    }
}
