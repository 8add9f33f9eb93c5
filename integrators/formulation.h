/* formulation.h - regularised formulations around a method: the Sundman
 * time transformation and the Kustaanheimo-Stiefel (KS) regularisation
 * (Stiefel & Scheifele 1971, "Linear and Regular Celestial Mechanics").
 * An adapter runs an inner method on the regularised equations in a
 * fictitious time s and shows the harness a method in Cartesian (t, r, v). */
#ifndef PB_FORMULATION_H
#define PB_FORMULATION_H

#include "integrators/method.h"

/* The regularised state's dimension for a physical dimension dim (1..3):
 * Sundman (r, t): dim + 1; KS (u1..u4, t, tau): 6. */
int pb_formulation_qdim(pb_formulation form, int dim);

/* NULL when inner can integrate form; else why not (static text): a
 * second-order-form method sees no velocity, and the regularised forces
 * depend on the s-velocity; a method built around the Kepler flow
 * (PB_KIND_KEPLER) regularises in its own way. */
const char *pb_formulation_refusal(const pb_method_type *inner, pb_formulation form);

/* Whether m steps in a regularised formulation of its own (its steps are
 * set per Kepler period of the start, so it needs a bound orbit). */
int pb_formulation_wraps(const pb_method_type *m);

/* The record through which the harness drives a workspace made by
 * pb_formulation_alloc for inner (fixed-step or adaptive as inner is; its
 * own alloc is never called and returns NULL). */
const pb_method_type *pb_formulation_record(const pb_method_type *inner);

/* A workspace for form around inner, for physical dimension dim; NULL when
 * memory runs out or inner refuses the regularised dimension. Owner: the
 * caller, released with pb_formulation_record(inner)->free. */
void *pb_formulation_alloc(const pb_method_type *inner, pb_formulation form, int dim);

/* The equations (formulation_eqs.c). The physical force is f (its dim the
 * physical one); mu the central GM; c, n the Sundman dt = c r^n ds. */
typedef struct pb_form_eqs {
    pb_formulation form;
    int dim;                   /* physical */
    double mu, c, n;
    pb_force phys;
} pb_form_eqs;

/* Physical (t, x, v) to the regularised (q, q') in s. PB_OK, or PB_EINVAL at
 * the origin. */
int pb_form_to_reg(const pb_form_eqs *e, double t, const double *x, const double *v, double *q,
                   double *qp);
/* Regularised (q, q') to physical (t, x, v). */
void pb_form_to_phys(const pb_form_eqs *e, const double *q, const double *qp, double *t, double *x,
                     double *v);
/* The s-force q'' = F(q, q') (pb_force.accel with ctx = a pb_form_eqs):
 * one physical force evaluation. */
int pb_form_accel(void *ctx, double s, const double *q, const double *qp, double *qpp);

/* The Kepler period and the s-length of one Kepler orbit of the osculating
 * elements of (x, v): PB_OK, or PB_EINVAL for an orbit that is not bound
 * (its period sets the s-step). */
int pb_form_orbit(const pb_form_eqs *e, const double *x, const double *v, double *T, double *S);

/* The Sundman constant c making one Kepler orbit of (x, v) 2 pi long in s
 * for dt = c r^n ds: c = (1/2pi) int_0^T r^-n dt, by the trapezoidal rule in
 * the eccentric anomaly (spectrally accurate for a periodic integrand). */
double pb_form_sundman_c(double mu, const double *x, const double *v, int dim, double n);

#endif
