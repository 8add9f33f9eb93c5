/* force_terms_quad.c - the force terms of forces.h in __float128 for the
 * reference trajectory: the same source as the methods' double force
 * (force_terms_impl.h), so the truth integrates the very model under test. */
#include <float.h>
#include <math.h>
#include <quadmath.h>
#include "forces.h"
#include "force_terms.h"
#include "cr3bp.h"

#define FT_REAL __float128
#define FT_SUF _q
#define FT_SQRT pb_sqrt_q
#define FT_EXP expq
#define FT_SIN sinq
#define FT_COS cosq
#define FT_ASIN asinq
#define FT_ACOS acosq
#define FT_FABS fabsq
#define FT_PI M_PIq

/* A __float128 square root from the hardware's double one and one
 * correction: with y the double root, x - y^2 is exact (y^2 has 106
 * significant bits, and x and y^2 agree to within a factor 2), so
 * sqrt(x) = y + e - e^2/(2y) + O(e^3/y^2), e = (x - y^2)/(2y), where e is
 * about 1e-16 y and needs only long double's 64 bits (its error is 1e-35 of
 * the root). About four times faster than sqrtq, which the force calls a
 * dozen times an evaluation; within 2 units in the last place of it
 * (tests/test_forces_quad.c). Elsewhere (zero, negative, beyond double's
 * range, or no 64-bit long double) it is sqrtq. */
__float128 pb_sqrt_q(__float128 x)
{
#if LDBL_MANT_DIG >= 64
    double y = sqrt((double)x);
    if (y > 0 && y < HUGE_VAL && y > 1e-150) {
        __float128 Y = y, r = x - Y * Y;
        long double e = (long double)r / (2.0L * (long double)y);
        return Y + (__float128)(e - e * e / (2.0L * (long double)y));
    }
#endif
    return sqrtq(x);
}

#include "force_terms_impl.h"

int pb_forces_have_quad(const pb_problem *p)
{
    return p->accel == pb_forces_accel || p->accel == pb_cr3bp_accel ||
           p->accel == pb_twobody_accel;
}

int pb_forces_deriv_q(const pb_problem *p, __float128 t, const __float128 *y, int region,
                      int band, __float128 (*pos)[3], __float128 *dy)
{
    if (!pb_forces_have_quad(p))
        return PB_EINVAL;
    dy[0] = y[3];
    dy[1] = y[4];
    dy[2] = y[5];
    if (p->accel == pb_cr3bp_accel)
        ft_cr3bp_q(p, y, y + 3, dy + 3);
    else if (pos)
        ft_accel_at_q(p, y, y + 3, region < 0 ? FT_REGION_GEOMETRY : region, band, pos, dy + 3);
    else
        ft_accel_q(p, t, y, y + 3, region < 0 ? FT_REGION_GEOMETRY : region, band, dy + 3);
    return PB_OK;
}

int pb_forces_events_q(const pb_problem *p, __float128 t, const __float128 *r, int band,
                       __float128 *g, int *nshadow)
{
    return ft_events_q(p, t, r, band, g, nshadow);
}

int pb_forces_band_q(const pb_problem *p, const __float128 *r)
{
    return p->forces.drag ? ft_band_q(ft_altitude_q(p, r)) : -1;
}

int pb_forces_region_q(const pb_problem *p, const __float128 *g)
{
    if (p->forces.shadow == PB_SHADOW_CYLINDRICAL)
        return g[0] > 0 ? FT_REGION_SUN : FT_REGION_UMBRA;
    if (p->forces.shadow == PB_SHADOW_CONICAL)
        return g[0] > 0 ? FT_REGION_SUN : g[1] > 0 ? FT_REGION_PENUMBRA : FT_REGION_UMBRA;
    return FT_REGION_GEOMETRY;
}

int pb_forces_region_has_edge_terms(const pb_problem *p, int region)
{
    return p->forces.shadow == PB_SHADOW_CONICAL && region == FT_REGION_PENUMBRA;
}

int pb_forces_timed_bodies(const pb_problem *p)
{
    const pb_forces *f = &p->forces;
    return p->accel == pb_forces_accel && (f->sun || f->moon || f->circular || f->srp_area_mass_m2_kg > 0);
}

void pb_forces_bodies_q(const pb_problem *p, __float128 t, __float128 (*pos)[3])
{
    ft_bodies_q(p, t, pos);
}
