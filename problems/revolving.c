/* revolving.c - Newton's revolving orbit (Principia I, Prop. 44;
 * REFERENCES.md): its exact flow in double and __float128 from one algorithm
 * (revolving_impl.h over the universal-variable Kepler flow of each
 * precision), and the problem that uses it as truth. */
#include <math.h>
#include <quadmath.h>
#include "revolving.h"
#include "force_terms.h"
#include "twobody.h"

#define RV_REAL double
#define RV_SUF _d
#define RV_PUBLIC pb_revolving_propagate
#define RV_KEPLER pb_universal_propagate
#define RV_PI 3.14159265358979323846
#define RV_SQRT sqrt
#define RV_SIN sin
#define RV_COS cos
#define RV_ATAN2 atan2
#define RV_ROUND nearbyint
#define RV_FINITE(x) isfinite(x)
#include "revolving_impl.h"
#undef RV_REAL
#undef RV_SUF
#undef RV_PUBLIC
#undef RV_KEPLER
#undef RV_PI
#undef RV_SQRT
#undef RV_SIN
#undef RV_COS
#undef RV_ATAN2
#undef RV_ROUND
#undef RV_FINITE

#define RV_REAL __float128
#define RV_SUF _q
#define RV_PUBLIC pb_revolving_propagate_q
#define RV_KEPLER pb_universal_propagate_q
#define RV_PI M_PIq
#define RV_SQRT sqrtq
#define RV_SIN sinq
#define RV_COS cosq
#define RV_ATAN2 atan2q
#define RV_ROUND nearbyintq
#define RV_FINITE(x) finiteq(x)
#include "revolving_impl.h"

static int rv_exact(const pb_problem *p, double t, double *r, double *v)
{
    return pb_revolving_propagate(p->mu, p->forces.inverse_cube_gamma, p->r0, p->v0,
                                  t - p->t0, r, v);
}

/* The double initial state, gamma and times convert exactly to __float128,
 * so the quad truth is the exact flow of the very state the methods start
 * from. */
static int rv_exact_q(const pb_problem *p, double t, __float128 *r, __float128 *v)
{
    __float128 r0[3], v0[3];
    for (int i = 0; i < 3; i++) {
        r0[i] = p->r0[i];
        v0[i] = p->v0[i];
    }
    return pb_revolving_propagate_q(p->mu, p->forces.inverse_cube_gamma, r0, v0,
                                    (__float128)t - (__float128)p->t0, r, v);
}

int pb_problem_init_revolving(pb_problem *p, const char *name, const char *description,
                              double mu, double gamma, double a, double e)
{
    if (!(mu > 0) || !(a > 0) || !(e >= 0 && e < 1) || !isfinite(gamma))
        return PB_EINVAL;
    /* h'^2 = mu a (1 - e^2) is the auxiliary orbit's; h^2 = h'^2 + 2 gamma */
    double h2 = mu * a * (1.0 - e * e) + 2.0 * gamma;
    if (!(h2 > 0))
        return PB_EINVAL;
    double rp = a * (1.0 - e);
    double r0[3] = {rp, 0.0, 0.0}, v0[3] = {0.0, sqrt(h2) / rp, 0.0};
    pb_forces f = {0};
    f.inverse_cube_gamma = gamma;
    pb_problem_init_forces(p, name, description, PB_UNITS_NORMALIZED, mu, 0.0, &f, r0, v0);
    p->forces.inverse_cube_gamma = gamma;  /* also when gamma = 0 (no terms: two-body) */
    p->period = pb_twobody_period(mu, a);
    p->keplerian = 1;
    p->exact = rv_exact;
    p->exact_q = rv_exact_q;
    return PB_OK;
}
