/* summary.h - one row of facts about a problem for listings (`list problems`):
 * osculating a and e of the initial state, period, the invariants' values. */
#ifndef PB_SUMMARY_H
#define PB_SUMMARY_H

#include "problem.h"

typedef struct pb_problem_facts {
    double a, e;          /* osculating, from (r0, v0); NAN if not keplerian */
    double period;        /* p->period (0: none) */
    double energy;        /* p->energy at t0; NAN if none */
    double angmom;        /* p->angmom at t0; NAN if none */
    double horizon;       /* default horizon in time units */
} pb_problem_facts;

/* Fill f for p (any pointer in f may be read afterwards). PB_OK, or
 * PB_EINVAL if the initial state is degenerate. */
int pb_problem_summary(const pb_problem *p, pb_problem_facts *f);

#endif
