/* radau15.h - what tests may see of radau15.c beyond its method record: the
 * Gauss-Radau spacings it computes, and how its predictor-corrector
 * iteration went. */
#ifndef PB_RADAU15_H
#define PB_RADAU15_H

#include "integrators/method.h"

#define PB_RADAU15_NODES 8   /* 0 and the seven Radau spacings */

extern const pb_method_type pb_method_radau15;

/* The spacings h_0 = 0 < h_1 < ... < h_7 < 1 as radau15 computes them (in
 * long double, then rounded). */
void pb_radau15_spacings(double h[PB_RADAU15_NODES]);

typedef struct pb_radau15_info {
    double epsilon;          /* Rein & Spiegel's epsilon that cfg->rtol maps to */
    long iterations;         /* predictor-corrector sweeps, all attempts since start */
    long not_converged;      /* attempts that hit the sweep limit */
    int last_iterations;     /* sweeps of the last attempt */
    double last_correction;  /* its last sweep's max |change of B_7| / max |a| */
} pb_radau15_info;

/* The counters of a radau15 workspace (from pb_method_radau15.alloc). */
void pb_radau15_get_info(const void *ws, pb_radau15_info *info);

#endif
