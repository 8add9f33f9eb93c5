/* universal.h - internal: the __float128 universal-variable flow with its
 * solver exposed for tests (the seed switch and the Newton iteration count). */
#ifndef PB_UNIVERSAL_H
#define PB_UNIVERSAL_H

/* pb_universal_propagate_q with seed = 1 is exactly this function. seed = 0
 * starts the quad Newton from its own starter (the solver before seeding);
 * seed = 1 from the double solution. *iters (if not NULL): the Newton
 * iterations (residual evaluations) of the quad solve, 0 when dt is a whole
 * number of periods. Returns as pb_universal_propagate_q. */
int pb_universal_propagate_q_counted(__float128 mu, const __float128 *r0, const __float128 *v0,
                                     __float128 dt, __float128 *r, __float128 *v, int seed,
                                     int *iters);

#endif
