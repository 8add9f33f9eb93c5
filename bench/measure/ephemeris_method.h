/* ephemeris_method.h - a trajectory another program produced, replayed as a
 * method so that the harness measures it exactly as it measures a run: its
 * "steps" are the ephemeris records, its dense output a cubic Hermite of
 * positions and velocities between the two records around t (the record
 * itself at its epoch). It never evaluates the force. */
#ifndef PB_EPHEMERIS_METHOD_H
#define PB_EPHEMERIS_METHOD_H

#include "integrators/method.h"

/* n records at increasing absolute times t[k] (problem time units), with
 * positions r[3k..3k+2] and velocities v[3k..3k+2]. */
typedef struct pb_ephemeris {
    int n;
    double *t, *r, *v;
} pb_ephemeris;

/* The pseudo-method ("ephemeris", adaptive kind, order 3). Its alloc takes
 * the ephemeris bound to the calling thread by pb_ephemeris_bind (borrowed;
 * it must outlive the case); without one, alloc returns NULL. */
extern const pb_method_type pb_method_ephemeris;
void pb_ephemeris_bind(const pb_ephemeris *e);

/* Release the arrays of e (accepts NULL). */
void pb_ephemeris_free(pb_ephemeris *e);

#endif
