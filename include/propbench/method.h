/* propbench/method.h - the method interface (public): a const type record of
 * function pointers, as GSL's odeiv2 steppers, plus an opaque workspace owned
 * by the caller. A method never knows which problem it runs and never counts
 * its own force evaluations: the harness hands it a counting force wrapper.
 * Needs nothing of propbench's problem internals, and no __float128. */
#ifndef PB_PUBLIC_METHOD_H
#define PB_PUBLIC_METHOD_H

#include <stddef.h>
#include "status.h"

#ifdef __cplusplus
extern "C" {
#endif

/* The layout version of every public struct (pb_method_type, pb_force,
 * pb_method_config, pb_method_stats, and drive.h's request and outcome).
 * Raised whenever a field changes meaning or place, so that a record built
 * against another version is refused, not misread; the shared library's
 * soname (libpropbench.so.N) carries it. */
#define PB_METHOD_ABI 4u

/* The largest dim a method's alloc(dim) is asked for: 3 for a physical
 * state, up to 6 for a regularised one (Kustaanheimo-Stiefel: u1..u4, t and
 * a slot whose velocity carries the Kepler energy). A method that cannot
 * take a dim returns NULL from alloc; the case is then refused. */
#define PB_STATE_DIM_MAX 6

/* Kind flags (capabilities are fields, never checks of a name). */
enum {
    PB_KIND_FIXED       = 1u << 0, /* fixed step */
    PB_KIND_ADAPTIVE    = 1u << 1, /* error-controlled step */
    PB_KIND_SYMPLECTIC  = 1u << 2,
    PB_KIND_MULTISTEP   = 1u << 3,
    PB_FORM_SECOND      = 1u << 4, /* sees r, v, a(r): needs a velocity-independent force */
    PB_KIND_COMPENSABLE = 1u << 5, /* honours cfg->compensated */
    PB_FROM_GSL         = 1u << 6, /* GSL's stepper, wrapped */
    PB_KIND_KEPLER      = 1u << 7, /* built around the Kepler flow of cfg->mu: needs a
                                    * force that is -mu r/|r|^3 plus a perturbation */
    PB_KIND_KEPLER_EXACT = 1u << 8, /* with PB_KIND_KEPLER: the map is the exact Kepler
                                    * flow when the perturbation is zero (a splitting
                                    * around the Kepler drift), so on a pure two-body
                                    * problem its error is round-off at any step */
    PB_KIND_REGULARIZED = 1u << 9  /* steps equal in a regularizing variable (dt
                                    * proportional to r: equal steps in eccentric
                                    * anomaly on a Kepler orbit), so the steps an orbit
                                    * needs do not grow with its eccentricity */
};

/* The force as a method sees it: a(t, r, v) through an opaque context.
 * Returns PB_OK, PB_ENONFINITE (the harness's wrapper checks every result) or
 * another pb_status, which the method passes on after keeping its last good state. */
typedef struct pb_force {
    int (*accel)(void *ctx, double t, const double *r, const double *v, double *a);
    void *ctx;
    int dim;
} pb_force;

/* Called after every accepted step; a non-zero return stops advance, which
 * then returns that value. The timing pass passes NULL. */
typedef int (*pb_step_observer)(void *ctx, double t, const double *r, const double *v);

typedef struct pb_method_config {
    double h;              /* fixed-step methods: the step; adaptive: first step (0: automatic) */
    double rtol, atol;     /* adaptive methods: relative and absolute tolerance */
    double min_step;       /* adaptive: a step below this ends the case with PB_EMINSTEP */
    long max_steps;        /* accepted + rejected steps since start; 0: unlimited */
    int compensated;       /* 1: compensated summation of the state update */
    double corrector_tol;  /* multistep: iterate the corrector to this (0: PEC once) */
    int corrector_max_iter;
    double time_scale;     /* the problem's period or scale, to size automatic steps */
    double mu;             /* GM of the central body when the force is -mu r/|r|^3 plus a
                            * perturbation (every problem but the CR3BP); 0 otherwise.
                            * For methods that split off or regularise the Kepler flow
                            * (PB_KIND_KEPLER); others may ignore it. */
} pb_method_config;

typedef struct pb_method_stats {
    long steps;            /* accepted steps */
    long rejected;         /* rejected attempts (adaptive) */
    long startup_steps;    /* steps spent starting a multistep method */
    long output_cut;       /* accepted steps an adaptive method shortened to land
                            * exactly on an output time: cost the output grid adds */
    double t_fail;         /* time of the last good state when a step failed */
} pb_method_stats;

typedef struct pb_method_type {
    unsigned abi;            /* PB_METHOD_ABI of the headers it was built with */
    unsigned size;           /* sizeof(pb_method_type) as it was built */
    const char *name;        /* fixed CLI name, e.g. "rk4" */
    const char *description; /* one line */
    const char *source;      /* literature reference of the scheme */
    int order;
    unsigned flags;
    /* Workspace for a state of spatial dimension dim; NULL on failure.
     * Owner: the caller, released with the record's own free. No
     * allocation after this. */
    void *(*alloc)(int dim);
    /* Set the initial state and configuration (copies cfg; borrows f). */
    int (*start)(void *ws, const pb_force *f, const pb_method_config *cfg,
                 double t0, const double *r0, const double *v0);
    /* Step until t_out exactly. Fixed-step methods need t_out on their grid
     * t0 + n*h (PB_EINVAL otherwise); adaptive ones clamp the last step. */
    int (*advance)(void *ws, double t_out, pb_step_observer obs, void *obs_ctx);
    /* Current state (last good state after a failure). */
    void (*get_state)(const void *ws, double *t, double *r, double *v);
    void (*get_stats)(const void *ws, pb_method_stats *st);
    void (*free)(void *ws);  /* accepts NULL */
    /* Dense output (continuous extension): the state at any t within the
     * last accepted step, between the previous state and the current one,
     * without touching the integration, so that output times never shorten
     * a step. It may evaluate the force (dop853: three extra stages, once a
     * step; the harness keeps them out of a case's evaluation count) and fill
     * a cache of its own through the const pointer. PB_OK, PB_EINVAL when t
     * lies outside that step (or no step was taken), or the status of a
     * failed evaluation.
     * propbench/dense.h has a Hermite interpolant for methods without one of
     * their own. */
    int (*dense)(const void *ws, double t, double *r, double *v);
    int dense_order;         /* the extension's order q: local error O(h^(q+1)) */
} pb_method_type;

/* The first fields of every record: `{ PB_METHOD_RECORD_HEAD, .name = ... }`. */
#define PB_METHOD_RECORD_HEAD .abi = PB_METHOD_ABI, .size = (unsigned)sizeof(pb_method_type)

/* Whether a record can be run by this library: the ABI version and record
 * size it was built with match, it has a name, an order from 1 to 30, exactly
 * one of PB_KIND_FIXED and PB_KIND_ADAPTIVE, every function (dense output
 * included) and a dense order from 1 to its order. 0, or -1
 * with the reason (naming the method where it has a name) in err. */
PB_API int pb_method_check(const pb_method_type *m, char *err, size_t errlen);

/* A built-in method by its name ("rk4", "gauss-jackson8", ...); NULL if
 * unknown or name is NULL. */
PB_API const pb_method_type *pb_method_find(const char *name);

/* For a fixed-step method's advance: the grid index n of t_out on the grid
 * t0 + n h (within round-off), or -1 when t_out is not on it (answer
 * PB_EINVAL then). Time is best kept as t0 + n h, never as a running sum. */
PB_API long pb_grid_index(double t0, double h, double t_out);

#ifdef __cplusplus
}
#endif

#endif
