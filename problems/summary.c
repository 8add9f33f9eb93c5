/* summary.c - facts about any problem, built-in or from a file (see
 * summary.h): what a listing, a report or the harness states about the orbit
 * comes from the problem itself, never from the catalogue by name. */
#include <math.h>
#include "summary.h"
#include "twobody.h"

int pb_problem_summary(const pb_problem *p, pb_problem_facts *f)
{
    f->a = f->e = NAN;
    f->period = p->period;
    f->energy = p->energy ? p->energy(p, p->t0, p->r0, p->v0) : (double)NAN;
    f->angmom = p->angmom ? p->angmom(p, p->r0, p->v0) : (double)NAN;
    f->horizon = p->period > 0 ? p->default_orbits * p->period : p->default_horizon_s;
    if (p->keplerian && p->dim == 3) {
        pb_elements el;
        int s = pb_elements_from_state(p->mu, p->r0, p->v0, &el);
        if (s)
            return s;
        f->a = el.a;
        f->e = el.e;
    }
    return PB_OK;
}
