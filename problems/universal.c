/* universal.c - the exact two-body flow by universal variables, in double and
 * in __float128 (quadmath), from one algorithm in universal_impl.h; the quad
 * Newton solve starts from the double solution (2-3 iterations on an ellipse).
 * Source: Bate, Mueller, White (1971) ch. 4; Vallado 4th ed. Algorithm 8. */
#include <float.h>
#include <math.h>
#include <quadmath.h>
#include "twobody.h"
#include "universal.h"

#define UV_REAL double
#define UV_SUF _d
#define UV_PUBLIC pb_universal_propagate
#define UV_EPS DBL_EPSILON
#define UV_PI 3.14159265358979323846
#define UV_SQRT sqrt
#define UV_SIN sin
#define UV_SINH sinh
#define UV_LOG log
#define UV_FABS fabs
#define UV_ROUND nearbyint
#define UV_FMA fma
#define UV_FINITE(x) isfinite(x)
#include "universal_impl.h"
#undef UV_REAL
#undef UV_SUF
#undef UV_PUBLIC
#undef UV_EPS
#undef UV_PI
#undef UV_SQRT
#undef UV_SIN
#undef UV_SINH
#undef UV_LOG
#undef UV_FABS
#undef UV_ROUND
#undef UV_FMA
#undef UV_FINITE

#define UV_REAL __float128
#define UV_SUF _q
#define UV_PUBLIC pb_universal_propagate_q
#define UV_EPS FLT128_EPSILON
#define UV_PI M_PIq
#define UV_SQRT sqrtq
#define UV_SIN sinq
#define UV_SINH sinhq
#define UV_LOG logq
#define UV_FABS fabsq
#define UV_ROUND nearbyintq
#define UV_FMA fmaq
#define UV_FINITE(x) finiteq(x)
#define UV_SEED_FROM_DOUBLE
#include "universal_impl.h"

int pb_universal_propagate_q_counted(__float128 mu, const __float128 *r0, const __float128 *v0,
                                     __float128 dt, __float128 *r, __float128 *v, int seed,
                                     int *iters)
{
    return uv_propagate_q(mu, r0, v0, dt, r, v, seed, iters);
}
