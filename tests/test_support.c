/* test_support.c - see test_support.h. */
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include "test_support.h"
#include "../bench/force_counter.h"

pbt_result pbt_integrate(const pb_method_type *m, const pb_problem *p,
                         const pb_method_config *cfg, double t_end)
{
    pbt_result res;
    memset(&res, 0, sizeof res);
    pb_force_counter c;
    pb_force f;
    pb_force_counter_init(&c, p, &f);
    void *ws = m->alloc(p->dim);
    if (!ws) {
        res.status = PB_ENOMEM;
        return res;
    }
    res.status = m->start(ws, &f, cfg, p->t0, p->r0, p->v0);
    if (!res.status)
        res.status = m->advance(ws, t_end, NULL, NULL);
    m->get_state(ws, &res.t, res.r, res.v);
    pb_method_stats st;
    m->get_stats(ws, &st);
    res.steps = st.steps;
    res.rejected = st.rejected;
    res.t_fail = st.t_fail;
    res.evals = c.evals;
    m->free(ws);
    return res;
}

double pbt_pos_error(const pb_problem *p, const pbt_result *res)
{
    __float128 rq[PB_DIM_MAX], vq[PB_DIM_MAX];
    if (!p->exact_q || p->exact_q(p, res->t, rq, vq))
        return NAN;
    __float128 s = 0;
    for (int i = 0; i < p->dim; i++) {
        __float128 d = (__float128)res->r[i] - rq[i];
        s += d * d;
    }
    return sqrt((double)s);
}

int pbt_sanitized(void)
{
    const char *s = getenv("PB_SANITIZED");
    return s && *s && strcmp(s, "0") != 0;
}
