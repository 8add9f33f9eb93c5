/* ephemeris_fit.h - the positions of a problem's time-only bodies (Sun, Moon,
 * a circular body) over one step of the reference integrator, interpolated in
 * __float128 from a few evaluations of their series at Chebyshev points, so
 * that the ~110 force evaluations of a step do not each sum the Moon's series.
 * Each fit is checked against the series at a point off its nodes and is not
 * used when it disagrees by more than 1e-27 relative. */
#ifndef PB_EPHEMERIS_FIT_H
#define PB_EPHEMERIS_FIT_H

#include "problem.h"

/* Nodes of the first try and of the second: 8 carry the Moon to 1e-27
 * over a LEO-length step, 14 over a GEO-length one (measured in
 * tests/test_forces_ephemeris.c); a fit that fails both is not used. */
#define PB_EPH_FIT_NODES_FEW 8
#define PB_EPH_FIT_NODES 14

typedef struct pb_ephemeris_fit {
    int on;                                   /* 1: the fit holds over [t0, t0 + H] */
    int n;                                    /* nodes in use */
    int used[3];                              /* which bodies (Sun, Moon, circular) the problem has */
    __float128 t[PB_EPH_FIT_NODES];           /* nodes */
    __float128 pos[PB_EPH_FIT_NODES][3][3];   /* body positions at the nodes */
    __float128 tc, inv_half;                  /* the window's centre and 2 / its length */
    __float128 coef[PB_EPH_FIT_NODES][3][3];  /* the interpolant in powers of (t - tc) inv_half */
} pb_ephemeris_fit;

/* Fit the bodies of p over [t0, t0 + H]; fit->on says whether it may be used. */
void pb_ephemeris_fit_make(pb_ephemeris_fit *fit, const pb_problem *p, __float128 t0,
                           __float128 H);
/* The fitted positions at t (within the step) into pos. */
void pb_ephemeris_fit_at(const pb_ephemeris_fit *fit, __float128 t, __float128 (*pos)[3]);

#endif
