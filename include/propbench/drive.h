/* propbench/drive.h - run one case from outside propbench (public): a
 * built-in problem, any method record (a built-in one from pb_method_find,
 * or the caller's own), a step or tolerance and a horizon; the result is the
 * case's headline metrics and cost, as summary.json names them. */
#ifndef PB_PUBLIC_DRIVE_H
#define PB_PUBLIC_DRIVE_H

#include <stddef.h>
#include "method.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct pb_drive_request {
    const char *problem;          /* built-in problem name, e.g. "kepler-e0.5" */
    const pb_method_type *method; /* borrowed; checked with pb_method_check */
    int steps_per_orbit;          /* fixed-step methods */
    double tolerance;             /* adaptive methods: rtol = atol */
    double orbits;                /* horizon in periods; 0: the problem's default */
    const char *cache_dir;        /* where reference trajectories (problems with no
                                   * closed form) are kept between runs; NULL: built
                                   * in memory each time and nothing is written */
} pb_drive_request;

typedef struct pb_drive_outcome {
    char id[160];                 /* the case id, as in summary.json */
    int status;                   /* pb_status of the integration (PB_OK: reached the horizon) */
    const char *status_name;      /* "ok", "diverged" or "max_steps" (a case that could
                                   * not be set up is an error, not an outcome) */
    double t_end;                 /* time reached, problem units */
    double energy_rel_max, angmom_rel_max;
    double pos_err_max, pos_err_final, vel_err_max;   /* problem length (speed) units */
    double growth_exponent_pos;   /* slope of log error on log time (NaN: no fit) */
    const char *growth_class_energy;  /* "bounded", "sqrt", "linear", "quadratic", "other" */
    long steps, evals, rejected;  /* evals counted by propbench, not the method */
} pb_drive_outcome;

/* Run the case (metric pass only; no timing; no files written unless
 * rq->cache_dir is given). err must not be NULL. 0 with the
 * outcome filled (an integration that failed is an outcome, not an error),
 * or -1 with the reason in err: unknown problem, a method record that does
 * not pass pb_method_check or does not fit the problem, a bad
 * steps_per_orbit, tolerance or orbits, out of memory. */
PB_API int pb_drive_case(const pb_drive_request *rq, pb_drive_outcome *out, char *err, size_t errlen);

#ifdef __cplusplus
}
#endif

#endif
