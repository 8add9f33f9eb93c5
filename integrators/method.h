/* method.h - the method interface inside propbench: the public record
 * (propbench/method.h) plus the method table, the fixed-step grid and
 * whether a method fits a problem, which need the problem's internals. */
#ifndef PB_METHOD_H
#define PB_METHOD_H

#include "propbench/method.h"
#include "problems/problem.h"

/* The method table: NULL-terminated, in display order (method_table.c). */
extern const pb_method_type *const pb_method_table[];

/* Where a plug-in method came from (summary.json's "plugin"). */
typedef struct pb_method_origin {
    char path[4096];
    char version[64];
    char sha256[65];   /* of the shared object's bytes, lower-case hex */
} pb_method_origin;

#define PB_METHOD_EXTRA_MAX 64

/* Add a plug-in method after the table: checked with pb_method_check, and
 * refused when its name is taken (built-in or an earlier plug-in). origin is
 * borrowed for the life of the program. 0, or -1 with the reason in err. */
int pb_method_register(const pb_method_type *m, const pb_method_origin *origin, char *err,
                       size_t errlen);
/* The i-th method: the table's, then the plug-ins'; NULL past the end. */
const pb_method_type *pb_method_at(int i);
/* A plug-in method's origin; NULL for a built-in one. */
const pb_method_origin *pb_method_origin_of(const pb_method_type *m);

/* The setting and position-error bound (problem length units, after 3
 * periods of a normalized Kepler orbit of eccentricity e from periapsis) a
 * method is expected to meet, from its order p and kind. Fixed step: N =
 * 1000 (p <= 2) or 200 steps per orbit and the bound 1e3 (h/(1-e)^1.5)^p,
 * i.e. the global error ~ C h^p (common practice) with the step measured
 * against the periapsis time scale (1-e)^1.5 of the orbit, clamped to
 * [1e-10, 0.1], with p at most 8: past that the error constants of the
 * high-order methods here (gauss-jackson8 converges at order 11 but its
 * error at 200 steps is that of an order-8 bound) decide, not the exponent.
 * Adaptive: rtol = atol = 1e-9 and 1e-4. */
void pb_method_expected_error(const pb_method_type *m, double e, double *steps_or_tol,
                              double *bound);

/* 1 when m can integrate p: a second-order-form method (PB_FORM_SECOND) sees
 * a(r) only, so it cannot take a velocity-dependent force; a method built
 * around the Kepler flow (PB_KIND_KEPLER) needs a central -mu r/|r|^3 term. */
int pb_method_fits(const pb_method_type *m, const pb_problem *p);
/* 1 when m's map is p's exact flow, whatever the step: a splitting around
 * the Kepler drift (PB_KIND_KEPLER | PB_KIND_KEPLER_EXACT) on a pure
 * two-body problem, where the perturbation it splits off is zero. Its error
 * there is round-off. */
int pb_method_exact_on(const pb_method_type *m, const pb_problem *p);
/* 0 when m fits p, else -1 with every reason it does not in err, naming the
 * method and the problem (the message of a refused case). */
int pb_method_fit_error(const pb_method_type *m, const pb_problem *p, char *err, size_t errlen);

#endif
