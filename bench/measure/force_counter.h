/* force_counter.h - the counting force wrapper the harness hands to methods,
 * so cost is measured outside the method and a method cannot misreport it.
 * It also turns a non-finite acceleration into PB_ENONFINITE. */
#ifndef PB_FORCE_COUNTER_H
#define PB_FORCE_COUNTER_H

#include "integrators/method.h"

typedef struct pb_force_counter {
    const pb_problem *problem; /* borrowed */
    pb_accel_fn accel;         /* problem->accel, cached */
    int dim;
    long evals;
    double t_nonfinite;        /* time of the first non-finite force, if any */
    int saw_nonfinite;
} pb_force_counter;

/* Point f at a wrapper around p's acceleration that counts into c.
 * c and p must outlive f. */
void pb_force_counter_init(pb_force_counter *c, const pb_problem *p, pb_force *f);

#endif
