/* problem.h - the problem interface: a second-order force a = accel(t, r, v)
 * plus everything known about it (invariants, time scale, initial state and,
 * where one exists, the exact solution in double and in __float128).
 * A problem never knows who integrates it. */
#ifndef PB_PROBLEM_H
#define PB_PROBLEM_H

#include "status.h"
#include "forces.h"

#define PB_DIM_MAX 3
#define PB_NAME_MAX 64

typedef enum pb_units {
    PB_UNITS_NORMALIZED = 0, /* mu = 1 (two-body) or the CR3BP's own units */
    PB_UNITS_KM_S            /* km, s, km^3/s^2 */
} pb_units;

typedef enum pb_force_model {
    PB_FORCE_TWO_BODY = 0,
    PB_FORCE_J2,             /* two-body plus the J2 zonal term */
    PB_FORCE_CR3BP,          /* circular restricted three-body, rotating frame */
    PB_FORCE_PERTURBED       /* two-body plus the terms of pb_problem.forces */
} pb_force_model;

/* The equations the methods integrate (problem-file key `formulation`,
 * option --formulation). The truth, the invariants and every metric stay in
 * Cartesian time and state whatever this says: a regularised form changes
 * only what the method sees (integrators/formulation.h). */
typedef enum pb_formulation {
    PB_FORMULATION_CARTESIAN = 0,  /* y = (r, v) in physical time */
    PB_FORMULATION_SUNDMAN,        /* (r, t) in s with dt = c r ds */
    PB_FORMULATION_KS,             /* Kustaanheimo-Stiefel: (u, t, h) in s with dt = r ds */
    PB_FORMULATION_COUNT
} pb_formulation;

/* The formulation's name ("cartesian", "sundman", "ks"); "?" if out of range. */
static inline const char *pb_formulation_name(int f)
{
    static const char *const names[PB_FORMULATION_COUNT] = {"cartesian", "sundman", "ks"};
    return f >= 0 && f < PB_FORMULATION_COUNT ? names[f] : "?";
}

typedef struct pb_problem pb_problem;

/* Acceleration at (t, r, v) into a[dim]. Returns PB_OK or a pb_status. */
typedef int (*pb_accel_fn)(const pb_problem *p, double t, const double *r,
                           const double *v, double *a);

/* A problem is plain data: copying the struct copies the problem. */
struct pb_problem {
    char name[PB_NAME_MAX];
    char description[160];
    pb_units units;
    pb_force_model force;
    int dim;                  /* spatial dimension; state is (r, v), 2*dim values */
    double mu;                /* gravitational parameter; CR3BP: mass ratio */
    double body_radius;       /* central body's equatorial radius (0: none) */
    pb_forces forces;         /* terms beyond the central attraction (J2 problems
                               * included: forces.jn[2]); all zero for two-body */
    int velocity_dependent;   /* 1 if accel depends on v (CR3BP's Coriolis term, drag) */
    int invariants_from_truth; /* 1: energy and angular momentum change by the force
                                * itself (drag, third bodies, radiation pressure,
                                * manoeuvres), so their errors are measured against
                                * the truth's own values at the same time */
    double t0;
    double r0[PB_DIM_MAX], v0[PB_DIM_MAX];
    double period;            /* the time scale "orbits" counts; 0 if none */
    double default_orbits;    /* default horizon in periods (when period > 0) */
    double default_horizon_s; /* default horizon in time units (when period == 0) */
    pb_formulation formulation; /* what the methods integrate; never the truth */

    pb_accel_fn accel;
    /* Energy-like integral (energy, energy with J2 potential, Jacobi constant);
     * NULL if the problem has none. */
    double (*energy)(const pb_problem *p, double t, const double *r, const double *v);
    /* Second invariant: |h| for two-body, h_z for axisymmetric J2; NULL if none. */
    double (*angmom)(const pb_problem *p, const double *r, const double *v);
    const char *energy_label;  /* e.g. "energy", "Jacobi constant" */
    const char *angmom_label;  /* e.g. "|h|", "h_z" */
    int keplerian;            /* 1: eccentricity vector and apsides are meaningful */

    /* Exact state at time t (double and quad); NULL if no closed form, in
     * which case the harness builds a reference trajectory. */
    int (*exact)(const pb_problem *p, double t, double *r, double *v);
    int (*exact_q)(const pb_problem *p, double t, __float128 *r, __float128 *v);
};

/* The GM of the central -mu r/|r|^3 term that the force is made of plus a
 * perturbation (pb_method_config.mu); 0 where there is none (the CR3BP). */
static inline double pb_problem_kepler_mu(const pb_problem *p)
{
    return p->force == PB_FORCE_CR3BP ? 0.0 : p->mu;
}

/* Evaluate a problem's acceleration; thin wrapper kept for symmetry. */
static inline int pb_problem_accel(const pb_problem *p, double t, const double *r,
                                   const double *v, double *a)
{
    return p->accel(p, t, r, v, a);
}

#endif
